"""Exchanger samples over arrays: the banded results of many Monte Carlo samples at once.

The numbers :func:`steamcalc.calcs.exchanger.calculation.calculate` gives for the banded results
(``UNCERTAINTY_RESULTS``) under :func:`~steamcalc.calcs.base.numbers_only`, on the fast engine,
for a whole array of sampled inputs: the same equations — the steam's state (at the heater, or its
supply throttled at constant enthalpy), the process duty and the steam flow, the zones' LMTDs, UA
and areas (:mod:`.zones`), and the stall load of :mod:`.turndown` — with IF97 over arrays
(:mod:`steamcalc.properties.steam_arrays`). No steps, checks or text: the record's own run makes
those, once.

A sample is answered here only when ``calculate()`` would give it a result. The screen refuses
what ``calculate()`` refuses (steam not above the process outlet, condensate below the process
inlet, process water boiling, a temperature cross in a zone, steam giving up no heat, drainage
beyond the critical pressure) and, to be safe, a little more (states within a hair of
saturation, pressures in the saturation line's region-3 part). A shell-and-tube arrangement whose
zones need an LMTD correction factor (a subcooling or dry-wall desuperheating zone) is left to
``calculate()`` too: F comes from ``ht`` one sample at a time. Samples not answered go through
``calculate()`` one by one, which gives them their result or their reason;
``tests/test_uncertainty_vector_kinds.py`` compares both paths sample by sample.
"""

from __future__ import annotations

import numpy as np

from ...properties.engines.common import MAX_TEMPERATURE, MIN_PRESSURE, SATURATION_PRESSURE_623
from ...properties.steam import SATURATION_TOLERANCE, saturation_pressure
from ...properties.steam_arrays import (
    properties_p_dryness, properties_pT, saturated_pair, saturation_temperatures, states_ph,
)
from .turndown import STANDARD_GRAVITY, TRIPLE_POINT_PRESSURE

#: The banded results this path gives (``steamcalc.calcs.exchanger.calculation.UNCERTAINTY_RESULTS``).
RESULTS = ("duty", "steam_flow", "required_area", "area_margin", "stall_load_fraction")
#: Samples at pressures above this go the one-by-one way (the saturation line's region-3 part).
_HIGHEST_PRESSURE = SATURATION_PRESSURE_623
#: A temperature is taken here as off the saturation line only this far from it (twice the tolerance
#: within which the scalar states refuse it), K.
_OFF_SATURATION = 2 * SATURATION_TOLERANCE
_NAMES = ("steam_pressure", "process_inlet_temperature", "process_outlet_temperature", "process_flow",
          "process_volume_flow", "process_density", "process_cp", "process_pressure", "steam_temperature",
          "steam_superheat", "steam_dryness", "condensate_subcooling", "heat_loss", "overall_u", "fouling_resistance",
          "installed_area", "condensate_back_pressure", "desuperheating_u", "subcooling_u", "trap_static_head",
          "trap_min_differential", "lift_head", "control_valve_supply_pressure", "control_valve_supply_temperature",
          "control_valve_supply_superheat")


def _full(value, size):
    return np.broadcast_to(np.asarray(value, dtype=float), (size,)).copy()


