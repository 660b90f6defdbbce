"""The heater's relief valves' discharge lines: the built-up back pressure against the valve's limit and the
reaction force, for the tube-rupture relief (its steam and its displaced liquid) and the thermal relief.

Each pipe carries its valve's rated flow, not the relief load: a spring-loaded valve, once open, passes its
capacity (API 520 Part II, 5.3.1; common practice). Steam flows isothermally (the conservative basis of
:mod:`steamcalc.equipment.discharge_line`); liquid below its atmospheric boiling point by Darcy-Weisbach
(incompressible); hot liquid that flashes in the pipe as liquid down to its saturation pressure and as a
homogeneous two-phase mixture by the omega equation below it (:mod:`steamcalc.equipment.two_phase_line`).
"""

from __future__ import annotations

import math

from ...equipment.relief import API526_AREAS_IN2, MM2_PER_IN2
from ...equipment.two_phase_relief import KD_SUBCOOLED, isentropic_flux
from ...errors import InputError
from ...properties.steam import SteamState
from ..overpressure import (
    DEFAULT_SCHEDULE, VALVE_TYPES, discharge_diameter, discharge_section, flashing_relief_area, relieving_pressure,
)
from ..relief_liquid_line import liquid_discharge_section
from ..relief_outlet import narrow_outlet_warning, valve_outlet_pipe

#: The outlet pipes: the case-file key of the size, and the inputs in the words of the form.
TUBE_KEYS = ("overpressure.discharge_size", "the tube-rupture relief discharge pipe's size and length")
THERMAL_KEYS = ("overpressure.thermal_discharge_size", "the thermal relief discharge pipe's size and length")
#: The usual smallest thermal relief valve is taken with an API 526 D orifice (common practice): its liquid capacity
#: is what its outlet pipe carries.
THERMAL_ORIFICE = "D"
#: Effective coefficient of discharge for liquid, API 520 Part I (preliminary sizing).
KD_LIQUID = 0.65


def check_discharge_inputs(inputs):
    """Refusals of the heater's outlet-pipe inputs that need no calculation (from ``Inputs.__post_init__``)."""
    if inputs.relief_valve_type is not None and inputs.relief_valve_type not in VALVE_TYPES:
        raise InputError(f"unknown relief valve type '{inputs.relief_valve_type}'", field="overpressure.valve_type",
                         value=inputs.relief_valve_type, fix=f"use one of {', '.join(VALVE_TYPES)}")
    for prefix, example in (("", '"DN100"'), ("thermal_", '"DN25"')):
        keys = {name: f"{prefix}discharge_{name}" for name in ("size", "length", "fittings_k")}
        given = {name: getattr(inputs, key) for name, key in keys.items()}
        for name in ("length", "fittings_k"):
            if given[name] is not None and given[name] < 0.0:
                raise InputError("a pipe length or a sum of loss coefficients cannot be negative",
                                 field=f"overpressure.{keys[name]}", value=given[name],
                                 fix="give the straight length in m and the sum of the fittings' K, 0 or more")
        if any(v is not None for v in given.values()):
            other = next(keys[n] for n, v in given.items() if v is not None)
            for name, sample in (("size", example), ("length", '"6 m"')):
                if given[name] is None:
                    raise InputError(f"a relief discharge pipe is given without its {name}",
                                     field=f"overpressure.{keys[name]}", value=f"{other} = {getattr(inputs, other)}",
                                     fix=f"add {keys[name]} = {sample} to [inputs.overpressure], or remove {other}")
    if inputs.thermal_discharge_size is not None and inputs.process_cp is not None:
        raise InputError("the thermal relief's discharge line needs the liquid's viscosity, known here for water only",
                         field="overpressure.thermal_discharge_size", value=inputs.thermal_discharge_size,
                         fix="remove the thermal relief discharge pipe for a liquid other than water (its line is "
                             "for the relief system's designer)")


