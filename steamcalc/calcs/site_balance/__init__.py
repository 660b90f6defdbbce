"""The balance kind: a site's steam balance. ``calculation`` is the module the registry holds."""
