"""The flash kind: flash-steam recovery. ``calculation`` is the module the registry holds."""
