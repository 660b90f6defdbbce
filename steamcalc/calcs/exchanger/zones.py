"""Exchanger zones: desuperheating, condensing and subcooling duties, LMTDs, UA and areas.

The steam gives up its superheat, its latent heat and the condensate's subcooling; the
process liquid takes each in counter-current order (it meets the subcooled condensate
first and the superheated steam last). Each zone has its own mean temperature
difference, and with a U its own area; the record lists them in the steam's order:
desuperheating, condensing, subcooling.

The desuperheating zone is on the wet-wall basis unless the case gives the zone its own
U: wherever the wall is below the steam's saturation temperature a condensate film wets
it, the superheat is given up through that film, and the driving force is
``T_sat - T_process`` at the condensing coefficient (common practice): that is the
desuperheating zone's default U, stated in the record. A given ``desuperheating_u``
means a dry wall: the steam cools as a gas, from its own temperature to saturation,
at that (much lower) coefficient. The subcooling zone's U is required (``subcooling_u``).
"""

from __future__ import annotations

import math

from ...errors import InputError
from ...properties.steam import SteamState
from ...units.amounts import Phrase

ARRANGEMENTS = {"counterflow": None, "1-2": 1, "2-4": 2}
#: The zones in the order the steam meets them (the record lists them so).
ZONE_NAMES = ("desuperheating", "condensing", "subcooling")
#: LMTD correction factor below which a shell-and-tube arrangement is poorly suited (common practice).
MIN_F_FACTOR = 0.75


def lmtd(hot_in, hot_out, cold_in, cold_out):
    """Log-mean temperature difference of a counterflow exchanger, K.

    Parameters
    ----------
    hot_in, hot_out, cold_in, cold_out : float
        Terminal temperatures, K.

    Notes
    -----
    :math:`\\Delta T_{lm} = (\\Delta T_1 - \\Delta T_2)/\\ln(\\Delta T_1/\\Delta T_2)` with
    :math:`\\Delta T_1 = T_{h,in} - T_{c,out}` and :math:`\\Delta T_2 = T_{h,out} - T_{c,in}`;
    the arithmetic mean when the two are equal.

    References
    ----------
    Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, eq. 11.15 (counterflow LMTD),
    through ``ht.LMTD``.

    Examples
    --------
    >>> round(lmtd(448.65, 448.65, 328.15, 358.15), 3)
    104.785
    """
    d1, d2 = hot_in - cold_out, hot_out - cold_in
    if d1 <= 0.0 or d2 <= 0.0:
        raise InputError("temperature cross: the hot side is not hotter than the cold side at both ends",
                         field="process_outlet_temperature")
    if abs(d1 - d2) < 1e-12 * max(d1, d2):
        return d1
    return (d1 - d2) / math.log(d1 / d2)


def f_factor(arrangement, hot_in, hot_out, cold_in, cold_out):
    """LMTD correction factor F of a shell-and-tube arrangement (1 for counterflow).

    Parameters
    ----------
    arrangement : str
        ``"counterflow"``, ``"1-2"`` or ``"2-4"`` (shell passes - tube passes).
    hot_in, hot_out, cold_in, cold_out : float
        Terminal temperatures, K.

    References
    ----------
    Fakheri, A. (2003), J. Heat Transfer 125(3), 527-530, through ``ht.F_LMTD_Fakheri``.

    Examples
    --------
    >>> round(f_factor("1-2", 200.0, 150.0, 100.0, 150.0), 4)
    0.8023
    """
    shells = ARRANGEMENTS[arrangement]
    if shells is None or abs(hot_in - hot_out) < 1e-9 or abs(cold_in - cold_out) < 1e-9:
        return 1.0
    from ht import F_LMTD_Fakheri
    f = F_LMTD_Fakheri(Thi=hot_in, Tho=hot_out, Tci=cold_in, Tco=cold_out, shells=shells)
    if not isinstance(f, float) or math.isnan(f) or f <= 0.0:
        raise InputError(f"no {arrangement} shell-and-tube exchanger reaches these temperatures (temperature "
                         "cross in the zone)", field="arrangement", fix="use counterflow, more shell passes, "
                         "or a closer approach")
    return float(f)


