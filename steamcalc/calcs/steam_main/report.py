"""The steam main's results, worked steps and checks along the main (segments, heat loss, the steam at the user,
its cost, the drip legs), from the equipment functions of this package; the traps and the return line are in
:mod:`.report_condensate`."""

from __future__ import annotations

import dataclasses
import math

from ...equipment.line_loss import DROP_LIMIT_PER_100M
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..economics import annual_fuel_energy, annual_value, missing_site_data
from .heat_loss import GRAVITY, TOUCH_SAFE_SURFACE, Insulation
from .loads import (
    INSULATION_DENSITY, INSULATION_SPECIFIC_HEAT, STEEL_DENSITY, STEEL_SPECIFIC_HEAT, DripPoint, drip_positions,
    leg_size, segment_loads, superheat_given_up, warmup_mass,
)
from .main import segment_flows, size_needed


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
                               lambda s, f=f: Phrase.of(
                                   "the jacket at {t:.0f} is within the touch limit of {lim:.0f}: cool enough to touch "
                                   "briefly" if s == "pass" else "the jacket at {t:.0f} is above the touch limit of "
                                   "{lim:.0f}: it burns on touch; thicken the insulation or guard the line where it "
                                   "is within reach", t=(f.loss.surface_temperature - 273.15, "degC"),
                                   lim=(TOUCH_SAFE_SURFACE, "degC")), source="common practice")
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
                       lambda s: Phrase.of("{gradient:.2g}, within the {limit:g} steam mains are commonly sized for"
                                           if s == "pass" else "{gradient:.2g}, above the {limit:g} steam mains are "
                                           "commonly sized for: a larger size lowers it", gradient=gradient,
                                           limit=gradient_limit), source="common practice")
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


#: Lowest dryness fraction of steam reaching a user, before its last drip leg (common practice: steam for
#: process heating is kept at 0.95 dry or better; wetter steam carries slugs a drip pocket does not catch).
MIN_DRYNESS_AT_USER = 0.95


def _delivered(inputs, flows, running, result):
    """The steam the user receives, and the dryness check at the end of the main."""
    last = flows[-1].outlet
    delivered = inputs.steam_flow - running
    result.work("Steam delivered to the user", "ṁ_u = ṁ − Σ ṁ_r", "m - m_r", delivered * 3600, "kg/h",
                m=(inputs.steam_flow * 3600, "kg/h"), m_r=(running * 3600, "kg/h"))
    result.add("steam_delivered", "Steam delivered to the user (steam flow less the drips' running load)",
               delivered * 3600, "kg/h")
    result.assumptions.append("Steam flow basis: the steam flow is what leaves the supply; the drip legs take the "
                              "condensate the main makes, so the user receives the steam flow less the running load")
    if last.dryness is None:
        result.notice("Steam at the user", Phrase.of("the steam reaches the user superheated, {sh:.1f} above "
                                                     "saturation: no condensate forms in the main while it runs",
                                                     sh=(last.superheat or 0.0, "K")))
        return
    result.check_limit("Dryness at the user", (last.dryness, ""), [(">=", (MIN_DRYNESS_AT_USER, ""), "warn")],
                       lambda s: Phrase.of("the steam reaches the end of the main at dryness {x:.3f}, not below "
                                           "{lim:.2f}" if s == "pass" else "the steam reaches the end of the main "
                                           "at dryness {x:.3f}, below {lim:.2f}: the last drip leg cannot catch "
                                           "all that water; more steam flow, thicker insulation or a separator "
                                           "before the user", x=(last.dryness, ""), lim=(MIN_DRYNESS_AT_USER, "")),
                       source="common practice")


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


def _latent(pressure):
    """Latent heat at a pressure, J/kg (IF97)."""
    return SteamState.from_p_dryness(pressure, 1.0).enthalpy - SteamState.from_p_dryness(pressure, 0.0).enthalpy


