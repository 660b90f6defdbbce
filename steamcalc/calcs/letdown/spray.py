"""The let-down station's spray-water control valve and the evaporation of its spray.

The spray flow at each of the station's flow cases (minimum, normal, maximum) sizes the
spray-water valve to IEC 60534-2-1 for liquids, from the spray supply pressure to the steam
pressure plus the nozzle's own differential; the travel of the rated valve, its
cavitation indication and the spray turndown follow. The steam velocity at the
desuperheater at the minimum flow and the length the spray takes to evaporate are checked
against a minimum velocity and the distance to the temperature sensor.

The input fields are declared here (:func:`spray_field`) and listed in the let-down's
``Inputs``; :func:`check_spray_inputs` is called from its ``__post_init__`` and
:func:`spray_section` from :func:`steamcalc.calcs.letdown.calculation.calculate` once the desuperheater's
target state is known.
"""

from __future__ import annotations

import math

from ...equipment.desuperheater import (
    DEFAULT_DROPLET_SIZE, DEFAULT_MIN_STEAM_VELOCITY, DROPLET_NUSSELT, droplet_lifetime, evaporation_length,
)
from ...equipment.liquid_valve import WATER_DENSITY_15C, size_liquid_valve, usable_turndown, valve_travel
from ...equipment.piping import line_velocity, pipe_inner_diameter
from ...errors import InputError, OutOfRangeError
from ...properties.steam import CRITICAL_PRESSURE, SteamState, saturation_pressure, saturation_temperature, thermal_conductivity
from ...units.amounts import Amount, Phrase
from ..base import bar_a, deg_c, input_field
from ...equipment.valve import TRAVEL_FAIL, travel_limits
from .equipment import DEFAULT_FL, DEFAULT_RANGEABILITY, DEFAULT_SCHEDULE, flow_cases

DEFAULT_CHARACTERISTIC = "equal-percentage"
#: Spray results that hold a pressure difference (shown as "bar difference").
SPRAY_PRESSURE_DIFFERENCE_RESULTS = ("spray_valve_pressure_differential", "spray_valve_choked_differential")
#: Droplet sizes outside this range are a slip of the unit (e.g. mm for µm), m.
DROPLET_SIZE_RANGE = (5e-6, 1e-3)
#: Smallest spray-valve FL accepted.
MIN_FL = 0.3

_FIELDS = {
    "spray_supply_pressure": dict(
        kind="pressure", label="Spray water supply pressure",
        help="Water pressure upstream of the spray-water control valve (default: the spray water pressure).",
        example="25 bar(g)"),
    "nozzle_differential": dict(
        kind="pressure_difference", label="Spray nozzle differential",
        help="The spray nozzle's own pressure drop after the valve (default 0).", example="3 bar"),
    "spray_valve_fl": dict(
        kind="fraction", label="Spray valve FL", help="Liquid pressure recovery factor of the spray-water valve "
        "(maker's data; default 0.90).", example="0.90"),
    "spray_valve_rated_kv": dict(
        kind="flow_coefficient", label="Spray valve rated Kv (Kvs)", help="Kv of the selected spray-water valve "
        "at full travel.", example="0.25 m³/h", positive=True),
    "spray_valve_characteristic": dict(
        kind="text", label="Spray valve characteristic", help="Inherent characteristic of the spray-water valve: "
        "equal-percentage or linear.", example="equal-percentage"),
    "spray_valve_rangeability": dict(
        kind="number", label="Spray valve rangeability", help="Inherent rangeability of an equal-percentage "
        "spray-water valve (default 50).", example="50"),
    "sensor_distance": dict(
        kind="length", label="Distance to the temperature sensor", help="From the spray point to the "
        "downstream temperature sensor.", example="6 m"),
    "desuperheater_pipe_size": dict(
        kind="nominal_size", label="Desuperheater pipe size", help="Nominal size of the pipe at the spray point "
        "(default: the outlet line size).", example="DN150", key="pipe_size"),
    "desuperheater_velocity_limit": dict(
        kind="velocity", label="Minimum steam velocity at the spray", help="Smallest steam velocity the "
        f"desuperheater needs (default {DEFAULT_MIN_STEAM_VELOCITY:g} m/s; maker's data).", example="6 m/s",
        positive=True, key="min_steam_velocity"),
    "spray_droplet_size": dict(
        kind="length", label="Spray droplet size", help="Droplet size of the spray for the evaporation length "
        f"(default {DEFAULT_DROPLET_SIZE * 1e6:g} µm; nozzle maker's data).", example="50 um", positive=True,
        key="droplet_size"),
}

