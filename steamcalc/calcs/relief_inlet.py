"""The relief valve's inlet pipe, for the flash vessel's and the heater's relief valves: its loss at the valve's rated
flow against 3 % of the gauge set pressure (API 520 Part II, inlet piping), and its bore against the valve's inlet.

Steam and liquid by Darcy–Weisbach at the relieving state; a flashing two-phase mixture, or a liquid that would fall
below its saturation pressure along the pipe, by homogeneous flow and the omega equation of state
(:func:`steamcalc.equipment.two_phase_line.two_phase_inlet_pressure`, API 520 Part I annex C).
"""

from __future__ import annotations

import math

from ..equipment.line_loss import line_pressure_drop
from ..equipment.piping import flow_area, pipe_inner_diameter
from ..equipment.relief import API526_INLET_NPS, INLET_LOSS_LIMIT
from ..equipment.two_phase_line import pipe_omega, two_phase_inlet_pressure
from ..errors import InputError, OutOfRangeError
from ..properties.steam import SteamState, dynamic_viscosity, saturation_pressure, saturation_temperature
from ..units.amounts import Phrase
from .overpressure import DEFAULT_SCHEDULE, refuse_half_pipe


def inlet_loss_notice(result, name, why="the relief valve's inlet pipe is not among the inputs"):
    """The relief valve's inlet pressure loss, when it is not computed: a notice of the rule, saying why."""
    result.notice(f"{name}: relief inlet pressure loss", Phrase.of(
        f"not assessed: {why}; its pressure loss at the valve's "
        "rated flow must stay below {limit:g} of the gauge set pressure (API 520 Part II, inlet piping), for the relief "
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
    inlet_fittings_k): the size and the length together, and a sum of loss coefficients an inlet pipe can have.

    Examples
    --------
    >>> check_inlet_pipe_inputs("DN80", 0.5, 0.5) is None
    True
    >>> try:
    ...     check_inlet_pipe_inputs("DN80", None, None)
    ... except InputError as exc:
    ...     print(exc.field, "|", exc.fix)
    overpressure.inlet_length | add inlet_length = "0.5 m" to [inputs.overpressure], or remove inlet_size
    """
    if fittings_k is not None and not 0.0 <= fittings_k <= MAX_INLET_FITTINGS_K:
        raise InputError(f"a sum of loss coefficients of {fittings_k:g} is not a relief valve's inlet pipe's",
                         field="overpressure.inlet_fittings_k", value=fittings_k,
                         limits=(0.0, MAX_INLET_FITTINGS_K, ""),
                         fix="give the sum of the inlet pipe's K (a square-edged entrance 0.5, each elbow about "
                             "0.3 to 0.75), or leave it out for none")
    refuse_half_pipe("the relief valve's inlet pipe", {"inlet_size": size, "inlet_length": length,
                                                       "inlet_fittings_k": fittings_k},
                     (("inlet_size", '"DN80"'), ("inlet_length", '"0.5 m"')))


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
    of the rule when the pipe is not given. The pipe's bore is held against the valve's: a pipe narrower than the
    smallest API 526 inlet of the selected orifice fails.

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
        The selected orifice's rated flow, kg/h (API 520 Part II, inlet piping: the loss at the rated capacity).
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
    API 520 Part II, inlet piping: the non-recoverable inlet pressure loss at the rated capacity within 3 % of the set
    pressure (gauge), as quoted in the Valve Selection Handbook (Zappe), p. 271 (the clause, 7.3.1 of the 2015
    edition, from memory). API 526 for the orifice letters. Colebrook (1939) with Darcy–Weisbach for the line; IAPWS R12-08
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
    result.assumptions.append(f"{name}: the inlet pipe's loss at the selected orifice's rated flow (API 520 Part II, "
                              "inlet piping), friction by Colebrook for commercial steel (roughness 0.045 mm, common "
                              "practice); the maker's certified capacity, when it is larger, governs the loss")
    letter = result.value(f"{prefix}_orifice")
    _inlet_bore_check(result, name, letter, size, diameter)
    result.add(f"{prefix}_inlet_rated_flow", f"{name}: rated flow through the inlet pipe ({fluid})", rated_flow_kg_h,
               "kg/h")
    result.work(f"{name}: velocity in the inlet pipe at the rated flow", "v = W/(ρ·π·D²/4)",
                "W/(rho*pi*D**2/4)", rated_flow_kg_h / 3600.0 / state.density / flow_area(diameter), "m/s",
                W=(rated_flow_kg_h, "kg/h"), rho=(state.density, "kg/m**3"), pi=(math.pi, ""),
                D=(diameter * 1e3, "mm"))
    fittings_k = fittings_k or 0.0
    if state.dryness is not None and 0.0 < state.dryness < 1.0:
        drop = _two_phase_inlet_drop(result, name, fluid, state, rated_flow_kg_h, diameter, length, fittings_k)
    else:
        loss = line_pressure_drop(rated_flow_kg_h / 3600.0, state.density,
                                  dynamic_viscosity(state.temperature, state.density), diameter, length, fittings_k)
        if _flashes_in_pipe(state, loss.pressure_drop):
            drop = _two_phase_inlet_drop(result, name, f"{fluid}, flashing in the pipe", state, rated_flow_kg_h,
                                         diameter, length, fittings_k)
        else:
            drop = _inlet_drop(result, name, fluid, state, loss, diameter, length, fittings_k)
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
            "inlet piping)" if status == "pass" else
            f"{{loss:{shown}}} of the gauge set pressure at the rated flow, above {{limit:g}} (API 520 Part II, "
            f"inlet piping){compressible}: the valve may chatter, and above its blowdown (the maker's figure, often 7 % "
            "to 10 %) it will: enlarge or shorten the inlet pipe, or have the relief system's designer justify it "
            "with the maker" if status == "warn" else
            f"{{loss:{shown}}} of the gauge set pressure at the rated flow, far above {{limit:g}} (API 520 Part II, "
            f"inlet piping){compressible}: the inlet pipe alone would take the whole set pressure, so the valve cannot pass "
            "its rated flow; enlarge the inlet pipe (at least the valve's inlet size) or shorten it",
            loss=share, limit=limit),
        source="API 520 Part II, inlet piping; at 100 % of the gauge set pressure no pressure is left to drive the flow "
               "(common practice)")
    return fraction


def _inlet_drop(result, name, fluid, state, loss, diameter, length, fittings_k):
    """Pa lost along the inlet pipe by a single-phase fluid (``loss``: Darcy–Weisbach at the relieving state), as a
    step."""
    result.work(f"{name}: inlet pressure loss at the rated flow ({fluid})",
                "Δp = (f·L/D + ΣK)·ρ·v²/2  at the rated flow (Darcy–Weisbach, Colebrook friction factor)",
                "(f*L/D + K)*rho*v*v/2", loss.pressure_drop / 1e5, "bar",
                f=(loss.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"), K=(fittings_k, ""),
                rho=(state.density, "kg/m**3"), v=(loss.velocity, "m/s"))
    return loss.pressure_drop


def _flashes_in_pipe(state, darcy_drop):
    """A liquid whose Darcy–Weisbach loss along the pipe (``darcy_drop``, Pa) would take it below its saturation
    pressure: it flashes there, and its loss is the flashing flow's (a subcooled liquid close to saturation)."""
    if state.dryness is not None or state.temperature >= saturation_temperature(state.pressure):
        return False   # wet or superheated steam
    return state.pressure - darcy_drop < saturation_pressure(state.temperature)


def _two_phase_inlet_drop(result, name, fluid, state, rated_flow_kg_h, diameter, length, fittings_k):
    """Pa lost along the inlet pipe by a flashing two-phase mixture (homogeneous, omega equation fitted through the
    relieving state and the mixture expanded at constant enthalpy to 90 % of its pressure), as steps; None, with a
    failing check, when the pipe cannot pass the flow before it chokes. A subcooled liquid flows as liquid down to
    its saturation pressure and flashes from there (its omega fitted from the saturation pressure)."""
    subcooled = state.dryness is None
    p0, v0 = (saturation_pressure(state.temperature) if subcooled else state.pressure), 1.0 / state.density
    expanded = SteamState.from_ph(0.9 * p0, state.enthalpy)
    omega = pipe_omega(p0, v0, 0.9 * p0, 1.0 / expanded.density)
    liquid = state if subcooled else SteamState.from_p_dryness(state.pressure, 0.0)
    result.assumptions.append(
        f"{name}: the inlet pipe carries the rated flow as a homogeneous two-phase mixture in equilibrium (no slip)"
        + (", liquid down to its saturation pressure," if subcooled else ",")
        + " its volume by the omega equation through the "
        + ("liquid at its saturation pressure" if subcooled else "relieving state")
        + " and the mixture expanded at constant enthalpy to 90 % of that pressure (IF97; the two points of API 520 "
        "Part I annex C, along an adiabatic pipe); friction by Colebrook at the liquid-only Reynolds number "
        + ("(the liquid as it enters" if subcooled else "(saturated liquid at the relieving pressure")
        + ": the larger friction, conservative) (Leung, 1996)")
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
