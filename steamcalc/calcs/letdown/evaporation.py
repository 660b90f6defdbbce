"""The spray's evaporation length after a let-down desuperheater, and the temperature sensor against it.

The droplets' lifetime by the d²-law (:mod:`steamcalc.equipment.desuperheater`) times the steam velocity gives
the distance the spray needs to evaporate; the length goes with the square of the droplet size, so the record
shows it over a stated range of sizes when the nozzle maker's figure is not given, and the temperature sensor is
checked against the maker's distance, the maker's droplet size or the coarse end of that range.
"""

from __future__ import annotations

import math

from ...equipment.desuperheater import (
    DEFAULT_DROPLET_SIZE, DEFAULT_MIN_STEAM_VELOCITY, DROPLET_NUSSELT, TYPICAL_DROPLET_SIZES, droplet_lifetime,
    evaporation_length, length_at_droplet_size,
)
from ...equipment.piping import line_velocity, pipe_inner_diameter
from ...properties.steam import SteamState, saturation_temperature, thermal_conductivity
from ...units.amounts import Phrase
from .equipment import DEFAULT_SCHEDULE, flow_cases


def _pipe_diameter(inputs):
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    if inputs.desuperheater_pipe_size is not None:
        return pipe_inner_diameter(inputs.desuperheater_pipe_size, schedule, field="desuperheater.pipe_size"), \
            f"{inputs.desuperheater_pipe_size} schedule {schedule}"
    if inputs.outlet_size is not None:
        return pipe_inner_diameter(inputs.outlet_size, schedule, field="lines.outlet_size"), \
            f"{inputs.outlet_size} schedule {schedule} (the outlet line)"
    return None, None


def evaporation_section(inputs, sprays, throttled, target, water, result):
    diameter, described = _pipe_diameter(inputs)
    if diameter is None:
        text = ("no pipe size at the spray (desuperheater.pipe_size or lines.outlet_size): the minimum steam "
                "velocity and the evaporation length are not checked")
        if inputs.sensor_distance is not None and inputs.recommended_sensor_distance is not None:
            result.assumptions.append(f"Desuperheater: {text}")
            _maker_distance_check(inputs, None, result)
        elif inputs.sensor_distance is not None:
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
    basis = "" if given else " (common practice for spray types; the maker's minimum governs)"
    amounts = dict(velocity=(v_min, "m/s"), limit=(limit, "m/s"))
    result.check_limit(
        "Steam velocity at the desuperheater", amounts["velocity"], [(">=", amounts["limit"], "warn")],
        lambda status: Phrase.of(
            f"{{velocity:.1f}} at the {low} flow, at least {{limit:g}}{basis}" if status == "pass" else
            f"{{velocity:.1f}} at the {low} flow, below the {{limit:g}} a spray desuperheater needs{basis}: the spray "
            "may fall out onto the pipe; a smaller pipe at the spray point, or a steam-atomising or venturi type",
            **amounts),
        source="" if given else "common practice")
    if not sprays:
        return
    given_size = inputs.spray_droplet_size
    droplet = given_size or DEFAULT_DROPLET_SIZE
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
        + (" (the nozzle maker's droplet size)" if given_size is not None else " (assumed, common practice: the nozzle "
           "maker's droplet size is asked for)")
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
    result.add("evaporation_length", f"Evaporation length of the spray (longest, at the {governing} flow; "
               f"{droplet * 1e6:.0f} µm droplets, {'maker' if given_size is not None else 'assumed'})", length, "m")
    spread = _length_over_droplet_sizes(length, droplet, governing, result)
    if given_size is None:
        (fine, fine_length), (coarse, coarse_length) = spread
        amounts = dict(fine=(fine_length, "m"), assumed=(length, "m"), coarse=(coarse_length, "m"))
        result.notice(
            "Spray droplet size from the nozzle maker",
            Phrase.of(f"not given (desuperheater.droplet_size): ask the nozzle maker for the droplet size at the design "
                      f"spray and nozzle differential. The evaporation length goes with its square: {{fine:.1f}} at "
                      f"{fine * 1e6:.0f} µm, {{assumed:.1f}} at the {droplet * 1e6:.0f} µm assumed, {{coarse:.0f}} at "
                      f"{coarse * 1e6:.0f} µm (range common practice)", **amounts), act=True)
    _sensor_check(inputs, given_size, droplet, length, spread[1], result)


