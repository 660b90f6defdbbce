"""The condensate return line: the traps' discharge flashing into a line that runs two-phase to a receiver.

The condensate from all traps, each saturated at its trap's inlet pressure, mixes at the receiver's
pressure: :math:`h_{mix} = \\sum \\dot m_i h_f(p_i) / \\sum \\dot m_i`, and the part that flashes is
:math:`x = (h_{mix} - h_f(p_r))/h_{fg}(p_r)`. The frictional drop of the two-phase flow is by
Müller-Steinhagen and Heck (through ``fluids.two_phase.two_phase_dP``) at the receiver's pressure
(where the flash is greatest); the homogeneous velocity judges erosion and hammer.
"""

from __future__ import annotations

from dataclasses import dataclass

from ...equipment.line_loss import STEEL_ROUGHNESS
from ...equipment.piping import DN_TO_NPS, flow_area, pipe_dimensions, two_phase_velocity
from ...errors import InputError
from ...properties.steam import SteamState, dynamic_viscosity

#: The two-phase correlation, by its name in ``fluids``.
METHOD = "Muller_Steinhagen_Heck"
METHOD_REFERENCE = ("Müller-Steinhagen, H. and Heck, K. (1986), A simple friction pressure drop correlation for "
                    "two-phase flow in pipes, Chem. Eng. Process. 20(6), 297-308 (through fluids.two_phase.two_phase_dP)")
#: Velocity of water alone at which condensate lines are commonly sized, m/s (common practice).
WATER_ALONE_VELOCITY = 1.5


@dataclass(frozen=True)
class ReturnFlow:
    """The two-phase flow in a return line of one size."""

    mixed_enthalpy: float   #: J/kg
    dryness: float          #: flash fraction at the receiver
    liquid: SteamState
    vapour: SteamState
    inner_diameter: float   #: m
    velocity: float         #: m/s, homogeneous
    water_velocity: float   #: m/s, the same flow as water alone
    friction_drop: float    #: Pa
    lift_head: float        #: Pa, the lift as a column of water


def mixed_enthalpy(sources):
    """Enthalpy of condensate from several traps mixed, J/kg; ``sources`` are (flow kg/s, trap inlet pressure Pa)."""
    total = sum(m for m, _ in sources)
    return sum(m * SteamState.from_p_dryness(p, 0.0).enthalpy for m, p in sources) / total


def two_phase_drop(mass_flow, dryness, liquid, vapour, inner_diameter, length):
    """Frictional drop of a flashing line, Pa, by Müller-Steinhagen and Heck (fluids)."""
    from fluids.two_phase import two_phase_dP

    if dryness <= 0.0:
        from ...equipment.line_loss import line_pressure_drop
        mu = dynamic_viscosity(liquid.temperature, liquid.density)
        return line_pressure_drop(mass_flow, liquid.density, mu, inner_diameter, length).pressure_drop
    return float(two_phase_dP(mass_flow, dryness, liquid.density, inner_diameter, length, rhog=vapour.density,
                              mul=dynamic_viscosity(liquid.temperature, liquid.density),
                              mug=dynamic_viscosity(vapour.temperature, vapour.density), roughness=STEEL_ROUGHNESS,
                              Method=METHOD))


def return_flow(sources, receiver_pressure, size, schedule, length, lift, field="return_line.size"):
    """The flow in a return line of a given size, from its traps to the receiver."""
    from .heat_loss import GRAVITY

    liquid = SteamState.from_p_dryness(receiver_pressure, 0.0)
    vapour = SteamState.from_p_dryness(receiver_pressure, 1.0)
    h_mix = mixed_enthalpy(sources)
    dryness = max(0.0, (h_mix - liquid.enthalpy) / (vapour.enthalpy - liquid.enthalpy))
    d_in, _ = pipe_dimensions(size, schedule, field)
    flow = sum(m for m, _ in sources)
    velocity = two_phase_velocity(flow, dryness, liquid.density, vapour.density, d_in)
    water = flow / (liquid.density * flow_area(d_in))
    drop = two_phase_drop(flow, dryness, liquid, vapour, d_in, length)
    return ReturnFlow(h_mix, dryness, liquid, vapour, d_in, velocity, water, drop, liquid.density * GRAVITY * lift)


def return_size_needed(sources, receiver_pressure, schedule, length, lift, velocity_limit, drop_limit):
    """The smallest standard size within the velocity and drop limits: (size, ReturnFlow), or None."""
    for dn in DN_TO_NPS:
        try:
            flow = return_flow(sources, receiver_pressure, f"DN{dn}", schedule, length, lift)
        except InputError:
            continue
        if flow.velocity <= velocity_limit and flow.friction_drop <= drop_limit:
            return f"DN{dn}", flow
    return None


def water_alone_size(flow_rate, density, schedule):
    """The size a line would get if sized for its condensate as water alone at WATER_ALONE_VELOCITY."""
    for dn in DN_TO_NPS:
        try:
            d_in, _ = pipe_dimensions(f"DN{dn}", schedule)
        except InputError:
            continue
        if flow_rate / (density * flow_area(d_in)) <= WATER_ALONE_VELOCITY:
            return f"DN{dn}", d_in
    return None
