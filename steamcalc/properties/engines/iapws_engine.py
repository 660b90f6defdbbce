"""The reference IF97 engine: the ``iapws`` package (pure Python), engine of issued records.

This is the only module that imports ``iapws``. Functions take and return SI units (Pa, K,
J/kg, J/(kg K)) and return :class:`~steamcalc.properties.engines.common.Properties`; range checks are the
caller's (:mod:`steamcalc.properties.steam`). It imports neither the fast engine nor the calculations.
"""

from __future__ import annotations

from functools import lru_cache
from importlib import metadata

from iapws import iapws97 as _if97
from iapws.iapws97 import IAPWS97 as _IAPWS97

from ...errors import OutOfRangeError
from .common import (
    CRITICAL_PRESSURE, MAX_TEMPERATURE, MIN_TEMPERATURE, Properties, phase_and_region, two_phase_word,
)

NAME = "iapws"
LIBRARY = "iapws"
DESCRIPTION = "iapws (pure Python IAPWS-IF97; engine of issued records)"


@lru_cache(maxsize=1)
def version():
    """The iapws package's version (read once per process)."""
    return metadata.version(LIBRARY)


def saturation_temperature(pressure):
    """T_s(p), K, from p in Pa: IAPWS R7-97(2012) equation (31)."""
    return float(_if97._TSat_P(pressure / 1e6))


def saturation_pressure(temperature):
    """p_s(T), Pa, from T in K: IAPWS R7-97(2012) equation (30)."""
    return float(_if97._PSat_T(temperature)) * 1e6


def backward_temperature_ph(pressure, enthalpy, region):
    """T(p, h), K, from the backward equation of region 1 (equation (11)) or 2 (equations (20)-(24))."""
    function = _if97._Backward1_T_Ph if region == 1 else _if97._Backward2_T_Ph
    return float(function(pressure / 1e6, enthalpy / 1e3))


def bounds(pressure, key):
    """Enthalpy (``key="h"``) or entropy (``"s"``) at 273.15 K (region 1) and 1073.15 K (region 2)."""
    # The basic equations alone, not a full state, give the range cheaply.
    return (_if97._Region1(MIN_TEMPERATURE, pressure / 1e6)[key] * 1e3,
            _if97._Region2(MAX_TEMPERATURE, pressure / 1e6)[key] * 1e3)


def state_pT(pressure, temperature):
    """Single-phase state from p (Pa) and T (K): basic equations (7), (15), (28)."""
    return _properties(_solved("TP", temperature, pressure / 1e6))


def state_ph(pressure, enthalpy):
    """State from p (Pa) and h (J/kg): backward equations refined on the basic ones; lever rule in region 4."""
    return _properties(_solved("Ph", pressure / 1e6, enthalpy / 1e3))


def state_ps(pressure, entropy):
    """State from p (Pa) and s (J/(kg K)): backward equations refined on the basic ones; lever rule in region 4."""
    return _properties(_solved("Ps", pressure / 1e6, entropy / 1e3))


def state_p_dryness(pressure, dryness):
    """Saturated or wet state from p (Pa) and dryness (0 to 1)."""
    return _properties(_solved("Px", pressure / 1e6, dryness), dryness=dryness)


def state_T_dryness(temperature, dryness):
    """Saturated or wet state from T (K) and dryness (0 to 1)."""
    return _properties(_solved("Tx", temperature, dryness), dryness=dryness)


#: The lowest pressure of IF97 regions 1-4 and the saturation pressure at 623.15 K (where region 3 begins), MPa.
_TRIPLE_POINT_PRESSURE, _P_623 = _if97.Pt, _if97.Ps_623


