"""The heater's steam control valve over the turndown, vacuum in the steam space, and the
condensate that must be pumped out when the heater stalls.

At each load of the turndown table the steam side needs a pressure (already found by
:mod:`.exchanger_turndown`); the control valve drops the supply pressure to it. Sized to
IEC 60534-2-1 (compressible, IF97 density and isentropic exponent) at every load, the valve's
Kv runs from the design load (largest: least pressure drop, most steam) down to the minimum
load; their ratio is the rangeability the duty asks of the valve. Where the needed pressure
falls below the site's atmosphere the steam space runs under vacuum; below the stall load the
condensate must be lifted by a pump or pump-trap against the back pressure and the lift.
"""

from __future__ import annotations

import math

from ...equipment.valve import TRAVEL_FAIL, size_steam_valve, travel_limits, valve_travel
from ...errors import InputError
from ...properties.steam import CRITICAL_PRESSURE, SteamState
from ...units.amounts import Phrase
from ..base import bar_a, full_record_wanted
from .supply import check_supply_inputs
from .turndown import GRAVITY, LOADS, STANDARD_GRAVITY, lift_density, stall_load, work_load_below
from ..letdown.equipment import DEFAULT_RANGEABILITY, DEFAULT_XT, sizing_kappa

CHARACTERISTICS = ("equal-percentage", "linear")
#: Motive steam pressure above the pump's total discharge pressure (back pressure plus lift) held
#: without a warning, Pa (common practice: makers' capacity tables fall away fast below about
#: 1 bar of excess; their figures govern).
MOTIVE_MARGIN = 1.0e5
#: Control-valve keys that need the supply pressure.
_VALVE_FIELDS = ("control_valve_xt", "control_valve_rated_kv", "control_valve_characteristic",
                 "control_valve_rangeability", "control_valve_supply_temperature", "control_valve_supply_superheat")

PUMPING_REMEDIES = (
    "Condensate removal when stalled, in general terms: drain the heater by gravity into a pump-trap "
    "combination (a pressure-powered pump with its own trap, balanced to the steam space) that lifts the "
    "condensate with motive steam or air; or drain by gravity to a vented receiver and a pumped return; or fit "
    "a vacuum breaker on the steam space so that it can drain by gravity to a trap discharging without lift. "
    "Filling head, capacity at the motive pressure and venting follow the equipment maker's data, which govern.",
)


def check_control_inputs(inputs):
    """Structural checks of the control-valve and condensate-removal inputs (raise InputError)."""
    for name, where, unit in (("lift_head", "drainage.lift_head", "m"),
                              ("control_valve_rangeability", "control_valve.rangeability", "")):
        value = getattr(inputs, name)
        if value is not None and not math.isfinite(value):
            raise InputError("is not a finite number", field=where, value=value,
                             fix=f"give a plain figure{' in ' + unit if unit else ''}")
    if inputs.lift_head is not None and inputs.lift_head < 0.0:
        raise InputError(
            "a lift cannot be negative: it is the height the condensate rises after the trap",
            field="drainage.lift_head", value=f"{inputs.lift_head:g} m",
            fix="give the rise from the trap to the highest point of the condensate line (0 m or more); a line "
                "falling to the return needs no lift")
    for name in ("lift_head", "pump_motive_pressure"):
        if getattr(inputs, name) is not None and inputs.condensate_back_pressure is None:
            raise InputError("condensate removal is worked from the condensate back pressure, which is not given",
                             field=f"drainage.{name}", fix="give condensate_back_pressure, e.g. \"0.8 bar(g)\"")
    if inputs.control_valve_supply_pressure is None:
        for name in _VALVE_FIELDS:
            if getattr(inputs, name) is not None:
                raise InputError("the control valve is sized from its supply pressure, which is not given",
                                 field="control_valve.supply_pressure",
                                 fix="add supply_pressure to [inputs.control_valve], e.g. \"8 bar(g)\"")
    xt = inputs.control_valve_xt
    if xt is not None and not 0.05 <= xt <= 1.0:
        raise InputError("xT must lie between 0.05 and 1", field="control_valve.xt", value=xt,
                         limits=(0.05, 1.0, ""), fix="take xT from the valve maker's data (globe valves 0.6-0.8)")
    characteristic = inputs.control_valve_characteristic
    if characteristic is not None and characteristic not in CHARACTERISTICS:
        raise InputError("the characteristic is 'equal-percentage' or 'linear'", field="control_valve.characteristic",
                         value=characteristic, fix='e.g. characteristic = "equal-percentage"')
    rangeability = inputs.control_valve_rangeability
    if rangeability is not None and rangeability <= 1.0:
        raise InputError("rangeability must be above 1 (the rated Kv over the smallest controllable Kv)",
                         field="control_valve.rangeability", value=rangeability, fix="e.g. rangeability = 50")
    check_supply_inputs(inputs)


