"""The let-down station around its valve: line pressure drops, the valve's aerodynamic noise
and outlet Mach number at each flow case, a two-stage proposal, and the downstream design
conditions.

Called by :func:`steamcalc.calcs.letdown.calculation.calculate` after the valve section; adds its
values, steps and checks to the same Result.
"""

from __future__ import annotations

import math

from ...equipment.line_loss import COMPRESSIBLE_FRACTION, DROP_LIMIT_PER_100M
from ...equipment.noise import DEFAULT_NOISE_LIMIT, OUTLET_MACH_LIMIT, outlet_mach, parse_sound_level, valve_noise
from ...equipment.piping import pipe_dimensions, pipe_inner_diameter
from ...equipment.valve import size_steam_valve
from ...properties.steam import SteamState
from ...units.amounts import Amount, Phrase
from .equipment import (
    DEFAULT_FD, DEFAULT_FL, DEFAULT_SCHEDULE, _valve_geometry, case_inlet_pressure, flow_cases, line_drop,
    relief_set_pressure, sizing_kappa,
)

#: Pressure ratio p1/p2 above which a two-stage let-down is proposed (common practice: beyond
#: about 5 a single trim runs far past choking, with high noise and trim wear).
TWO_STAGE_RATIO = 5.0


def line_loss_section(inputs, result):
    """Inlet and outlet line pressure drops at the maximum flow, and per 100 m."""
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    case = "maximum" if inputs.max_flow is not None else "normal"
    flow = dict(flow_cases(inputs))[case]
    spray_ratio = result.value("outlet_mass_flow") / result.value("inlet_mass_flow")
    outlet = result.states["outlet"]
    upstream = result.states.get(f"valve_inlet_{case}")
    lines = []
    if inputs.inlet_length is not None and inputs.inlet_size is not None and upstream is not None:
        header = SteamState.from_ph(case_inlet_pressure(inputs, case), upstream.enthalpy)
        lines.append(("inlet", "Inlet line", header, flow, inputs.inlet_size, inputs.inlet_length,
                      inputs.inlet_fittings_k))
    if inputs.outlet_length is not None and inputs.outlet_size is not None:
        lines.append(("outlet", "Outlet line", outlet, flow * spray_ratio, inputs.outlet_size, inputs.outlet_length,
                      inputs.outlet_fittings_k))
    if not lines:
        return
    result.assumptions.append(f"Line pressure drops at the {case} flow: Darcy–Weisbach with the Colebrook friction "
                              "factor, steel roughness 0.045 mm (common practice), density at the line inlet; "
                              f"limit {DROP_LIMIT_PER_100M / 1e5:g} bar difference per 100 m (common practice)")
    for key, label, state, mass_flow, size, length, k in lines:
        field = f"lines.{key}_size"
        loss = line_drop(state, mass_flow, size, schedule, length, k, field)
        per_100m = loss.pressure_drop * 100.0 / length
        # f comes from Colebrook's implicit equation (an operand); the Darcy–Weisbach product is the arithmetic.
        result.work(f"{label} pressure drop",
                    "Δp = (f·L/D + ΣK)·ρv²/2, 1/√f = −2 log10(ε/(3.7D) + 2.51/(Re√f))",
                    "(f*L/D + sum_K)*rho*v*v/2", loss.pressure_drop / 1e5, "bar", f=(loss.friction_factor, ""),
                    L=(length, "m"), D=(1000 * pipe_inner_diameter(size, schedule, field=field), "mm"),
                    sum_K=(k or 0.0, ""), rho=(state.density, "kg/m**3"), v=(loss.velocity, "m/s"))
        result.add(f"{key}_line_pressure_drop", f"{label} pressure drop ({case} flow)", loss.pressure_drop / 1e5, "bar")
        result.add(f"{key}_line_pressure_drop_per_100m", f"{label} pressure drop per 100 m", per_100m / 1e5, "bar")
        _line_drop_check(label, size, state.pressure, loss.pressure_drop, length, result)


def _bar_difference(pascals):
    return Amount(pascals / 1e5, "bar", "difference")


