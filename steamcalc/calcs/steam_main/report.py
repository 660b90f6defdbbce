"""The steam main's results, worked steps and checks, from the equipment functions of this package."""

from __future__ import annotations

import dataclasses
import math

from ...equipment.line_loss import DROP_LIMIT_PER_100M
from ...equipment.piping import MAX_FLASHING_CONDENSATE_VELOCITY, flow_area
from ...errors import InputError
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..economics import annual_fuel_energy, annual_value, missing_site_data
from .heat_loss import GRAVITY, TOUCH_SAFE_SURFACE, Insulation
from .loads import (
    DRIP_TRAP_TYPES, HEATER_TRAP_TYPES, INSULATION_DENSITY, INSULATION_SPECIFIC_HEAT, STEEL_DENSITY,
    STEEL_SPECIFIC_HEAT, DripPoint, drip_positions, leg_size, segment_loads, warmup_mass,
)
from .main import segment_flows, size_needed
from .return_line import METHOD_REFERENCE, return_flow, return_size_needed, water_alone_size


def _insulation(inputs):
    return Insulation(inputs.insulation_thickness, inputs.conductivity_50, inputs.conductivity_150,
                      inputs.jacket_emissivity)


def _limit_source(inputs, name, given, default):
    """A check's source: the input limit, or "common practice" when the limit is the input's default (compared
    within 1e-9: a limit read back from a record in its record unit is the default to the last digit or so)."""
    field = next(f for f in dataclasses.fields(inputs) if f.name == name)
    return default if math.isclose(getattr(inputs, name), field.default, rel_tol=1e-9) else given


