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

from ...equipment.desuperheater import (
    DEFAULT_DROPLET_SIZE, DEFAULT_MIN_STEAM_VELOCITY, DROPLET_NUSSELT, droplet_lifetime, evaporation_length,
)
from ...equipment.liquid_valve import WATER_DENSITY_15C, size_liquid_valve, usable_turndown, valve_travel
from ...equipment.piping import line_velocity, pipe_inner_diameter
from ...errors import InputError, OutOfRangeError
from ...properties.steam import CRITICAL_PRESSURE, SteamState, saturation_pressure, saturation_temperature, thermal_conductivity
from ..base import bar_a, deg_c, input_field, kj_kg
from .equipment import DEFAULT_FL, DEFAULT_RANGEABILITY, DEFAULT_SCHEDULE, TRAVEL_FAIL, flow_cases, travel_status

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
            result.check(f"Spray needed at the {name} flow", "warn",
                         f"steam after the valve at the {name} flow ({deg_c(throttled[name].temperature)}) is not "
                         "hotter than the target: no spray at that flow")
            continue
        sprays[name] = steam_flow * (h2 - target.enthalpy) / (target.enthalpy - water.enthalpy)
        result.add(f"spray_water_flow_{name}", f"Spray water flow, {name} steam flow", sprays[name] * 3600, "kg/h")
        if name != "normal":
            result.step(f"Spray water flow ({name} steam flow)", "m_w = m_s·(h2 − h3) / (h3 − h_w)",
                        f"m_w = {steam_flow * 3600:.1f} kg/h × ({kj_kg(h2)} − {kj_kg(target.enthalpy)}) / "
                        f"({kj_kg(target.enthalpy)} − {kj_kg(water.enthalpy)})", sprays[name] * 3600, "kg/h")
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
    result.step("Spray valve pressure differential, bar difference", "p1 = p_supply;  p2 = p_steam + Δp_nozzle;  "
                "Δp = p1 − p2",
                f"p1 = {bar_a(supply)}, p2 = {bar_a(inputs.outlet_pressure)} + {nozzle / 1e5:.4g} bar difference = "
                f"{bar_a(p_out)}", (supply - p_out) / 1e5)
    result.step("Liquid critical pressure ratio factor", "FF = 0.96 − 0.28·√(pv/pc)  [IEC 60534-2-1 eq. (3)]",
                f"FF = 0.96 − 0.28 × √({pv / 1e3:.2f} kPa(a) / {CRITICAL_PRESSURE / 1e3:.0f} kPa(a)), "
                f"pv = p_sat({deg_c(inputs.water_temperature)})", any_case.liquid_critical_pressure_ratio)
    result.step("Spray valve choked differential, bar difference", "Δp_choked = FL²·(p1 − FF·pv)  [IEC 60534-2-1 eq. (2), Fp = 1]",
                f"Δp_choked = {fl:g}² × ({supply / 1e3:.1f} − {any_case.liquid_critical_pressure_ratio:.4f} × "
                f"{pv / 1e3:.2f}) kPa(a)", any_case.choked_differential / 1e2)
    result.add("spray_valve_pressure_differential", "Spray valve pressure differential",
               any_case.pressure_differential / 1e2, "bar")
    result.add("spray_valve_choked_differential", "Spray valve choked pressure differential",
               any_case.choked_differential / 1e2, "bar")
    result.add("spray_water_density", "Spray water density at the valve inlet", inlet.density, "kg/m**3")
    for name, s in sizing.items():
        result.step(f"Spray valve Kv ({name} steam flow)",
                    "Kv = Q/N1·√((ρ1/ρ0)/Δp_siz), N1 = 0.1, Δp_siz = min(Δp, Δp_choked)  [IEC 60534-2-1 eq. (1)]",
                    f"Kv = {s.volume_flow:.4f} m³/h / 0.1 × √(({inlet.density:.1f}/{WATER_DENSITY_15C:g}) / "
                    f"{s.sizing_differential:.1f} kPa difference)", s.kv, "m**3/h")
        result.add(f"spray_valve_kv_{name}", f"Spray valve required Kv, {name} steam flow", s.kv, "m**3/h")
    verdict = any_case.cavitation
    result.step("Spray valve cavitation indication", "flashing if p2 < pv; choked if Δp ≥ Δp_choked; incipient "
                "cavitation if Δp ≥ Kc·(p1 − pv), Kc = 0.8·FL² (common practice)",
                f"p2 = {bar_a(p_out)}, pv = {bar_a(pv)}; Δp = {any_case.pressure_differential / 1e2:.2f}, "
                f"Δp_choked = {any_case.choked_differential / 1e2:.2f}, Kc·(p1 − pv) = "
                f"{any_case.incipient_differential / 1e2:.2f} bar difference", verdict)
    result.add("spray_valve_cavitation", "Spray valve cavitation indication (IEC 60534-2-1)", verdict)
    _cavitation_check(any_case, verdict, supply, p_out, pv, fl, result)
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


