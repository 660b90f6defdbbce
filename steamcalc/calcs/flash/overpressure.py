"""Overpressure protection of the flash vessel: the relief loads and the relief valve for the governing case.

Two cases, each at the relieving pressure (set pressure plus 10 % of its gauge value):

* **inlet fails open**: the trap or level valve upstream passes its rated capacity at the highest upstream
  pressure; the condensate flashes at the relieving pressure. With the level held (the condensate outlet
  passes the residual condensate) the relief valve passes the flash steam; otherwise the vessel may fill
  and the valve relieves the incoming mixture, two-phase (omega method and direct integration, API 520
  Part I annexes B and C).
* **vapour outlet blocked**: the normal condensate inflow flashes at the relieving pressure and its flash
  steam has nowhere to go but the relief valve.

No credit is taken for the normal vapour outlet staying open (conservative). The largest required area
governs. Without a design pressure the record says the overpressure case was not assessed.
"""

from __future__ import annotations

from ...equipment.relief import direct_integration_flux
from ...errors import InputError, OutOfRangeError
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..overpressure import (
    CAUTIONS, VALVE_TYPES, discharge_section, flashing_relief_area, refuse_half_pipe, relieving_pressure,
    select_orifice, steam_relief_area, two_phase_discharge_section,
)
from ..relief_liquid_line import flashes_in_pipe, liquid_discharge_section
from ..relief_inlet import check_inlet_pipe_inputs, inlet_pipe_not_assessed, relief_inlet_loss
from ..relief_back_pressure import Sizing, balanced_kb, critical_flow_check, size_at_built_up_back_pressure

NAME = "Vessel relief"
#: What this module adds to a record, for the kind's BASIS_CHANGES (a record of an earlier release lacks it).
RECORD_PATTERNS = ("Flash vessel overpressure protection", "Vessel relief*", "vessel_relief_*",
                   "vessel_design_pressure")
PREFIX = "vessel_relief"


def check_overpressure_inputs(inputs):
    """Refusals of the overpressure inputs that need no calculation (called from ``Inputs.__post_init__``)."""
    design = inputs.vessel_design_pressure
    others = [name for name in ("relief_set_pressure", "inlet_capacity", "max_upstream_pressure", "relief_valve_type",
                                "discharge_size", "discharge_length", "discharge_fittings_k", "level_held",
                                "relief_inlet_size", "relief_inlet_length", "relief_inlet_fittings_k")
              if getattr(inputs, name) is not None]
    if design is None:
        if others:
            raise InputError("the flash vessel's overpressure inputs need its design pressure",
                             field="overpressure.design_pressure",
                             fix="give the vessel's design pressure (its nameplate), e.g. design_pressure = "
                                 "\"6 bar(g)\", or remove the other [inputs.overpressure] keys")
        return
    operating = inputs.stage_pressures[0]
    if design <= operating:
        raise InputError(
            f"the vessel's design pressure {design / 1e5:.4g} bar(a) is not above its operating pressure "
            f"{operating / 1e5:.4g} bar(a): the relief valve would lift in normal operation",
            field="overpressure.design_pressure", value=design,
            fix="give the design pressure on the vessel's nameplate (above the flash pressure), or check the "
                "pressure basis (bar(g) or bar(a))")
    set_pressure = inputs.relief_set_pressure
    if set_pressure is not None and not operating < set_pressure <= design * (1.0 + 1e-9):
        raise InputError(
            f"the relief set pressure {set_pressure / 1e5:.4g} bar(a) must lie above the operating pressure "
            f"{operating / 1e5:.4g} bar(a) and at or below the design pressure {design / 1e5:.4g} bar(a)",
            field="overpressure.set_pressure", value=set_pressure,
            fix="set the valve at or below the vessel's design pressure (or leave set_pressure out: the design "
                "pressure)")
    if inputs.relief_valve_type is not None and inputs.relief_valve_type not in VALVE_TYPES:
        raise InputError(f"unknown relief valve type '{inputs.relief_valve_type}'", field="overpressure.valve_type",
                         value=inputs.relief_valve_type, fix=f"use one of {', '.join(VALVE_TYPES)}")
    if inputs.discharge_fittings_k is not None and inputs.discharge_fittings_k < 0.0:
        raise InputError("a sum of loss coefficients cannot be negative", field="overpressure.discharge_fittings_k",
                         value=inputs.discharge_fittings_k, fix="give the sum of the fittings' K, 0 or more")
    _check_discharge_inputs(inputs)
    check_inlet_pipe_inputs(inputs.relief_inlet_size, inputs.relief_inlet_length, inputs.relief_inlet_fittings_k)
    if inputs.max_upstream_pressure is not None and inputs.max_upstream_pressure < inputs.condensate_pressure:
        raise InputError(
            f"the highest upstream pressure {inputs.max_upstream_pressure / 1e5:.4g} bar(a) is below the condensate "
            f"pressure {inputs.condensate_pressure / 1e5:.4g} bar(a)", field="overpressure.max_upstream_pressure",
            value=inputs.max_upstream_pressure,
            fix="give the highest pressure the condensate source can reach (its relief set pressure, or the steam "
                "supply's), or leave it out for the condensate pressure")


