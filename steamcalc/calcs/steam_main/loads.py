"""Condensate loads of a main, its drip points, and the trap each drip point needs.

Running load: the heat lost through the insulation condenses steam only once the steam has given up its
superheat; a superheated main makes no condensate while its steam stays above saturation. Per segment,

.. math:: \\dot m_r = \\frac{\\max(0,\\; q' L - \\dot m \\max(0, h_1 - h_g(p_1)))}{h_{fg}(p_1)}

with :math:`h_1, p_1` the segment's inlet state (the same enthalpy balance that gives the main's states on
IF97). Warm-up load: the steel and insulation heated from the air to the supply temperature over the warm-up
time, all that heat taken as condensate at the latent heat (conservative: the superheat the warming steam
brings, which lessens the condensate, is left out), plus half the heat lost meanwhile as condensate (the loss
grows from zero as the line heats; while the line warms the steam condenses on it),

.. math:: \\dot m_w = \\frac{M_s c_s (T_1 - T_a) + M_i c_i (T_1 - T_a)/2}{h_{fg}\\, t_w}
          + \\frac{q' L}{2 h_{fg}}

(the insulation heats, on average, to half the rise).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ...properties.steam import SteamState

#: Density of carbon steel, kg/m³ (common practice).
STEEL_DENSITY = 7850.0
#: Specific heat of carbon steel, J/(kg·K) (common practice, about 0.49 kJ/(kg·K) at 20-200 °C).
STEEL_SPECIFIC_HEAT = 490.0
#: Mineral-wool pipe section: density kg/m³ and specific heat J/(kg·K) (common practice).
INSULATION_DENSITY = 100.0
INSULATION_SPECIFIC_HEAT = 840.0
#: Drip leg (collecting pocket) diameter against the main's, and depth (common practice: the leg as large as
#: the main up to DN100, half the main above with at least DN100; depth at least 700 mm, or the main's size
#: for large mains, to hold the warm-up surge).
MIN_LEG_DEPTH = 0.7

#: Trap types a practising engineer would weigh, in general words (common practice).
DRIP_TRAP_TYPES = ("thermodynamic (disc) trap", "inverted bucket trap",
                   "float-and-thermostatic trap where air must be vented at warm-up")
HEATER_TRAP_TYPES = ("float-and-thermostatic trap (continuous discharge, vents air; suits a modulating heater)",
                     "pump-trap combination where the steam-space pressure can fall below the back pressure")


@dataclass(frozen=True)
class DripPoint:
    """A drip leg on the main: where it is, what it drains, and its loads (kg/s)."""

    number: int
    distance: float         #: m from the header
    reason: str
    segment: int            #: index of the segment it ends or sits on
    pressure: float         #: Pa at the drip point
    running_load: float     #: kg/s
    warmup_load: float      #: kg/s
    leg_size: str
    leg_depth: float        #: m


def warmup_mass(flow):
    """(steel mass, insulation mass) of a segment, kg."""
    d_out, d_in, length = flow.outer_diameter, flow.inner_diameter, flow.segment.length
    steel = STEEL_DENSITY * math.pi / 4.0 * (d_out ** 2 - d_in ** 2) * length
    outer = flow.loss.outer_diameter
    insulation = INSULATION_DENSITY * math.pi / 4.0 * (outer ** 2 - d_out ** 2) * length
    return steel, insulation


def superheat_given_up(flow):
    """Heat the steam gives up as superheat over a segment before it reaches saturation, W (0 for wet or
    saturated steam at the inlet): :math:`\\dot m \\max(0, h_1 - h_g(p_1))`, never more than the heat lost."""
    if flow.heat_loss <= 0.0:
        return 0.0
    mass_flow = flow.heat_loss / (flow.inlet.enthalpy - flow.outlet.enthalpy)
    h_g = SteamState.from_p_dryness(flow.inlet.pressure, 1.0).enthalpy
    return min(flow.heat_loss, mass_flow * max(0.0, flow.inlet.enthalpy - h_g))


def segment_loads(flow, warm_temperature, ambient, latent, warmup_time):
    """(running load, warm-up load) of one segment, kg/s, by the equations of this module.

    ``warm_temperature`` (K) is the temperature the steel and insulation are brought to (the supply steam's);
    ``latent`` (J/kg) the latent heat at the segment's pressure.
    """
    running = max(0.0, flow.heat_loss - superheat_given_up(flow)) / latent
    steel, insulation = warmup_mass(flow)
    rise = warm_temperature - ambient
    heat = steel * STEEL_SPECIFIC_HEAT * rise + insulation * INSULATION_SPECIFIC_HEAT * rise / 2.0
    return running, heat / (latent * warmup_time) + flow.heat_loss / latent / 2.0


#: A segment rising more steeply than this (rise over length) is a riser: its condensate runs back to its foot,
#: and the count toward the next spacing drip restarts at its top. A run rising more gently is drained like a
#: level run, a drip leg at the spacing (common practice).
RISER_SLOPE = 0.1


def drip_positions(flows, spacing):
    """Drip points: at each low point where the main starts to rise (a riser's foot), along every run that is not
    a riser (level, falling or gently rising) at the spacing, and at the end of the main.

    Returns a list of (distance m, segment index, reason).

    Examples
    --------
    >>> from types import SimpleNamespace as S
    >>> run = lambda length, rise=0.0: S(segment=S(length=length, rise=rise))
    >>> [p[0] for p in drip_positions([run(200.0, 0.8)], 50.0)]
    [50.0, 100.0, 150.0, 200.0]
    >>> [(p[0], p[2]) for p in drip_positions([run(72.0), run(3.0, 3.0), run(75.0)], 75.0)]
    [(72.0, 'foot of a riser'), (150.0, 'end of the main, before the user')]
    """
    points, start, since = [], 0.0, 0.0
    for i, flow in enumerate(flows):
        length, rise = flow.segment.length, flow.segment.rise
        riser = rise > RISER_SLOPE * length
        if rise > 0.0 and start > 0.0 and not (points and abs(points[-1][0] - start) < 1e-6):
            points.append((start, i - 1, "foot of a riser" if riser else "low point, where the main starts to rise"))
            since = 0.0
        if riser:
            since = 0.0
        else:
            position = spacing - since
            while position < length - 1e-6:
                points.append((start + position, i, "spacing along the run"))
                position += spacing
            since = length - (position - spacing)
        start += length
    if not points or abs(points[-1][0] - start) > 1e-6:
        points.append((start, len(flows) - 1, "end of the main, before the user"))
    return points


def leg_size(main_size_dn):
    """Drip leg nominal size and depth (m) for a main of a DN (common practice)."""
    size = main_size_dn if main_size_dn <= 100 else max(100, main_size_dn // 2)
    return f"DN{size}", max(MIN_LEG_DEPTH, main_size_dn / 1000.0)