def load_steam_flow(heat, valve_inlet_enthalpy, steam_side_pressure):
    """Steam (and condensate) flow at a load, kg/s: throttled steam condensing to saturated liquid.

    Parameters
    ----------
    heat : float
        Heat from the steam at the load, W.
    valve_inlet_enthalpy : float
        Specific enthalpy of the steam ahead of the control valve, J/kg (kept through the valve).
    steam_side_pressure : float
        Steam-side pressure at the load, Pa (absolute); the condensate leaves saturated at it.

    Notes
    -----
    :math:`\\dot m = Q / (h_1 - h_f(p_s))`: the valve throttles at constant enthalpy.

    References
    ----------
    Steady-flow energy balance over the valve and the steam space, IAPWS-IF97 for h_f.

    Examples
    --------
    >>> round(load_steam_flow(41.88e3, 2773.0e3, 0.6e5) * 3600, 2)
    62.48
    """
    condensate = SteamState.from_p_dryness(steam_side_pressure, 0.0)
    return heat / (valve_inlet_enthalpy - condensate.enthalpy)


def pumping_differential(back_pressure, lift_head, lift_density, steam_space_pressure, static_head,
                         condensate_density):
    """Pressure difference a pump or pump-trap must add to remove the condensate, Pa.

    Parameters
    ----------
    back_pressure : float
        Pressure of the return at the end of the lift, Pa (absolute).
    lift_head : float
        Rise of the condensate line after the trap or pump, m.
    lift_density : float
        Density of the condensate in the lift, kg/m³.
    steam_space_pressure : float
        Pressure in the heater's steam space, Pa (absolute).
    static_head : float
        Height of condensate standing above the trap or pump inlet, m.
    condensate_density : float
        Density of that condensate, kg/m³.

    Notes
    -----
    .. math:: \\Delta p_{pump} = p_{back} + \\rho_l g H_{lift} - p_s - \\rho_c g H_{static}

    with g = 9.80665 m/s². Positive: pressure alone cannot push the condensate out, and the pump
    must supply the difference; zero or negative: the steam space drains it unaided.

    References
    ----------
    Hydrostatics (any fluid-mechanics text); the balance is the drainage balance of
    :func:`.exchanger_turndown.stall_pressure` with the lift (common practice).

    Examples
    --------
    >>> round(pumping_differential(1.8e5, 4.0, 945.0, 0.6e5, 0.4, 890.0))
    153578
    """
    return (back_pressure + lift_density * STANDARD_GRAVITY * lift_head - steam_space_pressure
            - condensate_density * STANDARD_GRAVITY * static_head)


def _pressures(result, clean):
    """Steam-side pressure by load (fraction -> Pa) from the turndown table, fouled or clean U.

    A load no steam pressure drives (the turndown gives none: condensing above the critical point) needs more
    than any supply: infinite.
    """
    differs = result.value("turndown_ua_clean") != result.value("turndown_ua_fouled")
    prefix = "required_steam_pressure_clean_" if clean and differs else "required_steam_pressure_"
    keys = {load: f"{prefix}{int(round(load * 100))}" for load in LOADS}
    return {load: result.value(key) * 1e5 if key in result.values else math.inf for load, key in keys.items()}