def _check_discharge_inputs(inputs):
    if inputs.discharge_length is not None and inputs.discharge_length < 0.0:
        raise InputError("a pipe length cannot be negative", field="overpressure.discharge_length",
                         value=inputs.discharge_length, fix="give the straight length to the open end in m, 0 or more")
    refuse_half_pipe("the relief discharge pipe", {"discharge_size": inputs.discharge_size,
                                                   "discharge_length": inputs.discharge_length,
                                                   "discharge_fittings_k": inputs.discharge_fittings_k},
                     (("discharge_size", '"DN100"'), ("discharge_length", '"6 m"')))


def add_overpressure(inputs, inlet, site, result):
    """The flash vessel's relief loads, the governing case and its relief valve, as results, steps and checks."""
    if inputs.vessel_design_pressure is None:
        # A statement to act on, listed among the warnings; it cannot fail, so a record of an earlier release
        # that lacked it keeps its verdict.
        result.notice("Flash vessel overpressure protection", act=True,
                      detail="not assessed: no vessel design pressure given (overpressure.design_pressure, with "
                             "overpressure.inlet_capacity for the failed-open inlet case); the relief device must be "
                             "sized for the worst inflow by the engineer of record")
        return
    result.cautions.extend(c for c in CAUTIONS if c not in result.cautions)
    atm = site.atmospheric_pressure
    design = inputs.vessel_design_pressure
    set_pressure = inputs.relief_set_pressure if inputs.relief_set_pressure is not None else design
    if inputs.relief_set_pressure is None:
        result.assumptions.append(f"{NAME}: set at the vessel's design pressure ({design / 1e5:.4g} bar(a))")
    result.add("vessel_design_pressure", "Flash vessel design pressure", design / 1e5, "bar")
    p_r = relieving_pressure(set_pressure, atm, result, PREFIX, NAME)
    if len(inputs.stage_pressures) > 1:
        result.assumptions.append(f"{NAME}: the first stage of the cascade is assessed (the others see its residual "
                                  "condensate, at a lower pressure)")
    try:
        liquid = SteamState.from_p_dryness(p_r, 0.0)
        vapour = SteamState.from_p_dryness(p_r, 1.0)
    except OutOfRangeError as exc:
        raise exc.for_field("overpressure.design_pressure") from None
    cases = {}
    # Vapour outlet blocked: the normal inflow's flash at the relieving pressure.
    x_blocked = (inlet.enthalpy - liquid.enthalpy) / (vapour.enthalpy - liquid.enthalpy)
    if x_blocked > 0.0:
        load = inputs.condensate_flow * 3600.0 * x_blocked
        result.work(f"{NAME}, vapour outlet blocked: relief load", "W = m_c·(h_in − h_f(P1))/h_fg(P1)",
                    "m_c*(h_in - h_f)/h_fg", load, "kg/h", m_c=(inputs.condensate_flow * 3600.0, "kg/h"),
                    h_in=(inlet.enthalpy / 1e3, "kJ/kg"), h_f=(liquid.enthalpy / 1e3, "kJ/kg"),
                    h_fg=((vapour.enthalpy - liquid.enthalpy) / 1e3, "kJ/kg"))
        result.add("vessel_relief_blocked_outlet_load", "Relief load, vapour outlet blocked", load, "kg/h")
        area, method = steam_relief_area(result, f"{NAME}, vapour outlet blocked", vapour, load, atm)
        cases["vapour outlet blocked"] = (area, load, method, vapour.enthalpy)
    else:
        result.notice(f"{NAME}, vapour outlet blocked", Phrase.of(
            "the condensate ({h:.1f}) does not flash at the relieving pressure {p:.4g}: a blocked outlet raises no "
            "vapour", h=(inlet.enthalpy / 1e3, "kJ/kg"), p=(p_r / 1e5, "bar")))
    _failed_open(inputs, inlet, p_r, liquid, vapour, atm, result, cases)
    if not cases:
        result.notice(NAME, "no relief load in the cases assessed; a relief device is still required by most "
                            "pressure-equipment codes (fire, and cases outside this calculation)")
        inlet_pipe_not_assessed(result, NAME, inputs.relief_inlet_size, "no relief load in the cases assessed")
        if inputs.discharge_size is not None:
            result.notice(f"{NAME}: discharge pipe not assessed", "the relief discharge pipe given (overpressure."
                          "discharge_size, discharge_length) is not assessed: no relief load in the cases assessed")
        return
    governing = max(cases, key=lambda case: cases[case][0])
    # The last item is what leaves the valve: the steam's enthalpy (J/kg), or the two-phase mixture's state.
    area, load, method, leaving = cases[governing][:4]
    result.add("vessel_relief_governing_case", f"{NAME}: governing case", f"{governing} ({method})")
    valve_type = inputs.relief_valve_type or "conventional"
    pipe = dict(valve_type=valve_type, set_pressure=set_pressure, atm=atm, size=inputs.discharge_size,
                length=inputs.discharge_length, fittings_k=inputs.discharge_fittings_k)
    two_phase = isinstance(leaving, SteamState)
    if two_phase:
        critical = cases[governing][4]
    else:
        critical = direct_integration_flux(vapour, atm).throat_pressure

    def sizer(res, back):
        kb = balanced_kb(valve_type, set_pressure, back, atm)
        name = f"{NAME}, {governing}" + ("" if back is None else ", at the built-up back pressure")
        if two_phase:
            case_area, case_method, _ = flashing_relief_area(res, name, leaving, load, back or atm, kb)
        else:
            case_area, case_method = steam_relief_area(res, name, vapour, load, back or atm, kb)
        return Sizing(case_area, load, case_method, p_r, critical, back or atm, kb)

    def discharge(res, orifice_area, sizing):
        rated = sizing.flow_kg_h * orifice_area / sizing.area
        if two_phase and leaving.dryness is None and not flashes_in_pipe(leaving, atm):
            # Liquid below its boiling point at the atmosphere (a vessel under vacuum) does not flash in the pipe.
            return liquid_discharge_section(res, PREFIX, NAME, rated_flow_kg_h=rated, liquid=leaving, **pipe)
        if two_phase:
            return two_phase_discharge_section(res, PREFIX, NAME, rated_flow_kg_h=rated, relieving=leaving, **pipe)
        return discharge_section(res, PREFIX, NAME, rated_flow_kg_h=rated, enthalpy=vapour.enthalpy,
                                 relieving_temperature=vapour.temperature, **pipe)

    # The atmospheric sizing of each case is written above; a discharge line adds the passes at its back pressure.
    sizing, _ = size_at_built_up_back_pressure(result, NAME, valve_type=valve_type, set_pressure=set_pressure,
                                               atm=atm, sizer=sizer, discharge=discharge)
    rated = select_orifice(result, PREFIX, NAME, sizing.area, load)
    if rated is None:
        inlet_pipe_not_assessed(result, NAME, inputs.relief_inlet_size, "no single API 526 orifice passes the load")
        return
    # The filling vessel's inflow reaches the valve as it is at the relieving pressure: flashing, or still liquid.
    fluid = "steam" if not two_phase else "liquid" if leaving.dryness is None else "two-phase mixture"
    relief_inlet_loss(result, PREFIX, NAME, state=leaving if two_phase else vapour, rated_flow_kg_h=rated,
                      set_pressure=set_pressure, atm=atm, size=inputs.relief_inlet_size,
                      length=inputs.relief_inlet_length, fittings_k=inputs.relief_inlet_fittings_k, fluid=fluid)
    built = discharge(result, result.value(f"{PREFIX}_orifice_area"), sizing)
    critical_flow_check(result, NAME, sizing, built)


