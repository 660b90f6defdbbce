"""What the overpressure sections of the flash and exchanger kinds share: the relieving pressure, a relief
valve sized for steam or for a flashing two-phase load, its API 526 orifice, the discharge line's built-up
back pressure (steam: isothermal flow; two-phase: homogeneous flow by the omega equation) against the valve
type's limit and the reaction force, each as steps and checks of the Result.

The kinds' own load cases are in :mod:`steamcalc.calcs.flash.overpressure` and
:mod:`steamcalc.calcs.exchanger.overpressure`.
"""

from __future__ import annotations

from ..equipment.discharge_line import back_pressure_limit, built_up_back_pressure
from ..equipment.piping import flow_area, pipe_inner_diameter
from ..equipment.relief import (
    API526_AREAS_IN2, DEFAULT_KD, MM2_PER_IN2, MOLAR_MASS_WATER, api526_orifice,
    direct_integration_area, direct_integration_flux, reaction_force, steam_equation_area,
)
from ..equipment.two_phase_line import (
    flash_pressure,
    pipe_omega, two_phase_back_pressure, two_phase_reaction_force,
)
from ..equipment.two_phase_relief import CERTIFIED_CAPACITY, size_flashing_relief
from ..errors import InputError, OutOfRangeError
from ..properties.steam import SteamState, dynamic_viscosity
from ..units.amounts import Phrase

#: Pa, water's critical pressure (IAPWS R7-97).
WATER_CRITICAL_PRESSURE = 22.064e6
#: Reduced pressure above which the omega method is flagged as near the critical point (see _omega_range).
OMEGA_REDUCED_PRESSURE_LIMIT = 0.5
#: Overpressure of a single relief valve in a non-fire case, fraction of the gauge set pressure (API 520 Part I).
DEFAULT_OVERPRESSURE = 0.10
DEFAULT_SCHEDULE = "40"
VALVE_TYPES = ("conventional", "balanced-bellows", "pilot")
#: A relief valve's outlet pipe: the case-file key of its size, and its inputs in the words of the form.
DISCHARGE_KEYS = ("overpressure.discharge_size", "the relief discharge pipe's size and length")

CAUTIONS = (
    CERTIFIED_CAPACITY,
    "The overpressure cases here are those this calculation can see; the engineer of record decides the full "
    "list of credible cases (fire, utility failure, operator error) to the local pressure-equipment code, which "
    "governs the relief device, its set pressure and its installation.",
    "Relief valves must discharge to a safe place, away from people, with their reaction force carried by the "
    "supports.",
)


def relieving_pressure(set_pressure, atm, result, prefix, name):
    """Set pressure plus 10 % of its gauge value, as a step and a result; Pa (absolute)."""
    p_r = set_pressure + DEFAULT_OVERPRESSURE * (set_pressure - atm)
    result.work(f"{name}: relieving pressure", "P1 = p_set + overpressure·(p_set − p_atm)",
                "p_set + overpressure*(p_set - p_atm)", p_r / 1e5, "bar", p_set=(set_pressure / 1e5, "bar"),
                overpressure=(DEFAULT_OVERPRESSURE, ""), p_atm=(atm / 1e5, "bar"))
    result.add(f"{prefix}_relieving_pressure", f"{name}: relieving pressure (set + 10 %)", p_r / 1e5, "bar")
    return p_r


