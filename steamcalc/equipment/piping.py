"""Pipe sizes and line velocities.

Nominal sizes are written as ``"DN80"`` (ISO 6708 designation) or ``"3 in"`` / ``"NPS 3"``;
dimensions are ASME B36.10M (welded and seamless wrought steel pipe) through the fluids
package's tables.
"""

from __future__ import annotations

import math
import re
from functools import lru_cache

from fluids.piping import nearest_pipe

from ..errors import InputError

#: DN designation → NPS, the usual equivalence between ISO 6708 and ASME B36.10M sizes
#: (common practice; the metric and inch series share outside diameters).
DN_TO_NPS = {
    15: 0.5, 20: 0.75, 25: 1.0, 32: 1.25, 40: 1.5, 50: 2.0, 65: 2.5, 80: 3.0, 90: 3.5, 100: 4.0,
    125: 5.0, 150: 6.0, 200: 8.0, 250: 10.0, 300: 12.0, 350: 14.0, 400: 16.0, 450: 18.0, 500: 20.0,
    600: 24.0,
}
_DN = re.compile(r"^\s*DN\s*(\d+)\s*$", re.IGNORECASE)
_NPS = re.compile(r"^\s*(?:NPS\s*)?(\d+(?:\.\d+)?|\d+/\d+|\d+\s+\d+/\d+)\s*(?:in|inch|\")?\s*$", re.IGNORECASE)
SCHEDULES = ("5", "10", "20", "30", "40", "STD", "60", "80", "XS", "100", "120", "140", "160", "XXS")


def _nps_value(text):
    text = text.strip()
    if " " in text:
        whole, frac = text.split()
        num, den = frac.split("/")
        return float(whole) + float(num) / float(den)
    if "/" in text:
        num, den = text.split("/")
        return float(num) / float(den)
    return float(text)


def pipe_inner_diameter(size, schedule="40", field="size"):
    """Inside diameter of a steel pipe of a nominal size and schedule.

    Parameters
    ----------
    size : str
        ``"DN80"``, ``"3 in"``, ``"NPS 3"`` or ``"1 1/2 in"``.
    schedule : str
        ASME B36.10M schedule, e.g. ``"40"``, ``"80"``, ``"STD"``.
    field : str
        Input field name, for error messages.

    Returns
    -------
    float
        Inside diameter, m.

    References
    ----------
    ASME B36.10M, Welded and Seamless Wrought Steel Pipe, dimension tables (through
    ``fluids.piping.nearest_pipe``).

    Examples
    --------
    >>> round(pipe_inner_diameter("DN80", "40") * 1000, 2)
    77.92
    >>> round(pipe_inner_diameter("6 in", "40") * 1000, 2)
    154.08
    """
    return pipe_dimensions(size, schedule, field)[0]


@lru_cache(maxsize=512)
def pipe_dimensions(size, schedule="40", field="size"):
    """Inside diameter and wall thickness of a steel pipe, m, by nominal size and schedule.

    References
    ----------
    ASME B36.10M dimension tables (through ``fluids.piping.nearest_pipe``).

    Examples
    --------
    >>> [round(v * 1000, 2) for v in pipe_dimensions("DN200", "40")]
    [202.74, 8.18]
    """
    match = _DN.match(size) if isinstance(size, str) else None
    if match:
        dn = int(match.group(1))
        if dn not in DN_TO_NPS:
            raise InputError(f"'{size}' is not a standard nominal size", field=field, value=size,
                             fix=f"use one of DN{', DN'.join(str(d) for d in DN_TO_NPS)}")
        nps = DN_TO_NPS[dn]
    else:
        match = _NPS.match(size) if isinstance(size, str) else None
        if not match:
            raise InputError(f"'{size}' is not a nominal pipe size", field=field, value=size,
                             fix="write e.g. 'DN80' or '3 in'")
        nps = _nps_value(match.group(1))
    schedule = str(schedule).strip().upper()
    if schedule not in SCHEDULES:
        raise InputError(f"schedule '{schedule}' is not an ASME B36.10M schedule", field="schedule",
                         value=schedule, fix=f"use one of {', '.join(SCHEDULES)}")
    try:
        found_nps, inner, _outer, wall = nearest_pipe(NPS=nps, schedule=schedule)
    except Exception:
        raise InputError(f"no ASME B36.10M pipe of size {size} in schedule {schedule}", field=field,
                         value=size, fix="choose another schedule or size") from None
    if abs(found_nps - nps) > 1e-9:
        raise InputError(f"'{size}' is not a size of schedule {schedule}", field=field, value=size,
                         fix="choose a standard nominal size")
    return float(inner), float(wall)


