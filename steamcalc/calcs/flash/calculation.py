"""Flash-steam recovery: hot condensate flashing to a lower pressure, single stage or cascade.

Condensate at its pressure (saturated, or subcooled to a stated temperature) enters a
vessel at a lower pressure. With no heat loss and no work, the mass and energy balances
over the vessel give the part that flashes to steam:
:math:`x = (h_{in} - h_f)/h_{fg}` at the flash pressure, zero when the condensate is
already below the saturation temperature there.
"""

from __future__ import annotations

from dataclasses import dataclass

from ...errors import InputError, OutOfRangeError
from ...properties.steam import REFERENCE as IF97_REFERENCE
from ...properties.steam import SteamState, saturation_temperature
from ..balance import Stream, check_energy_balance
from ...units.amounts import Phrase
from ..base import Result, bar_a, check_fields, full_record_wanted, input_field
from ..economics import (
    annual_fuel_energy, annual_value, annual_water_cost, fuel_basis, fuel_basis_assumption, missing_site_data,
)
from .figures import figures
from .fraction import flash_fraction
from .overpressure import RECORD_PATTERNS as OVERPRESSURE_PATTERNS
from .overpressure import add_overpressure, check_overpressure_inputs
from ..overpressure import flash_point_change, liquid_to_exit_change
from .vessel import REFERENCES as VESSEL_REFERENCES
from .vessel import vessel_assumptions, vessels

KIND = "flash"
TITLE = "Flash-steam recovery"
WORKBOOK = "flash_recovery.ipynb"
#: Results the uncertainty section gives bands and sensitivities for.
UNCERTAINTY_RESULTS = ("flash_fraction", "flash_steam_flow", "recovered_heat_rate", "annual_cost_saving", "vessel_diameter")
#: Plain fractions shown in % (display only; records keep the fraction).
PERCENT_VALUES = ("flash_fraction",)
#: The governing results a checker signs against: the first page of the record and of `verify` (those the record holds).
#: Bases this release changed, so that verify lists what a record of an earlier release differs by, and why,
#: instead of calling it edited: patterns (fnmatch) over result keys, step labels, check names and statements.
BASIS_CHANGES = (
    ("0.3", "the flash vessel's overpressure cases (failed-open inlet, blocked vapour outlet) and its relief valve, "
     "or a statement that they were not assessed", OVERPRESSURE_PATTERNS),
    # Applies to a record of an earlier release only when its recomputation carries the liquid to the pipe's exit,
    # and only to what the line and the sizing at its back pressure write.
    liquid_to_exit_change("0.3.2", "Vessel relief", "vessel_relief"),
    flash_point_change("0.3.2", "Vessel relief", "vessel_relief"),
)
SUMMARY_RESULTS = ("flash_fraction", "flash_steam_flow", "vented_flash_steam_flow", "residual_condensate_flow", "recovered_heat_rate", "annual_cost_saving", "annual_total_saving", "vessel_diameter", "vessel_height")

CAUTIONS = (
    "Flash vessels and receivers are pressure vessels: their design, marking and inspection follow the "
    "local pressure-equipment code, with a relief device sized for the worst inflow.",
    "Steam and flashing condensate cause severe burns; vents and drains must discharge to a safe place.",
    "Flashing two-phase flow causes erosion and waterhammer: keep inlet lines short, falling to the "
    "vessel, and sized for the two-phase velocity.",
    "These results support design by a competent engineer; they do not replace the applicable codes, "
    "the equipment makers' data or a licensed engineer's approval.",
)