def report_main(inputs, site, supply, result):
    """Segments, heat loss and condensate loads; returns (segment flows, drip points)."""
    m = inputs.steam_flow
    flows = segment_flows(inputs.main_segments, supply, m, inputs.ambient_temperature, inputs.wind_speed,
                          site.atmospheric_pressure, _insulation(inputs))
    result.add("supply_pressure", "Supply pressure", supply.pressure / 1e5, "bar")
    result.add("supply_temperature", "Supply temperature", supply.temperature - 273.15, "degC")
    for f in flows:
        n, seg = f.index + 1, f.segment
        result.work(f"Segment {n}: velocity", "v = ṁ / (ρ · π d² / 4)", "m/(rho*pi*d**2/4)", f.velocity, "m/s",
                    m=(m * 3600, "kg/h"), rho=(f.inlet.density, "kg/m**3"), d=(f.inner_diameter * 1000, "mm"),
                    pi=(3.141592653589793, ""))
        method = "isothermal compressible flow (drop above 10 % of the inlet pressure)" if f.compressible else \
            "Darcy-Weisbach at the inlet density"
        if f.compressible:
            result.work(f"Segment {n}: friction and fittings drop ({method})", "p2 = isothermal_gas(ρ, f, p1, L + ΣK·d/f, d, ṁ)",
                        "isothermal_gas(rho, f, p1, L, K, d, m)", f.friction_drop / 1e5, "bar",
                        rho=(f.inlet.density, "kg/m**3"), f=(f.friction_factor, ""), p1=(f.inlet.pressure / 1e5, "bar"),
                        L=(seg.length, "m"), K=(seg.fittings_k, ""), d=(f.inner_diameter * 1000, "mm"), m=(m * 3600, "kg/h"))
        else:
            result.work(f"Segment {n}: friction and fittings drop ({method})", "Δp_f = (f·L/d + ΣK) · ρ v² / 2",
                        "(f*L/d + K)*rho*v**2/2", f.friction_drop / 1e5, "bar", f=(f.friction_factor, ""),
                        L=(seg.length, "m"), d=(f.inner_diameter * 1000, "mm"), K=(seg.fittings_k, ""),
                        rho=(f.inlet.density, "kg/m**3"), v=(f.velocity, "m/s"))
        if seg.rise:
            result.work(f"Segment {n}: static head", "Δp_z = ρ g Δz", "rho*g*dz", f.static_drop / 1e5, "bar",
                        rho=(f.inlet.density, "kg/m**3"), g=(GRAVITY, "m/s**2"), dz=(seg.rise, "m"))
        result.work(f"Segment {n}: heat loss", "q' from the jacket heat balance (Churchill-Chu/Bernstein, radiation)",
                    "surface_balance(T_s, t_ins, k_m, D_o)", f.loss.heat_loss, "W/m",
                    T_s=(f.loss.surface_temperature - 273.15, "degC"), t_ins=(inputs.insulation_thickness * 1000, "mm"),
                    k_m=(f.loss.conductivity, "W/(m*K)"), D_o=(f.loss.outer_diameter * 1000, "mm"))
        result.work(f"Segment {n}: outlet enthalpy", "h2 = h1 − q'·L / ṁ", "h1 - q*L/m", f.outlet.enthalpy / 1e3,
                    "kJ/kg", h1=(f.inlet.enthalpy / 1e3, "kJ/kg"), q=(f.loss.heat_loss, "W/m"), L=(seg.length, "m"),
                    m=(m * 3600, "kg/h"))
        result.add(f"segment_{n}_outlet_pressure", f"Segment {n}: outlet pressure", f.outlet.pressure / 1e5, "bar")
        result.add(f"segment_{n}_velocity", f"Segment {n}: velocity", f.velocity, "m/s")
        result.add(f"segment_{n}_heat_loss", f"Segment {n}: heat loss, insulated", f.loss.heat_loss, "W/m")
        result.add(f"segment_{n}_bare_heat_loss", f"Segment {n}: heat loss, bare", f.bare.heat_loss, "W/m")
        result.add(f"segment_{n}_surface_temperature", f"Segment {n}: jacket temperature",
                   f.loss.surface_temperature - 273.15, "degC")
        result.check_limit(f"Segment {n}: steam velocity", (f.velocity, "m/s"),
                           [("<=", (inputs.velocity_limit, "m/s"), "warn")],
                           lambda s, f=f: Phrase.of("{v:.1f} against the limit {lim:.0f}", v=(f.velocity, "m/s"),
                                                    lim=(inputs.velocity_limit, "m/s")), source=_limit_source(
                               inputs, "velocity_limit", "the input velocity limit",
                               "common practice for saturated steam (the limit when none is given)"))
        if inputs.insulation_thickness > 0.0:
            result.check_limit(f"Segment {n}: jacket touch temperature", (f.loss.surface_temperature - 273.15, "degC"),
                               [("<=", (TOUCH_SAFE_SURFACE, "degC"), "warn")],
                               "a jacket within reach stays cool enough to touch briefly", source="common practice")
        else:
            result.check(f"Segment {n}: bare main", "warn", Phrase.of(
                "a bare main at {t:.0f} burns on touch and loses {q:.0f}; insulate it", t=(f.inlet.temperature - 273.15,
                                                                                           "degC"), q=(f.bare.heat_loss, "W/m")))
    last, length = flows[-1], sum(f.segment.length for f in flows)
    drop = supply.pressure - last.outlet.pressure
    result.add("main_length", "Main length", length, "m")
    result.add("main_outlet_pressure", "Pressure at the user", last.outlet.pressure / 1e5, "bar")
    result.add("main_pressure_drop", "Pressure drop of the main", drop / 1e5, "bar")
    result.add("main_outlet_temperature", "Temperature at the user", last.outlet.temperature - 273.15, "degC")
    if last.outlet.dryness is not None:
        result.add("main_outlet_dryness", "Dryness at the user", last.outlet.dryness)
    result.add("main_max_velocity", "Highest velocity in the main", max(f.velocity for f in flows), "m/s")
    # The gradient and its limit in a unit of their own (bar difference per 100 m, psi difference per 100 ft in US
    # views); 1 Pa/m = 10⁻³ bar difference per 100 m.
    gradient, gradient_limit = (drop / length / 1e3, "bar_per_100m"), (DROP_LIMIT_PER_100M / 1e5, "bar_per_100m")
    result.check_limit("Main pressure gradient", gradient, [("<=", gradient_limit, "warn")],
                       Phrase.of("{gradient:.2g}; steam mains are commonly sized for a pressure gradient of no more "
                                 "than {limit:g}", gradient=gradient, limit=gradient_limit), source="common practice")
    needed = size_needed(inputs.steam_flow, supply, inputs.main_segments[0].schedule, inputs.velocity_limit,
                         DROP_LIMIT_PER_100M)
    if needed is None:
        result.check("Main size for the limits", "warn", "no standard size up to DN600 meets the limits")
    else:
        result.add("main_size_needed", "Smallest size within the velocity and drop limits", needed[0])
        result.add("main_size_needed_velocity", "Velocity in that size", needed[2], "m/s")
    heat = sum(f.heat_loss for f in flows)
    bare = sum(f.bare.heat_loss * f.segment.length for f in flows)
    result.add("heat_loss_total", "Heat loss of the main, insulated", heat / 1e3, "kW")
    result.add("bare_heat_loss_total", "Heat loss of the main, were it bare", bare / 1e3, "kW")
    _annual(site, heat, result)
    drips = _drips(inputs, flows, supply, result)
    return flows, drips


