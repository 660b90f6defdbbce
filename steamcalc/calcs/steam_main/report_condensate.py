"""The steam main's condensate side: the traps' capacities and differential pressures, and the return line
(flash, two-phase drop, velocity, the size it needs), from the equipment functions of this package."""

from __future__ import annotations

from ...equipment.piping import MAX_FLASHING_CONDENSATE_VELOCITY, flow_area
from ...errors import InputError
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from .heat_loss import GRAVITY
from .loads import DRIP_TRAP_TYPES, HEATER_TRAP_TYPES
from .report import _limit_source
from .return_line import METHOD_REFERENCE, return_flow, return_size_needed, water_alone_size


def _running_sources(inputs, drips):
    """The return line's inflows when the main runs: (flow kg/s, trap inlet pressure Pa), the empty ones left out."""
    sources = [(d.running_load, d.pressure) for d in drips if d.running_load > 0.0]
    if inputs.heater_condensate_flow is not None:
        sources.append((inputs.heater_condensate_flow, inputs.heater_trap_pressure))
    return sources


def _warmup_sources(drips):
    """The return line's inflows while the main warms up: the drip traps at their warm-up loads (the heater is not
    yet in service)."""
    return [(d.warmup_load, d.pressure) for d in drips if d.warmup_load > 0.0]


def _back_pressure(inputs, drips, result):
    """Back pressure at the traps, Pa(a): the receiver, the lift as a column of water, and the return line's
    friction drop at running flow (the whole line's drop taken at every trap: conservative)."""
    if inputs.receiver_pressure is None:
        return None, None
    water = SteamState.from_p_dryness(inputs.receiver_pressure, 0.0)
    lift_head = water.density * GRAVITY * inputs.lift
    sources = _running_sources(inputs, drips)
    friction = 0.0
    if sources:
        friction = return_flow(sources, inputs.receiver_pressure, inputs.return_size, inputs.return_schedule,
                               inputs.return_length, inputs.lift).friction_drop
    back = inputs.receiver_pressure + lift_head + friction
    result.work("Back pressure at the traps", "p_b = p_r + ρ_f g H + Δp_line", "p_r + rho_f*g*H + dp_line", back / 1e5,
                "bar", p_r=(inputs.receiver_pressure / 1e5, "bar"), rho_f=(water.density, "kg/m**3"),
                g=(GRAVITY, "m/s**2"), H=(inputs.lift, "m"), dp_line=(friction / 1e5, "bar", "difference"))
    result.add("trap_back_pressure", "Back pressure at the traps (receiver, lift and the return line's drop)",
               back / 1e5, "bar")
    result.assumptions.append("Trap back pressure: the receiver's pressure, plus the lift as a column of saturated "
                              "water at the receiver, plus the whole friction drop of the condensate return at running "
                              "flow, taken at every trap (conservative)")
    return back, inputs.receiver_pressure + lift_head


def _trap_differential(inputs, name, key, inlet, back, static, consequence, fix, result):
    """A trap's differential pressure; refused when the receiver and lift alone stand above its inlet (the input is
    wrong), a failing check when the return line's drop takes the rest (the line is too small)."""
    if inlet <= static:
        raise InputError(f"the receiver with its lift ({static / 1e5:.4g} bar(a)) stands above the {name.lower()}'s "
                         f"inlet ({inlet / 1e5:.4g} bar(a)): {consequence}", field="return_line.receiver_pressure",
                         value=f"{inputs.receiver_pressure / 1e5:.4g} bar(a)", fix=fix)
    result.add(key, f"{name}: differential pressure", (inlet - back) / 1e5, "bar")
    if inlet <= back:
        result.check(f"{name}: differential pressure", "fail", Phrase.of(
            "the condensate return's friction drop raises the back pressure to {b:.3f}, above the trap's inlet "
            f"{{p:.3f}}: {consequence}; a larger return line lowers it", b=(back / 1e5, "bar"), p=(inlet / 1e5, "bar")))


