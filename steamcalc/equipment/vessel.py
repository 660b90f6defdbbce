"""Vertical gas–liquid vessel sizing: vapour area, liquid hold-up, nozzle buildability, height.

A vertical flash vessel must be wide enough for three separate reasons, and the
largest governs: the rising vapour must be slow enough to drop its liquid
(Souders–Brown), the liquid hold-up for a residence time must fit in a liquid
section no deeper than the vessel is wide, and the nozzles must fit the shell.
Its height stacks the liquid section, the clearance from the liquid to the inlet
and the disengagement space above the inlet.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

#: Deepest liquid hold-up section as a multiple of the vessel diameter (common practice:
#: the liquid section of a vertical vessel is kept no deeper than the vessel is wide).
MAX_HOLDUP_DEPTH_TO_DIAMETER = 1.0
#: Largest nozzle bore as a fraction of the shell diameter for which the ordinary opening
#: rules apply (ASME BPVC VIII-1 UG-36(b)(1): openings up to one half of the inside diameter, not over 20 in
#: (500 mm), in shells of 60 in (1500 mm) bore and less; one third, not over 40 in (1000 mm), in larger shells;
#: beyond, the supplemental rules of 1-7. The caps and the larger shells' third are not applied here).
MAX_NOZZLE_TO_SHELL = 0.5
#: Liquid level to inlet-nozzle centreline, m, plus half the inlet bore (after Svrcek and
#: Monnery (1993), 12 in + d/2; not confirmed against the paper's text: one implementation of their
#: procedure takes 12 in + d with an inlet diverter).
INLET_CLEARANCE = 0.3
#: Inlet-nozzle centreline to the vapour outlet, m, plus half the inlet bore, and at least half
#: the diameter (after Svrcek and Monnery (1993), 36 in + d/2 or D/2; not confirmed against the paper's
#: text: one implementation of their procedure takes the smaller of the two, not the larger).
DISENGAGEMENT_HEIGHT = 0.9
#: Least height of a vertical flash vessel as a multiple of its diameter (common practice).
MIN_HEIGHT_TO_DIAMETER = 2.5


def vapour_area_diameter(vapour_volume_flow, allowable_velocity):
    """Diameter whose cross-section carries the vapour at the allowable up-flow velocity, m.

    Parameters
    ----------
    vapour_volume_flow : float
        Vapour volume flow, m³/s.
    allowable_velocity : float
        Allowable vapour velocity (Souders–Brown), m/s.

    Notes
    -----
    :math:`D = \\sqrt{4 \\dot V_g / (\\pi v_{allow})}`, with
    :math:`v_{allow} = K \\sqrt{(\\rho_f - \\rho_g)/\\rho_g}`.

    References
    ----------
    Souders, M. and Brown, G. G. (1934), Design of Fractionating Columns I. Entrainment and
    Capacity, Ind. Eng. Chem. 26(1), 98–103.

    Examples
    --------
    >>> round(vapour_area_diameter(0.1, 1.0), 4)
    0.3568
    """
    return math.sqrt(4.0 * vapour_volume_flow / (math.pi * allowable_velocity))


def holdup_volume(liquid_volume_flow, residence_time):
    """Liquid hold-up for a residence time, m³: V = V̇_f · t.

    Parameters
    ----------
    liquid_volume_flow : float
        Liquid leaving the vessel, m³/s.
    residence_time : float
        s.

    Examples
    --------
    >>> holdup_volume(0.001, 60.0)
    0.06
    """
    return liquid_volume_flow * residence_time


def holdup_diameter(volume, depth_to_diameter=MAX_HOLDUP_DEPTH_TO_DIAMETER):
    """Least diameter whose liquid section holds ``volume`` no deeper than r·D, m.

    Parameters
    ----------
    volume : float
        Liquid hold-up, m³.
    depth_to_diameter : float
        Deepest liquid section as a multiple r of the diameter.

    Notes
    -----
    :math:`V = \\frac{\\pi D^2}{4} r D \\Rightarrow D = \\left(\\frac{4 V}{\\pi r}\\right)^{1/3}`
    (cylinder; the liquid in the bottom head is a margin).

    Examples
    --------
    >>> round(holdup_diameter(math.pi / 4), 6)
    1.0
    """
    return (4.0 * volume / (math.pi * depth_to_diameter)) ** (1.0 / 3.0)


def nozzle_minimum_diameter(nozzle_bores, max_ratio=MAX_NOZZLE_TO_SHELL):
    """Least shell diameter for the largest nozzle to be an ordinary opening, m.

    Parameters
    ----------
    nozzle_bores : iterable of float
        Inside diameters of the nozzles, m.
    max_ratio : float
        Largest nozzle bore as a fraction of the shell diameter.

    Notes
    -----
    :math:`D_{min} = d_{max} / r`, r = 0.5.

    References
    ----------
    ASME BPVC Section VIII Division 1, UG-36(b)(1): the rules of UG-36 to UG-43 apply to openings
    of up to one half of the vessel diameter, not over 20 in (500 mm), for vessels of 60 in (1500 mm)
    inside diameter and less; one third, not over 40 in (1000 mm), above; larger openings also meet
    the supplemental rules of 1-7. Only the one-half ratio is applied here.

    Examples
    --------
    >>> nozzle_minimum_diameter([0.0525, 0.154])
    0.308
    >>> nozzle_minimum_diameter([])
    0.0
    """
    bores = list(nozzle_bores)
    return max(bores) / max_ratio if bores else 0.0


@dataclass(frozen=True)
class VesselLayout:
    """Heights of a vertical vessel's sections, m."""

    holdup_depth: float
    inlet_clearance: float
    disengagement: float
    stacked: float
    minimum_by_proportion: float

    @property
    def height(self):
        """Tangent-to-tangent height: the stack of sections, or the proportion minimum if taller."""
        return max(self.stacked, self.minimum_by_proportion)


def vertical_vessel_layout(diameter, holdup, inlet_bore=0.0):
    """Heights of a vertical vessel of a diameter holding a liquid volume.

    Parameters
    ----------
    diameter : float
        Vessel inside diameter, m.
    holdup : float
        Liquid hold-up, m³.
    inlet_bore : float
        Inlet nozzle inside diameter, m (0 when not known).

    Returns
    -------
    VesselLayout

    Notes
    -----
    .. math:: H = \\frac{4 V}{\\pi D^2} + (0.3 + d_N/2) + \\max(0.9 + d_N/2,\\ D/2),
              \\quad H \\ge 2.5 D

    References
    ----------
    Svrcek, W. Y. and Monnery, W. D. (1993), Design Two-Phase Separators Within the Right
    Limits, Chem. Eng. Prog. 89(10), 53–60: the vertical-vessel height stack (the 0.3 m and 0.9 m
    clearances not confirmed against the paper's text).

    Examples
    --------
    >>> layout = vertical_vessel_layout(0.4, 0.05, 0.05)
    >>> round(layout.holdup_depth, 4), round(layout.height, 4)
    (0.3979, 1.6479)
    """
    depth = holdup / (math.pi * diameter ** 2 / 4.0)
    clearance = INLET_CLEARANCE + inlet_bore / 2.0
    disengagement = max(DISENGAGEMENT_HEIGHT + inlet_bore / 2.0, diameter / 2.0)
    return VesselLayout(depth, clearance, disengagement, depth + clearance + disengagement,
                        MIN_HEIGHT_TO_DIAMETER * diameter)
