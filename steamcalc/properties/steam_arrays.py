"""IF97 over arrays, on the fast engine (seuif97): sweeps and charts.

The scalar :class:`~steamcalc.properties.steam.SteamState` is the interface for one state; this module
evaluates many at once. Each array is handed to seuif97's compiled functions element by
element (``map`` over the arrays, no Python loop per state), and the arithmetic between them
is numpy's. T(p, h) and T(p, s) start from the backward equations and take Newton steps on the
basic equations, so results agree with the iapws path to about 1e-9 relative (see
``tests/test_steam_arrays.py``). States in region 3 and at region-3 saturation go through the
fast engine's scalar path, which refines the region-3 density on its basic equation.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import repeat
from typing import NamedTuple

import numpy as np
import seuif97 as _if97

from .engines import seuif97_engine as _fast
from .engines.common import (
    CRITICAL_PRESSURE, CRITICAL_TEMPERATURE, MAX_PRESSURE, MAX_TEMPERATURE, MIN_PRESSURE, MIN_TEMPERATURE,
    REGION13_TEMPERATURE, REGION23_MAX_TEMPERATURE, SATURATION_PRESSURE_623, boundary_23_pressure,
)
from ..errors import OutOfRangeError

#: Phase codes of the array API: indices into :data:`steamcalc.properties.steam.PHASES`.
COMPRESSED_LIQUID, SATURATED_LIQUID, WET, SATURATED_VAPOUR, SUPERHEATED_VAPOUR, SUPERCRITICAL = range(6)
_PHASE_CODES = {"compressed liquid": COMPRESSED_LIQUID, "saturated liquid": SATURATED_LIQUID, "wet": WET,
                "saturated vapour": SATURATED_VAPOUR, "superheated vapour": SUPERHEATED_VAPOUR,
                "supercritical": SUPERCRITICAL}
# seuif97 property ids and units: MPa, degC, kg/m3, m3/kg, kJ/kg, kJ/(kg K), m/s, Pa s.
_T, _D, _V, _H, _S, _CP, _W, _MU = 1, 2, 3, 4, 5, 8, 10, 24
_NEWTON_STOP = 1e-5  # K; see steamcalc.properties.engines.seuif97_engine
_MAX_STEPS = 8


@dataclass(frozen=True)
class StateArrays:
    """States over arrays, SI units. ``dryness`` follows the steam-table convention: 0 for
    liquid, 1 for superheated vapour; ``phase`` holds codes into ``steamcalc.properties.steam.PHASES``."""

    pressure: np.ndarray
    temperature: np.ndarray
    enthalpy: np.ndarray
    entropy: np.ndarray
    dryness: np.ndarray
    phase: np.ndarray


class PropertyArrays(NamedTuple):
    """Properties over arrays, SI units: K, J/kg, J/(kg K), kg/m3, m/s, Pa s.

    ``speed_of_sound`` is None for saturated and wet states; their ``viscosity`` is that of
    the saturated vapour at the pressure (what a wet-steam line loss uses).
    """

    temperature: np.ndarray
    enthalpy: np.ndarray
    entropy: np.ndarray
    density: np.ndarray
    speed_of_sound: np.ndarray | None
    viscosity: np.ndarray


def _each(function, *arrays):
    """``function`` of seuif97 over arrays (or scalars repeated), as a float array."""
    n = next(len(a) for a in arrays if isinstance(a, list))
    args = [a if isinstance(a, list) else repeat(a, n) for a in arrays]
    return np.fromiter(map(function, *args), dtype=float, count=n)


def _refuse_outside(name, values, low, high, scale, unit, where):
    """Raise for the first element outside [low, high] (NaN included), naming its index."""
    bad = np.flatnonzero(~((values >= low) & (values <= high)))
    if bad.size:
        i = int(bad[0])
        low_i, high_i = (np.broadcast_to(low, values.shape)[i], np.broadcast_to(high, values.shape)[i])
        raise OutOfRangeError(f"{name}[{i}] of {values[i] / scale:.6g} {unit} is outside {where}",
                              field=name, value=float(values[i] / scale),
                              limits=(float(low_i / scale), float(high_i / scale), unit))


#: Below this pressure (Pa; T_s 7 degC) a state between its saturated liquid and vapour is still held to the 0 degC end
#: of the range; above it h_f (s_f) lies clear of h (s) at 0 degC: 29 kJ/kg (0.1 kJ/(kg K)) or more.
_TRIPLE_NEIGHBOURHOOD = 1000.0


def _refuse_outside_range(p, p_mpa, v_kj, oid, name, unit, proven_low, proven_high):
    """Refuse a value outside IF97's range at its pressure: from h (s) at 0 degC up to h (s) at 800 degC.

    A bound is evaluated only where the value is not already known within it: h and s rise with temperature at a
    given pressure, so a value between the saturated liquid's and the saturated vapour's (``proven_low``,
    ``proven_high``: each row's side that holds) is above the 0 degC end and below the 800 degC end. The refusal, when
    there is one, names the same row with the same limits as the bounds evaluated everywhere.
    """
    where = "IF97 regions 1-4 at its pressure (0 degC to 800 degC)"
    low, high = np.full(p.size, -np.inf), np.full(p.size, np.inf)
    need_low, need_high = ~proven_low, ~proven_high
    if need_low.any():
        low[need_low] = _each(_if97.pt, p_mpa[need_low].tolist(), MIN_TEMPERATURE - 273.15, oid)
    if need_high.any():
        high[need_high] = _each(_if97.pt, p_mpa[need_high].tolist(), MAX_TEMPERATURE - 273.15, oid)
    if not ((v_kj >= low) & (v_kj <= high)).all():
        # Both bounds of every row, as the refusal quotes them.
        p_all = p_mpa.tolist()
        _refuse_outside(name, v_kj, _each(_if97.pt, p_all, MIN_TEMPERATURE - 273.15, oid),
                        _each(_if97.pt, p_all, MAX_TEMPERATURE - 273.15, oid), 1.0, unit, where)


def _states_from_p_and(pressure, value, key, name, unit, saturation_temperature=None, other_wanted=True):
    p, v = np.broadcast_arrays(np.atleast_1d(np.asarray(pressure, dtype=float)),
                               np.atleast_1d(np.asarray(value, dtype=float)))
    p, v = p.astype(float).ravel(), v.astype(float).ravel()
    _refuse_outside("pressure", p, MIN_PRESSURE, MAX_PRESSURE, 1e5, "bar(a)",
                    "IF97 regions 1-3 (0.00611213 to 1000 bar(a))")
    oid, other_oid = (_H, _S) if key == "h" else (_S, _H)
    v_kj = v / 1e3
    n = p.size
    temperature = np.empty(n)
    other = np.empty(n)
    dryness = np.zeros(n)
    phase = np.full(n, COMPRESSED_LIQUID, dtype=int)
    # Region-3 saturation and region-3 states: the fast engine's scalar path (refined density).
    scalar = (p > SATURATION_PRESSURE_623) & (p <= CRITICAL_PRESSURE)
    sub = (p < CRITICAL_PRESSURE) & ~scalar
    t_sat = np.full(n, np.nan)
    liquid_v = np.full(n, np.inf)
    vapour_v = np.full(n, -np.inf)
    if sub.any():
        p_sub = (p[sub] / 1e6).tolist()
        if saturation_temperature is None:
            t_sat[sub] = _each(_if97.px2t, p_sub, 0.0) + 273.15
        else:   # the caller's, from saturation_temperatures() at these pressures: the same numbers
            t_sat[sub] = np.broadcast_to(np.asarray(saturation_temperature, dtype=float), p.shape)[sub]
        liquid_v[sub] = _each(_if97.px, p_sub, 0.0, oid)
        vapour_v[sub] = _each(_if97.px, p_sub, 1.0, oid)
    _refuse_outside_range(p, p / 1e6, v_kj, oid, name, unit,
                          proven_low=sub & (v_kj >= liquid_v) & (p >= _TRIPLE_NEIGHBOURHOOD),
                          proven_high=sub & (v_kj <= vapour_v))
    wet = sub & (v_kj >= liquid_v) & (v_kj <= vapour_v)
    single = ~wet & ~scalar
    if single.any():
        ps, vs = p[single] / 1e6, v_kj[single]
        backward = _if97.ph2t if key == "h" else _if97.ps2t
        t = _each(backward, ps.tolist(), vs.tolist()) + 273.15
        # Keep each start on its own side of the saturation line, so that the basic equation
        # evaluated there belongs to the right region.
        ts = t_sat[single]
        below_critical = sub[single]
        t = np.where(below_critical & (vs > vapour_v[single]), np.maximum(t, ts + 1e-6), t)
        t = np.where(below_critical & (vs < liquid_v[single]), np.minimum(t, ts - 1e-6), t)
        region3 = (t > REGION13_TEMPERATURE) & (t <= 863.15) & (ps * 1e6 > boundary_23_pressure(t))
        active = ~region3
        for _ in range(_MAX_STEPS):
            if not active.any():
                break
            pa, ta = ps[active].tolist(), (t[active] - 273.15).tolist()
            current = _each(_if97.pt, pa, ta, oid)
            slope = _each(_if97.pt, pa, ta, _CP)
            if key == "s":
                slope = slope / t[active]
            step = (vs[active] - current) / slope
            t[active] += step
            still = np.abs(step) >= _NEWTON_STOP
            active[np.flatnonzero(active)[~still]] = False
        # A Newton step may carry a state across the boundary of region 3: those go the scalar way.
        region3 |= (t > REGION13_TEMPERATURE) & (t <= 863.15) & (ps * 1e6 > boundary_23_pressure(t))
        index = np.flatnonzero(single)
        temperature[index] = t
        if other_wanted:
            other[index] = _each(_if97.pt, ps.tolist(), (t - 273.15).tolist(), other_oid) * 1e3
        else:
            other[index] = np.nan
        vapour = single.copy()
        vapour[index] = (ps * 1e6 <= CRITICAL_PRESSURE) & (t > ts)
        phase[vapour & single] = SUPERHEATED_VAPOUR
        phase[single & (p > CRITICAL_PRESSURE) & (temperature > CRITICAL_TEMPERATURE)] = SUPERCRITICAL
        scalar[index[region3]] = True
    if wet.any():
        x = (v_kj[wet] - liquid_v[wet]) / (vapour_v[wet] - liquid_v[wet])
        p_wet = (p[wet] / 1e6).tolist()
        low_o = _each(_if97.px, p_wet, 0.0, other_oid)
        high_o = _each(_if97.px, p_wet, 1.0, other_oid)
        other[wet] = (low_o + x * (high_o - low_o)) * 1e3
        temperature[wet] = t_sat[wet]
        dryness[wet] = x
        phase[wet] = np.where(x == 0.0, SATURATED_LIQUID, np.where(x == 1.0, SATURATED_VAPOUR, WET))
    solve = _fast.state_ph if key == "h" else _fast.state_ps
    for i in np.flatnonzero(scalar):
        state = solve(float(p[i]), float(v[i]))
        temperature[i] = state.temperature
        other[i] = state.entropy if key == "h" else state.enthalpy
        phase[i] = _PHASE_CODES[state.phase]
        dryness[i] = state.dryness if state.dryness is not None else 0.0
    dryness = np.where(phase == SUPERHEATED_VAPOUR, 1.0, dryness)
    enthalpy, entropy = (v, other) if key == "h" else (other, v)
    return StateArrays(pressure=p, temperature=temperature, enthalpy=enthalpy, entropy=entropy,
                       dryness=dryness, phase=phase)


def states_ph(pressure, enthalpy, *, saturation_temperature=None, with_entropy=True):
    """States over arrays of absolute pressure (Pa) and specific enthalpy (J/kg).

    Parameters
    ----------
    pressure, enthalpy : array_like
        Broadcast together; pressure Pa (absolute), enthalpy J/kg.
    saturation_temperature : array_like, optional
        :func:`saturation_temperatures` of ``pressure`` (K), when the caller has it already: not evaluated again.
    with_entropy : bool
        False when the caller needs no entropy: single-phase states then hold NaN for it, and are solved without
        that last evaluation.

    Returns
    -------
    StateArrays
        Temperature K, entropy J/(kg K), dryness (0 to 1), phase codes.

    References
    ----------
    IAPWS R7-97(2012): backward equations (11), (22)-(24) for the start, Newton steps on the
    basic equations (7) and (15) (region 3 on (28)); region 4 by the lever rule. Through seuif97.

    Examples
    --------
    >>> s = states_ph([1e5, 1e5], [2000e3, 3000e3])
    >>> [round(float(x), 4) for x in s.dryness], [int(c) for c in s.phase]
    ([0.701, 1.0], [2, 4])
    """
    return _states_from_p_and(pressure, enthalpy, "h", "enthalpy", "kJ/kg", saturation_temperature, with_entropy)


def states_ps(pressure, entropy, *, saturation_temperature=None):
    """States over arrays of absolute pressure (Pa) and specific entropy (J/(kg K)).

    ``saturation_temperature`` as for :func:`states_ph`.

    References
    ----------
    IAPWS R7-97(2012): backward equations (13), (25)-(27) for the start, Newton steps on the
    basic equations; region 4 by the lever rule. Through seuif97.

    Examples
    --------
    >>> s = states_ps(1e5, [7.0e3])
    >>> round(float(s.dryness[0]), 3)
    0.941
    """
    return _states_from_p_and(pressure, entropy, "s", "entropy", "kJ/(kg K)", saturation_temperature)


def saturation_arrays(pressure):
    """Saturated liquid and vapour enthalpy and entropy over an array of pressures (below critical).

    Returns
    -------
    dict
        ``h_f``, ``h_g`` (J/kg), ``s_f``, ``s_g`` (J/(kg K)), ``t_sat`` (K).

    References
    ----------
    IAPWS R7-97(2012), region 4 equations (30)-(31) with regions 1 and 2 at saturation (above
    623.15 K region 3 through the backward equations v'(p), v''(p) of IAPWS SR5-05, as the scalar
    engines' wet states). Through seuif97.

    Examples
    --------
    >>> sat = saturation_arrays([1e5])
    >>> round(float(sat["h_g"][0]) / 1e3, 1), round(float(sat["t_sat"][0]) - 273.15, 2)
    (2674.9, 99.61)
    """
    p = np.atleast_1d(np.asarray(pressure, dtype=float)).ravel()
    _refuse_outside("pressure", p, MIN_PRESSURE, CRITICAL_PRESSURE, 1e5, "bar(a)",
                    "IF97 region 4, the saturation line (0.00611213 to 220.64 bar(a), the critical point)")
    p_mpa = (p / 1e6).tolist()
    out = {"t_sat": _each(_if97.px2t, p_mpa, 0.0) + 273.15,
           "h_f": _each(_if97.px, p_mpa, 0.0, _H) * 1e3, "h_g": _each(_if97.px, p_mpa, 1.0, _H) * 1e3,
           "s_f": _each(_if97.px, p_mpa, 0.0, _S) * 1e3, "s_g": _each(_if97.px, p_mpa, 1.0, _S) * 1e3}
    return out


#: The properties :func:`properties_pT` can give, and their seuif97 ids.
_PT_IDS = {"enthalpy": _H, "entropy": _S, "density": _D, "speed_of_sound": _W, "viscosity": _MU}


def properties_pT(pressure, temperature, wanted=tuple(_PT_IDS)):
    """Single-phase properties over arrays of absolute pressure (Pa) and temperature (K).

    The caller keeps the states off the saturation line (as
    :meth:`steamcalc.properties.steam.SteamState.from_pT` refuses them). States in region 3 go through the
    fast engine's scalar path (density refined on the basic equation).

    Parameters
    ----------
    pressure, temperature : array_like
        Broadcast together; Pa (absolute) and K.
    wanted : sequence of str
        The properties to evaluate (default all): ``enthalpy``, ``entropy``, ``density``,
        ``speed_of_sound``, ``viscosity``; the others are None.

    Returns
    -------
    PropertyArrays
        Enthalpy, entropy, density, speed of sound, and the dynamic viscosity at the state's
        temperature and density.

    References
    ----------
    IAPWS R7-97(2012), basic equations (7), (15), (28); IAPWS R12-08, equation (10) without the
    critical enhancement, for the viscosity (as :func:`steamcalc.properties.steam.dynamic_viscosity`).
    Through seuif97.

    Examples
    --------
    >>> props = properties_pT([10e5, 10e5], [473.15, 523.15])
    >>> [round(float(h) / 1e3, 2) for h in props.enthalpy], round(float(props.viscosity[0]) * 1e6, 3)
    ([2828.27, 2943.22], 15.876)
    """
    p, t = np.broadcast_arrays(np.atleast_1d(np.asarray(pressure, dtype=float)),
                               np.atleast_1d(np.asarray(temperature, dtype=float)))
    p, t = p.astype(float).ravel(), t.astype(float).ravel()
    _refuse_outside("pressure", p, MIN_PRESSURE, MAX_PRESSURE, 1e5, "bar(a)",
                    "IF97 regions 1-3 (0.00611213 to 1000 bar(a))")
    _refuse_outside("temperature", t, MIN_TEMPERATURE, MAX_TEMPERATURE, 1.0, "K",
                    "IF97 regions 1-3 (273.15 K to 1073.15 K)")
    p_mpa, t_c = (p / 1e6).tolist(), (t - 273.15).tolist()
    values = {name: _each(_if97.pt, p_mpa, t_c, _PT_IDS[name]) for name in wanted}
    region3 = (t > REGION13_TEMPERATURE) & (t <= REGION23_MAX_TEMPERATURE) & (p > boundary_23_pressure(t))
    for i in np.flatnonzero(region3):
        state = _fast.state_pT(float(p[i]), float(t[i]))
        found = {"enthalpy": state.enthalpy / 1e3, "entropy": state.entropy / 1e3, "density": state.density,
                 "speed_of_sound": state.speed_of_sound}
        for name in wanted:
            values[name][i] = found[name] if name in found else _if97.tv(t_c[i], 1.0 / state.density, _MU)
    for name in ("enthalpy", "entropy"):
        if name in values:
            values[name] = values[name] * 1e3
    return PropertyArrays(t, *(values.get(name) for name in _PT_IDS))


def properties_p_dryness(pressure, dryness):
    """Saturated or wet properties over arrays of absolute pressure (Pa, below critical) and dryness.

    Returns
    -------
    PropertyArrays
        Saturation temperature; h = h' + x (h'' - h'), likewise s, and the density from
        v = v' + x (v'' - v'); no speed of sound; the viscosity of the saturated vapour.

    References
    ----------
    IAPWS R7-97(2012), equations (30)-(31) with regions 1 and 2 at saturation (region 3 through
    the backward equations of IAPWS SR5-05 above 623.15 K, as the scalar engines); IAPWS R12-08
    equation (10) for the vapour's viscosity. Through seuif97.

    Examples
    --------
    >>> props = properties_p_dryness([1e5], [0.9])
    >>> round(float(props.enthalpy[0]) / 1e3, 1), round(float(props.temperature[0]) - 273.15, 2)
    (2449.2, 99.61)
    """
    p, x = np.broadcast_arrays(np.atleast_1d(np.asarray(pressure, dtype=float)),
                               np.atleast_1d(np.asarray(dryness, dtype=float)))
    p, x = p.astype(float).ravel(), x.astype(float).ravel()
    _refuse_outside("pressure", p, MIN_PRESSURE, CRITICAL_PRESSURE, 1e5, "bar(a)",
                    "IF97 region 4, the saturation line (0.00611213 to 220.64 bar(a), the critical point)")
    _refuse_outside("dryness", x, 0.0, 1.0, 1.0, "", "0 to 1")
    p_mpa = (p / 1e6).tolist()
    ends = {(oid, end): _each(_if97.px, p_mpa, end, oid) for oid in (_H, _S, _V) for end in (0.0, 1.0)}

    def lever(oid):
        return ends[oid, 0.0] + x * (ends[oid, 1.0] - ends[oid, 0.0])

    return PropertyArrays(_each(_if97.px2t, p_mpa, 0.0) + 273.15, lever(_H) * 1e3, lever(_S) * 1e3,
                          1.0 / lever(_V), None, _each(_if97.px, p_mpa, 1.0, _MU))


#: What :func:`saturated_pair` can give, and the seuif97 ids of the ends it levers.
_SATURATED_IDS = {"enthalpy": _H, "entropy": _S, "density": _V}


def saturated_pair(pressure, wanted=tuple(_SATURATED_IDS)):
    """Saturated liquid and vapour over an array of absolute pressures (Pa, below critical), in one pass.

    The values :func:`properties_p_dryness` gives at dryness 0 and at dryness 1, from one evaluation
    of the ends (what a flash or a condensing zone reads of both sides of the line at once).

    Parameters
    ----------
    pressure : array_like
        Pa (absolute).
    wanted : sequence of str
        ``enthalpy``, ``entropy``, ``density`` (default all); the others are None.

    Returns
    -------
    tuple of PropertyArrays
        ``(liquid, vapour)``: saturation temperature and the wanted properties; no speed of sound
        or viscosity.

    References
    ----------
    IAPWS R7-97(2012), equations (30)-(31) with regions 1 and 2 at saturation (as
    :func:`properties_p_dryness`). Through seuif97.

    Examples
    --------
    >>> liquid, vapour = saturated_pair([1e5], ("enthalpy", "density"))
    >>> round(float(liquid.enthalpy[0]) / 1e3, 2), round(float(vapour.enthalpy[0]) / 1e3, 1), vapour.entropy
    (417.44, 2674.9, None)
    """
    p = np.atleast_1d(np.asarray(pressure, dtype=float)).ravel()
    _refuse_outside("pressure", p, MIN_PRESSURE, CRITICAL_PRESSURE, 1e5, "bar(a)",
                    "IF97 region 4, the saturation line (0.00611213 to 220.64 bar(a), the critical point)")
    p_mpa = (p / 1e6).tolist()
    temperature = _each(_if97.px2t, p_mpa, 0.0) + 273.15
    sides = ({}, {})
    for name in wanted:
        oid = _SATURATED_IDS[name]
        low, high = _each(_if97.px, p_mpa, 0.0, oid), _each(_if97.px, p_mpa, 1.0, oid)
        # The lever rule at x = 0 and x = 1, as properties_p_dryness evaluates it (the same roundings).
        for side, x in zip(sides, (0.0, 1.0)):
            value = low + x * (high - low)
            side[name] = 1.0 / value if oid == _V else value * 1e3
    return tuple(PropertyArrays(temperature, side.get("enthalpy"), side.get("entropy"), side.get("density"), None,
                                None) for side in sides)


def saturation_temperatures(pressure):
    """Saturation temperature (K) over an array of absolute pressures (Pa, up to the critical pressure).

    References
    ----------
    IAPWS R7-97(2012), equation (31). Through seuif97.

    Examples
    --------
    >>> [round(float(t) - 273.15, 2) for t in saturation_temperatures([1e5, 10e5])]
    [99.61, 179.89]
    """
    p = np.atleast_1d(np.asarray(pressure, dtype=float)).ravel()
    _refuse_outside("pressure", p, MIN_PRESSURE, CRITICAL_PRESSURE, 1e5, "bar(a)",
                    "IF97 region 4, the saturation line (0.00611213 to 220.64 bar(a), the critical point)")
    return _each(_if97.px2t, (p / 1e6).tolist(), 0.0) + 273.15