def report_traps(inputs, flows, drips, result):
    """The capacity each drip trap and the heater's trap must pass at its differential pressure."""
    back, static = _back_pressure(inputs, drips, result)
    factor = inputs.trap_safety_factor
    for d in drips:
        result.work(f"Drip trap {d.number}: capacity needed", "ṁ_trap = SF · max(ṁ_w, ṁ_r)", "SF*max(m_w, m_r)",
                    factor * max(d.warmup_load, d.running_load) * 3600, "kg/h", SF=(factor, ""),
                    m_w=(d.warmup_load * 3600, "kg/h"), m_r=(d.running_load * 3600, "kg/h"))
        result.add(f"drip_{d.number}_trap_capacity", f"Drip trap {d.number}: capacity needed",
                   factor * max(d.warmup_load, d.running_load) * 3600, "kg/h")
        if back is not None:
            _trap_differential(inputs, f"Drip trap {d.number}", f"drip_{d.number}_trap_differential", d.pressure,
                               back, static, "it cannot discharge", "give a receiver at a lower pressure, or a "
                               "smaller lift", result)
    result.add("drip_trap_types", "Drip trap types to consider (common practice)", "; ".join(DRIP_TRAP_TYPES))
    if inputs.heater_condensate_flow is not None:
        result.add("heater_trap_capacity", "Heater trap: capacity needed", factor * inputs.heater_condensate_flow * 3600,
                   "kg/h")
        if back is not None:
            _trap_differential(inputs, "Heater trap", "heater_trap_differential", inputs.heater_trap_pressure, back,
                               static, "the heater would waterlog", "give a receiver at a lower pressure, a smaller "
                               "lift, or drain the heater by a pump-trap", result)
        result.add("heater_trap_types", "Heater trap types to consider (common practice)", "; ".join(HEATER_TRAP_TYPES))
        if inputs.lift > 0.0:
            result.check("Condensate lifted after a modulating heater", "warn", Phrase.of(
                "the return rises {lift:.1f} after the heater's trap: at low load the steam space can fall below the "
                "back pressure, the trap stalls, the heater floods and hammers; drain it by gravity to a pump-trap or "
                "fit a vacuum breaker", lift=(inputs.lift, "m")))


