"""What the overpressure sections of the flash and exchanger kinds share: the relieving pressure, a relief
valve sized for steam or for a flashing two-phase load, its API 526 orifice, the discharge line's built-up
back pressure and the reaction force, each as steps and checks of the Result.

The kinds' own load cases are in :mod:`steamcalc.calcs.flash.overpressure` and
:mod:`steamcalc.calcs.exchanger.overpressure`.
"""

from __future__ import annotations

from ..equipment.discharge_line import back_pressure_limit, built_up_back_pressure
from ..equipment.piping import flow_area, pipe_inner_diameter
from ..equipment.relief import (
    API526_AREAS_IN2, DEFAULT_KD, MM2_PER_IN2, MOLAR_MASS_WATER, api526_orifice, direct_integration_area,
    direct_integration_flux, reaction_force, steam_equation_area,
)
from ..equipment.two_phase_relief import CERTIFIED_CAPACITY, size_flashing_relief
from ..properties.steam import SteamState, dynamic_viscosity
from ..units.amounts import Phrase

#: Overpressure of a single relief valve in a non-fire case, fraction of the gauge set pressure (API 520 Part I).
DEFAULT_OVERPRESSURE = 0.10
DEFAULT_SCHEDULE = "40"
VALVE_TYPES = ("conventional", "balanced-bellows", "pilot")

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


def steam_relief_area(result, name, relieving, flow_kg_h, back):
    """Required area (mm²) for dry or wet steam: direct integration on IF97, and the steam equation for dry steam
    in critical flow; the larger governs. Returns ``(area, method)``."""
    nozzle = direct_integration_flux(relieving, back)
    area_di = direct_integration_area(flow_kg_h, nozzle, DEFAULT_KD)
    result.work(f"{name}: mass flux, direct integration",
                "G = ρ(p_t, s0)·√(2(h0 − h(p_t, s0)))  [API 520 Part I annex B, IF97]",
                "isentropic_flux(P1, h1, p_t)", nozzle.mass_flux, "kg/(m**2*s)",
                P1=(relieving.pressure / 1e5, "bar"), h1=(relieving.enthalpy / 1e3, "kJ/kg"),
                p_t=(nozzle.throat_pressure / 1e5, "bar"))
    result.work(f"{name}: required area, direct integration", "A = W / (Kd·G)", "W/(Kd*G)", area_di, "mm**2",
                W=(flow_kg_h, "kg/h"), Kd=(DEFAULT_KD, ""), G=(nozzle.mass_flux, "kg/(m**2*s)"))
    if not (nozzle.choked and relieving.phase != "wet"):
        return area_di, "direct integration"
    area_se, kn, ksh = steam_equation_area(flow_kg_h, relieving.pressure, relieving.temperature, DEFAULT_KD)
    result.work(f"{name}: required area, API 520 steam equation",
                "A = 190.5·W / (P1·Kd·KN·KSH)  [mm², kg/h, kPa(a)]", "190.5*W/(P1*Kd*KN*KSH)", area_se, "mm**2",
                units_fixed=True, W=(flow_kg_h, "kg/h"), P1=(relieving.pressure / 1e3, "kPa"), Kd=(DEFAULT_KD, ""),
                KN=(kn, ""), KSH=(ksh, ""))
    return (area_se, "API 520 steam equation") if area_se > area_di else (area_di, "direct integration")


def flashing_relief_area(result, name, inlet, flow_kg_h, back):
    """Required area (mm²) of a two-phase or flashing-liquid load by the omega method and by direct integration,
    both on IF97; the larger governs. Returns ``(area, method, FlashingRelief)``."""
    sized = size_flashing_relief(inlet, back, flow_kg_h)
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
    result.work(f"{name}: required area, omega method", "A = W / (Kd·G)", "W/(Kd*G)", sized.area_omega, "mm**2",
                W=(flow_kg_h, "kg/h"), Kd=(sized.kd, ""), G=(flow.mass_flux, "kg/(m**2*s)"))
    result.work(f"{name}: required area, direct integration", "A = W / (Kd·G)", "W/(Kd*G)", sized.area_direct,
                "mm**2", W=(flow_kg_h, "kg/h"), Kd=(sized.kd, ""), G=(sized.direct.mass_flux, "kg/(m**2*s)"))
    load = "two-phase" if flow.region == "two-phase" else "subcooled"
    result.assumptions.append(
        f"{name}: Kd = {sized.kd} for preliminary sizing of a {load}"
        " load (API 520 Part I annex C); the maker's certified two-phase coefficient governs")
    return sized.area, sized.governing, sized


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
    result.check_limit(f"{name}: relief orifice", (area, "mm**2"), [("<=", (orifice_area, "mm**2"), "fail")],
                       Phrase.of(f"{letter} orifice, {{orifice:.0f}} effective (API 526) for {{area:.0f}} required; "
                                 "the maker's certified capacity governs", orifice=(orifice_area, "mm**2"),
                                 area=(area, "mm**2")), source="API 526")
    return flow_kg_h * orifice_area / area


