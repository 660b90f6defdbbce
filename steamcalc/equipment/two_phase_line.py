"""A relief valve's discharge pipe carrying a flashing two-phase mixture: the built-up back pressure.

The mixture leaving the valve is taken homogeneous and in equilibrium (HEM), its specific volume
following the omega equation of state from the reference state of the relief sizing (API 520 Part I,
annex C):

.. math:: \\frac{v}{v_0} = \\omega\\left(\\frac{p_0}{p} - 1\\right) + 1

with ω fitted over the pipe's own pressure range (:func:`pipe_omega`): the flow in an adiabatic pipe
keeps its stagnation enthalpy, so the mixture follows the constant-enthalpy expansion, which makes more
vapour than the isentropic one the nozzle's two-point ω is fitted to (near the relieving pressure).
Over a pressure ratio of 4 to 8 the nozzle's ω under-predicts the pipe's volumes, and the back pressure
by about a tenth. The momentum balance of
steady flow in a horizontal pipe of constant bore, with wall friction and no heat or work,

.. math:: dp + G^2\\,dv + \\frac{f\\,G^2 v}{2D}\\,dx = 0

is integrated from the pipe exit upstream to the valve outlet. The exit is at the atmosphere, or, when the
flow is too large for that, choked at the omega critical condition :math:`G = p_e/\\sqrt{\\omega p_0 v_0}`,
whichever is higher. Fittings are added to f·L/D as velocity heads.

Units: Pa (absolute), m³/kg, kg/s, m, Pa·s.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError, OutOfRangeError
from .discharge_line import check_pipe_run
from .line_loss import STEEL_ROUGHNESS


@dataclass(frozen=True)
class TwoPhaseLine:
    """Homogeneous two-phase flow in a relief discharge pipe, omega equation of state."""

    outlet_pressure: float    #: Pa (absolute) at the valve outlet: the built-up back pressure
    exit_pressure: float      #: Pa (absolute) at the pipe exit
    exit_choked: bool         #: the exit is at the omega critical pressure, above the atmosphere
    friction_factor: float    #: Darcy, Colebrook at the liquid-only Reynolds number
    reynolds: float           #: liquid-only Reynolds number G·D/μ_l
    resistance: float         #: f·L/D + ΣK, velocity heads
    mass_flux: float          #: kg/(m² s)
    exit_volume: float        #: m³/kg at the pipe exit
    exit_velocity: float      #: m/s at the pipe exit
    #: a subcooled liquid carried as liquid the whole length, flashing at the exit (choked at the reference pressure)
    liquid_to_exit: bool = False


def omega_volume(pressure, omega, reference_pressure, reference_volume):
    """Specific volume of the mixture by the omega equation of state, m³/kg.

    .. math:: v = v_0\\left[\\omega\\left(\\frac{p_0}{p} - 1\\right) + 1\\right]

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C, C.2.2.1 (two-phase) and C.2.3.1 (subcooled
    liquid below its saturation pressure, p_0 the saturation pressure).

    Examples
    --------
    >>> round(omega_volume(2.0e5, 1.0, 4.0e5, 0.1), 6)   # ω = 1: isothermal ideal gas, pv constant
    0.2
    """
    return reference_volume * (omega * (reference_pressure / pressure - 1.0) + 1.0)


def flash_pressure(enthalpy, temperature, pressure):
    """Pressure at which a liquid kept at its enthalpy, as its pressure falls along a pipe, begins to flash, Pa.

    .. math:: h_f(p_f) = h_1

    A compressed liquid at :math:`(p_1, T_1)` holds a little more enthalpy than the saturated liquid at
    :math:`T_1`, so on its isenthalp it reaches saturation above :math:`p_s(T_1)`: at 101 °C and 9.8 bar(a),
    1.057 against 1.051 bar(a). An adiabatic pipe keeps the enthalpy; this is where the liquid carried down a
    discharge pipe flashes.

    Parameters
    ----------
    enthalpy : float
        J/kg of the liquid.
    temperature, pressure : float
        K and Pa (absolute) of the liquid: the search runs from its saturation pressure up to its pressure.

    Returns
    -------
    float

    References
    ----------
    IAPWS-IF97 (saturated liquid's enthalpy, region 4 and region 1); the flash point of a subcooled liquid in
    API 520 Part I annex C is taken at the liquid's saturation pressure; here at its enthalpy (homogeneous
    equilibrium along an adiabatic pipe).

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> liquid = SteamState.from_pT(9.8e5, 374.15)
    >>> round(flash_pressure(liquid.enthalpy, liquid.temperature, liquid.pressure) / 1e5, 4)
    1.0567
    """
    from scipy.optimize import brentq

    from ..properties.steam import SteamState, saturation_pressure

    def excess(p):
        return SteamState.from_p_dryness(p, 0.0).enthalpy - enthalpy

    low = saturation_pressure(temperature)
    if excess(low) >= 0.0:
        return low
    if excess(pressure) <= 0.0:
        raise InputError("the liquid is not below its boiling point at its pressure: it does not flash as a "
                         "liquid carried down the pipe", field="discharge line flash point", value=pressure,
                         fix="check the relieving state: a saturated or two-phase mixture is sized as two-phase")
    return float(brentq(excess, low, pressure, xtol=1e-3, rtol=1e-12))


def pipe_omega(reference_pressure, reference_volume, exit_pressure, exit_volume):
    """ω of a discharge pipe: the omega equation through the relieving state and the exit state.

    .. math:: \\omega = \\frac{v_e/v_0 - 1}{p_0/p_e - 1}

    with :math:`v_e` the mixture's volume after the constant-enthalpy expansion to the exit pressure
    (the atmosphere), so that the equation of state is exact at both ends of the pipe's pressure range
    (a two-point fit as in API 520 Part I annex C, C.2.2.1, over the pipe's range instead of 10 %).

    Examples
    --------
    >>> round(pipe_omega(7.0e5, 0.01, 1.0e5, 0.31), 4)
    5.0
    """
    if not (exit_volume > reference_volume and reference_pressure > exit_pressure > 0.0):
        raise InputError("the mixture must expand as its pressure falls along the discharge pipe",
                         field="discharge line omega", value=exit_volume,
                         fix="check the relieving state (a two-phase or flashing mixture) and the exit pressure")
    return (exit_volume / reference_volume - 1.0) / (reference_pressure / exit_pressure - 1.0)


def line_resistance(outlet_pressure, exit_pressure, mass_flux, omega, reference_pressure, reference_volume):
    """Velocity heads of resistance (f·L/D + ΣK) that take the flow from ``outlet_pressure`` to ``exit_pressure``.

    Notes
    -----
    From the momentum balance with :math:`dv/dp = -\\omega p_0 v_0/p^2`:

    .. math:: N = \\int_{p_e}^{p_1} \\frac{2}{G^2 v(p)}\\left(1 - \\frac{G^2 \\omega p_0 v_0}{p^2}\\right) dp

    integrated by adaptive quadrature (``scipy.integrate.quad``). For ω = 1 it is the isothermal gas
    equation :math:`N = (p_1^2 - p_e^2)/(G^2 p_0 v_0) - 2\\ln(p_1/p_e)`.

    Examples
    --------
    >>> n = line_resistance(3.0e5, 1.0e5, 500.0, 1.0, 5.0e5, 0.05)
    >>> round(n, 4), round((3.0**2 - 1.0**2) * 1e10 / (500.0**2 * 5.0e5 * 0.05) - 2 * math.log(3.0), 4)
    (10.6028, 10.6028)
    """
    from scipy.integrate import quad

    critical = mass_flux * mass_flux * omega * reference_pressure * reference_volume

    def integrand(p):
        return 2.0 / (mass_flux * mass_flux * omega_volume(p, omega, reference_pressure, reference_volume)) * (
            1.0 - critical / (p * p))

    value, _ = quad(integrand, exit_pressure, outlet_pressure, epsabs=0.0, epsrel=1e-11, limit=200)
    return value


def _refuse_unphysical(pipe, mass_flow, inner_diameter, omega, reference_pressure, reference_volume,
                       liquid_viscosity):
    """Refuse a two-phase pipe's figure that is not finite and above zero, by name."""
    for name, value in (("mass flow", mass_flow), ("inner diameter", inner_diameter), ("omega", omega),
                        ("reference pressure", reference_pressure), ("reference volume", reference_volume),
                        ("liquid viscosity", liquid_viscosity)):
        if not (math.isfinite(value) and value > 0.0):
            raise InputError(f"the two-phase {pipe}'s {name} must be above zero", field=f"{pipe} {name}",
                             value=value)


def _pipe_flow(mass_flow, inner_diameter, length, fittings_k, liquid_viscosity, roughness):
    """``(G, Re_lo, f, N)``: mass flux (kg/(m² s)), liquid-only Reynolds number, Colebrook's friction factor at it, and
    the pipe's velocity heads f·L/D + ΣK."""
    from fluids.friction import Colebrook

    flux = mass_flow / (math.pi * inner_diameter ** 2 / 4.0)
    reynolds = flux * inner_diameter / liquid_viscosity
    friction = float(Colebrook(reynolds, roughness / inner_diameter))
    return flux, reynolds, friction, friction * length / inner_diameter + fittings_k


def two_phase_back_pressure(mass_flow, inner_diameter, length, fittings_k, atmospheric_pressure, omega,
                            reference_pressure, reference_volume, liquid_viscosity, roughness=STEEL_ROUGHNESS,
                            liquid_up_to=None):
    """Pressure at the relief valve outlet from a flashing two-phase flow through its discharge pipe.

    Parameters
    ----------
    mass_flow : float
        kg/s through the pipe (the valve's rated flow).
    inner_diameter : float
        m.
    length : float
        m of straight pipe (plus any equivalent length of fittings).
    fittings_k : float
        Sum of the fittings' and exit loss coefficients, velocity heads.
    atmospheric_pressure : float
        Pa, where the pipe discharges.
    omega : float
        ω of the mixture in the pipe (:func:`pipe_omega`), above zero.
    reference_pressure : float
        Pa (absolute), p_0 of the omega equation: the relieving pressure (two-phase inlet) or, for a subcooled
        liquid, where it flashes: its saturation pressure, or the one on its isenthalp (:func:`flash_pressure`).
    reference_volume : float
        m³/kg at ``reference_pressure``.
    liquid_viscosity : float
        Pa·s of the liquid, for the liquid-only Reynolds number.
    roughness : float
        m (commercial steel by default).
    liquid_up_to : float, optional
        Pa (absolute), for a subcooled liquid whose ``reference_pressure`` is its saturation
        pressure: the relieving pressure. Above the saturation pressure the pipe carries liquid of
        volume ``reference_volume`` (Darcy-Weisbach), up to this pressure.

    Returns
    -------
    TwoPhaseLine

    Notes
    -----
    The friction factor is Colebrook's at the liquid-only Reynolds number :math:`Re_{lo} = G D/\\mu_l`,
    constant along the pipe: the liquid's viscosity is the larger, so f is the larger and the back
    pressure the higher (conservative; Leung's choice for homogeneous flashing flow). The outlet
    pressure :math:`p_1` solves :math:`N(p_1) = f L/D + \\sum K` (:func:`line_resistance`, Brent) from
    the exit pressure

    .. math:: p_e = \\max\\left(p_{atm},\\ G\\sqrt{\\omega p_0 v_0}\\right)

    the second being the omega method's critical (choking) pressure for the flux G. For a subcooled
    liquid the resistance left where the pressure reaches its saturation pressure p_s is taken by the
    liquid, :math:`p_1 = p_s + (N - N(p_s))\\,G^2 v_0/2` (API 520 Part I annex C, C.2.3.1: the omega
    equation of a subcooled liquid holds below p_s). When the omega critical pressure
    :math:`G\\sqrt{\\omega p_s v_0}` is at or above p_s, the mixture could not carry the flux anywhere below
    p_s: the liquid stays liquid the whole length and flashes at the exit, choked there at p_s, so
    :math:`p_1 = p_s + (f L/D + \\sum K)\\,G^2 v_0/2` (the high-subcooling case of annex C, C.2.3.1, where the flow
    chokes at the saturation pressure; the same limit as the integral's, reached continuously). A mixture that is
    two-phase from the valve (no ``liquid_up_to``) is refused there instead: its bore is far too small.

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C (the omega equation of state); Leung, J. C.
    (1996), "Easily size relief devices and piping for two-phase flow", Chem. Eng. Prog. 92(12), 28-50
    (homogeneous pipe flow with the omega parameter; the citation's details are from memory, the paper not
    consulted here); Colebrook (1939).

    Examples
    --------
    >>> line = two_phase_back_pressure(2.22, 0.0525, 6.0, 1.5, 101325.0, 3.71, 7.68e5, 0.00732, 2.8e-4)
    >>> round(line.outlet_pressure / 1e5, 3), line.exit_choked, round(line.exit_pressure / 1e5, 3)
    (3.481, True, 1.481)
    """
    from scipy.optimize import brentq

    _refuse_unphysical("discharge line", mass_flow, inner_diameter, omega, reference_pressure, reference_volume,
                       liquid_viscosity)
    check_pipe_run(length, fittings_k)
    flux, reynolds, friction, resistance = _pipe_flow(mass_flow, inner_diameter, length, fittings_k,
                                                      liquid_viscosity, roughness)
    choked_exit = flux * math.sqrt(omega * reference_pressure * reference_volume)
    exit_pressure = max(atmospheric_pressure, choked_exit)
    relieving = reference_pressure if liquid_up_to is None else liquid_up_to
    if exit_pressure >= reference_pressure and liquid_up_to is not None:
        # A subcooled liquid whose flux is above what the flashing mixture could carry at its flash point (the
        # reference pressure) stays liquid the whole length (a liquid does not choke) and flashes at the exit, choked
        # there at that pressure: the pipe's resistance is all the liquid's.
        outlet = reference_pressure + resistance * flux * flux * reference_volume / 2.0
        _refuse_at_relieving(outlet, relieving, resistance, inner_diameter)
        return TwoPhaseLine(outlet, reference_pressure, reference_pressure > atmospheric_pressure, friction, reynolds,
                            resistance, flux, reference_volume, flux * reference_volume, liquid_to_exit=True)
    if exit_pressure >= reference_pressure:
        raise OutOfRangeError(
            f"the discharge pipe chokes at {exit_pressure / 1e5:.4g} bar(a), not below the pressure "
            f"{reference_pressure / 1e5:.4g} bar(a) the mixture flashes from: its bore is far too small for the flow",
            field="discharge_size",
            value=f"{inner_diameter * 1e3:.1f} mm", fix="give a larger discharge pipe (at least the valve's outlet)")

    def residual(p1):
        return line_resistance(p1, exit_pressure, flux, omega, reference_pressure, reference_volume) - resistance

    if resistance == 0.0:
        outlet = exit_pressure
    elif residual(reference_pressure) >= 0.0:
        outlet = float(brentq(residual, exit_pressure, reference_pressure, xtol=1e-6, rtol=1e-12))
    elif liquid_up_to is None:
        outlet = relieving
    else:
        # The rest of the pipe, upstream of the flashing point, carries liquid.
        outlet = reference_pressure - residual(reference_pressure) * flux * flux * reference_volume / 2.0
    _refuse_at_relieving(outlet, relieving, resistance, inner_diameter)
    exit_volume = omega_volume(exit_pressure, omega, reference_pressure, reference_volume)
    return TwoPhaseLine(outlet, exit_pressure, choked_exit > atmospheric_pressure, friction, reynolds, resistance,
                        flux, exit_volume, flux * exit_volume)


def _refuse_at_relieving(outlet, relieving, resistance, inner_diameter):
    if outlet >= relieving:
        raise OutOfRangeError(
            f"the discharge pipe's resistance ({resistance:.3g} velocity heads) would raise the back pressure "
            f"to the relieving pressure {relieving / 1e5:.4g} bar(a): the valve could not pass its flow",
            field="discharge_size", value=f"{inner_diameter * 1e3:.1f} mm",
            fix="give a larger or shorter discharge pipe")


def two_phase_reaction_force(line, inner_diameter, atmospheric_pressure):
    """Reaction force at the open end of a two-phase discharge pipe, N.

    .. math:: F = \\frac{G^2}{\\rho_e} A + (p_e - p_{atm}) A

    the momentum flux leaving the exit plus the pressure thrust of a choked exit.

    References
    ----------
    API Standard 520 Part II, 7th ed. (2020): the reaction force of an open discharge (clause 4.4.1.1, from memory):
    momentum plus pressure at the exit; its equation (1) is the ideal-gas form of the same balance.

    Examples
    --------
    >>> line = two_phase_back_pressure(2.22, 0.0525, 6.0, 1.5, 101325.0, 3.71, 7.68e5, 0.00732, 2.8e-4)
    >>> round(two_phase_reaction_force(line, 0.0525, 101325.0))
    377
    """
    area = math.pi * inner_diameter ** 2 / 4.0
    return line.mass_flux ** 2 * line.exit_volume * area + (line.exit_pressure - atmospheric_pressure) * area


@dataclass(frozen=True)
class TwoPhaseInlet:
    """Homogeneous two-phase flow along a relief valve's inlet pipe, omega equation of state."""

    valve_inlet_pressure: float   #: Pa (absolute) at the valve inlet
    friction_factor: float        #: Darcy, Colebrook at the liquid-only Reynolds number
    reynolds: float               #: liquid-only Reynolds number G·D/μ_l
    resistance: float             #: f·L/D + ΣK, velocity heads
    mass_flux: float              #: kg/(m² s)


def two_phase_inlet_pressure(mass_flow, inner_diameter, length, fittings_k, omega, reference_pressure,
                             reference_volume, liquid_viscosity, roughness=STEEL_ROUGHNESS, liquid_from=None):
    """Pressure at a relief valve's inlet after a flashing two-phase flow along its inlet pipe.

    The mixture enters the pipe at the relieving pressure :math:`p_0` (volume :math:`v_0`) and flows
    homogeneously, in equilibrium, to the valve; the pressure :math:`p_2` at the valve solves the momentum
    balance of :func:`line_resistance` from the other end,

    .. math:: \\int_{p_2}^{p_0} \\frac{2}{G^2 v(p)}\\left(1 - \\frac{G^2 \\omega p_0 v_0}{p^2}\\right) dp
              = \\frac{f L}{D} + \\sum K

    between :math:`p_0` and the choking pressure :math:`G\\sqrt{\\omega p_0 v_0}` (Brent). A resistance beyond
    what the flux can pass before it chokes is refused.

    Parameters
    ----------
    mass_flow : float
        kg/s through the pipe (the valve's rated flow).
    inner_diameter, length : float
        m.
    fittings_k : float
        Sum of the entrance's and fittings' loss coefficients, velocity heads.
    omega : float
        ω of the mixture over the pipe's pressure range, above zero.
    reference_pressure : float
        Pa (absolute): the relieving pressure, where the mixture enters the pipe.
    reference_volume : float
        m³/kg there.
    liquid_viscosity : float
        Pa·s of the liquid, for the liquid-only Reynolds number (the larger friction: conservative).
    roughness : float
        m (commercial steel by default).
    liquid_from : float, optional
        Pa (absolute), for a subcooled liquid whose ``reference_pressure`` is its saturation pressure: the
        relieving pressure it enters the pipe at. Down to the saturation pressure the pipe carries liquid of
        volume ``reference_volume`` (Darcy–Weisbach, :math:`N_l = 2(p_{in} - p_0)/(G^2 v_0)`); the rest of the
        resistance is the flashing flow's (API 520 Part I annex C, C.2.3: the omega equation of a subcooled
        liquid holds below its saturation pressure).

    Returns
    -------
    TwoPhaseInlet

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C (the omega equation of state); Leung (1996), as for
    :func:`two_phase_back_pressure`; Colebrook (1939).

    Examples
    --------
    >>> inlet = two_phase_inlet_pressure(2.22, 0.0779, 0.5, 0.5, 3.71, 7.68e5, 0.00732, 2.8e-4)
    >>> round((7.68e5 - inlet.valve_inlet_pressure) / 1e5, 4)
    0.005
    """
    from scipy.optimize import brentq

    _refuse_unphysical("inlet pipe", mass_flow, inner_diameter, omega, reference_pressure, reference_volume,
                       liquid_viscosity)
    if length < 0.0 or fittings_k < 0.0:
        raise InputError("an inlet pipe's length and fittings' K cannot be negative",
                         field="inlet_length" if length < 0.0 else "inlet_fittings_k", value=min(length, fittings_k),
                         fix="give the straight length in m and the sum of K, 0 or more")
    flux, reynolds, friction, resistance = _pipe_flow(mass_flow, inner_diameter, length, fittings_k,
                                                      liquid_viscosity, roughness)
    choking = flux * math.sqrt(omega * reference_pressure * reference_volume)
    entering = reference_pressure if liquid_from is None else liquid_from
    if resistance == 0.0:
        return TwoPhaseInlet(entering, friction, reynolds, resistance, flux)
    flashing = resistance
    if liquid_from is not None:
        liquid = 2.0 * (liquid_from - reference_pressure) / (flux * flux * reference_volume)
        if resistance <= liquid:   # the pipe ends before the liquid reaches its saturation pressure
            return TwoPhaseInlet(liquid_from - resistance * flux * flux * reference_volume / 2.0, friction, reynolds,
                                 resistance, flux)
        flashing = resistance - liquid

    def residual(p2):
        return line_resistance(reference_pressure, p2, flux, omega, reference_pressure, reference_volume) - flashing

    if choking >= reference_pressure or residual(choking) < 0.0:
        raise OutOfRangeError(
            f"the inlet pipe's resistance ({resistance:.3g} velocity heads) is more than the flashing flow can pass "
            f"from {entering / 1e5:.4g} bar(a) before it chokes: the valve could not receive its rated flow",
            field="inlet_size", value=f"{inner_diameter * 1e3:.1f} mm",
            fix="give a larger or shorter inlet pipe (at least the valve's inlet)")
    pressure = float(brentq(residual, choking, reference_pressure, xtol=1e-6, rtol=1e-12))
    return TwoPhaseInlet(pressure, friction, reynolds, resistance, flux)
