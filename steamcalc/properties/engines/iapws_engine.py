"""The reference IF97 engine: the ``iapws`` package (pure Python), engine of issued records.

This is the only module that imports ``iapws``. Functions take and return SI units (Pa, K,
J/kg, J/(kg K)) and return :class:`~steamcalc.properties.engines.common.Properties`; range checks are the
caller's (:mod:`steamcalc.properties.steam`). It imports neither the fast engine nor the calculations.
"""

from __future__ import annotations

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


def version():
    """The iapws package's version."""
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
    return _properties(_IAPWS97(P=pressure / 1e6, T=temperature))


def state_ph(pressure, enthalpy):
    """State from p (Pa) and h (J/kg): backward equations refined on the basic ones; lever rule in region 4."""
    return _properties(_IAPWS97(P=pressure / 1e6, h=enthalpy / 1e3))


def state_ps(pressure, entropy):
    """State from p (Pa) and s (J/(kg K)): backward equations refined on the basic ones; lever rule in region 4."""
    return _properties(_IAPWS97(P=pressure / 1e6, s=entropy / 1e3))


def state_p_dryness(pressure, dryness):
    """Saturated or wet state from p (Pa) and dryness (0 to 1)."""
    return _properties(_IAPWS97(P=pressure / 1e6, x=dryness), dryness=dryness)


def state_T_dryness(temperature, dryness):
    """Saturated or wet state from T (K) and dryness (0 to 1)."""
    return _properties(_IAPWS97(T=temperature, x=dryness), dryness=dryness)


def _properties(st, dryness=None):
    # iapws returns the saturated ends (x = 0 and 1) through regions 1 and 2, so the
    # dryness a constructor was given decides the phase there, not the region.
    if not st.status:
        raise OutOfRangeError(f"IAPWS-IF97 (iapws) gave no state: {st.msg}")
    pressure, temperature = float(st.P) * 1e6, float(st.T)
    if st.region == 4 or dryness is not None:
        dryness = float(st.x) if dryness is None else float(dryness)
        return Properties(pressure, temperature, float(st.h) * 1e3, float(st.s) * 1e3, float(st.rho),
                          dryness, two_phase_word(dryness), 4, None, None, None)
    t_sat = saturation_temperature(pressure) if pressure <= CRITICAL_PRESSURE else None
    phase, _ = phase_and_region(pressure, temperature, t_sat)
    return Properties(pressure, temperature, float(st.h) * 1e3, float(st.s) * 1e3, float(st.rho),
                      None, phase, int(st.region), float(st.cp) * 1e3, float(st.cv) * 1e3, float(st.w))