def discharge_section(result, prefix, name, *, valve_type, set_pressure, atm, rated_flow_kg_h, enthalpy, size,
                      length, fittings_k, schedule=None):
    """Built-up back pressure in the discharge pipe against the valve's limit, and the reaction force at its exit.

    ``enthalpy`` (J/kg) is the steam's, throttled through the valve into the pipe at constant enthalpy.
    """
    if size is None or length is None:
        result.check(f"{name}: discharge line", "warn",
                     "no discharge line given (overpressure.discharge_size, overpressure.discharge_length): the "
                     f"built-up back pressure and the reaction force of the {name.lower()} are not computed")
        return
    diameter = pipe_inner_diameter(size, schedule or DEFAULT_SCHEDULE, field="overpressure.discharge_size")
    flow = rated_flow_kg_h / 3600.0
    outlet = SteamState.from_ph(atm, enthalpy)
    viscosity = dynamic_viscosity(outlet.temperature, outlet.density)
    line = built_up_back_pressure(flow, outlet.temperature, diameter, length, fittings_k or 0.0, atm, viscosity)
    result.work(f"{name}: built-up back pressure",
                "p1 = root of p1² − p2² − G²·(R·T/M)·(f·L/D + ΣK + 2·ln(p1/p2)), isothermal flow, with "
                "p2 = max(p_atm, G·√(RT/M))",
                "isothermal_line(G, T, f, L, D, K, p2)", line.outlet_pressure / 1e5, "bar",
                G=(flow / flow_area(diameter), "kg/(m**2*s)"), T=(outlet.temperature - 273.15, "degC"),
                f=(line.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"), K=(fittings_k or 0.0, ""),
                p2=(line.exit_pressure / 1e5, "bar"))
    result.add(f"{prefix}_built_up_back_pressure", f"{name}: built-up back pressure at the valve outlet",
               line.outlet_pressure / 1e5, "bar")
    fraction, basis = back_pressure_limit(valve_type)
    share = (100.0 * (line.outlet_pressure - atm) / (set_pressure - atm), "percent")
    limit = (100.0 * fraction, "percent")
    result.check_limit(
        f"{name}: built-up back pressure", share, [("<=", limit, "warn")],
        lambda status: Phrase.of(
            f"{{share:.1f}} of the gauge set pressure, within {{limit:g}} ({valve_type} valve)" if status == "pass"
            else f"{{share:.1f}} of the gauge set pressure, above {{limit:g}} ({valve_type} valve): enlarge or shorten "
            "the discharge line, or use a balanced-bellows or pilot-operated valve", share=share, limit=limit),
        source=basis)
    kappa = SteamState.from_pT(atm, max(outlet.temperature, SteamState.from_p_dryness(atm, 1.0).temperature + 1e-3)
                               ).isentropic_exponent
    exit_area = flow_area(diameter) * 1e6
    force, p_exit = reaction_force(rated_flow_kg_h, outlet.temperature, kappa, exit_area, atm)
    result.work(f"{name}: reaction force at the discharge",
                "F = 129.41·W·√(kT/((k+1)M)) + 10⁻³·A_o·P2,  T = T1 + 273.15  "
                "[API 520 Part II, 4.4.1.1, eq. (1); "
                "N, kg/s, °C, kg/kmol, mm², kPa(g)]",
                "129.41*W*sqrt(k*(T1 + 273.15)/((k + 1)*M)) + 0.001*A_o*P2", force, "N", units_fixed=True,
                W=(flow, "kg/s"), k=(kappa, ""), T1=(outlet.temperature - 273.15, "degC"),
                M=(MOLAR_MASS_WATER, "kg/kmol"),
                A_o=(exit_area, "mm**2"), P2=(p_exit / 1e3, "kPa", "difference"))
    result.add(f"{prefix}_reaction_force", f"{name}: reaction force at the open discharge", force, "N")
