"""The registry of calculation kinds.

Each kind is a module exposing ``KIND`` (the case-file ``kind``), ``TITLE``,
``WORKBOOK`` (its notebook's file name), a frozen ``Inputs`` dataclass whose
fields carry label, unit kind, help text and example in their metadata, and
``calculate(inputs, site) -> Result``. Records, forms, batch runs and review
find a kind only through :func:`get_calculation`.
"""

from __future__ import annotations

from ..errors import CaseFileError
from . import exchanger, flash, letdown

_REGISTRY = {module.KIND: module for module in (letdown, flash, exchanger)}


def kinds():
    """The calculation kinds steamcalc knows, in registry order."""
    return tuple(_REGISTRY)


def get_calculation(kind):
    """The module of a calculation kind.

    Raises
    ------
    CaseFileError
        If the kind is not registered.
    """
    try:
        return _REGISTRY[kind]
    except KeyError:
        raise CaseFileError(f"kind {kind!r} is not a calculation steamcalc knows", field="kind",
                            value=kind, fix=f"use one of: {', '.join(kinds())}") from None