def add_control(inputs, duty, steam_side, steam, supply, ua_clean, ua_fouled, condensate_density, site, capacity,
                result):
    """Add the control valve, the vacuum load and condensate removal to the result.

    Parameters
    ----------
    inputs : steamcalc.calcs.exchanger.calculation.Inputs
        The case.
    duty, steam_side : float
        Design process duty and heat from the steam (with the heat loss), W.
    steam : SteamState
        The steam entering the heater (its enthalpy is the valve inlet's when no supply pressure is given).
    supply : SteamState or None
        The steam at the control valve inlet (:func:`supply_state`), with a supply pressure.
    ua_clean, ua_fouled : float
        UA of the turndown, clean and fouled, W/K.
    condensate_density : float
        Density of the condensate standing above the trap, kg/m³.
    site : steamcalc.cases.site.Site
        The site (its atmospheric pressure).
    capacity : steamcalc.calcs.exchanger.capacity.Capacity or None
        The heater's capacity at the supply pressure (with a U and an installed area).
    """
    if not full_record_wanted():   # feeds no banded result
        return
    fouled, clean = _pressures(result, clean=False), _pressures(result, clean=True)
    minimum = LOADS[0]
    result.assumptions.append(
        f"Operating range of the heater: the turndown's {minimum:.0%} to 100 % of design load; the minimum load is "
        f"{minimum:.0%}")
    inlet_enthalpy = steam.enthalpy if supply is None else supply.enthalpy
    if supply is not None:
        _control_valve(inputs, steam_side, fouled, clean, supply, capacity, result)
    _vacuum(inputs, duty, ua_clean, ua_fouled, minimum, site, result)
    if inputs.condensate_back_pressure is not None and math.isfinite(clean[minimum]):
        _condensate_removal(inputs, steam_side, inlet_enthalpy, clean, minimum, condensate_density, result)


def valve_settings(inputs):
    """(xT, characteristic, rangeability) of the heater's control valve, the defaults where not given."""
    xt = inputs.control_valve_xt if inputs.control_valve_xt is not None else DEFAULT_XT
    characteristic = inputs.control_valve_characteristic or "equal-percentage"
    rangeability = (inputs.control_valve_rangeability if inputs.control_valve_rangeability is not None
                    else DEFAULT_RANGEABILITY)
    return xt, characteristic, rangeability


def _valve_inlet(inputs, state, result):
    """The valve inlet's stated basis, its density step and κ."""
    supply = inputs.control_valve_supply_pressure
    superheated = state.phase == "superheated vapour"
    result.references.extend([
        "IEC 60534-2-1:2011, control-valve sizing equations for compressible fluids (eq. (8), (12)-(15))",
        "IEC 60534-2-4:2009, inherent flow characteristics",
    ])
    result.assumptions.append(
        f"Control valve inlet: the supply steam at {bar_a(supply)}, "
        + (f"superheated {state.superheat:.1f} K" if superheated else "dry saturated")
        + "; throttled at constant enthalpy; condensate leaves saturated at each load's steam-side pressure")
    kappa = sizing_kappa(state, result)
    if inputs.control_valve_xt is None:
        result.assumptions.append(f"Control valve xT = {DEFAULT_XT} (globe valve, common practice; not given)")
    if inputs.control_valve_rangeability is None:
        result.assumptions.append(f"Control valve inherent rangeability {DEFAULT_RANGEABILITY:g} (common practice "
                                  "for a globe valve; not given)")
    if inputs.control_valve_characteristic is None and inputs.control_valve_rated_kv is not None:
        result.assumptions.append("Control valve characteristic equal-percentage (not given)")
    result.assumptions.append("Control valve the size of its line: piping geometry factor Fp = 1, xTP = xT "
                              "(IEC 60534-2-1 without reducers)")
    if superheated:
        result.work("Steam at the control valve inlet (IF97, superheated)", "ρ1 = ρ(p1, T1), κ = w²ρ/p",
                    "rho(p1, T1)", state.density, "kg/m**3", p1=(supply / 1e5, "bar"),
                    T1=(state.temperature - 273.15, "degC"))
    else:
        result.work("Steam at the control valve inlet (IF97, dry saturated)", "ρ1 = ρ_g(p1), κ = w²ρ/p", "rho_g(p1)",
                    state.density, "kg/m**3", p1=(supply / 1e5, "bar"))
    result.add("control_valve_inlet_density", "Steam density at the control valve inlet", state.density, "kg/m**3")
    result.add("control_valve_isentropic_exponent", "Isentropic exponent at the control valve inlet", kappa)
    return kappa


