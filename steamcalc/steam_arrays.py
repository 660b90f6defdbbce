"""IF97 over arrays, and a fast IF97 engine for many evaluations (Monte Carlo, sweeps, charts).

The scalar :class:`~steamcalc.steam.SteamState` uses the ``iapws`` package, the reference.
This module evaluates the same formulation, IAPWS-IF97, through CoolProp's IF97 backend
(compiled code): :func:`states_ph` and friends take arrays, and :func:`fast_properties`
switches the SteamState constructors to it for a block of code. Starting values (CoolProp's
backward equations for one state, a table of the forward equations for arrays) are refined
on the forward basic equations by Newton steps, so results agree with the iapws path to
about 1e-9 relative (see ``tests/test_steam_arrays.py``).
"""

from __future__ import annotations

import contextlib
from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from CoolProp import CoolProp as _cp

from .errors import OutOfRangeError

_BACKEND = "IF97::Water"
_STATE = None
_NEWTON_STEPS = 3


def _abstract_state():
    global _STATE
    if _STATE is None:
        _STATE = _cp.AbstractState("IF97", "Water")
    return _STATE


# -- the fast scalar engine -----------------------------------------------------------------
_FAST = [False]


@contextlib.contextmanager
def fast_properties():
    """Within this block, SteamState constructors use CoolProp's IF97 engine.

    For loops of thousands of evaluations (Monte Carlo sampling); results agree with the
    iapws path to about 1e-9 relative.

    Examples
    --------
    >>> from steamcalc.steam import SteamState
    >>> with fast_properties():
    ...     fast = SteamState.from_ph(3.5e5, 2865e3)
    >>> reference = SteamState.from_ph(3.5e5, 2865e3)
    >>> abs(fast.temperature - reference.temperature) < 1e-6
    True
    """
    previous = _FAST[0]
    _FAST[0] = True
    try:
        yield
    finally:
        _FAST[0] = previous


def fast_enabled():
    return _FAST[0]


def fast_bounds(pressure, key, low_temperature, high_temperature):
    """Enthalpy (``key="h"``) or entropy (``"s"``) at a pressure at two temperatures, for range checks."""
    st = _abstract_state()
    values = []
    for temperature in (low_temperature, high_temperature):
        st.update(_cp.PT_INPUTS, pressure, temperature)
        values.append(st.hmass() if key == "h" else st.smass())
    return tuple(values)


def _single_phase(cls, pressure, temperature):
    from .steam import _if97_phase_region

    st = _abstract_state()
    st.update(_cp.PT_INPUTS, pressure, temperature)
    phase, region = _if97_phase_region(pressure, temperature)
    return cls(pressure=pressure, temperature=temperature, enthalpy=st.hmass(), entropy=st.smass(),
               density=st.rhomass(), dryness=None, phase=phase, region=region, cp=st.cpmass(),
               speed_of_sound=st.speed_sound(), cv=st.cvmass())


def _saturated(cls, pressure=None, temperature=None, dryness=0.0):
    st = _abstract_state()
    if pressure is not None:
        st.update(_cp.PQ_INPUTS, pressure, dryness)
    else:
        st.update(_cp.QT_INPUTS, dryness, temperature)
    from .steam import two_phase_word

    phase = two_phase_word(dryness)
    return cls(pressure=st.p(), temperature=st.T(), enthalpy=st.hmass(), entropy=st.smass(), density=st.rhomass(),
               dryness=float(dryness), phase=phase, region=4, cp=None, speed_of_sound=None, cv=None)


def fast_from_pT(cls, pressure, temperature):
    return _single_phase(cls, pressure, temperature)


def fast_from_p_dryness(cls, pressure, dryness):
    return _saturated(cls, pressure=pressure, dryness=dryness)


def fast_from_T_dryness(cls, temperature, dryness):
    return _saturated(cls, temperature=temperature, dryness=dryness)


