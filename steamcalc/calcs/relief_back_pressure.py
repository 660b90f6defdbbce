"""A relief valve sized at the built-up back pressure of its own discharge line.

The orifice is first sized discharging to the atmosphere; its rated flow sets the built-up back pressure in the
outlet pipe; the valve is sized again at that back pressure (the flux down to it, critical or subcritical, and
for a balanced-bellows valve the correction Kb of API 520 Part I figure 31), and so on until the API 526
orifice letter stops changing and the back pressure settles. The passes are kept in the record; the steps are
those of the last pass.

The kinds give two functions: ``sizer(result, back)`` writes the sizing steps for the back pressure ``back``
(``None``: the atmosphere) and returns a :class:`Sizing`; ``discharge(result, orifice_area, sizing)`` writes the
discharge-line steps and checks for that orifice and returns the built-up back pressure (Pa, absolute), ``None``
when the pipe is not given or cannot pass the flow.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

from ..equipment.relief import api526_orifice, back_pressure_correction
from ..errors import InputError
from ..units.amounts import Phrase
from .base import Result

#: The most passes of sizing and back pressure; two or three settle in practice.
MAX_PASSES = 12
#: The back pressure has settled when it moves by less than this share of the gauge set pressure.
SETTLED = 1e-3
#: An area within this share of the atmospheric sizing's is the same sizing (the flux search's own tolerance).
UNCHANGED = 1e-5


@dataclass(frozen=True)
class Sizing:
    """One sizing pass of a relief valve."""

    area: float                 #: mm², required effective area (the governing flow)
    flow_kg_h: float            #: kg/h, the governing flow
    method: str                 #: the governing method, in words
    relieving_pressure: float   #: Pa (absolute)
    critical_pressure: float    #: Pa (absolute): the throat pressure of critical flow; 0 for liquid
    back: float                 #: Pa (absolute), the back pressure sized at
    kb: float = 1.0             #: the balanced-bellows correction applied
    detail: object = None       #: what the kind needs again (its cases' areas)


def balanced_kb(valve_type, set_pressure, back, atm):
    """Kb of a balanced-bellows valve at the back pressure ``back`` (1 for other valves, or with no pipe given);
    ``None`` beyond the figure's 50 % of the gauge set pressure.

    Parameters
    ----------
    valve_type : str
        ``conventional``, ``balanced-bellows`` or ``pilot``.
    set_pressure, back, atm : float
        Pa (absolute): the set pressure, the back pressure (``None``: the atmosphere) and the atmosphere.

    References
    ----------
    API Standard 520 Part I, 10th ed. (2020), figure 31, read by ``fluids.safety_valve.API520_B`` at the 10 %
    overpressure curve.

    Examples
    --------
    >>> round(balanced_kb("balanced-bellows", 7e5, 3.5e5, 1e5), 3), balanced_kb("pilot", 7e5, 3.5e5, 1e5)
    (0.84, 1.0)
    >>> balanced_kb("balanced-bellows", 7e5, 5e5, 1e5) is None
    True
    """
    if back is None or valve_type != "balanced-bellows":
        return 1.0
    try:
        return back_pressure_correction(valve_type, set_pressure, back, 0.10, atm)[0]
    except InputError:
        return None


def _highest(back):
    return max(back) if isinstance(back, tuple) else back


def _first(back):
    return back[0] if isinstance(back, tuple) else back


def _mean(a, b):
    return tuple(0.5 * (x + y) for x, y in zip(a, b)) if isinstance(a, tuple) else 0.5 * (a + b)


def _moved(a, b):
    return max(abs(x - y) for x, y in zip(a, b)) if isinstance(a, tuple) else abs(a - b)


def size_at_built_up_back_pressure(result, name, *, valve_type, set_pressure, atm, sizer, discharge):
    """Size, find the built-up back pressure, re-size until the orifice letter stops changing.

    A back pressure is a pressure (Pa) or, for a valve that relieves two flows in turn (the tube rupture's steam and
    the liquid it displaces), a tuple of them, the vapour's first.

    Returns the last :class:`Sizing` (its steps written into ``result`` when the back pressure changed the area;
    otherwise the atmospheric sizing, whose steps the caller has written) and the passes as
    ``[(back Pa or None, Kb, letter or None)]``; the discharge line is not written (the caller selects the
    orifice and writes it).
    """
    given_sizer, atmospheric_sizing = sizer, []

    def sizer(res, back):
        # A pass that can only give the atmospheric sizing again is not worked again (each works the isentrope
        # on IF97): the atmosphere's own sizing, asked for twice, and a back pressure below the throat pressure of
        # critical flow with no Kb, which leaves the flux, and so the area, as it was. Steps go only to a
        # throwaway result here; the caller's result always gets its steps worked.
        if atmospheric_sizing and res is not result:
            first = atmospheric_sizing[0]
            if back is None:
                return first
            if not isinstance(back, tuple) and back <= first.critical_pressure and \
                    balanced_kb(valve_type, set_pressure, back, atm) == 1.0:
                return replace(first, back=back)
        sizing = given_sizer(res, back)
        if back is None and not atmospheric_sizing:
            atmospheric_sizing.append(sizing)
        return sizing

    passes, back = [], None
    usable_limit = set_pressure  # at the set pressure the valve cannot pass its flow: no sizing beyond it
    stopped = ""
    for _ in range(MAX_PASSES):
        sizing = sizer(Result(), back)
        orifice = api526_orifice(sizing.area)
        passes.append((back, sizing.kb, orifice[0] if orifice else None))
        if orifice is None:
            break
        built = discharge(Result(), orifice[1], sizing)
        if built is None:
            break
        settled = back is not None and _moved(built, back) <= SETTLED * (set_pressure - atm)
        if len(passes) > 1 and passes[-1][2] == passes[-2][2] and settled:
            break
        # Damped for a balanced bellows: a lower Kb enlarges the area, lowers the orifice's rated flow and with it
        # the back pressure, so the plain substitution swings about the answer; the mean of the two settles it.
        following = built if back is None or valve_type != "balanced-bellows" else _mean(back, built)
        if _highest(following) >= usable_limit:
            stopped = "the built-up back pressure reaches the set pressure: not re-sized, the back-pressure check fails"
            break
        if balanced_kb(valve_type, set_pressure, _highest(following), atm) is None:
            stopped = ("the built-up back pressure is beyond the 50 % of the gauge set pressure that figure 31 "
                       "covers: not re-sized, the back-pressure check governs")
            break
        back = following
    else:
        stopped = f"the orifice letter did not settle in {MAX_PASSES} passes: the last is kept"
    # With no back pressure found, or one that leaves the area as it was (critical flow, no Kb), the caller's own
    # sizing at the atmosphere stands: its steps are written already.
    atmospheric = sizer(Result(), None)
    sizing = sizer(Result(), back) if back is not None else atmospheric
    if abs(sizing.area / atmospheric.area - 1.0) <= UNCHANGED:
        sizing = atmospheric
    else:
        sizing = sizer(result, back)
    _state_passes(result, name, passes, stopped, valve_type)
    return sizing, passes


def _state_passes(result, name, passes, stopped, valve_type):
    if len(passes) == 1 and passes[0][0] is None and not stopped:
        return
    words, amounts = [], {}
    for i, (back, kb, letter) in enumerate(passes, start=1):
        at = "the atmosphere" if back is None else f"{{p{i}:.4g}}"
        if back is not None:
            amounts[f"p{i}"] = (_first(back) / 1e5, "bar")
            if isinstance(back, tuple):
                at += f" (liquid {{q{i}:.4g}})"
                amounts[f"q{i}"] = (back[1] / 1e5, "bar")
        kb_text = f", Kb {kb:.3f}" if kb != 1.0 else ""
        words.append(f"pass {i} at {at}{kb_text}: {letter or 'beyond T'}")
    end = stopped or (f"the letter unchanged and the back pressure settled (within {100 * SETTLED:g} % of the gauge "
                      f"set pressure) after pass {len(passes)}")
    kb_basis = ("; Kb of the balanced bellows from API 520 Part I figure 31 (fluids' API520_B, 10 % overpressure)"
                if valve_type == "balanced-bellows" else "")
    result.notice(f"{name}: sized at the built-up back pressure", Phrase.of(
        "the valve sized discharging to the atmosphere, then again at the built-up back pressure its orifice's "
        "rated flow raises in the discharge line, the flux taken down to that back pressure (critical or "
        f"subcritical){kb_basis}"
        + ("; each pass after the second at the mean of the last back pressure and the one it built up (damped)"
           if valve_type == "balanced-bellows" else "") + ": " + "; ".join(words) + f"; {end}", **amounts))


def critical_flow_check(result, name, sizing, back):
    """The built-up back pressure ``back`` (Pa) against the critical pressure of the nozzle flow: critical flow, or
    subcritical flow sized on the flux at the back pressure."""
    if sizing.critical_pressure <= 0.0 or back is None:
        return
    ratio = (back / sizing.relieving_pressure, "")
    critical = (sizing.critical_pressure / sizing.relieving_pressure, "")
    if back > sizing.critical_pressure and sizing.back <= sizing.critical_pressure:
        # The back pressure was beyond what the valve can be sized at (see the passes): not sized subcritical.
        result.check(f"{name}: critical flow at the built-up back pressure", "warn", Phrase.of(
            "back pressure over relieving pressure {ratio:.3f}, above the critical ratio {critical:.3f}: the nozzle "
            "flow would be subcritical, but the valve was not sized at this back pressure (see the built-up back "
            "pressure check)", ratio=ratio, critical=critical))
        return
    result.check_limit(
        f"{name}: critical flow at the built-up back pressure", ratio, [("<=", critical, "warn")],
        lambda status: Phrase.of(
            "back pressure over relieving pressure {ratio:.3f}, at or below the critical ratio {critical:.3f}: the "
            "nozzle flow is critical and the back pressure does not reduce it" if status == "pass" else
            "back pressure over relieving pressure {ratio:.3f}, above the critical ratio {critical:.3f}: the nozzle "
            "flow is subcritical and is sized on the flux down to the back pressure (" + sizing.method + "); the "
            "valve's lift and stability under this back pressure are for the maker to confirm",
            ratio=ratio, critical=critical),
        source="API 520 Part I, 5.6.2 and 5.6.3 (critical and subcritical flow), annexes B and C")