def _line_drop_check(label, size, pressure, drop, length, result):
    """The line's drop against the two limits on it: a tenth of the line's pressure, beyond which the
    incompressible form understates it, and the gradient limit over the line's length (common practice)."""
    loss, valid_up_to = _bar_difference(drop), _bar_difference(COMPRESSIBLE_FRACTION * pressure)
    over_length = _bar_difference(DROP_LIMIT_PER_100M * length / 100.0)
    per_100m, gradient_limit = _bar_difference(drop * 100.0 / length), _bar_difference(DROP_LIMIT_PER_100M)
    if drop > COMPRESSIBLE_FRACTION * pressure:
        detail = Phrase.of(f"{{loss:.3f}} is over {100 * COMPRESSIBLE_FRACTION:g} % of {{pressure:.4g}}: the "
                           "incompressible Darcy–Weisbach form understates it; enlarge the line",
                           loss=loss, pressure=Amount(pressure / 1e5, "bar"))
    elif drop * 100.0 / length > DROP_LIMIT_PER_100M:
        detail = Phrase.of(f"{{per_100m:.2f}} per 100 m in {size} exceeds {{limit:g}} (common practice): consider "
                           "the next size up", per_100m=per_100m, limit=gradient_limit)
    else:
        detail = Phrase.of("{loss:.3f}, {per_100m:.2f} per 100 m (limit {limit:g}, common practice)",
                           loss=loss, per_100m=per_100m, limit=gradient_limit)
    result.check_limit(f"{label} pressure drop", loss, [("<=", valid_up_to, "warn"), ("<=", over_length, "warn")],
                       detail, source="common practice")


def noise_geometry(inputs):
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    port = inputs.valve_outlet_size or inputs.valve_size or inputs.outlet_size
    field = "valve.valve_outlet_size" if inputs.valve_outlet_size else "valve.valve_size"
    port_d = pipe_inner_diameter(port, schedule, field=field)
    pipe_d, wall = pipe_dimensions(inputs.outlet_size, schedule, field="lines.outlet_size")
    return port, port_d, pipe_d, wall


def stage_noise(inputs, inlet, p2, flow, geometry, kv=None, outlet=None):
    """Kv, noise (dB(A)) and outlet state of one stage from an inlet state to p2 (the Kv sized
    here unless given; the outlet state, isenthalpic at p2, found here unless given)."""
    kappa = sizing_kappa(inlet)
    if kv is None:
        xt, (valve_d, inlet_d, outlet_d) = _valve_geometry(inputs)
        kv = size_steam_valve(flow * 3600, inlet.pressure / 1e3, p2 / 1e3, inlet.density, kappa, xt,
                              valve_d=valve_d, inlet_d=inlet_d, outlet_d=outlet_d).kv
    outlet = SteamState.from_ph(p2, inlet.enthalpy) if outlet is None else outlet
    _, port_d, pipe_d, wall = geometry
    level = valve_noise(flow, inlet, outlet, kappa, kv, port_d, pipe_d, wall,
                        inputs.fd if inputs.fd is not None else DEFAULT_FD,
                        inputs.fl if inputs.fl is not None else DEFAULT_FL)
    return kv, level, outlet


