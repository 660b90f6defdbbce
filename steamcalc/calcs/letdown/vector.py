"""Let-down samples over arrays: the banded results of many Monte Carlo samples at once.

The numbers :func:`steamcalc.calcs.letdown.calculation.calculate` gives for the banded results
(``UNCERTAINTY_RESULTS``) under :func:`~steamcalc.calcs.base.numbers_only`, on the fast engine,
for a whole array of sampled inputs: the same equations — isenthalpic throttling, the
desuperheater's balances, the IEC 60534-2-1 sizing of :mod:`steamcalc.equipment.valve` and
the line loss of :mod:`steamcalc.equipment.line_loss` (both take arrays), the turbine's
isentropic drop — with IF97 over arrays (:mod:`steamcalc.properties.steam_arrays`). No steps, checks or
text: the record's own run makes those, once.

A sample is answered here only when ``calculate()`` would give it a result. The screen refuses
what ``calculate()`` refuses (outlet not below the inlet, inlet steam not above saturation, a
desuperheat target or spray water it rejects, an inlet line losing half the drop) and, to be
safe, a little more (states on or beyond the critical pressure, exact saturation boundaries).
Samples not answered go through ``calculate()`` one by one, which gives them their result or
their reason. A check that makes ``calculate()`` raise in numbers-only mode must be screened
here too; ``tests/test_uncertainty_vector.py`` compares both paths sample by sample.
"""

from __future__ import annotations

from typing import NamedTuple

import numpy as np

from ...properties.engines.common import CRITICAL_PRESSURE, MAX_TEMPERATURE, MIN_PRESSURE, MIN_TEMPERATURE
from ...equipment.line_loss import line_pressure_drop
from ...equipment.piping import pipe_inner_diameter
from ...properties.steam import SATURATION_TOLERANCE
from ...properties.steam_arrays import (
    SATURATED_LIQUID, SATURATED_VAPOUR, WET, properties_p_dryness, properties_pT, saturation_temperatures, states_ph,
    states_ps,
)
from .equipment import DEFAULT_SCHEDULE, case_inlet_pressure, flow_cases, required_kv
from .turbine import DEFAULT_TURBINE_EFFICIENCY

#: The banded results this path gives (``steamcalc.calcs.letdown.calculation.UNCERTAINTY_RESULTS``).
RESULTS = ("outlet_temperature", "outlet_superheat", "throttled_temperature", "spray_water_flow", "valve_kv",
           "recoverable_power")
_TWO_PHASE = (WET, SATURATED_LIQUID, SATURATED_VAPOUR)


class _Sampled:
    """The samples' inputs: a sampled input as its array, any other as the case gives it."""

    def __init__(self, inputs, columns):
        self._inputs, self._columns = inputs, columns

    def __getattr__(self, name):
        columns = self.__dict__["_columns"]
        return columns[name] if name in columns else getattr(self.__dict__["_inputs"], name)


class _ValveInlet(NamedTuple):
    """What the valve sizing reads of its inlet state: pressure (Pa) and density (kg/m³), arrays."""

    pressure: np.ndarray
    density: np.ndarray


def _full(value, size):
    return np.broadcast_to(np.asarray(value, dtype=float), (size,))


def _given_or(value, default):
    return default if value is None else value


def sample_results(inputs, site, columns, size, keys):
    """Banded let-down results of many samples at once, on the fast engine.

    Parameters
    ----------
    inputs : steamcalc.calcs.letdown.calculation.Inputs
        The nominal inputs (every input that is not sampled).
    site : steamcalc.cases.site.Site
        The site (the banded results do not depend on it).
    columns : dict of str to numpy.ndarray
        The sampled inputs, SI units (Pa, K, kg/s), ``size`` values each.
    size : int
        Number of samples.
    keys : sequence of str
        Result keys wanted, from :data:`RESULTS`.

    Returns
    -------
    tuple
        ``(values, answered)``: values, shape (size, len(keys)), in the record's units (degC,
        K, kg/h, m³/h, kW), NaN in rows not answered; answered, a boolean array, True where
        the row holds what ``calculate()`` gives.

    Notes
    -----
    As :func:`steamcalc.calcs.letdown.calculation.calculate`: :math:`h_2 = h_1`;
    :math:`\\dot m_w = \\dot m_s (h_2 - h_3)/(h_3 - h_w)`; Kv by IEC 60534-2-1 at the design flow
    case's valve inlet; :math:`P = \\dot m \\eta_s (h_1 - h(p_2, s_1))`.

    References
    ----------
    IAPWS R7-97(2012) (through seuif97); IEC 60534-2-1:2011 equations (8), (12)-(15) and
    (2)-(6), (18); Colebrook (1939) with Darcy–Weisbach for the inlet line.

    Examples
    --------
    >>> from steamcalc.calcs.letdown.calculation import Inputs
    >>> from steamcalc.cases.site import Site
    >>> nominal = Inputs(inlet_pressure=16e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15)
    >>> values, answered = sample_results(nominal, Site(), {"outlet_pressure": np.array([3.4e5, 3.6e5, 17e5])},
    ...                                   3, ["throttled_temperature"])
    >>> [round(float(v), 2) for v in values[:2, 0]], answered.tolist()
    ([203.2, 203.66], [True, True, False])
    """
    x = _Sampled(inputs, {name: np.asarray(column, dtype=float) for name, column in columns.items()})
    answered, t_sat2 = _screen(x, size)
    values = np.full((size, len(keys)), np.nan)
    rows = np.flatnonzero(answered)
    if rows.size:
        subset = _Sampled(inputs, {name: column[rows] for name, column in x._columns.items()})
        results, kept = _results(subset, rows.size, t_sat2[rows])
        for j, key in enumerate(keys):
            values[rows, j] = results[key]
        kept &= np.all(np.isfinite(values[rows]), axis=1)
        answered[rows[~kept]] = False
        values[rows[~kept]] = np.nan
    return values, answered