#: The let-down ``Inputs`` fields of the spray valve and evaporation.
SPRAY_FIELDS = tuple(_FIELDS)


def spray_field(name):
    """The let-down ``Inputs`` field ``name`` of the spray valve and evaporation (section desuperheater)."""
    spec = dict(_FIELDS[name])
    return input_field(spec.pop("kind"), spec.pop("label"), spec.pop("help"), example=spec.pop("example"),
                       section="desuperheater", **spec)


def _address(name):
    return f"desuperheater.{_FIELDS[name].get('key', name)}"


def check_spray_inputs(inputs):
    """Structural checks of the spray-valve and evaporation inputs (InputError naming the field)."""
    given = [name for name in _FIELDS if getattr(inputs, name) is not None]
    if given and not inputs.desuperheating:
        raise InputError("spray valve or evaporation data is given but no desuperheater target",
                         field=_address(given[0]), fix="add target_superheat or target_temperature to "
                         "[inputs.desuperheater], or remove the spray data")
    fl = inputs.spray_valve_fl
    # 0.3 lies below every valve style's typical FL (IEC 60534-2-1 Annex A, from memory); a smaller figure is
    # a slip, and one near 1e-160 squares to zero in the choked differential the sizing divides by
    if fl is not None and not MIN_FL <= fl <= 1.0:
        raise InputError(f"FL must lie between {MIN_FL} and 1", field=_address("spray_valve_fl"), value=fl,
                         limits=(MIN_FL, 1.0, ""), fix="take FL from the valve maker's data (globe valves 0.8-0.95)")
    if inputs.spray_valve_characteristic not in (None, "linear", "equal-percentage"):
        raise InputError("the characteristic is 'linear' or 'equal-percentage'",
                         field=_address("spray_valve_characteristic"), value=inputs.spray_valve_characteristic)
    if inputs.spray_valve_rangeability is not None and inputs.spray_valve_rangeability <= 1.0:
        raise InputError("rangeability must be above 1", field=_address("spray_valve_rangeability"),
                         value=inputs.spray_valve_rangeability, fix="take it from the maker's data (often 30-50)")
    if inputs.sensor_distance is not None and inputs.sensor_distance <= 0.0:
        raise InputError("the distance from the spray to the temperature sensor must be above zero",
                         field=_address("sensor_distance"), value=inputs.sensor_distance,
                         fix="give the length of straight pipe from the spray point to the sensor, e.g. '6 m'")
    size = inputs.spray_droplet_size
    if size is not None and not DROPLET_SIZE_RANGE[0] <= size <= DROPLET_SIZE_RANGE[1]:
        raise InputError("the droplet size is outside 5-1000 µm", field=_address("spray_droplet_size"), value=size,
                         limits=(5, 1000, "µm"), fix="give the nozzle maker's droplet size, e.g. '50 um'")
    nozzle = inputs.nozzle_differential
    if nozzle is not None and nozzle < 0.0:
        raise InputError("the nozzle differential cannot be negative", field=_address("nozzle_differential"),
                         value=nozzle, fix="give the nozzle's own pressure drop, zero or more")
    if not inputs.desuperheating or inputs.outlet_pressure >= inputs.inlet_pressure:
        return   # no desuperheater, or a let-down the calculation refuses on its outlet pressure
    if inputs.spray_supply_pressure is None and not nozzle:
        return   # the spray water pressure against the steam is checked with the desuperheater
    supply = inputs.spray_supply_pressure if inputs.spray_supply_pressure is not None else inputs.water_pressure
    needed = inputs.outlet_pressure + (nozzle or 0.0)
    if supply <= needed:
        where = "spray_supply_pressure" if inputs.spray_supply_pressure is not None else "nozzle_differential"
        raise InputError(
            f"the spray water supply at {bar_a(supply)} is not above the steam pressure plus the nozzle differential "
            f"({bar_a(needed)}): no water would flow through the spray valve",
            field=_address(where), value=supply,
            fix="give spray_supply_pressure, the water pressure upstream of the spray-water valve, above the steam "
                "pressure plus the nozzle differential (check the basis, bar(g)/bar(a))")


