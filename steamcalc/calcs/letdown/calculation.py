"""Pressure let-down station: isenthalpic throttling and an optional spray desuperheater.

Steam at the inlet pressure is throttled through a control valve to the outlet
pressure. With no heat, no work and negligible changes of kinetic and
potential energy in steady flow, the first law for the valve reduces to
:math:`h_2 = h_1`. A spray desuperheater then mixes water into the throttled
steam to reach a target temperature; its mass and energy balances give the
spray-water flow.
"""

from __future__ import annotations

from dataclasses import dataclass

from ...errors import InputError, OutOfRangeError
from ...properties.steam import REFERENCE as IF97_REFERENCE
from ...properties.steam import CRITICAL_PRESSURE, CRITICAL_TEMPERATURE, SteamState, saturation_temperature
from ..balance import Stream, check_energy_balance
from ...units.amounts import Phrase
from ..base import Result, bar_a, check_fields, deg_c, full_record_wanted, input_field
from .equipment import UPSTREAM_PRESSURE_BASES, line_section, relief_load_section, valve_section
from .figures import figures
from .discharge import DISCHARGE_PATTERNS, check_discharge_inputs
from .relief import relief_section
from .spray import SPRAY_PRESSURE_DIFFERENCE_RESULTS, check_spray_inputs, spray_field, spray_section
from .station import downstream_section, line_loss_section
from .valve_noise import noise_section
from .turbine import power_section

KIND = "letdown"
TITLE = "Pressure let-down station"
WORKBOOK = "letdown.ipynb"
#: Results the uncertainty section gives bands and sensitivities for.
UNCERTAINTY_RESULTS = ("outlet_temperature", "outlet_superheat", "throttled_temperature", "spray_water_flow", "valve_kv", "recoverable_power")
#: Plain fractions shown in % (display only; records keep the fraction).
PERCENT_VALUES = ("overpressure", "upstream_accumulation", "isentropic_efficiency", "generator_efficiency")
#: The governing results a checker signs against: the first page of the record and of `verify` (those the record holds).
SUMMARY_RESULTS = ("outlet_temperature", "outlet_superheat", "spray_water_flow", "valve_kv", "valve_travel_normal", "valve_noise_maximum", "two_stage_noise_combined", "relief_design_flow", "relief_required_area", "relief_orifice", "recoverable_power")
#: Bases this release changed, so that verify lists what a record of an earlier release differs by, and why,
#: instead of calling it edited: patterns (fnmatch) over result keys, step labels, check names and statements.
BASIS_CHANGES = (
    # First: its names begin "Relief" as the relief load's do, and the first declared change that matches is named.
    ("0.3", "the relief valve's discharge line: its built-up back pressure against the valve type's limit, or a "
     "statement that it was not assessed", DISCHARGE_PATTERNS),
    ("0.3", "relief load on the densest credible inlet steam (dry saturated at the highest upstream pressure)",
     ("fail_open_flow*", "bypass_open_flow", "relief_*", "Fail-open flow", "Bypass-open flow", "Required area*",
      "Relief*", "Reaction force*", "Relief load*")),
    ("0.3", "the pressures a flow case is sized at are recorded as a number (the valve inlet pressure), not a text",
     ("valve_pressures_*", "valve_inlet_pressure_*")),
    ("0.3", "the relief load at the upstream safety valve's relieving pressure (its set pressure plus accumulation)",
     ("upstream_relieving_pressure", "Upstream relieving pressure", "Relieving steam*")),
    ("0.3", "two-stage let-down: each stage sized on its own valve, the split chosen for the least combined noise, "
     "the combined level judged; noise beyond the method's outlet Mach number scope fails",
     ("two_stage_*", "Two-stage*", "Single-stage let-down", "Valve outlet Mach number*", "valve_outlet_mach_*",
      "Noise method*", "Valve noise*", "Combined*")),
    ("0.3", "spray-water valve with its reducers (Fp, FLP); evaporation length over the droplet-size range, the sensor "
     "checked at the coarse end when the maker gives no figure",
     ("spray_valve_*", "evaporation_length*", "Spray valve*", "Spray-water valve*", "Evaporation length*",
      "Temperature sensor*", "Spray droplet size*", "Incipient cavitation*")),
    ("0.3", "no result twice under two keys: the valve travel at the normal flow is kept once, with the flow cases",
     ("valve_travel",)),
    ("0.3", "a line's pressure gradient is a quantity of its own (bar difference per 100 m, psi difference per 100 ft "
     "in US views), no longer a pressure difference in bar with \"per 100 m\" in its words; the line checks state "
     "their gradient limit in it",
     ("*_line_pressure_drop_per_100m", "Inlet line pressure drop", "Outlet line pressure drop")),
)

#: Results that hold a pressure difference (shown as "bar difference", not bar(a)). The gradients
#: (``*_per_100m``) stay listed: a record of an earlier release holds them in bar, a difference.
PRESSURE_DIFFERENCE_RESULTS = tuple(
    f"{line}_line_pressure_drop{suffix}" for line in ("inlet", "outlet")
    for suffix in ("", "_per_100m", "_minimum", "_normal", "_maximum")) + SPRAY_PRESSURE_DIFFERENCE_RESULTS

#: Smallest desuperheat margin above saturation that spray desuperheaters hold
#: stably, K (common practice).
MIN_DESUPERHEAT_MARGIN = 5.0
#: Spray-water pressure margin above the steam below which atomisation is doubtful, Pa
#: (common practice; the nozzle maker's required differential governs).
MIN_SPRAY_PRESSURE_MARGIN = 3e5

CAUTIONS = (
    "Equipment downstream of the let-down valve must be protected against the valve, or its "
    "bypass, failing open: a relief device sized for that flow, to the local pressure-equipment code.",
    "Steam and flashing condensate cause severe burns; relief and drain discharges must go to a "
    "safe place.",
    "A desuperheater that stops spraying (water failure, stuck valve) lets superheated steam into "
    "the downstream system: check its design temperature against the throttled temperature.",
    "These results support design by a competent engineer; they do not replace the applicable "
    "codes, the equipment makers' data or a licensed engineer's approval.",
)


