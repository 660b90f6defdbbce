"""Exchanger turndown and stall: the steam-side pressure a fixed exchanger needs at part load.

At part load, with a fixed area and U, the steam-side pressure the exchanger needs falls.
Condensate drains from the steam space through the trap only while the steam-side pressure,
plus the static head of the condensate standing between the heater outlet and the trap, is
at least the back pressure plus the trap's minimum working differential. Below the load
where it is not, condensate backs up into the exchanger: stall.

A clean exchanger has the highest U, needs the least steam pressure at a given load, and so
stalls first: the stall load is found on the clean U, with the fouled figure beside it.
"""

from __future__ import annotations

import math

from ...errors import InputError, OutOfRangeError
from ...properties.steam import CRITICAL_TEMPERATURE, SteamState, saturation_pressure, saturation_temperature
from ...units.amounts import Phrase
from .zones import service_u

#: Standard acceleration of gravity, m/s² (3rd CGPM, 1901; ISO 80000-3).
STANDARD_GRAVITY = 9.80665
#: Part loads evaluated for the turndown table and chart.
LOADS = tuple(round(0.1 * i, 1) for i in range(1, 11))
#: Static head to the trap above which the figure is questioned, m (common practice: a trap sits well
#: under this below a heater's condensate outlet; more is possible but worth a second look).
MAX_USUAL_STATIC_HEAD = 5.0
#: Standard gravity as a step's operand.
GRAVITY = (STANDARD_GRAVITY, "m/s**2")
#: Lowest pressure with a saturation temperature (the triple point), Pa (IAPWS R7-97(2012)).
TRIPLE_POINT_PRESSURE = 611.657

STALL_REMEDIES = (
    "Usual remedies for stall, in general terms: drain the condensate by gravity to a vented receiver and pump "
    "it (a pump-trap or pressure-powered pump); fit a vacuum breaker so that the steam space can drain when its "
    "pressure falls below atmospheric; lower the condensate back pressure (line lift, return-main pressure); "
    "give the trap more static head below the heater outlet; avoid oversized area; or control the process "
    "temperature on the condensate side (flooded control).",
)


def required_saturation_temperature(load_duty, ua, process_in, process_out):
    """Steam saturation temperature a condensing exchanger needs to transfer a duty, K.

    Parameters
    ----------
    load_duty : float
        Duty at the load, W.
    ua : float
        U times area, W/K (fixed in turndown).
    process_in, process_out : float
        Process temperatures, K (held in turndown).

    Notes
    -----
    With an isothermal hot side, :math:`Q = UA\\,(T_o - T_i)/\\ln((T_s - T_i)/(T_s - T_o))`,
    so with :math:`k = \\exp(UA (T_o - T_i)/Q)`: :math:`T_s = (k T_o - T_i)/(k - 1)`.

    References
    ----------
    The LMTD equation for a condensing hot side rearranged (any heat-transfer text).

    Examples
    --------
    >>> round(required_saturation_temperature(419.0e3, 4680.0, 328.15, 358.15) - 273.15, 2)
    160.37
    """
    exponent = ua * (process_out - process_in) / load_duty
    if exponent > 700.0:
        return process_out
    k = math.exp(exponent)
    return (k * process_out - process_in) / (k - 1.0)


def stall_pressure(back_pressure, trap_min_differential=0.0, static_head=0.0, condensate_density=0.0):
    """Steam-side pressure below which condensate no longer drains through the trap, Pa (absolute).

    Parameters
    ----------
    back_pressure : float
        Pressure at the trap outlet, Pa (absolute).
    trap_min_differential : float
        The trap's minimum working differential (inlet minus outlet), Pa.
    static_head : float
        Height of condensate between the heater outlet and the trap inlet, m (trap below).
    condensate_density : float
        Density of that condensate, kg/m³.

    Notes
    -----
    Drainage needs :math:`p_s + \\rho g H \\ge p_{back} + \\Delta p_{trap}`, so
    :math:`p_{stall} = p_{back} + \\Delta p_{trap} - \\rho g H`, with g = 9.80665 m/s².

    References
    ----------
    Hydrostatic pressure :math:`\\rho g H` (any fluid-mechanics text); the drainage balance is
    common practice in steam-trap selection.

    Examples
    --------
    >>> round(stall_pressure(1.8e5, 0.1e5, 1.0, 900.0))
    181174
    """
    return back_pressure + trap_min_differential - condensate_density * STANDARD_GRAVITY * static_head


