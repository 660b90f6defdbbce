"""The let-down station's downstream relief valve: required area by two methods, the API 526
orifice, back pressure, inlet loss and reaction force.

Called by :func:`steamcalc.calcs.letdown.calculation.calculate` after the relief load
(``relief_design_flow``) is known; adds its values, steps and checks to the same Result.
"""

from __future__ import annotations

from ...equipment.piping import flow_area, pipe_inner_diameter
from ...equipment.relief import (
    API526_AREAS_IN2, CONVENTIONAL_BACK_PRESSURE_LIMIT, DEFAULT_KD, INLET_LOSS_LIMIT,
    MM2_PER_IN2, MOLAR_MASS_WATER, api526_orifice,
    back_pressure_correction, direct_integration_area, direct_integration_flux, reaction_force, steam_equation_area,
)
from ...errors import OutOfRangeError
from ...properties.steam import SteamState
from ...units.amounts import Phrase
from ..relief_outlet import narrow_outlet_warning, valve_outlet_pipe
from .discharge import discharge_line_section
from .equipment import (
    DEFAULT_SCHEDULE, inlet_state_at, line_drop, relief_set_pressure, sizing_kappa, upstream_relieving_pressure,
)

DEFAULT_OVERPRESSURE = 0.10
DEFAULT_KC = 1.0
DEFAULT_VALVE_TYPE = "conventional"
#: How far the two methods' areas may differ before the record warns, fraction: they differ by a few per cent
#: (API 520 Part I); the 5 % band is common practice.
AREA_AGREEMENT = 0.05

RELIEF_CAUTIONS = (
    "Relief valve sizing here is preliminary: it is for the engineer of record to confirm to the local "
    "pressure-equipment code, and the valve maker's certified capacity (not the area computed here) governs "
    "the selection.",
    "The relief valve's discharge must go to a safe place, with its reaction force carried by the supports.",
)