def steam_relief_area(result, name, relieving, flow_kg_h, back, kb=1.0):
    """Required area (mm²) for dry or wet steam: direct integration on IF97 down to the back pressure ``back``
    (Pa; critical or subcritical flow as the isentrope gives), and the steam equation for dry steam in critical
    flow; the larger governs. ``kb`` is the balanced-bellows back-pressure correction (API 520 Part I figure 31),
    1 for other valves. Returns ``(area, method)``."""
    nozzle = direct_integration_flux(relieving, back)
    area_di = direct_integration_area(flow_kg_h, nozzle, DEFAULT_KD, kb)
    throat = ("" if nozzle.choked else
              ", p_t the back pressure (subcritical flow: the back pressure is above the pressure of the largest flux)")
    result.work(f"{name}: mass flux, direct integration",
                f"G = ρ(p_t, s0)·√(2(h0 − h(p_t, s0))){throat}  [API 520 Part I annex B, IF97]",
                "isentropic_flux(P1, h1, p_t)", nozzle.mass_flux, "kg/(m**2*s)",
                P1=(relieving.pressure / 1e5, "bar"), h1=(relieving.enthalpy / 1e3, "kJ/kg"),
                p_t=(nozzle.throat_pressure / 1e5, "bar"))
    if kb == 1.0:
        result.work(f"{name}: required area, direct integration", "A = W / (Kd·G)", "W/(Kd*G)", area_di, "mm**2",
                    W=(flow_kg_h, "kg/h"), Kd=(DEFAULT_KD, ""), G=(nozzle.mass_flux, "kg/(m**2*s)"))
    else:
        result.work(f"{name}: required area, direct integration", "A = W / (Kd·Kb·G)", "W/(Kd*Kb*G)", area_di,
                    "mm**2", W=(flow_kg_h, "kg/h"), Kd=(DEFAULT_KD, ""), Kb=(kb, ""),
                    G=(nozzle.mass_flux, "kg/(m**2*s)"))
    if not (nozzle.choked and relieving.phase != "wet"):
        return area_di, "direct integration"
    area_se, kn, ksh = steam_equation_area(flow_kg_h, relieving.pressure, relieving.temperature, DEFAULT_KD, kb)
    if kb == 1.0:
        result.work(f"{name}: required area, API 520 steam equation",
                    "A = 190.5·W / (P1·Kd·KN·KSH)  [mm², kg/h, kPa(a)]", "190.5*W/(P1*Kd*KN*KSH)", area_se, "mm**2",
                    units_fixed=True, W=(flow_kg_h, "kg/h"), P1=(relieving.pressure / 1e3, "kPa"),
                    Kd=(DEFAULT_KD, ""), KN=(kn, ""), KSH=(ksh, ""))
    else:
        result.work(f"{name}: required area, API 520 steam equation",
                    "A = 190.5·W / (P1·Kd·Kb·KN·KSH)  [mm², kg/h, kPa(a)]", "190.5*W/(P1*Kd*Kb*KN*KSH)", area_se,
                    "mm**2", units_fixed=True, W=(flow_kg_h, "kg/h"), P1=(relieving.pressure / 1e3, "kPa"),
                    Kd=(DEFAULT_KD, ""), Kb=(kb, ""), KN=(kn, ""), KSH=(ksh, ""))
    return (area_se, "API 520 steam equation") if area_se > area_di else (area_di, "direct integration")


#: The omega parameter's step: the second state as equipment.two_phase_relief finds it (SECOND_POINT).
OMEGA_EQUATION = ("ω = 9·(v9/v0 − 1), v9 after an isentropic flash to 0.9·p0 (a two-phase inlet) or to 0.9·p_s, 90 % of "
                  "the saturation pressure (a subcooled inlet)  [API 520 Part I annex C]")


