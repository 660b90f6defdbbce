"""Overpressure of the steam heater: tube rupture into the process side, and thermal relief of the blocked-in
process liquid.

**Tube rupture.** The steam side (the high-pressure side) breaks into the process side. Whether that is a
relief case follows from the two sides' design pressures, on the basis the engineer states:

* ``"10/13"`` (older codes, hydrostatic test at 1.3 times the design pressure): no relief case when the
  process side's design pressure is at least 10/13 of the steam side's (gauge);
* ``"test pressure"`` (the default): no relief case when the process side's test pressure (given, else
  1.3 times its design pressure, ASME BPVC VIII-1 UG-99(b) with a stress ratio of 1) is at least the steam
  side's design pressure (gauge).

When it is a relief case, the steam flows through a clean break of one tube: two open ends, each the
tube's bore, choked steam from the highest steam pressure (the supply's, with the control valve failed
open) with no friction credited (conservative), into the process side at its relieving pressure. The
process side is full of liquid: its relief device first passes the liquid the steam displaces (the steam's
volume flow, no condensation credited) and then the steam; both are sized, the larger governs.

**Thermal relief.** Process liquid blocked in with the steam on heats towards the steam's saturation temperature
and expands at :math:`q = \\alpha_v \\phi / (\\rho c_p)`, α_v the largest over that range (water: IF97); the flow
is checked against the liquid capacity of a valve of the usual minimum size (NPS ¾ × NPS 1 with a D orifice,
common practice). Water that boils at its relieving pressure below the steam's saturation temperature generates
vapour at φ/h_fg, sized as steam.
"""

from __future__ import annotations

import math

from ...equipment.relief import API526_AREAS_IN2, MM2_PER_IN2, direct_integration_flux
from ...errors import InputError, OutOfRangeError
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..overpressure import (
    CAUTIONS, DEFAULT_OVERPRESSURE, WATER_CRITICAL_PRESSURE, discharge_section, relieving_pressure, select_orifice,
    steam_relief_area,
)
from ..relief_inlet import check_inlet_pipe_inputs, inlet_pipe_not_assessed, relief_inlet_loss
from ..relief_back_pressure import Sizing, balanced_kb, critical_flow_check, size_at_built_up_back_pressure
from .discharge import (
    THERMAL_KEYS, THERMAL_ORIFICE, check_discharge_inputs, discharge_pipe_not_assessed, liquid_relief_area,
    outlet_size_check, thermal_relief_capacity, thermal_relief_discharge, tube_rupture_discharge,
)
from .reverse_rupture import reverse_rupture

NAME = "Tube rupture"
#: What this module adds to a record, for the kind's BASIS_CHANGES (a record of an earlier release lacks it).
RECORD_PATTERNS = ("Heater overpressure protection", "Tube rupture*", "tube_rupture_*", "Thermal relief*",
                   "thermal_relief_*")
PREFIX = "tube_rupture"
RUPTURE_BASES = ("test pressure", "10/13")
#: Hydrostatic test pressure over design pressure, ASME BPVC VIII-1 UG-99(b) (stress ratio taken as 1).
TEST_PRESSURE_RATIO = 1.3
#: The usual smallest thermal relief valve (common practice); its capacity is checked against the expansion flow.
THERMAL_MINIMUM_SIZE = "NPS 3/4 × NPS 1 (DN20 × DN25)"