def _saturation(pressure, rows):
    """T_s (K) where ``rows`` (the pressure within the saturation line), NaN elsewhere."""
    out = np.full(pressure.shape, np.nan)
    if rows.any():
        chosen = pressure[rows]
        # A pressure the samples do not vary (a header, the lowest inlet pressure): its T_s evaluated once.
        out[rows] = saturation_temperatures(chosen[:1]) if chosen.min() == chosen.max() else \
            saturation_temperatures(chosen)
    return out


def _subcritical(pressure):
    return (pressure >= MIN_PRESSURE) & (pressure < CRITICAL_PRESSURE)


def _inlet_temperature(x, t_sat, size):
    """Inlet temperature (K) at a pressure of saturation temperature ``t_sat``; None for a dryness."""
    if x.inlet_temperature is not None:
        return _full(x.inlet_temperature, size)
    if x.inlet_superheat is not None:
        return t_sat + x.inlet_superheat
    return None


def _inlet_steam_ok(x, t_sat, size):
    """Steam above saturation by more than the saturation tolerance (or a dryness 0 to 1), in range."""
    temperature = _inlet_temperature(x, t_sat, size)
    if temperature is None:
        dryness = _full(x.inlet_dryness, size)
        return (dryness >= 0.0) & (dryness <= 1.0)
    return (temperature - t_sat > SATURATION_TOLERANCE) & (temperature <= MAX_TEMPERATURE)


def _screen(x, size):
    """Rows ``calculate()`` gives a result for (conservatively: some it would answer are left out), and T_s (K) at
    the outlet pressure of every row screened in."""
    p1, p2 = _full(x.inlet_pressure, size), _full(x.outlet_pressure, size)
    ok = (p2 < p1) & _subcritical(p1) & _subcritical(p2)
    t_sat2 = _saturation(p2, ok)
    ok &= _inlet_steam_ok(x, _saturation(p1, ok), size)
    for name, _ in flow_cases(x):
        if name != "normal":
            pressure = _full(case_inlet_pressure(x, name), size)
            ok &= _subcritical(pressure) & (pressure > p2)
            ok &= _inlet_steam_ok(x, _saturation(pressure, ok), size)
    if x.desuperheating:
        target = _target_temperature(x, t_sat2, size)
        water_t, water_p = _full(x.water_temperature, size), _full(x.water_pressure, size)
        ok &= (target - t_sat2 > SATURATION_TOLERANCE) & (target <= MAX_TEMPERATURE)
        ok &= (water_t < target) & (water_t >= MIN_TEMPERATURE) & (water_p > p2) & _subcritical(water_p)
        ok &= water_t < _saturation(water_p, ok) - SATURATION_TOLERANCE
    return ok, t_sat2


def _target_temperature(x, t_sat2, size):
    if x.target_superheat is not None:
        return t_sat2 + x.target_superheat
    return _full(x.target_temperature, size)


#: What the inlet state is needed for: the balances, the line loss, and the sizing without a line.
_INLET = ("enthalpy", "entropy", "density", "viscosity", "speed_of_sound")
_UPSTREAM = ("enthalpy", "density", "viscosity", "speed_of_sound")


def _inlet_properties(x, pressure, size, wanted=_INLET):
    """The inlet steam at an upstream pressure, by the inlet's own specification."""
    if x.inlet_dryness is not None:
        return properties_p_dryness(pressure, _full(x.inlet_dryness, size))
    t_sat = saturation_temperatures(pressure) if x.inlet_temperature is None else None
    return properties_pT(pressure, _inlet_temperature(x, t_sat, size), wanted)


