"""The let-down station's downstream relief valve: required area by two methods, the API 526
orifice, back pressure, inlet loss and reaction force.

Called by :func:`steamcalc.calcs.letdown.calculation.calculate` after the relief load
(``relief_design_flow``) is known; adds its values, steps and checks to the same Result.
"""

from __future__ import annotations

from ...equipment.piping import DN_TO_NPS, flow_area, pipe_inner_diameter
from ...equipment.relief import (
    API526_OUTLET_NPS, CONVENTIONAL_BACK_PRESSURE_LIMIT, DEFAULT_KD, INLET_LOSS_LIMIT, api526_orifice,
    back_pressure_correction, direct_integration_area, direct_integration_flux, reaction_force, steam_equation_area,
)
from ...errors import OutOfRangeError
from ...properties.steam import SteamState
from .equipment import (
    DEFAULT_SCHEDULE, case_inlet_pressure, inlet_state_at, line_drop, relief_set_pressure, sizing_kappa,
)

DEFAULT_OVERPRESSURE = 0.10
DEFAULT_KC = 1.0
DEFAULT_VALVE_TYPE = "conventional"

RELIEF_CAUTIONS = (
    "Relief valve sizing here is preliminary: it is for the engineer of record to confirm to the local "
    "pressure-equipment code, and the valve maker's certified capacity (not the area computed here) governs "
    "the selection.",
    "The relief valve's discharge must go to a safe place, with its reaction force carried by the supports.",
)


def _discharge_diameter(inputs, letter, schedule):
    if inputs.relief_discharge_size is not None:
        return pipe_inner_diameter(inputs.relief_discharge_size, schedule, field="relief.discharge_size"), \
            inputs.relief_discharge_size
    nps = API526_OUTLET_NPS[letter]
    dn = next(d for d, n in DN_TO_NPS.items() if n == nps)
    return pipe_inner_diameter(f"DN{dn}", schedule), f"DN{dn} (API 526 outlet of the {letter} orifice, from memory)"