def check_overpressure_inputs(inputs):
    """Refusals of the exchanger's overpressure inputs that need no calculation (from ``Inputs.__post_init__``)."""
    steam_design, process_design = inputs.steam_side_design_pressure, inputs.process_side_design_pressure
    highest_steam = max(p for p in (inputs.steam_pressure, inputs.control_valve_supply_pressure) if p is not None)
    if steam_design is not None and steam_design < highest_steam:
        raise InputError(
            f"the steam side's design pressure {steam_design / 1e5:.4g} bar(a) is below the steam pressure it sees, "
            f"{highest_steam / 1e5:.4g} bar(a)", field="overpressure.steam_side_design_pressure", value=steam_design,
            fix="give the design pressure on the heater's nameplate, at least the supply pressure (the control valve "
                "can fail open), or check the pressure basis")
    if process_design is not None and inputs.process_pressure is not None and process_design < inputs.process_pressure:
        raise InputError(
            f"the process side's design pressure {process_design / 1e5:.4g} bar(a) is below its operating pressure "
            f"{inputs.process_pressure / 1e5:.4g} bar(a)", field="overpressure.process_side_design_pressure",
            value=process_design, fix="give the process side's design pressure from the nameplate, above its operating "
                                      "pressure")
    if inputs.rupture_basis is not None and inputs.rupture_basis not in RUPTURE_BASES:
        raise InputError(f"unknown tube-rupture basis '{inputs.rupture_basis}'", field="overpressure.rupture_basis",
                         value=inputs.rupture_basis, fix=f"use one of: {', '.join(RUPTURE_BASES)}")
    tube, shell = inputs.tube_inside_diameter, inputs.shell_inside_diameter
    if tube is not None and shell is not None and tube >= shell:
        raise InputError(
            f"a tube of {tube * 1e3:g} mm bore does not fit in a shell of {shell * 1e3:g} mm bore",
            field="overpressure.tube_inside_diameter", value=f"{tube * 1e3:g} mm",
            fix="give the tube's inside diameter (e.g. 15.7 mm for a 19.05 mm × 1.65 mm tube) and the shell's")
    if inputs.process_side_test_pressure is not None and process_design is not None \
            and inputs.process_side_test_pressure < process_design:
        raise InputError("a test pressure is not below the design pressure", field="overpressure.test_pressure",
                         value=inputs.process_side_test_pressure,
                         fix="give the process side's hydrostatic test pressure from its nameplate or test record")
    check_discharge_inputs(inputs)
    check_inlet_pipe_inputs(inputs.relief_inlet_size, inputs.relief_inlet_length, inputs.relief_inlet_fittings_k)
    if inputs.process_expansion_coefficient is not None and not inputs.process_expansion_coefficient > 0.0:
        raise InputError("a liquid's cubic expansion coefficient is above zero",
                         field="overpressure.expansion_coefficient", value=inputs.process_expansion_coefficient,
                         fix="give it per kelvin, e.g. 0.0007 for a light oil")
    if inputs.process_expansion_coefficient is not None and inputs.process_cp is None:
        raise InputError("the process liquid is water, whose expansion coefficient comes from IF97 over the "
                         "temperatures the blocked-in water reaches: a figure given here would not be used",
                         field="overpressure.expansion_coefficient",
                         value=f"{inputs.process_expansion_coefficient * 1e6:g} ppm/K",
                         fix="remove expansion_coefficient, or give process_cp and process_density for a liquid "
                             "other than water")
    if process_design is not None and inputs.process_cp is not None and (
            inputs.process_expansion_coefficient is None or
            (inputs.process_density is None)):
        missing = "expansion_coefficient" if inputs.process_expansion_coefficient is None else "process_density"
        raise InputError(
            "thermal relief of a process liquid other than water needs its cubic expansion coefficient and density",
            field=f"overpressure.{missing}" if missing == "expansion_coefficient" else "process_density",
            fix="give [inputs.overpressure] expansion_coefficient (per K, from the liquid's data sheet) and "
                "process_density, or remove process_side_design_pressure to leave the overpressure unassessed")


