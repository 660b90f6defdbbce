"""The let-down's figures as data: the process on the h–s chart, the valve's Kv and travel, its noise.

Each figure is computed here, from the same equipment functions as the results, and stored in the
record; the views (HTML, workbook) only draw it. Every state drawn is kept inside the ranges IF97
accepts (an isobar stops at 800 °C and at the melting line rather than refusing the record), and a
figure that cannot be computed is issued as missing, with the reason, never stopping the record.
"""

from __future__ import annotations

import numpy as np

from ...equipment.noise import DEFAULT_NOISE_LIMIT, parse_sound_level
from ...errors import InputError
from ...properties.engines.common import MAX_TEMPERATURE, MIN_TEMPERATURE
from ...properties.steam import CRITICAL_PRESSURE
from ...properties.steam_arrays import properties_pT, saturation_arrays, states_ps
from ..base import Axis, Band, Figure, Series, figure_or_missing
from .equipment import flow_cases, rated_travel, required_kv, sizing_kappa
from .valve_noise import noise_geometry, stage_noise

#: Points along each curve.
CURVE_POINTS = 60
FLOW_POINTS = 40
NOISE_POINTS = 16
#: Flow span of the valve and noise charts around the flow cases (lowest × 0.8 to highest × 1.1).
FLOW_SPAN = (0.8, 1.1)
#: Entropy margin either side of the process on the h–s chart, J/(kg K).
ENTROPY_MARGIN = 400.0
#: The figures' titles, by name.
TITLES = {"enthalpy_entropy": "Let-down on the enthalpy–entropy chart",
          "valve": "Control valve: required Kv and travel against flow",
          "noise": "Control valve noise at 1 m from the pipe (IEC 60534-8-3)"}


def saturation_line():
    """The saturated liquid and vapour lines on the h–s plane, (s, h) in J/(kg K) and J/kg.

    From 0.01 bar(a) to just below the critical point (IF97 region 4).
    """
    pressures = np.concatenate([np.geomspace(0.01e5, 200e5, 70), [215e5, 220e5, CRITICAL_PRESSURE * 0.99999]])
    sat = saturation_arrays(pressures)
    return np.concatenate([sat["s_f"], sat["s_g"][::-1]]), np.concatenate([sat["h_f"], sat["h_g"][::-1]])


def isobar(pressure, entropy_low, entropy_high, points=CURVE_POINTS):
    """An isobar on the h–s plane between two entropies, cut to where IF97 holds at that pressure.

    Parameters
    ----------
    pressure : float
        Absolute pressure, Pa.
    entropy_low, entropy_high : float
        The entropy span wanted, J/(kg K).

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        Entropy (J/(kg K)) and enthalpy (J/kg); the span is narrowed to the entropies of the
        isobar between 1 K above the triple-point temperature and IF97's upper temperature
        (800 °C in regions 1–3), so no point lies outside the formulation.
    """
    bounds = properties_pT(np.full(2, pressure), np.array([MIN_TEMPERATURE + 1.0, MAX_TEMPERATURE - 0.5]),
                           wanted=("entropy",)).entropy
    low, high = max(entropy_low, float(bounds[0])), min(entropy_high, float(bounds[1]))
    if high <= low:
        return np.array([]), np.array([])
    states = states_ps(np.full(points, pressure), np.linspace(low, high, points))
    return states.entropy, states.enthalpy


def process_states(result):
    """(label, SteamState) of the let-down's states in process order: inlet, after the valve, desuperheated."""
    states = [("1 inlet", result.states["inlet"]), ("2 after valve", result.states["throttled"])]
    if result.states["outlet"] is not result.states["throttled"]:
        states.append(("3 desuperheated", result.states["outlet"]))
    return states


def enthalpy_entropy_chart(inputs, result):
    """The let-down on the enthalpy–entropy chart: the saturation line, an isobar per pressure, the process."""
    states = process_states(result)
    entropies = [state.entropy for _, state in states]
    s_low, s_high = min(entropies) - ENTROPY_MARGIN, max(entropies) + ENTROPY_MARGIN
    s_sat, h_sat = saturation_line()
    series = [Series("saturation line", tuple(s_sat / 1e3), tuple(h_sat / 1e3), role="reference")]
    seen = set()
    for index, (_, state) in enumerate(states):
        if round(state.pressure) in seen:
            continue
        seen.add(round(state.pressure))
        s, h = isobar(state.pressure, s_low, s_high)
        if len(s):
            series.append(Series("inlet pressure isobar" if index == 0 else "outlet pressure isobar", tuple(s / 1e3),
                                 tuple(h / 1e3), role="inlet" if index == 0 else "outlet", dash="dot"))
    series.append(Series("process", tuple(s / 1e3 for s in entropies),
                         tuple(state.enthalpy / 1e3 for _, state in states), style="line+markers",
                         labels=tuple(label for label, _ in states)))
    enthalpies = [state.enthalpy / 1e3 for _, state in states]
    return Figure("enthalpy_entropy", TITLES["enthalpy_entropy"],
                  x=Axis("specific entropy s", "kJ/(kg*K)", low=s_low / 1e3, high=s_high / 1e3),
                  y=Axis("specific enthalpy h", "kJ/kg", low=min(enthalpies) - 250.0, high=max(enthalpies) + 200.0),
                  series=tuple(series))