def _annual(site, heat, result):
    missing = missing_site_data(site, ("operating_hours", "boiler_efficiency", "fuel_price"))
    if missing:
        result.check("Site data for yearly figures", "warn",
                     f"the site file lacks {', '.join(missing)}: the yearly cost of the heat loss is not computed")
        return
    fuel = annual_fuel_energy(heat, site.operating_hours, site.boiler_efficiency)
    result.work("Fuel a year for the main's heat loss", "E = Q · t / η_boiler", "Q*t/eta_boiler", fuel, "MWh",
                Q=(heat / 1e3, "kW"), t=(site.operating_hours, "h"), eta_boiler=(site.boiler_efficiency, ""))
    currency = site.fuel_price.currency
    money = annual_value(fuel, site.fuel_price)
    result.work("Fuel cost a year of the heat loss", "C = E · fuel price", "at_price(E, fuel_price)", money, currency,
                E=(fuel, "MWh"), fuel_price=(site.fuel_price.per_mwh, f"{currency}/MWh"))
    result.add("annual_heat_loss_energy", "Fuel a year for the heat loss", fuel, "MWh")
    result.add("annual_heat_loss_cost", "Fuel cost a year of the heat loss", money, currency)


def _drips(inputs, flows, supply, result):
    sat = SteamState.from_p_dryness(supply.pressure, 1.0)
    latent = sat.enthalpy - SteamState.from_p_dryness(supply.pressure, 0.0).enthalpy
    loads = [segment_loads(f, sat.temperature, inputs.ambient_temperature, latent, inputs.warmup_time) for f in flows]
    first = flows[0]
    steel, insulation = warmup_mass(first)
    result.work("Segment 1: steel and insulation to heat", "Q_w = M_s c_s (T_sat − T_a) + M_i c_i (T_sat − T_a)/2",
                "M_s*c_s*(T_sat - T_a) + M_i*c_i*(T_sat - T_a)/2",
                (steel * STEEL_SPECIFIC_HEAT + insulation * INSULATION_SPECIFIC_HEAT / 2)
                * (sat.temperature - inputs.ambient_temperature) / 1e3, "kJ",
                M_s=(steel, "kg"), c_s=(STEEL_SPECIFIC_HEAT / 1e3, "kJ/(kg*K)"), M_i=(insulation, "kg"),
                c_i=(INSULATION_SPECIFIC_HEAT / 1e3, "kJ/(kg*K)"), T_sat=(sat.temperature, "K"),
                T_a=(inputs.ambient_temperature, "K"))
    result.work("Segment 1: warm-up load", "ṁ_w = Q_w / (h_fg · t_w) + ṁ_r / 2", "Q_w/(h_fg*t_w) + m_r/2",
                loads[0][1] * 3600, "kg/h", Q_w=((steel * STEEL_SPECIFIC_HEAT + insulation * INSULATION_SPECIFIC_HEAT / 2)
                                                * (sat.temperature - inputs.ambient_temperature) / 1e3, "kJ"),
                h_fg=(latent / 1e3, "kJ/kg"), t_w=(inputs.warmup_time / 60, "min"), m_r=(loads[0][0] * 3600, "kg/h"))
    result.assumptions.append(f"Warm-up: carbon steel {STEEL_DENSITY:g} kg/m³ at {STEEL_SPECIFIC_HEAT / 1e3:g} kJ/(kg·K), "
                              f"mineral wool {INSULATION_DENSITY:g} kg/m³ at {INSULATION_SPECIFIC_HEAT / 1e3:g} kJ/(kg·K) "
                              "heated on average to half the rise, plus half the running loss (common practice)")
    result.add("running_load_total", "Running condensate load of the main", sum(r for r, _ in loads) * 3600, "kg/h")
    result.add("warmup_load_total", "Warm-up condensate load of the main", sum(w for _, w in loads) * 3600, "kg/h")
    positions = drip_positions(flows, inputs.drip_spacing)
    drips, start = [], 0.0
    bounds = []
    edge = 0.0
    for f in flows:
        bounds.append((edge, edge + f.segment.length))
        edge += f.segment.length
    for number, (distance, index, reason) in enumerate(positions, start=1):
        running = warm = 0.0
        for (a, b), (r, w), f in zip(bounds, loads, flows):
            share = max(0.0, min(b, distance) - max(a, start)) / f.segment.length
            running += r * share
            warm += w * share
        f = flows[index]
        dn = int(f.segment.size[2:]) if f.segment.size.upper().startswith("DN") else 80
        size, depth = leg_size(dn)
        fraction = (distance - bounds[index][0]) / f.segment.length
        pressure = f.inlet.pressure - fraction * (f.inlet.pressure - f.outlet.pressure)
        drips.append(DripPoint(number, distance, reason, index, pressure, running, warm, size, depth))
        result.add(f"drip_{number}_position", f"Drip leg {number}: distance from the header ({reason})", distance, "m")
        result.add(f"drip_{number}_running_load", f"Drip leg {number}: running load", running * 3600, "kg/h")
        result.add(f"drip_{number}_warmup_load", f"Drip leg {number}: warm-up load", warm * 3600, "kg/h")
        result.add(f"drip_{number}_leg", f"Drip leg {number}: pocket size and depth (common practice)",
                   f"{size}, {depth * 1000:.0f} mm deep")
        start = distance
    result.add("drip_points", "Drip legs on the main", len(drips))
    result.notice("Drip leg positions", Phrase.of("drip legs at the foot of each riser, at most {s:.0f} apart along "
                                                  "level runs, and at the end of the main", s=(inputs.drip_spacing, "m")))
    return drips