def service_u(u, fouling):
    """Service (fouled) U from a clean U and a fouling resistance, W/(m² K).

    :math:`1/U_s = 1/U + R_f`.

    Examples
    --------
    >>> round(service_u(1800.0, 1e-4), 2)
    1525.42
    >>> service_u(3561.7, 0.0) == 3561.7   # no fouling: the clean U itself, not 1/(1/U) a last bit apart
    True
    """
    if not fouling:
        return u
    return 1.0 / (1.0 / u + fouling)


def zone_table(inputs, steam_states, t_sat, flow, duty, steam_side, steam_flow, water):
    """The zones present, in the steam's order: (name, process heat W, hot in K, hot out K, cold in K,
    cold out K, wet_wall).

    Hot temperatures are the driving-force basis: on the wet-wall basis the desuperheating
    zone's hot side is held at T_sat.
    """
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature
    steam, condensate, saturated_liquid, saturated_vapour = steam_states
    q_super = steam_flow * max(0.0, steam.enthalpy - saturated_vapour.enthalpy)
    q_cond = steam_flow * (min(steam.enthalpy, saturated_vapour.enthalpy) - saturated_liquid.enthalpy)
    q_sub = steam_flow * (saturated_liquid.enthalpy - condensate.enthalpy)
    scale = duty / steam_side   # the heat loss is taken from each zone in proportion
    span = t_out - t_in

    def process_temperature(heat):
        if water is None:
            return t_in + span * heat / duty
        water_in, _ = water
        return SteamState.from_ph(water_in.pressure, water_in.enthalpy + heat / flow).temperature

    t_a = process_temperature(q_sub * scale)
    t_b = process_temperature((q_sub + q_cond) * scale)
    zones = []
    if q_super > 0.0:
        wet = inputs.desuperheating_u is None
        zones.append(("desuperheating", q_super * scale, t_sat if wet else steam.temperature, t_sat, t_b, t_out,
                      wet))
    zones.append(("condensing", q_cond * scale, t_sat, t_sat, t_a, t_b, True))
    if q_sub > 0.0:
        zones.append(("subcooling", q_sub * scale, t_sat, condensate.temperature, t_in, t_a, False))
    return zones


def zone_u(inputs, name):
    """Clean U of a zone, W/(m² K): its own when given, else the overall (condensing) U."""
    own = {"desuperheating": inputs.desuperheating_u, "subcooling": inputs.subcooling_u}.get(name)
    return own if own is not None else inputs.overall_u


def zone_sizing(inputs, zone, arrangement):
    """One zone's (LMTD K, F, UA W/K, clean U W/(m² K) or None, area m² or None), recording nothing.

    Parameters
    ----------
    inputs : steamcalc.calcs.exchanger.calculation.Inputs
        The case (its U's and fouling).
    zone : tuple
        A row of :func:`zone_table`.
    arrangement : str
        One of :data:`ARRANGEMENTS`.
    """
    name, q, hot_in, hot_out, cold_in, cold_out, _ = zone
    dt = lmtd(hot_in, hot_out, cold_in, cold_out)
    f = f_factor(arrangement, hot_in, hot_out, cold_in, cold_out)
    ua_zone = q / (f * dt)
    if inputs.overall_u is None:
        return dt, f, ua_zone, None, None
    u = zone_u(inputs, name)
    return dt, f, ua_zone, u, ua_zone / service_u(u, inputs.fouling_resistance or 0.0)


