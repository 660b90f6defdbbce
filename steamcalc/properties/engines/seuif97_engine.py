"""The fast IF97 engine: the ``seuif97`` package (compiled Rust), for sweeps, charts and samples.

This is the only module that imports ``seuif97``. It evaluates the same formulation as the
reference engine and is refined to agree with it: T(p, h) and T(p, s) start from the
backward equations and take Newton steps on the basic equations; in region 3 the density
that seuif97 gives from the backward equations v(p, T) is refined on the basic equation
f(ρ, T) so that p(ρ, T) = p. Results agree with the iapws path to about 1e-9 relative
(``tests/test_engines.py``) except on the saturation line above 623.15 K (165.3 bar(a)), where
both engines take the saturated volumes from backward equations and the saturated ends
differ by up to about 1e-5 relative (more within 1 bar of the critical point), and in region
3 within about 1e-5 of 1000 bar(a), where seuif97 refuses its basic equation and its
backward-equation values (about 1e-5) are used. Functions take and return SI units and
:class:`~steamcalc.properties.engines.common.Properties`; range checks are the caller's. It imports
neither the reference engine nor the calculations.

References
----------
IAPWS R7-97(2012): basic equations (7), (15), (28); backward equations (11), (22)-(24),
(13), (25)-(27); saturation equations (30), (31); region-3 backward equations v(p, T) from
IAPWS SR5-05(2016).
"""

from __future__ import annotations

from functools import lru_cache
from importlib import metadata

import seuif97 as _if97

from ...errors import OutOfRangeError
from .common import (
    CRITICAL_PRESSURE, MAX_TEMPERATURE, MIN_TEMPERATURE, Properties, phase_and_region, two_phase_word,
)

NAME = "fast"
LIBRARY = "seuif97"
DESCRIPTION = "seuif97 (compiled IAPWS-IF97; the fast engine)"

# seuif97 property ids (its documentation, "Properties"): MPa, degC, kg/m3, m3/kg, kJ/kg, kJ/(kg K), m/s.
_P, _T, _D, _V, _H, _S, _CP, _CV, _W = 0, 1, 2, 3, 4, 5, 8, 9, 10
# seuif97 reports a failed evaluation as a large negative number (-1000 and below) instead of raising.
_FAILED = -999.0
#: Newton steps stop when the temperature step is below this, K: the next step would be
#: smaller than 1e-9 K (quadratic convergence), far inside 1e-9 relative.
_NEWTON_STOP = 1e-5
_MAX_STEPS = 12
_TO_CELSIUS = 273.15


@lru_cache(maxsize=1)
def version():
    """The seuif97 package's version (read once per process)."""
    return metadata.version(LIBRARY)


def _value(raw, what):
    if raw <= _FAILED:
        raise OutOfRangeError(f"seuif97 gave no value for {what}")
    return raw


def saturation_temperature(pressure):
    """T_s(p), K, from p in Pa: IAPWS R7-97(2012) equation (31)."""
    return _value(_if97.px2t(pressure / 1e6, 0.0), "the saturation temperature") + _TO_CELSIUS


def saturation_pressure(temperature):
    """p_s(T), Pa, from T in K: IAPWS R7-97(2012) equation (30)."""
    return _value(_if97.tx2p(temperature - _TO_CELSIUS, 0.0), "the saturation pressure") * 1e6


def backward_temperature_ph(pressure, enthalpy, region=None):
    """T(p, h), K, from the backward equations alone (seuif97 picks the region, like IF97 equations (21))."""
    return _value(_if97.ph2t(pressure / 1e6, enthalpy / 1e3), "T(p, h)") + _TO_CELSIUS


def bounds(pressure, key):
    """Enthalpy (``key="h"``) or entropy (``"s"``) at 273.15 K (region 1) and 1073.15 K (region 2)."""
    oid = _H if key == "h" else _S
    p = pressure / 1e6
    return (_if97.pt(p, MIN_TEMPERATURE - _TO_CELSIUS, oid) * 1e3,
            _if97.pt(p, MAX_TEMPERATURE - _TO_CELSIUS, oid) * 1e3)


def _region3_volume(p, t, volume):
    """Specific volume (m3/kg) at p (MPa), t (degC) on the region-3 basic equation, from a start value.

    Newton steps on p(v, T) = p with a one-sided difference for dp/dv; each step gains about six
    digits from the backward equations' start. Returns None where seuif97 refuses the basic
    equation (it does within about 1e-5 of its 100 MPa limit).
    """
    for _ in range(_MAX_STEPS):
        here = _if97.tv(t, volume, _P)
        delta = volume * 1e-7
        there = _if97.tv(t, volume + delta, _P)
        if here <= _FAILED or there <= _FAILED or there >= here:
            return None
        step = (here - p) * delta / (there - here)
        volume -= step
        if abs(step) < 1e-14 * volume:
            break
    return volume if _if97.tv(t, volume, _P) > _FAILED else None


def _region3(p, t, oids):
    """Properties ``oids`` at p (MPa), t (degC) in region 3: on the basic equation at the refined
    density; at the 100 MPa limit, where seuif97 refuses it, its backward-equation values
    v(p, T) (agreeing with the basic equation to about 1e-5)."""
    volume = _region3_volume(p, t, _value(_if97.pt(p, t, _V), "the region-3 volume"))
    if volume is None:
        return [_if97.pt(p, t, oid) for oid in oids]
    return [1.0 / volume if oid == _D else _if97.tv(t, volume, oid) for oid in oids]


