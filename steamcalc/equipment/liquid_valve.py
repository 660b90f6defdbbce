"""Control-valve sizing for incompressible flow (liquids: spray water), IEC 60534-2-1.

Turbulent flow of a liquid through a control valve, with the choked (cavitating or
flashing) limit and an incipient-cavitation indication. Units here are the
standard's: volume flow m³/h, pressures kPa (absolute), densities kg/m³, Kv m³/h.
The piping geometry factor is Fp = 1 (valve the size of its line, no reducers):
a spray-water valve's body and pipe sizes are rarely known at this stage.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError
from .valve import valve_travel

#: IEC 60534-2-1 constant for Kv with Q in m³/h and Δp in kPa.
N1_KV = 0.1
#: ρ0, density of water at 15 °C, kg/m³ (IEC 60534-2-1 reference density).
WATER_DENSITY_15C = 999.1
#: Incipient-cavitation coefficient as a fraction of FL²: cavitation is taken to begin at
#: Δp = Kc·(p1 − pv) with Kc = 0.8·FL² when the maker gives no Kc or xFz (common practice,
#: from memory; the maker's incipient-cavitation coefficient governs).
INCIPIENT_FRACTION_OF_FL2 = 0.8
#: The indications, in the trade's words, mildest first.
CAVITATION_VERDICTS = ("none expected", "incipient cavitation", "choked, cavitating", "flashing")


def liquid_critical_pressure_ratio(vapour_pressure, critical_pressure):
    """FF = 0.96 − 0.28·√(pv/pc), the liquid critical pressure ratio factor.

    Parameters
    ----------
    vapour_pressure : float
        pv, the liquid's vapour pressure at the inlet temperature, kPa (absolute).
    critical_pressure : float
        pc, the liquid's thermodynamic critical pressure, kPa (absolute).

    Returns
    -------
    float
        FF, dimensionless.

    References
    ----------
    IEC 60534-2-1:2011, clause 6.2, equation (3) (numbering of the 2011 edition, harmonised with
    ANSI/ISA-75.01.01-2007; from memory).

    Examples
    --------
    >>> round(liquid_critical_pressure_ratio(70.1, 22120.0), 4)
    0.9442
    """
    if not 0.0 <= vapour_pressure < critical_pressure:
        raise InputError("the vapour pressure must lie between zero and the critical pressure",
                         field="vapour_pressure", value=vapour_pressure, limits=(0.0, critical_pressure, "kPa(a)"))
    return 0.96 - 0.28 * math.sqrt(vapour_pressure / critical_pressure)


def choked_pressure_differential(p1, vapour_pressure, fl, ff):
    """Δp_choked = FL²·(p1 − FF·pv): the differential at which liquid flow chokes, kPa.

    Parameters
    ----------
    p1 : float
        Upstream absolute pressure, kPa.
    vapour_pressure : float
        pv at the inlet temperature, kPa (absolute).
    fl : float
        Liquid pressure recovery factor of the valve without fittings (maker's data).
    ff : float
        Liquid critical pressure ratio factor.

    References
    ----------
    IEC 60534-2-1:2011, clause 6.2, equation (2) with FLP/Fp = FL (no fittings, Fp = 1).

    Examples
    --------
    >>> round(choked_pressure_differential(680.0, 70.1, 0.9, 0.944), 1)
    497.2
    """
    return fl ** 2 * (p1 - ff * vapour_pressure)


@dataclass(frozen=True)
class LiquidValveSizing:
    """Outcome of sizing a liquid valve at one flow; pressures in kPa, Kv in m³/h."""

    kv: float
    volume_flow: float
    pressure_differential: float
    choked_differential: float
    sizing_differential: float
    incipient_differential: float
    liquid_critical_pressure_ratio: float
    relative_density: float
    choked: bool
    cavitation: str


def cavitation_indication(p1, p2, vapour_pressure, fl, ff):
    """The cavitation/flashing indication of a liquid valve, in the trade's words.

    ``"flashing"`` when p2 < pv (the liquid leaves partly as vapour); ``"choked, cavitating"``
    when Δp ≥ Δp_choked and p2 ≥ pv; ``"incipient cavitation"`` when Δp ≥ Kc·(p1 − pv) with
    Kc = 0.8·FL²; ``"none expected"`` below that.

    Parameters
    ----------
    p1, p2 : float
        Upstream and downstream absolute pressure, kPa.
    vapour_pressure : float
        pv at the inlet temperature, kPa (absolute).
    fl, ff : float
        FL and FF.

    Notes
    -----
    The choked limit and the flashing test are IEC 60534-2-1's; the incipient-cavitation
    coefficient Kc = 0.8·FL² is common practice (from memory) for use when the maker gives no
    Kc or xFz (IEC 60534-8-4), whose value governs.

    References
    ----------
    IEC 60534-2-1:2011, clause 6.2, equation (2); flashing when p2 < pv.

    Examples
    --------
    >>> cavitation_indication(2000.0, 1500.0, 120.0, 0.9, 0.94)
    'none expected'
    >>> cavitation_indication(2600.0, 350.0, 120.0, 0.9, 0.94)
    'choked, cavitating'
    >>> cavitation_indication(500.0, 100.0, 120.0, 0.9, 0.94)
    'flashing'
    """
    dp = p1 - p2
    if p2 < vapour_pressure:
        return "flashing"
    if dp >= choked_pressure_differential(p1, vapour_pressure, fl, ff):
        return "choked, cavitating"
    if dp >= INCIPIENT_FRACTION_OF_FL2 * fl ** 2 * (p1 - vapour_pressure):
        return "incipient cavitation"
    return "none expected"


def size_liquid_valve(mass_flow, p1, p2, density1, vapour_pressure, critical_pressure, fl):
    """Required Kv of a valve passing a liquid (turbulent, incompressible flow), IEC 60534-2-1.

    Parameters
    ----------
    mass_flow : float
        W, kg/h.
    p1, p2 : float
        Upstream and downstream absolute pressure, kPa.
    density1 : float
        ρ1, the liquid's density at the inlet, kg/m³ (IAPWS-IF97 for water).
    vapour_pressure : float
        pv at the inlet temperature, kPa (absolute).
    critical_pressure : float
        pc, kPa (absolute); 22 064 kPa for water.
    fl : float
        FL, liquid pressure recovery factor of the valve without fittings, 0 < FL ≤ 1.

    Returns
    -------
    LiquidValveSizing

    Notes
    -----
    .. math:: K_v = \\frac{Q}{N_1 F_p}\\sqrt{\\frac{\\rho_1/\\rho_0}{\\Delta p_{siz}}}, \\quad
              \\Delta p_{siz} = \\min(\\Delta p,\\ F_L^2 (p_1 - F_F p_v)), \\quad
              F_F = 0.96 - 0.28\\sqrt{p_v/p_c}

    with Q = W/ρ1 (m³/h), N1 = 0.1 (Δp in kPa), ρ0 = 999.1 kg/m³ (water at 15 °C) and Fp = 1.
    Laminar flow (the Reynolds number factor FR) is not considered: spray-water valves run
    turbulent except at very small openings.

    References
    ----------
    IEC 60534-2-1:2011, Industrial-process control valves — Part 2-1: Flow capacity — Sizing
    equations for fluid flow under installed conditions; clause 6.2, incompressible fluids:
    equation (1) (Kv), (2) (choked differential), (3) (FF); Table 1 (N1). Equation numbers of
    the 2011 edition, from memory.

    Examples
    --------
    >>> s = size_liquid_valve(300.0, 2600.0, 700.0, 955.0, 120.8, 22064.0, 0.9)
    >>> round(s.kv, 4), s.choked, s.cavitation
    (0.0705, False, 'incipient cavitation')
    """
    if not 0.0 < fl <= 1.0:
        raise InputError("FL must lie above 0 and at most 1", field="fl", value=fl, limits=(0.0, 1.0, ""),
                         fix="take FL from the valve maker's data (globe valves 0.8-0.95)")
    if not p2 < p1:
        raise InputError("the liquid valve's outlet pressure must be below its inlet pressure", field="p2",
                         value=p2, limits=(0.0, p1, "kPa(a)"))
    if not mass_flow > 0.0:
        raise InputError("the liquid flow must be above zero", field="mass_flow", value=mass_flow)
    ff = liquid_critical_pressure_ratio(vapour_pressure, critical_pressure)
    dp = p1 - p2
    dp_choked = choked_pressure_differential(p1, vapour_pressure, fl, ff)
    dp_sizing = min(dp, dp_choked)
    volume_flow = mass_flow / density1
    relative_density = density1 / WATER_DENSITY_15C
    kv = volume_flow / N1_KV * math.sqrt(relative_density / dp_sizing)
    return LiquidValveSizing(
        kv=kv, volume_flow=volume_flow, pressure_differential=dp, choked_differential=dp_choked,
        sizing_differential=dp_sizing,
        incipient_differential=INCIPIENT_FRACTION_OF_FL2 * fl ** 2 * (p1 - vapour_pressure),
        liquid_critical_pressure_ratio=ff, relative_density=relative_density, choked=dp >= dp_choked,
        cavitation=cavitation_indication(p1, p2, vapour_pressure, fl, ff))


def relative_kv_at_travel(travel, characteristic, rangeability):
    """Φ = Kv/Kvs of an inherent characteristic at a relative travel h (0 to 1).

    Parameters
    ----------
    travel : float
        h, relative travel.
    characteristic : str
        ``"linear"`` (Φ = h) or ``"equal-percentage"`` (Φ = R^(h − 1)).
    rangeability : float
        R, inherent rangeability of an equal-percentage trim.

    References
    ----------
    IEC 60534-2-4:2009, inherent flow characteristics (ideal forms); the inverse of
    :func:`steamcalc.equipment.valve.valve_travel`.

    Examples
    --------
    >>> round(relative_kv_at_travel(0.5, "equal-percentage", 50.0), 4)
    0.1414
    >>> round(valve_travel(0.1414214, 1.0, "equal-percentage", 50.0), 4)
    0.5
    """
    if characteristic == "linear":
        return travel
    return rangeability ** (travel - 1.0)


def usable_turndown(characteristic, rangeability, travel_limits):
    """Largest flow-coefficient ratio a valve controls between its travel limits.

    Parameters
    ----------
    characteristic : str
        ``"linear"`` or ``"equal-percentage"``.
    rangeability : float
        R of an equal-percentage trim.
    travel_limits : tuple of float
        (lowest, highest) usable relative travel, e.g. (0.10, 0.90) (common practice).

    Returns
    -------
    float
        Φ(h_high) / Φ(h_low).

    Examples
    --------
    >>> round(usable_turndown("equal-percentage", 50.0, (0.1, 0.9)), 1)
    22.9
    >>> round(usable_turndown("linear", 50.0, (0.1, 0.9)), 1)
    9.0
    """
    low, high = travel_limits
    return relative_kv_at_travel(high, characteristic, rangeability) / relative_kv_at_travel(
        low, characteristic, rangeability)


__all__ = ["size_liquid_valve", "liquid_critical_pressure_ratio", "choked_pressure_differential",
           "cavitation_indication", "relative_kv_at_travel", "usable_turndown", "valve_travel", "LiquidValveSizing",
           "CAVITATION_VERDICTS", "N1_KV", "WATER_DENSITY_15C"]
