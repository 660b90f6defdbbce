"""The let-down station's equipment: valve sizing over the flow range, fail-open flow,
line velocities, and the power the valve throws away.

Called by :func:`steamcalc.calcs.letdown.calculate` with the states it has found; adds
its values, steps and checks to the same Result.
"""

from __future__ import annotations

from ..equipment.piping import DN_TO_NPS, line_velocity, pipe_inner_diameter
from ..equipment.valve import kv_to_cv, piping_factors, size_steam_valve, valve_flow, valve_travel
from ..errors import InputError, OutOfRangeError
from ..steam import SteamState
from .economics import annual_energy, annual_value, missing_site_data

#: Defaults stated as assumptions when not given (common practice for globe control valves).
DEFAULT_XT = 0.70
DEFAULT_FL = 0.90
DEFAULT_FD = 1.0
DEFAULT_RANGEABILITY = 50.0
DEFAULT_TURBINE_EFFICIENCY = 0.55
#: Line velocity limits, m/s (common practice): saturated or wet steam 25-35, superheated 40-50.
DEFAULT_MAX_VELOCITY_WET = 30.0
DEFAULT_MAX_VELOCITY_SUPERHEATED = 45.0
DEFAULT_SCHEDULE = "40"
#: Travel limits (common practice): fail outside 10-90 %, warn outside 20-80 %.
TRAVEL_FAIL = (0.10, 0.90)
TRAVEL_WARN = (0.20, 0.80)
#: Dead state for exergy when the site gives no ambient temperature, K.
DEFAULT_AMBIENT = 288.15


def _kappa(state, result):
    """Isentropic exponent for sizing: κ = w²ρ/p from IF97, or Zeuner's rule for wet steam."""
    if state.isentropic_exponent is not None:
        return state.isentropic_exponent
    kappa = 1.035 + 0.1 * state.dryness
    result.assumptions.append(f"Wet inlet steam: isentropic exponent κ = 1.035 + 0.1·x = {kappa:.4f} (Zeuner's "
                              "rule, from memory); IEC 60534-2-1 compressible sizing is approximate for wet steam")
    return kappa


def flow_cases(inputs):
    """(name, mass flow kg/s) for each flow case given, low to high."""
    cases = []
    if inputs.min_flow is not None:
        cases.append(("minimum", inputs.min_flow))
    cases.append(("normal", inputs.mass_flow))
    if inputs.max_flow is not None:
        cases.append(("maximum", inputs.max_flow))
    return cases


def _diameters(inputs):
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    sizes = {}
    for name in ("inlet_size", "outlet_size", "valve_size"):
        text = getattr(inputs, name)
        section = "valve" if name == "valve_size" else "lines"
        sizes[name] = None if text is None else pipe_inner_diameter(text, schedule, field=f"{section}.{name}")
    return sizes, schedule


def _valve_geometry(inputs):
    """xT and the valve and pipe diameters (mm) that enter the sizing; None where not given."""
    sizes, _ = _diameters(inputs)
    mm = {k: (None if v is None else v * 1000) for k, v in sizes.items()}
    with_fittings = mm["valve_size"] is not None and (mm["inlet_size"] or mm["outlet_size"])
    diameters = (mm["valve_size"], mm["inlet_size"], mm["outlet_size"]) if with_fittings else (None, None, None)
    return (inputs.xt if inputs.xt is not None else DEFAULT_XT), diameters


def required_kv(inputs, inlet, kappa, mass_flow):
    """Sizing of the let-down valve at one flow (kg/s), with the case's xT and fittings.

    Returns
    -------
    steamcalc.equipment.valve.ValveSizing
    """
    xt, (valve_d, inlet_d, outlet_d) = _valve_geometry(inputs)
    return size_steam_valve(mass_flow * 3600, inputs.inlet_pressure / 1e3, inputs.outlet_pressure / 1e3,
                            inlet.density, kappa, xt, valve_d=valve_d, inlet_d=inlet_d, outlet_d=outlet_d)


def rated_travel(inputs, kv):
    """Travel (0 to 1) of the rated valve at a required Kv, with the case's characteristic."""
    characteristic = inputs.characteristic or "equal-percentage"
    rangeability = inputs.rangeability if inputs.rangeability is not None else DEFAULT_RANGEABILITY
    return valve_travel(min(kv, inputs.rated_kv), inputs.rated_kv, characteristic, rangeability)