def _back_pressure(inputs):
    if inputs.receiver_pressure is None:
        return None
    water = SteamState.from_p_dryness(inputs.receiver_pressure, 0.0)
    return inputs.receiver_pressure + water.density * GRAVITY * inputs.lift


def report_traps(inputs, flows, drips, result):
    """The capacity each drip trap and the heater's trap must pass at its differential pressure."""
    back = _back_pressure(inputs)
    factor = inputs.trap_safety_factor
    for d in drips:
        result.work(f"Drip trap {d.number}: capacity needed", "ṁ_trap = SF · max(ṁ_w, ṁ_r)", "SF*max(m_w, m_r)",
                    factor * max(d.warmup_load, d.running_load) * 3600, "kg/h", SF=(factor, ""),
                    m_w=(d.warmup_load * 3600, "kg/h"), m_r=(d.running_load * 3600, "kg/h"))
        result.add(f"drip_{d.number}_trap_capacity", f"Drip trap {d.number}: capacity needed",
                   factor * max(d.warmup_load, d.running_load) * 3600, "kg/h")
        if back is not None:
            if d.pressure <= back:
                raise InputError(f"the receiver with its lift ({back / 1e5:.4g} bar(a)) stands above drip trap "
                                 f"{d.number}'s inlet ({d.pressure / 1e5:.4g} bar(a)): it cannot discharge",
                                 field="return_line.receiver_pressure", value=f"{inputs.receiver_pressure / 1e5:.4g} bar(a)",
                                 fix="give a receiver at a lower pressure, or a smaller lift")
            result.add(f"drip_{d.number}_trap_differential", f"Drip trap {d.number}: differential pressure",
                       (d.pressure - back) / 1e5, "bar")
    result.add("drip_trap_types", "Drip trap types to consider (common practice)", "; ".join(DRIP_TRAP_TYPES))
    if inputs.heater_condensate_flow is not None:
        if inputs.heater_trap_pressure <= back:
            raise InputError(f"the receiver with its lift ({back / 1e5:.4g} bar(a)) stands above the heater trap's "
                             f"inlet ({inputs.heater_trap_pressure / 1e5:.4g} bar(a)): the heater would waterlog",
                             field="return_line.receiver_pressure",
                             value=f"{inputs.receiver_pressure / 1e5:.4g} bar(a)",
                             fix="give a receiver at a lower pressure, a smaller lift, or drain the heater by a pump-trap")
        result.add("heater_trap_capacity", "Heater trap: capacity needed", factor * inputs.heater_condensate_flow * 3600,
                   "kg/h")
        result.add("heater_trap_differential", "Heater trap: differential pressure",
                   (inputs.heater_trap_pressure - back) / 1e5, "bar")
        result.add("heater_trap_types", "Heater trap types to consider (common practice)", "; ".join(HEATER_TRAP_TYPES))
        if inputs.lift > 0.0:
            result.check("Condensate lifted after a modulating heater", "warn", Phrase.of(
                "the return rises {lift:.1f} after the heater's trap: at low load the steam space can fall below the "
                "back pressure, the trap stalls, the heater floods and hammers; drain it by gravity to a pump-trap or "
                "fit a vacuum breaker", lift=(inputs.lift, "m")))


