"""The two IAPWS-IF97 property engines, and the one seam where a caller chooses between them.

``"iapws"``
    the ``iapws`` package (pure Python): the engine of issued records, and the default.
``"fast"``
    the ``seuif97`` package (compiled): sweeps, charts and Monte Carlo samples, and the
    independent second implementation behind ``steamcalc verify --engine fast``.

The choice is explicit: pass ``engine=`` to a :class:`steamcalc.properties.steam.SteamState`
constructor, or run a block under :func:`using_engine`, which sets it for the current
context only (a :class:`contextvars.ContextVar`: another thread, or another task in a threaded
worker, keeps its own choice and starts on the default). There is no module-level switch.
Each engine is imported on first use, so choosing one never imports the other.

Examples
--------
>>> current_engine()
'iapws'
>>> with using_engine("fast"):
...     current_engine(), other_engine()
('fast', 'iapws')
>>> current_engine()
'iapws'
"""

from __future__ import annotations

import contextlib
import contextvars
import functools
import importlib

from ...errors import InputError

REFERENCE_ENGINE = "iapws"
FAST_ENGINE = "fast"
#: Engine name -> its module in this package (imported on first use).
_MODULES = {REFERENCE_ENGINE: "iapws_engine", FAST_ENGINE: "seuif97_engine"}
ENGINES = tuple(_MODULES)

_CURRENT = contextvars.ContextVar("steamcalc_property_engine", default=REFERENCE_ENGINE)


def check_engine(name):
    """Return ``name`` if it names an engine; otherwise an :class:`InputError` listing them."""
    if name not in _MODULES:
        raise InputError(f"no property engine called {name!r}", field="engine", value=name,
                         fix=f"choose one of: {', '.join(ENGINES)}")
    return name


@functools.cache
def _load(name):
    return importlib.import_module(f".{_MODULES[check_engine(name)]}", __name__)


def engine_module(name=None):
    """The module of an engine (default: the current context's), imported on first use."""
    return _load(_CURRENT.get() if name is None else name)


def current_engine():
    """Name of the engine the current context uses when a constructor is not told one."""
    return _CURRENT.get()


def other_engine(name=None):
    """The engine that is not ``name`` (default: not the current one): for an independent cross-check."""
    name = _CURRENT.get() if name is None else check_engine(name)
    return FAST_ENGINE if name == REFERENCE_ENGINE else REFERENCE_ENGINE


@contextlib.contextmanager
def using_engine(name):
    """Within this block, in this context only, SteamState constructors use engine ``name``."""
    token = _CURRENT.set(check_engine(name))
    try:
        yield name
    finally:
        _CURRENT.reset(token)


def engine_description(name):
    """The engine, its library and version, in words, e.g. for a record's uncertainty section."""
    module = engine_module(check_engine(name))
    return {"engine": name, "library": module.LIBRARY, "version": module.version()}


__all__ = ["ENGINES", "FAST_ENGINE", "REFERENCE_ENGINE", "check_engine", "current_engine", "engine_description",
           "engine_module", "other_engine", "using_engine"]
