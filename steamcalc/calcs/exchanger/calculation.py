"""Steam-heated exchanger: duty, steam demand, zone LMTD, area, turndown and stall.

A process liquid is heated by condensing steam. The duty comes from the process side;
the steam flow from the steam's actual state (superheat and dryness count) down to
condensate at its stated subcooling. With a control valve the steam's state is given at
its supply (:mod:`.supply`) and reaches the heater throttled at constant enthalpy. The
zones (desuperheating, condensing, subcooling; :mod:`.exchanger_zones`) each have their
own LMTD, U and area. At part load, with a fixed
area and U, the steam-side pressure the exchanger needs falls; below the load where it
cannot push the condensate through the trap, condensate stops draining: stall
(:mod:`.exchanger_turndown`). The steam control valve over the turndown, the load below which the
steam space is under vacuum, and the condensate to pump out when stalled are in
:mod:`.exchanger_control`; what an undersized heater can take at its supply pressure in
:mod:`.capacity`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ...errors import InputError, OutOfRangeError
from ...properties.steam import REFERENCE as IF97_REFERENCE
from ...properties.steam import SteamState, saturation_pressure
from ..balance import Stream, check_energy_balance
from ...units.amounts import Phrase
from ..base import ADDS_ONLY, Result, check_fields, full_record_wanted, input_field
from .turndown import (LOADS, STALL_REMEDIES, add_turndown, required_saturation_temperature,  # noqa: F401
                                 stall_load, stall_pressure)
from .capacity import add_capacity, find_capacity
from .control import add_control, check_control_inputs
from .figures import figures
from .overpressure import RECORD_PATTERNS as OVERPRESSURE_PATTERNS
from .overpressure import add_overpressure, check_design_pressures, check_overpressure_inputs
from ..overpressure import flash_point_change, liquid_to_exit_change
from .overpressure import NAME as TUBE_RUPTURE
from .reverse_valve import NAME as REVERSE_NAME
from .supply import steam_states, steam_steps, supply_state
from .zones import ARRANGEMENTS, ZONE_NAMES, add_zones, f_factor, lmtd, service_u  # noqa: F401

_f_factor = f_factor  # the name v0.1 callers used

KIND = "exchanger"
TITLE = "Steam-heated exchanger: duty, area and stall"
WORKBOOK = "exchanger_duty.ipynb"
#: Results the uncertainty section gives bands and sensitivities for.
#: Results in a pressure unit that are differences, not absolute pressures (labelled "difference").
PRESSURE_DIFFERENCE_RESULTS = ("trap_static_head_pressure", "lift_head_pressure", "required_pumping_differential",
                               "pump_motive_excess")
UNCERTAINTY_RESULTS = ("duty", "steam_flow", "required_area", "area_margin", "stall_load_fraction")
#: Plain fractions shown in % (display only; records keep the fraction).
#: (area_margin is in percent since 0.3; it stays here for records of earlier releases, where it is a fraction:
#: only a unitless value is scaled.)
PERCENT_VALUES = ("area_margin", "stall_load_fraction", "stall_load_fraction_fouled", "heat_loss")
#: The governing results a checker signs against: the first page of the record and of `verify` (those the record holds).
SUMMARY_RESULTS = ("duty", "steam_flow", "required_area", "area_margin", "control_valve_kv", "control_valve_travel", "stall_load_fraction", "vacuum_load_fraction", "capacity_margin")
#: Bases this release changed, so that verify lists what a record of an earlier release differs by, and why,
#: instead of calling it edited: patterns (fnmatch) over result keys, step labels, check names and statements.
#: The forward tube-rupture valve's warning of a discharge pipe narrower than its outlet (release 0.3.2).
NARROW_OUTLET_CHECK = f"{TUBE_RUPTURE}: discharge line size"
#: What sizing a hot liquid flashing in the valve (release 0.3.1) changes: the valve's sizing, at the atmosphere and
#: at its back pressure, and its lines; not the break's flow, the relieving pressure or the thermal relief.
FLASHING_IN_VALVE_PATTERNS = liquid_to_exit_change("0.3.1", TUBE_RUPTURE, "tube_rupture")[2] + (
    "Tube rupture*flashing in the valve*", "Tube rupture*: required area*",
    "Tube rupture*hotter than its boiling point at the valve's outlet*")
BASIS_CHANGES = (
    ("0.3", "the steam's state is given at its supply (a superheated header) and carried into the valve, the zones "
     "and the steam flow; the heater's capacity at the supply pressure is reported",
     ("supply_*", "steam_inlet_*", "capacity_*", "outlet_*_reached", "*_zone_u")),
    ("0.3", "margins are kept in percent, as the relief capacity margin is (the area margin was a fraction)",
     ("area_margin",)),
    ("0.3", "the heater's tube-rupture and thermal-relief cases, or a statement that they were not assessed",
     OVERPRESSURE_PATTERNS),
    # Applies to a record of 0.3.0 only when its recomputation sizes a flashing liquid (the fourth item).
    ("0.3.1", "a water hotter than its boiling point at the tube-rupture valve's outlet flashes in the nozzle: it is "
     "sized by API 520 Part I annex C (the omega method and direct integration, the larger governing), where the "
     "liquid equation undersized the valve", FLASHING_IN_VALVE_PATTERNS, "Tube rupture*flashing in the valve*"),
    # Each applies to a record of an earlier release only when its recomputation carries that valve's liquid to the
    # pipe's exit, and only to what the line and the sizing at its back pressure write.
    liquid_to_exit_change("0.3.2", "Tube rupture", "tube_rupture"),
    liquid_to_exit_change("0.3.2", "Thermal relief", "thermal_relief", resized=False),
    flash_point_change("0.3.2", "Tube rupture", "tube_rupture"),
    flash_point_change("0.3.2", "Thermal relief", "thermal_relief", resized=False),
    ("0.3.2", "a tube-rupture discharge pipe narrower than the outlet API 526 pairs with the valve's orifice is warned "
     "of, as the let-down's relief valve's and the reverse valve's are", (NARROW_OUTLET_CHECK + "*",), NARROW_OUTLET_CHECK,
     ADDS_ONLY),
    # Two changes of one kind, each applied only where the recomputation states it.
    *(("0.3.2", "the reverse tube-rupture valve's " + pipe + ", when not given, is stated as not assessed (the rule "
       "left for the relief system's designer), as the forward valve's is", (check + "*",), check + ": not assessed*",
       ADDS_ONLY)
      for pipe, check in (("discharge pipe", f"{REVERSE_NAME}: discharge line"),
                          ("inlet pipe", f"{REVERSE_NAME}: relief inlet pressure loss"))),
)
#: Groups of inputs of which at most one is given (the calculation refuses two of a group); the forms use them.
ALTERNATIVE_INPUTS = (("process_flow", "process_volume_flow"), ("process_fluid", "process_cp"),
                      ("steam_temperature", "steam_superheat", "steam_dryness"),
                      ("control_valve_supply_temperature", "control_valve_supply_superheat"))

#: Smallest temperature approach (steam saturation to process outlet) held without a warning, K
#: (common practice: below about 5 K control is sluggish and the area grows fast).
MIN_APPROACH = 5.0

CAUTIONS = (
    "Below the stall load condensate backs up into the exchanger: waterhammer, corrosion and loss of "
    "temperature control follow. Provide for draining at part load (see the remedies in the record).",
    "The steam space is a pressure vessel: design, relief and inspection follow the local pressure-equipment "
    "code; the process side needs relief against thermal expansion when blocked in.",
    "Steam, condensate and hot process liquid cause severe burns; drains and vents discharge to a safe place.",
    "These results support design by a competent engineer; they do not replace the applicable codes, the "
    "equipment makers' data or a licensed engineer's approval.",
)

@dataclass(frozen=True)
class Inputs:
    """Inputs of a steam-heated exchanger; values in SI."""

    steam_pressure: float = input_field(
        "pressure", "Steam pressure", "Steam pressure in the exchanger's steam space at design load.",
        example="header:MP", required=True)
    process_inlet_temperature: float = input_field(
        "temperature", "Process inlet temperature", "Process liquid entering.", example="55 °C",
        required=True)
    process_outlet_temperature: float = input_field(
        "temperature", "Process outlet temperature", "Process liquid leaving.", example="85 °C",
        required=True)
    process_flow: float | None = input_field(
        "mass_flow", "Process flow", "Mass flow of the process liquid (or give process_volume_flow).",
        example="12 t/h", positive=True)
    process_volume_flow: float | None = input_field(
        "volume_flow", "Process volume flow", "Volume flow of the process liquid, in place of process_flow.",
        example="12 m³/h", positive=True)
    process_density: float | None = input_field(
        "density", "Process density", "Density for a volume flow (water: from IF97 at the inlet).",
        example="1030 kg/m³", positive=True)
    process_fluid: str | None = input_field(
        "text", "Process fluid", "'water' (IF97 properties) unless process_cp is given.", example="water")
    process_cp: float | None = input_field(
        "specific_heat", "Process specific heat", "Mean specific heat of a process liquid other than water.",
        example="3.9 kJ/(kg·K)", positive=True)
    process_pressure: float | None = input_field(
        "pressure", "Process pressure", "Process-side pressure (for water properties; default well above "
        "boiling).", example="4 bar(g)")
    steam_temperature: float | None = input_field(
        "temperature", "Steam temperature", "Superheated steam temperature at the steam pressure (else saturated); "
        "with a control valve give the supply's state in its section instead.", example="190 °C")
    steam_superheat: float | None = input_field(
        "temperature_difference", "Steam superheat", "Superheat of the steam at the steam pressure, in place of "
        "steam_temperature; with a control valve give the supply's state in its section instead.", example="38 K",
        positive=True)
    steam_dryness: float | None = input_field(
        "fraction", "Steam dryness fraction", "Dryness of wet steam (else saturated).", example="0.97",
        positive=True)
    condensate_subcooling: float | None = input_field(
        "temperature_difference", "Condensate subcooling", "Condensate leaves this far below saturation.",
        example="0 K")
    arrangement: str | None = input_field(
        "text", "Arrangement", "'counterflow', or shell-and-tube '1-2' or '2-4'.", example="counterflow")
    heat_loss: float | None = input_field(
        "fraction", "Heat loss", "Heat lost from the exchanger, as a fraction of the duty.", example="0.02")
    overall_u: float | None = input_field(
        "heat_transfer_coefficient", "Overall U (clean)", "Overall heat-transfer coefficient, clean.",
        example="1.8 kW/(m²·K)", positive=True)
    fouling_resistance: float | None = input_field(
        "fouling_resistance", "Fouling resistance", "Total fouling resistance added to 1/U.",
        example="0.1 m²·K/kW")
    installed_area: float | None = input_field(
        "area", "Installed area", "Heat-transfer area of the exchanger as installed.", example="2.6 m²",
        positive=True)
    condensate_back_pressure: float | None = input_field(
        "pressure", "Condensate back pressure", "Pressure the condensate drains against (trap outlet, lift, "
        "return main); with a lift_head given, the pressure at the end of the lift (the lift is added).",
        example="0.8 bar(g)")
    desuperheating_u: float | None = input_field(
        "heat_transfer_coefficient", "Desuperheating zone U (clean, dry wall)", "U of a dry-wall desuperheating "
        "zone (steam cooling as a gas); leave empty for the wet-wall basis at the overall U.",
        example="0.1 kW/(m²·K)", positive=True)
    subcooling_u: float | None = input_field(
        "heat_transfer_coefficient", "Subcooling zone U (clean)", "U of the condensate-subcooling zone; needed with a "
        "condensate subcooling and an overall U.", example="0.6 kW/(m²·K)", positive=True)
    trap_static_head: float | None = input_field(
        "length", "Static head to the trap", "Height of condensate between the heater outlet and the trap inlet "
        "(trap below the outlet); adds ρ·g·H to the pressure that drains it.", example="0.5 m", section="drainage")
    trap_min_differential: float | None = input_field(
        "pressure_difference", "Trap minimum differential", "Smallest inlet-minus-outlet pressure difference the "
        "trap works at (maker's data).", example="0.1 bar", section="drainage")
    lift_head: float | None = input_field(
        "length", "Condensate lift after the trap", "Rise of the condensate line from the trap to its highest point; "
        "its ρ·g·H is added to the back pressure.", example="4 m", section="drainage")
    pump_motive_pressure: float | None = input_field(
        "pressure", "Pump motive steam pressure", "Motive steam (or air) pressure of a pressure-powered pump or "
        "pump-trap, if one is proposed.", example="5 bar(g)", section="drainage")
    control_valve_supply_pressure: float | None = input_field(
        "pressure", "Supply pressure at the control valve", "Steam pressure upstream of the heater's steam control "
        "valve.", example="8 bar(g)", section="control_valve", key="supply_pressure")
    control_valve_supply_temperature: float | None = input_field(
        "temperature", "Supply steam temperature", "Temperature of the superheated supply steam at the valve inlet "
        "(else dry saturated); or give supply_superheat.", example="213 °C", section="control_valve",
        key="supply_temperature")
    control_valve_supply_superheat: float | None = input_field(
        "temperature_difference", "Supply steam superheat", "Superheat of the supply steam at the valve inlet, above "
        "saturation at the supply pressure (a header fed by a let-down without desuperheating carries some); or give "
        "supply_temperature.", example="38 K", section="control_valve", key="supply_superheat")
    control_valve_xt: float | None = input_field(
        "fraction", "Control valve xT", "Pressure differential ratio factor at choked flow (maker's data).",
        example="0.70", section="control_valve", positive=True, key="xt")
    control_valve_rated_kv: float | None = input_field(
        "flow_coefficient", "Control valve rated Kv (Kvs)", "Kv of the selected valve at full travel.",
        example="16 m³/h", section="control_valve", positive=True, key="rated_kv")
    control_valve_characteristic: str | None = input_field(
        "text", "Control valve characteristic", "Inherent characteristic: equal-percentage or linear.",
        example="equal-percentage", section="control_valve", key="characteristic")
    control_valve_rangeability: float | None = input_field(
        "number", "Control valve rangeability", "Inherent rangeability: rated Kv over the smallest controllable Kv.",
        example="50", section="control_valve", key="rangeability")
    steam_side_design_pressure: float | None = input_field(
        "pressure", "Steam side design pressure", "Design pressure of the heater's steam side (nameplate); with the "
        "process side's it decides whether a tube rupture is a relief case.", example="10 bar(g)",
        section="overpressure")
    process_side_design_pressure: float | None = input_field(
        "pressure", "Process side design pressure", "Design pressure of the process (liquid) side (nameplate).",
        example="10 bar(g)", section="overpressure")
    process_side_test_pressure: float | None = input_field(
        "pressure", "Process side test pressure", "Hydrostatic test pressure of the process side; 1.3 × its design "
        "pressure when not given.", example="13 bar(g)", section="overpressure", key="test_pressure")
    rupture_basis: str | None = input_field(
        "text", "Tube rupture basis", "'test pressure' (the default; newer codes) or '10/13' (older codes).",
        example="test pressure", section="overpressure")
    tube_inside_diameter: float | None = input_field(
        "length", "Tube inside diameter", "Bore of one heater tube, for the flow through a ruptured tube.",
        example="15.7 mm", section="overpressure", positive=True)
    shell_inside_diameter: float | None = input_field(
        "length", "Shell inside diameter", "Bore of the heater's shell (checks the tube size against it).",
        example="273 mm", section="overpressure", positive=True)
    process_expansion_coefficient: float | None = input_field(
        "expansion_coefficient", "Cubic expansion coefficient of the process liquid", "For thermal relief of a "
        "liquid other than water (water's comes from IF97): the maker's or a handbook's figure at the relieving "
        "temperature, in ppm/K (e.g. '700 ppm/K').", example="700 ppm/K", section="overpressure",
        key="expansion_coefficient")
    relief_valve_type: str | None = input_field(
        "text", "Tube-rupture relief valve type", "conventional, balanced-bellows or pilot; conventional when not "
        "given. The tube-rupture valve is on the lower-pressure side: the process side's, or the steam side's when "
        "the process side has the higher design pressure.", example="conventional", section="overpressure",
        key="valve_type")
    relief_inlet_size: str | None = input_field(
        "nominal_size", "Tube-rupture relief inlet pipe size", "Nominal size of the pipe to the tube-rupture relief "
        "valve from the side it protects (the process side, or the steam side when the process side has the higher "
        "design pressure; schedule 40); with its length, the inlet pressure loss is checked against 3 % of "
        "the set pressure.", example="DN80", section="overpressure", key="inlet_size")
    relief_inlet_length: float | None = input_field(
        "length", "Tube-rupture relief inlet pipe length", "Straight length of the pipe to the tube-rupture relief "
        "valve from the side it protects.", example="0.5 m", section="overpressure", positive=True,
        key="inlet_length")
    relief_inlet_fittings_k: float | None = input_field(
        "number", "Tube-rupture relief inlet fittings K", "Sum of the loss coefficients of that inlet pipe (entry, "
        "fittings), 0 or more; none counted when not given.", example="0.5", section="overpressure",
        key="inlet_fittings_k")
    discharge_size: str | None = input_field(
        "nominal_size", "Tube-rupture relief discharge pipe size", "Nominal size of the tube-rupture relief valve's "
        "discharge pipe (schedule 40).", example="DN100", section="overpressure")
    discharge_length: float | None = input_field(
        "length", "Tube-rupture relief discharge pipe length", "Straight length of that discharge pipe to its open "
        "end.", example="6 m", section="overpressure")
    discharge_fittings_k: float | None = input_field(
        "number", "Tube-rupture relief discharge fittings K", "Sum of the loss coefficients of that pipe's fittings "
        "and exit.", example="1.5", section="overpressure")
    thermal_discharge_size: str | None = input_field(
        "nominal_size", "Thermal relief discharge pipe size", "Nominal size of the thermal relief valve's discharge "
        "pipe (schedule 40).", example="DN25", section="overpressure")
    thermal_discharge_length: float | None = input_field(
        "length", "Thermal relief discharge pipe length", "Straight length of that discharge pipe to its open end.",
        example="3 m", section="overpressure")
    thermal_discharge_fittings_k: float | None = input_field(
        "number", "Thermal relief discharge fittings K", "Sum of the loss coefficients of that pipe's fittings and "
        "exit.", example="1.5", section="overpressure")

    def __post_init__(self):
        check_fields(self)
        if (self.process_flow is None) == (self.process_volume_flow is None):
            raise InputError("give process_flow (mass) or process_volume_flow (volume), exactly one",
                             field="process_flow", fix="e.g. process_flow = \"12 t/h\"")
        if self.process_outlet_temperature <= self.process_inlet_temperature:
            raise InputError(
                f"process outlet {self.process_outlet_temperature - 273.15:.2f} °C is not above the inlet "
                f"{self.process_inlet_temperature - 273.15:.2f} °C: a heater raises the temperature",
                field="process_outlet_temperature", fix="check the two process temperatures")
        fluid = (self.process_fluid or "water")
        if self.process_cp is None and fluid != "water":
            raise InputError(f"process fluid '{fluid}' needs its specific heat", field="process_cp",
                             fix="give process_cp, or process_fluid = \"water\"")
        if self.process_cp is not None and self.process_fluid not in (None, "other"):
            raise InputError("give process_fluid = \"water\" or process_cp, not both", field="process_cp")
        if self.process_volume_flow is not None and self.process_density is None and self.process_cp is not None:
            raise InputError("a volume flow of a liquid other than water needs its density", field="process_density")
        states = [name for name in ("steam_temperature", "steam_superheat", "steam_dryness")
                  if getattr(self, name) is not None]
        if len(states) > 1:
            raise InputError(f"the steam state is given twice, as {states[0]} and as {states[1]}", field=states[1],
                             fix="keep one of steam_temperature, steam_superheat or steam_dryness (none: saturated)")
        if self.arrangement is not None and self.arrangement not in ARRANGEMENTS:
            raise InputError(f"arrangement '{self.arrangement}' is not known", field="arrangement",
                             fix=f"use one of: {', '.join(ARRANGEMENTS)}")
        if self.heat_loss is not None and self.heat_loss >= 0.5:
            raise InputError("a heat loss of half the duty or more is not an allowance", field="heat_loss",
                             limits=(0, 0.5, ""))
        if self.fouling_resistance is not None and self.fouling_resistance < 0.0:
            raise InputError("a fouling resistance cannot be negative", field="fouling_resistance")
        if self.condensate_subcooling is not None and self.condensate_subcooling < 0.0:
            raise InputError("subcooling cannot be negative", field="condensate_subcooling")
        if (self.condensate_subcooling or 0.0) >= 0.01 and self.overall_u is not None and self.subcooling_u is None:
            # A condensate-cooling U is several times below the condensing U: sized at the condensing U the
            # subcooling zone comes out a fraction of its real area, so its U is asked for, not assumed.
            raise InputError("a subcooling zone needs its own U: the condensing U would understate its area "
                             "several times", field="subcooling_u",
                             fix="give subcooling_u, the clean U of the condensate-cooling zone (the maker's or a "
                                 "sensible-heat figure, e.g. 0.6 kW/(m²·K)), or no condensate_subcooling")
        for name in ("desuperheating_u", "subcooling_u"):
            if getattr(self, name) is not None and self.overall_u is None:
                raise InputError(f"{name} is a zone's U; the condensing zone needs the overall U as well",
                                 field=name, fix="give overall_u (the clean condensing U), or remove " + name)
        self._check_drainage()
        check_control_inputs(self)
        check_overpressure_inputs(self)

    def _check_drainage(self):
        head, differential = self.trap_static_head, self.trap_min_differential
        for name, value, unit in (("desuperheating_u", self.desuperheating_u, "kW/(m^2 K)"),
                                  ("subcooling_u", self.subcooling_u, "kW/(m^2 K)"),
                                  ("drainage.trap_static_head", head, "m"),
                                  ("drainage.trap_min_differential", differential, "bar")):
            if value is not None and not math.isfinite(value):
                raise InputError("is not a finite number", field=name, value=value,
                                 fix=f"give a plain figure with its unit, in {unit}")
        if head is not None and head < 0.0:
            raise InputError(
                "a static head cannot be negative: it is the height of condensate standing above the trap",
                field="drainage.trap_static_head", value=f"{head:g} m",
                fix="give the trap's depth below the heater outlet (0 m or more); a trap above the outlet is a "
                    "lift: add its ρ·g·H to condensate_back_pressure instead")
        if differential is not None and differential < 0.0:
            raise InputError(
                "a trap's minimum working differential cannot be negative",
                field="drainage.trap_min_differential", value=f"{differential / 1e5:g} bar",
                fix="give the trap maker's minimum differential, 0 bar or more, e.g. \"0.1 bar\"")
        if (head is not None or differential is not None) and self.condensate_back_pressure is None:
            field = "drainage.trap_static_head" if head is not None else "drainage.trap_min_differential"
            raise InputError("the [inputs.drainage] figures set the stall load, which needs the condensate back "
                             "pressure", field=field, fix="give condensate_back_pressure, e.g. \"0.8 bar(g)\"")


def _process_side(inputs, result):
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature
    if inputs.process_cp is not None:
        cp = inputs.process_cp
        flow = inputs.process_flow if inputs.process_flow is not None else inputs.process_volume_flow * inputs.process_density
        duty = flow * cp * (t_out - t_in)
        result.work("Process duty", "Q = m·cp·(T_out − T_in)", "m*cp*(T_out - T_in)", duty / 1e3, "kW",
                    m=(flow * 3600, "kg/h"), cp=(cp / 1e3, "kJ/(kg*K)"), T_out=(t_out - 273.15, "degC"),
                    T_in=(t_in - 273.15, "degC"))
        return flow, duty, None
    p = inputs.process_pressure
    if p is None:
        p = max(2e5, saturation_pressure(min(t_out, 640.0)) + 1e5)
        result.assumptions.append(f"Process water at {p / 1e5:.3g} bar(a) (not given; liquid enthalpy barely "
                                  "depends on pressure)")
    try:
        water_in = SteamState.from_pT(p, t_in)
        water_out = SteamState.from_pT(p, t_out)
    except OutOfRangeError as exc:
        raise exc.for_field("process_outlet_temperature" if exc.field == "temperature" else "process_pressure") from None
    if water_out.phase != "compressed liquid":
        raise InputError(f"process water at {t_out - 273.15:.1f} °C boils at {p / 1e5:.3g} bar(a)",
                         field="process_pressure", fix="give the process pressure, above saturation at the outlet")
    if inputs.process_flow is not None:
        flow = inputs.process_flow
    else:
        density = inputs.process_density or water_in.density
        flow = inputs.process_volume_flow * density
        result.work("Process mass flow", "m = V·ρ", "V*rho", flow * 3600, "kg/h",
                    V=(inputs.process_volume_flow * 3600, "m**3/h"), rho=(density, "kg/m**3"))
    duty = flow * (water_out.enthalpy - water_in.enthalpy)
    result.work("Process duty (water, IF97)", "Q = m·(h(p, T_out) − h(p, T_in))", "m*(h_out - h_in)", duty / 1e3, "kW",
                m=(flow * 3600, "kg/h"), h_out=(water_out.enthalpy / 1e3, "kJ/kg"),
                h_in=(water_in.enthalpy / 1e3, "kJ/kg"))
    return flow, duty, (water_in, water_out)


def _independent_balance(steam, condensate, steam_flow, flow, duty, steam_side, water, result):
    """Steam side against process side, re-summed with the second IF97 implementation."""
    steam_streams = ([Stream.of("steam", steam_flow, steam)], [Stream.of("condensate", steam_flow, condensate)])
    if water is None:
        # A process fluid given by its cp: only the steam side has IF97 states; its heat goes to the process.
        check_energy_balance(result, "Steam-side energy balance (independent)", *steam_streams, duty,
                             heat_in=-steam_side)
        return
    water_in, water_out = water
    check_energy_balance(result, "Heater energy balance (independent)",
                         steam_streams[0] + [Stream.of("process water in", flow, water_in)],
                         steam_streams[1] + [Stream.of("process water out", flow, water_out)], duty,
                         heat_in=-(steam_side - duty))


def calculate(inputs, site):
    """Duty, steam demand, LMTD, UA, area and the stall load of a steam heater.

    Parameters
    ----------
    inputs : Inputs
        Steam pressure (Pa) and state; process flow (kg/s or m³/s) and temperatures (K);
        optional subcooling (K), U's (W/(m² K)), fouling (m² K/W), area (m²), back pressure (Pa),
        static head to the trap (m) and the trap's minimum differential (Pa).
    site : steamcalc.cases.site.Site
        Site data (its atmosphere has been applied to gauge inputs).

    Returns
    -------
    Result
        ``duty`` (kW), ``steam_flow`` (kg/h), ``condensate_flow`` (kg/h), ``lmtd`` (K), ``ua``
        (kW/K), ``<zone>_duty``, ``<zone>_lmtd`` and ``<zone>_area`` for the zones present,
        ``required_area`` (m², with U, the zones' sum), ``area_margin`` (with an installed area),
        ``stall_load_fraction`` (clean U) and ``stall_load_fraction_fouled`` (with a back
        pressure), and the turndown table (``required_steam_pressure_<load>`` on the fouled U,
        ``required_steam_pressure_clean_<load>`` on the clean U when they differ);
        ``vacuum_load_fraction``; with a supply pressure the control valve's
        ``control_valve_kv_<load>`` (and ``_clean_<load>``), ``control_valve_choked_<load>``,
        ``required_rangeability``, with a rated Kv ``control_valve_travel_<load>`` (percent);
        with a back pressure ``required_pumping_differential`` (bar difference) and, when it
        stalls, ``condensate_to_remove`` (kg/h, at the stall load). With a supply pressure,
        ``supply_temperature`` (°C), ``supply_superheat`` (K) and ``supply_enthalpy`` (kJ/kg); with
        superheated steam at the heater ``steam_inlet_temperature`` and ``steam_inlet_superheat``.
        With a U and an installed area the capacity at the supply pressure (:mod:`.capacity`):
        ``capacity_process_flow`` (kg/h), ``capacity_margin``, ``capacity_duty`` (kW),
        ``capacity_steam_flow`` (kg/h), with a supply pressure ``capacity_steam_side_pressure``
        (bar(a)), and when the design flow is beyond it ``outlet_temperature_reached`` (°C).

    Notes
    -----
    .. math:: \\dot m_s = \\frac{Q (1 + f_{loss})}{h_s - h_c}, \\quad
              UA = \\sum_i \\frac{Q_i}{F_i \\Delta T_{lm,i}}, \\quad
              A = \\sum_i \\frac{UA_i}{U_{s,i}}, \\quad \\frac{1}{U_{s,i}} = \\frac{1}{U_i} + R_f

    References
    ----------
    IAPWS R7-97(2012), IAPWS-IF97. Fakheri, A. (2003), "A General Expression for the
    Determination of the Log Mean Temperature Correction Factor for Shell and Tube Heat
    Exchangers", J. Heat Transfer 125(3), 527-530 (through ``ht.F_LMTD_Fakheri``). The
    wet-wall desuperheating basis and the drainage balance are common practice (see the
    zone and turndown modules).

    Examples
    --------
    >>> from steamcalc.cases.site import Site
    >>> r = calculate(Inputs(steam_pressure=9e5, process_flow=1.0, process_inlet_temperature=328.15,
    ...                      process_outlet_temperature=358.15), Site())
    >>> round(r.value("duty"), 1), round(r.value("steam_flow"), 1)
    (125.7, 222.8)
    """
    result = Result()
    result.references.extend([
        IF97_REFERENCE,
        "LMTD method for heat exchangers (e.g. Incropera & DeWitt, Fundamentals of Heat and Mass Transfer, ch. 11)",
        "Fakheri, A. (2003), A General Expression for the Determination of the Log Mean Temperature Correction "
        "Factor for Shell and Tube Heat Exchangers, J. Heat Transfer 125(3), 527-530",
    ])
    result.assumptions.extend([
        "Steady state; heat lost to surroundings only as the stated allowance",
        "Steam side at uniform pressure; condensing at its saturation temperature",
        f"Gauge pressures converted with the site atmosphere of {site.atmospheric_pressure / 1e5:.5g} bar(a)",
    ])
    result.cautions.extend(CAUTIONS)
    check_design_pressures(inputs, site.atmospheric_pressure)
    arrangement = inputs.arrangement or "counterflow"
    t_in, t_out = inputs.process_inlet_temperature, inputs.process_outlet_temperature

    supply = supply_state(inputs)
    steam, condensate, saturated_liquid, saturated_vapour, t_sat = steam_states(inputs, supply)
    if t_sat <= t_out:
        raise InputError(
            f"steam saturation temperature {t_sat - 273.15:.2f} °C at {inputs.steam_pressure / 1e5:.4g} bar(a) is "
            f"not above the process outlet {t_out - 273.15:.2f} °C: the steam cannot heat the process that far",
            field="steam_pressure", fix="raise the steam pressure or lower the process outlet temperature")
    if condensate.temperature <= t_in:
        raise InputError("the condensate would be subcooled below the process inlet temperature",
                         field="condensate_subcooling", fix="reduce the subcooling")
    flow, duty, water = _process_side(inputs, result)
    steam_steps(inputs, supply, steam, t_sat, result)
    loss = inputs.heat_loss or 0.0
    steam_side = duty * (1.0 + loss)
    if loss:
        result.work("Steam-side heat", "Q_s = Q·(1 + f_loss)", "Q*(1 + f_loss)", steam_side / 1e3, "kW",
                    Q=(duty / 1e3, "kW"), f_loss=(loss, ""))
    specific = steam.enthalpy - condensate.enthalpy
    if specific <= 0.0:
        raise InputError(f"the steam ({steam.enthalpy / 1e3:.2f} kJ/kg) gives up no heat down to the condensate "
                         f"({condensate.enthalpy / 1e3:.2f} kJ/kg)", field="steam_dryness", value=inputs.steam_dryness,
                         fix="check the steam's dryness (a heating-steam supply is usually above 0.9)")
    steam_flow = steam_side / specific
    # With a control valve the steam's enthalpy is its supply's (the valve throttles at constant enthalpy).
    name = "h_steam" if supply is None else "h_supply"
    result.work("Steam flow", f"m_s = Q_s / ({name} − h_condensate)", f"Q_s/({name} - h_condensate)",
                steam_flow * 3600, "kg/h", Q_s=(steam_side / 1e3, "kW"), **{name: (steam.enthalpy / 1e3, "kJ/kg")},
                h_condensate=(condensate.enthalpy / 1e3, "kJ/kg"))
    result.add("duty", "Process duty", duty / 1e3, "kW")
    result.add("steam_side_heat", "Heat from the steam (duty with heat loss)", steam_side / 1e3, "kW")
    result.add("process_flow", "Process mass flow", flow * 3600, "kg/h")
    result.add("steam_saturation_temperature", "Steam saturation temperature", t_sat - 273.15, "degC")
    result.add("steam_enthalpy", "Steam enthalpy", steam.enthalpy / 1e3, "kJ/kg")
    result.add("condensate_enthalpy", "Condensate enthalpy", condensate.enthalpy / 1e3, "kJ/kg")
    result.add("steam_flow", "Steam flow", steam_flow * 3600, "kg/h")
    result.add("condensate_flow", "Condensate flow", steam_flow * 3600, "kg/h")
    _independent_balance(steam, condensate, steam_flow, flow, duty, steam_side, water, result)

    ua, area = add_zones(inputs, (steam, condensate, saturated_liquid, saturated_vapour), t_sat, flow, duty,
                         steam_side, steam_flow, water, arrangement, result)
    mean_dt = duty / ua
    result.add("lmtd", "Mean temperature difference (effective LMTD)", mean_dt, "K")
    result.add("ua", "UA required", ua / 1e3, "kW/K")
    approach, least = (t_sat - t_out, "K"), (MIN_APPROACH, "K")
    result.check_limit("Temperature approach", approach, [(">=", least, "warn")], Phrase.of(
        "steam saturation {approach:.1f} above the process outlet (at least {least:g}, common practice)",
        approach=approach, least=least), source="common practice")
    # Both always hold here (calculate refused the case otherwise): statements of the design, not checks.
    saturation, outlet = (t_sat - 273.15, "degC"), (t_out - 273.15, "degC")
    result.notice("Steam saturation above process outlet",
                  Phrase.of("{saturation:.2f} > {outlet:.2f}", saturation=saturation, outlet=outlet))
    result.notice("No temperature cross", "every zone has the hot side above the cold side at both ends")

    if area is not None:
        fouling = inputs.fouling_resistance or 0.0
        u_service = service_u(inputs.overall_u, fouling)
        # Solved for U_s, the step's value, so the written equation opens with what it finds.
        result.work("Service U", "U_s = 1/(1/U + R_f)", "1/(1/U + R_f)", u_service / 1e3, "kW/(m**2*K)",
                    U=(inputs.overall_u / 1e3, "kW/(m**2*K)"), R_f=(fouling * 1e3, "m**2*K/kW"))
        zone_areas = {f"A_{name}": (result.value(name + "_area"), "m**2") for name in ZONE_NAMES
                      if name + "_area" in result.values}
        result.work("Required area", "A = Σ A_i (each zone's UA_i / U_s,i)", " + ".join(zone_areas), area, "m**2",
                    **zone_areas)
        result.add("service_u", "Service U (with fouling)", u_service / 1e3, "kW/(m**2*K)")
        result.add("required_area", "Required area", area, "m**2")
        if inputs.installed_area is not None:
            margin = inputs.installed_area / area - 1.0
            # Margins are kept in percent, as the relief capacity margin is: one unit for every margin.
            result.add("area_margin", "Area margin (installed over required, minus 1)", 100.0 * margin, "percent")
            installed, required = (inputs.installed_area, "m**2"), (area, "m**2")
            result.check_limit("Installed area sufficient", installed, [(">=", required, "fail")], Phrase.of(
                "installed {installed:.2f} against {required:.2f} required ({margin:+.1f})", installed=installed,
                required=required, margin=(100 * margin, "percent")))
    ua_clean, ua_fouled = add_turndown(inputs, duty, ua, area, saturated_liquid.density, result)
    capacity = None
    if area is not None and full_record_wanted():   # feeds no banded result
        capacity = find_capacity(inputs, flow, duty, steam_side, water,
                                 (steam, condensate, saturated_liquid, saturated_vapour), t_sat, area, ua_fouled,
                                 arrangement, supply)
    add_control(inputs, duty, steam_side, steam, supply, ua_clean, ua_fouled, saturated_liquid.density, site,
                capacity, result)
    add_capacity(inputs, capacity, duty, area, water, ua_fouled, supply, result)
    if full_record_wanted():   # feeds no banded result
        add_overpressure(inputs, steam_side, water[1].pressure if water else None, site, result)
    if full_record_wanted():
        result.figures.extend(figures(inputs, result))
    return result