def flashing_relief_area(result, name, inlet, flow_kg_h, back, kb=1.0):
    """Required area (mm²) of a two-phase or flashing-liquid load by the omega method and by direct integration,
    both on IF97, down to the back pressure ``back`` (Pa: the omega method's subcritical flux when it is above
    the critical pressure, API 520 Part I annex C); the larger governs. ``kb``: the balanced-bellows correction
    (API 520 Part I figure 31), 1 for other valves. Returns ``(area, method, FlashingRelief)``."""
    sized = size_flashing_relief(inlet, back, flow_kg_h, kb=kb)
    flow = sized.omega
    result.work(f"{name}: omega parameter (two-point, IF97)", OMEGA_EQUATION,
                "9*(v9/v0 - 1)", flow.omega, v9=(sized.second_volume, "m**3/kg"), v0=(1.0 / inlet.density, "m**3/kg"))
    if flow.region == "two-phase":
        result.work(f"{name}: critical pressure ratio",
                    "ηc = root of ηc² + (ω² − 2ω)(1 − ηc)² + 2ω²·ln ηc + 2ω²(1 − ηc) in (0, 1)",
                    "eta_c(omega)", flow.critical_ratio, omega=(flow.omega, ""))
        equation = ("G = ηc·√(p0/(v0·ω))" if flow.choked else
                    "G = √(−2[ω ln ηa + (ω − 1)(1 − ηa)])·√(p0/v0) / (ω(1/ηa − 1) + 1)")
    else:
        equation = (f"G by the omega method for subcooled liquid, {flow.region} region "
                    f"({'critical' if flow.choked else 'subcritical'}) [API 520 Part I annex C]")
    result.work(f"{name}: mass flux, omega method", equation, "omega_flux(p0, v0, omega, p_t)", flow.mass_flux,
                "kg/(m**2*s)", p0=(inlet.pressure / 1e5, "bar"), v0=(1.0 / inlet.density, "m**3/kg"),
                omega=(flow.omega, ""), p_t=(flow.throat_pressure / 1e5, "bar"))
    result.work(f"{name}: mass flux, direct integration (HEM, IF97)",
                "G = ρ(p_t, s0)·√(2(h0 − h(p_t, s0)))  [API 520 Part I annex B]", "isentropic_flux(p0, h0, p_t)",
                sized.direct.mass_flux, "kg/(m**2*s)", p0=(inlet.pressure / 1e5, "bar"),
                h0=(inlet.enthalpy / 1e3, "kJ/kg"), p_t=(sized.direct.throat_pressure / 1e5, "bar"))
    for method, area, flux in (("omega method", sized.area_omega, flow.mass_flux),
                               ("direct integration", sized.area_direct, sized.direct.mass_flux)):
        if kb == 1.0:
            result.work(f"{name}: required area, {method}", "A = W / (Kd·G)", "W/(Kd*G)", area, "mm**2",
                        W=(flow_kg_h, "kg/h"), Kd=(sized.kd, ""), G=(flux, "kg/(m**2*s)"))
        else:
            result.work(f"{name}: required area, {method}", "A = W / (Kd·Kb·G)", "W/(Kd*Kb*G)", area, "mm**2",
                        W=(flow_kg_h, "kg/h"), Kd=(sized.kd, ""), Kb=(kb, ""), G=(flux, "kg/(m**2*s)"))
    _omega_range(result, name, inlet.pressure)
    load = "two-phase" if flow.region == "two-phase" else "subcooled"
    note = (f"{name}: Kd = {sized.kd} for preliminary sizing of a {load}"
            " load (API 520 Part I annex C); the maker's certified two-phase coefficient governs")
    if note not in result.assumptions:
        result.assumptions.append(note)
    return sized.area, sized.governing, sized


def _omega_range(result, name, pressure):
    """A warning when the omega method is used near water's thermodynamic critical point."""
    reduced = pressure / WATER_CRITICAL_PRESSURE
    check = f"{name.split(',')[0]}: omega method range"
    if reduced <= OMEGA_REDUCED_PRESSURE_LIMIT or any(c.name == check for c in result.checks):
        return
    result.check(check, "warn", Phrase.of(
        "the relieving pressure {p:.4g} is {reduced:.2f} of water's critical pressure {pc:.5g}: near the "
        "thermodynamic critical point the two-point omega parameter no longer represents the expansion; the direct "
        "integration on IF97 is the better guide, and the maker's certified capacity governs",
        p=(pressure / 1e5, "bar"), reduced=(reduced, ""), pc=(WATER_CRITICAL_PRESSURE / 1e5, "bar")))
    result.assumptions.append(
        f"{check}: the omega method is taken to hold up to a reduced pressure of {OMEGA_REDUCED_PRESSURE_LIMIT:g} "
        "(API 520 Part I annex C asks for a system away from the thermodynamic critical point; the figure "
        f"{OMEGA_REDUCED_PRESSURE_LIMIT:g} is not confirmed against the standard's text)")