def _results(x, size, t_sat2):
    """The banded results of screened rows (``t_sat2``: T_s at their outlet pressure, K, as the screen found it),
    and the rows still answered (inlet lines that fit)."""
    p1, p2, flow = _full(x.inlet_pressure, size), _full(x.outlet_pressure, size), _full(x.mass_flow, size)
    line = x.inlet_length is not None and x.inlet_size is not None
    inlet = _inlet_properties(x, p1, size, _INLET[:4] if line else _INLET)
    throttled = states_ph(p2, inlet.enthalpy, saturation_temperature=t_sat2, with_entropy=False)
    superheated = ~np.isin(throttled.phase, _TWO_PHASE)
    throttled_superheat = np.where(superheated, throttled.temperature - t_sat2, 0.0)
    results = {"throttled_temperature": throttled.temperature - 273.15}
    outlet_t, outlet_superheat = throttled.temperature, throttled_superheat
    if x.desuperheating:
        target_t = _target_temperature(x, t_sat2, size)
        target_h = properties_pT(p2, target_t, ("enthalpy",)).enthalpy
        water_h = properties_pT(_full(x.water_pressure, size), _full(x.water_temperature, size), ("enthalpy",)).enthalpy
        reachable = inlet.enthalpy > target_h
        spray = np.where(reachable, flow * (inlet.enthalpy - target_h) / (target_h - water_h), 0.0)
        results["spray_water_flow"] = spray * 3600
        outlet_t = np.where(reachable, target_t, outlet_t)
        outlet_superheat = np.where(reachable, target_t - t_sat2, outlet_superheat)
    results["outlet_temperature"] = outlet_t - 273.15
    results["outlet_superheat"] = outlet_superheat
    kv, kept = _valve_kv(x, inlet, p2, size, line)
    results["valve_kv"] = kv
    isentropic = states_ps(p2, inlet.entropy, saturation_temperature=t_sat2)
    efficiency = _given_or(x.isentropic_efficiency, DEFAULT_TURBINE_EFFICIENCY)
    results["recoverable_power"] = flow * efficiency * (inlet.enthalpy - isentropic.enthalpy) / 1e3
    return results, kept


def _valve_kv(x, inlet, p2, size, line):
    """Required Kv at the design flow case (maximum, else normal), each case at its own upstream
    pressure less its inlet line's drop; rows whose line loses half the drop or more are not kept."""
    design = "maximum" if x.max_flow is not None else "normal"
    kept = np.ones(size, dtype=bool)
    kv = None
    for name, case_flow in flow_cases(x):
        if name != design and not line:
            continue   # the screen has seen its inlet steam; without a line nothing else can refuse it
        pressure = case_inlet_pressure(x, name)
        wanted = _UPSTREAM[:3] if line else _UPSTREAM[1::2]   # the sizing without a line needs w
        if name != design:
            wanted = ("density", "viscosity")   # for the line's drop only
        upstream = inlet if pressure is x.inlet_pressure else _inlet_properties(x, _full(pressure, size), size, wanted)
        pressure = _full(pressure, size)
        drop = np.zeros(size)
        if line:
            diameter = pipe_inner_diameter(x.inlet_size, x.schedule or DEFAULT_SCHEDULE, field="lines.inlet_size")
            loss = line_pressure_drop(_full(case_flow, size), upstream.density, upstream.viscosity, diameter,
                                      x.inlet_length, _given_or(x.inlet_fittings_k, 0.0))
            fits = loss.pressure_drop < 0.5 * (pressure - p2)
            kept &= fits
            drop = np.where(fits, loss.pressure_drop, 0.0)
        if name == design:
            valve_inlet, kappa = _valve_inlet(x, upstream, pressure, drop, line)
            kv = required_kv(x, valve_inlet, kappa, case_flow).kv
    return kv, kept


def _valve_inlet(x, upstream, pressure, drop, line):
    """Valve inlet pressure and density, and the isentropic exponent for sizing (as
    :func:`steamcalc.calcs.letdown.equipment.sizing_kappa`: w²ρ/p single-phase; dry saturated
    steam the vapour's 1 mK above saturation; wet steam 1.035 + 0.1·x)."""
    if not line:
        if x.inlet_dryness is None:
            return _ValveInlet(pressure, upstream.density), upstream.speed_of_sound ** 2 * upstream.density / pressure
        dryness = _full(x.inlet_dryness, pressure.size)
        return _ValveInlet(pressure, upstream.density), _two_phase_kappa(pressure, upstream.temperature, dryness)
    valve_p = pressure - drop
    state = states_ph(valve_p, upstream.enthalpy, with_entropy=False)   # its temperature, phase and dryness
    two_phase = np.isin(state.phase, _TWO_PHASE)
    density, kappa = np.empty(valve_p.size), np.empty(valve_p.size)
    single = ~two_phase
    if single.any():
        props = properties_pT(valve_p[single], state.temperature[single], ("density", "speed_of_sound"))
        density[single] = props.density
        kappa[single] = props.speed_of_sound ** 2 * props.density / valve_p[single]
    if two_phase.any():
        dryness = state.dryness[two_phase]
        density[two_phase] = properties_p_dryness(valve_p[two_phase], dryness).density
        kappa[two_phase] = _two_phase_kappa(valve_p[two_phase], state.temperature[two_phase], dryness)
    return _ValveInlet(valve_p, density), kappa


def _two_phase_kappa(pressure, temperature, dryness):
    kappa = 1.035 + 0.1 * dryness
    dry = dryness == 1.0
    if dry.any():
        vapour = properties_pT(pressure[dry], temperature[dry] + 1e-3, ("density", "speed_of_sound"))
        kappa[dry] = vapour.speed_of_sound ** 2 * vapour.density / pressure[dry]
    return kappa