def _drips(inputs, flows, supply, result):
    warm_to = supply.temperature
    loads = [segment_loads(f, warm_to, inputs.ambient_temperature, _latent(f.inlet.pressure), inputs.warmup_time)
             for f in flows]
    first = flows[0]
    latent = _latent(first.inlet.pressure)
    steel, insulation = warmup_mass(first)
    heat_to_warm = (steel * STEEL_SPECIFIC_HEAT + insulation * INSULATION_SPECIFIC_HEAT / 2) * (
        warm_to - inputs.ambient_temperature) / 1e3
    result.work("Segment 1: steel and insulation to heat", "Q_w = M_s c_s (T_1 − T_a) + M_i c_i (T_1 − T_a)/2",
                "M_s*c_s*(T_1 - T_a) + M_i*c_i*(T_1 - T_a)/2", heat_to_warm, "kJ",
                M_s=(steel, "kg"), c_s=(STEEL_SPECIFIC_HEAT / 1e3, "kJ/(kg*K)"), M_i=(insulation, "kg"),
                c_i=(INSULATION_SPECIFIC_HEAT / 1e3, "kJ/(kg*K)"), T_1=(warm_to, "K"),
                T_a=(inputs.ambient_temperature, "K"))
    result.work("Segment 1: warm-up load", "ṁ_w = Q_w / (h_fg · t_w) + q'·L / (2 h_fg)", "Q_w/(h_fg*t_w) + q*L/(2*h_fg)",
                loads[0][1] * 3600, "kg/h", Q_w=(heat_to_warm, "kJ"), h_fg=(latent / 1e3, "kJ/kg"),
                t_w=(inputs.warmup_time / 60, "min"), q=(first.loss.heat_loss, "W/m"), L=(first.segment.length, "m"))
    for f, (running, _) in zip(flows, loads):
        given_up = superheat_given_up(f)
        n = f.index + 1
        if given_up > 0.0:
            h_g = SteamState.from_p_dryness(f.inlet.pressure, 1.0).enthalpy
            result.work(f"Segment {n}: superheat the steam gives up before it condenses", "Q_sh = min(q'·L, ṁ (h_1 − h_g))",
                        "min(q*L, m*(h1 - h_g))", given_up, "W", q=(f.loss.heat_loss, "W/m"), L=(f.segment.length, "m"),
                        m=(inputs.steam_flow * 3600, "kg/h"), h1=(f.inlet.enthalpy / 1e3, "kJ/kg"),
                        h_g=(h_g / 1e3, "kJ/kg"))
        if running > 0.0:
            result.work(f"Segment {n}: running condensate load", "ṁ_r = (q'·L − Q_sh) / h_fg", "(q*L - Q_sh)/h_fg",
                        running * 3600, "kg/h", q=(f.loss.heat_loss, "W/m"), L=(f.segment.length, "m"),
                        Q_sh=(given_up, "W"), h_fg=(_latent(f.inlet.pressure) / 1e3, "kJ/kg"))
    result.assumptions.append(f"Warm-up: carbon steel {STEEL_DENSITY:g} kg/m³ at {STEEL_SPECIFIC_HEAT / 1e3:g} kJ/(kg·K), "
                              f"mineral wool {INSULATION_DENSITY:g} kg/m³ at {INSULATION_SPECIFIC_HEAT / 1e3:g} kJ/(kg·K) "
                              "heated on average to half the rise, from the air to the supply steam's temperature, all "
                              "of it condensing at the latent heat, plus half the heat loss as condensate (common "
                              "practice; conservative for superheated steam)")
    result.assumptions.append("Running load: the heat loss condenses steam only once the steam has given up its "
                              "superheat (Q_sh, the steam flow times its enthalpy above saturation at the segment's "
                              "inlet); a main whose steam stays superheated to the user makes no running condensate")
    result.add("running_load_total", "Running condensate load of the main", sum(r for r, _ in loads) * 3600, "kg/h")
    result.add("warmup_load_total", "Warm-up condensate load of the main", sum(w for _, w in loads) * 3600, "kg/h")
    _delivered(inputs, flows, sum(r for r, _ in loads), result)
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
    result.notice("Drip leg positions", Phrase.of("drip legs at the foot of each riser and at each low point where the "
                                                  "main starts to rise, at most {s:.0f} apart along every run that is "
                                                  "not a riser (level, falling or gently rising), and at the end of "
                                                  "the main", s=(inputs.drip_spacing, "m")))
    return drips