@dataclass(frozen=True)
class Inputs:
    """Inputs of a flash-steam calculation; values in SI (Pa absolute, K, kg/s, m/s).

    Give either ``flash_pressure`` (one vessel) or ``stages`` (a cascade, falling pressures).
    """

    condensate_pressure: float = input_field(
        "pressure", "Condensate pressure", "Pressure of the hot condensate before it flashes.",
        example="header:MP", required=True)
    condensate_flow: float = input_field(
        "mass_flow", "Condensate flow", "Flow of hot condensate to the flash vessel.", example="3.2 t/h",
        required=True, positive=True)
    condensate_temperature: float | None = input_field(
        "temperature", "Condensate temperature",
        "Leave empty for condensate saturated at its pressure; give it when subcooled.", example="170 °C")
    flash_pressure: float | None = input_field(
        "pressure", "Flash pressure", "Pressure of the flash vessel (a header or a pressure).", example="header:LP")
    stages: tuple | None = input_field(
        "pressure_list", "Cascade stage pressures", "Falling pressures of a flash cascade, in place of "
        "flash_pressure.", example='["5 bar(g)", "2.5 bar(g)"]')
    lp_demand: float | None = input_field(
        "mass_flow", "Low-pressure steam demand", "Steam the flash header can use; flash above it is vented.",
        example="0.5 t/h")
    vented: bool | None = input_field(
        "flag", "Vented receiver", "true when the flash steam goes to atmosphere (the loss being incurred).",
        example="false")
    k_factor: float | None = input_field(
        "velocity", "Souders–Brown K", "Allowable vapour load factor of the vessel.", example="0.06 m/s",
        section="vessel", positive=True)
    vapour_velocity: float | None = input_field(
        "velocity", "Allowable vapour velocity", "Up-flow velocity limit, in place of K.", example="2.5 m/s",
        section="vessel", positive=True)
    residence_time: float | None = input_field(
        "time", "Liquid residence time", "Hold-up time of the residual condensate in the vessel; "
        "1 min when not given.", example="1 min", section="vessel", positive=True)
    inlet_nozzle: str | None = input_field(
        "nominal_size", "Inlet line size", "Nominal size of the condensate inlet line.", example="DN50",
        section="vessel")
    steam_nozzle: str | None = input_field(
        "nominal_size", "Steam outlet size", "Nominal size of the flash-steam outlet.", example="DN150",
        section="vessel")
    condensate_nozzle: str | None = input_field(
        "nominal_size", "Condensate outlet size", "Nominal size of the residual-condensate outlet.",
        example="DN40", section="vessel")
    vessel_design_pressure: float | None = input_field(
        "pressure", "Vessel design pressure", "Design pressure on the flash vessel's nameplate; with it the record "
        "assesses the vessel's overpressure cases.", example="7 bar(g)", section="overpressure", key="design_pressure")
    relief_set_pressure: float | None = input_field(
        "pressure", "Relief valve set pressure", "Set pressure of the vessel's relief valve; the design pressure when "
        "not given.", example="7 bar(g)", section="overpressure", key="set_pressure")
    inlet_capacity: float | None = input_field(
        "mass_flow", "Inlet trap or valve capacity (failed open)", "Rated capacity of the trap or level valve feeding "
        "the vessel, fully open at the highest upstream pressure (maker's data).", example="9 t/h",
        section="overpressure", positive=True)
    max_upstream_pressure: float | None = input_field(
        "pressure", "Highest upstream pressure", "Highest pressure the condensate source can reach; the condensate "
        "pressure when not given.", example="12 bar(g)", section="overpressure")
    level_held: bool | None = input_field(
        "flag", "Level held with the inlet failed open", "true when the condensate outlet passes the failed-open "
        "inflow's residual condensate at the relief pressure; else the vessel may fill and relieves two-phase.",
        example="false", section="overpressure")
    relief_valve_type: str | None = input_field(
        "text", "Relief valve type", "conventional, balanced-bellows or pilot; conventional when not given.",
        example="conventional", section="overpressure", key="valve_type")
    relief_inlet_size: str | None = input_field(
        "nominal_size", "Relief inlet pipe size", "Nominal size of the pipe from the vessel to the relief valve "
        "(schedule 40); with its length, the inlet pressure loss is checked against 3 % of the set pressure.",
        example="DN80", section="overpressure", key="inlet_size")
    relief_inlet_length: float | None = input_field(
        "length", "Relief inlet pipe length", "Straight length of the pipe from the vessel to the relief valve.",
        example="0.5 m", section="overpressure", positive=True, key="inlet_length")
    relief_inlet_fittings_k: float | None = input_field(
        "number", "Relief inlet fittings K", "Sum of the loss coefficients of the relief inlet pipe (entry, "
        "fittings), 0 or more; none counted when not given.", example="0.5", section="overpressure",
        key="inlet_fittings_k")
    discharge_size: str | None = input_field(
        "nominal_size", "Relief discharge pipe size", "Nominal size of the relief valve's discharge pipe "
        "(schedule 40).", example="DN100", section="overpressure")
    discharge_length: float | None = input_field(
        "length", "Relief discharge pipe length", "Straight length of the discharge pipe to its open end.",
        example="6 m", section="overpressure")
    discharge_fittings_k: float | None = input_field(
        "number", "Relief discharge fittings K", "Sum of the loss coefficients of the discharge pipe's fittings and "
        "exit.", example="1.5", section="overpressure")

    def __post_init__(self):
        if self.residence_time is not None and not self.residence_time > 0.0:
            raise InputError(f"a liquid residence time of {self.residence_time / 60:g} min cannot hold any liquid",
                             field="vessel.residence_time", value=f"{self.residence_time:g} s",
                             fix="give a time above zero, e.g. residence_time = \"1 min\" (or leave it out for 1 min)")
        check_fields(self)
        if (self.flash_pressure is None) == (self.stages is None):
            raise InputError("give flash_pressure or stages (exactly one)",
                             field="stages" if self.stages is not None else "flash_pressure",
                             fix="one vessel: flash_pressure; a cascade: stages = [...]")
        pressures = self.stage_pressures
        previous = self.condensate_pressure
        for i, p in enumerate(pressures):
            name = "flash_pressure" if self.stages is None else f"stages[{i}]"
            if p >= previous:
                raise InputError(
                    f"{p / 1e5:.4g} bar(a) is not below {previous / 1e5:.4g} bar(a): flash pressures must fall "
                    "below the condensate pressure, stage by stage", field=name,
                    fix="list the stage pressures from high to low, all below the condensate pressure")
            previous = p
        if self.stages is not None and not 1 <= len(self.stages) <= 3:
            raise InputError("a cascade has one to three stages", field="stages")
        if self.lp_demand is not None and self.lp_demand < 0.0:
            raise InputError("steam demand cannot be negative", field="lp_demand")
        if self.k_factor is not None and self.vapour_velocity is not None:
            raise InputError("give k_factor or vapour_velocity, not both", field="vessel.vapour_velocity")
        check_overpressure_inputs(self)

    @property
    def stage_pressures(self):
        """The flash pressures in order, Pa: one for a single vessel."""
        return tuple(self.stages) if self.stages is not None else (self.flash_pressure,)




