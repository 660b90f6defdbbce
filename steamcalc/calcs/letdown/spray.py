"""The let-down station's spray-water control valve and the evaporation of its spray.

The spray flow at each of the station's flow cases (minimum, normal, maximum) sizes the
spray-water valve to IEC 60534-2-1 for liquids, from the spray supply pressure to the steam
pressure plus the nozzle's own differential, with the piping geometry factor Fp and the
combined factor FLP when the valve size and its pipe sizes are given; the travel of the rated
valve, its cavitation indication and the spray turndown follow. The steam velocity at the
desuperheater at the minimum flow is checked against a minimum velocity, and the length the
spray takes to evaporate (at the maker's droplet size, or assumed and shown over a range of
sizes) against the distance to the temperature sensor, or the sensor against the maker's distance.

The input fields are declared here (:func:`spray_field`) and listed in the let-down's
``Inputs``; :func:`check_spray_inputs` is called from its ``__post_init__`` and
:func:`spray_section` from :func:`steamcalc.calcs.letdown.calculation.calculate` once the desuperheater's
target state is known.
"""

from __future__ import annotations

from ...equipment.desuperheater import DEFAULT_DROPLET_SIZE, DEFAULT_MIN_STEAM_VELOCITY, TYPICAL_DROPLET_SIZES
from ...equipment.liquid_valve import (
    FITTINGS_TOLERANCE, INCIPIENT_FRACTION_OF_FL2, WATER_DENSITY_15C, size_liquid_valve, usable_turndown, valve_travel,
)
from ...equipment.piping import pipe_inner_diameter
from ...equipment.valve import N2_KV
from ...errors import InputError, OutOfRangeError, SteamcalcError
from ...properties.steam import CRITICAL_PRESSURE, SteamState, saturation_pressure, saturation_temperature
from ...units.amounts import Amount, Phrase
from ..base import bar_a, deg_c, input_field
from ...equipment.valve import TRAVEL_FAIL, travel_limits
from .equipment import DEFAULT_FL, DEFAULT_RANGEABILITY, DEFAULT_SCHEDULE, flow_cases
from .evaporation import evaporation_section

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
        kind="length", label="Spray droplet size", help="The nozzle maker's droplet size of the spray, for the "
        f"evaporation length (not given: {DEFAULT_DROPLET_SIZE * 1e6:g} µm is assumed, the length is shown over "
        f"{TYPICAL_DROPLET_SIZES[0] * 1e6:g}-{TYPICAL_DROPLET_SIZES[1] * 1e6:g} µm and the sensor is checked at "
        f"{TYPICAL_DROPLET_SIZES[1] * 1e6:g} µm).", example="50 um", positive=True, key="droplet_size"),
    "recommended_sensor_distance": dict(
        kind="length", label="Maker's sensor distance", help="The desuperheater maker's smallest distance from the "
        "spray point to the temperature sensor; when given, the sensor is checked against it.", example="12 m",
        positive=True),
    "spray_valve_size": dict(
        kind="nominal_size", label="Spray valve size", help="Nominal size of the spray-water valve body, for the "
        "piping geometry factor Fp with reducers (not given: Fp = 1).", example="DN15"),
    "spray_inlet_pipe_size": dict(
        kind="nominal_size", label="Spray pipe size before the valve", help="Nominal size of the spray-water pipe "
        "upstream of the spray valve (its reducer enters Fp and FLP).", example="DN25"),
    "spray_outlet_pipe_size": dict(
        kind="nominal_size", label="Spray pipe size after the valve", help="Nominal size of the spray-water pipe "
        "downstream of the spray valve (its expander enters Fp).", example="DN25"),
    "spray_pipe_schedule": dict(
        kind="text", label="Spray pipe schedule", help="ASME B36.10M schedule of the spray-water pipe and valve "
        "bore (default: the lines' schedule, else 40).", example="80"),
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


def _given(inputs, name):
    """The spray input ``name`` of the let-down inputs; None when not given.

    A field declared here takes effect once the let-down ``Inputs`` lists it; until then no case can give it
    (a case file naming it is refused as an unknown key), so it reads as not given.
    """
    return getattr(inputs, name, None)


def _spray_schedule(inputs):
    return _given(inputs, "spray_pipe_schedule") or inputs.schedule or DEFAULT_SCHEDULE


