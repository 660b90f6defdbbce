"""The exchanger kind: the steam-heated exchanger. ``calculation`` is the module the registry holds."""