def relief_section(inputs, inlet, site, result):
    """Size the downstream relief valve for the relief design flow at set pressure plus overpressure."""
    p_set = relief_set_pressure(inputs)
    if p_set is None:
        return
    if inputs.set_pressure is None:
        result.check("Relief set pressure key", "warn",
                     "valve.relief_set_pressure is superseded: give it as set_pressure in [inputs.relief]")
    result.cautions.extend(RELIEF_CAUTIONS)
    if "relief_design_flow" not in result.values:
        result.check("Relief valve sizing", "warn", "no rated Kv or bypass Kv: no relief load, the relief valve is "
                     "not sized; give valve.rated_kv")
        return
    atm = site.atmospheric_pressure
    flow = result.value("relief_design_flow")  # kg/h
    overpressure = inputs.overpressure if inputs.overpressure is not None else DEFAULT_OVERPRESSURE
    kd = inputs.relief_kd if inputs.relief_kd is not None else DEFAULT_KD
    kc = inputs.relief_kc if inputs.relief_kc is not None else DEFAULT_KC
    valve_type = inputs.relief_valve_type or DEFAULT_VALVE_TYPE
    back = inputs.back_pressure if inputs.back_pressure is not None else atm
    defaults = [text for given, text in (
        (inputs.overpressure, f"overpressure {100 * DEFAULT_OVERPRESSURE:g} % (single valve, API 520 Part I)"),
        (inputs.relief_kd, f"Kd = {DEFAULT_KD} (preliminary sizing, API 520 Part I 5.2)"),
        (inputs.relief_kc, f"Kc = {DEFAULT_KC:g} (no rupture disk upstream, API 520 Part I 5.4)"),
        (inputs.relief_valve_type, "a conventional spring-loaded valve"),
        (inputs.back_pressure, "back pressure atmospheric (open discharge)")) if given is None]
    if defaults:
        result.assumptions.append("Relief valve, not given: " + "; ".join(defaults))
    p_relieve = p_set + overpressure * (p_set - atm)
    result.step("Relieving pressure", "P1 = p_set + overpressure·(p_set − p_atm)",
                f"P1 = {p_set / 1e5:.4g} bar(a) + {overpressure:.2f} × {(p_set - atm) / 1e5:.4g} bar difference",
                p_relieve / 1e5, "bar")
    upstream = inlet_state_at(inputs, case_inlet_pressure(inputs, "fail-open"), inlet)
    try:
        relieving = SteamState.from_ph(p_relieve, upstream.enthalpy)
    except OutOfRangeError as exc:
        raise exc.for_field("relief.set_pressure") from None
    result.assumptions.append(
        f"Relieving steam: the upstream steam at the highest upstream pressure throttled to the relieving pressure "
        f"(h = {upstream.enthalpy / 1e3:.1f} kJ/kg, {relieving.temperature - 273.15:.1f} °C), spray off: the hotter, "
        "lighter steam needs the larger area")
    result.add("relief_relieving_pressure", "Relieving pressure (set + overpressure)", p_relieve / 1e5, "bar")
    result.add("relief_relieving_temperature", "Relieving temperature", relieving.temperature - 273.15, "degC")

    kb, kb_note = back_pressure_correction(valve_type, p_set, back, overpressure, atm)
    gauge_back = (back - atm) / (p_set - atm)
    if valve_type == "conventional" and gauge_back > CONVENTIONAL_BACK_PRESSURE_LIMIT:
        result.check("Relief back pressure", "warn",
                     f"back pressure {100 * gauge_back:.0f} % of the gauge set pressure, above the "
                     f"{100 * CONVENTIONAL_BACK_PRESSURE_LIMIT:g} % a conventional valve tolerates (API 520 Part I): "
                     "consider a balanced-bellows or pilot-operated valve")
    else:
        result.check("Relief back pressure", "pass", f"{100 * gauge_back:.0f} % of the gauge set pressure; {kb_note}")
    result.add("relief_kb", "Back-pressure correction Kb", kb)

    nozzle = direct_integration_flux(relieving, back)
    area_di = direct_integration_area(flow, nozzle, kd, kb, kc)
    result.step("Relief mass flux, direct integration",
                "G = max over p of ρ(p, s0)·√(2(h0 − h(p, s0)))  [API 520 Part I annex B, IF97]",
                f"from {p_relieve / 1e5:.4g} bar(a), {relieving.temperature - 273.15:.1f} °C down to "
                f"{back / 1e5:.4g} bar(a): {'choked' if nozzle.choked else 'not choked'} at "
                f"{nozzle.throat_pressure / 1e5:.4g} bar(a)", nozzle.mass_flux, "kg/(m**2*s)")
    result.step("Required area, direct integration", "A = W / (Kd·Kb·Kc·G)",
                f"A = {flow:.0f} kg/h / 3600 / ({kd:g} × {kb:.3f} × {kc:g} × {nozzle.mass_flux:.1f} kg/(m² s))",
                area_di, "mm**2")
    result.add("relief_required_area_direct_integration", "Required area, direct integration on IF97", area_di, "mm**2")
    areas = {"direct integration": area_di}
    if nozzle.choked and relieving.phase != "wet":
        area_se, kn, ksh = steam_equation_area(flow, p_relieve, relieving.temperature, kd, kb, kc)
        result.step("Required area, API 520 steam equation", "A = 190.5·W / (P1·Kd·Kb·Kc·KN·KSH)  [mm², kg/h, kPa(a)]",
                    f"A = 190.5 × {flow:.0f} / ({p_relieve / 1e3:.1f} × {kd:g} × {kb:.3f} × {kc:g} × {kn:.4f} × "
                    f"{ksh:.4f})", area_se, "mm**2")
        result.add("relief_required_area_steam_equation", "Required area, API 520 steam equation", area_se, "mm**2")
        areas["steam equation"] = area_se
        difference = area_se / area_di - 1.0
        result.check("Relief area: two methods agree", "pass" if abs(difference) <= 0.05 else "warn",
                     f"steam equation {area_se:.0f} mm² vs direct integration {area_di:.0f} mm² ({100 * difference:+.1f} %); "
                     "the steam equation is Napier's empirical fit with the standard's KSH table, the direct integration "
                     "follows IF97 along the isentrope with homogeneous equilibrium; they differ by a few per cent "
                     "(API 520 Part I)")
    else:
        result.assumptions.append("API 520 steam equation not used: it holds for critical flow of dry or superheated "
                                  "steam only; the direct integration governs")
    governing = max(areas, key=areas.get)
    area = areas[governing]
    result.add("relief_required_area", f"Required effective area ({governing} governs, the larger)", area, "mm**2")

    orifice = api526_orifice(area)
    if orifice is None:
        result.add("relief_orifice", "API 526 orifice", "larger than T")
        result.check("Relief orifice", "fail", f"required {area:.0f} mm² exceeds the T orifice: use several valves "
                     "or a non-standard valve, and reconsider the fail-open case (a smaller trim or bypass)")
        return
    letter, orifice_area = orifice
    margin = orifice_area / area - 1.0
    result.add("relief_orifice", "API 526 orifice (smallest large enough)", letter)
    result.add("relief_orifice_area", f"Effective area of the {letter} orifice", orifice_area, "mm**2")
    result.add("relief_capacity_margin", "Relief capacity margin over the relief load", 100.0 * margin, "percent")
    result.step("Relief capacity margin", "margin = A_orifice / A_required − 1",
                f"{orifice_area:.1f} mm² ({letter}, API 526) / {area:.1f} mm² − 1", 100.0 * margin, "percent")
    result.check("Relief orifice", "pass",
                 f"{letter} orifice, {orifice_area:.0f} mm² effective (API 526) for {area:.0f} mm² required: "
                 f"{100 * margin:.0f} % margin; the maker's certified capacity governs")
    rated_flow = flow * orifice_area / area
    result.add("relief_rated_flow", "Relief capacity of the selected orifice (same coefficients)", rated_flow, "kg/h")
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    _inlet_loss(inputs, relieving, rated_flow, p_set, atm, schedule, result)
    kappa = sizing_kappa(relieving)
    diameter, described = _discharge_diameter(inputs, letter, schedule)
    outlet_area = flow_area(diameter) * 1e6
    force, p_exit = reaction_force(rated_flow, relieving.temperature, kappa, outlet_area, atm)
    result.step("Reaction force of the open discharge", "F = 129.41·W·√(kT/((k+1)M)) + 10⁻³·A_o·P2  [API 520 Part II]",
                f"W = {rated_flow / 3600:.3f} kg/s, k = {kappa:.3f}, T = {relieving.temperature:.1f} K, M = 18.015, "
                f"A_o = {outlet_area:.0f} mm² ({described}), P2 = {p_exit / 1e3:.1f} kPa(g)", force, "N")
    result.add("relief_reaction_force", "Reaction force of the open discharge", force, "N")