def _spray_valve_bores(inputs):
    """Valve size d and the bores D1, D2 of the spray pipes either side, mm (None where not given)."""
    schedule = _spray_schedule(inputs)
    bores = []
    for name in ("spray_valve_size", "spray_inlet_pipe_size", "spray_outlet_pipe_size"):
        text = _given(inputs, name)
        try:
            bores.append(None if text is None else 1e3 * pipe_inner_diameter(text, schedule, field=_address(name)))
        except InputError as exc:
            if exc.field != "schedule":
                raise
            given = _given(inputs, "spray_pipe_schedule") is not None
            raise exc.for_field(_address("spray_pipe_schedule") if given else "lines.schedule") from None
    return tuple(bores)


def _check_spray_pipes(inputs):
    valve, inlet, outlet = _spray_valve_bores(inputs)
    if valve is None:
        return
    for name, bore in (("spray_inlet_pipe_size", inlet), ("spray_outlet_pipe_size", outlet)):
        if bore is not None and bore < valve:
            raise InputError(f"the spray valve ({_given(inputs, 'spray_valve_size')}) is larger than its pipe "
                             f"({_given(inputs, name)}): the IEC 60534-2-1 reducer factors are for a valve no larger "
                             "than the pipes either side", field=_address(name), value=_given(inputs, name),
                             fix="check the spray valve size and the spray pipe sizes")