def valve_section(inputs, inlet, result):
    """Kv, Cv, choked flag and travel for each flow case; fail-open flow."""
    fl = inputs.fl if inputs.fl is not None else DEFAULT_FL
    fd = inputs.fd if inputs.fd is not None else DEFAULT_FD
    if inputs.xt is None:
        result.assumptions.append(f"Valve xT = {DEFAULT_XT} (globe valve, common practice; not given)")
    if inputs.fl is None:
        result.assumptions.append(f"Valve FL = {DEFAULT_FL} (globe valve, common practice; not given)")
    kappa = _kappa(inlet, result)
    if inlet.cp is not None:
        result.assumptions.append(
            f"Isentropic exponent κ = w²ρ/p = {kappa:.4f} from IF97 at the inlet (the specific-heat ratio "
            f"cp/cv = {inlet.cp / inlet.cv:.4f} differs by {100 * abs(inlet.cp / inlet.cv / kappa - 1):.1f} %; "
            "κ is the property the expansion of real steam follows)")
    result.assumptions.append(f"FL = {fl:g} and Fd = {fd:g} are recorded for the valve; for steam (compressible, "
                              "turbulent) the sizing uses xT, and FL, Fd matter only for liquid or laminar flow")
    with_fittings = _valve_geometry(inputs)[1][0] is not None
    p1_kpa, p2_kpa = inputs.inlet_pressure / 1e3, inputs.outlet_pressure / 1e3
    result.add("isentropic_exponent", "Isentropic exponent at the inlet", kappa)
    sizing = {}
    for name, flow in flow_cases(inputs):
        s = required_kv(inputs, inlet, kappa, flow)
        sizing[name] = s
        result.add(f"valve_kv_{name}", f"Required Kv, {name} flow", s.kv, "m**3/h")
        result.add(f"choked_{name}", f"Choked flow, {name} flow", s.choked)
    design_case = "maximum" if "maximum" in sizing else "normal"
    design = sizing[design_case]
    result.step("Pressure differential ratio", "x = (p1 − p2) / p1",
                f"x = ({p1_kpa:.1f} − {p2_kpa:.1f}) kPa / {p1_kpa:.1f} kPa", design.x)
    result.step("Choked limit", "x_choked = Fγ·xT  (Fγ = κ/1.40)" + ("; xTP with fittings" if with_fittings else ""),
                f"x_choked = ({kappa:.4f}/1.40) × {design.xtp:.4f}", design.x_choked)
    result.step("Expansion factor", "Y = 1 − min(x, x_choked) / (3·x_choked)",
                f"Y = 1 − {min(design.x, design.x_choked):.4f} / (3 × {design.x_choked:.4f})", design.expansion_factor)
    design_flow = dict(flow_cases(inputs))[design_case]
    result.step(f"Required Kv ({design_case} flow)", "Kv = W / (N6·Fp·Y·√(x_siz·p1·ρ1)), N6 = 3.16",
                f"Kv = {design_flow * 3600:.1f} kg/h / (3.16 × {design.piping_factor:.4f} × {design.expansion_factor:.4f}"
                f" × √({min(design.x, design.x_choked):.4f} × {p1_kpa:.1f} kPa × {inlet.density:.4f} kg/m³))",
                design.kv, "m**3/h")
    result.add("valve_kv", f"Required Kv (sized on the {design_case} flow)", design.kv, "m**3/h")
    result.add("valve_cv", f"Required Cv (sized on the {design_case} flow)", kv_to_cv(design.kv), "")
    result.add("choked", f"Choked flow at the {design_case} flow", design.choked)
    result.add("piping_geometry_factor", "Piping geometry factor Fp", design.piping_factor)
    if design.choked:
        result.check("Choked flow", "warn",
                     f"x = {design.x:.3f} ≥ Fγ·xT = {design.x_choked:.3f}: the valve is choked; flow no longer rises "
                     "with a lower outlet pressure, and noise is likely; consider a low-noise trim or a two-stage let-down")
    else:
        result.check("Choked flow", "pass", f"x = {design.x:.3f} below the choked limit {design.x_choked:.3f}")
    if inputs.rated_kv is not None:
        _rated_valve(inputs, inlet, kappa, sizing, design, result)
    return sizing