def add_zones(inputs, steam_states, t_sat, flow, duty, steam_side, steam_flow, water, arrangement, result):
    """Add each zone's duty, LMTD, UA and (with a U) area to the result; return (UA W/K, area m² or None).

    Notes
    -----
    :math:`UA_i = Q_i/(F_i\\,\\Delta T_{lm,i})`, :math:`A_i = UA_i/U_{s,i}` with
    :math:`1/U_{s,i} = 1/U_i + R_f`; :math:`A = \\sum_i A_i`.
    """
    zones = zone_table(inputs, steam_states, t_sat, flow, duty, steam_side, steam_flow, water)
    fouling = inputs.fouling_resistance or 0.0
    ua, area = 0.0, 0.0 if inputs.overall_u is not None else None
    for zone in zones:
        name, q, wet = zone[0], zone[1], zone[6]
        dt, f, ua_zone, u, zone_area = zone_sizing(inputs, zone, arrangement)
        ua += ua_zone
        basis = " (wet wall: driving force T_sat − T_process)" if name == "desuperheating" and wet else ""
        result.work(f"{name.capitalize()} zone{basis}", "UA_i = Q_i / (F·ΔT_lm,i)", "Q_i/(F*dT_lm)", ua_zone / 1e3,
                    "kW/K", Q_i=(q / 1e3, "kW"), F=(f, ""), dT_lm=(dt, "K"))
        result.add(f"{name}_duty", f"{name.capitalize()} zone duty", q / 1e3, "kW")
        result.add(f"{name}_lmtd", f"{name.capitalize()} zone LMTD", dt, "K")
        if f < MIN_F_FACTOR:   # a check only where it is not met
            result.check_limit(f"F factor, {name} zone", (f, ""), [(">=", (MIN_F_FACTOR, ""), "warn")], Phrase.of(
                f"F = {{f:.3f}} below {{limit:g}}: the {arrangement} arrangement is poorly suited (common practice)",
                f=(f, ""), limit=(MIN_F_FACTOR, "")), source="common practice")
        if area is not None:
            area += zone_area
            if name != "condensing":   # the condensing zone's U is the overall U, an input
                result.add(f"{name}_zone_u", f"{name.capitalize()} zone U (clean; {_u_basis(inputs, name, wet)})",
                           u / 1e3, "kW/(m**2*K)")
            # UA_i / U_s,i with 1/U_s,i = 1/U_i + R_f, written as one product.
            result.work(f"{name.capitalize()} zone area", "A_i = UA_i / U_s,i, 1/U_s,i = 1/U_i + R_f",
                        "UA_i*(1/U_i + R_f)", zone_area, "m**2", UA_i=(ua_zone / 1e3, "kW/K"),
                        U_i=(u / 1e3, "kW/(m**2*K)"), R_f=(fouling * 1e3, "m**2*K/kW"))
            result.add(f"{name}_area", f"{name.capitalize()} zone area", zone_area, "m**2")
    _zone_assumptions(inputs, zones, arrangement, result)
    return ua, area


def _u_basis(inputs, name, wet):
    """Where a zone's U comes from, in words."""
    if name == "desuperheating":
        return ("wet wall: the condensing U, common practice" if wet
                else "dry wall: the given desuperheating U")
    return "the given subcooling U"


def zones_area(inputs, steam_states, t_sat, flow, duty, steam_side, steam_flow, water, arrangement):
    """Sum of the zones' areas, m² (with a U), recording nothing: the area :func:`add_zones` finds."""
    zones = zone_table(inputs, steam_states, t_sat, flow, duty, steam_side, steam_flow, water)
    return sum(zone_sizing(inputs, zone, arrangement)[4] for zone in zones)


def _zone_assumptions(inputs, zones, arrangement, result):
    names = [z[0] for z in zones]
    if arrangement != "counterflow" and len(zones) == 1:
        result.assumptions.append("Condensing at constant temperature: F = 1 for any arrangement")
    if "desuperheating" in names:
        if inputs.desuperheating_u is None:
            result.assumptions.append(
                "Desuperheating zone on the wet-wall basis: the wall is below the steam's saturation temperature, "
                "so a condensate film wets it and the superheat is given up through that film; driving force "
                "T_sat − T_process, at the condensing U (common practice). For a dry-wall zone give its own U, e.g. "
                "desuperheating_u = \"0.1 kW/(m²·K)\"")
        else:
            result.assumptions.append(
                f"Desuperheating zone on the dry-wall basis at the given desuperheating U "
                f"{inputs.desuperheating_u / 1e3:.4g} kW/(m²·K): the steam cools as a gas from its own temperature "
                "to saturation (LMTD against the process); valid only where the wall stays above saturation")
            if inputs.overall_u is not None and inputs.desuperheating_u > inputs.overall_u:   # a check only if not met
                result.check_limit("Desuperheating zone U", (inputs.desuperheating_u / 1e3, "kW/(m**2*K)"),
                                   [("<=", (inputs.overall_u / 1e3, "kW/(m**2*K)"), "warn")],
                                   "the dry-wall desuperheating U is above the condensing U; a gas-cooling coefficient "
                                   "is normally far lower (common practice): check the figure", source="common practice")
    if "subcooling" in names and inputs.overall_u is not None:
        if inputs.subcooling_u is not None:   # required with a subcooling zone (Inputs refuses it missing)
            result.assumptions.append(f"Subcooling zone at the given subcooling U {inputs.subcooling_u / 1e3:.4g} "
                                      "kW/(m²·K)")
    if inputs.overall_u is not None and inputs.fouling_resistance:
        result.assumptions.append("Fouling resistance added to every zone's 1/U")