def _travel(kv, kvs, characteristic, rangeability):
    """Travel (0-1) of the rated valve, and a note when the Kv lies outside the valve's range."""
    if kv > kvs:
        return 1.0, "wide open: the valve is too small"
    if characteristic == "equal-percentage" and kv < kvs / rangeability:
        return 0.0, f"below the smallest controllable Kv, Kvs/R = {kvs / rangeability:.4g} m³/h"
    return valve_travel(kv, kvs, characteristic, rangeability), ""


def _water_state(pressure, temperature, field):
    try:
        return SteamState.from_pT(pressure, temperature)
    except OutOfRangeError as exc:
        raise exc.for_field(field) from None


def spray_section(inputs, result):
    """Spray flows at the flow cases, the spray-water valve, the steam velocity and the evaporation length."""
    if not inputs.desuperheating or result.value("spray_water_flow") <= 0.0:
        return
    target = result.states["outlet"]
    p_steam = inputs.outlet_pressure
    water = _water_state(inputs.water_pressure, inputs.water_temperature, "desuperheater.water_pressure")
    result.references.extend([
        "IEC 60534-2-1:2011, control-valve sizing equations for incompressible fluids (clause 6.2)",
        "Quasi-steady d²-law of droplet evaporation (Godsave 1953; Spalding 1953), heat-transfer limited, Nu = 2",
        "IAPWS R15-11, thermal conductivity of ordinary water substance",
    ])
    result.cautions.append(
        "The spray desuperheater's minimum steam velocity, droplet size and the distance to its temperature sensor "
        "are estimated here from common practice: the desuperheater maker's data governs.")

    sprays, throttled = {}, {}
    for name, steam_flow in flow_cases(inputs):
        h2 = result.states[f"valve_inlet_{name}"].enthalpy
        throttled[name] = SteamState.from_ph(p_steam, h2)
        if h2 <= target.enthalpy:
            # Recorded only when breached (no spray at that flow), as before: the target is the limit.
            result.check_limit(f"Spray needed at the {name} flow", (h2 / 1e3, "kJ/kg"),
                               [(">", (target.enthalpy / 1e3, "kJ/kg"), "warn")],
                               Phrase.of(f"steam after the valve at the {name} flow ({{temperature:.2f}}) is not "
                                         "hotter than the target: no spray at that flow",
                                         temperature=(throttled[name].temperature - 273.15, "degC")))
            continue
        sprays[name] = steam_flow * (h2 - target.enthalpy) / (target.enthalpy - water.enthalpy)
        result.add(f"spray_water_flow_{name}", f"Spray water flow, {name} steam flow", sprays[name] * 3600, "kg/h")
        if name != "normal":
            result.work(f"Spray water flow ({name} steam flow)", "m_w = m_s·(h2 − h3) / (h3 − h_w)",
                        "m_s*(h2 - h3)/(h3 - h_w)", sprays[name] * 3600, "kg/h", m_s=(steam_flow * 3600, "kg/h"),
                        h2=(h2 / 1e3, "kJ/kg"), h3=(target.enthalpy / 1e3, "kJ/kg"), h_w=(water.enthalpy / 1e3, "kJ/kg"))
    if sprays:
        _spray_valve(inputs, sprays, water, result)
    _evaporation(inputs, sprays, throttled, target, water, result)