def _from_p_and(cls, pressure, value, attribute, backward_inputs, slope):
    from .steam import CRITICAL_PRESSURE, two_phase_word

    t_sat = None
    if pressure < CRITICAL_PRESSURE:
        liquid = _saturated(cls, pressure=pressure, dryness=0.0)
        vapour = _saturated(cls, pressure=pressure, dryness=1.0)
        low, high = getattr(liquid, attribute), getattr(vapour, attribute)
        if low <= value <= high:
            x = (value - low) / (high - low)
            return cls(pressure=pressure, temperature=liquid.temperature,
                       enthalpy=liquid.enthalpy + x * (vapour.enthalpy - liquid.enthalpy),
                       entropy=liquid.entropy + x * (vapour.entropy - liquid.entropy),
                       density=1.0 / (1.0 / liquid.density + x * (1.0 / vapour.density - 1.0 / liquid.density)),
                       dryness=x, phase=two_phase_word(x), region=4, cp=None, speed_of_sound=None, cv=None)
        t_sat = liquid.temperature
        vapour_side = value > high
    st = _abstract_state()
    if backward_inputs == "ph":
        st.update(_cp.HmassP_INPUTS, value, pressure)
    else:
        st.update(_cp.PSmass_INPUTS, pressure, value)
    temperature = st.T()
    if t_sat is not None:
        # The backward equations are a few mK off: keep the start on its own side of saturation,
        # so that the forward equations evaluated at it belong to the right region.
        temperature = max(temperature, t_sat + 1e-6) if vapour_side else min(temperature, t_sat - 1e-6)
    for _ in range(_NEWTON_STEPS):
        state = _single_phase(cls, pressure, temperature)
        temperature += (value - getattr(state, attribute)) / slope(state)
    return _single_phase(cls, pressure, temperature)


def fast_from_ph(cls, pressure, enthalpy):
    return _from_p_and(cls, pressure, enthalpy, "enthalpy", "ph", lambda s: s.cp)


def fast_from_ps(cls, pressure, entropy):
    return _from_p_and(cls, pressure, entropy, "entropy", "ps", lambda s: s.cp / s.temperature)


# -- arrays ---------------------------------------------------------------------------------
#: Phase codes of the array API: indices into :data:`steamcalc.steam.PHASES`.
COMPRESSED_LIQUID, SATURATED_LIQUID, WET, SATURATED_VAPOUR, SUPERHEATED_VAPOUR, SUPERCRITICAL = range(6)


@dataclass(frozen=True)
class StateArrays:
    """States over arrays, SI units. ``dryness`` follows the steam-table convention: 0 for
    liquid, 1 for superheated vapour; ``phase`` holds codes into ``steamcalc.steam.PHASES``."""

    pressure: np.ndarray
    temperature: np.ndarray
    enthalpy: np.ndarray
    entropy: np.ndarray
    dryness: np.ndarray
    phase: np.ndarray


def _refuse_outside(name, values, low, high, scale, unit, where=""):
    """Raise for the first element outside [low, high] (NaN included), naming its index."""
    bad = np.flatnonzero(~((values >= low) & (values <= high)))
    if bad.size:
        i = int(bad[0])
        low_i, high_i = (np.broadcast_to(low, values.shape)[i], np.broadcast_to(high, values.shape)[i])
        raise OutOfRangeError(f"{name}[{i}] of {values[i] / scale:.6g} {unit} is outside IAPWS-IF97{where}",
                              field=name, value=float(values[i] / scale),
                              limits=(float(low_i / scale), float(high_i / scale), unit))


def _check_arrays(pressure, other, name, low_fn, high_fn, unit):
    from .steam import MAX_PRESSURE, MIN_PRESSURE

    _refuse_outside("pressure", pressure, MIN_PRESSURE, MAX_PRESSURE, 1e5, "bar(a)")
    _refuse_outside(name, other, low_fn(pressure), high_fn(pressure), 1e3, unit)


def _props(output, a, b, c, d):
    return np.asarray(_cp.PropsSI(output, a, b, c, d, _BACKEND), dtype=float)