@dataclass(frozen=True)
class Inputs:
    """Inputs of a let-down station; values in SI (Pa absolute, K, kg/s).

    The inlet state takes exactly one of inlet_temperature, inlet_superheat and
    inlet_dryness. The desuperheater is used when a target is given; it then needs
    the spray water's temperature and pressure.
    """

    inlet_pressure: float = input_field(
        "pressure", "Inlet pressure", "Steam pressure upstream of the let-down valve.",
        example="16 bar(g)", required=True)
    outlet_pressure: float = input_field(
        "pressure", "Outlet pressure", "Pressure downstream of the station (a site header or a pressure).",
        example="header:LP", required=True)
    mass_flow: float = input_field(
        "mass_flow", "Steam flow", "Steam flow through the let-down valve.", example="4.5 t/h", required=True,
        positive=True)
    inlet_temperature: float | None = input_field(
        "temperature", "Inlet temperature", "Inlet steam temperature (superheated steam).",
        example="230 °C")
    inlet_superheat: float | None = input_field(
        "temperature_difference", "Inlet superheat", "Inlet temperature above saturation.",
        example="25 K")
    inlet_dryness: float | None = input_field(
        "fraction", "Inlet dryness fraction", "Vapour mass fraction of wet or saturated inlet steam.",
        example="0.98")
    target_superheat: float | None = input_field(
        "temperature_difference", "Target superheat", "Desuperheated steam temperature above outlet saturation.",
        example="10 K", section="desuperheater")
    target_temperature: float | None = input_field(
        "temperature", "Target temperature", "Desuperheated steam temperature.",
        example="150 °C", section="desuperheater")
    water_temperature: float | None = input_field(
        "temperature", "Spray water temperature", "Temperature of the spray water at the nozzle.",
        example="105 °C", section="desuperheater")
    water_pressure: float | None = input_field(
        "pressure", "Spray water pressure", "Pressure of the spray water at the nozzle.",
        example="20 bar(g)", section="desuperheater")
    spray_supply_pressure: float | None = spray_field("spray_supply_pressure")
    nozzle_differential: float | None = spray_field("nozzle_differential")
    spray_valve_fl: float | None = spray_field("spray_valve_fl")
    spray_valve_rated_kv: float | None = spray_field("spray_valve_rated_kv")
    spray_valve_characteristic: str | None = spray_field("spray_valve_characteristic")
    spray_valve_rangeability: float | None = spray_field("spray_valve_rangeability")
    sensor_distance: float | None = spray_field("sensor_distance")
    desuperheater_pipe_size: str | None = spray_field("desuperheater_pipe_size")
    desuperheater_velocity_limit: float | None = spray_field("desuperheater_velocity_limit")
    spray_droplet_size: float | None = spray_field("spray_droplet_size")
    recommended_sensor_distance: float | None = spray_field("recommended_sensor_distance")
    spray_valve_size: str | None = spray_field("spray_valve_size")
    spray_inlet_pipe_size: str | None = spray_field("spray_inlet_pipe_size")
    spray_outlet_pipe_size: str | None = spray_field("spray_outlet_pipe_size")
    spray_pipe_schedule: str | None = spray_field("spray_pipe_schedule")

    max_flow: float | None = input_field(
        "mass_flow", "Maximum flow", "Largest flow the valve must pass (sizing case).", example="5.5 t/h",
        section="valve")
    min_flow: float | None = input_field(
        "mass_flow", "Minimum flow", "Smallest controlled flow.", example="1.0 t/h", section="valve",
        positive=True)
    fl: float | None = input_field(
        "fraction", "FL", "Liquid pressure recovery factor of the valve (maker's data).", example="0.90",
        section="valve", positive=True)
    xt: float | None = input_field(
        "fraction", "xT", "Pressure differential ratio factor at choked flow (maker's data).", example="0.70",
        section="valve", positive=True)
    fd: float | None = input_field(
        "fraction", "Fd", "Valve style modifier (maker's data).", example="1.0", section="valve", positive=True)
    rated_kv: float | None = input_field(
        "flow_coefficient", "Rated Kv (Kvs)", "Kv of the selected valve at full travel.", example="40 m³/h",
        section="valve", positive=True)
    characteristic: str | None = input_field(
        "text", "Characteristic", "Inherent characteristic: equal-percentage or linear.",
        example="equal-percentage", section="valve")
    rangeability: float | None = input_field(
        "number", "Rangeability", "Inherent rangeability of an equal-percentage trim.", example="50",
        section="valve")
    max_inlet_pressure: float | None = input_field(
        "pressure", "Highest upstream pressure", "Highest upstream pressure in service: the minimum flow is sized "
        "at it, and the fail-open flow is taken at it, or at its relieving pressure when it is the upstream safety "
        "valve's set pressure (see the next two boxes).",
        example="18 bar(g)", section="valve")
    upstream_pressure_basis: str | None = input_field(
        "text", "Highest upstream pressure is", "'set pressure': the upstream safety valve's set pressure, to which "
        "its accumulation is added for the relief load (default); 'relieving pressure': the highest the upstream "
        "reaches, taken as it is.", example="set pressure", section="valve")
    upstream_accumulation: float | None = input_field(
        "dimensionless", "Upstream safety valve accumulation", "Rise above the upstream safety valve's set pressure "
        "while it relieves, of the gauge set pressure (default 10 %, the single-valve allowance; a boiler's safety "
        "valves allow less).", example="10 %", section="valve")
    relief_min_superheat: float | None = input_field(
        "temperature_difference", "Least superheat at the highest upstream pressure",
        "Superheat the inlet steam keeps for certain when the upstream is at its highest pressure (the relief "
        "load is taken on the densest credible steam). Not given: dry saturated steam, which passes the most.",
        example="20 K", section="valve")
    min_inlet_pressure: float | None = input_field(
        "pressure", "Lowest upstream pressure", "Lowest pressure the inlet falls to in service: the maximum "
        "flow is sized at it.", example="15 bar(g)", section="valve")
    bypass_kv: float | None = input_field(
        "flow_coefficient", "Bypass valve Kv", "Kv of the hand bypass valve wide open (for the relief load).",
        example="25 m³/h", section="valve", positive=True)
    relief_set_pressure: float | None = input_field(
        "pressure", "Downstream relief set pressure (superseded)", "Superseded by [inputs.relief] set_pressure; "
        "still read, with a warning.", example="4.5 bar(g)", section="valve")
    valve_size: str | None = input_field(
        "nominal_size", "Valve size", "Nominal size of the valve body (for the piping factor with reducers).",
        example="DN50", section="valve")
    valve_outlet_size: str | None = input_field(
        "nominal_size", "Valve outlet port size", "Nominal size of the valve's outlet port, for the outlet Mach "
        "number and the noise (default: the valve size).", example="DN80", section="valve")
    outlet_expander_size: str | None = input_field(
        "nominal_size", "Outlet expander size", "Outlet size of a concentric expander fitted on the valve outlet: "
        "with it the noise above an outlet Mach number of 0.3 is a warning, without it outside the method "
        "(default: no expander).", example="DN200", section="valve")
    noise_limit: str | None = input_field(
        "text", "Noise limit at 1 m", "A-weighted sound pressure limit 1 m from the pipe (default 85 dB(A)).",
        example="85 dB(A)", section="valve", key="noise_limit")
    inlet_size: str | None = input_field(
        "nominal_size", "Inlet line size", "Nominal size of the inlet line.", example="DN80", section="lines")
    outlet_size: str | None = input_field(
        "nominal_size", "Outlet line size", "Nominal size of the outlet line.", example="DN150", section="lines")
    schedule: str | None = input_field(
        "text", "Pipe schedule", "ASME B36.10M schedule of the lines.", example="40", section="lines")
    non_preferred_sizes: bool | None = input_field(
        "flag", "Suggest non-preferred sizes", "Also suggest DN90, DN125 and other sizes that are hard to buy.",
        example="false", section="lines")
    max_velocity_wet: float | None = input_field(
        "velocity", "Velocity limit, saturated/wet", "Line velocity limit for saturated or wet steam.",
        example="30 m/s", section="lines", positive=True)
    max_velocity_superheated: float | None = input_field(
        "velocity", "Velocity limit, superheated", "Line velocity limit for superheated steam.",
        example="45 m/s", section="lines", positive=True)
    inlet_length: float | None = input_field(
        "length", "Inlet line length", "Straight length of the inlet line, for its pressure drop.", example="25 m",
        section="lines", positive=True)
    outlet_length: float | None = input_field(
        "length", "Outlet line length", "Straight length of the outlet line, for its pressure drop.",
        example="40 m", section="lines", positive=True)
    inlet_fittings_k: float | None = input_field(
        "number", "Inlet line fittings K", "Sum of the inlet line's fittings loss coefficients.", example="2.0",
        section="lines")
    outlet_fittings_k: float | None = input_field(
        "number", "Outlet line fittings K", "Sum of the outlet line's fittings loss coefficients.", example="3.0",
        section="lines")
    set_pressure: float | None = input_field(
        "pressure", "Relief set pressure", "Set pressure of the relief valve protecting the outlet side.",
        example="4.5 bar(g)", section="relief")
    overpressure: float | None = input_field(
        "dimensionless", "Relief overpressure", "Allowable overpressure, of the gauge set pressure (default 10 %).",
        example="10 %", section="relief", positive=True)
    back_pressure: float | None = input_field(
        "pressure", "Relief back pressure", "Superimposed plus built-up back pressure at the relief valve outlet "
        "(default atmospheric).", example="0 bar(g)", section="relief")
    relief_kd: float | None = input_field(
        "fraction", "Relief Kd", "Effective coefficient of discharge (default 0.975, API 520 Part I).",
        example="0.975", section="relief", positive=True, key="kd")
    relief_kc: float | None = input_field(
        "fraction", "Relief Kc", "Combination correction: 1.0, or 0.9 with a rupture disk upstream.",
        example="1.0", section="relief", positive=True, key="kc")
    relief_valve_type: str | None = input_field(
        "text", "Relief valve type", "conventional, balanced-bellows or pilot (default conventional).",
        example="conventional", section="relief", key="valve_type")
    relief_inlet_size: str | None = input_field(
        "nominal_size", "Relief inlet line size", "Nominal size of the relief valve's inlet line.", example="DN100",
        section="relief", key="inlet_size")
    relief_inlet_length: float | None = input_field(
        "length", "Relief inlet line length", "Length of the relief valve's inlet line.", example="1.5 m",
        section="relief", positive=True, key="inlet_length")
    relief_inlet_fittings_k: float | None = input_field(
        "number", "Relief inlet fittings K", "Sum of the loss coefficients of the relief inlet line (entry, "
        "fittings).", example="0.5", section="relief", key="inlet_fittings_k")
    relief_discharge_size: str | None = input_field(
        "nominal_size", "Relief discharge size", "Nominal size of the open discharge pipe, for the reaction force "
        "(default: the API 526 outlet of the orifice); with the discharge length, the pipe whose built-up back "
        "pressure is assessed.", example="DN100", section="relief", key="discharge_size")
    relief_discharge_length: float | None = input_field(
        "length", "Relief discharge pipe length", "Straight length of the relief valve's outlet pipe to its open end; "
        "with it the record assesses the built-up back pressure.", example="12 m", section="relief", positive=True,
        key="discharge_length")
    relief_discharge_fittings_k: float | None = input_field(
        "number", "Relief discharge fittings K", "Sum of the loss coefficients of the outlet pipe's fittings and its "
        "open exit (1.0).", example="1.9", section="relief", key="discharge_fittings_k")
    relief_discharge_equivalent_length: float | None = input_field(
        "length", "Relief discharge fittings equivalent length", "Fittings of the outlet pipe given as an equivalent "
        "length of straight pipe instead of (or as well as) their K; added to the straight length.", example="8 m",
        section="relief", key="discharge_equivalent_length")
    design_pressure: float | None = input_field(
        "pressure", "Downstream design pressure", "Design pressure of the downstream system.", example="6 bar(g)",
        section="downstream")
    design_temperature: float | None = input_field(
        "temperature", "Downstream design temperature", "Design temperature of the downstream system.",
        example="180 °C", section="downstream")
    isentropic_efficiency: float | None = input_field(
        "fraction", "Turbine isentropic efficiency", "Of a back-pressure turbine in place of the valve.",
        example="0.55", section="turbine", positive=True)
    generator_efficiency: float | None = input_field(
        "fraction", "Generator efficiency", "Electrical output over shaft power of the turbine-generator set.",
        example="0.95", section="turbine", positive=True)

    def __post_init__(self):
        check_fields(self)
        self._check_valve_inputs()
        self._check_relief_inputs()
        inlet_given = [n for n in ("inlet_temperature", "inlet_superheat", "inlet_dryness")
                       if getattr(self, n) is not None]
        if len(inlet_given) != 1:
            raise InputError(
                "the inlet state needs exactly one of inlet_temperature, inlet_superheat, inlet_dryness"
                + (f"; given: {', '.join(inlet_given)}" if inlet_given else ""),
                field=inlet_given[1] if len(inlet_given) > 1 else "inlet_temperature",
                fix="keep one of them")
        if self.inlet_superheat is not None and self.inlet_superheat <= 0.0:
            raise InputError("inlet superheat must be above 0 K", field="inlet_superheat",
                             value=self.inlet_superheat,
                             fix="for saturated steam give inlet_dryness = 1.0 instead")
        targets = [n for n in ("target_superheat", "target_temperature") if getattr(self, n) is not None]
        if len(targets) > 1:
            raise InputError("give target_superheat or target_temperature, not both",
                             field="target_temperature", fix="keep one of them")
        if targets:
            for name in ("water_temperature", "water_pressure"):
                if getattr(self, name) is None:
                    raise InputError("the desuperheater needs the spray water's temperature and pressure",
                                     field=f"desuperheater.{name}", fix=f"add {name} to [inputs.desuperheater]")
        elif self.water_temperature is not None or self.water_pressure is not None:
            raise InputError("spray water is given but no desuperheater target",
                             field="desuperheater.target_superheat",
                             fix="add target_superheat or target_temperature, or remove [inputs.desuperheater]")
        check_spray_inputs(self)

    def _check_relief_inputs(self):
        from ...equipment.noise import parse_sound_level
        from ...equipment.relief import VALVE_TYPES

        if self.noise_limit is not None:
            parse_sound_level(self.noise_limit)
        if self.set_pressure is not None and self.relief_set_pressure is not None \
                and abs(self.set_pressure - self.relief_set_pressure) > 1.0:
            raise InputError("two different relief set pressures are given", field="relief.set_pressure",
                             fix="remove valve.relief_set_pressure (superseded by [inputs.relief] set_pressure)")
        set_pressure = self.set_pressure if self.set_pressure is not None else self.relief_set_pressure
        field = "relief.set_pressure" if self.set_pressure is not None else "valve.relief_set_pressure"
        if set_pressure is not None and set_pressure <= self.outlet_pressure:
            raise InputError(
                f"the relief set pressure {bar_a(set_pressure)} is not above the outlet pressure "
                f"{bar_a(self.outlet_pressure)}: the valve would lift in normal service", field=field,
                value=set_pressure, fix="set it above the operating pressure (check the basis, bar(g)/bar(a))")
        if self.back_pressure is not None:
            if set_pressure is None:
                raise InputError("a relief back pressure is given without a set pressure", field="relief.back_pressure",
                                 fix="add set_pressure to [inputs.relief]")
            if self.back_pressure >= set_pressure:
                raise InputError(
                    f"the back pressure {bar_a(self.back_pressure)} is not below the set pressure {bar_a(set_pressure)}",
                    field="relief.back_pressure", value=self.back_pressure,
                    fix="give the superimposed plus built-up pressure at the valve outlet, below the set pressure")
        if self.upstream_pressure_basis is not None and self.upstream_pressure_basis not in UPSTREAM_PRESSURE_BASES:
            raise InputError("the highest upstream pressure is either the upstream safety valve's 'set pressure' or "
                             "its 'relieving pressure'", field="valve.upstream_pressure_basis",
                             value=self.upstream_pressure_basis, fix="write 'set pressure' or 'relieving pressure'")
        for name in ("upstream_pressure_basis", "upstream_accumulation"):
            if getattr(self, name) is not None and self.max_inlet_pressure is None:
                raise InputError("given without a highest upstream pressure", field=f"valve.{name}",
                                 value=getattr(self, name), fix="give valve.max_inlet_pressure, or remove this")
        if self.upstream_accumulation is not None:
            if self.upstream_pressure_basis == "relieving pressure":
                raise InputError("an accumulation is given for a pressure said to be the relieving pressure already",
                                 field="valve.upstream_accumulation", value=self.upstream_accumulation,
                                 fix="remove it, or set valve.upstream_pressure_basis = 'set pressure'")
            if not 0.0 <= self.upstream_accumulation <= 0.21:
                raise InputError(f"accumulation {100 * self.upstream_accumulation:g} % is outside 0-21 % of the gauge "
                                 "set pressure", field="valve.upstream_accumulation", value=self.upstream_accumulation,
                                 limits=(0, 21, "%"), fix="10 % for a single valve, 16 % for several, 21 % for fire "
                                 "(API 520 Part I); 3-6 % for boiler safety valves")
        if self.overpressure is not None and not 0.03 <= self.overpressure <= 0.21:
            raise InputError(f"overpressure {100 * self.overpressure:g} % is outside 3-21 % of the set pressure",
                             field="relief.overpressure", value=self.overpressure, limits=(3, 21, "%"),
                             fix="10 % for a single valve, 16 % for several, 21 % for fire (API 520 Part I)")
        if self.relief_valve_type is not None and self.relief_valve_type not in VALVE_TYPES:
            raise InputError(f"unknown relief valve type '{self.relief_valve_type}'", field="relief.valve_type",
                             value=self.relief_valve_type, fix=f"use one of {', '.join(VALVE_TYPES)}")
        for name in ("inlet_fittings_k", "outlet_fittings_k", "relief_inlet_fittings_k", "relief_discharge_fittings_k"):
            value = getattr(self, name)
            if value is not None and value < 0.0:
                where = f"relief.{name[len('relief_'):]}" if name.startswith("relief") else f"lines.{name}"
                raise InputError("a loss coefficient cannot be negative", field=where, value=value,
                                 fix="give the sum of the fittings' K values, zero or more")
        check_discharge_inputs(self)
        if self.design_pressure is not None and self.design_pressure <= self.outlet_pressure:
            raise InputError(
                f"the downstream design pressure {bar_a(self.design_pressure)} is not above the outlet pressure "
                f"{bar_a(self.outlet_pressure)}", field="downstream.design_pressure", value=self.design_pressure,
                fix="give the design pressure of the downstream system (check the basis, bar(g)/bar(a))")

    def _check_valve_inputs(self):
        # Control valves have xT from about 0.1 (ball, butterfly) to 0.9 (globe): outside 0.05-1 is a
        # slip, and xT near zero makes the choked limit vanish (common practice; makers' data govern).
        if self.xt is not None and not 0.05 <= self.xt <= 1.0:
            raise InputError("xT must lie between 0.05 and 1", field="valve.xt", value=self.xt,
                             limits=(0.05, 1.0, ""), fix="take xT from the valve maker's data (globe valves 0.6-0.8)")
        if self.characteristic is not None and self.characteristic not in ("linear", "equal-percentage"):
            raise InputError("the characteristic is 'linear' or 'equal-percentage'", field="valve.characteristic",
                             value=self.characteristic)
        if self.rangeability is not None and self.rangeability <= 1.0:
            raise InputError("rangeability must be above 1", field="valve.rangeability", value=self.rangeability)
        if self.max_flow is not None and self.max_flow < self.mass_flow:
            raise InputError("the maximum flow is below the normal flow", field="valve.max_flow",
                             fix="max_flow ≥ mass_flow ≥ min_flow")
        if self.min_flow is not None and self.min_flow > self.mass_flow:
            raise InputError("the minimum flow is above the normal flow", field="valve.min_flow",
                             fix="max_flow ≥ mass_flow ≥ min_flow > 0")
        if self.max_inlet_pressure is not None and self.max_inlet_pressure < self.inlet_pressure:
            raise InputError(
                f"the highest upstream pressure {bar_a(self.max_inlet_pressure)} is below the inlet pressure "
                f"{bar_a(self.inlet_pressure)}", field="valve.max_inlet_pressure", value=self.max_inlet_pressure,
                fix="give the highest pressure the inlet can reach (at least the normal inlet pressure)")
        if self.min_inlet_pressure is not None:
            if self.min_inlet_pressure > self.inlet_pressure:
                raise InputError(
                    f"the lowest upstream pressure {bar_a(self.min_inlet_pressure)} is above the inlet pressure "
                    f"{bar_a(self.inlet_pressure)}", field="valve.min_inlet_pressure", value=self.min_inlet_pressure,
                    fix="give the lowest pressure the inlet falls to (at most the normal inlet pressure)")
            if self.min_inlet_pressure <= self.outlet_pressure:
                raise InputError(
                    f"the lowest upstream pressure {bar_a(self.min_inlet_pressure)} is not above the outlet "
                    f"pressure {bar_a(self.outlet_pressure)}: no flow at that case", field="valve.min_inlet_pressure",
                    value=self.min_inlet_pressure, fix="check the pressure and its basis (bar(g)/bar(a))")

    @property
    def desuperheating(self):
        """True when a desuperheater target is given."""
        return self.target_superheat is not None or self.target_temperature is not None





