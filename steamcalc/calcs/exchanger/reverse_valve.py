"""The steam side's tube-rupture relief valve, when the process side has the higher design pressure.

The load (process liquid through a ruptured tube, and the steam it displaces first) is worked in
:mod:`steamcalc.calcs.exchanger.reverse_rupture`. This valve is the heater's one tube-rupture valve, on the
steam side: it honours the ``[inputs.overpressure]`` inputs the process side's valve does
(:mod:`steamcalc.calcs.exchanger.overpressure`), with the same functions:

* the valve type: Kb of a balanced bellows for the steam (API 520 Part I figure 31), Kw for the liquid (figure 32),
  at the built-up back pressure;
* the discharge pipe: each fluid at the selected orifice's rated flow for it (the displaced steam by isothermal
  flow, the liquid by Darcy–Weisbach, or as a flashing mixture when it boils at the atmosphere), the valve sized
  again at the back pressures they build up
  (:func:`steamcalc.calcs.relief_back_pressure.size_at_built_up_back_pressure`);
* the discharge pipe's size against the valve's outlet, as the let-down's relief valve
  (:mod:`steamcalc.calcs.relief_outlet`);
* the inlet pipe: the loss of each fluid at the selected orifice's rated flow for it, the larger against 3 % of the
  gauge set pressure (API 520 Part II, inlet piping, as :mod:`steamcalc.calcs.relief_inlet` cites it): the displaced
  steam, saturated at the relieving pressure, and the process liquid subcooled there (the heater cannot heat it
  above the steam's saturation temperature).

With none of them given the record is as it was before the valve honoured them: the valve sized discharging to the
atmosphere, and nothing said of pipes not given.
"""

from __future__ import annotations

import math

from ...equipment.relief import direct_integration_flux
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..base import Result
from ..overpressure import discharge_diameter, select_orifice, steam_relief_area
from ..relief_back_pressure import Sizing, balanced_kb, critical_flow_check, size_at_built_up_back_pressure
from ..relief_inlet import inlet_loss_notice, inlet_pipe_not_assessed, relief_inlet_loss
from .discharge import (
    TUBE_KEYS, discharge_pipe_not_assessed, flashes_in_valve, liquid_relief_area, outlet_size_check,
    tube_rupture_discharge,
)

NAME = "Tube rupture, process side the higher"
PREFIX = "tube_rupture_reverse"
#: The two fluids the valve passes, in the record's words: the steam first, then the liquid.
FLUIDS = ("displaced steam", "process liquid")
LIQUID_GOVERNS = "process liquid (API 520 liquid equation)"
LIQUID_FLASHING_GOVERNS = "process liquid flashing in the valve (API 520 Part I annex C)"
#: Why a pipe of a valve for a liquid other than water is not assessed.
NOT_WATER = ("the process liquid's viscosity is known here for water only: its pipes are for the relief system's "
             "designer")


def reverse_valve(inputs, atm, result, *, relieving_pressure, load, density, vapour, displaced):
    """Size the steam side's relief valve for the process liquid and the steam it displaces, with its pipes.

    Parameters
    ----------
    inputs : steamcalc.calcs.exchanger.calculation.Inputs
        The heater's inputs: the steam side's design pressure is the set pressure; the valve type and the pipes
        of ``[inputs.overpressure]``.
    atm : float
        The site's atmosphere, Pa.
    result : steamcalc.calcs.base.Result
        Receives the steps, results and checks.
    relieving_pressure : float
        P1, Pa (absolute): the set pressure plus 10 %.
    load, density : float
        The process liquid through the break, kg/h, at its density, kg/m³ (as sized: at the process side's design
        pressure).
    vapour : steamcalc.properties.steam.SteamState
        Saturated steam at P1; ``displaced`` its flow, kg/h.

    References
    ----------
    API Standard 520 Part I (2020): the steam equation, direct integration (annex B), the liquid equation,
    figures 31 and 32. API 520 Part II, inlet piping: the inlet loss within 3 % of the gauge set pressure (as
    :func:`steamcalc.calcs.relief_inlet.relief_inlet_loss` cites it). API 526 for the orifices.
    """
    set_pressure, p_r = inputs.steam_side_design_pressure, relieving_pressure
    valve_type = inputs.relief_valve_type or "conventional"
    water = inputs.process_cp is None
    # The liquid reaches the valve at the steam side's relieving pressure, below its saturation there.
    liquid = (SteamState.from_pT(p_r, min(inputs.process_outlet_temperature, vapour.temperature - 1.0)) if water
              else None)
    critical = direct_integration_flux(vapour, atm).throat_pressure

    def sizer(res, back):
        steam_back, liquid_back = back if back is not None else (atm, atm)
        suffix = "" if back is None else ", at the built-up back pressure"
        kb = balanced_kb(valve_type, set_pressure, None if back is None else steam_back, atm)
        area_steam, method = steam_relief_area(res, f"{NAME}, {FLUIDS[0]}{suffix}", vapour, displaced, steam_back, kb)
        # The first pass, at the atmosphere, keeps the words of the records made before the valve had a back pressure.
        words = {} if back is not None else {"conditions": ""}
        area_liquid, _ = liquid_relief_area(res, f"{NAME}{suffix}", valve_type=valve_type, set_pressure=set_pressure,
                                            atm=atm, relieving_pressure=p_r, density=density, flow_kg_h=load,
                                            back=liquid_back, fluid="liquid", liquid=liquid,
                                            kb=balanced_kb(valve_type, set_pressure,
                                                           None if back is None else liquid_back, atm), **words)
        if area_liquid > area_steam:
            governs = LIQUID_FLASHING_GOVERNS if flashes_in_valve(liquid, liquid_back) else LIQUID_GOVERNS
            return Sizing(area_liquid, load, governs, p_r, critical, steam_back, kb, (area_steam, area_liquid))
        return Sizing(area_steam, displaced, f"{FLUIDS[0]} ({method})", p_r, critical, steam_back, kb,
                      (area_steam, area_liquid))

    def discharge(res, orifice_area, sizing):
        area_steam, area_liquid = sizing.detail
        return tube_rupture_discharge(inputs, res, NAME, atm=atm, set_pressure=set_pressure, orifice_area=orifice_area,
                                      steam=vapour, steam_flow=displaced, steam_area=area_steam, liquid=liquid,
                                      liquid_flow=load, liquid_area=area_liquid, prefix=PREFIX, fluids=FLUIDS)

    piped = inputs.discharge_size is not None
    if piped and not water:
        discharge_pipe_not_assessed(result, NAME, inputs, NOT_WATER)
        piped = False
    first = sizer(result, None)
    sizing = first
    if piped:
        sizing, _ = size_at_built_up_back_pressure(result, NAME, valve_type=valve_type, set_pressure=set_pressure,
                                                   atm=atm, sizer=sizer, discharge=discharge)
        if sizing is not first and sizing.method != first.method:
            result.notice(f"{NAME}: governing flow at the built-up back pressure", sizing.method)
    result.add(f"{PREFIX}_governing_case", f"{NAME}: governing relief flow", sizing.method)
    rated = select_orifice(result, PREFIX, NAME, sizing.area, sizing.flow_kg_h)
    if rated is None:
        why = "no single API 526 orifice passes the load"
        if piped:
            discharge_pipe_not_assessed(result, NAME, inputs, why)
        inlet_pipe_not_assessed(result, NAME, inputs.relief_inlet_size, why)
        return
    outlet_size_check(result, PREFIX, NAME, inputs.discharge_size)
    if inputs.discharge_size is None:
        # Said, as the forward valve says it: the relief system's designer then knows it is still to be checked.
        discharge_diameter(result, NAME, None, None, None, TUBE_KEYS)
    _inlet_pipe(inputs, result, sizing, liquid, vapour, set_pressure, atm, (displaced, load))
    if piped:
        built = discharge(result, result.value(f"{PREFIX}_orifice_area"), sizing)
        critical_flow_check(result, f"{NAME}, {FLUIDS[0]}", sizing, None if built is None else built[0])