def _saturation_temperature_or_none(pressure):
    return saturation_temperature(pressure) if pressure <= CRITICAL_PRESSURE else None


def state_pT(pressure, temperature, t_sat=False):
    """Single-phase state from p (Pa) and T (K): basic equations (7), (15), (28)."""
    if t_sat is False:
        t_sat = _saturation_temperature_or_none(pressure)
    phase, region = phase_and_region(pressure, temperature, t_sat)
    p, t = pressure / 1e6, temperature - _TO_CELSIUS
    if region == 3:
        h, s, density, cp, cv, w = _region3(p, t, (_H, _S, _D, _CP, _CV, _W))
    else:
        h, s, density, cp, cv, w = (_if97.pt(p, t, oid) for oid in (_H, _S, _D, _CP, _CV, _W))
    return Properties(pressure, temperature, _value(h, "the enthalpy") * 1e3, s * 1e3, density, None, phase,
                      region, cp * 1e3, cv * 1e3, w)


def _value_and_slope(pressure, temperature, key, t_sat):
    """h and cp (key "h"), or s and cp/T (key "s"), at p (Pa), T (K), region by region."""
    _, region = phase_and_region(pressure, temperature, t_sat)
    p, t = pressure / 1e6, temperature - _TO_CELSIUS
    oid = _H if key == "h" else _S
    if region == 3:
        value, cp = _region3(p, t, (oid, _CP))
    else:
        value, cp = _if97.pt(p, t, oid), _if97.pt(p, t, _CP)
    value, cp = _value(value, "a property") * 1e3, _value(cp, "cp") * 1e3
    return value, (cp if key == "h" else cp / temperature)


def _saturated_ends(pressure, temperature, by_temperature):
    """(h', s', v') and (h'', s'', v'') at saturation (p in Pa, T = T_s(p) in K).

    Above 623.15 K these come from region 3 through the backward equations v'(p), v''(p) (IAPWS
    SR5-05), as the reference engine's wet states do; seuif97 offers no way to refine them on the
    basic equation there (its (T, v) function treats a volume inside the dome as wet steam).
    """
    t = temperature - _TO_CELSIUS
    ends = []
    for x in (0.0, 1.0):
        if by_temperature:
            h, s, v = (_if97.tx(t, x, oid) for oid in (_H, _S, _V))
        else:
            p = pressure / 1e6
            h, s, v = (_if97.px(p, x, oid) for oid in (_H, _S, _V))
        ends.append((_value(h, "the saturated enthalpy") * 1e3, s * 1e3, v))
    return ends


def _two_phase(pressure, temperature, dryness, liquid, vapour):
    (h_f, s_f, v_f), (h_g, s_g, v_g) = liquid, vapour
    volume = v_f + dryness * (v_g - v_f)
    return Properties(pressure, temperature, h_f + dryness * (h_g - h_f), s_f + dryness * (s_g - s_f),
                      1.0 / volume, float(dryness), two_phase_word(dryness), 4, None, None, None)


def state_p_dryness(pressure, dryness):
    """Saturated or wet state from p (Pa) and dryness (0 to 1): h = h' + x (h'' - h'), likewise s and v."""
    temperature = saturation_temperature(pressure)
    return _two_phase(pressure, temperature, dryness, *_saturated_ends(pressure, temperature, False))


def state_T_dryness(temperature, dryness):
    """Saturated or wet state from T (K) and dryness (0 to 1)."""
    pressure = saturation_pressure(temperature)
    return _two_phase(pressure, temperature, dryness, *_saturated_ends(pressure, temperature, True))


def _state_p_and(pressure, value, key):
    t_sat = _saturation_temperature_or_none(pressure)
    vapour_side = None
    p = pressure / 1e6
    if t_sat is not None:
        oid = _H if key == "h" else _S
        low, high = _if97.px(p, 0.0, oid) * 1e3, _if97.px(p, 1.0, oid) * 1e3
        if low <= value <= high:
            liquid, vapour = _saturated_ends(pressure, t_sat, False)
            return _two_phase(pressure, t_sat, (value - low) / (high - low), liquid, vapour)
        vapour_side = value > high
    start = _if97.ph2t(p, value / 1e3) if key == "h" else _if97.ps2t(p, value / 1e3)
    temperature = _value(start, "the backward temperature") + _TO_CELSIUS
    if vapour_side is not None:
        # The backward equations are a few mK off: keep the start on its own side of saturation,
        # so that the basic equation evaluated there belongs to the right region.
        temperature = max(temperature, t_sat + 1e-6) if vapour_side else min(temperature, t_sat - 1e-6)
    for _ in range(_MAX_STEPS):
        current, slope = _value_and_slope(pressure, temperature, key, t_sat)
        step = (value - current) / slope
        temperature += step
        if abs(step) < _NEWTON_STOP:
            break
    return state_pT(pressure, temperature, t_sat)


def state_ph(pressure, enthalpy):
    """State from p (Pa) and h (J/kg): backward T(p, h) refined by Newton steps; lever rule in region 4."""
    return _state_p_and(pressure, enthalpy, "h")


def state_ps(pressure, entropy):
    """State from p (Pa) and s (J/(kg K)): backward T(p, s) refined by Newton steps; lever rule in region 4."""
    return _state_p_and(pressure, entropy, "s")