def flow_area(inner_diameter):
    """Flow area of a round pipe, m², from its inside diameter, m: A = π d² / 4."""
    return math.pi * inner_diameter ** 2 / 4.0


def line_velocity(mass_flow, density, inner_diameter):
    """Mean velocity in a line, m/s.

    Parameters
    ----------
    mass_flow : float
        kg/s.
    density : float
        kg/m³ (for two-phase flow, the homogeneous density).
    inner_diameter : float
        m.

    Notes
    -----
    Continuity: :math:`v = \\dot m / (\\rho A)`, :math:`A = \\pi d^2 / 4`.

    References
    ----------
    Continuity equation for steady flow (any fluid-mechanics text).

    Examples
    --------
    >>> round(line_velocity(1.0, 2.0, 0.1), 2)
    63.66
    """
    return mass_flow / (density * flow_area(inner_diameter))


def homogeneous_density(dryness, liquid_density, vapour_density):
    """Density of a two-phase mixture with no slip between phases, kg/m³.

    Notes
    -----
    :math:`1/\\rho_h = x/\\rho_g + (1 - x)/\\rho_f`.

    References
    ----------
    Homogeneous equilibrium model (e.g. Collier & Thome, Convective Boiling and
    Condensation, ch. 2).

    Examples
    --------
    >>> round(homogeneous_density(0.1, 950.0, 2.0), 2)
    19.63
    """
    return 1.0 / (dryness / vapour_density + (1.0 - dryness) / liquid_density)


def erosional_velocity(density, c_factor=100.0):
    """Erosional velocity of a (two-phase) line, m/s, API RP 14E.

    Parameters
    ----------
    density : float
        Bulk (homogeneous) density, kg/m³.
    c_factor : float
        API RP 14E C factor in its US units; 100 for continuous service.

    Notes
    -----
    :math:`V_e = C / \\sqrt{\\rho_m}` in ft/s with ρ in lb/ft³ (through ``fluids``).
    API RP 14E was written for offshore oil-and-gas production piping; for flashing steam
    condensate it is outside its scope and is given for information only — judge such lines
    with :func:`two_phase_velocity` against :data:`MAX_FLASHING_CONDENSATE_VELOCITY`.

    References
    ----------
    API RP 14E, Recommended Practice for Design and Installation of Offshore
    Production Platform Piping Systems, 5th ed., 2000, equation 2.14.

    Examples
    --------
    >>> round(erosional_velocity(1000.0), 3)
    3.858
    """
    from fluids import erosional_velocity as _api_rp_14e

    return float(_api_rp_14e(density, c_factor))


#: Homogeneous two-phase velocity above which a flashing-condensate line erodes and
#: hammers, m/s (common practice for condensate lines carrying flash steam: the 3,000 ft/min (15 m/s) steam
#: suppliers' velocity method gives for condensate return headers, 5,000 ft/min for trap discharge lines).
MAX_FLASHING_CONDENSATE_VELOCITY = 15.0


def two_phase_velocity(mass_flow, dryness, liquid_density, vapour_density, inner_diameter):
    """Homogeneous (no-slip) velocity of a steam–water mixture in a line, m/s.

    Parameters
    ----------
    mass_flow : float
        Total flow, kg/s.
    dryness : float
        Vapour mass fraction x, 0 to 1.
    liquid_density, vapour_density : float
        Saturated densities at the line pressure, kg/m³.
    inner_diameter : float
        m.

    Notes
    -----
    :math:`v_h = \\dot m / (\\rho_h A)`, :math:`1/\\rho_h = x/\\rho_g + (1 - x)/\\rho_f`:
    the mixture velocity when both phases move together, the basis for judging
    flashing-condensate lines.

    References
    ----------
    Homogeneous equilibrium model (e.g. Collier & Thome, Convective Boiling and
    Condensation, ch. 2).

    Examples
    --------
    >>> round(two_phase_velocity(1.0, 0.1, 950.0, 2.0, 0.1), 3)
    6.487
    """
    rho = homogeneous_density(dryness, liquid_density, vapour_density)
    return line_velocity(mass_flow, rho, inner_diameter)


def momentum_flux(mass_flow, density, inner_diameter):
    """Momentum flux ρv² of a stream in a nozzle, Pa.

    Parameters
    ----------
    mass_flow : float
        kg/s.
    density : float
        kg/m³ (homogeneous density for a two-phase stream).
    inner_diameter : float
        m.

    Notes
    -----
    :math:`\\rho v^2 = G^2/\\rho`, :math:`G = \\dot m / A`.

    Examples
    --------
    >>> round(momentum_flux(1.0, 2.0, 0.1), 1)
    8105.7
    """
    velocity = line_velocity(mass_flow, density, inner_diameter)
    return density * velocity ** 2