def _spray_valve(inputs, sprays, water, result):
    supply = inputs.spray_supply_pressure if inputs.spray_supply_pressure is not None else inputs.water_pressure
    nozzle = inputs.nozzle_differential or 0.0
    p_out = inputs.outlet_pressure + nozzle
    fl = inputs.spray_valve_fl if inputs.spray_valve_fl is not None else DEFAULT_FL
    characteristic = inputs.spray_valve_characteristic or DEFAULT_CHARACTERISTIC
    rangeability = inputs.spray_valve_rangeability or DEFAULT_RANGEABILITY
    defaults = [text for given, text in (
        (inputs.spray_supply_pressure, f"supply pressure = the spray water pressure {bar_a(supply)}"),
        (inputs.nozzle_differential, "nozzle differential 0 (the valve takes the whole drop to the steam)"),
        (inputs.spray_valve_fl, f"FL = {DEFAULT_FL} (globe valve, common practice)"),
        (inputs.spray_valve_characteristic, f"{DEFAULT_CHARACTERISTIC} characteristic"),
        (inputs.spray_valve_rangeability, f"rangeability R = {DEFAULT_RANGEABILITY:g}")) if given is None]
    if defaults:
        result.assumptions.append("Spray-water valve, not given: " + "; ".join(defaults))
    result.assumptions.append(
        "Spray-water valve: supply and steam pressures the same at every flow, so its pressure differential and "
        "cavitation indication do not change with flow, and its Kv turndown equals the spray turndown; Fp = 1 "
        "(valve and pipe sizes not given), turbulent flow (no Reynolds number factor)")
    try:
        supply_saturation = saturation_temperature(supply)
    except OutOfRangeError as exc:
        raise exc.for_field(_address("spray_supply_pressure")) from None
    if water.temperature >= supply_saturation - 1e-6:
        raise InputError(f"spray water at {deg_c(water.temperature)} is not liquid at the supply pressure "
                         f"{bar_a(supply)}", field=_address("spray_supply_pressure"), value=supply,
                         fix="give the pressure upstream of the spray-water valve")
    inlet = _water_state(supply, inputs.water_temperature, _address("spray_supply_pressure"))
    pv = saturation_pressure(inputs.water_temperature)
    sizing = {name: size_liquid_valve(w * 3600, supply / 1e3, p_out / 1e3, inlet.density, pv / 1e3,
                                      CRITICAL_PRESSURE / 1e3, fl) for name, w in sprays.items()}
    any_case = next(iter(sizing.values()))
    p1, p_v = (supply / 1e5, "bar"), (pv / 1e5, "bar")
    ff = any_case.liquid_critical_pressure_ratio
    result.work("Spray valve pressure differential", "Δp = p1 − p2,  p1 = p_supply,  p2 = p_steam + Δp_nozzle",
                "p1 - (p_steam + dp_nozzle)", (supply - p_out) / 1e5, "bar", p1=p1,
                p_steam=(inputs.outlet_pressure / 1e5, "bar"), dp_nozzle=(nozzle / 1e5, "bar", "difference"))
    result.work("Spray water vapour pressure", "pv = p_sat(T_w)  [IF97 region 4]", "p_sat(T_w)", pv / 1e5, "bar",
                T_w=(inputs.water_temperature - 273.15, "degC"))
    result.work("Liquid critical pressure ratio factor", "FF = 0.96 − 0.28·√(pv/pc)  [IEC 60534-2-1 eq. (3)]",
                "0.96 - 0.28*sqrt(pv/pc)", ff, pv=p_v, pc=(CRITICAL_PRESSURE / 1e5, "bar"))
    result.work("Spray valve choked differential", "Δp_choked = FL²·(p1 − FF·pv)  [IEC 60534-2-1 eq. (2), Fp = 1]",
                "FL*FL*(p1 - FF*pv)", any_case.choked_differential / 1e2, "bar", FL=(fl, ""), p1=p1, FF=(ff, ""),
                pv=p_v)
    result.add("spray_valve_pressure_differential", "Spray valve pressure differential",
               any_case.pressure_differential / 1e2, "bar")
    result.add("spray_valve_choked_differential", "Spray valve choked pressure differential",
               any_case.choked_differential / 1e2, "bar")
    result.add("spray_water_density", "Spray water density at the valve inlet", inlet.density, "kg/m**3")
    for name, s in sizing.items():
        # N1 = 0.1 holds for W in kg/h, ρ in kg/m³ and Δp in kPa only.
        result.work(f"Spray valve Kv ({name} steam flow)",
                    "Kv = Q/N1·√((ρ1/ρ0)/Δp_siz),  Q = W/ρ1,  N1 = 0.1,  Δp_siz = min(Δp, Δp_choked)  "
                    "[IEC 60534-2-1 eq. (1); m³/h, kg/h, kg/m³, kPa difference]",
                    "W/rho1/0.1*sqrt((rho1/rho0)/min(dp, dp_choked))", s.kv, "m**3/h", units_fixed=True,
                    role="flow_coefficient", W=(sprays[name] * 3600, "kg/h"), rho1=(inlet.density, "kg/m**3"),
                    rho0=(WATER_DENSITY_15C, "kg/m**3"), dp=(s.pressure_differential, "kPa", "difference"),
                    dp_choked=(s.choked_differential, "kPa", "difference"))
        result.add(f"spray_valve_kv_{name}", f"Spray valve required Kv, {name} steam flow", s.kv, "m**3/h")
    verdict = any_case.cavitation
    result.work("Spray valve cavitation indication", "indication = flashing if p2 < pv; choked if Δp ≥ Δp_choked; "
                "incipient cavitation if Δp ≥ Kc·(p1 − pv), Kc = 0.8·FL² (common practice); else none expected",
                "cavitation_indication(p2, pv, dp, dp_choked, dp_incipient)", verdict,
                p2=(p_out / 1e5, "bar"), pv=p_v, dp=(any_case.pressure_differential / 1e2, "bar", "difference"),
                dp_choked=(any_case.choked_differential / 1e2, "bar", "difference"),
                dp_incipient=(any_case.incipient_differential / 1e2, "bar", "difference"))
    result.add("spray_valve_cavitation", "Spray valve cavitation indication (IEC 60534-2-1)", verdict)
    _cavitation_check(any_case, verdict, p_out, pv, fl, result)
    if "minimum" in sprays and "maximum" in sprays:
        _turndown(sprays, characteristic, rangeability, result)
    else:
        result.assumptions.append("Spray turndown not found: it needs the minimum and maximum flows "
                                  "(valve.min_flow, valve.max_flow)")
    if inputs.spray_valve_rated_kv is not None:
        _rated_spray_valve(inputs.spray_valve_rated_kv, sizing, characteristic, rangeability, result)
    else:
        result.assumptions.append("Spray-water valve travel not found: no rated Kv "
                                  "(desuperheater.spray_valve_rated_kv)")