def _inlet_state(inputs):
    p = inputs.condensate_pressure
    t_sat = saturation_temperature(p)
    if inputs.condensate_temperature is None:
        return SteamState.from_p_dryness(p, 0.0), t_sat
    t = inputs.condensate_temperature
    if t > t_sat + 1e-6:
        raise InputError(
            f"condensate at {t - 273.15:.2f} °C is above saturation ({t_sat - 273.15:.2f} °C) at {bar_a(p)}: "
            "that is steam, not condensate", field="condensate_temperature",
            fix="check the temperature and the pressure basis, or leave the temperature empty for saturated")
    if abs(t - t_sat) <= 1e-6:
        return SteamState.from_p_dryness(p, 0.0), t_sat
    try:
        return SteamState.from_pT(p, t), t_sat
    except OutOfRangeError as exc:
        raise exc.for_field("condensate_temperature") from None


def _flash_stage(index, pressure, enthalpy_in, flow_in, result, label):
    liquid = SteamState.from_p_dryness(pressure, 0.0)
    vapour = SteamState.from_p_dryness(pressure, 1.0)
    h_fg = vapour.enthalpy - liquid.enthalpy
    if enthalpy_in <= liquid.enthalpy:
        fraction = 0.0
        # The flash fraction's own rule, max(0, ...), written out: the condensate is below h_f here.
        result.work(f"{label}: flash fraction", "x = 0 when h_in ≤ h_f(p_flash): no flash", "max(0, (h_in - h_f)/h_fg)",
                    0.0, h_in=(enthalpy_in / 1e3, "kJ/kg"), h_f=(liquid.enthalpy / 1e3, "kJ/kg"),
                    h_fg=(h_fg / 1e3, "kJ/kg"))
        residual = SteamState.from_ph(pressure, enthalpy_in)
    else:
        fraction = flash_fraction(enthalpy_in, liquid.enthalpy, vapour.enthalpy)
        result.work(f"{label}: flash fraction", "x = (h_in − h_f(p_flash)) / h_fg(p_flash)", "(h_in - h_f)/h_fg",
                    fraction, h_in=(enthalpy_in / 1e3, "kJ/kg"), h_f=(liquid.enthalpy / 1e3, "kJ/kg"),
                    h_fg=(h_fg / 1e3, "kJ/kg"))
        residual = liquid
    steam_flow = flow_in * fraction
    residual_flow = flow_in - steam_flow
    result.work(f"{label}: flash steam flow", "m_flash = x · m_in", "x*m_in", steam_flow * 3600, "kg/h",
                x=(fraction, ""), m_in=(flow_in * 3600, "kg/h"))
    return {"index": index, "pressure": pressure, "fraction": fraction, "steam_flow": steam_flow,
            "residual_flow": residual_flow, "residual": residual, "vapour": vapour, "liquid": liquid,
            "enthalpy_in": enthalpy_in, "flow_in": flow_in}