def _supply_check(supply, design_pressure, result):
    """The supply against the steam-side pressure the design load needs; True when it is above it."""
    given = (supply / 1e5, "bar")
    if not math.isfinite(design_pressure):   # no steam pressure drives the design load: more than the critical
        critical = (CRITICAL_PRESSURE / 1e5, "bar")
        result.check_limit("Control valve supply pressure above the steam-side pressure needed at design load",
                           given, [(">", critical, "fail")], Phrase.of(
                               "supply {given:.4g}: the design load would need steam condensing above the critical "
                               "point, more than {critical:.5g}; no supply drives it. What the heater can take is in "
                               "the results (largest process flow, outlet temperature reached)", given=given,
                               critical=critical))
        return False
    needed = (design_pressure / 1e5, "bar")

    def detail(status):
        if status == "pass":
            return Phrase.of("supply {given:.4g} above the {needed:.4g} the steam side needs at design load (fouled "
                             "U): {drop:.4g} left for the control valve", given=given, needed=needed,
                             drop=((supply - design_pressure) / 1e5, "bar", "difference"))
        return Phrase.of("supply {given:.4g} is not above the {needed:.4g} the steam side needs at design load (fouled "
                         "U): with no pressure drop left for the control valve the heater cannot take the design load "
                         "from this supply; what it can take is in the results (largest process flow, outlet "
                         "temperature reached)", given=given, needed=needed)
    status = result.check_limit("Control valve supply pressure above the steam-side pressure needed at design load",
                                given, [(">", needed, "fail")], detail)
    return status == "pass"


def _control_valve(inputs, steam_side, fouled, clean, state, capacity, result):
    supply = inputs.control_valve_supply_pressure
    xt, characteristic, rangeability = valve_settings(inputs)
    kappa = _valve_inlet(inputs, state, result)
    reaches = _supply_check(supply, fouled[1.0], result)
    bases = [("", fouled)] + ([("clean_", clean)] if clean != fouled else [])
    both = len(bases) > 1
    sizing, flows, unsized = {}, {}, []
    for tag, pressures in bases:
        for load in LOADS:
            if pressures[load] >= supply:   # no pressure drop left: no Kv passes this load (the check above says so)
                unsized.append((tag, load))
                continue
            percent = int(round(load * 100))
            which = " (clean U)" if tag else " (fouled U)" if both else ""
            flow = load_steam_flow(load * steam_side, state.enthalpy, pressures[load])
            s = size_steam_valve(flow * 3600, supply / 1e3, pressures[load] / 1e3, state.density, kappa, xt)
            sizing[(tag, load)], flows[(tag, load)] = s, flow
            result.add(f"control_valve_kv_{tag}{percent}", f"Control valve Kv needed at {load:.0%} load{which}", s.kv,
                       "m**3/h")
            result.add(f"control_valve_choked_{tag}{percent}", f"Control valve choked at {load:.0%} load{which}",
                       s.choked)
    worked = [(("", 1.0), fouled)] if reaches else []
    if sizing:
        low_key = min(sizing, key=lambda k: sizing[k].kv)
        worked.append((low_key, dict(bases)[low_key[0]]))
    for key, pressures in worked:
        _kv_steps(key, both, sizing[key], flows[key], pressures[key[1]], steam_side, state, supply, kappa, xt, result)
    if not reaches:
        result.assumptions.append(
            "Control valve not sized at the loads whose steam-side pressure is at or above the supply ("
            + ", ".join(_case_label(key, both) for key in unsized) + "): no Kv passes them; the rangeability and the "
            "travel at design load are therefore not worked")
        if inputs.control_valve_rated_kv is not None:
            _rated_valve(inputs, sizing, unsized, both, characteristic, rangeability, capacity, result)
        return
    design, low = sizing[("", 1.0)], sizing[low_key]
    high_key = max(sizing, key=lambda k: sizing[k].kv)
    result.add("control_valve_kv", f"Control valve Kv needed at design load ({'fouled U: ' if both else ''}sizing case)",
               design.kv, "m**3/h")
    required = sizing[high_key].kv / low.kv
    result.work("Rangeability the duty needs", "R_req = Kv_max / Kv_min over the turndown loads", "Kv_max/Kv_min",
                required, Kv_max=_kv(sizing[high_key].kv), Kv_min=_kv(low.kv))
    result.add("required_rangeability", "Rangeability the duty needs (largest Kv over smallest)", required)
    result.add("control_valve_rangeability", "Inherent rangeability of the control valve", rangeability)
    # Ratios such as 17.3:1 are no quantities: they stay in the words, as they read in any units.
    cases = f"{_case_label(high_key, both)} to {_case_label(low_key, both)}"
    result.check_limit("Control valve rangeability", (required, ""), [("<=", (rangeability, ""), "warn")],
                       lambda status: Phrase.of(
                           f"the duty needs {required:.1f}:1 ({cases}); the valve gives {rangeability:g}:1"
                           + (": it cannot control down to the minimum load; consider two valves in parallel (split "
                              "range), or accept on-off control at the lowest loads" if status == "warn" else "")))
    if inputs.control_valve_rated_kv is not None:
        _rated_valve(inputs, sizing, unsized, both, characteristic, rangeability, capacity, result)