def sample_results(inputs, site, columns, size, keys):
    """Banded exchanger results of many samples at once, on the fast engine.

    Parameters
    ----------
    inputs : steamcalc.calcs.exchanger.calculation.Inputs
        The nominal inputs (every input that is not sampled).
    site : steamcalc.cases.site.Site
        The site (the banded results do not depend on it).
    columns : dict of str to numpy.ndarray
        The sampled inputs, SI units (Pa, K, kg/s, W/(m² K), m² K/W, m²), ``size`` values each.
    size : int
        Number of samples.
    keys : sequence of str
        Result keys wanted, from :data:`RESULTS`.

    Returns
    -------
    tuple
        ``(values, answered)``: values, shape (size, len(keys)), in the record's units (kW, kg/h,
        m², percent, fraction), NaN in rows not answered; answered, a boolean array, True where the
        row holds what ``calculate()`` gives.

    Notes
    -----
    As :func:`steamcalc.calcs.exchanger.calculation.calculate`:
    :math:`\\dot m_s = Q (1 + f_{loss})/(h_s - h_c)`; :math:`UA_i = Q_i/(F_i \\Delta T_{lm,i})`,
    :math:`A = \\sum_i UA_i (1/U_i + R_f)`; the stall load
    :math:`UA (T_o - T_i)/\\ln((T_b - T_i)/(T_b - T_o))/Q` with :math:`T_b = T_{sat}(p_{stall})`.

    References
    ----------
    IAPWS R7-97(2012) (through seuif97); the LMTD method (Incropera & DeWitt, eq. 11.15); the
    drainage balance is common practice (see :mod:`.turndown`).

    Examples
    --------
    >>> from steamcalc.calcs.exchanger.calculation import Inputs
    >>> from steamcalc.cases.site import Site
    >>> nominal = Inputs(steam_pressure=9e5, process_flow=1.0, process_inlet_temperature=328.15,
    ...                  process_outlet_temperature=358.15)
    >>> values, answered = sample_results(nominal, Site(), {"process_flow": np.array([1.0, 1.1])}, 2,
    ...                                   ["duty", "steam_flow"])
    >>> [round(float(v), 1) for v in values[:, 0]], answered.tolist()
    ([125.7, 138.2], [True, True])
    """
    x = {name: np.asarray(columns[name], dtype=float) if name in columns else
         (None if getattr(inputs, name) is None else _full(getattr(inputs, name), size)) for name in _NAMES}
    answered = _screen_inputs(inputs, x, size)
    values = np.full((size, len(keys)), np.nan)
    rows = np.flatnonzero(answered)
    if rows.size:
        subset = {name: None if column is None else column[rows] for name, column in x.items()}
        results, kept = _results(inputs, subset, rows.size)
        for j, key in enumerate(keys):
            values[rows, j] = results[key]
        kept &= np.all(np.isfinite(values[rows]), axis=1)
        answered[rows[~kept]] = False
        values[rows[~kept]] = np.nan
    return values, answered


def _in_range(pressure):
    return (pressure >= MIN_PRESSURE) & (pressure <= _HIGHEST_PRESSURE)


def _saturation(pressure, rows):
    """T_s (K) where ``rows``, NaN elsewhere."""
    out = np.full(pressure.shape, np.nan)
    if rows.any():
        out[rows] = saturation_temperatures(pressure[rows])
    return out


def _screen_inputs(inputs, x, size):
    """Rows whose inputs the array states take (what the states themselves decide is screened later)."""
    ok = _in_range(x["steam_pressure"])
    for name in ("control_valve_supply_pressure", "condensate_back_pressure"):
        if x[name] is not None:
            ok &= _in_range(x[name])
    supply = x["control_valve_supply_pressure"]
    if supply is not None:
        t_sat = _saturation(supply, ok)
        temperature = x["control_valve_supply_temperature"]
        if temperature is None and x["control_valve_supply_superheat"] is not None:
            temperature = t_sat + x["control_valve_supply_superheat"]
        if temperature is not None:
            ok &= (temperature - t_sat > _OFF_SATURATION) & (temperature <= MAX_TEMPERATURE)
    else:
        t_sat = _saturation(x["steam_pressure"], ok)
        temperature = x["steam_temperature"]
        if temperature is None and x["steam_superheat"] is not None:
            temperature = t_sat + x["steam_superheat"]
        if temperature is not None:
            ok &= (temperature - t_sat > _OFF_SATURATION) & (temperature <= MAX_TEMPERATURE)
        if x["steam_dryness"] is not None:
            ok &= (x["steam_dryness"] > 0.0) & (x["steam_dryness"] <= 1.0)
    if x["process_cp"] is None and x["process_pressure"] is not None:
        ok &= _in_range(x["process_pressure"])
    if inputs.arrangement not in (None, "counterflow") and (
            x["desuperheating_u"] is not None or (x["condensate_subcooling"] is not None
                                                  and np.any(x["condensate_subcooling"] >= 0.01))):
        # An F factor other than 1 (ht, one sample at a time): those samples go the one-by-one way.
        ok &= False
    return ok