def _flow_span(cases, points):
    return np.linspace(cases[0][1] * FLOW_SPAN[0], cases[-1][1] * FLOW_SPAN[1], points)


def _where_sized(flows, size):
    """(flows, values) of the flows at which ``size(flow)`` gives a value: a flow the valve's sizing
    refuses (beyond what its geometry holds) is left out of the curve, not drawn as a guess."""
    kept = []
    for flow in flows:
        try:
            kept.append((flow, size(flow)))
        except InputError:
            continue
    if not kept:
        raise InputError("no flow of the chart's span can be sized with this valve and its pipes",
                         field="valve.valve_size")
    return np.array([f for f, _ in kept]), [v for _, v in kept]


def valve_chart(inputs, result):
    """Required Kv at the normal inlet state over the flow span, the flow cases, the rated valve's travel
    and the spray-water valve."""
    inlet = result.states["inlet"]
    kappa = result.value("isentropic_exponent")
    cases = flow_cases(inputs)
    flows = _flow_span(cases, FLOW_POINTS)
    try:   # the whole span at once (the sizing takes arrays); point by point only when some flow is refused
        kvs = [float(kv) for kv in required_kv(inputs, inlet, kappa, flows).kv]
    except InputError:
        flows, kvs = _where_sized(flows, lambda w: required_kv(inputs, inlet, kappa, w).kv)
    series = [Series("required Kv at the normal inlet pressure", tuple(flows * 3600), tuple(kvs), role="outlet"),
              Series("flow cases", tuple(w * 3600 for _, w in cases),
                     tuple(result.value(f"valve_kv_{n}") for n, _ in cases), style="markers",
                     labels=tuple(n for n, _ in cases))]
    y2, bands = None, ()
    if inputs.rated_kv is not None:
        series.append(Series("travel of the rated valve", tuple(flows * 3600),
                             tuple(100.0 * rated_travel(inputs, kv) for kv in kvs), role="inlet", dash="dash",
                             axis="y2"))
        y2 = Axis("travel", "percent", low=0.0, high=100.0)
        bands = (Band("y2", 20.0, 80.0, "preferred travel 20-80 % (common practice)"),)
    spray = [(n, w) for n, w in cases if f"spray_valve_kv_{n}" in result.values]
    if spray:
        with_travel = all(f"spray_valve_travel_{n}" in result.values for n, _ in spray)
        key = "spray_valve_travel" if with_travel else "spray_valve_kv"
        series.append(Series("spray-water valve travel" if with_travel else "spray-water valve required Kv",
                             tuple(w * 3600 for _, w in spray), tuple(result.value(f"{key}_{n}") for n, _ in spray),
                             style="line+markers", role="secondary", dash="dot", axis="y2" if with_travel else "y",
                             labels=tuple(n for n, _ in spray)))
        if with_travel and y2 is None:
            y2 = Axis("travel", "percent", low=0.0, high=100.0)
    return Figure("valve", TITLES["valve"],
                  x=Axis("steam flow", "kg/h"), y=Axis("required Kv", "m**3/h"), y2=y2, series=tuple(series),
                  bands=bands)


def noise_chart(inputs, result):
    """Valve noise at 1 m (IEC 60534-8-3) over the flow span at the normal pressures, the flow cases
    at their own pressures, and the limit; None when the case predicts no noise."""
    cases = [(n, w) for n, w in flow_cases(inputs) if f"valve_noise_{n}" in result.values]
    if not cases:
        return None
    limit = parse_sound_level(inputs.noise_limit) if inputs.noise_limit is not None else DEFAULT_NOISE_LIMIT
    geometry = noise_geometry(inputs)
    inlet = result.states["valve_inlet_normal"]
    outlet = result.states["valve_outlet_normal"]   # isenthalpic at the outlet pressure: the same at every flow
    flows, levels = _where_sized(_flow_span(cases, NOISE_POINTS),
                                 lambda w: stage_noise(inputs, inlet, inputs.outlet_pressure, w, geometry,
                                                       outlet=outlet)[1])
    ends = (flows[0] * 3600, flows[-1] * 3600)
    series = (Series("at the normal pressures", tuple(flows * 3600), tuple(levels), role="outlet"),
              Series("flow cases (own pressures)", tuple(w * 3600 for _, w in cases),
                     tuple(result.value(f"valve_noise_{n}") for n, _ in cases), style="markers",
                     labels=tuple(n for n, _ in cases)),
              Series("noise limit", ends, (limit, limit), role="limit", dash="dash"))
    return Figure("noise", TITLES["noise"],
                  x=Axis("steam flow", "kg/h"), y=Axis("sound pressure level, A-weighted", "dB"), series=series)


def figures(inputs, result):
    """The let-down's figures, in the order the record shows them."""
    makers = {"enthalpy_entropy": enthalpy_entropy_chart, "valve": valve_chart, "noise": noise_chart}
    made = [figure_or_missing(name, TITLES[name], lambda make=make: make(inputs, result)) for name, make in makers.items()]
    return [figure for figure in made if figure is not None]


__all__ = ["figures", "isobar", "saturation_line", "enthalpy_entropy_chart", "valve_chart", "noise_chart"]
