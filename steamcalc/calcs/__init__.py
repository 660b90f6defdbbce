"""The registry of calculation kinds.

Each kind is a module exposing ``KIND`` (the case-file ``kind``), ``TITLE``,
``WORKBOOK`` (its notebook's file name), a frozen ``Inputs`` dataclass whose
fields carry label, unit kind, help text and example in their metadata, and
``calculate(inputs, site) -> Result``. Records, forms, batch runs and review
find a kind only through :func:`get_calculation`.

A kind may also have a vectorised sample path (:func:`sample_path`): a module with
``RESULTS`` and ``sample_results(inputs, site, columns, size, keys)`` that gives the banded
results of many Monte Carlo samples at once; uncertainty runs use it where it answers and
``calculate()`` for the rest. Its Inputs checks must be intervals and orderings between inputs
(each sample is then valid when every corner of the tolerance box is, see
:mod:`steamcalc.runs.uncertainty`).
"""

from __future__ import annotations

import importlib

from ..errors import CaseFileError
# Imported under their own names: ``steamcalc.calcs.letdown`` stays the kind's package.
from .exchanger import calculation as exchanger_calculation
from .flash import calculation as flash_calculation
from .letdown import calculation as letdown_calculation
from .site_balance import calculation as site_balance_calculation
from .steam_main import calculation as steam_main_calculation

_REGISTRY = {module.KIND: module for module in (letdown_calculation, flash_calculation, exchanger_calculation,
                                                 site_balance_calculation, steam_main_calculation)}
#: Kind -> its vectorised sample path, imported on first use (numpy and the array engine).
_SAMPLE_PATHS = {letdown_calculation.KIND: ".letdown.vector", flash_calculation.KIND: ".flash.vector",
                 exchanger_calculation.KIND: ".exchanger.vector"}


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


def sample_path(calc):
    """The vectorised Monte Carlo sample path of a registered calculation module, or None.

    Examples
    --------
    >>> sample_path(get_calculation("letdown")).__name__, sample_path(get_calculation("flash")).__name__
    ('steamcalc.calcs.letdown.vector', 'steamcalc.calcs.flash.vector')
    """
    kind = getattr(calc, "KIND", None)
    if kind not in _SAMPLE_PATHS or _REGISTRY.get(kind) is not calc:
        return None
    return importlib.import_module(_SAMPLE_PATHS[kind], __name__)