def _length_over_droplet_sizes(length, droplet, governing, result):
    """The evaporation length at the fine and coarse ends of the droplet range: ((size, length), (size, length))."""
    low, high = min(TYPICAL_DROPLET_SIZES[0], droplet), max(TYPICAL_DROPLET_SIZES[1], droplet)
    spread = []
    for key, size, end in (("evaporation_length_fine_spray", low, "fine"),
                           ("evaporation_length_coarse_spray", high, "coarse")):
        value = length_at_droplet_size(length, droplet, size)
        # d·d, not d²: a view writes a power of a number with its unit as "0.15 mm^2", which reads as an area.
        result.work(f"Evaporation length of {size * 1e6:.0f} µm droplets", "L_evap(d) = L_evap(d0)·(d/d0)²  [d²-law: "
                    f"the lifetime goes with d0², the steam velocity is unchanged], at the {governing} flow",
                    "L_evap0*(d*d)/(d0*d0)", value, "m", L_evap0=(length, "m"), d=(size * 1e3, "mm"),
                    d0=(droplet * 1e3, "mm"))
        result.add(key, f"Evaporation length of {size * 1e6:.0f} µm droplets ({end} end of the "
                   f"{low * 1e6:.0f}-{high * 1e6:.0f} µm range shown)", value, "m")
        spread.append((size, value))
    return tuple(spread)


def _maker_distance_check(inputs, length, result):
    """The sensor against the desuperheater maker's distance: below it fails (the maker's data governs)."""
    amounts = dict(sensor=(inputs.sensor_distance, "m"), maker=(inputs.recommended_sensor_distance, "m"))
    estimate = ""
    if length is not None:
        amounts["length"] = (length, "m")
        estimate = " (the estimated evaporation length {length:.1f} is for information)"
    result.check_limit(
        "Temperature sensor beyond the maker's distance", amounts["sensor"], [(">=", amounts["maker"], "fail")],
        lambda status: Phrase.of(
            ("sensor {sensor:g} from the spray, at or beyond the {maker:g} the desuperheater maker gives" + estimate)
            if status == "pass" else
            ("the sensor {sensor:g} from the spray is closer than the {maker:g} the desuperheater maker gives: it may "
             "read wet steam low and the controller over-spray; move it downstream" + estimate), **amounts),
        source="desuperheater maker's data")


def _sensor_check(inputs, given_size, droplet, length, coarse, result):
    """The temperature sensor against the maker's distance, the length at the maker's droplet size, or (neither
    given) the length at the coarse end of the droplet range, which fails when the sensor is closer."""
    maker = inputs.recommended_sensor_distance
    coarse_size, coarse_length = coarse
    if inputs.sensor_distance is None:
        if maker is not None:
            where = f"at least the {maker:g} m the desuperheater maker gives"
        elif given_size is not None:
            where = f"at least {length:.1f} m downstream of the spray (the estimated evaporation length)"
        else:
            where = (f"at least {coarse_length:.0f} m downstream of the spray (the evaporation length of "
                     f"{coarse_size * 1e6:.0f} µm droplets; {length:.1f} m at the {droplet * 1e6:.0f} µm assumed), or "
                     "as the desuperheater maker recommends")
        result.assumptions.append(f"Temperature sensor: no distance given (desuperheater.sensor_distance); place it "
                                  f"{where}")
        return
    if maker is not None:
        _maker_distance_check(inputs, length, result)
        return
    if given_size is not None:
        amounts = dict(sensor=(inputs.sensor_distance, "m"), length=(length, "m"))
        result.check_limit(
            "Temperature sensor beyond the evaporation length", amounts["sensor"], [(">=", amounts["length"], "warn")],
            lambda status: Phrase.of(
                f"sensor {{sensor:g}} from the spray, beyond the estimated evaporation length {{length:.1f}} of the "
                f"maker's {droplet * 1e6:.0f} µm droplets" if status == "pass" else
                f"the sensor {{sensor:g}} from the spray is closer than the estimated evaporation length {{length:.1f}} "
                f"of the maker's {droplet * 1e6:.0f} µm droplets: it may read wet steam low and the controller "
                "over-spray; move it downstream or use a finer spray (the desuperheater maker's recommended distance "
                "governs)", **amounts))
        return
    amounts = dict(sensor=(inputs.sensor_distance, "m"), coarse=(coarse_length, "m"), assumed=(length, "m"))
    sizes = f"{coarse_size * 1e6:.0f} µm droplets, the coarse end of the range ({{assumed:.1f}} at the " \
            f"{droplet * 1e6:.0f} µm assumed)"
    result.check_limit(
        "Temperature sensor beyond the evaporation length", amounts["sensor"],
        [(">=", amounts["coarse"], "fail")],
        lambda status: Phrase.of(
            f"sensor {{sensor:g}} from the spray, beyond the evaporation length {{coarse:.0f}} of {sizes}"
            if status == "pass" else
            f"the sensor {{sensor:g}} from the spray is closer than the evaporation length {{coarse:.0f}} of {sizes}, "
            "and the maker gives neither the droplet size (desuperheater.droplet_size) nor the sensor distance "
            "(desuperheater.recommended_sensor_distance): the sensor may read wet steam low and the controller "
            "over-spray; give the maker's figure, or move the sensor downstream", **amounts),
        source="common practice (droplet range)")