def check_design_pressures(inputs, atm):
    """Refusals of the two sides' design pressures that need the site's atmosphere ``atm`` (Pa), from ``calculate``
    before any working.

    A side designed for the atmosphere or for vacuum alone (0 bar(g) or less) is refused rather than assessed: the
    relief valve of a side is set at its design pressure, and a valve set at or below the atmosphere cannot open to
    it, so no relief case can be sized there (the sizing equations divide by the gauge set pressure). A side open to
    the atmosphere is protected by its vent, and a shell rated for vacuum states an internal design pressure as well
    (internal and external pressure are separate design conditions: ASME BPVC VIII-1 UG-21 and UG-28, from
    memory). Water's relief is worked on IF97 below its critical pressure: a process side whose relieving pressure
    (set + 10 %) is at or above it is refused too.
    """
    for side, pressure in (("steam", inputs.steam_side_design_pressure),
                           ("process", inputs.process_side_design_pressure)):
        if pressure is not None and pressure <= atm:
            raise InputError(
                f"the {side} side's design pressure {pressure / 1e5:.4g} bar(a) ({(pressure - atm) / 1e5:.4g} bar(g)) is "
                "not above the atmosphere: a relief valve set there could not open, and no relief case can be sized "
                "at it",
                field=f"overpressure.{side}_side_design_pressure", value=pressure,
                fix=f"give the {side} side's internal design pressure from the nameplate (above 0 bar(g); a shell "
                    "also rated for vacuum states both, e.g. 3.5 bar(g) and full vacuum), or remove "
                    "steam_side_design_pressure and process_side_design_pressure to leave the overpressure unassessed "
                    "(a side open to the atmosphere is protected by its vent)")
    pressure = inputs.process_side_design_pressure
    if pressure is not None and inputs.process_cp is None:
        highest = (WATER_CRITICAL_PRESSURE + DEFAULT_OVERPRESSURE * atm) / (1.0 + DEFAULT_OVERPRESSURE)
        if pressure >= highest:
            raise InputError(
                f"the process side's design pressure {pressure / 1e5:.4g} bar(a) ({(pressure - atm) / 1e5:.4g} bar(g)) "
                "puts its relieving pressure "
                f"(set + 10 %) at or above water's critical pressure {WATER_CRITICAL_PRESSURE / 1e5:.5g} bar(a), "
                "where the thermal relief's boiling and liquid states (IF97) end",
                field="overpressure.process_side_design_pressure", value=pressure,
                limits=(0.0, (highest - atm) / 1e5, "bar(g)"),
                fix="check the design pressure (and its gauge or absolute basis); a process side designed this high "
                    "is for the relief system's designer: remove steam_side_design_pressure and "
                    "process_side_design_pressure to leave the overpressure unassessed")


def add_overpressure(inputs, steam_side_heat, process_pressure, site, result):
    """Tube rupture and thermal relief of the heater, as results, steps and checks."""
    if inputs.steam_side_design_pressure is None or inputs.process_side_design_pressure is None:
        # A statement to act on, listed among the warnings; it cannot fail, so a record of an earlier release
        # that lacked it keeps its verdict.
        result.notice("Heater overpressure protection", act=True,
                      detail="not assessed: give overpressure.steam_side_design_pressure and "
                             "overpressure.process_side_design_pressure for the tube-rupture and thermal-relief cases")
        return
    result.cautions.extend(c for c in CAUTIONS if c not in result.cautions)
    atm = site.atmospheric_pressure
    _tube_rupture(inputs, atm, result)
    _thermal_relief(inputs, steam_side_heat, process_pressure, atm, result)


