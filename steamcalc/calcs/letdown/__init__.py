"""The letdown kind: the let-down station. ``calculation`` is the module the registry holds."""