def report_return(inputs, drips, result):
    """The return line: flash, two-phase drop and velocity at running flow and at warm-up, and the size the
    governing case needs."""
    sources = _running_sources(inputs, drips)
    warm = _warmup_sources(drips)
    args = (inputs.receiver_pressure, inputs.return_size, inputs.return_schedule, inputs.return_length, inputs.lift)
    cases = [(name, src, return_flow(src, *args)) for name, src in (("running", sources), ("warm-up", warm)) if src]
    if not cases:
        result.notice("Return line", "no condensate reaches the return line: the main makes none and no heater "
                      "drains into it")
        return
    governing, gov_sources, gov_flow = max(cases, key=lambda c: (c[2].friction_drop, c[2].velocity))
    name, src, flow = cases[0]
    total = sum(m for m, _ in src)
    result.references.append(METHOD_REFERENCE)
    h_fg = flow.vapour.enthalpy - flow.liquid.enthalpy
    result.work("Return: flash fraction at the receiver", "x = (h_mix − h_f(p_r)) / h_fg(p_r)", "(h_mix - h_f)/h_fg",
                flow.dryness, h_mix=(flow.mixed_enthalpy / 1e3, "kJ/kg"), h_f=(flow.liquid.enthalpy / 1e3, "kJ/kg"),
                h_fg=(h_fg / 1e3, "kJ/kg"))
    result.work("Return: homogeneous velocity", "v_h = ṁ (x/ρ_g + (1 − x)/ρ_f) / (π d²/4)",
                "m*(x/rho_g + (1 - x)/rho_f)/(pi*d**2/4)", flow.velocity, "m/s", m=(total * 3600, "kg/h"),
                x=(flow.dryness, ""), rho_g=(flow.vapour.density, "kg/m**3"), rho_f=(flow.liquid.density, "kg/m**3"),
                pi=(3.141592653589793, ""), d=(flow.inner_diameter * 1000, "mm"))
    result.work("Return: two-phase friction drop (Müller-Steinhagen and Heck)", "Δp = MSH(ṁ, x, ρ_f, ρ_g, μ_f, μ_g, d, L)",
                "Muller_Steinhagen_Heck(m, x, d, L)", flow.friction_drop / 1e5, "bar", m=(total * 3600, "kg/h"),
                x=(flow.dryness, ""), d=(flow.inner_diameter * 1000, "mm"), L=(inputs.return_length, "m"))
    result.add("return_flow", f"Return line flow ({name})", total * 3600, "kg/h")
    result.add("return_flash_fraction", f"Flash fraction in the return line ({name})", flow.dryness)
    result.add("return_flash_steam", f"Flash steam in the return line ({name})", flow.dryness * total * 3600, "kg/h")
    result.add("return_velocity", f"Return line homogeneous velocity ({name})", flow.velocity, "m/s")
    result.add("return_friction_drop", f"Return line friction drop ({name})", flow.friction_drop / 1e5, "bar")
    result.add("return_volume_ratio", f"Flashing flow's volume over water alone ({name})",
               flow.velocity / flow.water_velocity)
    for other, other_src, other_flow in cases[1:]:
        result.add("return_warmup_flow", f"Return line flow ({other})", sum(m for m, _ in other_src) * 3600, "kg/h")
        result.add("return_warmup_velocity", f"Return line homogeneous velocity ({other})", other_flow.velocity,
                   "m/s")
        result.add("return_warmup_friction_drop", f"Return line friction drop ({other})",
                   other_flow.friction_drop / 1e5, "bar")
    result.add("return_governing_case", "Return line case that governs its size (the larger drop)", governing)
    result.notice("Return line cases", "the return is worked running (the drips' running loads and the heater's "
                  "condensate) and warming up (the drip traps at their warm-up loads, the heater not yet in service); "
                  f"the {governing} case, with the larger drop, governs the size" if len(cases) > 1 else
                  f"the return is worked for the {governing} case only: the other has no flow")
    result.check_limit("Return line homogeneous velocity", (gov_flow.velocity, "m/s"),
                       [("<=", (MAX_FLASHING_CONDENSATE_VELOCITY, "m/s"), "fail")],
                       lambda s: Phrase.of(f"{{v:.1f}} ({governing}) {'within' if s == 'pass' else 'above'} the {{lim:.0f}}"
                                           " that flashing condensate may reach: above it the line erodes and hammers",
                                           v=(gov_flow.velocity, "m/s"), lim=(MAX_FLASHING_CONDENSATE_VELOCITY, "m/s")),
                       source="common practice")
    result.check_limit("Return line friction drop", (gov_flow.friction_drop / 1e5, "bar"),
                       [("<=", (inputs.return_drop_limit / 1e5, "bar"), "warn")],
                       lambda s: f"within the stated drop limit ({governing})" if s == "pass" else
                       f"above the stated drop limit ({governing}): the traps' back pressure rises; a larger line "
                       "lowers it",
                       source=_limit_source(inputs, "return_drop_limit", "the input drop limit",
                                            "common practice (the limit when none is given)"))
    needed = None
    for _, case_sources, _ in cases:
        found = return_size_needed(case_sources, inputs.receiver_pressure, inputs.return_schedule,
                                   inputs.return_length, inputs.lift, MAX_FLASHING_CONDENSATE_VELOCITY,
                                   inputs.return_drop_limit)
        if found is None:
            needed = None
            break
        if needed is None or found[1].inner_diameter > needed[1].inner_diameter:
            needed = found
    if needed is None:
        result.check("Return line size for the limits", "fail", Phrase.of(
            "no standard size up to DN600 keeps the return within {v:.0f} and the drop limit; split the return or "
            "lower the receiver's pressure", v=(MAX_FLASHING_CONDENSATE_VELOCITY, "m/s")))
    else:
        result.add("return_size_needed", "Smallest return size within the velocity and drop limits", needed[0])
        area_ratio = flow_area(needed[1].inner_diameter) / flow_area(flow.inner_diameter)
        result.check_limit("Return line area against the area the flash needs", (area_ratio, ""), [("<=", (1.0, ""), "fail")],
                           lambda s: Phrase.of("the flashing flow takes {r:.1f} times the volume of water alone; "
                                               "the line needs {a:.2f} times its area", r=(flow.velocity / flow.water_velocity, ""),
                                               a=(area_ratio, "")), source="common practice")
    water = water_alone_size(total, flow.liquid.density, inputs.return_schedule)
    if water is not None:
        result.add("return_water_alone_size", "Size the return would get as water alone (1.5 m/s)", water[0])
    result.notice("Flash into a flooded line", "trap discharge must enter a return that runs part full and falls to "
                  "the receiver; flash steam entering a flooded line collapses and hammers")