def stall_load(design_duty, ua, process_in, process_out, drain_pressure):
    """Load fraction below which the steam-side pressure falls under the drainage pressure.

    Parameters
    ----------
    design_duty : float
        Design duty, W.
    ua : float
        U times area, W/K.
    process_in, process_out : float
        Process temperatures, K (held in turndown).
    drain_pressure : float
        Steam-side pressure below which condensate does not drain, Pa (absolute): the back
        pressure, or :func:`stall_pressure` with the trap's differential and static head.

    Returns 0 when that pressure's saturation temperature is at or below the process outlet
    (the needed pressure never falls that low: no stall).

    Notes
    -----
    At the stall point :math:`T_s = T_{sat}(p_{stall})`:
    :math:`Q_{stall} = UA (T_o - T_i)/\\ln((T_b - T_i)/(T_b - T_o))`; load = Q_stall/Q_design.

    Examples
    --------
    >>> round(stall_load(419.0e3, 4680.0, 328.15, 358.15, 1.8e5), 3)
    0.506
    """
    if drain_pressure <= TRIPLE_POINT_PRESSURE:
        return 0.0
    t_back = saturation_temperature(drain_pressure)
    if t_back <= process_out:
        return 0.0
    q_stall = ua * (process_out - process_in) / math.log((t_back - process_in) / (t_back - process_out))
    return q_stall / design_duty


def add_turndown(inputs, duty, design_ua, required_area, condensate_density, result):
    """Add the turndown table and the stall loads (clean and fouled U) to the result.

    Parameters
    ----------
    inputs : steamcalc.calcs.exchanger.calculation.Inputs
        The case (U, fouling, area, back pressure, drainage).
    duty : float
        Design duty, W.
    design_ua : float
        UA the design duty needs, W/K (the basis when no U is given).
    required_area : float or None
        Required area, m² (with a U).
    condensate_density : float
        Density of the condensate in the leg to the trap, kg/m³.
    """
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature
    fouling = inputs.fouling_resistance or 0.0
    if inputs.overall_u is None:
        ua_clean = ua_fouled = design_ua
        basis_clean = basis_fouled = "UA as required at design (no U given)"
    else:
        area = inputs.installed_area if inputs.installed_area is not None else required_area
        which = "installed" if inputs.installed_area is not None else "required"
        u_fouled = service_u(inputs.overall_u, fouling)
        ua_clean, ua_fouled = inputs.overall_u * area, u_fouled * area
        basis_clean = f"clean U {inputs.overall_u / 1e3:.4g} kW/(m²·K) × {which} area {area:.3f} m²"
        basis_fouled = f"service U {u_fouled / 1e3:.4g} kW/(m²·K) × {which} area {area:.3f} m²"
        result.add("turndown_area", f"Area in the turndown ({which})", area, "m**2")
        result.add("turndown_u_clean", "U in the turndown, clean", inputs.overall_u / 1e3, "kW/(m**2*K)")
        result.add("turndown_u_fouled", "U in the turndown, fouled (service)", u_fouled / 1e3, "kW/(m**2*K)")
    result.add("turndown_ua_clean", "UA in the turndown, clean", ua_clean / 1e3, "kW/K")
    result.add("turndown_ua_fouled", "UA in the turndown, fouled (service)", ua_fouled / 1e3, "kW/K")
    fouled_differs = ua_fouled != ua_clean
    result.assumptions.append(
        "Turndown model: load varies with the process flow at the design inlet and outlet temperatures; the "
        "exchanger keeps its area and U; the steam-side pressure falls to what the load needs (the hot side at the "
        "saturation temperature over the whole area: condensing, and a superheated steam's desuperheating on the wet "
        "wall at the same driving force; a dry-wall desuperheating or a subcooling zone is not credited with its own "
        f"U here). The turndown table gives the steam-side pressure needed on the {basis_fouled}"
        + (f", and on the {basis_clean}" if fouled_differs else " (no fouling: clean and fouled are the same)"))
    beyond = []   # the loads no steam pressure drives, in words
    for tag, ua_basis, which in (("", ua_fouled, "fouled" if fouled_differs else "clean = fouled"),
                                 ("clean_", ua_clean, "clean")):
        if tag and not fouled_differs:
            break
        for load in LOADS:
            # Never below the process outlet temperature; above the critical point there is no saturation.
            t_needed = required_saturation_temperature(load * duty, ua_basis, t_in, t_out)
            if t_needed >= CRITICAL_TEMPERATURE:
                beyond.append(f"{load:.0%} load ({which} U)")
                continue
            result.add(f"required_steam_pressure_{tag}{int(round(load * 100))}",
                       f"Steam-side pressure needed at {load:.0%} load ({which} U)", saturation_pressure(t_needed) / 1e5,
                       "bar")
    if beyond:
        result.assumptions.append(
            "No steam pressure drives " + ", ".join(beyond) + f": the area would need steam condensing above the "
            f"critical point ({CRITICAL_TEMPERATURE - 273.15:.3f} °C), so the turndown gives no pressure there; what "
            "the heater can take is in the results")
    if inputs.condensate_back_pressure is not None:
        _stall(inputs, duty, ua_clean, ua_fouled, basis_clean, basis_fouled, condensate_density, result)
    return ua_clean, ua_fouled