def _tube_rupture(inputs, atm, result):
    high, low = inputs.steam_side_design_pressure, inputs.process_side_design_pressure
    # Process liquid into the steam space: the steam side's relief case. Its valve, when it needs one, is the
    # heater's tube-rupture valve, and the pipes given are its own.
    reverse_valve = low > high and reverse_rupture(inputs, atm, result)
    basis = inputs.rupture_basis or "test pressure"
    # Compared as absolute pressures: the codes' fractions apply to gauge pressures, so each is taken of the
    # pressure above the atmosphere and the atmosphere added back.
    if basis == "10/13":
        threshold = atm + 10.0 / 13.0 * (high - atm)
        result.work(f"{NAME}: the 10/13 threshold", "p_10/13 = p_atm + (10/13)·(p_HP,design − p_atm)",
                    "p_atm + 10/13*(p_HP - p_atm)", threshold / 1e5, "bar", p_HP=(high / 1e5, "bar"),
                    p_atm=(atm / 1e5, "bar"))
        quantity, limit = (low / 1e5, "bar"), (threshold / 1e5, "bar")
        why = "the process side's design pressure {low:.4g} against 10/13 of the steam side's (gauge), {limit:.4g}"
        source = "API 521, tube rupture: the 10/13 rule of codes testing at 1.3 × design"
    else:
        test = (inputs.process_side_test_pressure if inputs.process_side_test_pressure is not None
                else atm + TEST_PRESSURE_RATIO * (low - atm))
        if inputs.process_side_test_pressure is None:
            result.work(f"{NAME}: process-side test pressure", "p_test = p_atm + 1.3·(p_LP,design − p_atm)",
                        "p_atm + 1.3*(p_LP - p_atm)", test / 1e5, "bar", p_LP=(low / 1e5, "bar"),
                        p_atm=(atm / 1e5, "bar"))
            result.assumptions.append(f"{NAME}: the process side's test pressure taken as 1.3 × its design pressure "
                                      "(ASME BPVC VIII-1 UG-99(b), stress ratio 1); give overpressure.test_pressure "
                                      "when known")
        quantity, limit = (test / 1e5, "bar"), (high / 1e5, "bar")
        why = "the process side's test pressure {low:.4g} against the steam side's design pressure {limit:.4g}"
        source = "API 521, tube rupture: the low-pressure side's test pressure against the high-pressure side's design"
    result.add(f"{PREFIX}_basis", f"{NAME}: basis", basis)
    if quantity[0] >= limit[0]:
        result.notice(f"{NAME}: no relief case", Phrase.of(
            why + f" ({source})" + ": the process side holds the steam side's design pressure within its test "
            "pressure, so a ruptured tube does not overpressure it and needs no relief device for this case, "
            "provided the piping and equipment connected to the process side, upstream and downstream up to their "
            "isolation, are tested to at least the same pressure (API 521, tube rupture); steam breaking into a "
            "liquid-full side can also raise a short pressure surge above the steady pressure, which this "
            "comparison does not cover (common practice: the engineer of record judges it for long tubes, high "
            "pressure differences and stiff liquid systems)", low=quantity, limit=limit))
        result.add(f"{PREFIX}_relief_needed", f"{NAME}: relief device needed", "no")
        if not reverse_valve:
            discharge_pipe_not_assessed(result, NAME, inputs, "no relief device is needed for a ruptured tube here")
            inlet_pipe_not_assessed(result, NAME, inputs.relief_inlet_size,
                                    "no relief device is needed for a ruptured tube here")
        return
    result.add(f"{PREFIX}_relief_needed", f"{NAME}: relief device needed", "yes")
    result.notice(f"{NAME}: a relief case", Phrase.of(why + f" ({source})" + ": the process side is not protected "
                                                      "by its test "
                                                      "pressure; it needs a relief device sized for a ruptured tube",
                                                      low=quantity, limit=limit), act=True)
    if inputs.tube_inside_diameter is None:
        result.check(f"{NAME}: relief load", "warn", "not sized: give overpressure.tube_inside_diameter")
        return
    source_pressure = max(p for p in (inputs.steam_pressure, inputs.control_valve_supply_pressure) if p is not None)
    p_r = relieving_pressure(low, atm, result, PREFIX, NAME)
    try:
        steam = (SteamState.from_ph(source_pressure, _supply_enthalpy(inputs, source_pressure))
                 if source_pressure > p_r else None)
    except OutOfRangeError as exc:
        raise exc.for_field("overpressure.steam_side_design_pressure") from None
    if steam is None:
        result.notice(f"{NAME}: no flow", Phrase.of("the steam pressure {p:.4g} does not exceed the process side's "
                                                    "relieving pressure {r:.4g}", p=(source_pressure / 1e5, "bar"),
                                                    r=(p_r / 1e5, "bar")))
        return
    nozzle = direct_integration_flux(steam, p_r)
    bore = math.pi * inputs.tube_inside_diameter ** 2 / 4.0
    load = 2.0 * bore * nozzle.mass_flux * 3600.0
    flow_kind = ("choked" if nozzle.choked else "not choked: the process side's relieving pressure is above the "
                 "critical pressure")
    result.work(f"{NAME}: steam through two open tube ends",
                f"W = 2·(π·d²/4)·G, G isentropic steam flux on IF97 ({flow_kind}), no friction credited",
                "2*(3.14159265*d**2/4)*G", load, "kg/h", d=(inputs.tube_inside_diameter * 1e3, "mm"),
                G=(nozzle.mass_flux, "kg/(m**2*s)"))
    result.add(f"{PREFIX}_flow", f"{NAME}: steam flow through the break", load, "kg/h")
    result.assumptions.append(f"{NAME}: a clean break of one tube, steam from both ends through the full bore, at the "
                              "highest steam pressure (the supply's with the control valve failed open), isentropic "
                              "nozzle flow on IF97 with no friction in the tube (conservative)")
    relieving = SteamState.from_ph(p_r, steam.enthalpy)
    # Liquid displaced at the steam's volume flow, then relieved as liquid (API 520 Part I liquid equation).
    liquid = SteamState.from_pT(p_r, min(inputs.process_outlet_temperature, relieving.saturation_temperature - 1.0))
    displaced = load / relieving.density * liquid.density
    result.work(f"{NAME}: liquid displaced by the steam", "m_l = W·ρ_l/ρ_steam(P1)", "W*rho_l/rho_s", displaced,
                "kg/h", W=(load, "kg/h"), rho_l=(liquid.density, "kg/m**3"), rho_s=(relieving.density, "kg/m**3"))
    valve_type = inputs.relief_valve_type or "conventional"
    critical = direct_integration_flux(relieving, atm).throat_pressure

    def sizer(res, back):
        steam_back, liquid_back = back if back is not None else (atm, atm)
        suffix = "" if back is None else ", at the built-up back pressure"
        kb = balanced_kb(valve_type, low, None if back is None else steam_back, atm)
        area_steam, method = steam_relief_area(res, f"{NAME}, steam{suffix}", relieving, load, steam_back, kb)
        area_liquid, _ = liquid_relief_area(res, f"{NAME}{suffix}", valve_type=valve_type, set_pressure=low, atm=atm,
                                            relieving_pressure=p_r, density=liquid.density, flow_kg_h=displaced,
                                            back=liquid_back, liquid=liquid,
                                            kb=balanced_kb(valve_type, low, None if back is None else liquid_back,
                                                           atm))
        governing, area = (("displaced liquid", area_liquid) if area_liquid > area_steam
                           else (f"steam ({method})", area_steam))
        return Sizing(area, displaced if governing == "displaced liquid" else load, governing, p_r, critical,
                      steam_back, kb, (area_steam, area_liquid))

    def discharge(res, orifice_area, sizing):
        area_steam, area_liquid = sizing.detail
        return tube_rupture_discharge(inputs, res, NAME, atm=atm, set_pressure=low, orifice_area=orifice_area,
                                      steam=relieving, steam_flow=load, steam_area=area_steam, liquid=liquid,
                                      liquid_flow=displaced, liquid_area=area_liquid)

    first = sizer(result, None)
    sizing, _ = size_at_built_up_back_pressure(result, NAME, valve_type=valve_type, set_pressure=low, atm=atm,
                                               sizer=sizer, discharge=discharge)
    if sizing is not first and sizing.method != first.method:
        result.notice(f"{NAME}: governing flow at the built-up back pressure", sizing.method)
    result.add(f"{PREFIX}_governing_case", f"{NAME}: governing relief flow", sizing.method)
    rated = select_orifice(result, PREFIX, NAME, sizing.area, sizing.flow_kg_h)
    if rated is None:
        inlet_pipe_not_assessed(result, NAME, inputs.relief_inlet_size, "no single API 526 orifice passes the load")
        return
    outlet_size_check(result, PREFIX, NAME, inputs.discharge_size)
    liquid_governs = sizing.method == "displaced liquid"
    relief_inlet_loss(result, PREFIX, NAME, state=liquid if liquid_governs else relieving, rated_flow_kg_h=rated,
                      set_pressure=low, atm=atm, size=inputs.relief_inlet_size, length=inputs.relief_inlet_length,
                      fittings_k=inputs.relief_inlet_fittings_k, fluid="displaced liquid" if liquid_governs else "steam")
    built = discharge(result, result.value(f"{PREFIX}_orifice_area"), sizing)
    critical_flow_check(result, f"{NAME}, steam", sizing, None if built is None else built[0])


