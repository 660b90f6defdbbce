"""Control-valve sizing for incompressible flow (liquids: spray water), IEC 60534-2-1.

Turbulent flow of a liquid through a control valve, with the choked (cavitating or
flashing) limit and an incipient-cavitation indication. Units here are the
standard's: volume flow m³/h, pressures kPa (absolute), densities kg/m³, Kv m³/h,
diameters mm. Given the valve size and the pipe sizes either side, the piping geometry
factor Fp and the combined factor FLP of the valve with its inlet reducer enter the sizing
(IEC 60534-2-1 clause 7), with the fittings' loss coefficients of the steam valve
(:func:`steamcalc.equipment.valve.piping_factors`); without them Fp = 1 and FLP = FL.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..errors import InputError, NotConvergedError
from .valve import piping_factors, valve_travel

#: IEC 60534-2-1 constant for Kv with Q in m³/h and Δp in kPa.
N1_KV = 0.1
#: ρ0, density of water at 15 °C, kg/m³ (IEC 60534-2-1 reference density).
WATER_DENSITY_15C = 999.1
#: Incipient-cavitation coefficient as a fraction of FL²: cavitation is taken to begin at
#: Δp = Kc·(p1 − pv) with Kc = 0.8·FL² when the maker gives no Kc or xFz (common practice;
#: the maker's incipient-cavitation coefficient governs).
INCIPIENT_FRACTION_OF_FL2 = 0.8
#: The indications, in the trade's words, mildest first.
CAVITATION_VERDICTS = ("none expected", "incipient cavitation", "choked, cavitating", "flashing")
#: The Kv–Fp iteration with fittings: relative change in Kv at which it has converged, and its steps.
#: The fixed point contracts by c·Kv0² per step (c = ΣK/(N2·d⁴)), i.e. by 1 − Fp² at the answer: 200
#: steps reach 1e-10 down to Fp ≈ 0.33, far below any valve worth installing between its pipes.
FITTINGS_TOLERANCE = 1e-10
FITTINGS_STEPS = 200
#: xT passed to :func:`steamcalc.equipment.valve.piping_factors`, whose Fp does not depend on it (the
#: xTP it also returns is a gas factor, unused for liquids).
_XT_UNUSED = 0.7


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
    IEC 60534-2-1:2011 / ANSI/ISA-75.01.01-2007, clause 6.2, as in
    ``fluids.control_valve.FF_critical_pressure_ratio_l``, whose example from the standard gives
    0.9442 for the figures below; the equation number not confirmed against the standard's text.

    Examples
    --------
    >>> round(liquid_critical_pressure_ratio(70.1, 22120.0), 4)
    0.9442
    """
    if not 0.0 <= vapour_pressure < critical_pressure:
        raise InputError("the vapour pressure must lie between zero and the critical pressure",
                         field="vapour_pressure", value=vapour_pressure, limits=(0.0, critical_pressure, "kPa(a)"))
    return 0.96 - 0.28 * math.sqrt(vapour_pressure / critical_pressure)


def choked_pressure_differential(p1, vapour_pressure, fl, ff, piping_factor=1.0):
    """Δp_choked = (FLP/Fp)²·(p1 − FF·pv): the differential at which liquid flow chokes, kPa.

    Parameters
    ----------
    p1 : float
        Upstream absolute pressure, kPa.
    vapour_pressure : float
        pv at the inlet temperature, kPa (absolute).
    fl : float
        FL, the liquid pressure recovery factor of the valve (maker's data); with fittings, FLP,
        that of the valve with its inlet reducer (:func:`liquid_piping_factors`).
    ff : float
        Liquid critical pressure ratio factor.
    piping_factor : float
        Fp, the piping geometry factor; 1 without fittings (then FLP/Fp = FL).

    References
    ----------
    IEC 60534-2-1:2011, clause 6.2: choked flow when Δp ≥ (FLP/Fp)²·(p1 − FF·pv), i.e. the choked-flow
    sizing equation with fittings, Kv = Q/(N1·FLP)·√((ρ1/ρ0)/(p1 − FF·pv)), takes over.

    Examples
    --------
    >>> round(choked_pressure_differential(680.0, 70.1, 0.9, 0.944), 1)
    497.2
    >>> round(choked_pressure_differential(680.0, 70.1, 0.803, 0.944, 0.930), 1)   # with reducers
    457.6
    """
    return (fl / piping_factor) ** 2 * (p1 - ff * vapour_pressure)


