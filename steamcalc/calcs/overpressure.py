"""What the overpressure sections of the flash and exchanger kinds share: the relieving pressure, a relief
valve sized for steam or for a flashing two-phase load, its API 526 orifice, the discharge line's built-up
back pressure (steam: isothermal flow; two-phase: homogeneous flow by the omega equation) against the valve
type's limit and the reaction force, each as steps and checks of the Result.

The kinds' own load cases are in :mod:`steamcalc.calcs.flash.overpressure` and
:mod:`steamcalc.calcs.exchanger.overpressure`.
"""

from __future__ import annotations

import math

from ..equipment.discharge_line import back_pressure_limit, built_up_back_pressure
from ..equipment.line_loss import line_pressure_drop
from ..equipment.piping import flow_area, pipe_inner_diameter
from ..equipment.relief import (
    API526_AREAS_IN2, API526_INLET_NPS, DEFAULT_KD, INLET_LOSS_LIMIT, MM2_PER_IN2, MOLAR_MASS_WATER, api526_orifice,
    direct_integration_area, direct_integration_flux, reaction_force, steam_equation_area,
)
from ..equipment.two_phase_line import (
    pipe_omega, two_phase_back_pressure, two_phase_inlet_pressure, two_phase_reaction_force,
)
from ..equipment.two_phase_relief import CERTIFIED_CAPACITY, size_flashing_relief
from ..errors import InputError, OutOfRangeError
from ..properties.steam import SteamState, dynamic_viscosity, saturation_pressure, saturation_temperature
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