def _states_from_p_and(pressure, value, key, name, unit):
    from .steam import CRITICAL_PRESSURE, CRITICAL_TEMPERATURE, MAX_TEMPERATURE, MIN_TEMPERATURE

    p = np.atleast_1d(np.asarray(pressure, dtype=float))
    v = np.atleast_1d(np.asarray(value, dtype=float))
    p, v = np.broadcast_arrays(p, v)
    p, v = p.astype(float).ravel(), v.astype(float).ravel()
    _check_arrays(p, v, name, lambda q: _props(key, "P", q, "T", np.full_like(q, MIN_TEMPERATURE)),
                  lambda q: _props(key, "P", q, "T", np.full_like(q, MAX_TEMPERATURE)), unit)
    sub = p < CRITICAL_PRESSURE
    liquid_v = np.full_like(p, np.inf)
    vapour_v = np.full_like(p, -np.inf)
    t_sat = np.full_like(p, np.nan)
    if sub.any():
        liquid_v[sub] = _props(key, "P", p[sub], "Q", np.zeros(sub.sum()))
        vapour_v[sub] = _props(key, "P", p[sub], "Q", np.ones(sub.sum()))
        t_sat[sub] = _props("T", "P", p[sub], "Q", np.zeros(sub.sum()))
    wet = sub & (v >= liquid_v) & (v <= vapour_v)
    single = ~wet
    temperature = _starting_temperature(p, v, key)
    # Keep each starting value on its own side of the saturation line, so that the forward
    # equations evaluated at it belong to the right region.
    vapour_side = sub & (v > vapour_v)
    liquid_side = sub & (v < liquid_v)
    temperature[vapour_side] = np.maximum(temperature[vapour_side], t_sat[vapour_side] + 1e-6)
    temperature[liquid_side] = np.minimum(temperature[liquid_side], t_sat[liquid_side] - 1e-6)
    # Newton steps on the forward equations remove the table's interpolation error.
    for _ in range(_NEWTON_STEPS):
        if not single.any():
            break
        t = temperature[single]
        with np.errstate(invalid="ignore", divide="ignore"):
            current = _props(key, "P", p[single], "T", t)
            slope = _props("C", "P", p[single], "T", t)
            if key == "S":
                slope = slope / t
            temperature[single] = t + (v[single] - current) / slope
    dryness = np.where(wet, (v - liquid_v) / np.where(wet, vapour_v - liquid_v, 1.0), 0.0)
    temperature[wet] = t_sat[wet]
    # Near the critical point (region 3) the compiled backend may give no value: those points
    # go through the scalar reference path instead, never as a silent NaN.
    with np.errstate(invalid="ignore"):
        unresolved = np.flatnonzero(single & ~np.isfinite(temperature))
    fallback = {}
    if unresolved.size:
        from .steam import SteamState
        for i in unresolved:
            fallback[i] = SteamState.from_ph(p[i], v[i]) if key == "H" else SteamState.from_ps(p[i], v[i])
            temperature[i] = fallback[i].temperature
    enthalpy = v.copy() if key == "H" else np.empty_like(v)
    entropy = v.copy() if key == "S" else np.empty_like(v)
    other_key, other = ("S", entropy) if key == "H" else ("H", enthalpy)
    if single.any():
        other[single] = _props(other_key, "P", p[single], "T", temperature[single])
    for i, state in fallback.items():
        other[i] = state.entropy if key == "H" else state.enthalpy
    if wet.any():
        low = _props(other_key, "P", p[wet], "Q", np.zeros(wet.sum()))
        high = _props(other_key, "P", p[wet], "Q", np.ones(wet.sum()))
        other[wet] = low + dryness[wet] * (high - low)
    phase = np.full(p.shape, COMPRESSED_LIQUID, dtype=int)
    vapour = single & sub & (temperature > t_sat)
    phase[vapour] = SUPERHEATED_VAPOUR
    phase[single & ~sub & (temperature > CRITICAL_TEMPERATURE)] = SUPERCRITICAL
    phase[wet] = WET
    phase[wet & (dryness == 0.0)] = SATURATED_LIQUID
    phase[wet & (dryness == 1.0)] = SATURATED_VAPOUR
    dryness = np.where(phase == SUPERHEATED_VAPOUR, 1.0, dryness)
    return StateArrays(pressure=p, temperature=temperature, enthalpy=enthalpy, entropy=entropy,
                       dryness=dryness, phase=phase)