def tube_rupture_discharge(inputs, result, name, *, atm, set_pressure, orifice_area, steam, steam_flow, steam_area,
                           liquid, liquid_flow, liquid_area, prefix="tube_rupture",
                           fluids=("steam", "displaced liquid")):
    """The tube-rupture relief valve's outlet pipe: the steam and the liquid, each at the selected orifice's rated
    flow for it (flows kg/h, areas mm²). ``prefix`` and ``fluids`` (the steam's and the liquid's words) name the
    valve's results and steps: the forward valve's by default, the reverse valve's
    (:mod:`steamcalc.calcs.exchanger.reverse_valve`) its own. Returns the two built-up back pressures (Pa, steam's
    first), or None when the pipe is not given or cannot pass a flow."""
    if discharge_diameter(result, name, inputs.discharge_size, inputs.discharge_length, None, TUBE_KEYS) is None:
        return None
    pipe = dict(valve_type=inputs.relief_valve_type or "conventional", set_pressure=set_pressure, atm=atm,
                size=inputs.discharge_size, length=inputs.discharge_length, fittings_k=inputs.discharge_fittings_k,
                keys=TUBE_KEYS)
    steam_back = discharge_section(result, f"{prefix}_steam", f"{name}, {fluids[0]}",
                                   rated_flow_kg_h=steam_flow * orifice_area / steam_area, enthalpy=steam.enthalpy,
                                   relieving_temperature=steam.temperature, **pipe)
    liquid_back = liquid_discharge_section(result, f"{prefix}_liquid", f"{name}, {fluids[1]}",
                                           rated_flow_kg_h=liquid_flow * orifice_area / liquid_area, liquid=liquid,
                                           **pipe)
    if steam_back is None or liquid_back is None:
        return None
    return steam_back, liquid_back


def outlet_size_check(result, prefix, name, size):
    """A warning when the tube-rupture valve's discharge pipe ``size`` is narrower than the outlet API 526 pairs with
    the selected orifice (``<prefix>_orifice``), as for the let-down's relief valve; nothing when no pipe is given."""
    if size is not None:
        # Its bore needs no viscosity: a pipe of a liquid other than water is held to it too.
        _, described, narrower = valve_outlet_pipe(result.value(f"{prefix}_orifice"), size, DEFAULT_SCHEDULE,
                                                   TUBE_KEYS[0])
        if narrower:
            narrow_outlet_warning(result, f"{name}: discharge line size", described)


def discharge_pipe_not_assessed(result, name, inputs, why):
    """A notice that the tube-rupture discharge pipe given is not assessed, and why (nothing when none was given)."""
    if inputs.discharge_size is not None or inputs.discharge_length is not None:
        result.notice(f"{name}: discharge pipe not assessed", "the tube-rupture discharge pipe given "
                      f"(overpressure.discharge_size, discharge_length) is not assessed: {why}")


def flashes_in_valve(liquid, back):
    """A water hotter than its boiling point at the back pressure ``back`` (Pa): it flashes in the valve's nozzle.
    False for None (a liquid other than water, whose boiling point is not known here)."""
    return liquid is not None and liquid.temperature > SteamState.from_p_dryness(back, 0.0).temperature


#: The conditions the liquid equation's step states (the reverse valve's first pass at the atmosphere keeps the
#: words of the records that came before its back pressure).
LIQUID_AREA_CONDITIONS = ", Kw = Kv = 1, P2 the back pressure at the valve outlet"