def refuse_half_pipe(what, given, needed):
    """Refuse a pipe of ``[inputs.overpressure]`` given in part: ``given`` its keys and values (None: not given),
    ``needed`` the (key, example) pairs that must come together once any key is given."""
    if any(v is not None for v in given.values()):
        for key, example in needed:
            if given[key] is None:
                other = next(k for k, v in given.items() if v is not None)
                raise InputError(f"{what} is given without its {key.split('_')[1]}",
                                 field=f"overpressure.{key}", value=f"{other} = {given[other]}",
                                 fix=f"add {key} = {example} to [inputs.overpressure], or remove {other}")


def select_orifice(result, prefix, name, area, flow_kg_h):
    """The API 526 orifice for ``area`` (mm²) as a result and a check; the selected orifice's rated flow (kg/h), or
    None when beyond the T orifice."""
    result.add(f"{prefix}_required_area", f"{name}: required effective area", area, "mm**2")
    orifice = api526_orifice(area)
    largest = API526_AREAS_IN2[-1][1] * MM2_PER_IN2
    if orifice is None:
        result.add(f"{prefix}_orifice", f"{name}: API 526 orifice", "larger than T")
        result.check_limit(f"{name}: relief orifice", (area, "mm**2"), [("<=", (largest, "mm**2"), "fail")],
                           Phrase.of("required {area:.0f} exceeds the T orifice: use several valves, or reduce the "
                                     "relief load at its source", area=(area, "mm**2")), source="API 526")
        return None
    letter, orifice_area = orifice
    result.add(f"{prefix}_orifice", f"{name}: API 526 orifice (smallest large enough)", letter)
    result.add(f"{prefix}_orifice_area", f"{name}: effective area of the {letter} orifice", orifice_area, "mm**2")
    # The smallest orifice large enough always holds the required area: a statement, not a check that could fail.
    result.notice(f"{name}: relief orifice",
                  Phrase.of(f"{letter} orifice, {{orifice:.0f}} effective (API 526) for {{area:.0f}} required; "
                            "the maker's certified capacity governs", orifice=(orifice_area, "mm**2"),
                            area=(area, "mm**2")))
    return flow_kg_h * orifice_area / area