def calculate(inputs, site):
    """Flash steam, residual condensate, recoverable heat, vessel size and yearly saving.

    Parameters
    ----------
    inputs : Inputs
        Condensate pressure (Pa), flow (kg/s), optional temperature (K), and the flash
        pressure (Pa) or cascade stage pressures (Pa); optional demand (kg/s) and vessel data.
    site : steamcalc.cases.site.Site
        Operating hours, boiler efficiency, fuel price and make-up water temperature give
        the yearly figures, on the site's ``fuel_basis``; an emission factor adds the CO2,
        a ``water_cost`` the make-up water credit.

    Returns
    -------
    Result
        ``flash_fraction``, ``flash_steam_flow`` (kg/h), ``residual_condensate_flow`` (kg/h),
        ``recovered_heat_rate`` (kW), ``vessel_diameter`` and ``vessel_height`` (m) with the
        criterion that governs, ``inlet_line_velocity`` (m/s, homogeneous) and ``inlet_momentum``
        (Pa) when the inlet size is given, ``annual_fuel_energy_saved`` (MWh),
        ``annual_cost_saving``, ``annual_water_cost_saving`` and ``annual_total_saving`` with a
        water cost, and per-stage values for a cascade.

    Notes
    -----
    Flash, mass and energy balances of an adiabatic vessel:

    .. math:: x = \\frac{h_{in} - h_f(p)}{h_{fg}(p)}, \\quad
              \\dot m_{flash} = x \\dot m, \\quad \\dot m_{res} = (1 - x) \\dot m

    Recovered heat, flash steam above make-up water:
    :math:`\\dot Q = \\dot m_{flash} (h_g(p) - h_{mw})`; fuel a year
    :math:`E = \\dot Q t / \\eta_{boiler}`.

    Vessel, the largest of three diameters: Souders–Brown vapour area
    :math:`D_v = \\sqrt{4 \\dot V_g / (\\pi v)}`, :math:`v = K \\sqrt{(\\rho_f - \\rho_g)/\\rho_g}`;
    liquid hold-up :math:`D_L = (4 \\dot V_f t_{res} / \\pi)^{1/3}` (liquid no deeper than D);
    nozzles :math:`D_N = 2 d_{max}` (see :mod:`steamcalc.calcs.flash.vessel`).

    References
    ----------
    IAPWS R7-97(2012), IAPWS-IF97, for every property. Souders, M. and Brown, G. G. (1934),
    "Design of Fractionating Columns I. Entrainment and Capacity", Ind. Eng. Chem. 26(1),
    98–103 (through ``fluids.separator.v_Souders_Brown``). Svrcek, W. Y. and Monnery, W. D.
    (1993), Chem. Eng. Prog. 89(10), 53–60 (vessel height). ASME BPVC VIII-1 UG-36(b)(1)
    (nozzle openings). API RP 14E (2000), erosional velocity, for information only.

    Examples
    --------
    >>> from steamcalc.cases.site import Site
    >>> r = calculate(Inputs(condensate_pressure=11.01325e5, condensate_flow=1.0,
    ...                      flash_pressure=1.01325e5), Site())
    >>> round(r.value("flash_fraction"), 3)
    0.161
    >>> r.value("vessel_governing_criterion")
    'liquid hold-up'
    """
    from fluids.separator import v_Souders_Brown

    result = Result()
    result.references.extend([
        IF97_REFERENCE,
        "Mass and energy balances of an adiabatic flash vessel (any engineering-thermodynamics text)",
        *VESSEL_REFERENCES,
    ])
    result.assumptions.extend([
        "Adiabatic flash vessel: no heat loss, no work",
        "Steady state; kinetic and potential energy changes neglected",
        "Flash steam leaves saturated and dry; residual condensate leaves saturated at the vessel pressure",
        f"Gauge pressures converted with the site atmosphere of {site.atmospheric_pressure / 1e5:.5g} bar(a)",
    ])
    result.cautions.extend(CAUTIONS)

    inlet, t_sat_in = _inlet_state(inputs)
    flow = inputs.condensate_flow
    result.add("condensate_saturation_temperature", "Condensate saturation temperature", t_sat_in - 273.15, "degC")
    result.add("condensate_temperature", "Condensate temperature", inlet.temperature - 273.15, "degC")
    result.add("condensate_subcooling", "Condensate subcooling", inlet.subcooling, "K")
    result.add("condensate_enthalpy", "Condensate enthalpy", inlet.enthalpy / 1e3, "kJ/kg")
    result.add("condensate_flow", "Condensate flow", flow * 3600, "kg/h")
    p_c = (inputs.condensate_pressure / 1e5, "bar")
    if inputs.condensate_temperature is None:
        result.work("Condensate enthalpy", "h_in = h_f(p_c)  [saturated]", "h_f(p_c)", inlet.enthalpy / 1e3, "kJ/kg",
                    p_c=p_c)
    else:
        result.work("Condensate enthalpy", "h_in = h(p_c, T_c)", "h(p_c, T_c)", inlet.enthalpy / 1e3, "kJ/kg",
                    p_c=p_c, T_c=(inlet.temperature - 273.15, "degC"))

    stages = []
    enthalpy, stage_flow = inlet.enthalpy, flow
    cascade = inputs.stages is not None
    for i, p in enumerate(inputs.stage_pressures, start=1):
        label = f"Stage {i}" if cascade else "Flash"
        try:
            stage = _flash_stage(i, p, enthalpy, stage_flow, result, label)
        except OutOfRangeError as exc:
            raise exc.for_field(f"stages[{i - 1}]" if cascade else "flash_pressure") from None
        stages.append(stage)
        enthalpy, stage_flow = stage["residual"].enthalpy, stage["residual_flow"]
        if cascade:
            result.add(f"stage_{i}_pressure", f"Stage {i} pressure", p / 1e5, "bar")
            result.add(f"stage_{i}_flash_fraction", f"Stage {i} flash fraction", stage["fraction"])
            result.add(f"stage_{i}_flash_steam_flow", f"Stage {i} flash steam flow", stage["steam_flow"] * 3600, "kg/h")
            result.add(f"stage_{i}_residual_condensate_flow", f"Stage {i} residual condensate flow",
                       stage["residual_flow"] * 3600, "kg/h")

    total_flash = sum(s["steam_flow"] for s in stages)
    last = stages[-1]
    # Summed in the recorded unit so that the recorded mass balance closes exactly.
    flash_kg_h = sum(s["steam_flow"] * 3600 for s in stages)
    residual_kg_h = flow * 3600 - flash_kg_h
    result.add("flash_fraction", "Flash fraction (of the condensate)", total_flash / flow)
    result.add("flash_steam_flow", "Flash steam flow", flash_kg_h, "kg/h")
    result.add("residual_condensate_flow", "Residual condensate flow", residual_kg_h, "kg/h")
    result.add("residual_condensate_temperature", "Residual condensate temperature",
               last["residual"].temperature - 273.15, "degC")

    def flashes(status):
        if status == "pass":
            return Phrase.of("{share:.2f} of the condensate flashes ({flash:.1f})",
                             share=(100 * total_flash / flow, "percent"), flash=(flash_kg_h, "kg/h"))
        return Phrase.of("the condensate at {condensate:.2f} is below the saturation temperature at the flash "
                         "pressure ({saturation:.2f}): it does not flash, and there is no flash steam to recover",
                         condensate=(inlet.temperature - 273.15, "degC"),
                         saturation=(last["liquid"].temperature - 273.15, "degC"))
    result.check_limit("Condensate flashes", (flash_kg_h, "kg/h"), [(">", (0.0, "kg/h"), "warn")], flashes)

    # The balance re-summed from the recorded states with the other IF97 implementation, judged
    # against the latent heat the flash steam carries away (the condensate's own enthalpy when none flashes).
    latent = sum(s["steam_flow"] * (s["vapour"].enthalpy - s["liquid"].enthalpy) for s in stages)
    check_energy_balance(result, "Flash energy balance (independent)", [Stream.of("condensate", flow, inlet)],
                         [Stream.of(f"stage {s['index']} flash steam", s["steam_flow"], s["vapour"]) for s in stages]
                         + [Stream.of("residual condensate", last["residual_flow"], last["residual"])],
                         latent if latent > 0 else flow * inlet.enthalpy)

    # The demand check needs no site data, so it stands apart from the heat and money.
    if inputs.lp_demand is not None:
        flash_steam, demand = (total_flash * 3600, "kg/h"), (inputs.lp_demand * 3600, "kg/h")

        def within_demand(status):
            if status == "pass":
                return Phrase.of("flash steam {flash:.1f} within the demand {demand:.1f}", flash=flash_steam,
                                 demand=demand)
            return Phrase.of("flash steam {flash:.1f} exceeds the demand {demand:.1f}: {vented:.1f} would be vented",
                             flash=flash_steam, demand=demand,
                             vented=((total_flash - inputs.lp_demand) * 3600, "kg/h"))
        result.check_limit("Flash steam within the low-pressure demand", flash_steam, [("<=", demand, "warn")],
                           within_demand)
    _recovered_heat(inputs, site, stages, total_flash, result)
    result.assumptions.extend(vessel_assumptions(inputs))
    vessels(inputs, stages, result, v_Souders_Brown)
    if full_record_wanted():   # feeds no banded result
        add_overpressure(inputs, inlet, site, result)
    if full_record_wanted():
        result.figures.extend(figures(inputs, result))
    return result