def incipient_differential(p1, vapour_pressure, fl, piping_factor=1.0):
    """Δp at which cavitation starts, Kc·(p1 − pv) with Kc = 0.8·(FLP/Fp)², kPa.

    Parameters
    ----------
    p1, vapour_pressure : float
        Upstream absolute pressure and pv at the inlet temperature, kPa.
    fl : float
        FL, or FLP with fittings.
    piping_factor : float
        Fp; 1 without fittings.

    Notes
    -----
    Kc = 0.8·FL² is common practice when the maker gives no Kc or xFz (IEC 60534-8-4),
    whose value governs; the form Δp = K·(p1 − pv) is the makers' (Fisher's reference manuals: Kc
    for the onset of cavitation damage, Ki for incipient cavitation). With fittings FL² is taken as
    (FLP/Fp)², as in the choked differential (common practice), so the incipient differential stays
    below the choked one.

    Examples
    --------
    >>> round(incipient_differential(2600.0, 120.8, 0.9), 1)
    1606.5
    """
    return INCIPIENT_FRACTION_OF_FL2 * (fl / piping_factor) ** 2 * (p1 - vapour_pressure)


def liquid_piping_factors(kv, valve_d, inlet_d, outlet_d, fl):
    """Fp and FLP of a liquid valve of a given Kv between reducers.

    Parameters
    ----------
    kv : float
        The valve's Kv at the condition considered, m³/h.
    valve_d : float
        Valve size d, mm.
    inlet_d, outlet_d : float or None
        Inside diameters D1, D2 of the pipes upstream and downstream, mm (None: no fitting on that side).
    fl : float
        FL of the valve without fittings.

    Returns
    -------
    tuple of float
        ``(Fp, FLP)``; NaN where the reducer equations give no value (the caller refuses it by name).

    Notes
    -----
    .. math:: F_p = \\left(1 + \\frac{\\Sigma\\zeta}{N_2}\\left(\\frac{K_v}{d^2}\\right)^2\\right)^{-1/2},\\quad
              F_{LP} = F_L\\left(1 + \\frac{F_L^2\\,\\Sigma\\zeta_1}{N_2}\\left(\\frac{K_v}{d^2}\\right)^2\\right)^{-1/2}

    with Σζ = ζ1 + ζ2 + ζB1 − ζB2, Σζ1 = ζ1 + ζB1 the inlet reducer's coefficients and N2 = 1.60e-3 (d in
    mm). Fp comes from :func:`steamcalc.equipment.valve.piping_factors` with all fittings; since the Fp of
    the inlet fittings alone, Fp,1, satisfies Σζ1·(Kv/d²)²/N2 = 1/Fp,1² − 1, FLP = FL/√(1 + FL²·(1/Fp,1² − 1)),
    so both rest on the one set of loss coefficients.

    References
    ----------
    IEC 60534-2-1:2011, clause 7 (fittings): the piping geometry factor Fp, and FLP, the liquid pressure
    recovery factor of a valve with attached fittings.

    Examples
    --------
    >>> fp, flp = liquid_piping_factors(177.88, 80.0, 100.0, 90.0, 0.9)
    >>> round(fp, 4), round(flp, 4)
    (0.93, 0.803)
    >>> liquid_piping_factors(40.0, 80.0, 80.0, 80.0, 0.9)
    (1.0, 0.9)
    """
    fp, _ = piping_factors(kv, valve_d, inlet_d, outlet_d, _XT_UNUSED)
    fp_inlet, _ = piping_factors(kv, valve_d, inlet_d, None, _XT_UNUSED)
    if not (math.isfinite(fp) and math.isfinite(fp_inlet)):
        return math.nan, math.nan
    return fp, fl / math.sqrt(1.0 + fl ** 2 * (fp_inlet ** -2 - 1.0))


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
    piping_factor: float = 1.0
    combined_fl: float | None = None   # FLP; FL without fittings