def _cavitation_check(s, verdict, p_out, pv, fl, result):
    """The valve's differential against the incipient-cavitation differential.

    With FL ≤ 1 and pv below p1, the choked differential lies above the incipient one, and flashing
    (p2 < pv) means Δp > p1 − pv, above it too: every indication but "none expected" has Δp at or above
    Kc·(p1 − pv), so that one limit gives the verdict.
    """
    basis = ("Δp = {dp:.2f}, choked at {dp_choked:.2f}, incipient cavitation from {dp_incipient:.2f} "
             "(Kc = 0.8·FL² = {kc:.3f}, common practice, from memory); outlet {p2:.4g} against the vapour pressure "
             "{pv:.4g}")
    dp = (s.pressure_differential / 1e2, "bar", "difference")
    amounts = dict(dp=dp, dp_choked=(s.choked_differential / 1e2, "bar", "difference"),
                   dp_incipient=(s.incipient_differential / 1e2, "bar", "difference"), kc=(0.8 * fl ** 2, ""),
                   p2=(p_out / 1e5, "bar"), pv=(pv / 1e5, "bar"))
    result.check_limit("Spray valve cavitation", dp, [("<", amounts["dp_incipient"], "warn")],
                       lambda status: Phrase.of(_cavitation_words(verdict, status) + basis, **amounts),
                       source="common practice, from memory")


def _cavitation_words(verdict, status):
    """The opening words of the cavitation check: the indication and its advice."""
    if status == "pass":
        return "no cavitation expected: "
    advice = {
        "flashing": "the water leaves partly as vapour: hardened trim and an outlet line sized for flashing flow",
        "choked, cavitating": "the valve passes no more water with a lower outlet pressure and cavitation will "
                              "damage a plain trim: an anti-cavitation (multi-stage) trim, or part of the drop "
                              "taken by the nozzle or an orifice (common practice)",
        "incipient cavitation": "cavitation starts: noise and trim wear over time; ask the maker for the trim's "
                                "incipient-cavitation coefficient, or take part of the drop across the nozzle "
                                "(common practice)",
    }[verdict]
    return f"{verdict}: {advice}; "