def _kv_steps(key, both, s, flow, p2, steam_side, state, supply, kappa, xt, result):
    """The steam flow and the Kv at one sizing case, worked."""
    label = _case_label(key, both)
    result.work(f"Steam through the control valve at {label}", "m = L·Q_s / (h1 − h_f(p2))", "L*Q_s/(h1 - h_f2)",
                flow * 3600, "kg/h", L=(key[1], ""), Q_s=(steam_side / 1e3, "kW"), h1=(state.enthalpy / 1e3, "kJ/kg"),
                h_f2=(SteamState.from_p_dryness(p2, 0.0).enthalpy / 1e3, "kJ/kg"))
    # IEC 60534-2-1's N6 = 3.16 holds for W in kg/h, p in kPa and ρ in kg/m³; Kv first, as the step finds it.
    result.work(f"Control valve Kv at {label}",
                "Kv = W / (N6·Y·√(min(x, x_choked)·p1·ρ1)), N6 = 3.16; x = (p1 − p2)/p1; x_choked = (κ/1.40)·xT; "
                "Y = 1 − min(x, x_choked)/(3·x_choked)",
                "W/(3.16*(1 - min((p1 - p2)/p1, kappa/1.4*x_T)/(3*(kappa/1.4*x_T)))"
                "*sqrt(min((p1 - p2)/p1, kappa/1.4*x_T)*p1*rho1))", s.kv, "m**3/h", units_fixed=True,
                role="flow_coefficient", W=(flow * 3600, "kg/h"), p1=(supply / 1e3, "kPa"), p2=(p2 / 1e3, "kPa"),
                kappa=(kappa, ""), x_T=(xt, ""), rho1=(state.density, "kg/m**3"))


def _kv(kv):
    """A Kv as an amount (m³/h; a Cv in US views)."""
    return (kv, "m**3/h", "absolute", "flow_coefficient")


def _case_label(key, both):
    """'40% load, clean U' for a (basis tag, load) sizing key; 'clean = fouled U' without fouling."""
    tag, load = key
    return f"{load:.0%} load, {'clean' if tag else 'fouled' if both else 'clean = fouled'} U"