def _inlet_loss(inputs, relieving, rated_flow, p_set, atm, schedule, result):
    if inputs.relief_inlet_size is None or inputs.relief_inlet_length is None:
        result.check("Relief inlet loss", "warn", "no relief inlet line given (relief.inlet_size, relief.inlet_length): "
                     f"the inlet loss must stay below {100 * INLET_LOSS_LIMIT:g} % of the set pressure (API 520 Part II)")
        return
    loss = line_drop(relieving, rated_flow / 3600, inputs.relief_inlet_size, schedule, inputs.relief_inlet_length,
                     inputs.relief_inlet_fittings_k, "relief.inlet_size")
    fraction = loss.pressure_drop / (p_set - atm)
    result.step("Relief inlet loss", "Δp = (f·L/D + ΣK)·ρv²/2 at the rated flow; fraction of the gauge set pressure",
                f"f = {loss.friction_factor:.4f}, L = {inputs.relief_inlet_length:g} m, "
                f"ΣK = {inputs.relief_inlet_fittings_k or 0:g}, v = {loss.velocity:.1f} m/s, Δp = "
                f"{loss.pressure_drop / 1e5:.4f} bar difference over {(p_set - atm) / 1e5:.4g} bar(g)",
                100.0 * fraction, "percent")
    result.add("relief_inlet_loss_fraction", "Relief inlet loss, of the gauge set pressure", 100.0 * fraction, "percent")
    if fraction > INLET_LOSS_LIMIT:
        result.check("Relief inlet loss", "warn",
                     f"{100 * fraction:.1f} % of the gauge set pressure, above {100 * INLET_LOSS_LIMIT:g} % (API 520 "
                     "Part II, 7.3.1): the valve may chatter; enlarge or shorten the inlet line")
    else:
        result.check("Relief inlet loss", "pass",
                     f"{100 * fraction:.1f} % of the gauge set pressure, within {100 * INLET_LOSS_LIMIT:g} % (API 520 Part II)")