def _turndown(sprays, characteristic, rangeability, result):
    turndown = sprays["maximum"] / sprays["minimum"]
    usable = usable_turndown(characteristic, rangeability, TRAVEL_FAIL)
    result.work("Spray turndown", "turndown = m_w,max / m_w,min", "m_w_max/m_w_min", turndown,
                m_w_max=(sprays["maximum"] * 3600, "kg/h"), m_w_min=(sprays["minimum"] * 3600, "kg/h"))
    low, high = TRAVEL_FAIL
    if characteristic == "linear":
        result.work("Usable range of the spray valve", "range = Φ(h_high)/Φ(h_low),  Φ = h (linear),  h from 10 % "
                    "to 90 % travel", "h_high/h_low", usable, h_high=(high, ""), h_low=(low, ""))
    else:
        result.work("Usable range of the spray valve", "range = Φ(h_high)/Φ(h_low),  Φ = R^(h − 1) "
                    "(equal-percentage),  h from 10 % to 90 % travel", "R**(h_high - 1)/R**(h_low - 1)", usable,
                    R=(rangeability, ""), h_high=(high, ""), h_low=(low, ""))
    result.add("spray_turndown", "Spray turndown (maximum over minimum spray)", turndown)
    result.add("spray_valve_usable_range", "Usable range of the spray valve (10-90 % travel)", usable)
    amounts = dict(turndown=(turndown, ""), usable=(usable, ""))
    result.check_limit(
        "Spray turndown within the valve's range", amounts["turndown"], [("<=", amounts["usable"], "warn")],
        lambda status: Phrase.of(
            f"spray turndown {{turndown:.1f}} within the {{usable:.1f}} of the {characteristic} valve (R = {rangeability:g}) "
            "between 10 and 90 % travel (common practice)" if status == "pass" else
            f"spray turndown {{turndown:.1f}} exceeds the {{usable:.1f}} the {characteristic} valve (R = {rangeability:g}) "
            "controls between 10 and 90 % travel (common practice): use two spray valves in split range, or a valve "
            "of higher rangeability", **amounts),
        source="common practice")


def _kv(value):
    """A flow coefficient, m³/h, as an amount (a Cv in US views)."""
    return Amount(value, "m**3/h", role="flow_coefficient")


def _rated_spray_valve(kvs, sizing, characteristic, rangeability, result):
    result.add("spray_valve_rated_kv", "Rated Kv of the selected spray-water valve", kvs, "m**3/h")
    largest = max(s.kv for s in sizing.values())
    amounts = dict(rated=_kv(kvs), required=_kv(largest))
    result.check_limit("Spray valve rated Kv sufficient", amounts["required"], [("<=", amounts["rated"], "fail")],
                       lambda status: Phrase.of(
                           "rated {rated:.3g} ≥ required {required:.3g}" if status == "pass" else
                           "the spray-water valve (rated {rated:.3g}) is smaller than the required {required:.3g}",
                           **amounts))
    limits = travel_limits()   # the one travel rule of every control valve (steamcalc.equipment.valve)
    for name, s in sizing.items():
        travel, note = _travel(s.kv, kvs, characteristic, rangeability)
        result.add(f"spray_valve_travel_{name}", f"Spray valve travel, {name} steam flow" + (f" ({note})" if note else ""),
                   100.0 * travel, "percent")
        _travel_step(name, s.kv, kvs, characteristic, rangeability, travel, result)
        detail = {"": "", "wide open": ", wide open: the valve is too small",
                  "below range": ", below the smallest controllable Kv, Kvs/R = {smallest:.4g}"}[_travel_kind(
                      s.kv, kvs, characteristic, rangeability)]
        amounts = dict(travel=(100.0 * travel, "percent"))
        if "{smallest" in detail:
            amounts["smallest"] = _kv(kvs / rangeability)
        result.check_limit(f"Spray valve travel at {name} steam flow", amounts["travel"], limits,
                           Phrase.of("{travel:.0f} travel" + detail + f" ({characteristic}, R = {rangeability:g}); 10-90 % "
                                     "usable, 20-80 % preferred (common practice)", **amounts),
                           source="common practice")


def _travel_kind(kv, kvs, characteristic, rangeability):
    """Where a required Kv lies against the rated valve: "" within its range, "wide open", "below range"."""
    if kv > kvs:
        return "wide open"
    if characteristic == "equal-percentage" and kv < kvs / rangeability:
        return "below range"
    return ""