def _phase_word(state):
    """The record's phase word: superheated, wet or saturated (design §3.4)."""
    if state.phase == "superheated vapour":
        return "superheated"
    if state.phase == "wet":
        return "wet"
    if state.phase in ("saturated vapour", "saturated liquid"):
        return "saturated"
    return state.phase


def _dryness(state):
    # Steam-table convention: a superheated state is reported with dryness 1.
    return 1.0 if state.dryness is None else state.dryness


def inlet_state(inputs, result):
    """The station's inlet state from its inputs, and the inlet's saturation temperature (K; None above the
    critical pressure); its worked steps go to ``result``. A range error names the input that set the state
    (the site balance sizes a linked station's valve from the same state)."""
    given = next(n for n in ("inlet_temperature", "inlet_superheat", "inlet_dryness")
                 if getattr(inputs, n) is not None)
    try:
        return _inlet_state_from(inputs, result)
    except OutOfRangeError as exc:
        raise exc.for_field("inlet_pressure" if exc.field == "pressure" else given) from None


def _inlet_state_from(inputs, result):
    p1 = inputs.inlet_pressure
    # Above the critical pressure there is no saturation: a temperature fixes the state (IF97 regions 2, 3).
    t_sat = saturation_temperature(p1) if p1 <= CRITICAL_PRESSURE or inputs.inlet_temperature is None else None
    if inputs.inlet_temperature is not None:
        if t_sat is None and inputs.inlet_temperature < CRITICAL_TEMPERATURE:
            raise InputError(
                f"inlet temperature {deg_c(inputs.inlet_temperature)} at {bar_a(p1)} (above the critical pressure) "
                f"is below the critical temperature {deg_c(CRITICAL_TEMPERATURE)}: that is compressed liquid, not steam",
                field="inlet_temperature", fix="check the pressure basis and the temperature")
        if t_sat is not None and inputs.inlet_temperature < t_sat - 1e-6:
            raise InputError(
                f"inlet temperature {deg_c(inputs.inlet_temperature)} is below saturation "
                f"({deg_c(t_sat)}) at {bar_a(p1)}: that is liquid, not steam",
                field="inlet_temperature", fix="check the pressure basis (bar(g)/bar(a)) and the temperature, "
                "or give inlet_dryness for wet steam")
        state = SteamState.from_pT(p1, inputs.inlet_temperature)
        _inlet_enthalpy_step(p1, state, result)
    elif inputs.inlet_superheat is not None:
        state = SteamState.from_pT(p1, t_sat + inputs.inlet_superheat)
        result.work("Inlet temperature", "T1 = T_sat(p1) + ΔT_sh,1", "T_sat1 + dT_sh1", state.temperature - 273.15,
                    "degC", T_sat1=(t_sat - 273.15, "degC"), dT_sh1=(inputs.inlet_superheat, "K"))
        _inlet_enthalpy_step(p1, state, result)
    else:
        state = SteamState.from_p_dryness(p1, inputs.inlet_dryness)
        sat_liquid = SteamState.from_p_dryness(p1, 0.0)
        sat_vapour = SteamState.from_p_dryness(p1, 1.0)
        result.work("Inlet enthalpy", "h1 = h_f(p1) + x1·(h_g(p1) − h_f(p1))", "h_f1 + x1*(h_g1 - h_f1)",
                    state.enthalpy / 1e3, "kJ/kg", h_f1=(sat_liquid.enthalpy / 1e3, "kJ/kg"),
                    x1=(inputs.inlet_dryness, ""), h_g1=(sat_vapour.enthalpy / 1e3, "kJ/kg"))
    return state, t_sat