def lift_density(inputs):
    """Density of the condensate in the lift after the trap, kg/m³: saturated liquid at the back pressure."""
    try:
        return SteamState.from_p_dryness(inputs.condensate_back_pressure, 0.0).density
    except OutOfRangeError as exc:
        raise exc.for_field("condensate_back_pressure") from None


def _with_lift(inputs, back, result):
    """The trap's back pressure: the return's pressure plus the lift's ρ·g·H."""
    density = lift_density(inputs)
    lift = density * STANDARD_GRAVITY * inputs.lift_head
    result.assumptions.append(
        f"Condensate lift after the trap: a full column of saturated liquid at the back pressure, {density:.1f} "
        "kg/m³, added to the back pressure the trap (and the stall load) works against (flash steam in the riser "
        "lightens it, cooler condensate weighs more; common practice)")
    result.add("lift_head_pressure", "Static head of the condensate lift (ρ·g·H)", lift / 1e3, "kPa")
    result.work("Back pressure at the trap outlet, with the lift", "p_back,trap = p_back + ρ_l·g·H_lift",
                "p_back + rho_l*g*H_lift", (back + lift) / 1e5, "bar", p_back=(back / 1e5, "bar"),
                rho_l=(density, "kg/m**3"), g=GRAVITY, H_lift=(inputs.lift_head, "m"))
    return back + lift


