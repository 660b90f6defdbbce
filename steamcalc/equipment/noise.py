"""Aerodynamic noise of a control valve in steam service, IEC 60534-8-3, and the valve
outlet Mach number.

The prediction is the standard's method as implemented in the fluids package
(``fluids.control_valve.control_valve_noise_g_2011``, checked there against the
standard's worked examples); this module feeds it real-steam properties from IF97
(isentropic exponent, densities, the temperature after the valve) and the pipe wall
from the schedule.
"""

from __future__ import annotations

import math
import re

from ..errors import InputError

MOLAR_MASS_WATER = 18.015268  # g/mol, IAPWS R6-95
#: Sound pressure limit at 1 m when none is given, dB(A) (common practice; workplace limits
#: of 85 dB(A) for an 8-hour day, e.g. EU directive 2003/10/EC upper action value).
DEFAULT_NOISE_LIMIT = 85.0
#: Valve outlet Mach number up to which IEC 60534-8-3 predicts the noise of a standard trim without its
#: high-Mach procedure (IEC 60534-8-3:2010 clause 1, scope: "when the Mach number in the valve outlet
#: exceeds 0,3 for standard trim or 0,2 for low noise trim, the procedure in Clause 7 is used", as the
#: scope is published on standards.globalspec.com, docId 1298530).
OUTLET_MACH_LIMIT = 0.3
#: The basis of that limit, as records name it.
OUTLET_MACH_SOURCE = ("IEC 60534-8-3:2010 clause 1 (scope): valve outlet Mach number 0.3 for standard trims "
                      "(0.2 for low-noise trims)")
#: The method's fluids: IEC 60534-8-3:2010 clause 1 (scope), "single-phase dry gases and vapours".
DRY_GAS_SOURCE = "IEC 60534-8-3:2010 clause 1 (scope): single-phase dry gases and vapours"
#: Relative pressure step of the homogeneous-equilibrium speed of sound (one-sided, on the expansion side);
#: the difference quotient agrees with the derivative to about 1e-5 at this step.
EQUILIBRIUM_PRESSURE_STEP = 1e-4
_LEVEL = re.compile(r"^\s*([0-9]+(?:\.[0-9]*)?)\s*dB\s*\(\s*A\s*\)\s*$", re.IGNORECASE)


def parse_sound_level(text, field="valve.noise_limit"):
    """An A-weighted sound pressure level such as ``"85 dB(A)"``, in dB.

    Examples
    --------
    >>> parse_sound_level("85 dB(A)")
    85.0
    """
    match = _LEVEL.match(text) if isinstance(text, str) else None
    if match is None:
        raise InputError("is not an A-weighted sound level", field=field, value=text,
                         fix="write it as e.g. '85 dB(A)'")
    level = float(match.group(1))
    if not 40.0 <= level <= 140.0:
        raise InputError("sound level limit outside 40-140 dB(A)", field=field, value=text,
                         limits=(40, 140, "dB(A)"), fix="give the limit at 1 m, e.g. '85 dB(A)'")
    return level


def valve_noise(mass_flow, inlet, outlet, kappa, kv, valve_diameter, pipe_inner_diameter, pipe_wall,
                fd, fl):
    """A-weighted sound pressure level 1 m from the downstream pipe wall, dB(A).

    Parameters
    ----------
    mass_flow : float
        kg/s.
    inlet : SteamState
        Steam at the valve inlet.
    outlet : SteamState
        Steam after the valve (isenthalpic, at the outlet pressure).
    kappa : float
        Isentropic exponent at the inlet.
    kv : float
        Kv the valve runs at for this flow, m³/h.
    valve_diameter : float
        Valve outlet diameter, m.
    pipe_inner_diameter, pipe_wall : float
        Inside diameter and wall thickness of the downstream pipe, m.
    fd, fl : float
        Valve style modifier and liquid pressure recovery factor (maker's data).

    Returns
    -------
    float
        L_pAe,1m, dB(A) re 20 µPa.

    Notes
    -----
    IEC 60534-8-3: the stream power of the jet, the acoustic efficiency of the flow regime
    (I to V by the pressure ratio), the internal sound power in the pipe and the pipe
    wall's transmission loss (steel, 7800 kg/m³, 5000 m/s), summed over the third-octave
    bands with the A-weighting. The standard treats the gas as ideal; here its density is
    IF97's at the inlet and κ is IF97's w²ρ/p, while the speed of sound downstream is the
    method's ideal-gas value at the IF97 outlet temperature.

    Scope: the standard holds for single-phase dry gases and vapours, and above a valve outlet Mach
    number of 0.3 (standard trims) it adds the noise made in the expander after the valve. fluids 1.3
    adds that expander term only when the Mach number in the downstream pipe exceeds 0.3 (the valve
    outlet's Mach number appears in its source only as a comment), so above :data:`OUTLET_MACH_LIMIT`
    at the valve outlet the level returned here is outside the method as implemented.

    References
    ----------
    IEC 60534-8-3:2010, Industrial-process control valves — Part 8-3: Noise considerations —
    Control valve aerodynamic noise prediction method; as implemented in
    ``fluids.control_valve.control_valve_noise_g_2011`` (fluids 1.x, Caleb Bell).

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> p1 = SteamState.from_pT(17e5, 503.15)
    >>> p2 = SteamState.from_ph(3.5e5, p1.enthalpy)
    >>> round(valve_noise(1.25, p1, p2, 1.30, 40.0, 0.0779, 0.2027, 0.00818, 1.0, 0.9), 1)
    100.3
    """
    from fluids.control_valve import control_valve_noise_g_2011

    return float(control_valve_noise_g_2011(
        m=mass_flow, P1=inlet.pressure, P2=outlet.pressure, T1=inlet.temperature, rho=inlet.density,
        gamma=kappa, MW=MOLAR_MASS_WATER, Kv=kv, d=valve_diameter, Di=pipe_inner_diameter, t_pipe=pipe_wall,
        Fd=fd, FL=fl, T2=outlet.temperature))