def check_spray_inputs(inputs):
    """Structural checks of the spray-valve and evaporation inputs (InputError naming the field)."""
    given = [name for name in _FIELDS if _given(inputs, name) is not None]
    if given and not inputs.desuperheating:
        raise InputError("spray valve or evaporation data is given but no desuperheater target",
                         field=_address(given[0]), fix="add target_superheat or target_temperature to "
                         "[inputs.desuperheater], or remove the spray data")
    fl = inputs.spray_valve_fl
    # 0.3 lies below every valve style's typical FL (IEC 60534-2-1's table of typical values; not confirmed against
    # the standard's text); a smaller figure is a slip, and one near 1e-160 squares to zero in the choked
    # differential the sizing divides by
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
    _check_spray_pipes(inputs)
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
    evaporation_section(inputs, sprays, throttled, target, water, result)


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
    valve_d, inlet_d, outlet_d = _spray_valve_bores(inputs)
    fittings = valve_d is not None and (inlet_d is not None or outlet_d is not None)
    result.assumptions.append(
        "Spray-water valve: supply and steam pressures the same at every flow, so its pressure differential does "
        "not change with flow" + (
            "; with reducers FLP/Fp, and with it the choked and incipient-cavitation differentials, change with the "
            "Kv, so the cavitation indication is taken at the flow where they are lowest" if fittings else
            ", nor does its cavitation indication, and its Kv turndown equals the spray turndown")
        + "; turbulent flow (no Reynolds number factor)")
    result.assumptions.append(_fittings_basis(inputs, valve_d, inlet_d, outlet_d))
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
    diameters = (valve_d, inlet_d, outlet_d) if fittings else (None, None, None)
    try:
        sizing = {name: size_liquid_valve(w * 3600, supply / 1e3, p_out / 1e3, inlet.density, pv / 1e3,
                                          CRITICAL_PRESSURE / 1e3, fl, *diameters) for name, w in sprays.items()}
    except SteamcalcError as exc:
        if exc.field != "valve_d":
            raise
        exc.field, exc.value = _address("spray_valve_size"), _given(inputs, "spray_valve_size")
        raise exc from None
    # The flow at which FLP/Fp, and so the choked and incipient differentials, are lowest: any flow without fittings.
    worst = min(sizing, key=lambda name: sizing[name].incipient_differential)
    at_worst = sizing[worst]
    p1, p_v = (supply / 1e5, "bar"), (pv / 1e5, "bar")
    ff = at_worst.liquid_critical_pressure_ratio
    result.work("Spray valve pressure differential", "Δp = p1 − p2,  p1 = p_supply,  p2 = p_steam + Δp_nozzle",
                "p1 - (p_steam + dp_nozzle)", (supply - p_out) / 1e5, "bar", p1=p1,
                p_steam=(inputs.outlet_pressure / 1e5, "bar"), dp_nozzle=(nozzle / 1e5, "bar", "difference"))
    result.work("Spray water vapour pressure", "pv = p_sat(T_w)  [IF97 region 4]", "p_sat(T_w)", pv / 1e5, "bar",
                T_w=(inputs.water_temperature - 273.15, "degC"))
    result.work("Liquid critical pressure ratio factor", "FF = 0.96 − 0.28·√(pv/pc)  [IEC 60534-2-1 eq. (3)]",
                "0.96 - 0.28*sqrt(pv/pc)", ff, pv=p_v, pc=(CRITICAL_PRESSURE / 1e5, "bar"))
    if fittings:
        _fittings_steps(sizing, fl, (valve_d, inlet_d, outlet_d), p1, p_v, ff, result)
    else:
        result.work("Spray valve choked differential", "Δp_choked = FL²·(p1 − FF·pv)  [IEC 60534-2-1 eq. (2), "
                    "Fp = 1, FLP = FL]", "FL*FL*(p1 - FF*pv)", at_worst.choked_differential / 1e2, "bar", FL=(fl, ""),
                    p1=p1, FF=(ff, ""), pv=p_v)
    result.add("spray_valve_pressure_differential", "Spray valve pressure differential",
               at_worst.pressure_differential / 1e2, "bar")
    result.add("spray_valve_choked_differential", "Spray valve choked pressure differential" + (
        f" (lowest, at the {worst} steam flow)" if fittings else ""), at_worst.choked_differential / 1e2, "bar")
    result.add("spray_water_density", "Spray water density at the valve inlet", inlet.density, "kg/m**3")
    for name, s in sizing.items():
        # N1 = 0.1 holds for W in kg/h, ρ in kg/m³ and Δp in kPa only.
        common = dict(units_fixed=True, role="flow_coefficient", W=(sprays[name] * 3600, "kg/h"),
                      rho1=(inlet.density, "kg/m**3"), rho0=(WATER_DENSITY_15C, "kg/m**3"),
                      dp=(s.pressure_differential, "kPa", "difference"),
                      dp_choked=(s.choked_differential, "kPa", "difference"))
        if fittings:
            result.work(f"Spray valve Kv ({name} steam flow)",
                        "Kv = Q/(N1·Fp)·√((ρ1/ρ0)/Δp_siz),  Q = W/ρ1,  N1 = 0.1,  Δp_siz = min(Δp, Δp_choked)  "
                        "[IEC 60534-2-1 clause 6.2, with fittings; m³/h, kg/h, kg/m³, kPa difference]",
                        "W/rho1/(0.1*Fp)*sqrt((rho1/rho0)/min(dp, dp_choked))", s.kv, "m**3/h",
                        Fp=(s.piping_factor, ""), **common)
        else:
            result.work(f"Spray valve Kv ({name} steam flow)",
                        "Kv = Q/N1·√((ρ1/ρ0)/Δp_siz),  Q = W/ρ1,  N1 = 0.1,  Δp_siz = min(Δp, Δp_choked)  "
                        "[IEC 60534-2-1 eq. (1), Fp = 1; m³/h, kg/h, kg/m³, kPa difference]",
                        "W/rho1/0.1*sqrt((rho1/rho0)/min(dp, dp_choked))", s.kv, "m**3/h", **common)
        result.add(f"spray_valve_kv_{name}", f"Spray valve required Kv, {name} steam flow", s.kv, "m**3/h")
    if fittings:
        largest = max(sizing, key=lambda name: sizing[name].kv)
        result.add("spray_valve_piping_factor", f"Spray valve piping geometry factor Fp, {largest} steam flow",
                   sizing[largest].piping_factor)
        result.add("spray_valve_combined_fl", f"Spray valve FLP (FL with its inlet reducer), {largest} steam flow",
                   sizing[largest].combined_fl)
    ratio = "(FLP/Fp)" if fittings else "FL"
    kc_symbols = dict(FLP=(at_worst.combined_fl, ""), Fp=(at_worst.piping_factor, "")) if fittings else dict(FL=(fl, ""))
    kc_expression = "0.8*(FLP/Fp)*(FLP/Fp)" if fittings else "0.8*FL*FL"
    result.work("Spray valve incipient-cavitation differential",
                f"Δp_incipient = Kc·(p1 − pv),  Kc = {INCIPIENT_FRACTION_OF_FL2:g}·{ratio}²  (common practice; the "
                "maker's Kc or xFz governs)" + (f", at the {worst} steam flow" if fittings else ""),
                f"{kc_expression}*(p1 - pv)", at_worst.incipient_differential / 1e2, "bar", p1=p1, pv=p_v,
                **kc_symbols)
    verdict = at_worst.cavitation
    result.work("Spray valve cavitation indication", "indication = flashing if p2 < pv; choked if Δp ≥ Δp_choked; "
                f"incipient cavitation if Δp ≥ Kc·(p1 − pv), Kc = 0.8·{ratio}² (common practice); else none expected"
                + (f"; at the {worst} steam flow" if fittings else ""),
                "cavitation_indication(p2, pv, dp, dp_choked, dp_incipient)", verdict,
                p2=(p_out / 1e5, "bar"), pv=p_v, dp=(at_worst.pressure_differential / 1e2, "bar", "difference"),
                dp_choked=(at_worst.choked_differential / 1e2, "bar", "difference"),
                dp_incipient=(at_worst.incipient_differential / 1e2, "bar", "difference"))
    result.add("spray_valve_cavitation", "Spray valve cavitation indication (IEC 60534-2-1)", verdict)
    _cavitation_check(at_worst, verdict, p_out, pv, ratio, worst if fittings else "", result)
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