def _inlet_enthalpy_step(p1, state, result):
    result.work("Inlet enthalpy", "h1 = h(p1, T1)  [IF97]", "h(p1, T1)", state.enthalpy / 1e3, "kJ/kg",
                p1=(p1 / 1e5, "bar"), T1=(state.temperature - 273.15, "degC"))


def calculate(inputs, site):
    """Outlet state of a let-down station, and the spray water of its desuperheater.

    Parameters
    ----------
    inputs : Inputs
        Inlet pressure (Pa), outlet pressure (Pa), steam flow (kg/s), one inlet
        specification, and optionally a desuperheater target (K) with spray water
        temperature (K) and pressure (Pa).
    site : steamcalc.cases.site.Site
        Site data (the atmosphere has already been applied to gauge inputs).

    Returns
    -------
    Result
        Values ``outlet_temperature`` (degC), ``outlet_phase``, ``outlet_dryness``,
        ``outlet_superheat`` (K), ``outlet_enthalpy`` (kJ/kg), ``outlet_mass_flow``
        (kg/h), ``spray_water_flow`` (kg/h, when desuperheating), with the
        throttled (valve outlet) state, steps, checks and cautions.

    Notes
    -----
    Valve, steady flow energy equation with :math:`Q = 0`, :math:`W = 0` and
    negligible kinetic and potential energy changes:

    .. math:: h_2 = h_1

    Desuperheater, mass and energy balances for adiabatic mixing:

    .. math:: \\dot m_w = \\dot m_s \\frac{h_2 - h_3}{h_3 - h_w}, \\qquad
              \\dot m_3 = \\dot m_s + \\dot m_w

    References
    ----------
    IAPWS R7-97(2012), IAPWS-IF97, for every property. The steady-flow energy
    equation as in any engineering-thermodynamics text (e.g. Rogers & Mayhew,
    Engineering Thermodynamics: Work and Heat Transfer, ch. 4).

    Examples
    --------
    >>> from steamcalc.cases.site import Site
    >>> r = calculate(Inputs(inlet_pressure=15e5, outlet_pressure=1e5, mass_flow=1.0,
    ...                      inlet_temperature=623.15), Site())
    >>> r.value("outlet_phase"), round(r.value("outlet_temperature"), 1)
    ('superheated', 336.3)
    """
    result = Result()
    result.references.extend([
        IF97_REFERENCE,
        "Steady-flow energy equation for a throttling device and for adiabatic mixing "
        "(any engineering-thermodynamics text)",
        "IEC 60534-2-1:2011, control-valve sizing equations for compressible fluids",
        "IEC 60534-2-4:2009, inherent flow characteristics",
        "ASME B36.10M, welded and seamless wrought steel pipe (dimensions)",
        "IEC 60534-8-3:2010, control valve aerodynamic noise prediction (through fluids)",
        "API Standard 520 Part I (10th ed., 2020), relief device sizing: steam equation and annex B direct integration",
        "API Standard 520 Part II (7th ed., 2020), relief installation: inlet loss, reaction force",
        "API Standard 526 (7th ed., 2017), flanged steel pressure-relief valves: orifice letters and areas",
        "Darcy–Weisbach with the Colebrook (1939) friction factor (through fluids)",
    ])
    result.assumptions.extend([
        "Adiabatic valve: Q = 0",
        "No shaft work in the valve: W = 0",
        "Changes of kinetic and potential energy across the station neglected",
        "Steady state",
        "Throttling is isenthalpic: h2 = h1",
        f"Gauge pressures converted with the site atmosphere of {site.atmospheric_pressure / 1e5:.5g} bar(a)",
    ])
    result.cautions.extend(CAUTIONS)

    p1, p2, flow = inputs.inlet_pressure, inputs.outlet_pressure, inputs.mass_flow
    if p2 >= p1:
        raise InputError(
            f"outlet pressure {bar_a(p2)} is not below the inlet pressure {bar_a(p1)}",
            field="outlet_pressure", fix="a let-down lowers the pressure: check the pressures and their basis")

    inlet, t_sat1 = inlet_state(inputs, result)
    if t_sat1 is not None:
        result.add("inlet_saturation_temperature", "Inlet saturation temperature", t_sat1 - 273.15, "degC")
    result.add("inlet_temperature", "Inlet temperature", inlet.temperature - 273.15, "degC")
    result.add("inlet_phase", "Inlet phase", _phase_word(inlet))
    result.add("inlet_dryness", "Inlet dryness fraction", _dryness(inlet))
    result.add("inlet_superheat", "Inlet superheat", inlet.superheat, "K")
    result.add("inlet_enthalpy", "Inlet enthalpy", inlet.enthalpy / 1e3, "kJ/kg")
    result.add("inlet_mass_flow", "Inlet steam flow", flow * 3600, "kg/h")
    # Refused above when not met, so a statement of the drop, not a check that could fail.
    result.notice("Outlet pressure below inlet", Phrase.of(
        "{p1:.4g} to {p2:.4g}: a drop of {drop:.4g} across the station", p1=(p1 / 1e5, "bar"), p2=(p2 / 1e5, "bar"),
        drop=((p1 - p2) / 1e5, "bar", "difference")))
    if inlet.phase == "wet":
        result.check("Inlet steam state", "warn",
                     Phrase.of("wet inlet steam (dryness {dryness:.3f}): erosion of the valve trim and water carried "
                               "over downstream; fit a separator with a trap upstream (common practice)",
                               dryness=(inlet.dryness, "")))
    else:
        result.check("Inlet steam state", "pass", f"inlet steam {_phase_word(inlet)}")

    try:
        throttled = SteamState.from_ph(p2, inlet.enthalpy)
        t_sat2 = saturation_temperature(p2)
    except OutOfRangeError as exc:
        raise exc.for_field("outlet_pressure") from None
    result.work("Throttling", "h2 = h1  (Q = 0, W = 0, Δke = Δpe = 0)", "h1", throttled.enthalpy / 1e3, "kJ/kg",
                h1=(inlet.enthalpy / 1e3, "kJ/kg"))
    result.work("Outlet saturation temperature", "T_sat,2 = T_sat(p2)  [IF97 region 4]", "T_sat(p2)",
                t_sat2 - 273.15, "degC", p2=(p2 / 1e5, "bar"))
    result.work("Throttled temperature", "T2 = T(p2, h2)  [IF97]", "T(p2, h2)", throttled.temperature - 273.15,
                "degC", p2=(p2 / 1e5, "bar"), h2=(throttled.enthalpy / 1e3, "kJ/kg"))
    if throttled.phase == "wet":
        liquid, vapour = SteamState.from_p_dryness(p2, 0.0), SteamState.from_p_dryness(p2, 1.0)
        result.work("Throttled dryness fraction", "x2 = (h2 − h_f(p2)) / (h_g(p2) − h_f(p2))",
                    "(h2 - h_f2)/(h_g2 - h_f2)", throttled.dryness, h2=(throttled.enthalpy / 1e3, "kJ/kg"),
                    h_f2=(liquid.enthalpy / 1e3, "kJ/kg"), h_g2=(vapour.enthalpy / 1e3, "kJ/kg"))
    else:
        result.work("Throttled superheat", "ΔT_sh,2 = T2 − T_sat,2", "T2 - T_sat2", throttled.superheat, "K",
                    T2=(throttled.temperature - 273.15, "degC"), T_sat2=(t_sat2 - 273.15, "degC"))
    result.add("outlet_saturation_temperature", "Outlet saturation temperature", t_sat2 - 273.15, "degC")
    result.add("throttled_temperature", "Temperature after the valve", throttled.temperature - 273.15, "degC")
    result.add("throttled_phase", "Phase after the valve", _phase_word(throttled))
    result.add("throttled_dryness", "Dryness fraction after the valve", _dryness(throttled))
    result.add("throttled_superheat", "Superheat after the valve", throttled.superheat, "K")

    outlet, spray = throttled, 0.0
    if inputs.desuperheating:
        outlet, spray = _desuperheat(inputs, throttled, t_sat2, result)
    # Summed in the recorded unit so that the recorded mass balance closes exactly.
    outlet_flow_kg_h = flow * 3600 + spray * 3600

    result.add("outlet_temperature", "Outlet temperature", outlet.temperature - 273.15, "degC")
    result.add("outlet_phase", "Outlet phase", _phase_word(outlet))
    result.add("outlet_dryness", "Outlet dryness fraction", _dryness(outlet))
    result.add("outlet_superheat", "Outlet superheat", outlet.superheat, "K")
    result.add("outlet_enthalpy", "Outlet enthalpy", outlet.enthalpy / 1e3, "kJ/kg")
    result.add("outlet_mass_flow", "Outlet steam flow", outlet_flow_kg_h, "kg/h")

    result.states.update(inlet=inlet, throttled=throttled, outlet=outlet)
    valve_section(inputs, inlet, result)
    if full_record_wanted():   # a Monte Carlo sample needs none of these for its banded results
        relief_load_section(inputs, inlet, site, result)
        line_section(inputs, inlet, throttled, outlet, result)
        line_loss_section(inputs, result)
        noise_section(inputs, result)
        relief_section(inputs, inlet, site, result)
        downstream_section(inputs, result)
        spray_section(inputs, result)
    power_section(inputs, inlet, throttled, site, result)

    if outlet.phase == "wet":
        result.check("Outlet steam state", "warn",
                     Phrase.of("wet steam leaves the station (dryness {dryness:.3f}): erosion and waterhammer risk; "
                               "drain the outlet line with a trap (common practice)", dryness=(outlet.dryness, "")))
    else:
        result.check("Outlet steam state", "pass",
                     Phrase.of(f"outlet steam {_phase_word(outlet)}, {{superheat:.1f}} superheat",
                               superheat=(outlet.superheat, "K")))
    if full_record_wanted():
        result.figures.extend(figures(inputs, result))
    return result