def _cavitation_check(s, verdict, supply, p_out, pv, fl, result):
    basis = (f"Δp = {s.pressure_differential / 1e2:.2f} bar difference, choked at {s.choked_differential / 1e2:.2f}, "
             f"incipient cavitation from {s.incipient_differential / 1e2:.2f} (Kc = 0.8·FL² = {0.8 * fl ** 2:.3f}, "
             f"common practice, from memory); outlet {bar_a(p_out)} against the vapour pressure {bar_a(pv)}")
    if verdict == "none expected":
        result.check("Spray valve cavitation", "pass", f"no cavitation expected: {basis}")
        return
    advice = {
        "flashing": "the water leaves partly as vapour: hardened trim and an outlet line sized for flashing flow",
        "choked, cavitating": "the valve passes no more water with a lower outlet pressure and cavitation will "
                              "damage a plain trim: an anti-cavitation (multi-stage) trim, or part of the drop "
                              "taken by the nozzle or an orifice (common practice)",
        "incipient cavitation": "cavitation starts: noise and trim wear over time; ask the maker for the trim's "
                                "incipient-cavitation coefficient, or take part of the drop across the nozzle "
                                "(common practice)",
    }[verdict]
    result.check("Spray valve cavitation", "warn", f"{verdict}: {advice}; {basis}")


def _turndown(sprays, characteristic, rangeability, result):
    turndown = sprays["maximum"] / sprays["minimum"]
    usable = usable_turndown(characteristic, rangeability, TRAVEL_FAIL)
    result.step("Spray turndown", "turndown = m_w,max / m_w,min",
                f"{sprays['maximum'] * 3600:.1f} kg/h / {sprays['minimum'] * 3600:.1f} kg/h", turndown)
    result.step("Usable range of the spray valve", "Φ(h_high)/Φ(h_low), Φ = R^(h − 1) or h, between 10 % and 90 % "
                "travel", f"{characteristic}, R = {rangeability:g}", usable)
    result.add("spray_turndown", "Spray turndown (maximum over minimum spray)", turndown)
    result.add("spray_valve_usable_range", "Usable range of the spray valve (10-90 % travel)", usable)
    if turndown > usable:
        result.check("Spray turndown within the valve's range", "warn",
                     f"spray turndown {turndown:.1f} exceeds the {usable:.1f} the {characteristic} valve (R = "
                     f"{rangeability:g}) controls between 10 and 90 % travel (common practice): use two spray "
                     "valves in split range, or a valve of higher rangeability")
    else:
        result.check("Spray turndown within the valve's range", "pass",
                     f"spray turndown {turndown:.1f} within the {usable:.1f} of the {characteristic} valve (R = "
                     f"{rangeability:g}) between 10 and 90 % travel (common practice)")


