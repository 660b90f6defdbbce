"""Tube rupture of a heater whose process side has the higher design pressure: process liquid into the steam space.

The steam side is then the low-pressure side. Whether a rupture is a relief case for it follows the same rule as
the forward case (:mod:`steamcalc.calcs.exchanger.overpressure`), the steam side's test pressure taken as 1.3 times
its design pressure (ASME BPVC VIII-1 UG-99(b), stress ratio 1) or the 10/13 rule. When it is, the liquid flows
through a clean break of one tube, two open ends each of the tube's bore, as a sharp-edged orifice,

.. math:: W = 2\\,C_d\\,\\frac{\\pi d^2}{4}\\sqrt{2\\rho_l\\,(p_{HP} - P_1)}

from the process side's design pressure (the highest it is designed to reach: conservative) into the steam side
at its relieving pressure P1, no friction in the tube credited. The steam side's relief device first passes the
steam the liquid displaces (the liquid's volume flow, no condensation credited), then the liquid (below the
steam's saturation temperature, as the heater cannot heat it further, so it does not flash at the steam side's
relieving pressure); both are sized and the larger governs. That valve is the heater's one tube-rupture valve
(the forward case needs none when this one is a relief case): its type, discharge pipe and inlet pipe are the
``[inputs.overpressure]`` ones, assessed in :mod:`steamcalc.calcs.exchanger.reverse_valve`.
"""

from __future__ import annotations

import math

from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..overpressure import relieving_pressure
from ..relief_inlet import inlet_pipe_not_assessed
from .discharge import discharge_pipe_not_assessed
from .reverse_valve import NAME, PREFIX, reverse_valve

#: Discharge coefficient of a sharp-edged orifice for a clean tube break (common practice).
CD_BREAK = 0.61
TEST_PRESSURE_RATIO = 1.3


def reverse_rupture(inputs, atm, result):
    """The steam side's relief case for a ruptured tube when the process side has the higher design pressure.

    Returns True when the steam side needs a relief device for it (sized or not): the tube-rupture pipes given
    are then that valve's."""
    high, low = inputs.process_side_design_pressure, inputs.steam_side_design_pressure
    basis = inputs.rupture_basis or "test pressure"
    if basis == "10/13":
        limit = atm + 10.0 / 13.0 * (high - atm)
        quantity = low
        why = "the steam side's design pressure {low:.4g} against 10/13 of the process side's, {limit:.4g}"
        source = "API 521, tube rupture: the 10/13 rule of codes testing at 1.3 × design"
    else:
        quantity = atm + TEST_PRESSURE_RATIO * (low - atm)
        result.work(f"{NAME}: steam-side test pressure", "p_test = p_atm + 1.3·(p_steam,design − p_atm)",
                    "p_atm + 1.3*(p_LP - p_atm)", quantity / 1e5, "bar", p_LP=(low / 1e5, "bar"),
                    p_atm=(atm / 1e5, "bar"))
        limit = high
        why = "the steam side's test pressure {low:.4g} against the process side's design pressure {limit:.4g}"
        source = "API 521, tube rupture: the low-pressure side's test pressure against the high-pressure side's design"
    phrase = dict(low=(quantity / 1e5, "bar"), limit=(limit / 1e5, "bar"))
    if quantity >= limit:
        result.notice(f"{NAME}: no relief case", Phrase.of(
            why + f" ({source}): a ruptured tube does not overpressure the steam side", **phrase))
        result.add(f"{PREFIX}_relief_needed", f"{NAME}: steam-side relief device needed", "no")
        return False
    result.add(f"{PREFIX}_relief_needed", f"{NAME}: steam-side relief device needed", "yes")
    result.notice(f"{NAME}: a relief case", Phrase.of(
        why + f" ({source}): process liquid entering through a ruptured tube can overpressure the steam side; its "
        "relief device is sized for it below", **phrase), act=True)
    if inputs.tube_inside_diameter is None:
        result.check(f"{NAME}: relief load", "warn", "not sized: give the tube inside diameter among the "
                                                       "overpressure inputs")
        why = "the steam side's relief load is not sized (give overpressure.tube_inside_diameter)"
        discharge_pipe_not_assessed(result, NAME, inputs, why)
        inlet_pipe_not_assessed(result, NAME, inputs.relief_inlet_size, why)
        return True
    p_r = relieving_pressure(low, atm, result, PREFIX, NAME)
    density = (SteamState.from_pT(high, inputs.process_outlet_temperature).density if inputs.process_cp is None
               else inputs.process_density)
    bore = math.pi * inputs.tube_inside_diameter ** 2 / 4.0
    load = 2.0 * CD_BREAK * bore * math.sqrt(2.0 * density * (high - p_r)) * 3600.0
    result.work(f"{NAME}: liquid through two open tube ends",
                "W = 2·Cd·(π·d²/4)·√(2ρ_l(p_HP − P1))  [orifice equation, Cd of a sharp-edged break: common practice]",
                "2*Cd*(3.14159265*d**2/4)*sqrt(2*rho_l*(p_HP - P1))", load, "kg/h", Cd=(CD_BREAK, ""),
                d=(inputs.tube_inside_diameter * 1e3, "mm"), rho_l=(density, "kg/m**3"), p_HP=(high / 1e5, "bar"),
                P1=(p_r / 1e5, "bar"))
    result.add(f"{PREFIX}_flow", f"{NAME}: liquid flow through the break", load, "kg/h")
    result.assumptions.append(f"{NAME}: a clean break of one tube, liquid from both ends through the full bore from "
                              "the process side's design pressure (the highest it is designed for), no friction in "
                              "the tube credited (conservative)")
    vapour = SteamState.from_p_dryness(p_r, 1.0)
    displaced = load / density * vapour.density
    result.work(f"{NAME}: steam displaced by the liquid", "m_s = W·ρ_steam(P1)/ρ_l", "W*rho_s/rho_l", displaced,
                "kg/h", W=(load, "kg/h"), rho_s=(vapour.density, "kg/m**3"), rho_l=(density, "kg/m**3"))
    reverse_valve(inputs, atm, result, relieving_pressure=p_r, load=load, density=density, vapour=vapour,
                  displaced=displaced)
    return True
