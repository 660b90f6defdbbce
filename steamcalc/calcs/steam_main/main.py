"""The steam main segment by segment: pressure drop, heat loss, the state at each segment's end.

Darcy–Weisbach with the Colebrook friction factor and the fittings' K values, at the segment's inlet
density; where that drop exceeds 10 % of the segment's inlet pressure the isothermal compressible-flow
equation replaces it (fittings as an equivalent length). The static head of a rise or fall is added
at the inlet density. The heat lost through the insulation leaves the steam as a fall in enthalpy at
constant mass flow: h_out = h_in − q'·L/ṁ, and the outlet state is (p_out, h_out) on IF97.
"""

from __future__ import annotations

from dataclasses import dataclass

from ...equipment.line_loss import COMPRESSIBLE_FRACTION, STEEL_ROUGHNESS, line_pressure_drop
from ...equipment.piping import DN_TO_NPS, pipe_dimensions
from ...errors import InputError, OutOfRangeError
from ...properties.steam import SteamState, dynamic_viscosity
from .heat_loss import GRAVITY, surface_loss


@dataclass(frozen=True)
class Segment:
    """One straight run of the main: length, m; nominal size; schedule; fittings' K; rise, m (a fall below 0)."""

    length: float
    size: str
    schedule: str = "40"
    fittings_k: float = 0.0
    rise: float = 0.0

    @classmethod
    def from_row(cls, row):
        length, size, schedule, k, rise = row
        return cls(length, size, schedule or "40", k or 0.0, rise or 0.0)


@dataclass(frozen=True)
class SegmentFlow:
    """What one segment does to the steam."""

    index: int
    segment: Segment
    inner_diameter: float       #: m
    outer_diameter: float       #: m, of the steel
    wall: float                 #: m
    inlet: SteamState
    outlet: SteamState
    velocity: float             #: m/s at the inlet
    reynolds: float
    friction_factor: float
    friction_drop: float        #: Pa, friction and fittings
    static_drop: float          #: Pa, ρ g Δz
    compressible: bool
    loss: object                #: SurfaceLoss of the insulated line
    bare: object                #: SurfaceLoss of the same pipe bare
    heat_loss: float            #: W over the segment


def _friction(mass_flow, state, d_in, segment):
    viscosity = dynamic_viscosity(state.temperature, state.density)
    line = line_pressure_drop(mass_flow, state.density, viscosity, d_in, segment.length, segment.fittings_k)
    compressible = line.pressure_drop > COMPRESSIBLE_FRACTION * state.pressure
    drop = line.pressure_drop
    if compressible:
        from fluids.compressible import isothermal_gas
        equivalent = segment.length + segment.fittings_k * d_in / line.friction_factor
        try:
            outlet = isothermal_gas(state.density, line.friction_factor, P1=state.pressure, L=equivalent, D=d_in,
                                    m=mass_flow)
        except Exception:
            raise InputError("the steam cannot pass this segment at this flow: it would choke", field="segments",
                             value=segment.size, fix="give a larger size for this segment, or a lower steam flow")
        drop = state.pressure - float(outlet)
    return line, drop, compressible


def segment_flows(segments, inlet, mass_flow, ambient, wind, atmosphere, insulation):
    """Walk the main from its inlet state: one :class:`SegmentFlow` per segment."""
    flows, state, lost = [], inlet, 0.0
    for index, segment in enumerate(segments):
        where = f"segments[{index}]"
        d_in, wall = pipe_dimensions(segment.size, segment.schedule, f"{where}.size")
        d_out = d_in + 2.0 * wall
        line, friction_drop, compressible = _friction(mass_flow, state, d_in, segment)
        static = state.density * GRAVITY * segment.rise
        p_out = state.pressure - friction_drop - static
        if p_out <= 0.2 * inlet.pressure:
            raise InputError(f"segment {index + 1} loses {(friction_drop + static) / 1e5:.3g} bar of the "
                             f"{state.pressure / 1e5:.4g} bar(a) it receives", field=f"{where}.size", value=segment.size,
                             fix="give a larger size, or a lower steam flow")
        loss = surface_loss(d_out, state.temperature, ambient, wind, atmosphere, insulation)
        bare = surface_loss(d_out, state.temperature, ambient, wind, atmosphere)
        heat = loss.heat_loss * segment.length
        lost += heat
        water = SteamState.from_p_dryness(p_out, 0.0)
        if state.enthalpy - heat / mass_flow <= water.enthalpy:
            need = lost / (inlet.enthalpy - water.enthalpy)
            raise InputError(f"the main's heat loss condenses all the steam: the first {index + 1} segment(s) lose "
                             f"{lost / 1e3:.3g} kW, more than {mass_flow * 3600:.4g} kg/h of steam gives up in "
                             "condensing", field="steam_flow", value=f"{mass_flow * 3600:.4g} kg/h",
                             fix=f"give the steam flow the user draws, well above the {need * 3600:.3g} kg/h the "
                                 "heat loss alone condenses; or insulate the main (thicker insulation)")
        try:
            outlet = SteamState.from_ph(p_out, state.enthalpy - heat / mass_flow)
        except OutOfRangeError as exc:
            raise exc.for_field(where) from None
        flows.append(SegmentFlow(index, segment, d_in, d_out, wall, state, outlet, line.velocity, line.reynolds,
                                 line.friction_factor, friction_drop, static, compressible, loss, bare, heat))
        state = outlet
    return flows


def size_needed(mass_flow, state, schedule, velocity_limit, drop_per_100m_limit):
    """The smallest standard nominal size whose velocity and drop per 100 m stay within the limits, or None.

    Velocity and drop at the given state (the main's inlet), straight pipe, no fittings.
    """
    viscosity = dynamic_viscosity(state.temperature, state.density)
    for dn in DN_TO_NPS:
        try:
            d_in, _ = pipe_dimensions(f"DN{dn}", schedule)
        except InputError:
            continue
        line = line_pressure_drop(mass_flow, state.density, viscosity, d_in, 100.0)
        if line.velocity <= velocity_limit and line.pressure_drop <= drop_per_100m_limit:
            return f"DN{dn}", d_in, line.velocity, line.pressure_drop
    return None


__all__ = ["Segment", "SegmentFlow", "segment_flows", "size_needed", "STEEL_ROUGHNESS"]
