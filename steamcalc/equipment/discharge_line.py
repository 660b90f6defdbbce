"""A relief valve's discharge pipe: the built-up back pressure at the valve outlet, and its limit.

The steam leaving the valve flows through the outlet pipe (straight length and fittings) to the
atmosphere. Its pressure at the valve outlet, the built-up back pressure, is found by isothermal
compressible flow of an ideal gas from the pipe exit upstream. The exit is at the atmosphere, or,
when the flow is too large for that, choked at the isothermal limit (velocity √(RT/M)), whichever
is higher. Isothermal flow gives a higher back pressure than adiabatic flow for the same pipe, and
its choked exit pressure is the higher too: the basis is the conservative one (common practice for
relief discharge lines).

Units: Pa (absolute), K, kg/s, m.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError, OutOfRangeError
from .line_loss import STEEL_ROUGHNESS
from .relief import CONVENTIONAL_BACK_PRESSURE_LIMIT, MOLAR_MASS_WATER, R_UNIVERSAL

#: Built-up back pressure a valve tolerates, fraction of its gauge set pressure, and the basis.
BACK_PRESSURE_LIMITS = {
    "conventional": (CONVENTIONAL_BACK_PRESSURE_LIMIT,
                     "10 % of the gauge set pressure for a conventional valve at 10 % overpressure (common practice; "
                     "API 520 Part I, 5.3.3)"),
    "balanced-bellows": (0.50, "50 % of the gauge set pressure, the range of the balanced-bellows Kb curve "
                               "(API 520 Part I, figure 31); the maker's limit governs"),
    "pilot": (0.50, "50 % of the gauge set pressure for a pilot-operated valve (common practice); the maker's "
                    "limit governs"),
}


@dataclass(frozen=True)
class DischargeLine:
    """Isothermal compressible flow in a relief discharge pipe."""

    outlet_pressure: float    #: Pa (absolute) at the valve outlet: the built-up back pressure
    exit_pressure: float      #: Pa (absolute) at the pipe exit
    exit_choked: bool         #: the exit is at the isothermal choking pressure, above the atmosphere
    friction_factor: float    #: Darcy, fully developed at the line's Reynolds number
    resistance: float         #: f·L/D + ΣK, velocity heads
    outlet_velocity: float    #: m/s at the valve outlet
    exit_velocity: float      #: m/s at the pipe exit


def check_pipe_run(length, fittings_k):
    """Refuse a discharge line with a negative straight length (m) or sum of fittings' K (shared by the steam and
    the two-phase line)."""
    if length < 0.0 or fittings_k < 0.0:
        raise InputError("a discharge line's length and fittings' K cannot be negative",
                         field="discharge_length" if length < 0.0 else "discharge_fittings_k",
                         value=min(length, fittings_k), fix="give the straight length in m and the sum of K, 0 or more")


def built_up_back_pressure(mass_flow, temperature, inner_diameter, length, fittings_k, atmospheric_pressure,
                           viscosity, molar_mass=MOLAR_MASS_WATER, roughness=STEEL_ROUGHNESS, relieving_pressure=None):
    """Pressure at the relief valve outlet from the flow through its discharge pipe.

    Parameters
    ----------
    mass_flow : float
        kg/s through the pipe (the valve's rated flow).
    temperature : float
        K of the steam in the pipe (after the valve; taken constant along it).
    inner_diameter : float
        m.
    length : float
        m of straight pipe.
    fittings_k : float
        Sum of the fittings' and exit loss coefficients, velocity heads.
    atmospheric_pressure : float
        Pa, where the pipe discharges.
    viscosity : float
        Pa·s, for the Reynolds number.
    molar_mass : float
        kg/kmol (water 18.015).
    roughness : float
        m (commercial steel by default).
    relieving_pressure : float, optional
        Pa (absolute) at the valve inlet. When given, a pipe that would choke at its exit at or above it is
        refused (:class:`~steamcalc.errors.OutOfRangeError`): no outlet pressure below the relieving pressure
        passes the flow, as the two-phase line refuses it.

    Returns
    -------
    DischargeLine

    Notes
    -----
    Isothermal flow of an ideal gas with mass flux G over a resistance :math:`K_t = f L/D + \\sum K`:

    .. math:: p_1^2 - p_2^2 = G^2 \\frac{R T}{M}\\left(K_t + 2 \\ln\\frac{p_1}{p_2}\\right)

    solved for the outlet pressure p_1 (Brent) from the exit pressure
    :math:`p_2 = \\max(p_{atm},\\ G\\sqrt{RT/M})`, the second the isothermal choking pressure. The
    friction factor is Colebrook's at the line's Reynolds number (constant along an isothermal
    line, μ being a function of T only); fittings are added to f·L/D as velocity heads.

    References
    ----------
    Isothermal compressible pipe flow, e.g. Crane Technical Paper 410, chapter 1 (the complete
    isothermal equation), and ``fluids.compressible.isothermal_gas``; Colebrook (1939). The isothermal basis for
    relief discharge lines is common practice.

    Examples
    --------
    >>> line = built_up_back_pressure(2.0, 420.0, 0.1541, 10.0, 1.5, 101325.0, 1.4e-5)
    >>> round(line.outlet_pressure / 1e5, 3), line.exit_choked
    (1.303, False)
    """
    from fluids.friction import Colebrook
    from scipy.optimize import brentq

    for name, value in (("mass flow", mass_flow), ("temperature", temperature), ("inner diameter", inner_diameter)):
        if not (math.isfinite(value) and value > 0.0):
            raise InputError(f"the discharge line's {name} must be above zero", field=f"discharge line {name}",
                             value=value)
    check_pipe_run(length, fittings_k)
    area = math.pi * inner_diameter ** 2 / 4.0
    flux = mass_flow / area
    gas = R_UNIVERSAL * temperature / molar_mass   # p/ρ, J/kg
    reynolds = flux * inner_diameter / viscosity
    friction = float(Colebrook(reynolds, roughness / inner_diameter))
    resistance = friction * length / inner_diameter + fittings_k
    choked_exit = flux * math.sqrt(gas)
    exit_pressure = max(atmospheric_pressure, choked_exit)
    if relieving_pressure is not None and exit_pressure >= relieving_pressure:
        raise OutOfRangeError(
            f"the discharge pipe chokes at {exit_pressure / 1e5:.4g} bar(a), not below the relieving pressure "
            f"{relieving_pressure / 1e5:.4g} bar(a): its bore is far too small for the flow", field="discharge_size",
            value=f"{inner_diameter * 1e3:.1f} mm",
            fix="give a larger discharge pipe (at least the valve's outlet)")
    c = flux * flux * gas

    def residual(p1):
        return p1 * p1 - exit_pressure ** 2 - c * (resistance + 2.0 * math.log(p1 / exit_pressure))

    if resistance == 0.0:
        outlet = exit_pressure
    else:
        high = 2.0 * exit_pressure
        while residual(high) < 0.0:
            high *= 2.0
        outlet = float(brentq(residual, exit_pressure, high, xtol=1e-6, rtol=1e-12))
    return DischargeLine(outlet, exit_pressure, choked_exit > atmospheric_pressure, friction, resistance,
                         flux * gas / outlet, flux * gas / exit_pressure)


def back_pressure_limit(valve_type):
    """The largest built-up back pressure a valve type tolerates, as a fraction of its gauge set pressure.

    Returns
    -------
    tuple
        ``(fraction, basis)``.

    Examples
    --------
    >>> back_pressure_limit("conventional")[0]
    0.1
    """
    try:
        return BACK_PRESSURE_LIMITS[valve_type]
    except KeyError:
        raise InputError(f"unknown relief valve type '{valve_type}'", field="relief.valve_type", value=valve_type,
                         fix=f"use one of {', '.join(BACK_PRESSURE_LIMITS)}") from None
