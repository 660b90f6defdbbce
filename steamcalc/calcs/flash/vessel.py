"""The flash calculation's vessel and lines: size, height, inlet momentum, nozzle velocities.

Worked steps, results and checks for the record; the sizing arithmetic itself is in
:mod:`steamcalc.equipment.vessel` and :mod:`steamcalc.equipment.piping`.
"""

from __future__ import annotations

import math

from ...equipment.piping import (
    MAX_FLASHING_CONDENSATE_VELOCITY, erosional_velocity, homogeneous_density, line_velocity, momentum_flux,
    pipe_inner_diameter, two_phase_velocity,
)
from ...equipment.vessel import (
    DISENGAGEMENT_HEIGHT, INLET_CLEARANCE, MAX_HOLDUP_DEPTH_TO_DIAMETER, MAX_NOZZLE_TO_SHELL,
    MIN_HEIGHT_TO_DIAMETER, holdup_diameter, holdup_volume, nozzle_minimum_diameter, vapour_area_diameter,
    vertical_vessel_layout,
)
from ...units.amounts import Phrase

#: Souders–Brown K for a vertical flash vessel without a mist eliminator, m/s (common practice).
DEFAULT_K_FACTOR = 0.06
#: Liquid residence time of a flash vessel drained continuously by a trap or level control, s
#: (common practice: the low end of the 1–3 min usual for vertical gas–liquid separators).
DEFAULT_RESIDENCE_TIME = 60.0
#: Inlet-nozzle momentum flux ρv² above which a plain or tangential inlet without an inlet device
#: shatters the liquid into fine, re-entrained droplets, Pa (common practice in separator design
#: guides; the figure not confirmed against a published guide).
MAX_INLET_MOMENTUM = 1400.0
#: Flash-steam outlet velocity above which carry-over and noise are likely, m/s (common practice).
MAX_STEAM_NOZZLE_VELOCITY = 25.0
#: Condensate outlet velocity above which the drain may not keep up, m/s (common practice).
MAX_CONDENSATE_NOZZLE_VELOCITY = 1.5
#: One lb/ft³ in kg/m³ (international pound 0.45359237 kg, foot 0.3048 m): API RP 14E's density unit.
LB_PER_FT3 = 0.45359237 / 0.3048 ** 3

REFERENCES = (
    "Souders, M. and Brown, G. G. (1934), Design of Fractionating Columns I. Entrainment and "
    "Capacity, Ind. Eng. Chem. 26(1), 98-103",
    "Svrcek, W. Y. and Monnery, W. D. (1993), Design Two-Phase Separators Within the Right Limits, "
    "Chem. Eng. Prog. 89(10), 53-60 (vertical-vessel height stack)",
    "ASME BPVC Section VIII Division 1, UG-36(b)(1) (openings up to half the shell diameter)",
    "Homogeneous equilibrium model of two-phase flow (Collier and Thome, Convective Boiling and "
    "Condensation, ch. 2)",
    "API RP 14E (2000), erosional velocity equation 2.14 (for information only)",
)


def vessel_assumptions(inputs):
    """The assumption lines of the vessel basis, with the defaults actually taken."""
    lines = []
    if inputs.vapour_velocity is None and inputs.k_factor is None:
        lines.append(f"Souders–Brown K = {DEFAULT_K_FACTOR} m/s for a vertical flash vessel without a mist "
                     "eliminator (common practice; not given)")
    if inputs.residence_time is None:
        lines.append(f"Liquid residence time {DEFAULT_RESIDENCE_TIME / 60:g} min on the residual condensate, for a "
                     "vessel drained continuously by a trap or level control (common practice: the low end of "
                     "the 1–3 min usual for vertical gas–liquid separators; not given: give the "
                     "vessel's residence time to change it)")
    lines.extend([
        "Vessel diameter is the largest of: the Souders–Brown vapour area; the liquid hold-up in a liquid "
        f"section no deeper than {MAX_HOLDUP_DEPTH_TO_DIAMETER:g} × the diameter (common practice); and "
        f"{1 / MAX_NOZZLE_TO_SHELL:g} × the largest nozzle bore, so that every nozzle is an ordinary opening "
        "(ASME VIII-1 UG-36(b)(1): its rules cover an opening of up to one half of the inside diameter in the "
        "smaller shells and one third in the larger, each with a cap on the opening's size, not checked here)",
        f"Vessel height stacks the liquid section, {INLET_CLEARANCE:g} m + half the inlet bore from the liquid "
        f"to the inlet, and {DISENGAGEMENT_HEIGHT:g} m + half the inlet bore (at least half the diameter) above "
        "the inlet (after Svrcek and Monnery 1993; these clearances not confirmed against the paper's text); "
        f"at least {MIN_HEIGHT_TO_DIAMETER:g} × the diameter (common practice)",
        f"Inlet line judged by its homogeneous two-phase velocity against {MAX_FLASHING_CONDENSATE_VELOCITY:g} m/s "
        "(common practice for flashing-condensate lines: the velocity steam-system guides give for condensate "
        f"return headers) and by its momentum flux ρv² against {MAX_INLET_MOMENTUM:g} Pa for an inlet without an "
        "inlet device (common practice)",
        "API RP 14E erosional velocity shown for information only: it was written for offshore oil-and-gas "
        "production piping and is outside its scope for flashing steam condensate",
    ])
    if inputs.stages is not None:
        lines.append("Cascade: each stage vessel is sized for its own flash and condensate, with the same "
                     "nozzle sizes taken for every stage")
    return lines


