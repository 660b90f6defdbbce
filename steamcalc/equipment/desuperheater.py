"""Spray desuperheater: the steam velocity it needs and the length its spray takes to evaporate.

A spray (nozzle or probe) desuperheater relies on the steam to carry and break up the
water: below a minimum steam velocity the spray falls out onto the pipe wall. The
evaporation length estimated here is the lifetime of a droplet of the stated size, heated by
conduction from the surrounding superheated steam (no slip, Nu = 2: no credit for turbulence or
break-up, so the estimate errs long), times the steam velocity. The
desuperheater maker's data (minimum velocity, droplet size, sensor distance) governs.
"""

from __future__ import annotations

from ..errors import InputError

#: Minimum steam velocity at a spray desuperheater, m/s (common practice for nozzle and probe
#: types; not confirmed against a maker's published figure: makers state their own minimum, which
#: varies with the nozzle size and the pipe).
DEFAULT_MIN_STEAM_VELOCITY = 6.0
#: Droplet size of the spray, m: 50 µm, a mean droplet of a pressure-atomising desuperheater
#: nozzle at a few bar differential (common practice; the nozzle maker's droplet
#: data governs, and the lifetime goes with its square).
DEFAULT_DROPLET_SIZE = 50e-6
#: Range of droplet sizes over which the evaporation length is shown when the maker's droplet size is
#: not given, m: 25-150 µm, fine to coarse mean droplets of desuperheater spray nozzles (common practice;
#: steam-atomising types finer, plain pressure nozzles at a low differential coarser).
TYPICAL_DROPLET_SIZES = (25e-6, 150e-6)
#: Nusselt number of a droplet carried with the steam (no slip): pure conduction, Nu = 2.
DROPLET_NUSSELT = 2.0
#: Simpson intervals for the lifetime integral (even).
_INTERVALS = 200


def droplet_lifetime(droplet_size, liquid_density, heat_to_evaporate, conductivity, superheat_start,
                     superheat_end, nusselt=DROPLET_NUSSELT):
    """Time for a water droplet to evaporate in superheated steam, s (quasi-steady d²-law).

    Parameters
    ----------
    droplet_size : float
        d0, initial droplet diameter, m.
    liquid_density : float
        ρ_l, density of the droplet (saturated water at the steam pressure), kg/m³.
    heat_to_evaporate : float
        L, heat taken up per kg of spray water to become saturated vapour, h_g − h_w, J/kg
        (the droplet's sensible heating is counted in L).
    conductivity : float
        k, thermal conductivity of the steam around the droplet, W/(m·K).
    superheat_start, superheat_end : float
        Steam superheat above the saturation temperature before the spray (after the valve)
        and once all the spray has evaporated (the target), K.
    nusselt : float
        Nu of the droplet, default 2 (conduction only: a droplet moving with the steam).

    Returns
    -------
    float
        Lifetime t, s.

    Notes
    -----
    Heat conducted to a droplet at saturation temperature evaporates it:
    :math:`\\mathrm{d}m/\\mathrm{d}t = -\\pi d\\,Nu\\,k\\,\\Delta T / L`, which gives the d²-law
    :math:`\\mathrm{d}(d^2)/\\mathrm{d}t = -4\\,Nu\\,k\\,\\Delta T / (\\rho_l L)`. As the spray
    evaporates the steam cools; with one droplet size the unevaporated fraction is
    :math:`s^{3/2}` (:math:`s = (d/d_0)^2`) and the superheat falls in proportion to the
    evaporated fraction, :math:`\\Delta T(s) = \\Delta T_{end} + (\\Delta T_{start} - \\Delta T_{end})\\,s^{3/2}`:

    .. math:: t = \\frac{\\rho_l L d_0^2}{4\\,Nu\\,k} \\int_0^1 \\frac{\\mathrm{d}s}{\\Delta T(s)}

    (Simpson's rule, 200 intervals). With a constant superheat this is
    :math:`t = \\rho_l L d_0^2 / (4\\,Nu\\,k\\,\\Delta T)`.

    References
    ----------
    The d²-law of quasi-steady droplet evaporation: Langmuir, I. (1918), The evaporation of small
    spheres, Phys. Rev. 12(5), 368; Williams, F. A., Combustion Theory, ch. 3. For burning droplets,
    Godsave, G.A.E. (1953), 4th Symposium (International) on Combustion, and Spalding, D.B. (1953),
    The combustion of liquid fuels (these two not confirmed against the papers' text). Nu = 2 for a
    sphere in a still fluid (any heat-transfer text).

    Examples
    --------
    >>> round(droplet_lifetime(100e-6, 927.0, 2.29e6, 0.029, 10.0, 10.0), 3)  # constant superheat
    9.15
    >>> round(droplet_lifetime(100e-6, 927.0, 2.29e6, 0.029, 66.0, 10.0), 3)
    3.882
    """
    for name, value in (("droplet_size", droplet_size), ("liquid_density", liquid_density),
                        ("heat_to_evaporate", heat_to_evaporate), ("conductivity", conductivity),
                        ("nusselt", nusselt)):
        if not value > 0.0:
            raise InputError(f"{name.replace('_', ' ')} must be above zero", field=name, value=value)
    if not superheat_end > 0.0 or superheat_start < superheat_end:
        raise InputError("the steam must stay superheated: superheat before the spray at least the final "
                         "superheat, and the final superheat above 0 K", field="superheat_end",
                         value=(superheat_start, superheat_end))

    def driving(s):
        return superheat_end + (superheat_start - superheat_end) * s ** 1.5

    h = 1.0 / _INTERVALS
    total = 1.0 / driving(0.0) + 1.0 / driving(1.0)
    for i in range(1, _INTERVALS):
        total += (4.0 if i % 2 else 2.0) / driving(i * h)
    integral = total * h / 3.0
    return liquid_density * heat_to_evaporate * droplet_size ** 2 / (4.0 * nusselt * conductivity) * integral