def _travel_step(name, kv, kvs, characteristic, rangeability, travel, result):
    """The travel of the rated valve; a Kv above the Kvs stops at full travel, one below Kvs/R at closed."""
    if characteristic == "linear":
        # A ratio of two Kv, shown in percent.
        equation, expression, operands = "h = min(Kv, Kvs)/Kvs  (linear)  [IEC 60534-2-4]", "min(Kv, Kvs)/Kvs", {}
    else:
        # ln() gives a plain number: the expression writes the percent itself.
        equation = "h = 1 + ln(min(Kv, Kvs)/Kvs)/ln R  (equal-percentage)  [IEC 60534-2-4]"
        expression, operands = "100*(1 + ln(min(Kv, Kvs)/Kvs)/ln(R))", {"R": (rangeability, "")}
        if _travel_kind(kv, kvs, characteristic, rangeability) == "below range":
            equation = "h = max(1 + ln(Kv/Kvs)/ln R, 0)  (equal-percentage, below the smallest controllable Kv)  " \
                       "[IEC 60534-2-4]"
            expression = "100*max(1 + ln(Kv/Kvs)/ln(R), 0)"
    result.work(f"Spray valve travel ({name} steam flow)", equation, expression, 100.0 * travel, "percent",
                Kv=_kv(kv), Kvs=_kv(kvs), **operands)


def _pipe_diameter(inputs):
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    if inputs.desuperheater_pipe_size is not None:
        return pipe_inner_diameter(inputs.desuperheater_pipe_size, schedule, field="desuperheater.pipe_size"), \
            f"{inputs.desuperheater_pipe_size} schedule {schedule}"
    if inputs.outlet_size is not None:
        return pipe_inner_diameter(inputs.outlet_size, schedule, field="lines.outlet_size"), \
            f"{inputs.outlet_size} schedule {schedule} (the outlet line)"
    return None, None


