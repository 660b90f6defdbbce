"""Control-valve sizing for compressible flow (steam), IEC 60534-2-1.

Mass-flow form of the standard with the upstream density taken from IAPWS-IF97,
so that no ideal-gas compressibility factor is needed for steam. Units here are
the standard's: mass flow kg/h, pressure kPa (absolute), density kg/m³, Kv m³/h,
diameters mm. The sizing functions take floats or numpy arrays (one valve state per
element, as Monte Carlo samples do); floats give floats.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..units.amounts import Amount, Limit

#: IEC 60534-2-1 numerical constants for Kv with W in kg/h, p in kPa, ρ in kg/m³, d in mm.
N6_KV = 3.16
N2_KV = 1.60e-3
N5_KV = 1.80e-3
#: Cv = 1.156 Kv (Cv in US gal/min at 1 psi, Kv in m³/h at 1 bar).
CV_PER_KV = 1.156


def kv_to_cv(kv):
    """Flow coefficient Cv (US gpm, psi) from Kv (m³/h, bar): Cv = 1.156 Kv.

    References
    ----------
    IEC 60534-2-1:2011, Table 1 (ratio of the N constants for Kv and Cv).

    Examples
    --------
    >>> round(kv_to_cv(100.0), 1)
    115.6
    """
    return CV_PER_KV * kv


def _smaller(a, b):
    """min(a, b), element by element when either is an array (floats stay floats)."""
    if isinstance(a, np.ndarray) or isinstance(b, np.ndarray):
        return np.minimum(a, b)
    return min(a, b)


def _all(condition):
    """Every element holds: a plain truth as it is (numpy's all() on one value costs more than the sizing)."""
    return condition if isinstance(condition, (bool, np.bool_)) else bool(np.all(condition))


def _sqrt(value):
    return np.sqrt(value) if isinstance(value, np.ndarray) else math.sqrt(value)


def specific_heat_ratio_factor(kappa):
    """Fγ = κ / 1.40, IEC 60534-2-1 equation (15)."""
    return kappa / 1.40


def expansion_factor(x, kappa, xt):
    """Expansion factor Y = 1 − x / (3 Fγ xT), with x limited to the choked value Fγ xT.

    Parameters
    ----------
    x : float
        Pressure differential ratio Δp/p1.
    kappa : float
        Isentropic exponent of the fluid at the inlet.
    xt : float
        Pressure differential ratio factor at choked flow (xT, or xTP with fittings).

    References
    ----------
    IEC 60534-2-1:2011, equation (12); choked limit equations (13) and (14).

    Examples
    --------
    >>> round(expansion_factor(0.3, 1.3, 0.7), 4)
    0.8462
    >>> round(expansion_factor(0.9, 1.3, 0.7), 4)  # choked: Y = 2/3
    0.6667
    """
    x_choked = specific_heat_ratio_factor(kappa) * xt
    return 1.0 - _smaller(x, x_choked) / (3.0 * x_choked)


@dataclass(frozen=True)
class ValveSizing:
    """Outcome of sizing one flow case (arrays when sized over arrays)."""

    kv: float
    cv: float
    x: float
    x_choked: float
    choked: bool
    expansion_factor: float
    piping_factor: float
    xtp: float


def piping_factors(kv, valve_d, inlet_d, outlet_d, xt):
    """Fp and xTP of a valve of a given Kv between reducers.

    Parameters
    ----------
    kv : float
        The valve's Kv at the condition considered, m³/h.
    valve_d, inlet_d, outlet_d : float
        Valve size and the inside diameters of the adjoining pipes, mm (None for no reducer).
    xt : float
        xT of the valve without fittings.

    References
    ----------
    IEC 60534-2-1:2011, equations (2), (4)-(6) and (18).

    Examples
    --------
    >>> piping_factors(40.0, 80.0, 80.0, 80.0, 0.7)
    (1.0, 0.7)
    """
    k1 = 0.5 * (1.0 - (valve_d / inlet_d) ** 2) ** 2 if inlet_d else 0.0
    k2 = 1.0 * (1.0 - (valve_d / outlet_d) ** 2) ** 2 if outlet_d else 0.0
    kb1 = 1.0 - (valve_d / inlet_d) ** 4 if inlet_d else 0.0
    kb2 = 1.0 - (valve_d / outlet_d) ** 4 if outlet_d else 0.0
    sum_k = k1 + k2 + kb1 - kb2
    fp = _inverse_sqrt(1.0 + sum_k / N2_KV * (kv / valve_d ** 2) ** 2)
    xi = k1 + kb1
    xtp = xt / fp ** 2 / (1.0 + xt * xi / N5_KV * (kv / valve_d ** 2) ** 2)
    return fp, xtp


def _refuse_undefined_fp():
    # 1 + ΣK/N2·(Kv/d²)² fell to zero or below (a valve larger than its pipe: negative Bernoulli
    # coefficients), or the Kv–Fp iteration ran away (a Kv far beyond what the valve size holds): either
    # way the reducer equations of IEC 60534-2-1 give no Kv.
    raise InputError("the piping geometry factor Fp has no value at this flow: the valve size cannot pass it "
                     "between these pipes (the Kv the flow needs is beyond what the IEC 60534-2-1 reducer "
                     "equations hold for this size)", field="valve.valve_size",
                     fix="give a larger valve size, no larger than the pipes either side (lines.inlet_size, "
                         "lines.outlet_size), or a smaller flow")


def _inverse_sqrt(value):
    """1/√value, NaN where value ≤ 0 (never a complex number): the caller refuses a NaN by name."""
    if isinstance(value, np.ndarray):
        with np.errstate(invalid="ignore", divide="ignore"):
            return np.where(value > 0.0, np.abs(value) ** -0.5, np.nan)
    return value ** -0.5 if value > 0.0 else math.nan


def size_steam_valve(mass_flow, p1, p2, density1, kappa, xt, valve_d=None, inlet_d=None, outlet_d=None):
    """Required Kv of a valve passing steam (compressible flow), IEC 60534-2-1.

    Parameters
    ----------
    mass_flow : float or numpy.ndarray
        W, kg/h.
    p1, p2 : float or numpy.ndarray
        Upstream and downstream absolute pressure, kPa.
    density1 : float or numpy.ndarray
        ρ1, upstream density, kg/m³ (IAPWS-IF97).
    kappa : float or numpy.ndarray
        Isentropic exponent at the inlet.
    xt : float or numpy.ndarray
        Pressure differential ratio factor of the valve without fittings.
    valve_d, inlet_d, outlet_d : float, optional
        Valve size and adjoining pipe inside diameters, mm, for the piping geometry
        factor Fp; without them Fp = 1 (valve the size of the line).

    Returns
    -------
    ValveSizing
        Floats, or arrays of the broadcast shape when any argument is an array.

    Notes
    -----
    .. math:: K_v = \\frac{W}{N_6 F_p Y \\sqrt{x_{siz}\\, p_1 \\rho_1}}, \\quad
              Y = 1 - \\frac{x_{siz}}{3 F_\\gamma x_T}, \\quad
              x_{siz} = \\min(x, F_\\gamma x_T)

    with N6 = 3.16, x = (p1 − p2)/p1 and Fγ = κ/1.40; choked when x ≥ Fγ xT
    (xTP with fittings). Fp and xTP are found by fixed-point iteration on Kv (over arrays,
    until every element has converged).

    References
    ----------
    IEC 60534-2-1:2011, Industrial-process control valves — Part 2-1: Flow capacity —
    Sizing equations for fluid flow under installed conditions; equations (8), (12)-(15)
    for compressible fluids, (2)-(6) and (18) for fittings.

    Examples
    --------
    >>> s = size_steam_valve(4500.0, 1700.0, 350.0, 7.5, 1.30, 0.70)
    >>> s.choked, round(s.kv, 2)
    (True, 23.46)
    >>> [round(float(kv), 2) for kv in size_steam_valve(np.array([4500.0, 2250.0]), 1700.0, 350.0, 7.5, 1.30, 0.70).kv]
    [23.46, 11.73]
    """
    if not _all(p2 < p1):
        raise InputError("the valve's outlet pressure must be below its inlet pressure", field="outlet_pressure")
    x = (p1 - p2) / p1
    f_gamma = specific_heat_ratio_factor(kappa)
    try:
        kv, fp, xtp, converged = _kv_and_piping_factors(mass_flow, p1, x, density1, f_gamma, xt, valve_d, inlet_d,
                                                        outlet_d)
    except (ArithmeticError, ValueError):   # plain floats: a square root of a negative, a division by zero
        _refuse_undefined_fp()
    if not (converged and _all(np.isfinite(kv)) and _all(np.isfinite(fp)) and _all(np.asarray(xtp) > 0.0)):
        _refuse_undefined_fp()
    x_choked = f_gamma * xtp
    return ValveSizing(kv=kv, cv=kv_to_cv(kv), x=x, x_choked=x_choked, choked=x >= x_choked,
                       expansion_factor=1.0 - _smaller(x, x_choked) / (3.0 * x_choked), piping_factor=fp, xtp=xtp)


def _kv_and_piping_factors(mass_flow, p1, x, density1, f_gamma, xt, valve_d, inlet_d, outlet_d):
    """Kv, Fp and xTP by fixed-point iteration on Kv (IEC 60534-2-1 equations (8), (2)-(6), (18)), and whether it
    converged: ``(kv, fp, xtp, converged)``."""
    fp, xtp = 1.0, xt
    kv = None
    converged = valve_d is None or (inlet_d is None and outlet_d is None)
    for _ in range(50):
        x_choked = f_gamma * xtp
        x_siz = _smaller(x, x_choked)
        y = 1.0 - x_siz / (3.0 * x_choked)
        new_kv = mass_flow / (N6_KV * fp * y * _sqrt(x_siz * p1 * density1))
        if valve_d is None or (inlet_d is None and outlet_d is None):
            kv = new_kv
            break
        if kv is not None and _all(abs(new_kv - kv) <= 1e-10 * new_kv):
            kv = new_kv
            converged = True
            break
        kv = new_kv
        if isinstance(kv, (np.ndarray, np.generic)):
            with np.errstate(invalid="ignore"):   # an undefined Fp is refused below, by name
                fp, xtp = piping_factors(kv, valve_d, inlet_d, outlet_d, xt)
        else:   # Python floats: numpy's error state is not theirs (and costs more than the factors)
            fp, xtp = piping_factors(kv, valve_d, inlet_d, outlet_d, xt)
    return kv, fp, xtp, converged


def valve_flow(kv, p1, p2, density1, kappa, xt, piping_factor=1.0):
    """Mass flow a valve of a given Kv passes, kg/h (the sizing equation solved for W).

    Parameters are as in :func:`size_steam_valve`; ``kv`` in m³/h.

    Notes
    -----
    :math:`W = N_6 F_p K_v Y \\sqrt{x_{siz} p_1 \\rho_1}`.

    References
    ----------
    IEC 60534-2-1:2011, equation (8).

    Examples
    --------
    >>> round(valve_flow(23.46, 1700.0, 350.0, 7.5, 1.30, 0.70), -1)
    4500.0
    """
    if not (math.isfinite(piping_factor) and piping_factor > 0.0 and math.isfinite(xt) and xt > 0.0):
        _refuse_undefined_fp()
    x = (p1 - p2) / p1
    x_choked = specific_heat_ratio_factor(kappa) * xt
    x_siz = min(x, x_choked)
    y = 1.0 - x_siz / (3.0 * x_choked)
    return N6_KV * piping_factor * kv * y * math.sqrt(x_siz * p1 * density1)


#: Travel limits of a control valve (common practice): usable 10-90 %, preferred 20-80 % of travel.
TRAVEL_FAIL = (0.10, 0.90)
TRAVEL_WARN = (0.20, 0.80)


def travel_limits():
    """The one travel rule of every control valve here, as a check's limits on a travel in percent.

    Outside 10-90 % the valve fails (near the seat it goes on-off, near full travel it has no margin to
    open); outside 20-80 % it warns (common practice).

    Examples
    --------
    >>> from steamcalc.units.amounts import verdict
    >>> [verdict(Amount(t, "percent"), travel_limits()) for t in (5.0, 85.0, 50.0, 87.7, 91.0)]
    ['fail', 'warn', 'pass', 'warn', 'fail']
    """
    return tuple(Limit(comparison, Amount(100.0 * bound, "percent"), breach)
                 for breach, (low, high) in (("fail", TRAVEL_FAIL), ("warn", TRAVEL_WARN))
                 for comparison, bound in ((">=", low), ("<=", high)))


def valve_travel(kv, rated_kv, characteristic, rangeability):
    """Valve travel (0 to 1) at which an inherent characteristic gives the required Kv.

    Parameters
    ----------
    kv : float
        Required Kv, m³/h.
    rated_kv : float
        Kvs, the rated Kv at full travel, m³/h.
    characteristic : str
        ``"linear"`` (Φ = h) or ``"equal-percentage"`` (Φ = R^(h − 1)).
    rangeability : float
        R, inherent rangeability of an equal-percentage trim.

    Notes
    -----
    Φ = Kv/Kvs is the relative flow coefficient and h the relative travel.

    References
    ----------
    IEC 60534-2-4:2009, inherent flow characteristics (ideal linear and ideal
    equal-percentage forms).

    Examples
    --------
    >>> round(valve_travel(10.0, 40.0, "linear", 50.0), 3)
    0.25
    >>> round(valve_travel(10.0, 40.0, "equal-percentage", 50.0), 3)
    0.646
    """
    phi = kv / rated_kv
    if characteristic == "linear":
        return phi
    return 1.0 + math.log(phi) / math.log(rangeability)