def _steam_states(x, size):
    """Enthalpy (J/kg) and temperature (K) of the steam entering the heater; the saturated liquid's and
    vapour's enthalpy and the liquid's density at the steam pressure; T_sat; the condensate's enthalpy and
    temperature. As :func:`steamcalc.calcs.exchanger.supply.steam_states`."""
    p = x["steam_pressure"]
    liquid, vapour = saturated_pair(p, ("enthalpy", "density"))
    t_sat = liquid.temperature
    supply = x["control_valve_supply_pressure"]
    if supply is not None:
        h, t = _supply_state(x, supply, size)
        throttled = p != supply
        if throttled.any():
            state = states_ph(p[throttled], h[throttled], with_entropy=False)   # its temperature only
            t = t.copy()
            t[throttled] = state.temperature
    elif x["steam_temperature"] is not None or x["steam_superheat"] is not None:
        t = x["steam_temperature"] if x["steam_temperature"] is not None else t_sat + x["steam_superheat"]
        h = properties_pT(p, t, ("enthalpy",)).enthalpy
    elif x["steam_dryness"] is not None:
        h, t = properties_p_dryness(p, x["steam_dryness"]).enthalpy, t_sat
    else:
        h, t = vapour.enthalpy, t_sat
    subcooling = x["condensate_subcooling"] if x["condensate_subcooling"] is not None else np.zeros(size)
    subcooled = subcooling >= 0.01   # below 0.01 K the condensate is saturated for every practical purpose
    h_c, t_c = liquid.enthalpy.copy(), t_sat.copy()
    if subcooled.any():
        t_c[subcooled] = t_sat[subcooled] - subcooling[subcooled]
        h_c[subcooled] = properties_pT(p[subcooled], t_c[subcooled], ("enthalpy",)).enthalpy
    return {"h": h, "t": t, "h_f": liquid.enthalpy, "h_g": vapour.enthalpy, "rho_f": liquid.density, "t_sat": t_sat,
            "h_c": h_c, "t_c": t_c}


def _supply_state(x, supply, size):
    """Enthalpy (J/kg) and temperature (K) of the steam at the control valve inlet."""
    temperature = x["control_valve_supply_temperature"]
    if temperature is None and x["control_valve_supply_superheat"] is not None:
        temperature = saturation_temperatures(supply) + x["control_valve_supply_superheat"]
    if temperature is None:
        saturated = saturated_pair(supply, ("enthalpy",))[1]
        return saturated.enthalpy, saturated.temperature
    return properties_pT(supply, temperature, ("enthalpy",)).enthalpy, temperature


def _process_side(x, size):
    """(process mass flow kg/s, duty W, water pressure Pa and inlet enthalpy J/kg or None for a cp, rows kept)."""
    t_in, t_out = x["process_inlet_temperature"], x["process_outlet_temperature"]
    if x["process_cp"] is not None:
        flow = x["process_flow"] if x["process_flow"] is not None else x["process_volume_flow"] * x["process_density"]
        return flow, flow * x["process_cp"] * (t_out - t_in), None, np.ones(size, dtype=bool)
    p = x["process_pressure"]
    if p is None:
        # As calculate(): 1 bar above saturation at the outlet, at least 2 bar(a).
        p = np.array([max(2e5, saturation_pressure(min(t, 640.0)) + 1e5) for t in t_out.tolist()])
    kept = _in_range(p)
    kept &= t_out < _saturation(p, kept) - _OFF_SATURATION   # water that does not boil at the outlet
    p_k = p[kept]
    wanted = ("enthalpy", "density") if x["process_flow"] is None and x["process_density"] is None else ("enthalpy",)
    h_in, h_out, density = np.full(size, np.nan), np.full(size, np.nan), np.full(size, np.nan)
    if kept.any():
        water_in = properties_pT(p_k, t_in[kept], wanted)
        h_in[kept], h_out[kept] = water_in.enthalpy, properties_pT(p_k, t_out[kept], ("enthalpy",)).enthalpy
        if "density" in wanted:
            density[kept] = water_in.density
    if x["process_flow"] is not None:
        flow = x["process_flow"]
    else:
        flow = x["process_volume_flow"] * (x["process_density"] if x["process_density"] is not None else density)
    return flow, flow * (h_out - h_in), (p, h_in), kept


def _results(inputs, x, size):
    t_in, t_out = x["process_inlet_temperature"], x["process_outlet_temperature"]
    s = _steam_states(x, size)
    flow, duty, water, kept = _process_side(x, size)
    kept &= (s["t_sat"] > t_out) & (s["t_c"] > t_in)
    loss = x["heat_loss"] if x["heat_loss"] is not None else 0.0
    steam_side = duty * (1.0 + loss)
    specific = s["h"] - s["h_c"]
    kept &= specific > 0.0
    steam_flow = steam_side / np.where(kept, specific, 1.0)
    results = {"duty": duty / 1e3, "steam_flow": steam_flow * 3600}
    ua, area, fits = _zones(inputs, x, s, flow, duty, steam_side, steam_flow, water, kept, size)
    kept &= fits
    if area is not None:
        results["required_area"] = area
        if x["installed_area"] is not None:
            results["area_margin"] = 100.0 * (x["installed_area"] / area - 1.0)
    if x["condensate_back_pressure"] is not None:
        if x["overall_u"] is None:
            ua_clean = ua
        else:
            ua_clean = x["overall_u"] * (x["installed_area"] if x["installed_area"] is not None else area)
        stall, fits = _stall_load(x, duty, ua_clean, s["rho_f"], size)
        results["stall_load_fraction"] = stall
        kept &= fits
    return results, kept


