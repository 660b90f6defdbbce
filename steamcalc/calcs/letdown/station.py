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
from ..base import bar_a, deg_c
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
        loss = line_drop(state, mass_flow, size, schedule, length, k, f"lines.{key}_size")
        per_100m = loss.pressure_drop * 100.0 / length
        result.step(f"{label} pressure drop", "Δp = (f·L/D + ΣK)·ρv²/2, 1/√f = −2 log10(ε/(3.7D) + 2.51/(Re√f))",
                    f"{size}, L = {length:g} m, ΣK = {k or 0:g}, ρ = {state.density:.3f} kg/m³, v = {loss.velocity:.1f} m/s, "
                    f"Re = {loss.reynolds:.3g}, f = {loss.friction_factor:.4f}", loss.pressure_drop / 1e5, "bar")
        result.add(f"{key}_line_pressure_drop", f"{label} pressure drop ({case} flow)", loss.pressure_drop / 1e5, "bar")
        result.add(f"{key}_line_pressure_drop_per_100m", f"{label} pressure drop per 100 m", per_100m / 1e5, "bar")
        if loss.pressure_drop > COMPRESSIBLE_FRACTION * state.pressure:
            result.check(f"{label} pressure drop", "warn",
                         f"{loss.pressure_drop / 1e5:.3f} bar difference is over {100 * COMPRESSIBLE_FRACTION:g} % of "
                         f"{bar_a(state.pressure)}: the incompressible Darcy–Weisbach form understates it; enlarge the line")
        elif per_100m > DROP_LIMIT_PER_100M:
            result.check(f"{label} pressure drop", "warn",
                         f"{per_100m / 1e5:.2f} bar difference per 100 m in {size} exceeds "
                         f"{DROP_LIMIT_PER_100M / 1e5:g} (common practice): consider the next size up")
        else:
            result.check(f"{label} pressure drop", "pass",
                         f"{loss.pressure_drop / 1e5:.3f} bar difference, {per_100m / 1e5:.2f} bar difference per 100 m "
                         f"(limit {DROP_LIMIT_PER_100M / 1e5:g}, common practice)")


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
    result.step(f"Valve noise ({loudest} flow)", "L_pAe,1m  [IEC 60534-8-3: stream power, acoustic efficiency, "
                "pipe transmission loss, A-weighted]",
                ", ".join(f"{n} {v:.1f} dB(A)" for n, v in levels.items()), levels[loudest], "dB")
    if levels[loudest] > limit:
        result.check("Valve noise", "warn", f"{levels[loudest]:.1f} dB(A) at 1 m at the {loudest} flow exceeds "
                     f"{limit:g} dB(A): a low-noise trim, acoustic lagging, a heavier downstream wall or a two-stage "
                     "let-down")
    else:
        result.check("Valve noise", "pass", f"{levels[loudest]:.1f} dB(A) at 1 m at the {loudest} flow, within {limit:g} dB(A)")
    if machs:
        worst = max(machs, key=machs.get)
        result.add("valve_outlet_mach_maximum", "Valve outlet Mach number, highest", machs[worst])
        status = "warn" if machs[worst] > OUTLET_MACH_LIMIT else "pass"
        result.check("Valve outlet Mach number", status,
                     f"Mach {machs[worst]:.2f} in the {port} outlet at the {worst} flow "
                     f"({'above' if status == 'warn' else 'within'} {OUTLET_MACH_LIMIT:g}, common practice)"
                     + ("; a larger outlet or an expander after the valve" if status == "warn" else ""))
    _two_stage(inputs, levels[loudest], limit, geometry, result)


def _two_stage(inputs, noise, limit, geometry, result):
    case = "maximum" if inputs.max_flow is not None else "normal"
    inlet = result.states[f"valve_inlet_{case}"]
    p1, p2 = inlet.pressure, inputs.outlet_pressure
    ratio = p1 / p2
    if noise <= limit and ratio <= TWO_STAGE_RATIO:
        result.check("Single-stage let-down", "pass", f"pressure ratio {ratio:.2f} (up to {TWO_STAGE_RATIO:g}, common "
                     f"practice) and noise within {limit:g} dB(A): one stage suffices")
        return
    flow = dict(flow_cases(inputs))[case]
    p_mid = math.sqrt(p1 * p2)
    kv1, noise1, middle = stage_noise(inputs, inlet, p_mid, flow, geometry)
    kv2, noise2, _ = stage_noise(inputs, middle, p2, flow, geometry)
    why = "noise above the limit" if noise > limit else f"pressure ratio {ratio:.2f} above {TWO_STAGE_RATIO:g}"
    result.step("Two-stage intermediate pressure (equal pressure ratios)", "p_i = √(p1·p2)",
                f"p_i = √({bar_a(p1)} × {bar_a(p2)})", p_mid / 1e5, "bar")
    result.add("two_stage_intermediate_pressure", "Two-stage let-down: intermediate pressure (equal ratios)",
               p_mid / 1e5, "bar")
    result.add("two_stage_kv_first", "Two-stage let-down: first-stage Kv", kv1, "m**3/h")
    result.add("two_stage_kv_second", "Two-stage let-down: second-stage Kv", kv2, "m**3/h")
    result.add("two_stage_noise_first", "Two-stage let-down: first-stage noise at 1 m, A-weighted", noise1, "dB")
    result.add("two_stage_noise_second", "Two-stage let-down: second-stage noise at 1 m, A-weighted", noise2, "dB")
    result.check("Two-stage let-down proposed", "warn",
                 f"{why} at the {case} flow: two valves in series with equal pressure ratios {math.sqrt(ratio):.2f} "
                 f"each, intermediate {bar_a(p_mid)}; Kv {kv1:.1f} and {kv2:.1f} m³/h, noise {noise1:.1f} and "
                 f"{noise2:.1f} dB(A) at 1 m (the split is by equal pressure ratios, not by equal noise; both "
                 f"stages on the {inputs.outlet_size} downstream pipe)"
                 + (f"; still above {limit:g} dB(A): low-noise trims or acoustic lagging as well"
                    if max(noise1, noise2) > limit else ""))


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
    result.step("Spray failure temperature", "T = T(p2, h1) at the hottest flow case (no spray)",
                f"{worst} flow, h1 = {result.states[f'valve_inlet_{worst}'].enthalpy / 1e3:.2f} kJ/kg at {bar_a(inputs.outlet_pressure)}",
                hottest - 273.15, "degC")
    if inputs.design_temperature is not None:
        if hottest > inputs.design_temperature:
            result.check("Downstream design temperature", "fail",
                         f"with the spray failed the steam reaches {deg_c(hottest)}, above the design temperature "
                         f"{deg_c(inputs.design_temperature)}: loss of spray is a credible failure; raise the design "
                         "temperature or trip the let-down on high temperature")
        else:
            result.check("Downstream design temperature", "pass",
                         f"with the spray failed {deg_c(hottest)}, within the design temperature "
                         f"{deg_c(inputs.design_temperature)}")
    p_set = relief_set_pressure(inputs)
    if inputs.design_pressure is not None and p_set is not None:
        if p_set > inputs.design_pressure + 1.0:
            result.check("Relief set pressure within design pressure", "fail",
                         f"set pressure {bar_a(p_set)} is above the downstream design pressure "
                         f"{bar_a(inputs.design_pressure)}: set the relief valve at or below the design pressure")
        else:
            result.check("Relief set pressure within design pressure", "pass",
                         f"set pressure {bar_a(p_set)} at or below the design pressure {bar_a(inputs.design_pressure)}")