def noise_section(inputs, result):
    """IEC 60534-8-3 noise at each flow case, the valve outlet Mach number, a two-stage proposal."""
    limit = parse_sound_level(inputs.noise_limit) if inputs.noise_limit is not None else DEFAULT_NOISE_LIMIT
    if inputs.outlet_size is None or (inputs.valve_size is None and inputs.valve_outlet_size is None):
        result.assumptions.append("Valve noise (IEC 60534-8-3) and outlet Mach number not predicted: they need "
                                  "valve.valve_size and lines.outlet_size")
        return
    geometry = noise_geometry(inputs)
    port, _, pipe_d, wall = geometry
    if inputs.noise_limit is None:
        result.assumptions.append(f"Noise limit {DEFAULT_NOISE_LIMIT:g} dB(A) at 1 m (common practice)")
    result.assumptions.append(
        f"Valve noise by IEC 60534-8-3 (fluids' implementation) at each flow case's Kv and pressures, 1 m from a "
        f"schedule {inputs.schedule or DEFAULT_SCHEDULE} {inputs.outlet_size} steel pipe (bore {1000 * pipe_d:.1f} mm, wall "
        f"{1000 * wall:.2f} mm), valve outlet {port}, FL and Fd of the valve, without the reducers' FLP")
    levels, machs = {}, {}
    for name, flow in flow_cases(inputs):
        inlet = result.states[f"valve_inlet_{name}"]
        _, level, outlet = stage_noise(inputs, inlet, inputs.outlet_pressure, flow, geometry,
                                        kv=result.value(f"valve_kv_{name}"))
        result.states[f"valve_outlet_{name}"] = outlet
        levels[name] = level
        result.add(f"valve_noise_{name}", f"Valve noise at 1 m, A-weighted, {name} flow", level, "dB")
        if outlet.speed_of_sound is not None:
            machs[name] = outlet_mach(flow, outlet, geometry[1])
            result.add(f"valve_outlet_mach_{name}", f"Valve outlet Mach number, {name} flow", machs[name])
    loudest = max(levels, key=levels.get)
    flow = dict(flow_cases(inputs))[loudest]
    # The IEC 60534-8-3 route (stream power, acoustic efficiency, transmission loss) is a procedure, not one
    # formula: the step names it with the operating point it was run at.
    result.work(f"Valve noise ({loudest} flow)", "L_pAe,1m  [IEC 60534-8-3: stream power, acoustic efficiency, "
                "pipe transmission loss, A-weighted]", "L_pAe(W, p1, p2, Kv)", levels[loudest], "dB",
                W=(flow * 3600, "kg/h"), p1=(result.states[f"valve_inlet_{loudest}"].pressure / 1e5, "bar"),
                p2=(inputs.outlet_pressure / 1e5, "bar"),
                Kv=Amount(result.value(f"valve_kv_{loudest}"), "m**3/h", role="flow_coefficient"))
    # A-weighted levels: the "(A)" follows each level's dB in the texts.
    level, most = (levels[loudest], "dB"), (limit, "dB")
    limit_source = "" if inputs.noise_limit is not None else "common practice"
    result.check_limit(
        "Valve noise", level, [("<=", most, "warn")],
        lambda status: Phrase.of(
            f"{{level:.1f}}(A) at 1 m at the {loudest} flow exceeds {{limit:g}}(A): a low-noise trim, acoustic "
            "lagging, a heavier downstream wall or a two-stage let-down" if status == "warn" else
            f"{{level:.1f}}(A) at 1 m at the {loudest} flow, within {{limit:g}}(A)", level=level, limit=most),
        source=limit_source)
    if machs:
        worst = max(machs, key=machs.get)
        result.add("valve_outlet_mach_maximum", "Valve outlet Mach number, highest", machs[worst])
        mach, most_mach = (machs[worst], ""), (OUTLET_MACH_LIMIT, "")
        result.check_limit(
            "Valve outlet Mach number", mach, [("<=", most_mach, "warn")],
            lambda status: Phrase.of(
                f"Mach {{mach:.2f}} in the {port} outlet at the {worst} flow "
                + ("(above {limit:g}, common practice); a larger outlet or an expander after the valve"
                   if status == "warn" else "(within {limit:g}, common practice)"), mach=mach, limit=most_mach),
            source="common practice")
    _two_stage(inputs, levels[loudest], limit, geometry, result)


def _two_stage(inputs, noise, limit, geometry, result):
    case = "maximum" if inputs.max_flow is not None else "normal"
    inlet = result.states[f"valve_inlet_{case}"]
    p1, p2 = inlet.pressure, inputs.outlet_pressure
    ratio = p1 / p2
    pressure_ratio, most_ratio = (ratio, ""), (TWO_STAGE_RATIO, "")
    if noise <= limit and ratio <= TWO_STAGE_RATIO:
        # The noise has its own check, within its limit here: the ratio is what this check judges.
        result.check_limit("Single-stage let-down", pressure_ratio, [("<=", most_ratio, "warn")],
                           Phrase.of("pressure ratio {ratio:.2f} (up to {most:g}, common practice) and noise within "
                                     "{limit:g}(A): one stage suffices", ratio=pressure_ratio, most=most_ratio,
                                     limit=(limit, "dB")), source="common practice")
        return
    flow = dict(flow_cases(inputs))[case]
    p_mid = math.sqrt(p1 * p2)
    kv1, noise1, middle = stage_noise(inputs, inlet, p_mid, flow, geometry)
    kv2, noise2, _ = stage_noise(inputs, middle, p2, flow, geometry)
    result.work("Two-stage intermediate pressure (equal pressure ratios)", "p_i = √(p1·p2)", "sqrt(p1*p2)",
                p_mid / 1e5, "bar", p1=(p1 / 1e5, "bar"), p2=(p2 / 1e5, "bar"))
    result.add("two_stage_intermediate_pressure", "Two-stage let-down: intermediate pressure (equal ratios)",
               p_mid / 1e5, "bar")
    result.add("two_stage_kv_first", "Two-stage let-down: first-stage Kv", kv1, "m**3/h")
    result.add("two_stage_kv_second", "Two-stage let-down: second-stage Kv", kv2, "m**3/h")
    result.add("two_stage_noise_first", "Two-stage let-down: first-stage noise at 1 m, A-weighted", noise1, "dB")
    result.add("two_stage_noise_second", "Two-stage let-down: second-stage noise at 1 m, A-weighted", noise2, "dB")
    # The proposal is made for the noise above its limit or, failing that, for the pressure ratio above its own:
    # the check judges whichever of the two called for it.
    # The stages' levels are written as today, dB(A) after the pair: a level is dB in either system.
    amounts = dict(stage_ratio=(math.sqrt(ratio), ""), p_mid=(p_mid / 1e5, "bar"),
                   kv1=Amount(kv1, "m**3/h", role="flow_coefficient"),
                   kv2=Amount(kv2, "m**3/h", role="flow_coefficient"), noise1=(noise1, ""), noise2=(noise2, ""))
    if noise > limit:
        quantity, most, why = (noise, "dB"), (limit, "dB"), "noise above the limit"
    else:
        quantity, most, why = pressure_ratio, most_ratio, "pressure ratio {ratio:.2f} above {most:g}"
        amounts.update(ratio=pressure_ratio, most=most_ratio)
    still_loud = max(noise1, noise2) > limit
    if still_loud:
        amounts["limit"] = (limit, "dB")
    result.check_limit(
        "Two-stage let-down proposed", quantity, [("<=", most, "warn")],
        Phrase.of(f"{why} at the {case} flow: two valves in series with equal pressure ratios {{stage_ratio:.2f}} "
                  "each, intermediate {p_mid:.4g}; flow coefficients {kv1:.1f} and {kv2:.1f}, noise {noise1:.1f} and "
                  "{noise2:.1f} dB(A) at 1 m (the split is by equal pressure ratios, not by equal noise; both stages "
                  f"on the {inputs.outlet_size} downstream pipe)"
                  + ("; still above {limit:g}(A): low-noise trims or acoustic lagging as well" if still_loud else ""),
                  **amounts), source="common practice" if noise <= limit or inputs.noise_limit is None else "")