def _stall(inputs, duty, ua_clean, ua_fouled, basis_clean, basis_fouled, condensate_density, result):
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature
    back = inputs.condensate_back_pressure
    if inputs.lift_head:
        back = _with_lift(inputs, back, result)
    differential = inputs.trap_min_differential or 0.0
    head = inputs.trap_static_head or 0.0
    head_pressure = condensate_density * STANDARD_GRAVITY * head
    drain = stall_pressure(back, differential, head, condensate_density)
    result.assumptions.append(
        "Stall load on the clean U: a clean exchanger needs the least steam pressure at a given load and stalls "
        "first (the conservative basis); the fouled figure is given beside it")
    result.assumptions.append(
        "Drainage: condensate drains while steam-side pressure + ρ·g·H ≥ back pressure + the trap's minimum "
        f"working differential (common practice); g = {STANDARD_GRAVITY} m/s² (standard gravity); ρ of saturated "
        f"liquid at the design steam pressure, {condensate_density:.1f} kg/m³ (the hottest the leg can be: the "
        "least head, conservative)")
    if inputs.trap_static_head is None:
        result.assumptions.append("No static head credited below the heater outlet (the static head to the trap is not given)")
    if inputs.trap_min_differential is None:
        result.assumptions.append("Trap minimum working differential taken as zero (not given); the trap maker's "
                                  "figure governs")
    result.add("trap_static_head_pressure", "Static head of condensate at the trap (ρ·g·H)", head_pressure / 1e3,
               "kPa")
    if drain > 0.0:
        result.add("stall_pressure", "Steam-side pressure below which condensate does not drain", drain / 1e5, "bar")
    if head > MAX_USUAL_STATIC_HEAD:   # a check only where it is not met
        usual = (MAX_USUAL_STATIC_HEAD, "m")
        result.check_limit("Static head to the trap", (head, "m"), [("<=", usual, "warn")], Phrase.of(
            "{head:g} of condensate above the trap is more than the {usual:g} usual below a heater (common practice): "
            "check the figure, and that the leg is full of condensate at part load", head=(head, "m"), usual=usual),
            source="common practice")
    result.work("Steam-side pressure at which drainage stops", "p_stall = p_back + Δp_trap,min − ρ·g·H",
                "p_back + dp_trap - rho*g*H", drain / 1e5, "bar", p_back=(back / 1e5, "bar"),
                dp_trap=(differential / 1e3, "kPa", "difference"), rho=(condensate_density, "kg/m**3"), g=GRAVITY,
                H=(head, "m"))
    try:
        clean = stall_load(duty, ua_clean, t_in, t_out, drain)
        fouled = stall_load(duty, ua_fouled, t_in, t_out, drain)
    except OutOfRangeError as exc:
        lift = back - inputs.condensate_back_pressure   # the lift's ρ·g·H, when given: name it if it is the most
        field = ("drainage.lift_head" if lift > max(differential, inputs.condensate_back_pressure)
                 else "drainage.trap_min_differential" if differential else "condensate_back_pressure")
        raise InputError(f"drainage would stop below {drain / 1e5:.4g} bar(a) (back pressure"
                         f"{' with the lift' if lift else ''} + trap differential − static head): {exc.message}",
                         field=field, limits=exc.limits,
                         fix="check condensate_back_pressure and the [inputs.drainage] figures") from None
    equation = "L = Q_stall/Q, Q_stall = UA·(T_o − T_i)/ln((T_b − T_i)/(T_b − T_o)), T_b = T_sat(p_stall)"
    work_load_below(result, "Stall load, clean U", equation, clean, ua_clean, t_in, t_out, drain, duty, "T_b", "p_stall")
    work_load_below(result, "Stall load, fouled U", equation, fouled, ua_fouled, t_in, t_out, drain, duty, "T_b",
                    "p_stall")
    result.add("stall_load_fraction", "Stall load (fraction of design, clean U: governs)", clean)
    result.add("stall_load_fraction_fouled", "Stall load (fraction of design, fouled U)", fouled)
    basis = "the {back:.4g} back pressure" + (" (with the lift)" if inputs.lift_head else "")
    amounts = {"back": (back / 1e5, "bar")}
    if differential or head:
        basis += " with the trap's {differential:.3g} (minimum differential) and {head:.3g} static head " + (
            "(drainage stops below {drain:.4g})" if drain > 0.0 else
            "(the static head alone drains it at any steam-side pressure)")
        amounts.update(differential=(differential / 1e3, "kPa", "difference"), head=(head, "m"),
                       **({"drain": (drain / 1e5, "bar")} if drain > 0.0 else {}))

    def drainage(status):
        if status == "fail":
            return Phrase.of("the clean exchanger stalls even at design load: it needs less steam pressure than "
                             + basis + "; condensate cannot drain by pressure", **amounts)
        if status == "warn":
            return Phrase.of("below {clean:.0f} load (clean U; {fouled:.0f} fouled) the steam-side pressure falls "
                             "under " + basis + ": condensate backs up, with waterhammer and loss of temperature "
                             "control", clean=(100 * clean, "percent"), fouled=(100 * fouled, "percent"), **amounts)
        return Phrase.of("the needed steam-side pressure stays above " + basis + " at every load, clean or fouled",
                         **amounts)
    # No stall at any load passes; a stall within the range warns; a stall at design load fails.
    if result.check_limit("Condensate drainage (stall)", (clean, ""), [("<=", (0.0, ""), "warn"),
                                                                       ("<", (1.0, ""), "fail")], drainage) == "warn":
        result.warnings.append(STALL_REMEDIES[0])


def work_load_below(result, label, equation, load, ua, process_in, process_out, pressure, duty, t_symbol, p_symbol):
    """The step for a load below which the steam side falls under ``pressure`` (:func:`stall_load`'s value).

    Where that pressure's saturation temperature is above the process outlet the load is the LMTD equation
    rearranged, written as arithmetic; otherwise (no such load: 0) the step names the rule with its operands.
    """
    operands = {"UA": (ua / 1e3, "kW/K"), "T_i": (process_in - 273.15, "degC"), "T_o": (process_out - 273.15, "degC"),
                "Q": (duty / 1e3, "kW")}
    if pressure <= TRIPLE_POINT_PRESSURE:
        # Below the triple point there is no saturation temperature, and the steam side never falls that low.
        result.work(label, equation, f"load_below({p_symbol})", load, **{p_symbol: (pressure / 1e5, "bar")})
        return
    t_saturation = saturation_temperature(pressure)
    operands[t_symbol] = (t_saturation - 273.15, "degC")
    if load > 0.0:
        result.work(label, equation, f"UA*(T_o - T_i)/ln(({t_symbol} - T_i)/({t_symbol} - T_o))/Q", load, **operands)
    else:
        # At or below the process outlet the steam side never needs so low a saturation temperature: no such load.
        result.work(label, equation, f"load_below(UA, T_i, T_o, {t_symbol}, Q)", load, **operands)