def _recovered_heat(inputs, site, stages, total_flash, result):
    if site.makeup_water_temperature is None:
        result.check("Site data for the heat recovered", "warn",
                     "the site file has no makeup_water_temperature: recovered heat and savings not computed")
        return
    makeup = SteamState.from_pT(max(site.atmospheric_pressure, 1.01325e5), site.makeup_water_temperature)
    heat = sum(s["steam_flow"] * (s["vapour"].enthalpy - makeup.enthalpy) for s in stages)
    # One term a stage, each flash steam above the one make-up water.
    terms, operands = [], {"h_makeup": (makeup.enthalpy / 1e3, "kJ/kg")}
    for s in stages:
        tag = str(s["index"]) if len(stages) > 1 else ""
        terms.append(f"m_flash{tag}*(h_g{tag} - h_makeup)")
        operands[f"m_flash{tag}"] = (s["steam_flow"] * 3600, "kg/h")
        operands[f"h_g{tag}"] = (s["vapour"].enthalpy / 1e3, "kJ/kg")
    result.work("Heat in the flash steam", "Q = Σ m_flash · (h_g(p_flash) − h_makeup)", " + ".join(terms), heat / 1e3,
                "kW", **operands)
    used_flash, excess = _flash_used(inputs, total_flash)
    if excess > 0.0:
        # Flash steam the low-pressure users cannot take is vented: it displaces no boiler steam, so it earns
        # no credit; its heat is reported as the loss it is.
        excess_heat = heat * excess / total_flash
        result.work("Heat credited: flash steam the low-pressure users take", "Q_used = Q · m_used / m_flash",
                    "Q*m_used/m_flash", (heat - excess_heat) / 1e3, "kW", Q=(heat / 1e3, "kW"),
                    m_used=(used_flash * 3600, "kg/h"), m_flash=(total_flash * 3600, "kg/h"))
        result.add("vented_flash_steam_flow", "Flash steam above the low-pressure demand (vented)", excess * 3600,
                   "kg/h")
        result.add("vented_flash_heat_rate", "Heat in the vented flash steam (the loss)", excess_heat / 1e3, "kW")
        result.assumptions.append("Flash steam above the low-pressure demand is taken as vented: heat, fuel, money, "
                                  "CO₂ and water are credited only on the flash steam the users take (each stage "
                                  "in proportion to its flash); a receiver vented by design is the input 'vented'")
        heat -= excess_heat
    label = "Heat in the flash steam, vented (the loss)" if inputs.vented else "Recoverable heat in the flash steam"
    result.add("recovered_heat_rate", label, heat / 1e3, "kW")
    result.assumptions.append("Recovered heat counted from make-up water temperature: each kg of flash steam "
                              "used displaces a kg of boiler steam raised from make-up water")
    missing = missing_site_data(site, ("operating_hours", "boiler_efficiency", "fuel_price"))
    if missing:
        result.check("Site data for yearly figures", "warn",
                     f"the site file lacks {', '.join(missing)}: yearly energy and cost not computed")
        _water_credit(inputs, site, used_flash, makeup, result)
        return
    basis = fuel_basis(site)
    result.assumptions.append(fuel_basis_assumption(site))
    fuel = annual_fuel_energy(heat, site.operating_hours, site.boiler_efficiency)
    money = annual_value(fuel, site.fuel_price)
    saving = "lost" if inputs.vented else "saved"
    result.work(f"Fuel energy a year {saving} ({basis} calorific value)", "E = Q · t / η_boiler", "Q*t/eta_boiler",
                fuel, "MWh", Q=(heat / 1e3, "kW"), t=(site.operating_hours, "h"), eta_boiler=(site.boiler_efficiency, ""))
    # A currency is no unit the record's unit registry converts, so a step whose value is money is written as a
    # lookup of its operands (at_price, as the let-down's money steps), not as arithmetic to re-evaluate.
    currency = site.fuel_price.currency
    result.work(f"Fuel cost a year {saving}", "C = E · fuel price", "at_price(E, fuel_price)", money, currency,
                E=(fuel, "MWh"), fuel_price=(site.fuel_price.per_mwh, f"{currency}/MWh"))
    when = "lost while vented" if inputs.vented else "saved"
    result.add("annual_fuel_energy_saved", f"Fuel energy a year ({when}; {basis} calorific value)", fuel, "MWh")
    result.add("annual_cost_saving", f"Fuel cost a year ({when})", money, site.fuel_price.currency)
    result.add("fuel_basis", "Calorific-value basis of the fuel figures", basis)
    if site.fuel_emission_factor is not None:
        result.add("annual_co2_avoided", "CO₂ a year (avoided by recovery)", fuel * site.fuel_emission_factor / 1e3,
                   "t")
    water = _water_credit(inputs, site, used_flash, makeup, result)
    if excess > 0.0:
        lost_fuel = annual_fuel_energy(excess_heat, site.operating_hours, site.boiler_efficiency)
        result.add("vented_flash_annual_cost", "Fuel cost a year of the vented flash steam (not credited)",
                   annual_value(lost_fuel, site.fuel_price), currency)
    if water is not None:
        if site.water_cost.currency == site.fuel_price.currency:
            result.add("annual_total_saving", f"Fuel and water cost a year ({when})", money + water,
                       site.fuel_price.currency)
        else:
            result.check("One currency for fuel and water", "warn",
                         f"fuel is priced in {site.fuel_price.currency} and water in {site.water_cost.currency}: "
                         "no total given")
    if inputs.vented:
        result.check("Vented receiver", "warn", Phrase.of(
            "{flash:.1f} of flash steam vents to atmosphere: {heat:.1f}, {fuel:.0f} of fuel and {money:,.0f} a year lost",
            flash=(total_flash * 3600, "kg/h"), heat=(heat / 1e3, "kW"), fuel=(fuel, "MWh"),
            money=(money, site.fuel_price.currency)))