def _fittings_basis(inputs, valve_d, inlet_d, outlet_d):
    """The assumption that states how the spray valve's fittings enter its sizing."""
    if valve_d is None:
        missing = "no spray valve size (desuperheater.spray_valve_size)"
        if inlet_d is not None or outlet_d is not None:
            missing += ", so its reducers cannot be counted"
        return f"Spray-water valve: Fp = 1 and FLP = FL, the valve the size of its pipe: {missing}"
    if inlet_d is None and outlet_d is None:
        return (f"Spray-water valve {_given(inputs, 'spray_valve_size')}: no spray pipe sizes "
                "(desuperheater.spray_inlet_pipe_size, spray_outlet_pipe_size), so Fp = 1 and FLP = FL, the valve "
                "the size of its pipe")
    sides = [f"{_given(inputs, name)} {where}" for name, where, bore in (
        ("spray_inlet_pipe_size", "before", inlet_d), ("spray_outlet_pipe_size", "after", outlet_d)) if bore is not None]
    return (f"Spray-water valve {_given(inputs, 'spray_valve_size')} between reducers ({' and '.join(sides)} it, "
            f"schedule {_spray_schedule(inputs)}; the valve size d taken as the bore of its nominal size, as for the "
            "let-down valve): piping geometry factor Fp and FLP of IEC 60534-2-1 clause 7, solved with the Kv they "
            f"size to a relative change of {FITTINGS_TOLERANCE:g}"
            + ("" if inlet_d is not None else "; no reducer before the valve, so FLP = FL"))