def _rated_spray_valve(kvs, sizing, characteristic, rangeability, result):
    result.add("spray_valve_rated_kv", "Rated Kv of the selected spray-water valve", kvs, "m**3/h")
    largest = max(s.kv for s in sizing.values())
    if largest > kvs:
        result.check("Spray valve rated Kv sufficient", "fail",
                     f"the spray-water valve (Kvs {kvs:.3g} m³/h) is smaller than the required Kv {largest:.3g} m³/h")
    else:
        result.check("Spray valve rated Kv sufficient", "pass", f"Kvs {kvs:.3g} m³/h ≥ required {largest:.3g} m³/h")
    for name, s in sizing.items():
        travel, note = _travel(s.kv, kvs, characteristic, rangeability)
        result.add(f"spray_valve_travel_{name}", f"Spray valve travel, {name} steam flow" + (f" ({note})" if note else ""),
                   100.0 * travel, "percent")
        result.step(f"Spray valve travel ({name} steam flow)",
                    "h = Kv/Kvs (linear) or h = 1 + ln(Kv/Kvs)/ln R (equal-percentage)  [IEC 60534-2-4]",
                    f"Kv/Kvs = {s.kv:.4f} / {kvs:.4g}, {characteristic}, R = {rangeability:g}", 100.0 * travel,
                    "percent")
        result.check(f"Spray valve travel at {name} steam flow", "fail" if note else travel_status(travel),
                     f"{100 * travel:.0f} % travel" + (f", {note}" if note else "")
                     + f" ({characteristic}, R = {rangeability:g}); 10-90 % usable, 20-80 % preferred (common practice)")


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
    result.step(f"Steam velocity at the desuperheater ({low} flow)", "v = m_s / (ρ2·π·D²/4)",
                f"v = {cases[low] * 3600:.1f} kg/h / 3600 / ({throttled[low].density:.4f} kg/m³ × π × "
                f"({diameter * 1000:.1f} mm)²/4), {described}", v_min, "m/s")
    result.add("desuperheater_min_velocity", f"Steam velocity at the desuperheater, {low} flow", v_min, "m/s")
    basis = ("" if inputs.desuperheater_velocity_limit is not None
             else " (common practice for spray types, from memory; the maker's minimum governs)")
    if v_min < limit:
        result.check("Steam velocity at the desuperheater", "warn",
                     f"{v_min:.1f} m/s at the {low} flow, below the {limit:g} m/s a spray desuperheater needs{basis}: "
                     "the spray may fall out onto the pipe; a smaller pipe at the spray point, or a steam-atomising "
                     "or venturi type")
    else:
        result.check("Steam velocity at the desuperheater", "pass",
                     f"{v_min:.1f} m/s at the {low} flow, at least {limit:g} m/s{basis}")
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
    result.step("Droplet lifetime", "t = ρ_l·L·d0²/(4·Nu·k) · ∫₀¹ ds / ΔT(s),  ΔT(s) = ΔT_end + (ΔT_start − "
                "ΔT_end)·s^1.5  [d²-law]",
                f"ρ_l = {liquid.density:.1f} kg/m³, L = h_g − h_w = {kj_kg(heat)}, d0 = {droplet * 1e6:.0f} µm, "
                f"Nu = {DROPLET_NUSSELT:g}, k = {k:.5f} W/(m·K) at {deg_c(film.temperature)}, ΔT_start = "
                f"{start:.1f} K, ΔT_end = {end:.1f} K ({governing} flow)", lifetime, "s")
    result.step("Evaporation length", "L_evap = t · v", f"L_evap = {lifetime:.3f} s × {velocity:.2f} m/s "
                f"({governing} flow, {described})", length, "m")
    result.add("spray_droplet_lifetime", f"Droplet lifetime ({droplet * 1e6:.0f} µm droplet)", lifetime, "s")
    result.add("evaporation_length", f"Evaporation length of the spray (longest, at the {governing} flow)", length, "m")
    if inputs.sensor_distance is None:
        result.assumptions.append(
            f"Temperature sensor: no distance given (desuperheater.sensor_distance); place it at least {length:.1f} m "
            "downstream of the spray (the estimated evaporation length), or as the desuperheater maker recommends")
    elif inputs.sensor_distance < length:
        result.check("Temperature sensor beyond the evaporation length", "warn",
                     f"the sensor {inputs.sensor_distance:g} m from the spray is closer than the estimated evaporation "
                     f"length {length:.1f} m: it may read wet steam low and the controller over-spray; move it "
                     "downstream or use a finer spray (the desuperheater maker's recommended distance governs)")
    else:
        result.check("Temperature sensor beyond the evaporation length", "pass",
                     f"sensor {inputs.sensor_distance:g} m from the spray, beyond the estimated evaporation length "
                     f"{length:.1f} m")
