"""Relief of a two-phase mixture or of liquid that flashes in the nozzle: the omega method and IF97.

Two ways to the mass flux through the relief nozzle, API 520 Part I annex C:

* the omega method, with ω from two states (the relieving state and the isentropic flash to 90 % of
  its pressure, or of the saturation pressure for subcooled liquid), both on IAPWS-IF97;
* direct integration of the isentropic expansion on IF97 with homogeneous equilibrium (annex B's
  method, as the steam relief of :mod:`steamcalc.equipment.relief` does), the liquid above its
  saturation pressure taken along its own isentrope.

Units: pressure Pa (absolute), specific volume m³/kg, density kg/m³, mass flux kg/(m² s), mass flow
kg/h, area mm². Sizing here is preliminary: the valve maker's certified two-phase capacity governs.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError, NotConvergedError
from .relief import NozzleFlow, _golden_max, api526_orifice, isentrope_point

#: Effective coefficient of discharge for preliminary sizing, API 520 Part I annex C: two-phase or
#: saturated liquid at the inlet, and subcooled liquid.
KD_TWO_PHASE = 0.85
KD_SUBCOOLED = 0.65
#: The second state of the two-point ω: 90 % of the inlet pressure (two-phase inlet) or of the
#: saturation pressure (subcooled liquid), API 520 Part I annex C, C.2.2.1 and C.2.3.1.
SECOND_POINT = 0.9

CERTIFIED_CAPACITY = ("Two-phase and flashing relief sizing here is preliminary: the valve maker's certified "
                      "two-phase capacity (not the area computed here) governs the selection, and the engineer of "
                      "record confirms it to the local pressure-equipment code.")


def omega_parameter(v0, v9):
    """The omega parameter from two specific volumes on the isentrope, API 520 Part I annex C.

    Parameters
    ----------
    v0 : float
        Specific volume at the relieving state, m³/kg (of the liquid, for subcooled liquid).
    v9 : float
        Specific volume after the isentropic flash to 90 % of the inlet pressure (two-phase inlet)
        or of the saturation pressure (subcooled liquid), m³/kg.

    Returns
    -------
    float

    Notes
    -----
    .. math:: \\omega = 9 \\left(\\frac{v_9}{v_0} - 1\\right)

    (for subcooled liquid :math:`\\omega_s = 9(\\rho_{l0}/\\rho_9 - 1)`, the same ratio).

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C, C.2.2.1 (two-phase) and C.2.3.1 (subcooled
    liquid); Leung, J. C. (1986), "A generalized correlation for one-component homogeneous
    equilibrium flashing choked flow", AIChE J. 32(10), 1743-1746.

    Examples
    --------
    >>> round(omega_parameter(0.01945, 0.02265), 4)
    1.4807
    """
    if not (v0 > 0.0 and v9 > 0.0):
        raise InputError("specific volumes must be above zero", field="omega", value=min(v0, v9))
    return 9.0 * (v9 / v0 - 1.0)


def critical_pressure_ratio(omega):
    """Critical pressure ratio of two-phase flow by the omega method (the implicit equation solved).

    Parameters
    ----------
    omega : float
        Omega parameter, above zero.

    Returns
    -------
    float
        :math:`\\eta_c = p_c / p_0`.

    Notes
    -----
    .. math:: \\eta_c^2 + (\\omega^2 - 2\\omega)(1 - \\eta_c)^2 + 2\\omega^2 \\ln\\eta_c
              + 2\\omega^2 (1 - \\eta_c) = 0

    solved by bisection (Brent) on (0, 1); the standard's explicit fit
    (:func:`critical_pressure_ratio_fit`) agrees within a few parts in ten thousand.

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C, C.2.2.1; Leung (1986), AIChE J. 32(10).

    Examples
    --------
    >>> round(critical_pressure_ratio(1.4807), 4)
    0.6562
    >>> round(critical_pressure_ratio(1.0), 4)   # isothermal ideal gas: exp(-1/2)
    0.6065
    """
    from scipy.optimize import brentq

    if not omega > 0.0:
        raise InputError(f"the omega parameter {omega:.4g} is not above zero: the mixture does not expand as it "
                         "loses pressure", field="omega", value=omega,
                         fix="check the two states of the two-point omega (the second must be lighter)")

    def residual(eta):
        return (eta * eta + (omega * omega - 2.0 * omega) * (1.0 - eta) ** 2 + 2.0 * omega * omega * math.log(eta)
                + 2.0 * omega * omega * (1.0 - eta))

    # The residual is negative near η = 0 (the logarithm) and has a root below 1; η = 1 is a trivial root.
    high = 1.0 - 1e-9
    while residual(high) <= 0.0 and high > 0.5:
        high = 1.0 - (1.0 - high) * 10.0
    return float(brentq(residual, 1e-12, high, xtol=1e-14, rtol=1e-12))


def critical_pressure_ratio_fit(omega):
    """The standard's explicit fit of the critical pressure ratio of the omega method.

    .. math:: \\eta_c = \\left[1 + (1.0446 - 0.0093431\\,\\omega^{0.5})\\,\\omega^{-0.56261}\\right]
              ^{(-0.70356 + 0.014685 \\ln\\omega)}

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C, C.2.2.1.

    Examples
    --------
    >>> round(critical_pressure_ratio_fit(1.4807), 4)
    0.6563
    """
    exponent = -0.70356 + 0.014685 * math.log(omega)
    return (1.0 + (1.0446 - 0.0093431 * math.sqrt(omega)) * omega ** -0.56261) ** exponent


@dataclass(frozen=True)
class OmegaFlow:
    """Nozzle flow by the omega method."""

    omega: float             #: ω (ω_s for subcooled liquid)
    region: str              #: "two-phase", "low subcooling" or "high subcooling"
    critical_ratio: float    #: η_c = p_c / p_0 (high subcooling: η_s, the flash at the throat)
    choked: bool             #: the back pressure is at or below the critical pressure
    mass_flux: float         #: kg/(m² s)
    throat_pressure: float   #: Pa (absolute): the critical pressure, or the back pressure


def two_phase_flux(omega, inlet_pressure, inlet_volume, back_pressure, critical_ratio=None):
    """Mass flux of a two-phase mixture at the relief nozzle by the omega method.

    Parameters
    ----------
    omega : float
        From :func:`omega_parameter`.
    inlet_pressure : float
        Relieving pressure, Pa (absolute).
    inlet_volume : float
        Specific volume of the mixture at the relieving state, m³/kg.
    back_pressure : float
        Pa (absolute).
    critical_ratio : float, optional
        η_c when read elsewhere (a figure); else solved by :func:`critical_pressure_ratio`.

    Returns
    -------
    OmegaFlow

    Notes
    -----
    Critical (p_2 ≤ η_c p_0):

    .. math:: G = \\eta_c \\sqrt{\\frac{p_0}{v_0\\,\\omega}}

    subcritical, with :math:`\\eta_a = p_2 / p_0`:

    .. math:: G = \\frac{\\sqrt{-2[\\omega \\ln\\eta_a + (\\omega - 1)(1 - \\eta_a)]}\\,\\sqrt{p_0/v_0}}
              {\\omega (1/\\eta_a - 1) + 1}

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C, C.2.2.1.

    Examples
    --------
    >>> flow = two_phase_flux(1.4807, 5.564e5, 0.01945, 2.045e5)
    >>> flow.choked, round(flow.mass_flux)
    (True, 2884)
    """
    eta_c = critical_pressure_ratio(omega) if critical_ratio is None else critical_ratio
    if back_pressure <= eta_c * inlet_pressure:
        return OmegaFlow(omega, "two-phase", eta_c, True,
                         eta_c * math.sqrt(inlet_pressure / (inlet_volume * omega)), eta_c * inlet_pressure)
    eta_a = back_pressure / inlet_pressure
    flux = (math.sqrt(-2.0 * (omega * math.log(eta_a) + (omega - 1.0) * (1.0 - eta_a)))
            * math.sqrt(inlet_pressure / inlet_volume) / (omega * (1.0 / eta_a - 1.0) + 1.0))
    return OmegaFlow(omega, "two-phase", eta_c, False, flux, back_pressure)


def subcooled_flux(omega_s, inlet_pressure, saturation_pressure, liquid_density, back_pressure):
    """Mass flux of subcooled liquid that flashes in the relief nozzle, by the omega method.

    Parameters
    ----------
    omega_s : float
        ω_s from :func:`omega_parameter` (liquid at the inlet, flash to 90 % of p_s).
    inlet_pressure : float
        Relieving pressure, Pa (absolute).
    saturation_pressure : float
        Saturation pressure at the relieving temperature, Pa (absolute); at most the inlet pressure.
    liquid_density : float
        kg/m³ at the relieving state.
    back_pressure : float
        Pa (absolute).

    Returns
    -------
    OmegaFlow

    Notes
    -----
    Transition ratio :math:`\\eta_{st} = 2\\omega_s / (1 + 2\\omega_s)`; :math:`\\eta_s = p_s/p_0`.

    High subcooling (:math:`\\eta_s < \\eta_{st}`): the liquid flashes at the throat, at p_s;
    :math:`G = \\sqrt{2\\rho_{l0}(p_0 - p)}` with p = p_s when p_2 ≤ p_s (critical), else p_2.

    Low subcooling: it flashes upstream of the throat;

    .. math:: \\eta_c = \\eta_s \\frac{2\\omega_s}{2\\omega_s - 1}
              \\left[1 - \\sqrt{1 - \\frac{1}{\\eta_s}\\frac{2\\omega_s - 1}{2\\omega_s}}\\right]

    .. math:: G = \\frac{\\sqrt{2(1 - \\eta_s) + 2[\\omega_s \\eta_s \\ln(\\eta_s/\\eta)
              - (\\omega_s - 1)(\\eta_s - \\eta)]}\\,\\sqrt{p_0 \\rho_{l0}}}{\\omega_s(\\eta_s/\\eta - 1) + 1}

    with η = η_c when p_2 ≤ η_c p_0 (critical), else η = p_2/p_0.

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C, C.2.3.1.

    Examples
    --------
    >>> flow = subcooled_flux(8.517, 20.733e5, 7.419e5, 511.3, 1.703e5)
    >>> flow.region, flow.choked, round(flow.mass_flux)
    ('high subcooling', True, 36898)
    """
    if saturation_pressure > inlet_pressure * (1.0 + 1e-9):
        raise InputError("the liquid's saturation pressure is above the relieving pressure: it is not subcooled",
                         field="relief saturation pressure", value=saturation_pressure,
                         fix="use the two-phase method (two_phase_flux) for liquid that boils at the inlet")
    if not omega_s > 0.0:
        raise InputError(f"the omega parameter {omega_s:.4g} is not above zero: the liquid does not expand as it "
                         "flashes", field="omega", value=omega_s,
                         fix="check the two states of the two-point omega (the second must be lighter)")
    eta_s = min(saturation_pressure / inlet_pressure, 1.0)
    eta_st = 2.0 * omega_s / (1.0 + 2.0 * omega_s)
    if eta_s < eta_st:
        choked = back_pressure <= saturation_pressure
        throat = saturation_pressure if choked else back_pressure
        return OmegaFlow(omega_s, "high subcooling", eta_s, choked,
                         math.sqrt(2.0 * liquid_density * (inlet_pressure - throat)), throat)
    if omega_s <= 0.5:
        # The fit of the low-subcooling critical ratio divides by 2ω_s − 1: near the critical point, outside it.
        raise InputError(f"ω_s = {omega_s:.4g} is at or below 0.5, outside the low-subcooling fit of the omega method",
                         field="omega", value=omega_s,
                         fix="size this relief by direct integration (isentropic_flux) with the valve maker")
    eta_c = eta_s * (2.0 * omega_s / (2.0 * omega_s - 1.0)) * (
        1.0 - math.sqrt(1.0 - (2.0 * omega_s - 1.0) / (2.0 * omega_s) / eta_s))
    choked = back_pressure <= eta_c * inlet_pressure
    eta = eta_c if choked else back_pressure / inlet_pressure
    numerator = 2.0 * (1.0 - eta_s) + 2.0 * (omega_s * eta_s * math.log(eta_s / eta) - (omega_s - 1.0) * (eta_s - eta))
    flux = math.sqrt(numerator) * math.sqrt(inlet_pressure * liquid_density) / (omega_s * (eta_s / eta - 1.0) + 1.0)
    return OmegaFlow(omega_s, "low subcooling", eta_c, choked, flux, eta * inlet_pressure)


def required_area(mass_flow_kg_h, mass_flux, kd, kb=1.0, kc=1.0, kv=1.0):
    """Required effective area, mm², from a two-phase mass flux.

    .. math:: A = \\frac{W}{K_d K_b K_c K_v\\, G}

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex C, C.2.2.2 and C.2.3.2 (A in mm² =
    277.8 W / (K_d K_b K_c K_v G) with W in kg/h).

    Examples
    --------
    >>> round(required_area(216560.0, 0.66 * (5.564e5 / (0.01945 * 1.4807)) ** 0.5, 0.85), -2)
    24400.0
    """
    return mass_flow_kg_h / 3600.0 / (kd * kb * kc * kv * mass_flux) * 1e6


def _point(pressure, entropy, temperature_guess):
    """Density, enthalpy and dryness on the isentrope: the liquid above its saturation pressure too."""
    from ..properties.steam import SteamState

    liquid = SteamState.from_p_dryness(pressure, 0.0)
    if entropy < liquid.entropy:
        state = SteamState.from_ps(pressure, entropy)
        return state.density, state.enthalpy, None
    return isentrope_point(pressure, entropy, temperature_guess)


def second_point(inlet):
    """The two-point method's second state on IF97 and the ω it gives.

    Parameters
    ----------
    inlet : SteamState
        Relieving state: wet (two-phase inlet), saturated or subcooled liquid.

    Returns
    -------
    tuple
        ``(ω, second-state pressure Pa, second-state specific volume m³/kg, region word)``, the
        region ``"two-phase"`` for a wet or saturated inlet, ``"subcooled"`` for a compressed liquid.

    Notes
    -----
    The flash to the second state is isentropic, as annex C asks (an isenthalpic flash is its
    allowed approximation); both states are IF97's.

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> omega, p9, v9, region = second_point(SteamState.from_p_dryness(5e5, 0.0))
    >>> region, round(omega, 2)
    ('two-phase', 26.95)
    """
    from ..properties.steam import saturation_pressure

    if inlet.phase in ("superheated vapour", "supercritical"):
        raise InputError("the relieving state is steam with no liquid: size it as steam (API 520 Part I, 5.7)",
                         field="relief state", value=inlet.phase)
    if inlet.dryness is not None:
        p9 = SECOND_POINT * inlet.pressure
        region = "two-phase"
    else:
        p9 = SECOND_POINT * saturation_pressure(inlet.temperature)
        region = "subcooled"
    rho9, _, _ = _point(p9, inlet.entropy, inlet.temperature)
    return omega_parameter(1.0 / inlet.density, 1.0 / rho9), p9, 1.0 / rho9, region


def omega_flow(inlet, back_pressure):
    """The omega method's nozzle flow from an IF97 relieving state (two-point ω on IF97).

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> flow = omega_flow(SteamState.from_p_dryness(5e5, 0.0), 1.01325e5)
    >>> flow.region, flow.choked, round(flow.mass_flux)
    ('two-phase', True, 3747)
    """
    from ..properties.steam import saturation_pressure

    omega, _, _, region = second_point(inlet)
    if region == "two-phase":
        return two_phase_flux(omega, inlet.pressure, 1.0 / inlet.density, back_pressure)
    return subcooled_flux(omega, inlet.pressure, saturation_pressure(inlet.temperature), inlet.density, back_pressure)


#: Points of the scan of the flux along the isentrope, and golden-section steps that refine its peak.
SCAN_POINTS = 24
REFINE_STEPS = 24


def isentropic_flux(inlet, back_pressure):
    """Mass flux of homogeneous equilibrium isentropic flow from a liquid or two-phase state, on IF97.

    Parameters
    ----------
    inlet : SteamState
        Relieving (stagnation) state: wet, saturated or subcooled liquid.
    back_pressure : float
        Pa (absolute).

    Returns
    -------
    NozzleFlow

    Notes
    -----
    .. math:: G(p) = \\rho(p, s_0)\\sqrt{2\\,(h_0 - h(p, s_0))}

    largest between the back pressure and the inlet pressure: a scan of
    :data:`SCAN_POINTS` pressures, then a golden-section search in the bracket of the peak.
    The liquid above its saturation pressure follows its own isentrope (IF97 region 1); below it
    the mixture is in equilibrium (no delayed flashing, which the short nozzle of a relief valve
    may show and which would raise the flux: the equilibrium flux is the smaller).

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annex B (direct integration, homogeneous
    equilibrium); IAPWS R7-97(2012).

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> flow = isentropic_flux(SteamState.from_p_dryness(5e5, 0.0), 1.01325e5)
    >>> flow.choked, round(flow.mass_flux)
    (True, 3746)
    """
    p0, h0, s0, t0 = inlet.pressure, inlet.enthalpy, inlet.entropy, inlet.temperature
    if not back_pressure < p0:
        raise InputError("the back pressure is not below the relieving pressure: nothing flows",
                         field="relief back pressure", value=back_pressure,
                         fix="check the back pressure and the set pressure")

    def flux(p):
        rho, h, x = _point(p, s0, t0)
        return rho * math.sqrt(max(2.0 * (h0 - h), 0.0)), x

    high = p0 * (1.0 - 1e-4)
    pressures = [back_pressure + (high - back_pressure) * i / (SCAN_POINTS - 1) for i in range(SCAN_POINTS)]
    fluxes = [flux(p)[0] for p in pressures]
    best = max(range(SCAN_POINTS), key=fluxes.__getitem__)
    if best == 0:
        g, x = flux(back_pressure)
        return NozzleFlow(g, back_pressure, False, x)
    # The steam relief's golden-section search refines the peak within the scan's bracket.
    throat = _golden_max(flux, pressures[best - 1], pressures[min(best + 1, SCAN_POINTS - 1)], REFINE_STEPS)
    g, x = flux(throat)
    if g < fluxes[0]:
        raise NotConvergedError("the largest flux along the isentrope was not found above the back pressure",
                                field="relief isentrope (direct integration)", value=g,
                                fix="check the relief inputs; size the device with the maker")
    return NozzleFlow(g, throat, True, x)


@dataclass(frozen=True)
class FlashingRelief:
    """A relief device for a two-phase or flashing-liquid load, sized by both methods."""

    omega: OmegaFlow
    direct: NozzleFlow
    kd: float
    area_omega: float            #: mm²
    area_direct: float           #: mm²
    area: float                  #: mm², the larger
    governing: str               #: "omega method" or "direct integration"
    orifice: tuple | None        #: (letter, effective area mm²), None beyond T
    second_pressure: float       #: Pa, the two-point method's second state
    second_volume: float         #: m³/kg


def size_flashing_relief(inlet, back_pressure, mass_flow_kg_h, kd=None, kb=1.0, kc=1.0):
    """Required area and API 526 orifice for liquid or a two-phase mixture, by both methods.

    Parameters
    ----------
    inlet : SteamState
        Relieving state (wet, saturated or subcooled liquid).
    back_pressure : float
        Pa (absolute).
    mass_flow_kg_h : float
        Relief load, kg/h.
    kd : float, optional
        Effective coefficient of discharge; by default :data:`KD_TWO_PHASE` (wet or saturated
        inlet) or :data:`KD_SUBCOOLED` (subcooled liquid).
    kb, kc : float
        Back-pressure and rupture-disk combination coefficients.

    Returns
    -------
    FlashingRelief

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), annexes B and C; API Standard 526, 7th ed. (2017).

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> r = size_flashing_relief(SteamState.from_p_dryness(5e5, 0.0), 1.01325e5, 10000.0)
    >>> r.governing, round(r.area), r.orifice[0]
    ('direct integration', 872, 'K')
    """
    omega, p9, v9, region = second_point(inlet)
    from ..properties.steam import saturation_pressure

    if region == "two-phase":
        flow = two_phase_flux(omega, inlet.pressure, 1.0 / inlet.density, back_pressure)
    else:
        flow = subcooled_flux(omega, inlet.pressure, saturation_pressure(inlet.temperature), inlet.density,
                              back_pressure)
    kd = kd if kd is not None else (KD_TWO_PHASE if region == "two-phase" else KD_SUBCOOLED)
    direct = isentropic_flux(inlet, back_pressure)
    area_omega = required_area(mass_flow_kg_h, flow.mass_flux, kd, kb, kc)
    area_direct = required_area(mass_flow_kg_h, direct.mass_flux, kd, kb, kc)
    governing = "omega method" if area_omega >= area_direct else "direct integration"
    area = max(area_omega, area_direct)
    return FlashingRelief(flow, direct, kd, area_omega, area_direct, area, governing, api526_orifice(area), p9, v9)