def _failed_open(inputs, inlet, p_r, liquid, vapour, atm, result, cases):
    name = f"{NAME}, inlet fails open"
    if inputs.inlet_capacity is None:
        result.check(name, "warn", "not assessed: no rated capacity of the upstream trap or level valve given "
                                   "(overpressure.inlet_capacity, at the highest upstream pressure)")
        return
    p_up = inputs.max_upstream_pressure if inputs.max_upstream_pressure is not None else inputs.condensate_pressure
    if p_up <= p_r:
        result.notice(name, Phrase.of("the highest upstream pressure {up:.4g} is not above the relieving pressure "
                                      "{p:.4g}: the vessel cannot reach it from this inflow",
                                      up=(p_up / 1e5, "bar"), p=(p_r / 1e5, "bar")))
        return
    # Condensate at the highest upstream pressure, saturated there unless its temperature is given (and lower).
    source = (SteamState.from_p_dryness(p_up, 0.0) if inputs.condensate_temperature is None
              else SteamState.from_pT(p_up, inlet.temperature))
    load = inputs.inlet_capacity * 3600.0
    result.add("vessel_relief_failed_open_inflow", "Inflow with the inlet failed open (rated capacity)", load, "kg/h")
    x = (source.enthalpy - liquid.enthalpy) / (vapour.enthalpy - liquid.enthalpy)
    if inputs.level_held:
        steam = load * max(x, 0.0)
        result.work(f"{name}: relief load (level held, flash steam)", "W = m_in·(h_in − h_f(P1))/h_fg(P1)",
                    "m_in*(h_in - h_f)/h_fg", steam, "kg/h", m_in=(load, "kg/h"), h_in=(source.enthalpy / 1e3, "kJ/kg"),
                    h_f=(liquid.enthalpy / 1e3, "kJ/kg"), h_fg=((vapour.enthalpy - liquid.enthalpy) / 1e3, "kJ/kg"))
        result.add("vessel_relief_failed_open_load", "Relief load, inlet failed open (flash steam)", steam, "kg/h")
        if steam > 0.0:
            area, method = steam_relief_area(result, name, vapour, steam, atm)
            cases["inlet fails open, level held"] = (area, steam, method, vapour.enthalpy)
        return
    result.assumptions.append(f"{name}: the condensate outlet is not credited with holding the level "
                              "(overpressure.level_held not true), so the vessel may fill and the relief valve "
                              "passes the inflow as a flashing two-phase mixture")
    mixture = SteamState.from_ph(p_r, source.enthalpy)
    result.work(f"{name}: inflow at the relieving pressure",
                "x = (h_in − h_f(P1))/h_fg(P1), throttled at constant enthalpy",
                "(h_in - h_f)/h_fg", max(x, 0.0), h_in=(source.enthalpy / 1e3, "kJ/kg"),
                h_f=(liquid.enthalpy / 1e3, "kJ/kg"), h_fg=((vapour.enthalpy - liquid.enthalpy) / 1e3, "kJ/kg"))
    result.add("vessel_relief_failed_open_load", "Relief load, inlet failed open (two-phase)", load, "kg/h")
    area, method, sized = flashing_relief_area(result, name, mixture, load, atm)
    result.add("vessel_relief_omega", f"{name}: omega parameter", sized.omega.omega)
    # The critical pressure of the nozzle flow: η_c·p0 (two-phase), or η_s·p0 (subcooled liquid flashing at the
    # throat), API 520 Part I annex C.
    critical = sized.omega.critical_ratio * mixture.pressure
    cases["inlet fails open, vessel filling (two-phase)"] = (area, load, method, mixture, critical)
