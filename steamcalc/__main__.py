"""``python -m steamcalc``: the same as the ``steamcalc`` command."""

from .cli import entry_point

entry_point()