def _fittings_steps(sizing, fl, bores, p1, p_v, ff, result):
    """The fittings' loss coefficients, and Fp, FLP and the choked differential at each flow."""
    valve_d, inlet_d, outlet_d = bores
    largest = sizing[max(sizing, key=lambda name: sizing[name].kv)]
    # The coefficients are the steam valve's (steamcalc.equipment.valve.piping_factors), inside Fp: found back
    # from Fp at the largest Kv, the step's own arithmetic re-derives them from the diameters.
    scale = N2_KV * (valve_d * valve_d / largest.kv) ** 2
    sum_zeta = scale * (largest.piping_factor ** -2 - 1.0)
    terms, operands = [], dict(d=(valve_d, "mm"))
    if inlet_d is not None:
        terms += ["0.5*(1 - (d/D1)**2)**2", "(1 - (d/D1)**4)"]
        operands["D1"] = (inlet_d, "mm")
    if outlet_d is not None:
        terms += ["(1 - (d/D2)**2)**2", "- (1 - (d/D2)**4)"]
        operands["D2"] = (outlet_d, "mm")
    expression = " + ".join(terms).replace("+ -", "-")
    result.work("Spray valve fittings' loss coefficient", "Σζ = ζ1 + ζB1 + ζ2 − ζB2,  ζ1 = 0.5·(1 − (d/D1)²)²,  "
                "ζ2 = (1 − (d/D2)²)²,  ζBi = 1 − (d/Di)⁴  (only the fittings present)  [IEC 60534-2-1 clause 7]",
                expression, sum_zeta, **operands)
    if inlet_d is not None:
        zeta_in = scale * ((fl / largest.combined_fl) ** 2 - 1.0) / fl ** 2
        result.work("Spray valve inlet reducer's loss coefficient", "Σζ1 = ζ1 + ζB1 = 0.5·(1 − (d/D1)²)² + "
                    "1 − (d/D1)⁴  [IEC 60534-2-1 clause 7]", "0.5*(1 - (d/D1)**2)**2 + (1 - (d/D1)**4)", zeta_in,
                    d=(valve_d, "mm"), D1=(inlet_d, "mm"))
    for name, s in sizing.items():
        kv, d = Amount(s.kv, "m**3/h", role="flow_coefficient"), (valve_d, "mm")
        # N2 = 1.60e-3 holds for Kv in m³/h and d in mm only.
        result.work(f"Spray valve piping geometry factor ({name} steam flow)",
                    "Fp = 1/√(1 + Σζ/N2·(Kv/d²)²),  N2 = 0.0016  [IEC 60534-2-1 clause 7; m³/h, mm]",
                    "1/sqrt(1 + sum_zeta/0.0016*(Kv/(d*d))**2)", s.piping_factor, units_fixed=True,
                    sum_zeta=(sum_zeta, ""), Kv=kv, d=d)
        if inlet_d is not None:
            result.work(f"Spray valve FLP ({name} steam flow)",
                        "FLP = FL/√(1 + FL²·Σζ1/N2·(Kv/d²)²),  N2 = 0.0016  [IEC 60534-2-1 clause 7; m³/h, mm]",
                        "FL/sqrt(1 + FL*FL*sum_zeta1/0.0016*(Kv/(d*d))**2)", s.combined_fl, units_fixed=True,
                        FL=(fl, ""), sum_zeta1=(zeta_in, ""), Kv=kv, d=d)
        result.work(f"Spray valve choked differential ({name} steam flow)",
                    "Δp_choked = (FLP/Fp)²·(p1 − FF·pv)  [IEC 60534-2-1 clause 6.2, with fittings]"
                    + ("" if inlet_d is not None else ", FLP = FL (no reducer before the valve)"),
                    "(FLP/Fp)*(FLP/Fp)*(p1 - FF*pv)", s.choked_differential / 1e2, "bar",
                    FLP=(s.combined_fl, ""), Fp=(s.piping_factor, ""), p1=p1, FF=(ff, ""), pv=p_v)


def _cavitation_check(s, verdict, p_out, pv, ratio, at_flow, result):
    """The valve's differential against the incipient-cavitation differential.

    With FLP/Fp ≤ 1 and pv below p1, the choked differential lies above the incipient one, and flashing
    (p2 < pv) means Δp > p1 − pv, above it too: every indication but "none expected" has Δp at or above
    Kc·(p1 − pv), so that one limit gives the verdict. ``ratio`` names the factor in Kc (FL, or FLP/Fp
    with fittings, then taken ``at_flow``, where it is lowest).
    """
    where = f" at the {at_flow} steam flow" if at_flow else ""
    basis = ("Δp = {dp:.2f}, choked at {dp_choked:.2f}, incipient cavitation from {dp_incipient:.2f}" + where
             + f" (Kc = 0.8·{ratio}² = {{kc:.3f}}, common practice); outlet {{p2:.4g}} against the "
             "vapour pressure {pv:.4g}")
    dp = (s.pressure_differential / 1e2, "bar", "difference")
    kc = INCIPIENT_FRACTION_OF_FL2 * (s.combined_fl / s.piping_factor) ** 2
    amounts = dict(dp=dp, dp_choked=(s.choked_differential / 1e2, "bar", "difference"),
                   dp_incipient=(s.incipient_differential / 1e2, "bar", "difference"), kc=(kc, ""),
                   p2=(p_out / 1e5, "bar"), pv=(pv / 1e5, "bar"))
    result.check_limit("Spray valve cavitation", dp, [("<", amounts["dp_incipient"], "warn")],
                       lambda status: Phrase.of(_cavitation_words(verdict, status) + basis, **amounts),
                       source="common practice")


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
