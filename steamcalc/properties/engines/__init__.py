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
#: The states already evaluated in this context, when a block asks to remember them (:func:`remembering_states`).
_REMEMBERED = contextvars.ContextVar("steamcalc_remembered_states", default=None)
#: The engine functions whose value depends on their arguments alone (every one but ``version``).
_PURE = ("saturation_temperature", "saturation_pressure", "backward_temperature_ph", "bounds", "state_pT", "state_ph",
         "state_ps", "state_p_dryness", "state_T_dryness")
#: Most states a block remembers; beyond it the oldest are forgotten (a few hundred bytes each).
MAX_REMEMBERED = 50_000


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
    """The module of an engine (default: the current context's), imported on first use.

    Inside :func:`remembering_states` it is the same module behind a memory of the states it has given.
    """
    module = _load(_CURRENT.get() if name is None else name)
    remembered = _REMEMBERED.get()
    return module if remembered is None else _Remembering(module, remembered)


class _Remembering:
    """An engine module that gives a state it has evaluated before from its memory: the same arguments give the
    very same value (each function is pure and its value an immutable float or tuple), evaluated once."""

    def __init__(self, module, remembered):
        self._module, self._remembered = module, remembered

    def __getattr__(self, name):
        value = getattr(self._module, name)
        if name not in _PURE:
            return value
        remembered, engine = self._remembered, self._module.NAME

        def evaluate(*args):
            # Equal arguments of another type or sign of zero (100000 and 1e5, 0.0 and -0.0) can give values of
            # another type or sign (an engine may pass an argument through): their exact spellings keep them apart.
            key = (engine, name, args, tuple(map(repr, args)))
            try:
                return remembered[key]
            except KeyError:
                pass
            found = value(*args)
            if len(remembered) >= MAX_REMEMBERED:
                del remembered[next(iter(remembered))]
            remembered[key] = found
            return found
        return evaluate


@contextlib.contextmanager
def remembering_states(memory=None):
    """Within this block, in this context only, each engine evaluates a state once and gives it again from memory.

    For work that evaluates the same states many times over — re-verifying the records of a site, whose cases
    share its headers' states; a workbook recomputing after one input changed — with nothing changed in what is
    computed: an engine function's value depends on its arguments alone. An exception is never remembered (it is
    raised again by evaluating again). The memory is the block's own and is forgotten when it ends, unless the
    caller gives its own (an empty dict it keeps, to remember across blocks). A block inside a block that
    remembers, and gives no memory of its own, keeps to the outer block's memory (one case of a batch, one record
    of a register).

    Examples
    --------
    >>> with remembering_states():
    ...     first = engine_module().saturation_temperature(1e5)
    ...     engine_module().saturation_temperature(1e5) == first
    True
    >>> outer = {}
    >>> with remembering_states(outer):
    ...     with remembering_states():
    ...         _ = engine_module().saturation_temperature(2e5)
    >>> len(outer)
    1
    """
    if memory is None:
        memory = _REMEMBERED.get()
    token = _REMEMBERED.set({} if memory is None else memory)
    try:
        yield
    finally:
        _REMEMBERED.reset(token)


@contextlib.contextmanager
def states_not_remembered():
    """Within this block, in this context only, no state is remembered nor taken from memory: for states that are
    each evaluated once (Monte Carlo samples worked one by one), which would otherwise push the states that are
    shared (a site's headers) out of a long-lived memory, oldest first.

    Examples
    --------
    >>> with remembering_states() as _:
    ...     with states_not_remembered():
    ...         _ = engine_module().saturation_temperature(3e5)
    ...     _REMEMBERED.get()
    {}
    """
    token = _REMEMBERED.set(None)
    try:
        yield
    finally:
        _REMEMBERED.reset(token)


def remember_states_from_now():
    """From now on, in this context, each engine evaluates a state once: for a batch's worker process, whose whole
    life is one batch, so that its cases share their headers' and inlets' states (:func:`remembering_states`,
    without an end; the memory keeps at most :data:`MAX_REMEMBERED` states)."""
    _REMEMBERED.set({})


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
           "engine_module", "other_engine", "remember_states_from_now", "remembering_states", "states_not_remembered",
           "using_engine"]