def _supply_enthalpy(inputs, pressure):
    """Enthalpy of the steam at the break: the supply's state (superheat kept), else saturated at ``pressure``."""
    from .supply import supply_state

    supply = supply_state(inputs)
    if supply is not None:
        return supply.enthalpy
    if inputs.steam_temperature is not None:
        return SteamState.from_pT(pressure, inputs.steam_temperature).enthalpy
    return SteamState.from_p_dryness(pressure, 1.0).enthalpy


def _thermal_relief(inputs, heat, process_pressure, atm, result):
    name = "Thermal relief"
    highest = max(p for p in (inputs.steam_pressure, inputs.control_valve_supply_pressure) if p is not None)
    t_steam = SteamState.from_p_dryness(highest, 1.0).temperature
    p_r, liquid, capacity, valve_density = thermal_relief_capacity(inputs, result, name, atm=atm)
    if inputs.process_cp is None:
        t_boil = SteamState.from_p_dryness(p_r, 0.0).temperature
        result.work(f"{name}: saturation temperature of the steam at its highest pressure (IF97)", "T_s = T_sat(p_s)",
                    "T_sat(p_s)", t_steam - 273.15, "degC", p_s=(highest / 1e5, "bar"))
        result.work(f"{name}: saturation temperature of the process water at its relieving pressure (IF97)",
                    "T_b = T_sat(P1)", "T_sat(P1)", t_boil - 273.15, "degC", P1=(p_r / 1e5, "bar"))
        result.assumptions.append(
            f"{name}: blocked in with the steam on, the process liquid heats towards the steam's saturation "
            "temperature at the highest steam pressure (the supply's, the control valve failed open); a supply's "
            "superheat adds little heat at a higher wall temperature and is not counted (common practice)")
        if t_steam > t_boil:
            _boiling(inputs, heat, p_r, t_steam, t_boil, atm, result, name)
            return
        alpha, density, cp = _largest_expansion(p_r, inputs.process_outlet_temperature,
                                                min(t_steam, t_boil - 1.0), result, name)
    else:
        alpha, density, cp = inputs.process_expansion_coefficient, inputs.process_density, inputs.process_cp
        result.assumptions.append(f"{name}: the expansion coefficient given is taken as the largest over the "
                                  "temperatures the blocked-in liquid reaches (up to the steam's), as API 521 asks; "
                                  "a liquid that boils below the steam's temperature at the relieving pressure "
                                  "generates vapour, for the engineer of record to size")
    flow = alpha * heat / (density * cp)
    result.work(f"{name}: expansion flow of the blocked-in process liquid",
                "q = α_v·φ/(ρ·c_p)  [API 521, hydraulic expansion]", "alpha*phi/(rho*c_p)", flow * 3600e3, "L/h",
                alpha=(alpha * 1e6, "ppm/K"), phi=(heat / 1e3, "kW"), rho=(density, "kg/m**3"),
                c_p=(cp / 1e3, "kJ/(kg*K)"))
    result.add("thermal_relief_flow", f"{name}: expansion flow with the steam on", flow * 3600e3, "L/h")
    result.assumptions.append(f"{name}: the full steam-side heat goes into the blocked-in process liquid, its "
                              "expansion coefficient the largest over the temperatures it reaches; the steam is not "
                              "isolated")
    capacity_l_h = capacity / valve_density * 1e3
    result.check_limit(
        f"{name}: minimum size", (flow * 3600e3, "L/h"), [("<=", (capacity_l_h, "L/h"), "warn")],
        lambda status: Phrase.of(
            f"a thermal relief valve of the usual minimum size, {THERMAL_MINIMUM_SIZE} (common practice), taken "
            "with an API 526 D orifice, passes {capacity:.0f} of the liquid at its relieving pressure, above the "
            "expansion flow {flow:.1f}; fit one wherever the process side can be blocked in with the steam on"
            if status == "pass" else
            f"the expansion flow {{flow:.1f}} exceeds the {{capacity:.0f}} that a valve of the usual minimum size, "
            f"{THERMAL_MINIMUM_SIZE} (common practice) with a D orifice, passes: size the thermal relief valve for "
            "the expansion flow (API 520 Part I liquid equation), or keep the process side from being blocked in "
            "with the steam on", flow=(flow * 3600e3, "L/h"), capacity=(capacity_l_h, "L/h")),
        source="API 520 Part I liquid equation (D orifice, API 526; Kd 0.65); the minimum size common practice")
    if liquid is not None:
        thermal_relief_discharge(inputs, result, name, atm=atm, liquid=liquid, rated=capacity)