def combined_level(levels):
    """Sound pressure level of several incoherent sources together (an energy sum), dB.

    Parameters
    ----------
    levels : iterable of float
        The sources' levels at the same point, dB (A-weighted levels give an A-weighted sum).

    Notes
    -----
    .. math:: L = 10 \\log_{10} \\sum_i 10^{L_i/10}

    Two equal levels make 3.01 dB more; a level 10 dB below another adds 0.41 dB.

    References
    ----------
    IEC 60534-8-3:2010 sums its third-octave band levels so; the rule is the acoustics of incoherent
    sources (common practice).

    Examples
    --------
    >>> round(combined_level([97.7, 96.0]), 2), round(combined_level([85.0, 85.0]), 2)
    (99.94, 88.01)
    """
    return 10.0 * math.log10(sum(10.0 ** (level / 10.0) for level in levels))


def speed_of_sound(state):
    """Speed of sound of steam (m/s) and how it was found.

    Single-phase steam: the IF97 speed of sound. Saturated and wet steam: the homogeneous-equilibrium
    value :math:`w^2 = (\\partial p/\\partial \\rho)_s`, the difference quotient between the state and
    the IF97 state on its isentrope at a pressure :data:`EQUILIBRIUM_PRESSURE_STEP` lower (the expansion
    side, which stays wet; on the saturation line the vapour side is another, frozen value).

    Returns
    -------
    tuple
        ``(w m/s, basis)``, basis ``"IF97"`` or ``"homogeneous equilibrium"``.

    References
    ----------
    IAPWS R7-97(2012) (the speed of sound of single-phase states; the region 4 states on the isentrope);
    the homogeneous equilibrium model of two-phase flow (common practice).

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> w, basis = speed_of_sound(SteamState.from_p_dryness(3.5e5, 0.95))
    >>> round(w, 1), basis
    (445.4, 'homogeneous equilibrium')
    """
    if state.speed_of_sound is not None:
        return state.speed_of_sound, "IF97"
    from ..properties.steam import SteamState

    lower = SteamState.from_ps(state.pressure * (1.0 - EQUILIBRIUM_PRESSURE_STEP), state.entropy)
    return math.sqrt((state.pressure - lower.pressure) / (state.density - lower.density)), "homogeneous equilibrium"


def outlet_mach(mass_flow, outlet, port_diameter):
    """Mach number of the steam in the valve outlet port.

    Parameters
    ----------
    mass_flow : float
        kg/s.
    outlet : SteamState
        Steam after the valve: its IF97 speed of sound, or for saturated and wet steam the
        homogeneous-equilibrium value (:func:`speed_of_sound`), with the mixture density.
    port_diameter : float
        m.

    Notes
    -----
    :math:`Ma = \\dot m / (\\rho_2 A w_2)`, :math:`A = \\pi d^2/4`.

    References
    ----------
    Continuity and the IF97 speed of sound (IAPWS R7-97(2012)).

    Examples
    --------
    >>> from steamcalc.properties.steam import SteamState
    >>> round(outlet_mach(1.25, SteamState.from_pT(3.5e5, 460.0), 0.0779), 3)
    0.299
    >>> round(outlet_mach(1.25, SteamState.from_p_dryness(3.5e5, 0.95), 0.0779), 3)
    0.293
    """
    velocity = mass_flow / (outlet.density * math.pi * port_diameter ** 2 / 4.0)
    return velocity / speed_of_sound(outlet)[0]