def _zones(inputs, x, s, flow, duty, steam_side, steam_flow, water, kept, size):
    """UA (W/K), required area (m², None without a U) and the rows without a temperature cross, as
    :func:`steamcalc.calcs.exchanger.zones.zone_table` and :func:`~steamcalc.calcs.exchanger.zones.zone_sizing`."""
    t_in, t_out, t_sat = x["process_inlet_temperature"], x["process_outlet_temperature"], s["t_sat"]
    q_super = steam_flow * np.maximum(0.0, s["h"] - s["h_g"])
    q_cond = steam_flow * (np.minimum(s["h"], s["h_g"]) - s["h_f"])
    q_sub = steam_flow * (s["h_f"] - s["h_c"])
    scale = duty / np.where(kept, steam_side, 1.0)   # the heat loss is taken from each zone in proportion
    span = t_out - t_in

    def process_temperature(heat):
        if water is None:
            return t_in + span * heat / duty
        pressure, h_in = water
        out = np.full(size, np.nan)
        if kept.any():
            out[kept] = states_ph(pressure[kept], h_in[kept] + heat[kept] / flow[kept], with_entropy=False).temperature
        return out

    t_a = process_temperature(q_sub * scale)
    t_b = process_temperature((q_sub + q_cond) * scale)
    wet = x["desuperheating_u"] is None
    zones = [("desuperheating", q_super > 0.0, q_super * scale, t_sat if wet else s["t"], t_sat, t_b, t_out),
             ("condensing", np.ones(size, dtype=bool), q_cond * scale, t_sat, t_sat, t_a, t_b),
             ("subcooling", q_sub > 0.0, q_sub * scale, t_sat, s["t_c"], t_in, t_a)]
    fouling = x["fouling_resistance"] if x["fouling_resistance"] is not None else np.zeros(size)
    ua, area = np.zeros(size), (np.zeros(size) if x["overall_u"] is not None else None)
    fits = kept.copy()
    for name, present, q, hot_in, hot_out, cold_in, cold_out in zones:
        d1, d2 = hot_in - cold_out, hot_out - cold_in
        fits &= ~present | ((d1 > 0.0) & (d2 > 0.0))   # no temperature cross
        take = present & fits
        equal = np.abs(d1 - d2) < 1e-12 * np.maximum(d1, d2)
        with np.errstate(divide="ignore", invalid="ignore"):
            dt = np.where(equal, d1, (d1 - d2) / np.log(np.where(take & ~equal, d1 / d2, 2.0)))
            ua_zone = q / dt   # F = 1: counterflow, or an isothermal hot side (the screen sends the rest away)
        ua = np.where(take, ua + ua_zone, ua)
        if area is not None:
            u = {"desuperheating": x["desuperheating_u"], "subcooling": x["subcooling_u"]}.get(name)
            u = u if u is not None else x["overall_u"]
            u_service = np.where(fouling != 0.0, 1.0 / (1.0 / u + fouling), u)
            area = np.where(take, area + ua_zone / u_service, area)
    return ua, area, fits


def _stall_load(x, duty, ua_clean, condensate_density, size):
    """The stall load on the clean U (fraction of design), as :func:`steamcalc.calcs.exchanger.turndown.stall_load`
    with the drainage pressure of :func:`~steamcalc.calcs.exchanger.turndown.stall_pressure`; rows kept."""
    back = x["condensate_back_pressure"]
    if x["lift_head"] is not None and np.any(x["lift_head"]):
        lift_density = saturated_pair(back, ("density",))[0].density
        back = np.where(x["lift_head"] != 0.0, back + lift_density * STANDARD_GRAVITY * x["lift_head"], back)
    differential = x["trap_min_differential"] if x["trap_min_differential"] is not None else np.zeros(size)
    head = x["trap_static_head"] if x["trap_static_head"] is not None else np.zeros(size)
    drain = back + differential - condensate_density * STANDARD_GRAVITY * head
    drains = drain > TRIPLE_POINT_PRESSURE
    kept = ~drains | (drain <= _HIGHEST_PRESSURE)
    t_back = _saturation(drain, drains & kept)
    t_in, t_out = x["process_inlet_temperature"], x["process_outlet_temperature"]
    stalls = drains & kept & (t_back > t_out)
    load = np.zeros(size)
    if stalls.any():
        tb, ti, to = t_back[stalls], t_in[stalls], t_out[stalls]
        load[stalls] = ua_clean[stalls] * (to - ti) / np.log((tb - ti) / (tb - to)) / duty[stalls]
    return load, kept