def _largest_expansion(pressure, t_low, t_high, result, name):
    """Water's cubic expansion coefficient on IF97, the largest from ``t_low`` to ``t_high`` (K) at ``pressure``
    (Pa); with the density and c_p there. Returns ``(α 1/K, ρ kg/m³, c_p J/(kg K))``."""
    temperatures = [t_low + (t_high - t_low) * i / 8 for i in range(9)] if t_high > t_low else [t_low]

    def expansion(t):
        warm, cool = SteamState.from_pT(pressure, t + 0.5), SteamState.from_pT(pressure, t - 0.5)
        water = SteamState.from_pT(pressure, t)
        return -(warm.density - cool.density) / water.density, warm, cool, water

    t = max(temperatures, key=lambda t: expansion(t)[0])
    alpha, warm, cool, water = expansion(t)
    result.work(f"{name}: cubic expansion coefficient of the water (IF97), the largest from the outlet temperature "
                "to the blocked-in temperature",
                f"α_v = −(1/ρ)·(ρ(T + 0.5 K) − ρ(T − 0.5 K))/(1 K) at T = {t - 273.15:.1f} °C, the largest of 9 "
                f"temperatures from {t_low - 273.15:.1f} °C to {t_high - 273.15:.1f} °C at the relieving pressure",
                "-(rho_hot - rho_cold)/(rho*dT)", alpha * 1e6, "ppm/K", rho_hot=(warm.density, "kg/m**3"),
                rho_cold=(cool.density, "kg/m**3"), rho=(water.density, "kg/m**3"), dT=(1.0, "K"))
    return alpha, water.density, water.cp