def cavitation_indication(p1, p2, vapour_pressure, fl, ff, piping_factor=1.0):
    """The cavitation/flashing indication of a liquid valve, in the trade's words.

    ``"flashing"`` when p2 < pv (the liquid leaves partly as vapour); ``"choked, cavitating"``
    when Δp ≥ Δp_choked and p2 ≥ pv; ``"incipient cavitation"`` when Δp ≥ Kc·(p1 − pv) with
    Kc = 0.8·(FLP/Fp)²; ``"none expected"`` below that.

    Parameters
    ----------
    p1, p2 : float
        Upstream and downstream absolute pressure, kPa.
    vapour_pressure : float
        pv at the inlet temperature, kPa (absolute).
    fl, ff : float
        FL (FLP with fittings) and FF.
    piping_factor : float
        Fp; 1 without fittings.

    Notes
    -----
    The choked limit and the flashing test are IEC 60534-2-1's; the incipient-cavitation
    coefficient (:func:`incipient_differential`) is common practice for use when the
    maker gives no Kc or xFz (IEC 60534-8-4), whose value governs.

    References
    ----------
    IEC 60534-2-1:2011, clause 6.2, the choked differential (with fittings, clause 7); flashing when p2 < pv.

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
    if dp >= choked_pressure_differential(p1, vapour_pressure, fl, ff, piping_factor):
        return "choked, cavitating"
    if dp >= incipient_differential(p1, vapour_pressure, fl, piping_factor):
        return "incipient cavitation"
    return "none expected"


def size_liquid_valve(mass_flow, p1, p2, density1, vapour_pressure, critical_pressure, fl, valve_d=None, inlet_d=None,
                      outlet_d=None):
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
    valve_d, inlet_d, outlet_d : float, optional
        Valve size d and the inside diameters D1, D2 of the pipes either side, mm. With the valve size
        and at least one pipe, Fp and FLP enter the sizing; otherwise Fp = 1 and FLP = FL.

    Returns
    -------
    LiquidValveSizing

    Notes
    -----
    .. math:: K_v = \\frac{Q}{N_1 F_p}\\sqrt{\\frac{\\rho_1/\\rho_0}{\\Delta p_{siz}}}, \\quad
              \\Delta p_{siz} = \\min\\left(\\Delta p,\\ \\left(\\frac{F_{LP}}{F_p}\\right)^2 (p_1 - F_F p_v)\\right), \\quad
              F_F = 0.96 - 0.28\\sqrt{p_v/p_c}

    with Q = W/ρ1 (m³/h), N1 = 0.1 (Δp in kPa), ρ0 = 999.1 kg/m³ (water at 15 °C). Choked, this is
    the standard's Kv = Q/(N1·FLP)·√((ρ1/ρ0)/(p1 − FF·pv)). With fittings, Fp and FLP depend on
    the Kv they size (:func:`liquid_piping_factors`): Kv, Fp and FLP are solved together by fixed-point
    iteration from the Kv without fittings, to a relative change of 1e-10 (:data:`FITTINGS_TOLERANCE`)
    within 200 steps, or refused. Laminar flow (the Reynolds number factor FR) is not considered:
    spray-water valves run turbulent except at very small openings.

    References
    ----------
    IEC 60534-2-1:2011, Industrial-process control valves — Part 2-1: Flow capacity — Sizing
    equations for fluid flow under installed conditions; clause 6.2, incompressible fluids:
    equation (1) (Kv), (2) (choked differential), (3) (FF), and their forms with fittings; clause 7,
    fittings (Fp, FLP); Table 1 (N1, N2). Equation numbers not confirmed against the standard's
    text (``fluids.control_valve``, which follows it, numbers the choked Kv equation 3).

    Examples
    --------
    >>> s = size_liquid_valve(300.0, 2600.0, 700.0, 955.0, 120.8, 22064.0, 0.9)
    >>> round(s.kv, 4), s.choked, s.cavitation
    (0.0705, False, 'incipient cavitation')
    >>> s = size_liquid_valve(0.1 * 3600 * 965.4, 680.0, 220.0, 965.4, 70.1, 22120.0, 0.9, 80.0, 100.0, 90.0)
    >>> round(s.kv, 2), round(s.piping_factor, 4), round(s.combined_fl, 4), s.choked
    (177.88, 0.93, 0.803, True)
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
    volume_flow = mass_flow / density1
    relative_density = density1 / WATER_DENSITY_15C

    def sized(fp, flp):
        choked_dp = choked_pressure_differential(p1, vapour_pressure, flp, ff, fp)
        return volume_flow / (N1_KV * fp) * math.sqrt(relative_density / min(dp, choked_dp)), choked_dp

    fp, flp = 1.0, fl
    kv, dp_choked = sized(fp, flp)
    if valve_d is not None and (inlet_d is not None or outlet_d is not None):
        kv, fp, flp, dp_choked = _with_fittings(kv, sized, valve_d, inlet_d, outlet_d, fl)
    return LiquidValveSizing(
        kv=kv, volume_flow=volume_flow, pressure_differential=dp, choked_differential=dp_choked,
        sizing_differential=min(dp, dp_choked),
        incipient_differential=incipient_differential(p1, vapour_pressure, flp, fp),
        liquid_critical_pressure_ratio=ff, relative_density=relative_density, choked=dp >= dp_choked,
        cavitation=cavitation_indication(p1, p2, vapour_pressure, flp, ff, fp), piping_factor=fp, combined_fl=flp)


def _with_fittings(kv, sized, valve_d, inlet_d, outlet_d, fl):
    """Kv, Fp, FLP and Δp_choked solved together from the Kv without fittings (fixed point)."""
    for _ in range(FITTINGS_STEPS):
        fp, flp = liquid_piping_factors(kv, valve_d, inlet_d, outlet_d, fl)
        if not (math.isfinite(fp) and math.isfinite(flp)):
            break
        new_kv, dp_choked = sized(fp, flp)
        change = abs(new_kv - kv) / new_kv
        kv = new_kv
        if change <= FITTINGS_TOLERANCE:
            # Fp and FLP at the Kv returned, so the record's step reproduces it.
            fp, flp = liquid_piping_factors(kv, valve_d, inlet_d, outlet_d, fl)
            kv, dp_choked = sized(fp, flp)
            return kv, fp, flp, dp_choked
    else:
        raise NotConvergedError(
            f"Kv with the valve's reducers did not settle to a relative change of {FITTINGS_TOLERANCE:g} in "
            f"{FITTINGS_STEPS} steps (last change {change:.2g}): the valve size passes this flow only with a piping "
            f"geometry factor far below 1", field="valve_d", value=valve_d,
            fix="give a larger valve size, closer to the pipe sizes either side")
    # 1 + Σζ/N2·(Kv/d²)² fell to zero or below, or Kv ran away: the valve size cannot pass the flow.
    raise InputError("the piping geometry factor Fp has no value at this flow: the valve size cannot pass it "
                     "between these pipes (the Kv the flow needs is beyond what the IEC 60534-2-1 reducer "
                     "equations hold for this size)", field="valve_d", value=valve_d,
                     fix="give a larger valve size, no larger than the pipes either side")


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
           "incipient_differential", "liquid_piping_factors", "cavitation_indication", "relative_kv_at_travel", "usable_turndown", "valve_travel", "LiquidValveSizing",
           "CAVITATION_VERDICTS", "N1_KV", "WATER_DENSITY_15C", "FITTINGS_TOLERANCE", "FITTINGS_STEPS"]