def _rated_valve(inputs, sizing, unsized, both, characteristic, rangeability, capacity, result):
    """The selected valve: its Kvs against the design load, its travel over the turndown.

    When the supply cannot reach the design load (``unsized`` loads), no Kv passes it: the design process flow
    is checked against what the heater takes with the valve fully open (the capacity) instead.
    """
    kvs = inputs.control_valve_rated_kv
    result.add("control_valve_rated_kv", "Rated Kv (Kvs) of the control valve", kvs, "m**3/h")
    design = sizing.get(("", 1.0))
    if design is not None:
        _rated_kv_check(kvs, design, both, result)
    elif capacity is not None:
        given, passes = (capacity.design_flow * 3600, "kg/h"), (capacity.process_flow * 3600, "kg/h")
        result.check_limit("Design process flow within what the heater takes with the control valve fully open",
                           given, [("<=", passes, "fail")], Phrase.of(
                               "design {given:.0f} against {passes:.0f} with the valve fully open (Kvs {kvs:.2f}) from "
                               "the supply: no Kv passes the design load, whose steam side needs more than the supply",
                               given=given, passes=passes, kvs=_kv(kvs)))
    else:   # no U and area: the capacity is not known, only that the design load is out of reach
        result.check("Control valve rated Kv sufficient", "fail", Phrase.of(
            "no Kv passes the design load from the supply (Kvs {kvs:.2f} given): the steam side needs more than the "
            "supply", kvs=_kv(kvs)))
    # The loads outside, as phrase pieces, and their amounts.
    outside, amounts = [f"{_case_label(key, both)} (no pressure drop left)" for key in unsized], {}
    for (tag, load), s in sizing.items():
        percent = int(round(load * 100))
        which = " (clean U)" if tag else " (fouled U)" if both else ""
        travel = valve_travel(s.kv, kvs, characteristic, rangeability)
        slot = f"{'clean' if tag else 'fouled'}_{percent}"
        if not 0.0 < travel <= 1.0:   # above full travel, or below the characteristic's controllable minimum
            outside.append(f"{_case_label((tag, load), both)} (Kv {{kv_{slot}:.3g}})")
            amounts[f"kv_{slot}"] = _kv(s.kv)
            continue
        result.add(f"control_valve_travel_{tag}{percent}", f"Control valve travel at {load:.0%} load{which}",
                   100.0 * travel, "percent")
        if not TRAVEL_FAIL[0] <= travel <= TRAVEL_FAIL[1]:
            outside.append(f"{_case_label((tag, load), both)} ({{travel_{slot}:.0f}})")
            amounts[f"travel_{slot}"] = (100 * travel, "percent")
    if "control_valve_travel_100" in result.values:
        result.add("control_valve_travel", f"Control valve travel at design load{' (fouled U)' if both else ''}",
                   result.value("control_valve_travel_100"), "percent")
    cases = ([("", 1.0)] if design is not None else []) + ([min(sizing, key=lambda k: sizing[k].kv)] if sizing else [])
    for key in cases:
        _travel_check(_case_label(key, both), sizing[key], kvs, characteristic, rangeability, result)
    # The travel band and the rangeability are plain ratios: they stay in the words.
    band = f"{100 * TRAVEL_FAIL[0]:.0f}-{100 * TRAVEL_FAIL[1]:.0f} % travel (common practice)"
    if outside:
        result.check("Control valve travel over the turndown", "warn", Phrase.of(
            f"outside {band} or outside the valve's range ({characteristic}, R = {rangeability:g}, Kvs {{kvs:.4g}}) "
            "at: " + "; ".join(outside) + ". Control is poor there: near the seat it goes on-off, near full travel "
            "there is no margin left to open", kvs=_kv(kvs), **amounts))
    else:
        result.check("Control valve travel over the turndown", "pass", Phrase.of(
            f"{band} at every load from {LOADS[0]:.0%} to design ({characteristic}, R = {rangeability:g})"))


def _rated_kv_check(kvs, design, both, result):
    design_case = _case_label(("", 1.0), both)

    def rated(status):
        if status == "fail":
            return Phrase.of("at design load the heater needs Kv {needed:.2f}, more than the selected valve's Kvs "
                             "{rated:.2f}: it cannot pass the design steam flow from the supply pressure",
                             needed=_kv(design.kv), rated=_kv(kvs))
        return Phrase.of(f"Kvs {{rated:.2f}} ≥ {{needed:.2f}} needed at {design_case}", rated=_kv(kvs),
                         needed=_kv(design.kv))
    result.check_limit("Control valve rated Kv sufficient", _kv(design.kv), [("<=", _kv(kvs), "fail")], rated)


def _travel_check(label, s, kvs, characteristic, rangeability, result):
    """The travel at one sizing case, worked and checked against the one travel rule."""
    travel = valve_travel(s.kv, kvs, characteristic, rangeability)
    if not 0.0 < travel <= 1.0:   # outside, the turndown check names the load
        return
    # Linear: h = Kv/Kvs, a fraction the percent takes as it is; equal-percentage: ln gives a plain number, made a
    # percent by 100.
    expression = "Kv/Kvs" if characteristic == "linear" else "100*(1 + ln(Kv/Kvs)/ln(R))"
    result.work(f"Control valve travel at {label}", "h = Kv/Kvs (linear) or h = 1 + ln(Kv/Kvs)/ln R (equal-percentage)",
                expression, 100.0 * travel, "percent", Kv=_kv(s.kv), Kvs=_kv(kvs),
                **({} if characteristic == "linear" else {"R": (rangeability, "")}))
    # The one travel rule of every control valve here, at the loads the heater is designed to run at.
    result.check_limit(f"Control valve travel at {label}", (100.0 * travel, "percent"), travel_limits(),
                       lambda status, t=100.0 * travel: Phrase.of(
                           f"{{travel:.0f}} travel ({characteristic}, R = {rangeability:g}); 10-90 % usable, "
                           "20-80 % preferred (common practice)", travel=(t, "percent")),
                       source="common practice")