def _desuperheat(inputs, throttled, t_sat2, result):
    p2, steam_flow = throttled.pressure, inputs.mass_flow
    if inputs.target_superheat is not None:
        target_t = t_sat2 + inputs.target_superheat
        field = "desuperheater.target_superheat"
        result.work("Desuperheat target temperature", "T3 = T_sat,2 + ΔT_sh,3", "T_sat2 + dT_sh3",
                    target_t - 273.15, "degC", T_sat2=(t_sat2 - 273.15, "degC"),
                    dT_sh3=(inputs.target_superheat, "K"))
    else:
        target_t = inputs.target_temperature
        field = "desuperheater.target_temperature"
    margin = target_t - t_sat2
    if margin <= 0.0:
        raise InputError(
            f"desuperheat target {deg_c(target_t)} is not above saturation ({deg_c(t_sat2)}) at {bar_a(p2)}",
            field=field, fix=f"set the target at least {MIN_DESUPERHEAT_MARGIN:g} K above saturation")
    water_t, water_p = inputs.water_temperature, inputs.water_pressure
    if water_t >= target_t:
        raise InputError(
            f"spray water at {deg_c(water_t)} is not colder than the target {deg_c(target_t)}",
            field="desuperheater.water_temperature", fix="spray water must be colder than the target steam")
    if water_p <= p2:
        raise InputError(
            f"spray water at {bar_a(water_p)} is not above the steam pressure {bar_a(p2)}: it cannot be injected",
            field="desuperheater.water_pressure", fix="give the water pressure at the nozzle, above the steam")
    if water_t >= saturation_temperature(water_p) - 1e-6:
        raise InputError(
            f"spray water at {deg_c(water_t)} and {bar_a(water_p)} is not liquid",
            field="desuperheater.water_temperature", fix="spray water must be subcooled liquid at the nozzle")
    try:
        target = SteamState.from_pT(p2, target_t)
    except OutOfRangeError as exc:
        raise exc.for_field(field) from None
    try:
        water = SteamState.from_pT(water_p, water_t)
    except OutOfRangeError as exc:
        raise exc.for_field("desuperheater.water_pressure" if exc.field == "pressure"
                            else "desuperheater.water_temperature") from None
    result.work("Desuperheated steam enthalpy", "h3 = h(p2, T3)  [IF97]", "h(p2, T3)", target.enthalpy / 1e3,
                "kJ/kg", p2=(p2 / 1e5, "bar"), T3=(target_t - 273.15, "degC"))
    result.work("Spray water enthalpy", "h_w = h(p_w, T_w)  [IF97 region 1]", "h(p_w, T_w)", water.enthalpy / 1e3,
                "kJ/kg", p_w=(water_p / 1e5, "bar"), T_w=(water_t - 273.15, "degC"))
    result.assumptions.extend([
        "Desuperheater: adiabatic mixing; the spray evaporates completely before the outlet",
        "Spray water enthalpy at its stated temperature and pressure at the nozzle",
    ])

    margin_k, least_margin = (margin, "K"), (MIN_DESUPERHEAT_MARGIN, "K")
    result.check_limit(
        "Desuperheat margin above saturation", margin_k, [(">=", least_margin, "warn")],
        lambda status: Phrase.of(
            "target {margin:.1f} above saturation, below {least:g}: spray desuperheaters control poorly this close "
            "to saturation and water may not evaporate (common practice)" if status == "warn" else
            "target {margin:.1f} above saturation (at least {least:g}, common practice)",
            margin=margin_k, least=least_margin), source="common practice")
    water_c, target_c = (water_t - 273.15, "degC"), (target_t - 273.15, "degC")
    # Two temperatures, not a difference: "water at 105 °C, below the target 149 °C" (never "105 °C below").
    result.check_limit("Spray water colder than target", water_c, [("<", target_c, "fail")],
                       lambda status: Phrase.of(
                           "water at {water:.2f}, below the target {target:.2f}" if status == "pass" else
                           "water at {water:.2f}, not below the target {target:.2f}: it cannot cool the steam to "
                           "the target", water=water_c, target=target_c))
    pressure_margin = ((water_p - p2) / 1e5, "bar", "difference")
    least_pressure_margin = (MIN_SPRAY_PRESSURE_MARGIN / 1e5, "bar", "difference")
    result.check_limit(
        "Spray water pressure above steam", pressure_margin, [(">=", least_pressure_margin, "warn")],
        lambda status: Phrase.of(
            "water only {margin:.2f} above the steam: atomisation doubtful below about {least:g} (common practice; "
            "the nozzle maker's required differential governs)", margin=pressure_margin, least=least_pressure_margin)
        if status == "warn" else Phrase.of("water {margin:.2f} above the steam", margin=pressure_margin),
        source="common practice")

    result.add("desuperheat_target_temperature", "Desuperheat target temperature", target_t - 273.15, "degC")
    result.add("spray_water_enthalpy", "Spray water enthalpy", water.enthalpy / 1e3, "kJ/kg")
    if throttled.enthalpy <= target.enthalpy:
        _target_reachable_check(throttled, target, result)
        result.add("spray_water_flow", "Spray water flow", 0.0, "kg/h")
        return throttled, 0.0

    spray = steam_flow * (throttled.enthalpy - target.enthalpy) / (target.enthalpy - water.enthalpy)
    outlet_flow = steam_flow + spray
    result.work("Spray water flow", "m_w = m_s·(h2 − h3) / (h3 − h_w)", "m_s*(h2 - h3)/(h3 - h_w)", spray * 3600,
                "kg/h", m_s=(steam_flow * 3600, "kg/h"), h2=(throttled.enthalpy / 1e3, "kJ/kg"),
                h3=(target.enthalpy / 1e3, "kJ/kg"), h_w=(water.enthalpy / 1e3, "kJ/kg"))
    result.work("Outlet steam flow", "m_3 = m_s + m_w", "m_s + m_w", outlet_flow * 3600, "kg/h",
                m_s=(steam_flow * 3600, "kg/h"), m_w=(spray * 3600, "kg/h"))
    result.add("spray_water_flow", "Spray water flow", spray * 3600, "kg/h")
    result.add("desuperheater_heat_absorbed", "Heat taken up by the spray water",
               spray * (target.enthalpy - water.enthalpy) / 1e3, "kW")

    _target_reachable_check(throttled, target, result)
    check_energy_balance(result, "Desuperheater energy balance (independent)",
                         [Stream.of("throttled steam", steam_flow, throttled), Stream.of("spray water", spray, water)],
                         [Stream.of("desuperheated steam", outlet_flow, target)],
                         spray * (target.enthalpy - water.enthalpy))
    return target, spray


def _target_reachable_check(throttled, target, result):
    # Spraying water only lowers the enthalpy: the steam after the valve must hold more than the target.
    temperatures = dict(throttled=(throttled.temperature - 273.15, "degC"),
                        target=(target.temperature - 273.15, "degC"))
    h2, h3 = (throttled.enthalpy / 1e3, "kJ/kg"), (target.enthalpy / 1e3, "kJ/kg")
    result.check_limit(
        "Desuperheat target reachable", h2, [(">", h3, "fail")],
        lambda status: Phrase.of(
            "steam after the valve ({throttled:.2f}) is not hotter than the target ({target:.2f}): spraying water "
            "cannot reach it; no spray flow is computed" if status == "fail" else
            "steam after the valve {throttled:.2f} is above the target {target:.2f}", **temperatures))