def downstream_section(inputs, result):
    """The throttled temperature with the spray failed, and the relief set pressure, against the
    downstream design conditions."""
    temperatures = {}
    for name, _ in flow_cases(inputs):
        throttled = result.states.get(f"valve_outlet_{name}") or SteamState.from_ph(
            inputs.outlet_pressure, result.states[f"valve_inlet_{name}"].enthalpy)
        temperatures[name] = throttled.temperature
    # Cases within 1 mK are the same temperature: the first of them is named, so the choice does
    # not turn on the last digits of one property engine or the other.
    hottest_t = max(temperatures.values())
    worst = next(name for name, t in temperatures.items() if t >= hottest_t - 1e-3)
    hottest = temperatures[worst]
    result.add("spray_failure_temperature", "Throttled temperature with the spray failed (hottest flow case)",
               hottest - 273.15, "degC")
    result.work("Spray failure temperature", f"T = T(p2, h1) at the hottest flow case ({worst} flow; no spray)",
                "T(p2, h1)", hottest - 273.15, "degC", p2=(inputs.outlet_pressure / 1e5, "bar"),
                h1=(result.states[f"valve_inlet_{worst}"].enthalpy / 1e3, "kJ/kg"))
    if inputs.design_temperature is not None:
        reached, design = (hottest - 273.15, "degC"), (inputs.design_temperature - 273.15, "degC")
        result.check_limit(
            "Downstream design temperature", reached, [("<=", design, "fail")],
            lambda status: Phrase.of(
                "with the spray failed the steam reaches {reached:.2f}, above the design temperature {design:.2f}: "
                "loss of spray is a credible failure; raise the design temperature or trip the let-down on high "
                "temperature" if status == "fail" else
                "with the spray failed {reached:.2f}, within the design temperature {design:.2f}",
                reached=reached, design=design))
    p_set = relief_set_pressure(inputs)
    if inputs.design_pressure is not None and p_set is not None:
        set_at, design = (p_set / 1e5, "bar"), (inputs.design_pressure / 1e5, "bar")
        # 1 Pa of grace: a set pressure equal to the design pressure may come through another gauge conversion.
        result.check_limit(
            "Relief set pressure within design pressure", set_at, [("<=", ((inputs.design_pressure + 1.0) / 1e5, "bar"),
                                                                   "fail")],
            lambda status: Phrase.of(
                "set pressure {set_at:.4g} is above the downstream design pressure {design:.4g}: set the relief valve "
                "at or below the design pressure" if status == "fail" else
                "set pressure {set_at:.4g} at or below the design pressure {design:.4g}", set_at=set_at, design=design))