def _vacuum(inputs, duty, ua_clean, ua_fouled, minimum, site, result):
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature
    atmosphere = site.atmospheric_pressure
    clean = stall_load(duty, ua_clean, t_in, t_out, atmosphere)
    fouled = stall_load(duty, ua_fouled, t_in, t_out, atmosphere)
    # The load first, as the step finds it; T_atm is the saturation temperature at the site's atmosphere.
    work_load_below(result, "Load below which the steam space is under vacuum (clean U)",
                    "L = Q_vac/Q, Q_vac = UA·(T_o − T_i)/ln((T_atm − T_i)/(T_atm − T_o)), T_atm = T_sat(p_atm)", clean,
                    ua_clean, t_in, t_out, atmosphere, duty, "T_atm", "p_atm")
    result.add("vacuum_load_fraction", "Vacuum in the steam space below this load (clean U)", clean)
    result.add("vacuum_load_fraction_fouled", "Vacuum in the steam space below this load (fouled U)", fouled)
    site_atmosphere = (atmosphere / 1e5, "bar")

    def vacuum(status):
        if status == "pass":
            return Phrase.of(f"the steam space stays above the site's {{atmosphere:.4g}} down to the minimum load "
                             f"{minimum:.0%} (it falls below it under {{clean:.0f}} load, clean U)",
                             atmosphere=site_atmosphere, clean=(100 * clean, "percent"))
        below = "at every load, design included" if clean >= 1.0 else "below {clean:.0f} load"
        return Phrase.of(
            below + " (clean U; {fouled:.0f} fouled) the heater needs less than the site's {atmosphere:.4g}: the steam "
            "space runs under vacuum, condensate will not drain by pressure and air is drawn in. Fit a vacuum breaker "
            "on the steam space (at the steam inlet, above the condensate level) so that the heater drains by gravity "
            "to a trap discharging without lift, or to a pump-trap where there is a lift or back pressure (a vacuum "
            "breaker alone lifts nothing); vent the air it admits, which blankets the heating surface (common practice)",
            fouled=(100 * fouled, "percent"), atmosphere=site_atmosphere,
            **({} if clean >= 1.0 else {"clean": (100 * clean, "percent")}))
    # Vacuum only below the turndown's minimum load passes.
    result.check_limit("Steam space above atmospheric pressure", (clean, ""), [("<=", (minimum, ""), "warn")], vacuum)