def liquid_relief_area(result, name, *, valve_type, set_pressure, atm, relieving_pressure, density, flow_kg_h, back,
                       fluid="displaced liquid", conditions=LIQUID_AREA_CONDITIONS, liquid=None, kb=1.0):
    """Required area of a liquid relief by API 520 Part I's liquid equation, as a step; of a water hotter than its
    boiling point at the back pressure, by the flashing-liquid methods of annex C.

    .. math:: A = \\frac{11.78\\,Q}{K_d K_w K_v}\\sqrt{\\frac{G_l}{P_1 - P_2}}

    (mm², Q in L/min, P in kPa), Kv = 1 (a liquid of water's viscosity), Kw 1 for a conventional or pilot valve and
    of figure 32 for a balanced bellows (``fluids.safety_valve.API520_W``).

    Parameters
    ----------
    name, fluid : str
        The step's name and the liquid in words (``"<name>: required area, <fluid>"``).
    valve_type : str
        ``conventional``, ``balanced-bellows`` or ``pilot``.
    set_pressure, atm, relieving_pressure, back : float
        Pa (absolute): the set pressure, the atmosphere, the relieving pressure P1 and the back pressure P2.
    density : float
        The liquid's density at the valve, kg/m³.
    flow_kg_h : float
        The liquid's flow, kg/h.
    conditions : str
        The conditions written after the equation in the step (with Kw = 1).
    liquid : SteamState, optional
        The water at the valve inlet (the relieving pressure, its temperature). Hotter than its boiling point at the
        back pressure, it flashes in the valve's nozzle, where the liquid equation does not hold: it is sized by the
        omega method for subcooled liquid and by direct integration on IF97, the larger governing
        (:func:`steamcalc.calcs.overpressure.flashing_relief_area`). None: a liquid other than water, by the liquid
        equation.
    kb : float
        The balanced-bellows correction of a flashing liquid (API 520 Part I figure 31; 1 for other valves).

    Returns
    -------
    tuple of float
        ``(area mm², Kw)`` (Kw 1 for a flashing liquid in a valve other than a balanced bellows).

    References
    ----------
    API Standard 520 Part I (2020), liquid sizing equation (Kd 0.65 for preliminary sizing) and figure 32; annex C
    (subcooled liquid that flashes: the omega method) and annex B (direct integration).
    """
    from fluids.safety_valve import API520_A_l, API520_W

    flashing = None
    if flashes_in_valve(liquid, back):
        # A water above its boiling point at the valve's outlet flashes in the nozzle: choked two-phase flow passes
        # less than the liquid equation says, so the liquid equation would undersize the valve.
        flashing, _, _ = flashing_relief_area(result, f"{name}, {fluid} flashing in the valve", liquid, flow_kg_h,
                                              back, 1.0 if kb is None else kb)
        note = (f"{name}: the {fluid} is hotter than its boiling point at the valve's outlet, so it flashes in the "
                "nozzle: sized by API 520 Part I annex C, not by the liquid equation"
                + ("" if valve_type != "balanced-bellows" else
                   "; of a balanced-bellows valve, by the larger of annex C's area (Kb of figure 31) and the liquid "
                   "equation's (Kw of figure 32), so that the area never falls as the liquid starts to flash"))
        if note not in result.assumptions:
            result.assumptions.append(note)
        if valve_type != "balanced-bellows":
            return flashing, 1.0
    kw = 1.0
    if valve_type == "balanced-bellows":
        # fluids reads figure 32 with the standard atmosphere: give it the same gauge pressures.
        kw = float(API520_W(101325.0 + set_pressure - atm, 101325.0 + back - atm))
    area = API520_A_l(flow_kg_h / 3600.0, density, relieving_pressure, back, 0.1, Kd=KD_LIQUID, Kw=kw, Kv=1.0) * 1e6
    operands = dict(Q=(flow_kg_h / density / 60.0 * 1e3, "L/min"), Kd=(KD_LIQUID, ""), G_l=(density / 999.0, ""),
                    P1=(relieving_pressure / 1e3, "kPa"), P2=(back / 1e3, "kPa"))
    if kw == 1.0:
        result.work(f"{name}: required area, {fluid}",
                    f"A = 11.78·Q/(Kd·Kw·Kv)·√(G_l/(P1 − P2)){conditions}  [API 520 Part I liquid equation; mm², "
                    "L/min, kPa]", "11.78*Q/Kd*sqrt(G_l/(P1 - P2))", area, "mm**2", units_fixed=True, **operands)
    else:
        result.work(f"{name}: required area, {fluid}",
                    "A = 11.78·Q/(Kd·Kw·Kv)·√(G_l/(P1 − P2)), Kv = 1, Kw of the balanced bellows (API 520 Part I "
                    "figure 32), P2 the back pressure at the valve outlet  [API 520 Part I liquid equation; mm², "
                    "L/min, kPa]", "11.78*Q/(Kd*Kw)*sqrt(G_l/(P1 - P2))", area, "mm**2", units_fixed=True, Kw=(kw, ""),
                    **operands)
    return (area, kw) if flashing is None or area >= flashing else (flashing, kw)


