"""A relief valve's discharge pipe carrying a liquid: the built-up back pressure and the reaction force, or, for a
liquid that flashes in the pipe, the two-phase line (:func:`steamcalc.calcs.overpressure.two_phase_discharge_section`).

Shared by the heater's tube-rupture and thermal relief valves and the flash vessel's relief valve passing liquid.
Units: Pa (absolute), kg/h of rated flow, m.
"""

from __future__ import annotations

from ..equipment.line_loss import line_pressure_drop
from ..equipment.piping import flow_area
from ..properties.steam import SteamState, dynamic_viscosity
from ..units.amounts import Phrase
from .overpressure import DISCHARGE_KEYS, back_pressure_check, discharge_diameter, two_phase_discharge_section


def flashes_in_pipe(liquid, atm):
    """A liquid whose enthalpy, which the pipe keeps, is above the saturated liquid's at the atmosphere ``atm`` (Pa):
    it flashes in the discharge pipe (a compressed liquid a little below its boiling point at the atmosphere does)."""
    return liquid.enthalpy > SteamState.from_p_dryness(atm, 0.0).enthalpy


#: What a liquid line that flashes assumes (since release 0.3.3: the flash point on the liquid's isenthalp, which
#: the step beside it gives, not "its saturation pressure" at its temperature).
FLASHING_LIQUID_WORDS = ("is above its boiling point at the atmosphere: it flashes where the pressure in the discharge "
                         "pipe falls to the saturation pressure at its enthalpy (its flash point, a step below; at the "
                         "pipe's exit when the pipe carries it that far as liquid), and is taken as a homogeneous "
                         "two-phase mixture from there")


def liquid_discharge_section(result, prefix, name, *, valve_type, set_pressure, atm, rated_flow_kg_h, liquid, size,
                             length, fittings_k, keys=DISCHARGE_KEYS):
    """Built-up back pressure of a liquid discharge against the valve's limit, and the reaction force.

    Liquid whose enthalpy is above the saturated liquid's at the atmosphere flashes in the pipe: it goes to
    :func:`steamcalc.calcs.overpressure.two_phase_discharge_section` with its relieving state. A line whose back
    pressure at the rated flow would reach the set pressure fails with no figure, and None is returned.
    """
    if flashes_in_pipe(liquid, atm):
        result.assumptions.append(f"{name}: the liquid ({liquid.temperature - 273.15:.1f} °C) {FLASHING_LIQUID_WORDS}")
        return two_phase_discharge_section(result, prefix, name, valve_type=valve_type, set_pressure=set_pressure,
                                           atm=atm, rated_flow_kg_h=rated_flow_kg_h, relieving=liquid, size=size,
                                           length=length, fittings_k=fittings_k, keys=keys)
    diameter = discharge_diameter(result, name, size, length, None, keys)
    if diameter is None:
        return None
    flow, fittings_k = rated_flow_kg_h / 3600.0, fittings_k or 0.0
    # The liquid at the pipe: its density and viscosity at the atmosphere, the temperature held.
    pipe = SteamState.from_pT(atm, liquid.temperature)
    viscosity = dynamic_viscosity(pipe.temperature, pipe.density)
    line = line_pressure_drop(flow, pipe.density, viscosity, diameter, length, fittings_k)
    area = flow_area(diameter)
    flux = flow / area
    outlet = atm + line.pressure_drop
    if outlet >= set_pressure:
        # No valve passes its rated flow against a back pressure at its set pressure: the figure the rated flow would
        # give is no back pressure the valve sees, so none is given (as the steam's and the two-phase line's).
        resistance = line.friction_factor * length / diameter + fittings_k
        result.check(f"{name}: built-up back pressure", "fail", Phrase.of(
            f"the discharge pipe's resistance ({resistance:.3g} velocity heads, {size}, {length:g} m) would raise the "
            "back pressure to the set pressure {p_set:.4g} or above at the valve's rated flow: the valve could not "
            "pass its flow, and no back pressure or reaction force is given; fix: give a larger or shorter discharge "
            "pipe (at least the valve's outlet)", p_set=(set_pressure / 1e5, "bar")))
        return None
    result.work(f"{name}: built-up back pressure (liquid)",
                "p1 = p_atm + (f·L/D + ΣK)·G²/(2ρ), f by Colebrook  [Darcy-Weisbach, Crane TP-410]",
                "p_atm + (f*L/D + K)*G**2/(2*rho)", outlet / 1e5, "bar", p_atm=(atm / 1e5, "bar"),
                f=(line.friction_factor, ""), L=(length, "m"), D=(diameter * 1e3, "mm"), K=(fittings_k, ""),
                G=(flux, "kg/(m**2*s)"), rho=(pipe.density, "kg/m**3"))
    result.add(f"{prefix}_built_up_back_pressure", f"{name}: built-up back pressure at the valve outlet",
               outlet / 1e5, "bar")
    share = 100.0 * (outlet - atm) / (set_pressure - atm)
    result.work(f"{name}: built-up back pressure, of the gauge set pressure", "share = (p1 − p_atm) / (p_set − p_atm)",
                "(p1 - p_atm)/(p_set - p_atm)", share, "percent", p1=(outlet / 1e5, "bar"), p_atm=(atm / 1e5, "bar"),
                p_set=(set_pressure / 1e5, "bar"))
    result.add(f"{prefix}_built_up_back_pressure_fraction", f"{name}: built-up back pressure, of the gauge set "
               "pressure", share, "percent")
    back_pressure_check(result, name, valve_type, outlet, set_pressure, atm)
    force = flux * flux * area / pipe.density
    result.work(f"{name}: reaction force at the discharge (liquid)",
                "F = G²·A/ρ  [momentum at the open exit, API 520 Part II, open-discharge reaction force]", "G**2*A/rho", force, "N",
                G=(flux, "kg/(m**2*s)"), A=(area * 1e6, "mm**2"), rho=(pipe.density, "kg/m**3"))
    result.add(f"{prefix}_reaction_force", f"{name}: reaction force at the open discharge", force, "N")
    return outlet