def flashing_relief_area(result, name, inlet, flow_kg_h, back, kb=1.0):
    """Required area (mm²) of a two-phase or flashing-liquid load by the omega method and by direct integration,
    both on IF97, down to the back pressure ``back`` (Pa: the omega method's subcritical flux when it is above
    the critical pressure, API 520 Part I annex C); the larger governs. ``kb``: the balanced-bellows correction
    (API 520 Part I figure 31), 1 for other valves. Returns ``(area, method, FlashingRelief)``."""
    sized = size_flashing_relief(inlet, back, flow_kg_h, kb=kb)
    flow = sized.omega
    result.work(f"{name}: omega parameter (two-point, IF97)", "ω = 9·(v9/v0 − 1)  [API 520 Part I annex C]",
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


def inlet_loss_notice(result, name, why="the relief valve's inlet pipe is not among the inputs"):
    """The relief valve's inlet pressure loss, when it is not computed: a notice of the rule, saying why."""
    result.notice(f"{name}: relief inlet pressure loss", Phrase.of(
        f"not assessed: {why}; its pressure loss at the valve's "
        "rated flow must stay below {limit:g} of the gauge set pressure (API 520 Part II, 7.3.1), for the relief "
        "system's designer to check", limit=(100.0 * INLET_LOSS_LIMIT, "percent")), act=True)


#: The case-file keys of a relief valve's inlet pipe, in ``[inputs.overpressure]``.
INLET_KEYS = ("overpressure.inlet_size", "overpressure.inlet_length")


#: Largest sum of loss coefficients taken for a relief valve's inlet pipe: an entrance, a few elbows and a full-bore
#: block valve are a few velocity heads (common practice); more than this is not a relief inlet.
MAX_INLET_FITTINGS_K = 100.0
#: Share of the relieving pressure beyond which Darcy–Weisbach at the inlet density understates a steam pipe's loss
#: (the steam expands along it; common practice for compressible flow).
INCOMPRESSIBLE_SHARE = 0.10


def check_inlet_pipe_inputs(size, length, fittings_k):
    """Refusals of a relief valve's inlet-pipe inputs (``[inputs.overpressure]`` inlet_size, inlet_length,
    inlet_fittings_k): the size and the length together, and a sum of loss coefficients an inlet pipe can have."""
    if fittings_k is not None and not 0.0 <= fittings_k <= MAX_INLET_FITTINGS_K:
        raise InputError(f"a sum of loss coefficients of {fittings_k:g} is not a relief valve's inlet pipe's",
                         field="overpressure.inlet_fittings_k", value=fittings_k,
                         limits=(0.0, MAX_INLET_FITTINGS_K, ""),
                         fix="give the sum of the inlet pipe's K (a square-edged entrance 0.5, each elbow about "
                             "0.3 to 0.75), or leave it out for none")
    refuse_half_pipe("the relief valve's inlet pipe", {"inlet_size": size, "inlet_length": length,
                                                       "inlet_fittings_k": fittings_k},
                     (("inlet_size", '"DN80"'), ("inlet_length", '"0.5 m"')))


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


def inlet_pipe_not_assessed(result, name, size, why):
    """A notice that the inlet pipe given is not assessed, and why (nothing is said when none was given)."""
    if size is not None:
        result.notice(f"{name}: inlet pipe not assessed", f"the relief valve's inlet pipe given "
                                                          f"(overpressure.inlet_size, inlet_length) is not assessed: {why}")


def relief_inlet_loss(result, prefix, name, *, state, rated_flow_kg_h, set_pressure, atm, size, length, fittings_k,
                      fluid="steam"):
    """The relief valve's inlet pressure loss at its rated flow against 3 % of the gauge set pressure.

    Darcy–Weisbach with the Colebrook friction factor, the fluid at its relieving state throughout the short inlet
    pipe (schedule 40, commercial steel), or a two-phase mixture's homogeneous flow by the omega equation; a notice
    of the rule when the pipe is not given. The pipe's bore is held
    against the valve's: a pipe narrower than the smallest API 526 inlet of the selected orifice fails.

    Parameters
    ----------
    result : steamcalc.calcs.base.Result
        Holds the selected orifice as ``<prefix>_orifice``.
    prefix, name : str
        Result-key prefix and the relief valve's name in the record.
    state : steamcalc.properties.steam.SteamState
        The fluid entering the pipe at the relieving pressure: steam or liquid water (Darcy–Weisbach), or a
        flashing two-phase mixture (homogeneous flow, omega equation: :func:`two_phase_inlet_pressure`).
    rated_flow_kg_h : float
        The selected orifice's rated flow, kg/h (API 520 Part II, 7.3.1: the loss at the rated capacity).
    set_pressure, atm : float
        Set pressure and the site's atmosphere, Pa (absolute).
    size : str or None
        The inlet pipe's nominal size; ``length`` (m) its straight length; ``fittings_k`` the sum of its loss
        coefficients (entry, fittings), none counted when not given (said among the assumptions).
    fluid : str
        What flows, in words ("steam", "displaced liquid").

    Returns
    -------
    float or None
        The loss as a share of the gauge set pressure (fraction), or None when the pipe is not given.

    References
    ----------
    API 520 Part II (2015), 7.3.1: the inlet pressure loss at the rated capacity within 3 % of the set pressure
    (gauge). API 526 for the orifice letters. Colebrook (1939) with Darcy–Weisbach for the line; IAPWS R12-08
    for the viscosity; API 520 Part I annex C and Leung (1996) for a two-phase mixture.
    """
    if size is None or length is None:
        inlet_loss_notice(result, name)
        return None
    diameter = pipe_inner_diameter(size, DEFAULT_SCHEDULE, field=INLET_KEYS[0])
    if fittings_k is None:
        result.assumptions.append(f"{name}: no loss coefficients given for the inlet pipe (overpressure."
                                  "inlet_fittings_k): its entrance and fittings are not counted (a square-edged "
                                  "entrance alone is K 0.5, common practice)")
    result.assumptions.append(f"{name}: the inlet pipe's loss by Darcy–Weisbach at the relieving state, friction by "
                              "Colebrook for commercial steel (roughness 0.045 mm, common practice), at the "
                              "selected orifice's rated flow (API 520 Part II, 7.3.1); the maker's certified "
                              "capacity, when it is larger, governs the loss")
    letter = result.value(f"{prefix}_orifice")
    _inlet_bore_check(result, name, letter, size, diameter)
    result.add(f"{prefix}_inlet_rated_flow", f"{name}: rated flow through the inlet pipe ({fluid})", rated_flow_kg_h,
               "kg/h")
    result.work(f"{name}: velocity in the inlet pipe at the rated flow", "v = W/(ρ·π·D²/4)",
                "W/(rho*pi*D**2/4)", rated_flow_kg_h / 3600.0 / state.density / flow_area(diameter), "m/s",
                W=(rated_flow_kg_h, "kg/h"), rho=(state.density, "kg/m**3"), pi=(math.pi, ""),
                D=(diameter * 1e3, "mm"))
    two_phase = state.dryness is not None and 0.0 < state.dryness < 1.0
    if not two_phase and _flashes_in_pipe(state, rated_flow_kg_h, diameter, length, fittings_k or 0.0):
        two_phase, fluid = True, f"{fluid}, flashing in the pipe"
    drop = (_two_phase_inlet_drop if two_phase else _inlet_drop)(result, name, fluid, state, rated_flow_kg_h,
                                                                  diameter, length, fittings_k or 0.0)
    if drop is None:
        return None
    fraction = drop / (set_pressure - atm)
    result.work(f"{name}: inlet loss, of the gauge set pressure", "loss = Δp / (p_set − p_atm)",
                "dp/(p_set - p_atm)", 100.0 * fraction, "percent", dp=(drop / 1e5, "bar", "difference"),
                p_set=(set_pressure / 1e5, "bar"), p_atm=(atm / 1e5, "bar"))
    result.add(f"{prefix}_inlet_loss_fraction", f"{name}: inlet loss, of the gauge set pressure", 100.0 * fraction,
               "percent")
    share, limit = (100.0 * fraction, "percent"), (100.0 * INLET_LOSS_LIMIT, "percent")
    shown = ".1f" if share[0] >= 0.1 else ".2g"
    compressible = ""
    if fluid == "steam" and drop > INCOMPRESSIBLE_SHARE * state.pressure:
        compressible = (f"; the loss is more than {100 * INCOMPRESSIBLE_SHARE:g} % of the relieving pressure, where "
                        "Darcy–Weisbach at the inlet density understates a steam pipe's loss (the steam expands "
                        "along it: compressible flow)")
    # A loss of the whole gauge set pressure or more leaves nothing to drive the rated flow: a failure, not a warning.
    result.check_limit(
        f"{name}: relief inlet pressure loss", share, [("<=", limit, "warn"), ("<", (100.0, "percent"), "fail")],
        lambda status: Phrase.of(
            f"{{loss:{shown}}} of the gauge set pressure at the rated flow, within {{limit:g}} (API 520 Part II, "
            "7.3.1)" if status == "pass" else
            f"{{loss:{shown}}} of the gauge set pressure at the rated flow, above {{limit:g}} (API 520 Part II, "
            f"7.3.1){compressible}: the valve may chatter, and above its blowdown (the maker's figure, often 7 % "
            "to 10 %) it will: enlarge or shorten the inlet pipe, or have the relief system's designer justify it "
            "with the maker" if status == "warn" else
            f"{{loss:{shown}}} of the gauge set pressure at the rated flow, far above {{limit:g}} (API 520 Part II, "
            f"7.3.1){compressible}: the inlet pipe alone would take the whole set pressure, so the valve cannot pass "
            "its rated flow; enlarge the inlet pipe (at least the valve's inlet size) or shorten it",
            loss=share, limit=limit),
        source="API 520 Part II, 7.3.1; at 100 % of the gauge set pressure no pressure is left to drive the flow "
               "(common practice)")
    return fraction


def _inlet_drop(result, name, fluid, state, rated_flow_kg_h, diameter, length, fittings_k):
    """Pa lost along the inlet pipe by a single-phase fluid (Darcy–Weisbach at the relieving state), as a step."""
    loss = line_pressure_drop(rated_flow_kg_h / 3600.0, state.density,
                              dynamic_viscosity(state.temperature, state.density), diameter, length, fittings_k)
    result.work(f"{name}: inlet pressure loss at the rated flow ({fluid})",
                "Δp = (f·L/D + ΣK)·ρ·v²/2  at the rated flow (Darcy–Weisbach, Colebrook friction factor)",
                "(f*L/D + K)*rho*v*v/2", loss.pressure_drop / 1e5, "bar",
                f=(loss.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"), K=(fittings_k, ""),
                rho=(state.density, "kg/m**3"), v=(loss.velocity, "m/s"))
    return loss.pressure_drop


def _flashes_in_pipe(state, rated_flow_kg_h, diameter, length, fittings_k):
    """A liquid whose Darcy–Weisbach loss along the pipe would take it below its saturation pressure: it flashes
    there, and its loss is the flashing flow's (a subcooled liquid close to saturation)."""
    if state.dryness is not None or state.temperature >= saturation_temperature(state.pressure):
        return False   # wet or superheated steam
    loss = line_pressure_drop(rated_flow_kg_h / 3600.0, state.density,
                              dynamic_viscosity(state.temperature, state.density), diameter, length, fittings_k)
    return state.pressure - loss.pressure_drop < saturation_pressure(state.temperature)


def _two_phase_inlet_drop(result, name, fluid, state, rated_flow_kg_h, diameter, length, fittings_k):
    """Pa lost along the inlet pipe by a flashing two-phase mixture (homogeneous, omega equation fitted through the
    relieving state and the mixture expanded at constant enthalpy to 90 % of its pressure), as steps; None, with a
    failing check, when the pipe cannot pass the flow before it chokes. A subcooled liquid flows as liquid down to
    its saturation pressure and flashes from there (its omega fitted from the saturation pressure)."""
    subcooled = state.dryness is None
    p0, v0 = (saturation_pressure(state.temperature) if subcooled else state.pressure), 1.0 / state.density
    expanded = SteamState.from_ph(0.9 * p0, state.enthalpy)
    omega = pipe_omega(p0, v0, 0.9 * p0, 1.0 / expanded.density)
    liquid = SteamState.from_p_dryness(state.pressure, 0.0)
    result.assumptions.append(
        f"{name}: the inlet pipe carries the rated flow as a homogeneous two-phase mixture in equilibrium (no slip)"
        + (", liquid down to its saturation pressure," if subcooled else ",")
        + " its volume by the omega equation through the "
        + ("liquid at its saturation pressure" if subcooled else "relieving state")
        + " and the mixture expanded at constant enthalpy to 90 % of that pressure (IF97; the two points of API 520 "
        "Part I annex C, along an adiabatic pipe); friction by Colebrook at the liquid-only Reynolds number "
        "(saturated liquid at the relieving pressure: the larger friction, conservative) (Leung, 1996)")
    result.work(f"{name}: omega parameter of the inlet pipe (IF97, constant enthalpy)",
                "ω_in = (v_9/v0 − 1)/(p0/p_9 − 1),  p_9 = 0.9·p0  [omega equation through the two points]",
                "(v_9/v0 - 1)/(p0/p_9 - 1)", omega, v_9=(1.0 / expanded.density, "m**3/kg"), v0=(v0, "m**3/kg"),
                p0=(p0 / 1e5, "bar"), p_9=(0.9 * p0 / 1e5, "bar"))
    try:
        inlet = two_phase_inlet_pressure(rated_flow_kg_h / 3600.0, diameter, length, fittings_k, omega, p0, v0,
                                         dynamic_viscosity(liquid.temperature, liquid.density),
                                         liquid_from=state.pressure if subcooled else None)
    except OutOfRangeError as exc:
        result.check(f"{name}: relief inlet pressure loss", "fail", f"{exc.message}; fix: {exc.fix}")
        return None
    drop = state.pressure - inlet.valve_inlet_pressure
    operands = dict(G=(inlet.mass_flux, "kg/(m**2*s)"), omega=(omega, ""), p0=(p0 / 1e5, "bar"), v0=(v0, "m**3/kg"),
                    f=(inlet.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"), K=(fittings_k, ""))
    if subcooled:
        result.work(f"{name}: inlet pressure loss at the rated flow ({fluid})",
                    "Δp = p1 − p2: liquid from p1 to its saturation pressure p0 over N_l = 2·(p1 − p0)/(G²·v0) "
                    "velocity heads, then p2 = root of ∫[p2, p0] 2/(G²·v)·(1 − G²·ω·p0·v0/p²) dp = f·L/D + ΣK − N_l, "
                    "v = v0·(ω·(p0/p − 1) + 1), f by Colebrook at Re_lo = G·D/μ_l  [API 520 Part I annex C, C.2.3; "
                    "Leung (1996)]", "omega_inlet_subcooled(G, omega, p1, p0, v0, f, L, D, K)", drop / 1e5, "bar",
                    p1=(state.pressure / 1e5, "bar"), **operands)
    else:
        result.work(f"{name}: inlet pressure loss at the rated flow ({fluid})",
                    "Δp = p0 − p2,  p2 = root of ∫[p2, p0] 2/(G²·v)·(1 − G²·ω·p0·v0/p²) dp = f·L/D + ΣK,  "
                    "v = v0·(ω·(p0/p − 1) + 1), f by Colebrook at Re_lo = G·D/μ_l  [API 520 Part I annex C; "
                    "Leung (1996)]", "omega_inlet(G, omega, p0, v0, f, L, D, K)", drop / 1e5, "bar", **operands)
    return drop


def _inlet_bore_check(result, name, letter, size, diameter):
    """The inlet pipe against the smallest API 526 inlet of the selected orifice: narrower fails."""
    nps = API526_INLET_NPS.get(letter)
    if nps is None:
        return
    valve = pipe_inner_diameter(f"NPS {nps:g}", DEFAULT_SCHEDULE)
    # The size and letter are written into the words (their braces doubled): only the bores are amounts.
    words = f"{size} (the smallest inlet API 526 gives a valve of the {letter} orifice is NPS {nps:g})".replace(
        "{", "{{").replace("}", "}}")
    bore, smallest = (diameter * 1e3, "mm"), (valve * 1e3 * (1.0 - 1e-9), "mm")
    result.check_limit(
        f"{name}: relief inlet pipe size", bore, [(">=", smallest, "fail")],
        lambda status: Phrase.of(
            "the inlet pipe's bore {d:.1f}, not narrower than {v:.1f}, the schedule 40 bore of the valve's smallest "
            f"inlet, for the inlet pipe {words}" if status == "pass" else
            "the inlet pipe's bore {d:.1f} is narrower than {v:.1f}, the schedule 40 bore of the valve's smallest "
            f"inlet, for the inlet pipe {words}: use an inlet pipe at least the valve's inlet size (common practice)",
            d=bore, v=smallest),
        source="API 526 (orifice letters and valve sizes); the inlet pipe at least the valve's inlet (common practice)")
    result.assumptions.append(f"{name}: the smallest API 526 inlet of each orifice letter (D and E NPS 1; F, G and H "
                              "NPS 1½; J NPS 2; K and L NPS 3; M, N and P NPS 4; Q and R NPS 6; T NPS 8) is not "
                              "confirmed against the standard's text")


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
                "[API 520 Part II, 4.4.1.1, eq. (1); "
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
    # A subcooled liquid flashes from its saturation pressure; above it the pipe carries liquid.
    subcooled = relieving.dryness is None
    p0 = saturation_pressure(relieving.temperature) if subcooled else relieving.pressure
    v0 = 1.0 / relieving.density
    exit_state = SteamState.from_ph(atm, relieving.enthalpy)
    v_atm = 1.0 / exit_state.density
    omega = pipe_omega(p0, v0, atm, v_atm)
    liquid = SteamState.from_p_dryness(atm, 0.0)
    viscosity = dynamic_viscosity(liquid.temperature, liquid.density)
    result.assumptions.append(
        f"{name}: the discharge pipe carries the orifice's rated flow as a homogeneous two-phase mixture in "
        "equilibrium (no slip), its volume by the omega equation through the relieving state and the mixture "
        "expanded at constant enthalpy to the atmosphere (IF97)"
        + (", liquid down to its saturation pressure" if subcooled else "")
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
    result.work(f"{name}: built-up back pressure (two-phase)",
                "p1 = root of ∫[p2, p1] 2/(G²·v)·(1 − G²·ω·p0·v0/p²) dp = f·L/D + ΣK,  v = v0·(ω·(p0/p − 1) + 1),  "
                "p2 = max(p_atm, G·√(ω·p0·v0)), f by Colebrook at Re_lo = G·D/μ_l"
                + (", liquid above p0 (its saturation pressure): + (N − N(p0))·G²·v0/2" if subcooled else "")
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
    choked = " (the exit choked at the omega critical flux)" if line.exit_choked else ""
    back_pressure_check(result, name, valve_type, line.outlet_pressure, set_pressure, atm, choked)
    area = flow_area(diameter)
    force = two_phase_reaction_force(line, diameter, atm)
    result.work(f"{name}: reaction force at the discharge (two-phase)",
                "F = G²·v_e·A + (p_e − p_atm)·A  [momentum and pressure at the open exit, API 520 Part II, 4.4.1.1]",
                "G**2*v_e*A + (p_e - p_atm)*A", force, "N", G=(line.mass_flux, "kg/(m**2*s)"),
                v_e=(line.exit_volume, "m**3/kg"), A=(area * 1e6, "mm**2"), p_e=(line.exit_pressure / 1e5, "bar"),
                p_atm=(atm / 1e5, "bar"))
    result.add(f"{prefix}_reaction_force", f"{name}: reaction force at the open discharge", force, "N")
    return line.outlet_pressure