def _boiling(inputs, heat, p_r, t_steam, t_boil, atm, result, name):
    """Blocked-in process water that boils under the steam: vapour generated at φ/h_fg, relieved as steam."""
    from ...equipment.relief import api526_orifice

    liquid, vapour = SteamState.from_p_dryness(p_r, 0.0), SteamState.from_p_dryness(p_r, 1.0)
    latent = vapour.enthalpy - liquid.enthalpy
    load = heat / latent * 3600.0
    result.notice(f"{name}: the process water boils", Phrase.of(
        "the steam condenses at {ts:.1f}, above the {tb:.1f} at which the blocked-in water boils at its relieving "
        "pressure {p:.4g}: the relief case is vapour generation, not liquid expansion (API 521, blocked-in liquid "
        "under a heat source)", ts=(t_steam - 273.15, "degC"), tb=(t_boil - 273.15, "degC"), p=(p_r / 1e5, "bar")),
        act=True)
    result.work(f"{name}: vapour generated by the steam-side heat", "W = φ/h_fg(P1)", "phi/h_fg", load, "kg/h",
                phi=(heat / 1e3, "kW"), h_fg=(latent / 1e3, "kJ/kg"))
    result.add("thermal_relief_vapour_load", f"{name}: vapour generated, blocked in with the steam on", load, "kg/h")
    result.assumptions.append(f"{name}: the full steam-side heat boils the blocked-in water at its relieving pressure "
                              "(no credit for the liquid's sensible heat-up or for heat losses: conservative)")
    area, _ = steam_relief_area(result, f"{name}, vapour", vapour, load, atm)
    minimum = dict(API526_AREAS_IN2)[THERMAL_ORIFICE] * MM2_PER_IN2
    orifice = api526_orifice(area)
    result.add("thermal_relief_required_area", f"{name}: required effective area (vapour)", area, "mm**2")
    result.add("thermal_relief_orifice", f"{name}: API 526 orifice for the vapour", orifice[0] if orifice else
               "larger than T")
    capacity = load * minimum / area
    result.check_limit(
        f"{name}: minimum size", (area, "mm**2"), [("<=", (minimum, "mm**2"), "warn")],
        lambda status: Phrase.of(
            f"the vapour load {{load:.0f}} needs {{area:.0f}}, within the D orifice's {{minimum:.0f}} of a valve of "
            f"the usual minimum size, {THERMAL_MINIMUM_SIZE} (common practice)" if status == "pass" else
            f"the vapour load {{load:.0f}} needs {{area:.0f}} ({orifice[0] if orifice else 'larger than T'} "
            f"orifice, API 526): a valve of the usual minimum size, {THERMAL_MINIMUM_SIZE} (common practice) with "
            "a D orifice ({minimum:.0f}), passes only {capacity:.0f} of steam; size the relief valve for the vapour, "
            "or keep the "
            "process side from being blocked in with the steam on", load=(load, "kg/h"), area=(area, "mm**2"),
            minimum=(minimum, "mm**2"), capacity=(capacity, "kg/h")),
        source="API 520 Part I steam sizing, API 526 orifices; the minimum size common practice")
    if orifice is not None:
        rated = load * max(orifice[1], minimum) / area
        discharge_section(result, "thermal_relief", name, valve_type="conventional",
                          set_pressure=inputs.process_side_design_pressure, atm=atm, rated_flow_kg_h=rated,
                          enthalpy=vapour.enthalpy, relieving_temperature=vapour.temperature,
                          size=inputs.thermal_discharge_size,
                          length=inputs.thermal_discharge_length, fittings_k=inputs.thermal_discharge_fittings_k,
                          keys=THERMAL_KEYS)
