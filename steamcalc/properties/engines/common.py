"""What both IF97 engines share: the formulation's constants, ranges, region boundary and phase words.

Nothing here evaluates a property; each engine module (:mod:`.iapws_engine`,
:mod:`.seuif97_engine`) does that with its own library and imports only this module.
"""

from __future__ import annotations

from typing import NamedTuple

#: Critical point, IAPWS R7-97(2012) equations (1)-(3).
CRITICAL_PRESSURE = 22.064e6
CRITICAL_TEMPERATURE = 647.096
#: Range accepted here: IF97 regions 1 to 4 and the region-3 states between them (region 5,
#: above 1073.15 K, is not used).
MIN_TEMPERATURE = 273.15
MAX_TEMPERATURE = 1073.15
MAX_PRESSURE = 100e6
#: Saturation pressure at 273.15 K, Pa (IAPWS R7-97(2012) equation (30)); below it no liquid exists.
MIN_PRESSURE = 611.213
#: Boundary temperature of regions 1 and 3, K, and the saturation pressure there, Pa
#: (IAPWS R7-97(2012) section 4, p_s(623.15 K) from equation (30)).
REGION13_TEMPERATURE = 623.15
SATURATION_PRESSURE_623 = 16.5291643e6
#: Region 2 above this temperature at every pressure, K (IAPWS R7-97(2012) figure 1).
REGION23_MAX_TEMPERATURE = 863.15

PHASES = (
    "compressed liquid", "saturated liquid", "wet", "saturated vapour",
    "superheated vapour", "supercritical",
)

REFERENCE = "IAPWS R7-97(2012), Revised Release on the IAPWS Industrial Formulation 1997 (IAPWS-IF97)"

#: What the range messages say each limit is.
RANGE_NOTE = ("IAPWS-IF97 regions 1 to 4 as used here: 0.00611213 to 1000 bar(a) (triple-point pressure to "
              "100 MPa), 273.15 K to 1073.15 K (0 degC to 800 degC; region 5 above is not used)")


class Properties(NamedTuple):
    """One state as an engine returns it, SI units: Pa, K, J/kg, J/(kg K), kg/m3, m/s.

    ``dryness`` is None for a single-phase state; ``cp``, ``cv`` and ``speed_of_sound`` are None for
    a state given by its dryness (saturated or wet). ``phase`` is one of :data:`PHASES`.
    """

    pressure: float
    temperature: float
    enthalpy: float
    entropy: float
    density: float
    dryness: float | None
    phase: str
    region: int
    cp: float | None
    cv: float | None
    speed_of_sound: float | None


def boundary_23_pressure(temperature):
    """Pressure on the boundary between regions 2 and 3, Pa, at a temperature (K).

    References
    ----------
    IAPWS R7-97(2012), equation (5); check value in section 4.

    Examples
    --------
    >>> round(boundary_23_pressure(623.15) / 1e6, 7)  # 0.165291643e2 MPa, the check value in section 4
    16.5291643
    """
    theta = temperature
    return (0.34805185628969e3 - 0.11671859879975e1 * theta + 0.10192970039326e-2 * theta ** 2) * 1e6


def phase_and_region(pressure, temperature, saturation_temperature):
    """Phase word and IF97 region (1, 2 or 3) of a single-phase state.

    Parameters
    ----------
    pressure : float
        Absolute pressure, Pa.
    temperature : float
        Temperature, K.
    saturation_temperature : float or None
        T_s(p), K, from the engine asking; None above the critical pressure.
    """
    if pressure > CRITICAL_PRESSURE:
        phase = "supercritical" if temperature > CRITICAL_TEMPERATURE else "compressed liquid"
    elif temperature > CRITICAL_TEMPERATURE:
        phase = "superheated vapour"
    else:
        phase = "superheated vapour" if temperature > saturation_temperature else "compressed liquid"
    if temperature <= REGION13_TEMPERATURE:
        region = 1 if phase == "compressed liquid" else 2
    elif temperature > REGION23_MAX_TEMPERATURE:
        region = 2
    else:
        region = 2 if pressure <= boundary_23_pressure(temperature) else 3
    return phase, region


def two_phase_word(dryness):
    """Phase word of a saturated or wet state from its dryness fraction."""
    return "saturated liquid" if dryness == 0.0 else "saturated vapour" if dryness == 1.0 else "wet"