def _flash_used(inputs, total_flash):
    """(flash steam that displaces boiler steam, flash steam vented above the demand), kg/s.

    A receiver vented by design uses none and the record counts all of it as the loss; without a stated
    demand all the flash steam is taken as used.
    """
    if inputs.vented or inputs.lp_demand is None or total_flash <= inputs.lp_demand:
        return total_flash, 0.0
    return inputs.lp_demand, total_flash - inputs.lp_demand


def _water_credit(inputs, site, total_flash, makeup, result):
    # Vented, the flash steam's water is lost and made up; used, it stays in the system and
    # displaces boiler steam, so that much make-up water (and its treatment) is not bought.
    if site.water_cost is None or site.operating_hours is None:
        return None
    volume, cost = annual_water_cost(total_flash, makeup.density, site.operating_hours, site.water_cost)
    when = "lost while vented" if inputs.vented else "saved"
    result.work(f"Make-up water a year {'lost' if inputs.vented else 'saved'}", "V = m_flash · t / ρ_makeup",
                "m_flash*t/rho_makeup", volume, "m**3", m_flash=(total_flash * 3600, "kg/h"),
                t=(site.operating_hours, "h"), rho_makeup=(makeup.density, "kg/m**3"))
    # Money: a lookup of its operands, as the fuel cost.
    currency = site.water_cost.currency
    result.work(f"Water cost a year {'lost' if inputs.vented else 'saved'}", "C_w = V · water cost",
                "at_price(V, water_cost)", cost, currency, V=(volume, "m**3"),
                water_cost=(site.water_cost.per_m3, f"{currency}/m**3"))
    result.add("annual_water_saved", f"Make-up water a year ({when})", volume, "m**3")
    result.add("annual_water_cost_saving", f"Make-up water and treatment cost a year ({when})", cost,
               site.water_cost.currency)
    result.assumptions.append(
        f"Water credit at the site's make-up water cost of {site.water_cost} (make-up water and treatment) on the flash "
        "steam's mass: vented it is lost and made up, used it displaces boiler steam; the residual condensate "
        "is taken as returned either way and earns no credit")
    return cost
