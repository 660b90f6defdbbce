"""The let-down station around its valve: line pressure drops and the downstream design conditions
(the valve's noise and the two-stage proposal are in :mod:`steamcalc.calcs.letdown.valve_noise`).

Called by :func:`steamcalc.calcs.letdown.calculation.calculate` after the valve section; adds its
values, steps and checks to the same Result.
"""

from __future__ import annotations

from ...equipment.line_loss import COMPRESSIBLE_FRACTION, DROP_LIMIT_PER_100M
from ...equipment.piping import pipe_inner_diameter
from ...properties.steam import SteamState
from ...units.amounts import Amount, Phrase
from ...units.quantities import RECORD_UNITS, to_record_unit
from .equipment import DEFAULT_SCHEDULE, case_inlet_pressure, flow_cases, line_drop, relief_set_pressure


def line_loss_section(inputs, result):
    """Inlet and outlet line pressure drops at the maximum flow, and their gradients (per 100 m of line)."""
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
        # f comes from Colebrook's implicit equation (an operand); the Darcy–Weisbach product is the arithmetic.
        result.work(f"{label} pressure drop",
                    "Δp = (f·L/D + ΣK)·ρv²/2, 1/√f = −2 log10(ε/(3.7D) + 2.51/(Re√f))",
                    "(f*L/D + sum_K)*rho*v*v/2", loss.pressure_drop / 1e5, "bar", f=(loss.friction_factor, ""),
                    L=(length, "m"), D=(1000 * pipe_inner_diameter(size, schedule, field=field), "mm"),
                    sum_K=(k or 0.0, ""), rho=(state.density, "kg/m**3"), v=(loss.velocity, "m/s"))
        result.add(f"{key}_line_pressure_drop", f"{label} pressure drop ({case} flow)", loss.pressure_drop / 1e5, "bar")
        gradient = _gradient(loss.pressure_drop / length)
        result.add(f"{key}_line_pressure_drop_per_100m", f"{label} pressure gradient", gradient.value, gradient.unit)
        _line_drop_check(label, size, state.pressure, loss.pressure_drop, length, result)


def _bar_difference(pascals):
    return Amount(pascals / 1e5, "bar", "difference")


def _gradient(pascals_per_metre):
    """A line's pressure gradient (Pa/m) as the record keeps it: bar difference per 100 m, a unit of its own
    that views convert by pint (psi difference per 100 ft)."""
    return Amount(to_record_unit(pascals_per_metre, "pressure_gradient"), RECORD_UNITS["pressure_gradient"])


def _line_drop_check(label, size, pressure, drop, length, result):
    """The line's drop against the two limits on it: a tenth of the line's pressure, beyond which the
    incompressible form understates it, and the gradient limit over the line's length (common practice)."""
    loss, valid_up_to = _bar_difference(drop), _bar_difference(COMPRESSIBLE_FRACTION * pressure)
    over_length = _bar_difference(DROP_LIMIT_PER_100M * length / 100.0)
    gradient, gradient_limit = _gradient(drop / length), _gradient(DROP_LIMIT_PER_100M / 100.0)
    if drop > COMPRESSIBLE_FRACTION * pressure:
        detail = Phrase.of(f"{{loss:.3f}} is over {100 * COMPRESSIBLE_FRACTION:g} % of {{pressure:.4g}}: the "
                           "incompressible Darcy–Weisbach form understates it; enlarge the line",
                           loss=loss, pressure=Amount(pressure / 1e5, "bar"))
    elif drop * 100.0 / length > DROP_LIMIT_PER_100M:
        detail = Phrase.of(f"{{gradient:.2f}} in {size} exceeds {{limit:g}} (common practice): consider "
                           "the next size up", gradient=gradient, limit=gradient_limit)
    else:
        detail = Phrase.of("{loss:.3f}, {gradient:.2f} (limit {limit:g}, common practice)",
                           loss=loss, gradient=gradient, limit=gradient_limit)
    result.check_limit(f"{label} pressure drop", loss, [("<=", valid_up_to, "warn"), ("<=", over_length, "warn")],
                       detail, source="common practice")


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