def _solved(pair, a, b):
    """The basic equations' values for one pair of inputs (iapws units: MPa, K, kJ/kg).

    Regions 1, 2 and 4 below 623.15 K take the same steps, in the same order and through the same iapws
    functions, as ``iapws.IAPWS97`` does, so every value is the same to the last bit (tests/test_engine_lean.py
    compares them). What is left out is what the records never read: transport properties, ideal-gas parts,
    derivatives and the phases' own states. Region 3, region 5 and anything unusual go through
    ``iapws.IAPWS97`` itself.
    """
    f = _if97
    if pair == "TP":
        T, P = a, b
        region = f._Bound_TP(T, P)
        if region == 1:
            return f._Region1(T, P)
        if region == 2:
            return f._Region2(T, P)
        return _full(T=T, P=P)
    if pair in ("Ph", "Ps"):
        P, target = a, b
        key = pair[1]
        region = (f._Bound_Ph if key == "h" else f._Bound_Ps)(P, target)
        if region in (1, 2):
            basic = f._Region1 if region == 1 else f._Region2
            backward = {(1, "h"): f._Backward1_T_Ph, (2, "h"): f._Backward2_T_Ph,
                        (1, "s"): f._Backward1_T_Ps, (2, "s"): f._Backward2_T_Ps}[region, key]
            T = f.newton(lambda T: basic(T, P)[key] - target, backward(P, target))
            return basic(T, P)
        if region == 4:
            T = f._TSat_P(P)
            if T <= 623.15:
                low, high = f._Region1(T, P)[key], f._Region2(T, P)[key]
                return f._Region4(P, (target - low) / (high - low))
        return _full(P=P, **{key: target})
    if pair == "Px":
        P, x = a, b
        T = f._TSat_P(P)
        if _TRIPLE_POINT_PRESSURE <= P < f.Pc and 0 < x < 1:
            return _with_dryness(f._Region4(P, x), x)
        if _TRIPLE_POINT_PRESSURE <= P <= _P_623 and x == 0:
            return _with_dryness(f._Region1(T, P), x)
        if _TRIPLE_POINT_PRESSURE <= P <= _P_623 and x == 1:
            return _with_dryness(f._Region2(T, P), x)
        return _full(P=P, x=x)
    T, x = a, b
    P = f._PSat_T(T)
    if 273.15 <= T < f.Tc and 0 < x < 1:
        return _with_dryness(f._Region4(P, x), x)
    if 273.15 <= T <= 623.15 and x == 0:
        return _with_dryness(f._Region1(T, P), x)
    if 273.15 <= T <= 623.15 and x == 1:
        return _with_dryness(f._Region2(T, P), x)
    return _full(T=T, x=x)


def _with_dryness(values, dryness):
    # As iapws does for a state given by its dryness: the dryness given is the state's.
    values["x"] = dryness
    return values


def _full(**pair):
    """The basic equations' values from a whole ``iapws.IAPWS97`` state, for the regions the lean path leaves."""
    st = _IAPWS97(**pair)
    if not st.status:
        raise OutOfRangeError(f"IAPWS-IF97 (iapws) gave no state: {st.msg}")
    return {"P": st.P, "T": st.T, "h": st.h, "s": st.s, "v": st.v, "x": st.x, "region": st.region,
            "cp": st.cp, "cv": st.cv, "w": st.w}


def _properties(values, dryness=None):
    # iapws returns the saturated ends (x = 0 and 1) through regions 1 and 2, so the
    # dryness a constructor was given decides the phase there, not the region.
    pressure, temperature = float(values["P"]) * 1e6, float(values["T"])
    enthalpy, entropy, density = float(values["h"]) * 1e3, float(values["s"]) * 1e3, 1 / values["v"]
    if values["region"] == 4 or dryness is not None:
        dryness = float(values["x"]) if dryness is None else float(dryness)
        return Properties(pressure, temperature, enthalpy, entropy, float(density),
                          dryness, two_phase_word(dryness), 4, None, None, None)
    t_sat = saturation_temperature(pressure) if pressure <= CRITICAL_PRESSURE else None
    phase, _ = phase_and_region(pressure, temperature, t_sat)
    return Properties(pressure, temperature, enthalpy, entropy, float(density), None, phase,
                      int(values["region"]), float(values["cp"]) * 1e3, float(values["cv"]) * 1e3,
                      float(values["w"]))
