"""Pressure drop of a steam line: Darcy–Weisbach with the Colebrook friction factor.

Incompressible form with the density at the line's inlet: good while the drop stays a
small fraction of the pressure (a warning is given above 10 %). The flow, density and
viscosity may be numpy arrays (one line state per element, as Monte Carlo samples do).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import NotConvergedError

#: Absolute roughness of commercial steel pipe, m (Moody's chart value, 0.045 mm; common practice).
STEEL_ROUGHNESS = 4.5e-5
#: Line drop above which the caller should warn, Pa per 100 m (common practice for steam
#: mains and let-down station lines: about 0.5 bar difference per 100 m).
DROP_LIMIT_PER_100M = 0.5e5
#: Above this fraction of the line's pressure the incompressible form is not good enough.
COMPRESSIBLE_FRACTION = 0.10


#: Newton steps on the Colebrook equation over arrays stop when 1/√f moves by less than this
#: fraction: at machine precision, where fluids' closed form is too (to about 1e-12).
_COLEBROOK_STOP = 1e-14
_COLEBROOK_STEPS = 20
#: Relative step of u = 1/√f accepted when the steps run out (a result beyond it is refused, by name).
_COLEBROOK_ACCEPT = 1e-10


def colebrook_friction_factors(reynolds, relative_roughness):
    """Darcy friction factors from the Colebrook equation, over arrays.

    Parameters
    ----------
    reynolds : numpy.ndarray
        Reynolds numbers (turbulent, above about 4000).
    relative_roughness : float or numpy.ndarray
        ε/D.

    Returns
    -------
    numpy.ndarray
        f_D.

    Notes
    -----
    Newton's method on :math:`g(u) = u + 2\\log_{10}(\\varepsilon/(3.7 D) + 2.51 u / Re) = 0`
    for :math:`u = 1/\\sqrt{f_D}`, started from the Swamee–Jain approximation; the same root
    as ``fluids.friction.Colebrook`` (which the scalar :func:`line_pressure_drop` calls, one
    call per value) to about 1e-12, over a whole array at once.

    References
    ----------
    Colebrook, C. F., "Turbulent flow in pipes", J. Inst. Civil Eng. 11 (1939) 133–156;
    Swamee, P. K. and Jain, A. K., J. Hydraulics Div. ASCE 102 (1976) 657–664, for the start.

    Examples
    --------
    >>> [round(float(f), 6) for f in colebrook_friction_factors(np.array([1e5, 1e6]), 1e-4)]
    [0.018514, 0.013441]
    """
    reynolds = np.asarray(reynolds, dtype=float)
    a = relative_roughness / 3.7
    b = 2.51 / reynolds
    u = -2.0 * np.log10(a + 5.74 / reynolds ** 0.9)
    for _ in range(_COLEBROOK_STEPS):
        inner = a + b * u
        step = (u + 2.0 * np.log10(inner)) / (1.0 + 2.0 * b / (inner * math.log(10.0)))
        u = u - step
        if np.all(np.abs(step) <= _COLEBROOK_STOP * u):
            return 1.0 / (u * u)
    # Newton stops at a step of 1e-14 of u; rounding can hold it a little above that, which is still a
    # friction factor good to far better than the 1e-10 accepted here. Beyond it, no result is given.
    worst = float(np.max(np.abs(step) / np.abs(u)))
    if worst <= _COLEBROOK_ACCEPT:
        return 1.0 / (u * u)
    raise NotConvergedError(
        f"the Colebrook friction factor did not converge in {_COLEBROOK_STEPS} Newton steps: the last relative step "
        f"was {worst:.2g}, the tolerance {_COLEBROOK_ACCEPT:g}", field="line friction factor (Colebrook)", value=worst,
        fix="check the line's size and roughness; a Reynolds number this far out is outside the correlation")


@dataclass(frozen=True)
class LineLoss:
    """Pressure drop of one line (arrays when computed over arrays)."""

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
        Floats, or arrays when ``mass_flow``, ``density`` or ``viscosity`` is an array (the
        friction factors then by :func:`colebrook_friction_factors`).

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
    if isinstance(reynolds, np.ndarray):
        f = colebrook_friction_factors(reynolds, roughness / inner_diameter)
    else:
        f = float(Colebrook(reynolds, roughness / inner_diameter))
    resistance = f * length / inner_diameter + fittings_k
    return LineLoss(resistance * density * velocity ** 2 / 2.0, velocity, reynolds, f, resistance)
