"""Pressure-relief valves for steam: required area, API 526 orifices, back pressure, reaction.

Two ways to the required effective area, API 520 Part I:

* direct integration of isentropic nozzle flow on IAPWS-IF97 (the homogeneous
  direct-integration method of API 520 Part I, annex B), with the mass flux the
  largest :math:`G = \\rho\\sqrt{2(h_0 - h)}` along the isentrope from the relieving
  state down to the back pressure;
* the API 520 Part I steam equation (Napier) with its superheat correction K_SH
  (through the fluids package's table) and high-pressure correction K_N.

Units: mass flow kg/h, pressure Pa (absolute) unless a name says ``_kpa``, areas mm².
Sizing here is preliminary: the valve maker's certified capacity governs.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError, NotConvergedError

#: API 526 (7th ed., 2017), effective orifice areas, in², by letter (the standard's table of
#: effective areas for the effective coefficient of discharge 0.975 of API 520).
API526_AREAS_IN2 = (
    ("D", 0.110), ("E", 0.196), ("F", 0.307), ("G", 0.503), ("H", 0.785), ("J", 1.287),
    ("K", 1.838), ("L", 2.853), ("M", 3.60), ("N", 4.34), ("P", 6.38), ("Q", 11.05),
    ("R", 16.0), ("T", 26.0),
)
MM2_PER_IN2 = 645.16
#: Smallest API 526 outlet size of each orifice letter, inch (API 526's inlet x letter x outlet
#: combinations, e.g. 3K4, as tabulated in the Valve Selection Handbook, Table 5-1 "Area ratio of valve
#: outlet size to nozzle size of pressure relief valves to API Std. 526": every letter's smallest outlet
#: agrees); used as the open discharge when none is given.
API526_OUTLET_NPS = {"D": 2.0, "E": 2.0, "F": 2.0, "G": 2.5, "H": 3.0, "J": 3.0, "K": 4.0, "L": 4.0,
                     "M": 6.0, "N": 6.0, "P": 6.0, "Q": 8.0, "R": 8.0, "T": 10.0}
#: Smallest API 526 inlet size of each orifice letter, inch, from the same Table 5-1 (1D2, 1.5F2, 3K4, 6Q8, ...: every
#: letter's smallest inlet agrees; the table names no edition of API 526): an inlet pipe narrower than it is
#: narrower than any API 526 valve of that orifice.
API526_INLET_NPS = {"D": 1.0, "E": 1.0, "F": 1.5, "G": 1.5, "H": 1.5, "J": 2.0, "K": 3.0, "L": 3.0,
                    "M": 4.0, "N": 4.0, "P": 4.0, "Q": 6.0, "R": 6.0, "T": 8.0}
#: Effective coefficient of discharge for preliminary sizing, API 520 Part I (10th ed.) 5.2.
DEFAULT_KD = 0.975
VALVE_TYPES = ("conventional", "balanced-bellows", "pilot")
#: Built-up back pressure a conventional valve tolerates, fraction of gauge set pressure at 10 %
#: overpressure (API 520 Part I, 5.3.3).
CONVENTIONAL_BACK_PRESSURE_LIMIT = 0.10
#: Inlet loss limit, fraction of gauge set pressure: the 3 % rule of API 520 Part II for inlet piping, as quoted in
#: the Valve Selection Handbook (Zappe), p. 271 (the clause, 7.3.1 of the 2015 edition, from memory).
INLET_LOSS_LIMIT = 0.03
MOLAR_MASS_WATER = 18.015268  # kg/kmol, IAPWS R6-95
R_UNIVERSAL = 8314.462618  # J/(kmol K)


def api526_orifice(required_area_mm2):
    """The smallest API 526 orifice whose effective area is at least the required area.

    Parameters
    ----------
    required_area_mm2 : float
        Required effective discharge area, mm².

    Returns
    -------
    tuple or None
        ``(letter, effective area mm²)``; None when larger than the T orifice (several valves
        or a non-standard valve).

    References
    ----------
    API Standard 526, Flanged Steel Pressure-relief Valves, 7th ed. (2017), effective
    orifice areas (letters D to T).

    Examples
    --------
    >>> letter, area = api526_orifice(1000.0)
    >>> letter, round(area, 1)
    ('K', 1185.8)
    >>> api526_orifice(1e6) is None
    True
    """
    for letter, area_in2 in API526_AREAS_IN2:
        area = area_in2 * MM2_PER_IN2
        if area >= required_area_mm2:
            return letter, area
    return None


@dataclass(frozen=True)
class NozzleFlow:
    """Isentropic nozzle flow found by direct integration."""

    mass_flux: float          #: kg/(m² s), largest along the isentrope
    throat_pressure: float    #: Pa (absolute), where the flux is largest (or the back pressure)
    choked: bool              #: the largest flux lies above the back pressure
    throat_dryness: float | None  #: dryness at the throat; None when superheated


#: Newton steps on T along an isentrope, and the temperature step (K) that ends them.
ISENTROPE_STEPS = 30
ISENTROPE_TOLERANCE = 1e-6


def isentrope_point(pressure, entropy, temperature_guess):
    """Density (kg/m³), enthalpy (J/kg) and dryness (None when superheated) on an isentrope.

    Superheated: Newton's method on T with :math:`\\partial s/\\partial T|_p = c_p/T`, each step
    an IF97 (p, T) state. Wet: the saturated ends at p and the lever rule, homogeneous
    equilibrium density :math:`v = v_f + x (v_g - v_f)`.

    Examples
    --------
    >>> rho, h, x = isentrope_point(5e5, 7.0e3, 450.0)
    >>> round(h / 1e3, 1), x
    (2827.4, None)
    """
    from ..properties.steam import SteamState

    vapour = SteamState.from_p_dryness(pressure, 1.0)
    if entropy <= vapour.entropy:
        liquid = SteamState.from_p_dryness(pressure, 0.0)
        x = (entropy - liquid.entropy) / (vapour.entropy - liquid.entropy)
        volume = 1.0 / liquid.density + x * (1.0 / vapour.density - 1.0 / liquid.density)
        return 1.0 / volume, liquid.enthalpy + x * (vapour.enthalpy - liquid.enthalpy), x
    lowest = vapour.temperature + 1e-3   # IF97's region 2 by (p, T) just off the saturation line
    temperature = max(temperature_guess, lowest)
    for _ in range(ISENTROPE_STEPS):
        state = SteamState.from_pT(pressure, temperature)
        step = (entropy - state.entropy) * temperature / state.cp
        if abs(step) < ISENTROPE_TOLERANCE:
            # |Δs| < 1e-6·cp/T: the density and enthalpy are those of the isentrope to ~1e-9.
            return state.density, state.enthalpy, None
        if temperature == lowest and step < 0.0:
            # The isentrope meets this pressure within 1 mK of saturation, where Newton cannot step: the point lies
            # between the saturated vapour and the state 1 mK above it, and is interpolated in entropy between them.
            share = (entropy - vapour.entropy) / (state.entropy - vapour.entropy)
            density = vapour.density + share * (state.density - vapour.density)
            return density, vapour.enthalpy + share * (state.enthalpy - vapour.enthalpy), None
        temperature = max(temperature + step, lowest)
    raise NotConvergedError(
        f"the isentrope point at {pressure / 1e5:.4g} bar(a) did not converge in {ISENTROPE_STEPS} Newton steps: "
        f"the last temperature step was {abs(step):.2g} K, the tolerance {ISENTROPE_TOLERANCE:g} K",
        field="relief isentrope (direct integration)", value=abs(step),
        fix="this relieving state is at the edge of the method: check the relief inputs, and size the device on "
            "the steam equation with the maker")


def direct_integration_flux(relieving_state, back_pressure, evaluations=20):
    """Mass flux of ideal isentropic nozzle flow from a stagnation state, on IF97.

    Parameters
    ----------
    relieving_state : SteamState
        Stagnation state at the relieving pressure.
    back_pressure : float
        Pa (absolute), the lowest pressure the nozzle can expand to.
    evaluations : int
        Golden-section evaluations of the flux along the isentrope, when the maximum is not
        found near the critical pressure ratio by parabolic interpolation.

    Returns
    -------
    NozzleFlow

    Notes
    -----
    With no heat, no work and isentropic expansion, :math:`-\\int_{p_0}^{p} v\\,dp = h_0 - h(p, s_0)`,
    so the mass flux of API 520 Part I, annex B, becomes

    .. math:: G(p) = \\rho(p, s_0) \\sqrt{2\\,(h_0 - h(p, s_0))}

    and the flow is choked at the pressure of the largest G when that pressure lies above
    the back pressure. Two-phase states on the isentrope take the homogeneous equilibrium
    density (IF97 region 4).

    References
    ----------
    API Standard 520 Part I, Sizing and Selection, 10th ed. (2020), annex B, direct
    integration of the isentropic nozzle equation (homogeneous equilibrium model).

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> flow = direct_integration_flux(SteamState.from_pT(10e5, 473.15), 1e5)
    >>> round(flow.mass_flux), flow.choked
    (1435, True)
    """
    p0, h0, s0, t0 = (relieving_state.pressure, relieving_state.enthalpy, relieving_state.entropy,
                      relieving_state.temperature)

    def flux(p):
        # Along the isentrope of steam T ∝ p^((κ-1)/κ), κ ≈ 1.3: a start within a few kelvin.
        rho, h, x = isentrope_point(p, s0, t0 * (p / p0) ** 0.23)
        return rho * math.sqrt(max(2.0 * (h0 - h), 0.0)), x

    low, high = max(back_pressure, 0.05 * p0), 0.999 * p0
    p_throat = _parabolic_max(flux, p0, low, high)
    if p_throat is None:
        p_throat = _golden_max(flux, low, high, evaluations)
    g_back, x_back = flux(low)
    g_max, x_throat = flux(p_throat)
    if g_back >= g_max or p_throat - low < 1e-3 * p0:
        return NozzleFlow(g_back, low, False, x_back)
    return NozzleFlow(g_max, p_throat, True, x_throat)


def _parabolic_max(flux, p0, low, high):
    """Pressure of the largest flux by two rounds of parabolic interpolation around the critical
    pressure ratio of steam (0.53-0.61 for κ from 1.4 to 1.0); None when the maximum is not
    bracketed there (then the caller searches the whole range)."""
    centre, spacing = 0.565 * p0, 0.05 * p0
    for _ in range(2):
        points = [centre - spacing, centre, centre + spacing]
        if points[0] <= low or points[2] >= high:
            return None
        g = [flux(p)[0] for p in points]
        curvature = g[0] - 2.0 * g[1] + g[2]
        if curvature >= 0.0 or not (g[1] >= g[0] or g[1] >= g[2]):
            return None
        vertex = centre + 0.5 * spacing * (g[0] - g[2]) / curvature
        if abs(vertex - centre) > 1.5 * spacing:
            return None
        centre, spacing = vertex, spacing / 5.0
    return centre


def _golden_max(flux, low, high, evaluations):
    """Pressure of the largest flux on [low, high] by golden-section search."""
    ratio = (math.sqrt(5.0) - 1.0) / 2.0
    a, b = low, high
    c, d = b - ratio * (b - a), a + ratio * (b - a)
    fc, fd = flux(c)[0], flux(d)[0]
    for _ in range(evaluations):
        if fc > fd:
            b, d, fd = d, c, fc
            c = b - ratio * (b - a)
            fc = flux(c)[0]
        else:
            a, c, fc = c, d, fd
            d = a + ratio * (b - a)
            fd = flux(d)[0]
    return 0.5 * (a + b)


def direct_integration_area(mass_flow_kg_h, flow, kd, kb=1.0, kc=1.0):
    """Required effective area, mm², from the direct-integration mass flux.

    .. math:: A = \\frac{W}{K_d K_b K_c\\, G}

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex B, equation (B.3).

    Examples
    --------
    >>> round(direct_integration_area(3600.0, NozzleFlow(1000.0, 0.0, True, None), 0.975), 1)
    1025.6
    """
    return mass_flow_kg_h / 3600.0 / (kd * kb * kc * flow.mass_flux) * 1e6


def steam_equation_area(mass_flow_kg_h, relieving_pressure, relieving_temperature, kd, kb=1.0, kc=1.0):
    """Required effective area, mm², by the API 520 Part I steam equation.

    Parameters
    ----------
    mass_flow_kg_h : float
        Relief load, kg/h.
    relieving_pressure : float
        Set pressure plus overpressure, absolute, Pa.
    relieving_temperature : float
        K (the superheat correction is 1 for saturated steam).
    kd, kb, kc : float
        Effective discharge, back-pressure and rupture-disk combination coefficients.

    Returns
    -------
    tuple
        ``(area mm², K_N, K_SH)``.

    Notes
    -----
    .. math:: A = \\frac{190.5\\, W}{P_1 K_d K_b K_c K_N K_{SH}}

    with W in kg/h, P1 in kPa(a) and A in mm²; :math:`K_N = 1` up to 10 339 kPa(a), else
    :math:`K_N = (0.02764 P_1 - 1000)/(0.03324 P_1 - 1061)`. K_SH from the standard's table
    of superheat correction factors (10th ed.), interpolated by ``fluids.safety_valve.API520_SH``.

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), 5.7, equations (32) and (34), table 7.

    Examples
    --------
    >>> area, kn, ksh = steam_equation_area(69615.0, 12236e3, 707.0389, 0.975)
    >>> round(area, 1), kn > 1.0, round(ksh, 3)
    (1285.2, True, 0.855)
    """
    from fluids.safety_valve import API520_SH

    p1_kpa = relieving_pressure / 1e3
    kn = 1.0 if p1_kpa <= 10339.0 else (0.02764 * p1_kpa - 1000.0) / (0.03324 * p1_kpa - 1061.0)
    try:
        ksh = float(API520_SH(relieving_temperature, relieving_pressure, "10E"))
    except ValueError as exc:
        raise InputError(f"the API 520 superheat correction is not defined here: {exc}",
                         field="relief.set_pressure", value=relieving_pressure) from None
    return 190.5 * mass_flow_kg_h / (p1_kpa * kd * kb * kc * kn * ksh), kn, ksh


def back_pressure_correction(valve_type, set_pressure, back_pressure, overpressure, atmospheric_pressure):
    """Kb for a relief valve in vapour service, and a note of where it came from.

    Parameters
    ----------
    valve_type : str
        ``conventional``, ``balanced-bellows`` or ``pilot``.
    set_pressure, back_pressure, atmospheric_pressure : float
        Pa (absolute).
    overpressure : float
        Fraction of the gauge set pressure.

    Returns
    -------
    tuple
        ``(Kb, note)``.

    Notes
    -----
    Conventional and pilot valves in critical flow: Kb = 1; the back pressure enters the
    direct integration as its lower limit (API 520 Part I, 5.6.2). Balanced bellows: the
    standard's figure of Kb against percent gauge back pressure, read at the 10, 16 or 21 %
    overpressure curve at or below the given overpressure, through ``fluids.safety_valve.API520_B``.

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), figure 31 (balanced bellows Kb).

    Examples
    --------
    >>> back_pressure_correction("balanced-bellows", 11e5, 4.3e5, 0.10, 1e5)[0] < 1.0
    True
    """
    if valve_type not in VALVE_TYPES:
        raise InputError(f"unknown relief valve type '{valve_type}'", field="relief.valve_type", value=valve_type,
                         fix=f"use one of {', '.join(VALVE_TYPES)}")
    if valve_type != "balanced-bellows":
        return 1.0, f"Kb = 1 ({valve_type} valve; the back pressure limits the direct integration)"
    from fluids.safety_valve import API520_B

    curve = 0.21 if overpressure >= 0.21 else 0.16 if overpressure >= 0.16 else 0.10
    gauge_fraction = (back_pressure - atmospheric_pressure) / (set_pressure - atmospheric_pressure)
    if gauge_fraction > 0.5:
        raise InputError(f"back pressure is {100 * gauge_fraction:.0f} % of the gauge set pressure, above the 50 % "
                         "that the balanced-bellows Kb curve covers", field="relief.back_pressure",
                         value=back_pressure, fix="use a pilot-operated valve or lower the back pressure")
    # fluids reads the curve with the standard atmosphere; give it the same gauge fraction.
    atm = 101325.0
    kb = float(API520_B(atm + (set_pressure - atmospheric_pressure),
                        atm + (back_pressure - atmospheric_pressure), curve))
    return kb, (f"Kb = {kb:.3f}, balanced bellows at {100 * gauge_fraction:.0f} % gauge back pressure "
                f"({int(round(100 * curve))} % overpressure curve, API 520 Part I figure 31)")


def reaction_force(mass_flow_kg_h, relieving_temperature, kappa, outlet_area_mm2, atmospheric_pressure):
    """Reaction force of an open discharge to atmosphere, N, and the exit static pressure.

    Parameters
    ----------
    mass_flow_kg_h : float
        kg/h through the valve.
    relieving_temperature : float
        K at the valve inlet.
    kappa : float
        Isentropic exponent of the steam at the inlet.
    outlet_area_mm2 : float
        Flow area of the discharge pipe at its exit, mm².
    atmospheric_pressure : float
        Pa.

    Returns
    -------
    tuple
        ``(F N, exit static pressure Pa gauge)``.

    Notes
    -----
    API 520 Part II equation (1), SI form:

    .. math:: F = 129.41\\, W \\sqrt{\\frac{k T}{(k + 1) M}} + 10^{-3} A_o P_2

    with W kg/s, T K, M kg/kmol, A_o mm² and P_2 kPa(g). P_2 is the static pressure of a
    choked exit, :math:`P_2 = \\frac{W}{A_o}\\sqrt{R T_e / (k M)}` with
    :math:`T_e = 2T/(k + 1)`, taken as atmospheric when that falls below it.

    References
    ----------
    API Standard 520 Part II, Installation, 7th ed. (2020): the reaction force of an open discharge (clause
    4.4.1.1, equation (1), from memory).

    Examples
    --------
    >>> force, p2 = reaction_force(10000.0, 473.15, 1.3, 8213.0, 101325.0)
    >>> round(force), round(p2)
    (1614, 27937)
    """
    w = mass_flow_kg_h / 3600.0
    momentum = 129.41 * w * math.sqrt(kappa * relieving_temperature / ((kappa + 1.0) * MOLAR_MASS_WATER))
    t_exit = 2.0 * relieving_temperature / (kappa + 1.0)
    p_exit = w / (outlet_area_mm2 * 1e-6) * math.sqrt(R_UNIVERSAL * t_exit / (kappa * MOLAR_MASS_WATER))
    p_exit_gauge = max(p_exit - atmospheric_pressure, 0.0)
    return momentum + 1e-3 * outlet_area_mm2 * p_exit_gauge / 1e3, p_exit_gauge
