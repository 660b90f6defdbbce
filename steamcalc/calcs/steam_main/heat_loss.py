"""Heat loss of a steam line through its insulation to still or moving air, per metre of line.

The jacket temperature is found from the heat balance of one metre of line: what the insulation
conducts (its conductivity taken at the insulation's mean temperature) equals what the jacket gives
to the air by convection and to the surroundings by radiation. Bare pipe is the same balance with the
pipe wall itself as the surface, at the steam temperature.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

from ...errors import NotConvergedError

#: Gravity, m/s² (standard acceleration, ISO 80000-3).
GRAVITY = 9.80665
#: Emissivity of bare, oxidised carbon-steel pipe (common practice for uninsulated steel lines).
BARE_STEEL_EMISSIVITY = 0.8
#: Touch-safe jacket temperature, °C (common practice for insulated lines within reach: 55 °C).
TOUCH_SAFE_SURFACE = 55.0

REFERENCES = (
    "Churchill, S. W. and Chu, H. H. S. (1975), Correlating equations for laminar and turbulent free convection "
    "from a horizontal cylinder, Int. J. Heat Mass Transfer 18(9), 1049-1053 (through "
    "ht.conv_free_immersed.Nu_horizontal_cylinder_Churchill_Chu)",
    "Churchill, S. W. and Bernstein, M. (1977), A correlating equation for forced convection from gases and liquids "
    "to a circular cylinder in crossflow, J. Heat Transfer 99(2), 300-306 (through "
    "ht.conv_external.Nu_cylinder_Churchill_Bernstein)",
    "Stefan-Boltzmann law, grey surface to large surroundings at ambient (through ht.radiation.q_rad)",
    "Fourier's law for a cylindrical shell, q' = 2 pi k (T1 - T2) / ln(D2/D1) (any heat-transfer text)",
    "Lemmon, E. W., Jacobsen, R. T., Penoncello, S. G. and Friend, D. G. (2000), J. Phys. Chem. Ref. Data 29(3), "
    "331-385, and Lemmon, E. W. and Jacobsen, R. T. (2004), Int. J. Thermophys. 25(1), 21-69: dry air "
    "properties (through iapws.humidAir.Air)",
)


@dataclass(frozen=True)
class Insulation:
    """Insulation on a line: thickness, m; conductivity, W/(m·K), at 50 °C and 150 °C mean; jacket emissivity."""

    thickness: float
    conductivity_50: float
    conductivity_150: float
    emissivity: float

    def conductivity(self, mean_temperature):
        """Conductivity at a mean temperature (K), straight through the two stated points, W/(m·K)."""
        slope = (self.conductivity_150 - self.conductivity_50) / 100.0
        return self.conductivity_50 + slope * (mean_temperature - 323.15)


@dataclass(frozen=True)
class SurfaceLoss:
    """Heat loss of one metre of line and the surface balance that gives it."""

    heat_loss: float            #: W/m
    surface_temperature: float  #: K
    convection: float           #: W/(m²·K), on the outer surface
    radiation: float            #: W/(m²·K), linearised
    nusselt: float
    conductivity: float         #: W/(m·K) of the insulation at its mean temperature (0 when bare)
    outer_diameter: float       #: m, of the surface losing heat
    forced: bool                #: forced convection governs


def air_properties(temperature, pressure):
    """Dry air at a film temperature (K) and pressure (Pa): (conductivity W/(m·K), kinematic viscosity m²/s, Pr).

    Examples
    --------
    >>> k, nu, pr = air_properties(300.0, 101325.0)
    >>> round(k, 5), round(nu * 1e6, 3), round(pr, 3)
    (0.02638, 15.75, 0.707)
    """
    return _air_properties(float(temperature), float(pressure))


@lru_cache(maxsize=4096)
def _air_properties(temperature, pressure):
    # Kept per process: iapws solves the air's density at each call (a few ms), and one line's balances and the
    # economics and charts built on them ask again for the same film temperatures (184 asks, 63 distinct, in SM-01).
    from iapws.humidAir import Air

    air = Air(T=temperature, P=pressure / 1e6)
    return float(air.k), float(air.mu / air.rho), float(air.Prandt)


def outside_coefficient(diameter, surface, ambient, emissivity, wind, pressure):
    """Convection and radiation coefficients, W/(m²·K), of a horizontal cylinder's surface in air.

    Parameters
    ----------
    diameter : float
        Outer diameter of the surface, m.
    surface, ambient : float
        Surface and air (and surroundings) temperatures, K.
    emissivity : float
        Of the surface, 0 to 1.
    wind : float
        Air speed across the line, m/s; 0 for still air.
    pressure : float
        Atmospheric pressure, Pa.

    Returns
    -------
    tuple
        ``(h_conv, h_rad, Nu, forced)``.

    Notes
    -----
    Properties at the film temperature :math:`T_f = (T_s + T_a)/2`, :math:`\\beta = 1/T_f` (ideal gas).
    Natural: :math:`Gr = g \\beta (T_s - T_a) D^3/\\nu^2`, Nu by Churchill–Chu; forced:
    :math:`Re = V D/\\nu`, Nu by Churchill–Bernstein; the larger governs (common practice).
    Radiation: :math:`h_r = \\varepsilon \\sigma (T_s^4 - T_a^4)/(T_s - T_a)`.

    References
    ----------
    Churchill and Chu (1975); Churchill and Bernstein (1977); see :data:`REFERENCES`.

    Examples
    --------
    >>> h_c, h_r, nu, forced = outside_coefficient(0.2, 323.15, 293.15, 0.1, 0.0, 101325.0)
    >>> round(h_c, 2), round(h_r, 3), forced
    (4.67, 0.665, False)
    """
    from ht.conv_external import Nu_cylinder_Churchill_Bernstein
    from ht.conv_free_immersed import Nu_horizontal_cylinder_Churchill_Chu
    from ht.radiation import q_rad

    film = (surface + ambient) / 2.0
    k, nu, pr = air_properties(film, pressure)
    rise = max(surface - ambient, 1e-6)
    grashof = GRAVITY * (1.0 / film) * rise * diameter ** 3 / nu ** 2
    nusselt = Nu_horizontal_cylinder_Churchill_Chu(pr, grashof)
    forced = False
    if wind > 0.0:
        forced_nu = Nu_cylinder_Churchill_Bernstein(wind * diameter / nu, pr)
        if forced_nu > nusselt:
            nusselt, forced = forced_nu, True
    h_conv = nusselt * k / diameter
    h_rad = q_rad(emissivity, surface, ambient) / rise
    return h_conv, h_rad, nusselt, forced


def surface_loss(pipe_outer_diameter, steam_temperature, ambient, wind, pressure, insulation=None):
    """Heat loss of one metre of line, W/m, with its surface temperature (bare when ``insulation`` is None).

    Parameters
    ----------
    pipe_outer_diameter : float
        m.
    steam_temperature : float
        K; the pipe wall is taken at it (steam-side film and steel wall resistances neglected).
    ambient : float
        Air and surroundings temperature, K.
    wind : float
        m/s across the line.
    pressure : float
        Atmospheric pressure, Pa.
    insulation : Insulation, optional
        With a thickness of zero the line is bare: its steel radiates at :data:`BARE_STEEL_EMISSIVITY`, never
        at the jacket's emissivity (there is no jacket).

    Returns
    -------
    SurfaceLoss

    Notes
    -----
    .. math:: q' = \\frac{2 \\pi k(T_m) (T_p - T_s)}{\\ln(D_o/D_p)} = \\pi D_o (h_c + h_r)(T_s - T_a),
              \\quad T_m = (T_p + T_s)/2

    solved for :math:`T_s` by bisection (Brent's method, ``scipy.optimize.brentq``) between the air and the
    pipe temperatures, where the residual changes sign.

    Examples
    --------
    >>> bare = surface_loss(0.0889, 448.0, 293.15, 0.0, 101325.0)
    >>> round(bare.heat_loss), round(bare.surface_temperature, 2)
    (743, 448.0)
    >>> lagged = surface_loss(0.0889, 448.0, 293.15, 0.0, 101325.0, Insulation(0.05, 0.040, 0.055, 0.1))
    >>> round(lagged.heat_loss, 1), round(lagged.surface_temperature - 273.15, 1)
    (54.9, 39.3)
    """
    from scipy.optimize import brentq

    if insulation is None or insulation.thickness == 0.0:
        h_c, h_r, nu, forced = outside_coefficient(pipe_outer_diameter, steam_temperature, ambient,
                                                   BARE_STEEL_EMISSIVITY, wind, pressure)
        loss = math.pi * pipe_outer_diameter * (h_c + h_r) * (steam_temperature - ambient)
        return SurfaceLoss(loss, steam_temperature, h_c, h_r, nu, 0.0, pipe_outer_diameter, forced)
    outer = pipe_outer_diameter + 2.0 * insulation.thickness
    log_ratio = math.log(outer / pipe_outer_diameter)

    def residual(surface):
        k = insulation.conductivity((steam_temperature + surface) / 2.0)
        conducted = 2.0 * math.pi * k * (steam_temperature - surface) / log_ratio
        h_c, h_r, _, _ = outside_coefficient(outer, surface, ambient, insulation.emissivity, wind, pressure)
        return conducted - math.pi * outer * (h_c + h_r) * (surface - ambient)

    low, high = ambient + 1e-6, steam_temperature - 1e-6
    if not residual(low) > 0.0 > residual(high):
        raise NotConvergedError("the heat balance through the insulation has no surface temperature between the "
                                "air and the steam", field="insulation")
    surface = brentq(residual, low, high, xtol=1e-9, rtol=1e-12, maxiter=200)
    h_c, h_r, nu, forced = outside_coefficient(outer, surface, ambient, insulation.emissivity, wind, pressure)
    k = insulation.conductivity((steam_temperature + surface) / 2.0)
    loss = math.pi * outer * (h_c + h_r) * (surface - ambient)
    return SurfaceLoss(loss, surface, h_c, h_r, nu, k, outer, forced)