def _bores(inputs):
    bores = {}
    for name in ("inlet_nozzle", "steam_nozzle", "condensate_nozzle"):
        size = getattr(inputs, name)
        if size is not None:
            bores[name] = pipe_inner_diameter(size, field=f"vessel.{name}")
    return bores


def vessels(inputs, stages, result, v_souders_brown):
    """Size each stage's vessel; add the steps, results and checks to ``result``."""
    k = inputs.k_factor if inputs.k_factor is not None else DEFAULT_K_FACTOR
    residence = inputs.residence_time if inputs.residence_time is not None else DEFAULT_RESIDENCE_TIME
    bores = _bores(inputs)
    d_build = nozzle_minimum_diameter(bores.values())
    inlet_bore = bores.get("inlet_nozzle", 0.0)
    cascade = inputs.stages is not None
    biggest = None
    for s in stages:
        vapour, liquid = s["vapour"], s["liquid"]
        label = f"Stage {s['index']}" if cascade else "Vessel"
        if inputs.vapour_velocity is not None:
            allowed = inputs.vapour_velocity
            result.work(f"{label}: allowable vapour velocity", "v_allow = given", "v_given", allowed, "m/s",
                        v_given=(allowed, "m/s"))
        else:
            allowed = v_souders_brown(k, liquid.density, vapour.density)
            result.work(f"{label}: allowable vapour velocity", "v_allow = K·√((ρ_f − ρ_g)/ρ_g)",
                        "K*sqrt((rho_f - rho_g)/rho_g)", allowed, "m/s", K=(k, "m/s"),
                        rho_f=(liquid.density, "kg/m**3"), rho_g=(vapour.density, "kg/m**3"))
        vapour_flow = s["steam_flow"] / vapour.density
        d_vapour = vapour_area_diameter(vapour_flow, allowed)
        result.work(f"{label}: diameter for the vapour area", "D_v = √(4·(m_flash/ρ_g) / (π·v_allow))",
                    "sqrt(4*(m_flash/rho_g)/(pi*v_allow))", d_vapour, "m", m_flash=(s["steam_flow"] * 3600, "kg/h"),
                    rho_g=(vapour.density, "kg/m**3"), pi=(math.pi, ""), v_allow=(allowed, "m/s"))
        liquid_flow = s["residual_flow"] / s["residual"].density
        holdup = holdup_volume(liquid_flow, residence)
        d_holdup = holdup_diameter(holdup)
        # The diameter first: the step's value is D_L, so the written equation opens with it.
        result.work(f"{label}: diameter for the liquid hold-up",
                    "D_L = (4·V_L / (π·r))^(1/3), V_L = (m_res/ρ_f)·t_res",
                    "(4*(m_res/rho_f)*t_res/(pi*r))**(1/3)", d_holdup, "m",
                    m_res=(s["residual_flow"] * 3600, "kg/h"), rho_f=(s["residual"].density, "kg/m**3"),
                    t_res=(residence / 60, "min"), pi=(math.pi, ""), r=(MAX_HOLDUP_DEPTH_TO_DIAMETER, ""))
        criteria = {"vapour area": d_vapour, "liquid hold-up": d_holdup}
        if bores:
            largest = max(bores, key=bores.get)
            result.work(f"{label}: diameter for the nozzles", "D_N = d_max / 0.5", f"d_max/{MAX_NOZZLE_TO_SHELL!r}",
                        d_build, "m", d_max=(bores[largest] * 1000, "mm"))
            criteria["nozzle buildability"] = d_build
        governs = max(criteria, key=criteria.get)
        diameter = criteria[governs]
        layout = vertical_vessel_layout(diameter, holdup, inlet_bore)
        result.work(f"{label}: diameter", "D = max(D_v, D_L" + (", D_N)" if bores else ")"),
                    "max(D_v, D_L, D_N)" if bores else "max(D_v, D_L)", diameter, "m", D_v=(d_vapour, "m"),
                    D_L=(d_holdup, "m"), **({"D_N": (d_build, "m")} if bores else {}))
        result.work(f"{label}: height", "H = max(h_L + h_in + h_d, 2.5·D)",
                    f"max(h_L + h_in + h_d, {MIN_HEIGHT_TO_DIAMETER!r}*D)", layout.height, "m",
                    h_L=(layout.holdup_depth, "m"), h_in=(layout.inlet_clearance, "m"), h_d=(layout.disengagement, "m"),
                    D=(diameter, "m"))
        if cascade:
            prefix = f"stage_{s['index']}_"
            result.add(f"{prefix}vessel_diameter", f"{label} vessel diameter", diameter, "m")
            result.add(f"{prefix}vessel_height", f"{label} vessel height", layout.height, "m")
        if biggest is None or diameter > biggest[0]:
            biggest = (diameter, layout, governs, d_vapour, d_holdup, holdup)
    diameter, layout, governs, d_vapour, d_holdup, holdup = biggest
    suffix = " (largest stage)" if cascade else ""
    result.add("vessel_diameter", "Flash vessel diameter" + suffix, diameter, "m")
    result.add("vessel_height", "Flash vessel height (tangent to tangent)" + suffix, layout.height, "m")
    result.add("vessel_minimum_height", "Flash vessel minimum height (2.5 × diameter)" + suffix,
               MIN_HEIGHT_TO_DIAMETER * diameter, "m")
    result.add("vessel_governing_criterion", "Criterion that sets the vessel diameter" + suffix, governs)
    result.add("vessel_vapour_diameter", "Diameter for the vapour area (Souders–Brown)" + suffix, d_vapour, "m")
    result.add("vessel_holdup_diameter", "Diameter for the liquid hold-up" + suffix, d_holdup, "m")
    result.add("vessel_liquid_holdup", "Liquid hold-up" + suffix, holdup, "m**3")
    result.add("vessel_residence_time", "Liquid residence time", residence / 60.0, "min")
    if bores:
        result.add("vessel_nozzle_diameter", "Least diameter for the nozzles", d_build, "m")
    template = (f"{{diameter:.3f}}, set by the {governs} (vapour area {{vapour:.3f}}, liquid hold-up {{holdup:.3f}}"
                + (", nozzles {nozzles:.3f})" if bores else ")"))
    sizes = {"diameter": (diameter, "m"), "vapour": (d_vapour, "m"), "holdup": (d_holdup, "m"),
             **({"nozzles": (d_build, "m")} if bores else {})}
    if bores:
        result.check("Vessel diameter", "pass", Phrase.of(template, **sizes))
    else:
        # Without the nozzle sizes the buildability criterion cannot be applied: the vessel may be too
        # narrow for its own steam outlet.
        result.check("Vessel diameter", "warn", Phrase.of(
            template + ": no nozzle sizes given, so the vessel is not checked against its nozzles (a nozzle above "
            "half the shell diameter is no ordinary opening); give the nozzle sizes", **sizes))
    nozzles(inputs, stages, bores, result)


