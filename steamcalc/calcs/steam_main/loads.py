"""Condensate loads of a main, its drip points, and the trap each drip point needs.

Running load: the heat lost through the insulation, condensed at the latent heat of the main,
:math:`\\dot m_r = q' L / h_{fg}`. Warm-up load: the steel and insulation heated from the air to the
steam's saturation temperature over the warm-up time, plus the heat lost meanwhile (half the running
loss: the loss grows from zero as the line heats),

.. math:: \\dot m_w = \\frac{M_s c_s (T_{sat} - T_a) + M_i c_i (T_{sat} - T_a)/2}{h_{fg}\\, t_w}
          + \\frac{\\dot m_r}{2}

(the insulation heats, on average, to half the rise).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

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


def segment_loads(flow, saturation, ambient, latent, warmup_time):
    """(running load, warm-up load) of one segment, kg/s, by the equations of this module."""
    running = flow.heat_loss / latent
    steel, insulation = warmup_mass(flow)
    rise = saturation - ambient
    heat = steel * STEEL_SPECIFIC_HEAT * rise + insulation * INSULATION_SPECIFIC_HEAT * rise / 2.0
    return running, heat / (latent * warmup_time) + running / 2.0


def drip_positions(flows, spacing):
    """Drip points: at each riser's foot, along level runs at the spacing, and at the end of the main.

    Returns a list of (distance m, segment index, reason).
    """
    points, start, since = [], 0.0, 0.0
    for i, flow in enumerate(flows):
        length = flow.segment.length
        if flow.segment.rise > 0.0 and start > 0.0 and not (points and abs(points[-1][0] - start) < 1e-6):
            points.append((start, i - 1, "foot of a riser"))
            since = 0.0
        position = spacing - since
        while position < length - 1e-6 and flow.segment.rise <= 0.0:
            points.append((start + position, i, "spacing along the run"))
            position += spacing
        since = (since + length) % spacing if flow.segment.rise <= 0.0 else 0.0
        start += length
    if not points or abs(points[-1][0] - start) > 1e-6:
        points.append((start, len(flows) - 1, "end of the main, before the user"))
    return points


def leg_size(main_size_dn):
    """Drip leg nominal size and depth (m) for a main of a DN (common practice)."""
    size = main_size_dn if main_size_dn <= 100 else max(100, main_size_dn // 2)
    return f"DN{size}", max(MIN_LEG_DEPTH, main_size_dn / 1000.0)