def report_return(inputs, drips, result):
    """The return line: flash, two-phase drop and velocity, and the size the flash needs."""
    sources = [(d.running_load, d.pressure) for d in drips]
    if inputs.heater_condensate_flow is not None:
        sources.append((inputs.heater_condensate_flow, inputs.heater_trap_pressure))
    flow = return_flow(sources, inputs.receiver_pressure, inputs.return_size, inputs.return_schedule,
                       inputs.return_length, inputs.lift)
    total = sum(m for m, _ in sources)
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
    result.add("return_flow", "Return line flow", total * 3600, "kg/h")
    result.add("return_flash_fraction", "Flash fraction in the return line", flow.dryness)
    result.add("return_flash_steam", "Flash steam in the return line", flow.dryness * total * 3600, "kg/h")
    result.add("return_velocity", "Return line homogeneous velocity", flow.velocity, "m/s")
    result.add("return_friction_drop", "Return line friction drop", flow.friction_drop / 1e5, "bar")
    result.add("return_volume_ratio", "Flashing flow's volume over water alone", flow.velocity / flow.water_velocity)
    result.check_limit("Return line homogeneous velocity", (flow.velocity, "m/s"),
                       [("<=", (MAX_FLASHING_CONDENSATE_VELOCITY, "m/s"), "fail")],
                       "flashing condensate above this velocity erodes the line and hammers", source="common practice")
    result.check_limit("Return line friction drop", (flow.friction_drop / 1e5, "bar"),
                       [("<=", (inputs.return_drop_limit / 1e5, "bar"), "warn")],
                       lambda s: "within the stated drop limit" if s == "pass" else
                       "above the stated drop limit: the traps' back pressure rises; a larger line lowers it",
                       source=_limit_source(inputs, "return_drop_limit", "the input drop limit",
                                            "common practice (the limit when none is given)"))
    needed = return_size_needed(sources, inputs.receiver_pressure, inputs.return_schedule, inputs.return_length,
                                inputs.lift, MAX_FLASHING_CONDENSATE_VELOCITY, inputs.return_drop_limit)
    if needed is not None:
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