def _rated_valve(inputs, inlet, kappa, sizing, design, result):
    kvs = inputs.rated_kv
    characteristic = inputs.characteristic or "equal-percentage"
    rangeability = inputs.rangeability if inputs.rangeability is not None else DEFAULT_RANGEABILITY
    result.add("rated_kv", "Rated Kv of the selected valve", kvs, "m**3/h")
    if design.kv > kvs:
        result.check("Rated Kv sufficient", "fail",
                     f"the selected valve (Kvs {kvs:.2f} m³/h) is smaller than the required Kv {design.kv:.2f} m³/h")
    else:
        result.check("Rated Kv sufficient", "pass", f"Kvs {kvs:.2f} m³/h ≥ required {design.kv:.2f} m³/h")
    for name, s in sizing.items():
        travel = rated_travel(inputs, s.kv)
        result.add(f"valve_travel_{name}", f"Valve travel, {name} flow", 100.0 * travel, "percent")
        if travel < TRAVEL_FAIL[0] or travel > TRAVEL_FAIL[1]:
            status = "fail"
        elif travel < TRAVEL_WARN[0] or travel > TRAVEL_WARN[1]:
            status = "warn"
        else:
            status = "pass"
        result.check(f"Valve travel at {name} flow", status,
                     f"{100 * travel:.0f} % travel ({characteristic}, R = {rangeability:g}); "
                     "10-90 % usable, 20-80 % preferred (common practice)")
    result.add("valve_travel", "Valve travel at the normal flow", result.value("valve_travel_normal"), "percent")
    result.step("Valve travel (normal flow)",
                "h = Kv/Kvs (linear) or h = 1 + ln(Kv/Kvs)/ln R (equal-percentage)",
                f"Kv/Kvs = {sizing['normal'].kv:.3f} / {kvs:.3f}", result.value("valve_travel_normal"), "percent")

    # Fail-open: the rated valve wide open at the inlet pressure against the downstream relief set pressure.
    if inputs.relief_set_pressure is not None:
        p_down = inputs.relief_set_pressure
        where = "the relief set pressure"
    else:
        p_down = inputs.outlet_pressure
        where = "the normal outlet pressure (no relief set pressure given; the flow at a higher set pressure is lower)"
    if p_down >= inputs.inlet_pressure:
        raise InputError("the relief set pressure must be below the inlet pressure", field="valve.relief_set_pressure")
    # Wide open, the fittings act on the rated Kv, not on the Kv the design flow needs.
    xt, (valve_d, inlet_d, outlet_d) = _valve_geometry(inputs)
    fp, xtp = piping_factors(kvs, valve_d, inlet_d, outlet_d, xt) if valve_d is not None else (1.0, xt)
    flow = valve_flow(kvs, inputs.inlet_pressure / 1e3, p_down / 1e3, inlet.density, kappa, xtp, fp)
    result.add("fail_open_flow", "Fail-open flow of the rated valve (for the relief device check)", flow, "kg/h")
    result.step("Fail-open flow", "W = N6·Fp·Kvs·Y·√(x_siz·p1·ρ1) at p2 = downstream relief set pressure",
                f"Kvs = {kvs:.2f} m³/h, p1 = {inputs.inlet_pressure / 1e5:.4g} bar(a), p2 = {p_down / 1e5:.4g} bar(a)",
                flow, "kg/h")
    result.check("Fail-open flow for the relief designer", "warn",
                 f"if the valve (or its bypass) fails open it passes about {flow:,.0f} kg/h against {where}: the "
                 "downstream relief device must be checked against this flow, to the local pressure-equipment code")


def _smallest_size(mass_flow, density, limit, schedule):
    for dn, _ in sorted(DN_TO_NPS.items()):
        try:
            d = pipe_inner_diameter(f"DN{dn}", schedule)
        except InputError:
            continue
        if line_velocity(mass_flow, density, d) <= limit:
            return f"DN{dn}"
    return None


def line_section(inputs, inlet, throttled, outlet, result):
    """Line velocities at the design flow; the smallest standard sizes under the limits."""
    design_flow = inputs.max_flow if inputs.max_flow is not None else inputs.mass_flow
    sizes, schedule = _diameters(inputs)
    spray_ratio = result.value("outlet_mass_flow") / result.value("inlet_mass_flow")
    wet_limit = inputs.max_velocity_wet or DEFAULT_MAX_VELOCITY_WET
    hot_limit = inputs.max_velocity_superheated or DEFAULT_MAX_VELOCITY_SUPERHEATED
    if inputs.max_velocity_wet is None or inputs.max_velocity_superheated is None:
        result.assumptions.append(f"Line velocity limits {wet_limit:g} m/s for saturated or wet steam and "
                                  f"{hot_limit:g} m/s for superheated steam (common practice)")
    result.assumptions.append(f"Line velocities at the {'maximum' if inputs.max_flow else 'normal'} flow, "
                              f"schedule {schedule} pipe (ASME B36.10M)")

    def limit(state):
        return hot_limit if state.phase == "superheated vapour" and (state.superheat or 0) > 5.0 else wet_limit

    for key, state, flow, size_key, label in (
            ("inlet", inlet, design_flow, "inlet_size", "Inlet line"),
            ("outlet", outlet, design_flow * spray_ratio, "outlet_size", "Outlet line")):
        suggested = _smallest_size(flow, state.density, limit(state), schedule)
        result.add(f"suggested_{key}_size", f"{label}: smallest size under {limit(state):g} m/s",
                   suggested or "larger than DN600")
        if sizes[size_key] is None:
            continue
        velocity = line_velocity(flow, state.density, sizes[size_key])
        result.add(f"{key}_velocity", f"{label} velocity ({getattr(inputs, size_key)})", velocity, "m/s")
        if velocity > limit(state):
            detail = (f"{velocity:.1f} m/s in {getattr(inputs, size_key)} exceeds {limit(state):g} m/s: "
                      + ("a noisy and erosive station; " if key == "outlet" else "")
                      + f"{suggested or 'a size above DN600'} keeps under the limit (common practice)")
            result.check(f"{label} velocity", "warn", detail)
        else:
            result.check(f"{label} velocity", "pass", f"{velocity:.1f} m/s within {limit(state):g} m/s")
    if throttled is not outlet and sizes["outlet_size"] is not None:
        velocity = line_velocity(design_flow, throttled.density, sizes["outlet_size"])
        result.add("valve_outlet_velocity", "Velocity after the valve, before the desuperheater", velocity, "m/s")