def evaporation_length(lifetime, steam_velocity):
    """Distance the steam carries the largest droplet while it evaporates, m: L_evap = t·v.

    Parameters
    ----------
    lifetime : float
        Droplet lifetime, s (:func:`droplet_lifetime`).
    steam_velocity : float
        Mean steam velocity in the pipe downstream of the spray, m/s (the droplet moves with
        the steam: no slip).

    Examples
    --------
    >>> evaporation_length(0.5, 12.0)
    6.0
    """
    if not steam_velocity > 0.0:
        raise InputError("the steam velocity must be above zero", field="steam_velocity", value=steam_velocity)
    return lifetime * steam_velocity


def length_at_droplet_size(length, droplet_size, other_size):
    """Evaporation length of a spray of another droplet size, m: L·(d/d0)², the d²-law.

    Parameters
    ----------
    length : float
        Evaporation length found for droplets of ``droplet_size``, m.
    droplet_size, other_size : float
        d0, the droplet size the length was found for, and d, the size wanted, m.

    Notes
    -----
    In :func:`droplet_lifetime` the initial size enters only as d0² (the integral over s = (d/d0)² and the
    superheat profile do not depend on it), and the steam velocity not at all: at the same flow the
    length goes exactly with the square of the droplet size.

    Examples
    --------
    >>> round(length_at_droplet_size(28.45, 50e-6, 100e-6), 1)
    113.8
    """
    for name, value in (("droplet_size", droplet_size), ("other_size", other_size)):
        if not value > 0.0:
            raise InputError(f"{name.replace('_', ' ')} must be above zero", field=name, value=value)
    return length * (other_size / droplet_size) ** 2


__all__ = ["droplet_lifetime", "evaporation_length", "length_at_droplet_size", "DEFAULT_MIN_STEAM_VELOCITY",
           "DEFAULT_DROPLET_SIZE", "TYPICAL_DROPLET_SIZES", "DROPLET_NUSSELT"]