@lru_cache(maxsize=2)
def _inverse_table(key):
    """h (or s) on a grid of log-pressure and temperature, for starting values of T(p, h)."""
    from .steam import MAX_PRESSURE, MAX_TEMPERATURE, MIN_PRESSURE, MIN_TEMPERATURE

    log_p = np.linspace(np.log(MIN_PRESSURE), np.log(MAX_PRESSURE), 120)
    temperatures = np.linspace(MIN_TEMPERATURE, MAX_TEMPERATURE, 801)
    grid_p = np.repeat(np.exp(log_p), temperatures.size)
    grid_t = np.tile(temperatures, log_p.size)
    values = _props(key, "P", grid_p, "T", grid_t).reshape(log_p.size, temperatures.size)
    return log_p, temperatures, values


def _starting_temperature(p, v, key):
    """T from (p, h or s) by interpolation in a table of the forward equations (a few tenths of a
    kelvin at worst); Newton steps on the basic equations then make it exact."""
    log_p, temperatures, values = _inverse_table(key)
    x = np.log(p)
    row = np.clip(np.searchsorted(log_p, x) - 1, 0, log_p.size - 2)
    weight = (x - log_p[row]) / (log_p[row + 1] - log_p[row])
    guess = np.empty_like(v)
    for r in np.unique(row):
        at = row == r
        low = np.interp(v[at], values[r], temperatures)
        high = np.interp(v[at], values[r + 1], temperatures)
        guess[at] = low + weight[at] * (high - low)
    return guess


def states_ph(pressure, enthalpy):
    """States over arrays of absolute pressure (Pa) and specific enthalpy (J/kg).

    Parameters
    ----------
    pressure, enthalpy : array_like
        Broadcast together; pressure Pa (absolute), enthalpy J/kg.

    Returns
    -------
    StateArrays
        Temperature K, entropy J/(kg K), dryness (0 to 1), phase codes.

    References
    ----------
    IAPWS R7-97(2012): the basic equations (7) and (15) (region 3 through the backend's v(p,T)),
    solved for T by Newton steps from interpolated starting values; region 4 by the lever rule.
    Through CoolProp's IF97 backend.

    Examples
    --------
    >>> s = states_ph([1e5, 1e5], [2000e3, 3000e3])
    >>> [round(float(x), 4) for x in s.dryness], [int(c) for c in s.phase]
    ([0.701, 1.0], [2, 4])
    """
    return _states_from_p_and(pressure, enthalpy, "H", "enthalpy", "kJ/kg")


def states_ps(pressure, entropy):
    """States over arrays of absolute pressure (Pa) and specific entropy (J/(kg K)).

    References
    ----------
    IAPWS R7-97(2012): the basic equations solved for T by Newton steps; region 4 by the lever
    rule. Through CoolProp's IF97 backend.

    Examples
    --------
    >>> s = states_ps(1e5, [7.0e3])
    >>> round(float(s.dryness[0]), 3)
    0.941
    """
    return _states_from_p_and(pressure, entropy, "S", "entropy", "kJ/(kg K)")


def saturation_arrays(pressure):
    """Saturated liquid and vapour enthalpy and entropy over an array of pressures (below critical).

    Returns
    -------
    dict
        ``h_f``, ``h_g`` (J/kg), ``s_f``, ``s_g`` (J/(kg K)), ``t_sat`` (K).

    References
    ----------
    IAPWS R7-97(2012), region 4 equations (30)-(31) with regions 1 and 2 at saturation.
    """
    from .steam import CRITICAL_PRESSURE, MIN_PRESSURE

    p = np.atleast_1d(np.asarray(pressure, dtype=float))
    _refuse_outside("pressure", p, MIN_PRESSURE, CRITICAL_PRESSURE, 1e5, "bar(a)", " saturation")
    zeros, ones = np.zeros_like(p), np.ones_like(p)
    return {"h_f": _props("H", "P", p, "Q", zeros), "h_g": _props("H", "P", p, "Q", ones),
            "s_f": _props("S", "P", p, "Q", zeros), "s_g": _props("S", "P", p, "Q", ones),
            "t_sat": _props("T", "P", p, "Q", zeros)}