def thermal_relief_capacity(inputs, result, name, *, atm):
    """The relieving pressure of the thermal relief (the process side's design pressure plus 10 %) and the capacity
    of the usual minimum valve, an API 526 D orifice, for the liquid at the process outlet temperature.

    Returns ``(p_r Pa, liquid SteamState or None for a liquid other than water, capacity kg/h, density kg/m³)``.
    """
    set_pressure = inputs.process_side_design_pressure
    p_r = relieving_pressure(set_pressure, atm, result, "thermal_relief", name)
    area = dict(API526_AREAS_IN2)[THERMAL_ORIFICE] * MM2_PER_IN2
    if inputs.process_cp is not None:
        density = inputs.process_density
        rated = KD_LIQUID * area * 1e-6 * math.sqrt(2.0 * density * (p_r - atm)) * 3600.0
        result.work(f"{name}: liquid capacity of the valve ({THERMAL_ORIFICE} orifice)",
                    "W = Kd·A·√(2ρ(P1 − p_atm))  [API 520 Part I liquid equation, Kw = Kv = 1]",
                    "Kd*A*sqrt(2*rho*(P1 - p_atm))", rated, "kg/h", Kd=(KD_LIQUID, ""), A=(area, "mm**2"),
                    rho=(density, "kg/m**3"), P1=(p_r / 1e5, "bar"), p_atm=(atm / 1e5, "bar"))
        return p_r, None, rated, density
    saturation = SteamState.from_p_dryness(p_r, 0.0).temperature
    liquid = SteamState.from_pT(p_r, min(inputs.process_outlet_temperature, saturation - 1.0))
    if flashes_in_valve(liquid, atm):
        # Hot liquid flashes in the nozzle: its flux by direct integration on IF97 (API 520 Part I annex B).
        flux = isentropic_flux(liquid, atm).mass_flux
        rated = KD_SUBCOOLED * area * 1e-6 * flux * 3600.0
        result.work(f"{name}: flashing-liquid capacity of the valve ({THERMAL_ORIFICE} orifice)",
                    "W = Kd·A·G, G by direct integration of the isentrope on IF97  [API 520 Part I annexes B and C]",
                    "Kd*A*G", rated, "kg/h", Kd=(KD_SUBCOOLED, ""), A=(area, "mm**2"), G=(flux, "kg/(m**2*s)"))
    else:
        rated = KD_LIQUID * area * 1e-6 * math.sqrt(2.0 * liquid.density * (p_r - atm)) * 3600.0
        result.work(f"{name}: liquid capacity of the valve ({THERMAL_ORIFICE} orifice)",
                    "W = Kd·A·√(2ρ(P1 − p_atm))  [API 520 Part I liquid equation, Kw = Kv = 1]",
                    "Kd*A*sqrt(2*rho*(P1 - p_atm))", rated, "kg/h", Kd=(KD_LIQUID, ""), A=(area, "mm**2"),
                    rho=(liquid.density, "kg/m**3"), P1=(p_r / 1e5, "bar"), p_atm=(atm / 1e5, "bar"))
    return p_r, liquid, rated, liquid.density


def thermal_relief_discharge(inputs, result, name, *, atm, liquid, rated):
    """The thermal relief valve's outlet pipe, carrying the capacity ``rated`` (kg/h) of its orifice for the liquid
    at the relieving pressure."""
    if discharge_diameter(result, name, inputs.thermal_discharge_size, inputs.thermal_discharge_length, None,
                          THERMAL_KEYS) is None:
        return
    result.assumptions.append(f"{name}: the valve's outlet pipe carries the capacity of an API 526 "
                              f"{THERMAL_ORIFICE} orifice at the relieving pressure: the valve may open fully "
                              "(common practice)")
    liquid_discharge_section(result, "thermal_relief", name, valve_type="conventional",
                             set_pressure=inputs.process_side_design_pressure, atm=atm, rated_flow_kg_h=rated,
                             liquid=liquid, size=inputs.thermal_discharge_size, length=inputs.thermal_discharge_length,
                             fittings_k=inputs.thermal_discharge_fittings_k, keys=THERMAL_KEYS)