#: Gauge pressure below which the usual pressure-vessel codes do not apply: 15 psig = 1.034 bar (ASME BPVC VIII-1,
#: U-1(c)(2)(h): vessels of an internal or external pressure not over 15 psi are outside its scope; the letter of
#: the clause differs between editions).
CODE_SCOPE_GAUGE = 15.0 * 6894.757293168361


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
    if p_set - atm < CODE_SCOPE_GAUGE:
        # Below 15 psig most pressure-vessel codes do not apply, and with them their relief rules.
        result.notice("Relief set pressure within the usual pressure-vessel scope", act=True, detail=Phrase.of(
            "set pressure {set:.4g} is less than {scope:.4g} (15 psig) above the atmosphere {atm:.4g}: below it "
            "the usual pressure-vessel codes do not apply (ASME VIII-1, U-1(c)(2)(h): vessels of 15 psi or less are "
            "outside its scope), so the local code and "
            "the engineer of record decide whether a relief device is required and how it is rated",
            set=(p_set / 1e5, "bar"), scope=(CODE_SCOPE_GAUGE / 1e5, "bar", "difference"), atm=(atm / 1e5, "bar")))
    p_relieve = p_set + overpressure * (p_set - atm)
    result.work("Relieving pressure", "P1 = p_set + overpressure·(p_set − p_atm)", "p_set + overpressure*(p_set - p_atm)",
                p_relieve / 1e5, "bar", p_set=(p_set / 1e5, "bar"), overpressure=(overpressure, ""),
                p_atm=(atm / 1e5, "bar"))
    # The steam that relieves is the steam the failed-open valve passes: at the upstream pressure of the relief load.
    p_up = (inputs.inlet_pressure if inputs.max_inlet_pressure is None
            else upstream_relieving_pressure(inputs, atm))
    upstream = inlet_state_at(inputs, p_up, inlet)
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
    _back_pressure_check(valve_type, (back - atm) / (p_set - atm), kb_note, result)
    result.add("relief_kb", "Back-pressure correction Kb", kb)

    nozzle = direct_integration_flux(relieving, back)
    area_di = direct_integration_area(flow, nozzle, kd, kb, kc)
    # The flux is found by a search along the isentrope, not by arithmetic a view could redo: a lookup of
    # the isentropic flux from the relieving state to the throat, the throat named in the equation.
    throat = ("p_t the pressure of the largest flux, above the back pressure: choked" if nozzle.choked
              else "p_t the back pressure, above the pressure of the largest flux: not choked")
    result.work("Relief mass flux, direct integration",
                f"G = ρ(p_t, s0)·√(2(h0 − h(p_t, s0))), {throat}  [API 520 Part I annex B, IF97]",
                "isentropic_flux(P1, T1, p_t)", nozzle.mass_flux, "kg/(m**2*s)",
                P1=(p_relieve / 1e5, "bar"), T1=(relieving.temperature - 273.15, "degC"),
                p_t=(nozzle.throat_pressure / 1e5, "bar"))
    result.work("Required area, direct integration", "A = W / (Kd·Kb·Kc·G)", "W/(Kd*Kb*Kc*G)", area_di, "mm**2",
                W=(flow, "kg/h"), Kd=(kd, ""), Kb=(kb, ""), Kc=(kc, ""), G=(nozzle.mass_flux, "kg/(m**2*s)"))
    result.add("relief_required_area_direct_integration", "Required area, direct integration on IF97", area_di, "mm**2")
    areas = {"direct integration": area_di}
    if nozzle.choked and relieving.phase != "wet":
        area_se, kn, ksh = steam_equation_area(flow, p_relieve, relieving.temperature, kd, kb, kc)
        # The constant 190.5 holds for A in mm², W in kg/h and P1 in kPa(a) only.
        result.work("Required area, API 520 steam equation", "A = 190.5·W / (P1·Kd·Kb·Kc·KN·KSH)  [mm², kg/h, kPa(a)]",
                    "190.5*W/(P1*Kd*Kb*Kc*KN*KSH)", area_se, "mm**2", units_fixed=True,
                    W=(flow, "kg/h"), P1=(p_relieve / 1e3, "kPa"), Kd=(kd, ""), Kb=(kb, ""), Kc=(kc, ""),
                    KN=(kn, ""), KSH=(ksh, ""))
        result.add("relief_required_area_steam_equation", "Required area, API 520 steam equation", area_se, "mm**2")
        areas["steam equation"] = area_se
        difference = (100.0 * (area_se / area_di - 1.0), "percent")
        result.check_limit(
            "Relief area: two methods agree", difference,
            [("<=", (100.0 * AREA_AGREEMENT, "percent"), "warn"), (">=", (-100.0 * AREA_AGREEMENT, "percent"), "warn")],
            Phrase.of("steam equation {steam_equation:.0f} vs direct integration {direct_integration:.0f} "
                      "({difference:+.1f}); the steam equation is Napier's empirical fit with the standard's KSH table, "
                      "the direct integration follows IF97 along the isentrope with homogeneous equilibrium; they "
                      "differ by a few per cent (API 520 Part I)", steam_equation=(area_se, "mm**2"),
                      direct_integration=(area_di, "mm**2"), difference=difference),
            source="API 520 Part I; the 5 % band common practice")
    else:
        result.assumptions.append("API 520 steam equation not used: it holds for critical flow of dry or superheated "
                                  "steam only; the direct integration governs")
    governing = max(areas, key=areas.get)
    area = areas[governing]
    result.add("relief_required_area", f"Required effective area ({governing} governs, the larger)", area, "mm**2")

    orifice = api526_orifice(area)
    if orifice is None:
        result.add("relief_orifice", "API 526 orifice", "larger than T")
        largest = API526_AREAS_IN2[-1][1] * MM2_PER_IN2
        result.check_limit("Relief orifice", (area, "mm**2"), [("<=", (largest, "mm**2"), "fail")],
                           Phrase.of("required {area:.0f} exceeds the T orifice: use several valves or a non-standard "
                                     "valve, and reconsider the fail-open case (a smaller trim or bypass)",
                                     area=(area, "mm**2")), source="API 526")
        return
    letter, orifice_area = orifice
    margin = orifice_area / area - 1.0
    result.add("relief_orifice", "API 526 orifice (smallest large enough)", letter)
    result.add("relief_orifice_area", f"Effective area of the {letter} orifice", orifice_area, "mm**2")
    result.add("relief_capacity_margin", "Relief capacity margin over the relief load", 100.0 * margin, "percent")
    result.work("Relief capacity margin", "margin = A_orifice / A_required − 1", "A_orifice/A_required - 1",
                100.0 * margin, "percent", A_orifice=(orifice_area, "mm**2"), A_required=(area, "mm**2"))
    result.check_limit("Relief orifice", (area, "mm**2"), [("<=", (orifice_area, "mm**2"), "fail")],
                       Phrase.of(f"{letter} orifice, {{orifice:.0f}} effective (API 526) for {{area:.0f}} required: "
                                 "{margin:.0f} margin; the maker's certified capacity governs",
                                 orifice=(orifice_area, "mm**2"), area=(area, "mm**2"), margin=(100.0 * margin, "percent")),
                       source="API 526")
    rated_flow = flow * orifice_area / area
    result.add("relief_rated_flow", "Relief capacity of the selected orifice (same coefficients)", rated_flow, "kg/h")
    schedule = inputs.schedule or DEFAULT_SCHEDULE
    _inlet_loss(inputs, relieving, rated_flow, p_set, atm, schedule, result)
    kappa = sizing_kappa(relieving)
    diameter, described, narrower = valve_outlet_pipe(letter, inputs.relief_discharge_size, schedule,
                                                      "relief.discharge_size")
    if narrower:
        narrow_outlet_warning(result, "Relief discharge line size", described)
    outlet_area = flow_area(diameter) * 1e6
    force, p_exit = reaction_force(rated_flow, relieving.temperature, kappa, outlet_area, atm)
    result.assumptions.append(f"Relief reaction force: open discharge through {described}")
    # API 520 Part II's SI form holds for W in kg/s, T in K (T1 + 273.15 from °C), M in kg/kmol, A_o in mm²
    # and P2 in kPa(g) only.
    result.work("Reaction force of the open discharge",
                "F = 129.41·W·√(kT/((k+1)M)) + 10⁻³·A_o·P2,  T = T1 + 273.15  [API 520 Part II; N, kg/s, °C, "
                "kg/kmol, mm², kPa(g)]",
                "129.41*W*sqrt(k*(T1 + 273.15)/((k + 1)*M)) + 0.001*A_o*P2", force, "N", units_fixed=True,
                W=(rated_flow / 3600, "kg/s"), k=(kappa, ""), T1=(relieving.temperature - 273.15, "degC"),
                M=(MOLAR_MASS_WATER, "kg/kmol"), A_o=(outlet_area, "mm**2"), P2=(p_exit / 1e3, "kPa", "difference"))
    result.add("relief_reaction_force", "Reaction force of the open discharge", force, "N")
    discharge_line_section(inputs, relieving_enthalpy=upstream.enthalpy, rated_flow_kg_h=rated_flow, set_pressure=p_set,
                           atm=atm, valve_type=valve_type, diameter=diameter, result=result,
                           relieving_pressure=p_relieve)