def power_section(inputs, inlet, throttled, site, result):
    """Isentropic drop, recoverable turbine power and its yearly value, exergy destroyed in the valve."""
    try:
        isentropic = SteamState.from_ps(inputs.outlet_pressure, inlet.entropy)
    except OutOfRangeError as exc:
        raise exc.for_field("outlet_pressure") from None
    drop = inlet.enthalpy - isentropic.enthalpy
    efficiency = inputs.isentropic_efficiency
    if efficiency is None:
        efficiency = DEFAULT_TURBINE_EFFICIENCY
        result.assumptions.append(f"Back-pressure turbine isentropic efficiency {DEFAULT_TURBINE_EFFICIENCY} "
                                  "(small single-stage machine, common practice; not given)")
    power = inputs.mass_flow * efficiency * drop
    result.step("Isentropic enthalpy drop", "Δh_s = h1 − h(p2, s1)",
                f"Δh_s = {inlet.enthalpy / 1e3:.2f} − {isentropic.enthalpy / 1e3:.2f} kJ/kg", drop / 1e3, "kJ/kg")
    result.step("Recoverable shaft power", "P = m·η_s·Δh_s",
                f"P = {inputs.mass_flow:.4f} kg/s × {efficiency:g} × {drop / 1e3:.2f} kJ/kg", power / 1e3, "kW")
    result.add("isentropic_enthalpy_drop", "Isentropic enthalpy drop, inlet to outlet pressure", drop / 1e3, "kJ/kg")
    result.add("recoverable_power", "Shaft power a back-pressure turbine would recover", power / 1e3, "kW")
    result.assumptions.append("Recoverable power at the normal flow; a turbine in place of the valve would deliver "
                              "wetter or cooler steam (less heat per kg) to the low-pressure users")
    if not missing_site_data(site, ("operating_hours", "power_price")):
        energy = annual_energy(power, site.operating_hours)
        value = annual_value(energy, site.power_price)
        result.add("annual_recoverable_energy", "Electrical energy a year a turbine would recover (shaft)", energy, "MWh")
        result.add("annual_recoverable_value", "Value a year at the site's power price", value, site.power_price.currency)
        result.step("Value a year", "V = P·t·power price",
                    f"V = {power / 1e3:.1f} kW × {site.operating_hours:g} h × {site.power_price}", value,
                    site.power_price.currency)
    ambient = site.ambient_temperature
    if ambient is None:
        ambient = DEFAULT_AMBIENT
        result.assumptions.append(f"Dead state for exergy {DEFAULT_AMBIENT - 273.15:g} °C (site gives no ambient)")
    destroyed = ambient * inputs.mass_flow * (throttled.entropy - inlet.entropy)
    result.step("Exergy destroyed in the valve", "Ẋ_d = T0·m·(s2 − s1)  (Gouy–Stodola)",
                f"Ẋ_d = {ambient:.2f} K × {inputs.mass_flow:.4f} kg/s × ({throttled.entropy / 1e3:.5f} − "
                f"{inlet.entropy / 1e3:.5f}) kJ/(kg·K)", destroyed / 1e3, "kW")
    result.add("exergy_destroyed", "Exergy destroyed in the valve", destroyed / 1e3, "kW")
    result.check("Second-law check", "pass" if destroyed > 0 else "fail",
                 f"entropy rises across the valve by {(throttled.entropy - inlet.entropy) / 1e3:.5f} kJ/(kg·K)")