def discharge_section(result, prefix, name, *, valve_type, set_pressure, atm, rated_flow_kg_h, enthalpy, size,
                      length, fittings_k, schedule=None, keys=DISCHARGE_KEYS, relieving_temperature=None):
    """Built-up back pressure in the discharge pipe against the valve's limit, and the reaction force at its exit.

    ``enthalpy`` (J/kg) is the steam's, throttled through the valve into the pipe at constant enthalpy. The reaction
    force takes ``relieving_temperature`` (K), the let-down's basis (steam cools as it throttles, so the relieving
    temperature gives the larger force); without it, the throttled steam's.
    """
    diameter = discharge_diameter(result, name, size, length, schedule, keys)
    if diameter is None:
        return None
    flow = rated_flow_kg_h / 3600.0
    outlet = SteamState.from_ph(atm, enthalpy)
    viscosity = dynamic_viscosity(outlet.temperature, outlet.density)
    try:
        line = built_up_back_pressure(flow, outlet.temperature, diameter, length, fittings_k or 0.0, atm, viscosity,
                                      relieving_pressure=set_pressure + DEFAULT_OVERPRESSURE * (set_pressure - atm))
    except OutOfRangeError as exc:
        result.check(f"{name}: built-up back pressure", "fail",
                     f"{exc.message} ({size}, {length:g} m); fix: {exc.fix}")
        return None
    result.work(f"{name}: built-up back pressure",
                "p1 = root of p1² − p2² − G²·(R·T/M)·(f·L/D + ΣK + 2·ln(p1/p2)), isothermal flow, with "
                "p2 = max(p_atm, G·√(RT/M))",
                "isothermal_line(G, T, f, L, D, K, p2)", line.outlet_pressure / 1e5, "bar",
                G=(flow / flow_area(diameter), "kg/(m**2*s)"), T=(outlet.temperature - 273.15, "degC"),
                f=(line.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"), K=(fittings_k or 0.0, ""),
                p2=(line.exit_pressure / 1e5, "bar"))
    result.add(f"{prefix}_built_up_back_pressure", f"{name}: built-up back pressure at the valve outlet",
               line.outlet_pressure / 1e5, "bar")
    back_pressure_check(result, name, valve_type, line.outlet_pressure, set_pressure, atm)
    kappa = SteamState.from_pT(atm, max(outlet.temperature, SteamState.from_p_dryness(atm, 1.0).temperature + 1e-3)
                               ).isentropic_exponent
    exit_area = flow_area(diameter) * 1e6
    t_force = relieving_temperature if relieving_temperature is not None else outlet.temperature
    force, p_exit = reaction_force(rated_flow_kg_h, t_force, kappa, exit_area, atm)
    result.work(f"{name}: reaction force at the discharge",
                "F = 129.41·W·√(kT/((k+1)M)) + 10⁻³·A_o·P2,  T = T1 + 273.15  "
                "[API 520 Part II, open-discharge reaction force; "
                "N, kg/s, °C, kg/kmol, mm², kPa(g)]",
                "129.41*W*sqrt(k*(T1 + 273.15)/((k + 1)*M)) + 0.001*A_o*P2", force, "N", units_fixed=True,
                W=(flow, "kg/s"), k=(kappa, ""), T1=(t_force - 273.15, "degC"),
                M=(MOLAR_MASS_WATER, "kg/kmol"),
                A_o=(exit_area, "mm**2"), P2=(p_exit / 1e3, "kPa", "difference"))
    result.add(f"{prefix}_reaction_force", f"{name}: reaction force at the open discharge", force, "N")
    return line.outlet_pressure


def discharge_diameter(result, name, size, length, schedule, keys=DISCHARGE_KEYS):
    """The discharge pipe's bore (m), or None, with a notice, when the pipe is not given."""
    if size is None or length is None:
        # A notice, as the let-down's: it cannot fail, so a record of an earlier release keeps its verdict.
        result.notice(f"{name}: discharge line",
                      f"not assessed: {keys[1]} are not given among the overpressure inputs; the built-up back "
                      f"pressure and the reaction force of the {name.lower()} are for the relief system's designer "
                      "to check")
        return None
    return pipe_inner_diameter(size, schedule or DEFAULT_SCHEDULE, field=keys[0])


def back_pressure_check(result, name, valve_type, outlet_pressure, set_pressure, atm, extra="", label=None):
    """The built-up back pressure as a share of the gauge set pressure, against the limit of the valve type: a
    warning above the limit, a failure at the gauge set pressure (the valve cannot pass its flow)."""
    fraction, basis = back_pressure_limit(valve_type)
    share = (100.0 * (outlet_pressure - atm) / (set_pressure - atm), "percent")
    limit = (100.0 * fraction, "percent")
    remedy = ("enlarge or shorten the discharge line, or use a balanced-bellows or pilot-operated valve (the maker's "
              "limit governs)" if valve_type == "conventional" else
              "enlarge or shorten the discharge line; the maker's limit for this valve governs")
    # At the gauge set pressure the valve cannot pass its flow at all: a failure, not a warning.
    return result.check_limit(
        label or f"{name}: built-up back pressure", share,
        [("<=", limit, "warn"), ("<", (100.0, "percent"), "fail")],
        lambda status: Phrase.of(
            f"{{share:.1f}} of the gauge set pressure, within {{limit:g}} ({valve_type} valve){extra}"
            if status == "pass" else
            f"{{share:.1f}} of the gauge set pressure, above {{limit:g}} ({valve_type} valve){extra}: {remedy}"
            if status == "warn" else
            f"{{share:.1f}} of the gauge set pressure, far above {{limit:g}} ({valve_type} valve){extra}: at the "
            "set pressure the valve cannot pass its flow; enlarge the discharge line (at least the valve's outlet "
            "size) or shorten it", share=share, limit=limit),
        source=basis + "; at 100 % of the gauge set pressure the valve cannot open against it (common practice)")


#: The step a discharge line of liquid carried to its exit writes (the pattern BASIS_CHANGES names it by).
LIQUID_TO_EXIT_STEP = "*: built-up back pressure (liquid to the pipe's exit, flashing there)"


#: Why release 0.3.2 changed a discharge line's basis (the words verify gives a record of an earlier release).
LIQUID_TO_EXIT_WHY = (
    "a hot liquid whose flux the flashing mixture could not carry below its flash point stays liquid the "
    "length of the discharge pipe and flashes at its exit, choked there; the pipe was "
    "called far too small and the record failed")
#: Why release 0.3.2 changed a subcooled liquid's flash point in its discharge line.
FLASH_POINT_WHY = (
    "a liquid carried down a discharge pipe keeps its enthalpy and flashes where that is the saturated liquid's, "
    "above its saturation pressure at its temperature (taken before): the back pressure and the exit's reaction "
    "force were up to about 1 % and 6 % low")
#: The step a subcooled liquid's discharge line writes for its flash point (the pattern its change is opened by).
FLASH_POINT_STEP = "*: pressure where the liquid flashes in the discharge pipe*"


def flash_point_change(release, name, prefix, resized=True):
    """The ``BASIS_CHANGES`` entry of a subcooled liquid's flash point in one valve's discharge line: opened by that
    valve's flash-point step, for a record that held a subcooled line (its step in the earlier words, or the line's
    "far too small" failure) or a liquid line (a liquid a little below its boiling point at the atmosphere, which
    flashes on its isenthalp), naming what the line, its assumption and the sizing at its back pressure write."""
    entry = liquid_to_exit_change(release, name, prefix, resized, FLASH_POINT_WHY)
    patterns = entry[2] + (f"{name}*: the discharge pipe carries*", f"{name}*: omega parameter of the discharge line*",
                           f"{name}*: pressure where the liquid flashes*")
    return (release, FLASH_POINT_WHY, patterns, name + FLASH_POINT_STEP, None,
            (f"{name}*: built-up back pressure (two-phase): *liquid above p0 (its saturation pressure)*",
             f"{name}*: built-up back pressure (liquid): *",
             f"{name}*: built-up back pressure: *far too small*"))


def liquid_to_exit_change(release, name, prefix, resized=True, why=LIQUID_TO_EXIT_WHY):
    """An entry of a kind's ``BASIS_CHANGES`` for one relief valve whose discharge line a release carries as liquid to
    its exit: gated on that valve's own step (``name`` + :data:`LIQUID_TO_EXIT_STEP`), and naming only what the line
    and the valve's sizing at its back pressure write (``resized``: the valve is sized again at it). What comes
    before the line (the relief load, the relieving pressure, the case) and the other valves are held as for any
    record: the change does not explain them. The record must also hold the earlier release's failure of that line,
    "far too small" (the sixth item): the earlier release failed exactly the lines this release carries as liquid, so
    a record without it was not touched by the change (one whose inputs were changed since is held to every word)."""
    line = (f"{name}*: built-up back pressure*", f"{name}*: reaction force at the discharge*",
            f"{prefix}_*built_up_back_pressure*", f"{prefix}_*discharge_exit_velocity", f"{prefix}_*reaction_force")
    sizing = (f"{name}*at the built-up back pressure*", f"{name}*: relief orifice", f"{name}*: discharge line size",
              f"{name}*: *inlet*", f"{prefix}_*required_area", f"{prefix}_*orifice", f"{prefix}_*orifice_area",
              f"{prefix}_*governing_case", f"{prefix}_*inlet_*")
    return (release, why, line + (sizing if resized else ()), name + LIQUID_TO_EXIT_STEP, None,
            f"{name}*: built-up back pressure: *far too small*")


def two_phase_discharge_section(result, prefix, name, *, valve_type, set_pressure, atm, rated_flow_kg_h, relieving,
                                size, length, fittings_k, schedule=None, keys=DISCHARGE_KEYS):
    """Built-up back pressure of a flashing two-phase discharge (homogeneous flow, omega equation of state) against
    the valve's limit, and the reaction force at the pipe's exit.

    ``relieving`` is the mixture's IF97 state at the relieving pressure; the pipe carries the selected orifice's
    rated flow (API 520 Part II, 5.3.1; common practice).
    """
    diameter = discharge_diameter(result, name, size, length, schedule, keys)
    if diameter is None:
        return None
    flow = rated_flow_kg_h / 3600.0
    fittings_k = fittings_k or 0.0
    # A subcooled liquid flashes where its enthalpy, which the pipe keeps, is the saturated liquid's; above that
    # pressure the pipe carries liquid.
    subcooled = relieving.dryness is None
    p0 = (flash_pressure(relieving.enthalpy, relieving.temperature, relieving.pressure) if subcooled
          else relieving.pressure)
    v0 = 1.0 / relieving.density
    if subcooled:
        result.work(f"{name}: pressure where the liquid flashes in the discharge pipe (IF97, constant enthalpy)",
                    "p0: h_f(p0) = h1  [the pipe keeps the liquid's enthalpy; above its saturation pressure p_s(T1)]",
                    "p_flash(h1, T1)", p0 / 1e5, "bar", h1=(relieving.enthalpy / 1e3, "kJ/kg"),
                    T1=(relieving.temperature - 273.15, "degC"))
    exit_state = SteamState.from_ph(atm, relieving.enthalpy)
    v_atm = 1.0 / exit_state.density
    omega = pipe_omega(p0, v0, atm, v_atm)
    liquid = SteamState.from_p_dryness(atm, 0.0)
    viscosity = dynamic_viscosity(liquid.temperature, liquid.density)
    result.assumptions.append(
        f"{name}: the discharge pipe carries the orifice's rated flow as a homogeneous two-phase mixture in "
        "equilibrium (no slip), its volume by the omega equation through the relieving state and the mixture "
        "expanded at constant enthalpy to the atmosphere (IF97)"
        + (", liquid down to the pressure where it flashes on its isenthalp" if subcooled else "")
        + "; friction by Colebrook at the liquid-only Reynolds "
        "number (saturated liquid at the atmosphere: the larger friction, conservative); the pipe taken horizontal "
        "(API 520 Part I annex C; Leung, 1996)")
    result.work(f"{name}: omega parameter of the discharge line (IF97, constant enthalpy)",
                "ω_line = (v_e/v0 − 1)/(p0/p_atm − 1)  [omega equation through both ends of the pipe's range]",
                "(v_e/v0 - 1)/(p0/p_atm - 1)", omega, v_e=(v_atm, "m**3/kg"), v0=(v0, "m**3/kg"),
                p0=(p0 / 1e5, "bar"), p_atm=(atm / 1e5, "bar"))
    try:
        line = two_phase_back_pressure(flow, diameter, length, fittings_k, atm, omega, p0, v0, viscosity,
                                       liquid_up_to=relieving.pressure if subcooled else None)
    except OutOfRangeError as exc:
        result.check(f"{name}: built-up back pressure", "fail",
                     f"{exc.message} ({size}, {length:g} m); fix: {exc.fix}")
        return None
    if line.liquid_to_exit:
        result.work(f"{name}: built-up back pressure (liquid to the pipe's exit, flashing there)",
                    "p1 = p0 + (f·L/D + ΣK)·G²·v0/2,  the liquid flashing at the exit at p0 (its flash point on its isenthalp): "
                    "the omega critical pressure G·√(ω·p0·v0) is not below p0, so the mixture cannot carry the flux "
                    "below it and the liquid chokes there, f by Colebrook at Re_lo = G·D/μ_l  [API 520 Part I annex "
                    "C, subcooled liquid choking at its saturation pressure; Darcy-Weisbach]",
                    "p0 + (f*L/D + K)*G**2*v0/2", line.outlet_pressure / 1e5, "bar",
                    p0=(p0 / 1e5, "bar"), f=(line.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"),
                    K=(fittings_k, ""), G=(line.mass_flux, "kg/(m**2*s)"), v0=(v0, "m**3/kg"))
    else:
        result.work(f"{name}: built-up back pressure (two-phase)",
                    "p1 = root of ∫[p2, p1] 2/(G²·v)·(1 − G²·ω·p0·v0/p²) dp = f·L/D + ΣK,  v = v0·(ω·(p0/p − 1) + 1),  "
                    "p2 = max(p_atm, G·√(ω·p0·v0)), f by Colebrook at Re_lo = G·D/μ_l"
                    + (", liquid above p0 (where it flashes): + (N − N(p0))·G²·v0/2" if subcooled else "")
                    + "  [API 520 Part I annex C; Leung (1996)]",
                    "omega_line(G, omega, p0, v0, f, L, D, K, p2)", line.outlet_pressure / 1e5, "bar",
                    G=(line.mass_flux, "kg/(m**2*s)"), omega=(omega, ""), p0=(p0 / 1e5, "bar"), v0=(v0, "m**3/kg"),
                    f=(line.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"), K=(fittings_k, ""),
                    p2=(line.exit_pressure / 1e5, "bar"))
    result.add(f"{prefix}_built_up_back_pressure", f"{name}: built-up back pressure at the valve outlet",
               line.outlet_pressure / 1e5, "bar")
    share = 100.0 * (line.outlet_pressure - atm) / (set_pressure - atm)
    result.work(f"{name}: built-up back pressure, of the gauge set pressure", "share = (p1 − p_atm) / (p_set − p_atm)",
                "(p1 - p_atm)/(p_set - p_atm)", share, "percent", p1=(line.outlet_pressure / 1e5, "bar"),
                p_atm=(atm / 1e5, "bar"), p_set=(set_pressure / 1e5, "bar"))
    result.add(f"{prefix}_built_up_back_pressure_fraction", f"{name}: built-up back pressure, of the gauge set "
               "pressure", share, "percent")
    result.add(f"{prefix}_discharge_exit_velocity", f"{name}: mixture velocity at the discharge pipe's exit",
               line.exit_velocity, "m/s")
    choked = (" (liquid the whole length, flashing at the exit, choked at its flash point)" if line.liquid_to_exit
              else " (the exit choked at the omega critical flux)" if line.exit_choked else "")
    back_pressure_check(result, name, valve_type, line.outlet_pressure, set_pressure, atm, choked)
    area = flow_area(diameter)
    force = two_phase_reaction_force(line, diameter, atm)
    result.work(f"{name}: reaction force at the discharge (two-phase)",
                "F = G²·v_e·A + (p_e − p_atm)·A  [momentum and pressure at the open exit, API 520 Part II, open-discharge reaction force]",
                "G**2*v_e*A + (p_e - p_atm)*A", force, "N", G=(line.mass_flux, "kg/(m**2*s)"),
                v_e=(line.exit_volume, "m**3/kg"), A=(area * 1e6, "mm**2"), p_e=(line.exit_pressure / 1e5, "bar"),
                p_atm=(atm / 1e5, "bar"))
    result.add(f"{prefix}_reaction_force", f"{name}: reaction force at the open discharge", force, "N")
    return line.outlet_pressure