def _condensate_removal(inputs, steam_side, inlet_enthalpy, clean, minimum, condensate_density, result):
    back = inputs.condensate_back_pressure
    lift = inputs.lift_head or 0.0
    head = inputs.trap_static_head or 0.0
    result.references.append("Hydrostatic pressure ρ·g·H (any fluid-mechanics text); g = 9.80665 m/s², standard "
                             "gravity (3rd CGPM, 1901)")
    rho_lift = lift_density(inputs)
    lowest = clean[minimum]
    differential = pumping_differential(back, lift, rho_lift, lowest, head, condensate_density)
    result.assumptions.append(
        "Pumping differential: the back pressure plus the lift head (ρ·g·H of the lifted condensate) less the "
        "steam-space pressure and the static head of condensate above the trap, reported in bar difference "
        "(positive: a pump or pump-trap must add it; zero or negative: the steam space drains unaided), at the "
        f"lowest steam-side pressure of the turndown ({minimum:.0%} load, clean U) and without a vacuum breaker; "
        f"the lifted condensate's density that of saturated liquid at the back pressure, {rho_lift:.1f} kg/m³; the trap's own minimum differential "
        "is left to the pump-trap maker's filling-head data")
    # Record unit bar; the view reads a difference from the Δp equation.
    result.work("Pressure difference a pump must provide (at the minimum load, clean U)",
                "Δp_pump = p_back + ρ_l·g·H_lift − p_s − ρ_c·g·H_static", "p_back + rho_l*g*H_lift - p_s - rho_c*g*H_static",
                differential / 1e5, "bar", p_back=(back / 1e5, "bar"), rho_l=(rho_lift, "kg/m**3"), g=GRAVITY,
                H_lift=(lift, "m"), p_s=(lowest / 1e5, "bar"), rho_c=(condensate_density, "kg/m**3"),
                H_static=(head, "m"))
    result.add("required_pumping_differential", "Pumping differential needed (minimum load, clean U)", differential / 1e5, "bar")
    stall = result.value("stall_load_fraction") if "stall_load_fraction" in result.values else 0.0
    if stall > 0.0:
        at = min(stall, 1.0)   # a heater that stalls at design load must be drained at design load
        p_stall = result.value("stall_pressure") * 1e5 if stall < 1.0 else clean[1.0]
        flow = load_steam_flow(at * steam_side, inlet_enthalpy, p_stall)
        result.work("Condensate to remove at the stall load (clean U)", "m = L·Q_s / (h1 − h_f(p_stall))",
                    "L*Q_s/(h1 - h_f)", flow * 3600, "kg/h", L=(at, ""), Q_s=(steam_side / 1e3, "kW"),
                    h1=(inlet_enthalpy / 1e3, "kJ/kg"),
                    h_f=(SteamState.from_p_dryness(p_stall, 0.0).enthalpy / 1e3, "kJ/kg"))
        result.add("condensate_to_remove", "Condensate to remove at the stall load (clean U)", flow * 3600, "kg/h")
    if stall > minimum:
        flow = load_steam_flow(minimum * steam_side, inlet_enthalpy, lowest)
        result.work("Condensate to remove at the minimum load (clean U)", "m = L·Q_s / (h1 − h_f(p_s))",
                    "L*Q_s/(h1 - h_f)", flow * 3600, "kg/h", L=(minimum, ""), Q_s=(steam_side / 1e3, "kW"),
                    h1=(inlet_enthalpy / 1e3, "kJ/kg"), h_f=(SteamState.from_p_dryness(lowest, 0.0).enthalpy / 1e3, "kJ/kg"))
        result.add("condensate_to_remove_minimum_load", f"Condensate to remove at the minimum load ({minimum:.0%}, "
                   "clean U)", flow * 3600, "kg/h")
        result.warnings.append(PUMPING_REMEDIES[0])
    if inputs.pump_motive_pressure is not None:
        _motive(inputs, back, lift, rho_lift, differential, result)


def _motive(inputs, back, lift, rho_lift, differential, result):
    motive = inputs.pump_motive_pressure
    discharge = back + rho_lift * STANDARD_GRAVITY * lift
    excess = motive - discharge
    result.work("Motive pressure over the pump's discharge pressure", "Δp_motive = p_motive − (p_back + ρ_l·g·H_lift)",
                "p_motive - (p_back + rho_l*g*H_lift)", excess / 1e5, "bar", p_motive=(motive / 1e5, "bar"),
                p_back=(back / 1e5, "bar"), rho_l=(rho_lift, "kg/m**3"), g=GRAVITY, H_lift=(lift, "m"))
    result.add("pump_motive_excess", "Motive pressure above the pump's discharge pressure", excess / 1e5, "bar")
    template = ("motive {motive:.4g} against a discharge of {discharge:.4g} (back pressure with the lift): "
                "{excess:+.3f}; at least {margin:g} wanted (common practice; the pump maker's capacity at this motive "
                "and back pressure governs)")
    if differential <= 0.0:
        template += "; no pumping is needed at the minimum load"
    excess_amount, margin = (excess / 1e5, "bar", "difference"), (MOTIVE_MARGIN / 1e5, "bar", "difference")

    def motive_detail(status):
        return Phrase.of(("not enough: " + template + "; the pump cannot discharge") if status == "fail" else template,
                         motive=(motive / 1e5, "bar"), discharge=(discharge / 1e5, "bar"), excess=excess_amount,
                         margin=margin)
    # Above zero the pump can discharge at all (else it fails); from the margin up it passes.
    result.check_limit("Pump motive pressure", excess_amount, [(">", (0.0, "bar", "difference"), "fail"),
                                                               (">=", margin, "warn")], motive_detail,
                       source="common practice")