def nozzles(inputs, stages, bores, result):
    """Inlet line two-phase velocity and momentum; steam and condensate outlet velocities."""
    first, last = stages[0], stages[-1]
    if "inlet_nozzle" in bores:
        d = bores["inlet_nozzle"]
        # After the inlet valve or trap the condensate has flashed: the line carries the
        # first stage's mixture at its pressure (homogeneous model).
        x, rho_f, rho_g = first["fraction"], first["liquid"].density, first["vapour"].density
        rho = homogeneous_density(x, rho_f, rho_g)
        velocity = two_phase_velocity(first["flow_in"], x, rho_f, rho_g, d)
        momentum = momentum_flux(first["flow_in"], rho, d)
        erosional = erosional_velocity(rho)
        result.add("inlet_line_velocity", "Two-phase (homogeneous) velocity in the inlet line", velocity, "m/s")
        result.add("inlet_momentum", "Inlet nozzle momentum flux ρv²", momentum, "Pa")
        result.add("inlet_line_erosional_velocity",
                   "API RP 14E erosional velocity (information only)",
                   erosional, "m/s")
        # Squares written as products: a view writes "28.9 m/s × 28.9 m/s", never the misreadable "28.9 m/s^2".
        result.work("Inlet line two-phase velocity", "v_h = m / (ρ_h·A), 1/ρ_h = x/ρ_g + (1 − x)/ρ_f",
                    "m*(x/rho_g + (1 - x)/rho_f)/(pi*d*d/4)", velocity, "m/s", m=(first["flow_in"] * 3600, "kg/h"),
                    x=(x, ""), rho_g=(rho_g, "kg/m**3"), rho_f=(rho_f, "kg/m**3"), pi=(math.pi, ""), d=(d * 1000, "mm"))
        result.work("Inlet nozzle momentum flux", "ρv² = ρ_h · v_h²", "rho_h*v_h*v_h", momentum, "Pa",
                    rho_h=(rho, "kg/m**3"), v_h=(velocity, "m/s"))
        # API RP 14E's C = 100 holds for ft/s with ρ in lb/ft³: the density in those units, the result
        # brought back to m/s by 0.3048 m/ft.
        result.work("API RP 14E erosional velocity (information only)", "V_e = C/√ρ_m, C = 100 (US units)",
                    "100/sqrt(rho_m)*0.3048", erosional, "m/s", units_fixed=True,
                    rho_m=(rho / LB_PER_FT3, "lb/ft**3"))
        velocity_limit = (MAX_FLASHING_CONDENSATE_VELOCITY, "m/s")
        result.check_limit("Inlet line two-phase velocity", (velocity, "m/s"), [("<=", velocity_limit, "warn")],
                           lambda status: Phrase.of(
                               "homogeneous {velocity:.1f} (limit {limit:g} for flashing condensate, common practice)"
                               + ("; a larger inlet line is needed" if status == "warn" else "")
                               + "; API RP 14E erosional velocity {erosional:.1f} shown for information only",
                               velocity=(velocity, "m/s"), limit=velocity_limit, erosional=(erosional, "m/s")),
                           source="common practice")
        momentum_limit = (MAX_INLET_MOMENTUM, "Pa")
        result.check_limit("Inlet nozzle momentum", (momentum, "Pa"), [("<=", momentum_limit, "warn")],
                           lambda status: Phrase.of(
                               "ρv² = {momentum:,.0f} (limit {limit:,.0f} without an inlet device, common practice)"
                               + ("; enlarge the inlet nozzle or fit an inlet device rated for it"
                                  if status == "warn" else ""),
                               momentum=(momentum, "Pa"), limit=momentum_limit),
                           source="common practice")
    if "steam_nozzle" in bores and last["steam_flow"] > 0.0:
        velocity = line_velocity(last["steam_flow"], last["vapour"].density, bores["steam_nozzle"])
        result.add("steam_nozzle_velocity", "Flash-steam outlet velocity", velocity, "m/s")
        limit = (MAX_STEAM_NOZZLE_VELOCITY, "m/s")
        result.check_limit("Steam outlet velocity", (velocity, "m/s"), [("<=", limit, "warn")],
                           Phrase.of("{velocity:.1f} (limit {limit:g}, common practice)", velocity=(velocity, "m/s"),
                                     limit=limit), source="common practice")
    if "condensate_nozzle" in bores:
        velocity = line_velocity(last["residual_flow"], last["liquid"].density, bores["condensate_nozzle"])
        result.add("condensate_nozzle_velocity", "Residual condensate outlet velocity", velocity, "m/s")
        limit = (MAX_CONDENSATE_NOZZLE_VELOCITY, "m/s")
        result.check_limit("Condensate outlet velocity", (velocity, "m/s"), [("<=", limit, "warn")],
                           Phrase.of("{velocity:.2f} (limit {limit:g}, common practice)", velocity=(velocity, "m/s"),
                                     limit=limit), source="common practice")