def _evaporation(inputs, sprays, throttled, target, water, result):
    diameter, described = _pipe_diameter(inputs)
    if diameter is None:
        text = ("no pipe size at the spray (desuperheater.pipe_size or lines.outlet_size): the minimum steam "
                "velocity and the evaporation length are not checked")
        if inputs.sensor_distance is not None:
            result.check("Temperature sensor beyond the evaporation length", "warn", text)
        else:
            result.assumptions.append(f"Desuperheater: {text}")
        return
    cases = dict(flow_cases(inputs))
    low = "minimum" if "minimum" in cases else "normal"
    limit = inputs.desuperheater_velocity_limit or DEFAULT_MIN_STEAM_VELOCITY
    v_min = line_velocity(cases[low], throttled[low].density, diameter)
    # D·D, not D²: a view writes a power of a number with its unit as "203 mm^2", which reads as an area.
    result.work(f"Steam velocity at the desuperheater ({low} flow)", f"v = m_s / (ρ2·π·D²/4),  D the bore of {described}",
                "m_s/(rho2*pi*D*D/4)", v_min, "m/s", m_s=(cases[low] * 3600, "kg/h"),
                rho2=(throttled[low].density, "kg/m**3"), pi=(math.pi, ""), D=(diameter * 1e3, "mm"))
    result.add("desuperheater_min_velocity", f"Steam velocity at the desuperheater, {low} flow", v_min, "m/s")
    given = inputs.desuperheater_velocity_limit is not None
    basis = "" if given else " (common practice for spray types, from memory; the maker's minimum governs)"
    amounts = dict(velocity=(v_min, "m/s"), limit=(limit, "m/s"))
    result.check_limit(
        "Steam velocity at the desuperheater", amounts["velocity"], [(">=", amounts["limit"], "warn")],
        lambda status: Phrase.of(
            f"{{velocity:.1f}} at the {low} flow, at least {{limit:g}}{basis}" if status == "pass" else
            f"{{velocity:.1f}} at the {low} flow, below the {{limit:g}} a spray desuperheater needs{basis}: the spray "
            "may fall out onto the pipe; a smaller pipe at the spray point, or a steam-atomising or venturi type",
            **amounts),
        source="" if given else "common practice, from memory")
    if not sprays:
        return
    droplet = inputs.spray_droplet_size or DEFAULT_DROPLET_SIZE
    p = inputs.outlet_pressure
    t_sat = saturation_temperature(p)
    liquid, vapour = SteamState.from_p_dryness(p, 0.0), SteamState.from_p_dryness(p, 1.0)
    heat = vapour.enthalpy - water.enthalpy
    film = SteamState.from_pT(p, 0.5 * (t_sat + target.temperature))
    k = thermal_conductivity(film.temperature, film.density)
    lengths = {}
    for name in sprays:
        start, end = throttled[name].temperature - t_sat, target.temperature - t_sat
        lifetime = droplet_lifetime(droplet, liquid.density, heat, k, start, end)
        velocity = max(line_velocity(cases[name], throttled[name].density, diameter),
                       line_velocity(cases[name] + sprays[name], target.density, diameter))
        lengths[name] = (evaporation_length(lifetime, velocity), lifetime, velocity, start, end)
    governing = max(lengths, key=lambda n: lengths[n][0])
    length, lifetime, velocity, start, end = lengths[governing]
    result.assumptions.append(
        f"Evaporation length: lifetime of a {droplet * 1e6:.0f} µm droplet"
        + ("" if inputs.spray_droplet_size is not None else " (common practice, from memory; the nozzle maker's "
           "droplet size governs)")
        + f" at saturation in the steam, heated by conduction only (Nu = {DROPLET_NUSSELT:g}, the droplet moving "
        "with the steam: no credit for slip, turbulence or break-up, so the estimate errs long), the steam's "
        "superheat falling in proportion to the spray evaporated, steam conductivity at the film temperature "
        "(IAPWS R15-11); times the larger of the steam velocities before and after the spray")
    result.work("Steam conductivity at the film temperature", "k = k(p2, T_film),  T_film = (T_sat,2 + T3)/2  "
                "[IAPWS R15-11]", "conductivity(p2, T_film)", k, "W/(m*K)", p2=(p / 1e5, "bar"),
                T_film=(film.temperature - 273.15, "degC"))
    result.work("Latent heat to evaporate the spray", "L = h_g(p2) − h_w", "h_g - h_w", heat / 1e3, "kJ/kg",
                h_g=(vapour.enthalpy / 1e3, "kJ/kg"), h_w=(water.enthalpy / 1e3, "kJ/kg"))
    # An integral the equipment layer evaluates: a lookup of its operands, not arithmetic a view could redo.
    result.work("Droplet lifetime", "t = ρ_l·L·d0²/(4·Nu·k) · ∫₀¹ ds / ΔT(s),  ΔT(s) = ΔT_end + (ΔT_start − "
                f"ΔT_end)·s^1.5  [d²-law], at the {governing} flow",
                "droplet_lifetime(rho_l, L, d0, Nu, k, dT_start, dT_end)", lifetime, "s",
                rho_l=(liquid.density, "kg/m**3"), L=(heat / 1e3, "kJ/kg"), d0=(droplet * 1e3, "mm"),
                Nu=(DROPLET_NUSSELT, ""), k=(k, "W/(m*K)"), dT_start=(start, "K"), dT_end=(end, "K"))
    result.work("Evaporation length", f"L_evap = t·v,  at the {governing} flow in {described}", "t*v", length, "m",
                t=(lifetime, "s"), v=(velocity, "m/s"))
    result.add("spray_droplet_lifetime", f"Droplet lifetime ({droplet * 1e6:.0f} µm droplet)", lifetime, "s")
    result.add("evaporation_length", f"Evaporation length of the spray (longest, at the {governing} flow)", length, "m")
    if inputs.sensor_distance is None:
        result.assumptions.append(
            f"Temperature sensor: no distance given (desuperheater.sensor_distance); place it at least {length:.1f} m "
            "downstream of the spray (the estimated evaporation length), or as the desuperheater maker recommends")
    else:
        amounts = dict(sensor=(inputs.sensor_distance, "m"), length=(length, "m"))
        result.check_limit(
            "Temperature sensor beyond the evaporation length", amounts["sensor"], [(">=", amounts["length"], "warn")],
            lambda status: Phrase.of(
                "sensor {sensor:g} from the spray, beyond the estimated evaporation length {length:.1f}"
                if status == "pass" else
                "the sensor {sensor:g} from the spray is closer than the estimated evaporation length {length:.1f}: it "
                "may read wet steam low and the controller over-spray; move it downstream or use a finer spray (the "
                "desuperheater maker's recommended distance governs)", **amounts))
