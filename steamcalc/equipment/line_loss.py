"""Pressure drop of a steam line: Darcy–Weisbach with the Colebrook friction factor.

Incompressible form with the density at the line's inlet: good while the drop stays a
small fraction of the pressure (a warning is given above 10 %).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

#: Absolute roughness of commercial steel pipe, m (Moody's chart value, 0.045 mm; common practice).
STEEL_ROUGHNESS = 4.5e-5
#: Line drop above which the caller should warn, Pa per 100 m (common practice for steam
#: mains and let-down station lines: about 0.5 bar difference per 100 m).
DROP_LIMIT_PER_100M = 0.5e5
#: Above this fraction of the line's pressure the incompressible form is not good enough.
COMPRESSIBLE_FRACTION = 0.10


@dataclass(frozen=True)
class LineLoss:
    """Pressure drop of one line."""

    pressure_drop: float      #: Pa
    velocity: float           #: m/s
    reynolds: float
    friction_factor: float    #: Darcy
    resistance: float         #: f·L/D + ΣK, the velocity heads lost


def line_pressure_drop(mass_flow, density, viscosity, inner_diameter, length, fittings_k=0.0,
                       roughness=STEEL_ROUGHNESS):
    """Frictional and fittings pressure drop of a straight line with fittings.

    Parameters
    ----------
    mass_flow : float
        kg/s.
    density : float
        kg/m³ at the line inlet.
    viscosity : float
        Pa·s.
    inner_diameter : float
        m.
    length : float
        m of straight pipe.
    fittings_k : float
        Sum of the fittings' loss coefficients (velocity heads).
    roughness : float
        Absolute roughness, m.

    Returns
    -------
    LineLoss

    Notes
    -----
    .. math:: \\Delta p = \\left(f_D \\frac{L}{D} + \\sum K\\right) \\frac{\\rho v^2}{2}, \\qquad
              \\frac{1}{\\sqrt{f_D}} = -2 \\log_{10}\\left(\\frac{\\varepsilon/D}{3.7}
              + \\frac{2.51}{Re \\sqrt{f_D}}\\right)

    References
    ----------
    Darcy–Weisbach equation; Colebrook, C. F., "Turbulent flow in pipes", J. Inst. Civil
    Eng. 11 (1939) 133–156, solved by ``fluids.friction.Colebrook``; Crane Technical
    Paper 410 for the loss-coefficient method.

    Examples
    --------
    >>> loss = line_pressure_drop(1.0, 5.0, 1.6e-5, 0.1, 20.0, 1.5)
    >>> round(loss.pressure_drop), round(loss.friction_factor, 4)
    (7940, 0.017)
    """
    from fluids.friction import Colebrook

    area = math.pi * inner_diameter ** 2 / 4.0
    velocity = mass_flow / (density * area)
    reynolds = density * velocity * inner_diameter / viscosity
    f = float(Colebrook(reynolds, roughness / inner_diameter))
    resistance = f * length / inner_diameter + fittings_k
    return LineLoss(resistance * density * velocity ** 2 / 2.0, velocity, reynolds, f, resistance)