def _back_pressure_check(valve_type, gauge_back, kb_note, result):
    """The back pressure against the conventional valve's limit; other valve types carry it in Kb."""
    back = (100.0 * gauge_back, "percent")
    # The note is the equipment layer's text of Kb and its curve: percentages and a ratio, no unit to convert.
    note = kb_note.replace("{", "{{").replace("}", "}}")
    if valve_type != "conventional":
        result.check("Relief back pressure", "pass", Phrase.of(f"{{back:.0f}} of the gauge set pressure; {note}",
                                                               back=back))
        return
    limit = (100.0 * CONVENTIONAL_BACK_PRESSURE_LIMIT, "percent")
    result.check_limit(
        "Relief back pressure", back, [("<=", limit, "warn")],
        lambda status: Phrase.of(f"{{back:.0f}} of the gauge set pressure; {note}", back=back) if status == "pass"
        else Phrase.of("back pressure {back:.0f} of the gauge set pressure, above the {limit:g} a conventional valve "
                       "tolerates (API 520 Part I): consider a balanced-bellows or pilot-operated valve",
                       back=back, limit=limit),
        source="API 520 Part I")


def _inlet_loss(inputs, relieving, rated_flow, p_set, atm, schedule, result):
    limit = (100.0 * INLET_LOSS_LIMIT, "percent")
    if inputs.relief_inlet_size is None or inputs.relief_inlet_length is None:
        result.check("Relief inlet loss", "warn",
                     Phrase.of("no relief inlet line given (relief.inlet_size, relief.inlet_length): the inlet loss "
                               "must stay below {limit:g} of the set pressure (API 520 Part II)", limit=limit))
        return
    loss = line_drop(relieving, rated_flow / 3600, inputs.relief_inlet_size, schedule, inputs.relief_inlet_length,
                     inputs.relief_inlet_fittings_k, "relief.inlet_size")
    diameter = pipe_inner_diameter(inputs.relief_inlet_size, schedule, field="relief.inlet_size")
    fraction = loss.pressure_drop / (p_set - atm)
    result.work("Relief inlet pressure loss", "Δp = (f·L/D + ΣK)·ρ·v²/2  at the rated flow (Darcy–Weisbach)",
                "(f*L/D + K)*rho*v*v/2", loss.pressure_drop / 1e5, "bar",
                f=(loss.friction_factor, ""), L=(inputs.relief_inlet_length, "m"), D=(diameter * 1e3, "mm"),
                K=(inputs.relief_inlet_fittings_k or 0.0, ""), rho=(relieving.density, "kg/m**3"),
                v=(loss.velocity, "m/s"))
    result.work("Relief inlet loss", "loss = Δp / (p_set − p_atm), of the gauge set pressure", "dp/(p_set - p_atm)",
                100.0 * fraction, "percent", dp=(loss.pressure_drop / 1e5, "bar", "difference"),
                p_set=(p_set / 1e5, "bar"), p_atm=(atm / 1e5, "bar"))
    result.add("relief_inlet_loss_fraction", "Relief inlet loss, of the gauge set pressure", 100.0 * fraction, "percent")
    loss_amount = (100.0 * fraction, "percent")
    result.check_limit(
        "Relief inlet loss", loss_amount, [("<=", limit, "warn")],
        lambda status: Phrase.of(
            "{loss:.1f} of the gauge set pressure, within {limit:g} (API 520 Part II)" if status == "pass" else
            "{loss:.1f} of the gauge set pressure, above {limit:g} (API 520 Part II, inlet piping): the valve may chatter; "
            "enlarge or shorten the inlet line", loss=loss_amount, limit=limit),
        source="API 520 Part II")