def _inlet_pipe(inputs, result, sizing, liquid, vapour, set_pressure, atm, flows):
    """The inlet pipe's loss for each fluid the valve passes, each at the selected orifice's rated flow for it: the
    displaced steam first, then the liquid, through the same pipe. The larger loss is held against 3 % of the gauge
    set pressure (the check, as the forward valve's); the other's steps are kept, and a notice gives both. Without
    the pipe, a notice of the rule, as the forward valve gives (since release 0.3.2)."""
    if inputs.relief_inlet_size is None:
        inlet_loss_notice(result, NAME)
        return
    if liquid is None:
        inlet_pipe_not_assessed(result, NAME, inputs.relief_inlet_size, NOT_WATER)
        return
    orifice_area, letter = result.value(f"{PREFIX}_orifice_area"), result.value(f"{PREFIX}_orifice")
    # The rated flow of each: its flow times the selected orifice's area over the area it needs (as select_orifice).
    rated = {fluid: flow * orifice_area / area for fluid, (flow, area) in zip(FLUIDS, zip(flows, sizing.detail))}
    states = dict(zip(FLUIDS, (vapour, liquid)))

    def inlet_loss(res, name, fluid):
        return relief_inlet_loss(res, PREFIX, name, state=states[fluid], rated_flow_kg_h=rated[fluid],
                                 set_pressure=set_pressure, atm=atm, size=inputs.relief_inlet_size,
                                 length=inputs.relief_inlet_length, fittings_k=inputs.relief_inlet_fittings_k,
                                 fluid=fluid)

    shares, trials = {}, {fluid: Result() for fluid in FLUIDS}
    for fluid, trial in trials.items():
        trial.add(f"{PREFIX}_orifice", "", letter)
        shares[fluid] = inlet_loss(trial, f"{NAME}, {fluid}", fluid)
    # A pipe that cannot pass a fluid's flow at all (None: it chokes) is the worse.
    worse = max(FLUIDS, key=lambda fluid: math.inf if shares[fluid] is None else shares[fluid])
    other = FLUIDS[1 - FLUIDS.index(worse)]
    result.assumptions.append(f"{NAME}: the inlet pipe carries the process liquid at the steam side's relieving "
                              "pressure and the process outlet temperature, subcooled there (the heater cannot heat it "
                              "above the steam's saturation temperature)")
    inlet_loss(result, NAME, worse)
    result.steps.extend(trials[other].steps)   # the other fluid's steps, named by it
    if shares[other] is None:   # neither passes its flow: the other's failure is said too
        result.checks.extend(c for c in trials[other].checks if c.status == "fail")
        return
    shown = ".1f" if shares[other] >= 0.001 else ".2g"
    result.add(f"{PREFIX}_inlet_loss_fraction_{other.split()[-1]}", f"{NAME}: inlet loss of the {other}, of the "
               "gauge set pressure", 100.0 * shares[other], "percent")
    result.notice(f"{NAME}: relief inlet pressure loss of each fluid", Phrase.of(
        f"the valve passes the displaced steam first and then the process liquid through the same inlet pipe, each "
        f"at the selected orifice's rated flow for it: the {other} loses {{other:{shown}}} of the gauge set pressure at "
        f"{{flow:.0f}}, no more than the {worse}, whose loss is the one held against the limit (API 520 Part II, "
        "inlet piping)", other=(100.0 * shares[other], "percent"), flow=(rated[other], "kg/h")))
