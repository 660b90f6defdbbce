"""Charts for the workbooks (plotly). Presentation only: states come from steamcalc.steam."""

from __future__ import annotations

import json
from functools import lru_cache

import numpy as np
import plotly.graph_objects as go

from ..steam import CRITICAL_PRESSURE
from ..steam_arrays import saturation_arrays, states_ps

_COLOURS = {"saturation": "#5b6770", "inlet": "#b5442c", "outlet": "#2b6a99", "process": "#1d2327"}


@lru_cache(maxsize=1)
def saturation_dome():
    """Saturated liquid and vapour lines on the h–s plane: (s, h) arrays in kJ/(kg K) and kJ/kg."""
    pressures = np.concatenate([np.geomspace(0.01e5, 200e5, 70), [215e5, 220e5, CRITICAL_PRESSURE * 0.99999]])
    sat = saturation_arrays(pressures)
    s = np.concatenate([sat["s_f"], sat["s_g"][::-1]])
    h = np.concatenate([sat["h_f"], sat["h_g"][::-1]])
    return s / 1e3, h / 1e3


def isobar(pressure, entropy_low, entropy_high, points=60):
    """An isobar on the h–s plane between two entropies (J/(kg K)): (s, h) arrays in kJ units."""
    states = states_ps(np.full(points, pressure), np.linspace(entropy_low, entropy_high, points))
    return states.entropy / 1e3, states.enthalpy / 1e3


def letdown_chart(states, title="Let-down on the enthalpy–entropy chart"):
    """The let-down process on an h–s chart.

    Parameters
    ----------
    states : list of (label, SteamState)
        Inlet, throttled and (when desuperheating) desuperheated states, in process order.
    """
    fig = go.Figure()
    s_dome, h_dome = saturation_dome()
    fig.add_trace(go.Scatter(x=s_dome, y=h_dome, mode="lines", name="saturation line",
                             line=dict(color=_COLOURS["saturation"], width=1.5)))
    entropies = [st.entropy for _, st in states]
    s_low, s_high = min(entropies) - 400.0, max(entropies) + 400.0
    seen = set()
    for i, (label, state) in enumerate(states):
        if round(state.pressure) in seen:
            continue
        seen.add(round(state.pressure))
        s, h = isobar(state.pressure, s_low, s_high)
        fig.add_trace(go.Scatter(
            x=s, y=h, mode="lines", name=f"{state.pressure / 1e5:.3g} bar(a) isobar",
            line=dict(color=_COLOURS["inlet"] if i == 0 else _COLOURS["outlet"], width=1, dash="dot")))
    fig.add_trace(go.Scatter(
        x=[st.entropy / 1e3 for _, st in states], y=[st.enthalpy / 1e3 for _, st in states],
        mode="lines+markers+text", name="process", text=[label for label, _ in states],
        textposition="top right", marker=dict(size=9, color=_COLOURS["process"]),
        line=dict(color=_COLOURS["process"], width=2)))
    h_all = [st.enthalpy / 1e3 for _, st in states]
    fig.update_layout(
        title=title, xaxis_title="specific entropy s, kJ/(kg·K)", yaxis_title="specific enthalpy h, kJ/kg",
        xaxis_range=[s_low / 1e3, s_high / 1e3], yaxis_range=[min(h_all) - 250, max(h_all) + 200],
        height=460, margin=dict(l=60, r=20, t=50, b=50),
        legend=dict(orientation="h", y=-0.2),
    )
    return fig


def letdown_states(inputs, result):
    """The states a let-down chart marks, as the calculation found them."""
    states = [("1 inlet", result.states["inlet"]), ("2 after valve", result.states["throttled"])]
    if result.states["outlet"] is not result.states["throttled"]:
        states.append(("3 desuperheated", result.states["outlet"]))
    return states


def flash_chart(inputs, result, points=60):
    """Flash fraction of this condensate against flash pressure, with the chosen stage(s) marked."""
    h_in = result.value("condensate_enthalpy") * 1e3
    p_in = inputs.condensate_pressure
    pressures = np.geomspace(max(0.2e5, p_in / 60.0), p_in * 0.999, points)
    sat = saturation_arrays(pressures)
    fractions = np.maximum(0.0, (h_in - sat["h_f"]) / (sat["h_g"] - sat["h_f"])) * 100.0
    fig = go.Figure()
    fig.add_trace(go.Scatter(x=pressures / 1e5, y=fractions, mode="lines", name="single flash from the inlet",
                             line=dict(color=_COLOURS["outlet"], width=2)))
    stages = inputs.stage_pressures
    if len(stages) == 1:
        marks_x, marks_y = [stages[0] / 1e5], [result.value("flash_fraction") * 100.0]
        names = ["chosen flash pressure"]
    else:
        marks_x = [p / 1e5 for p in stages]
        marks_y = [result.value(f"stage_{i}_flash_fraction") * 100.0 for i in range(1, len(stages) + 1)]
        names = [f"stage {i}" for i in range(1, len(stages) + 1)]
    fig.add_trace(go.Scatter(x=marks_x, y=marks_y, mode="markers+text", text=names, textposition="top right",
                             name="this case", marker=dict(size=11, color=_COLOURS["inlet"])))
    fig.update_layout(
        title="Flash fraction against flash pressure", xaxis_title="flash pressure, bar(a)",
        yaxis_title="flash fraction, % of the condensate entering", xaxis_type="log",
        height=420, margin=dict(l=60, r=20, t=50, b=50),
        legend=dict(orientation="h", y=-0.2),
    )
    return fig


def flash_stage_rows(inputs, result):
    """The cascade (or single flash) as rows for a table: one dict per stage."""
    stages = inputs.stage_pressures
    if len(stages) == 1:
        return [{"stage": 1, "pressure, bar(a)": stages[0] / 1e5,
                 "flash fraction, %": result.value("flash_fraction") * 100,
                 "flash steam, kg/h": result.value("flash_steam_flow"),
                 "residual condensate, kg/h": result.value("residual_condensate_flow")}]
    return [{"stage": i, "pressure, bar(a)": result.value(f"stage_{i}_pressure"),
             "flash fraction, %": result.value(f"stage_{i}_flash_fraction") * 100,
             "flash steam, kg/h": result.value(f"stage_{i}_flash_steam_flow"),
             "residual condensate, kg/h": result.value(f"stage_{i}_residual_condensate_flow")}
            for i in range(1, len(stages) + 1)]


def valve_chart(inputs, result, points=40):
    """Required Kv (and travel of the rated valve) against flow, over the flow cases."""
    from plotly.subplots import make_subplots

    from ..calcs.letdown_equipment import flow_cases, rated_travel, required_kv

    inlet = result.states["inlet"]
    kappa = result.value("isentropic_exponent")
    low = inputs.min_flow if inputs.min_flow is not None else inputs.mass_flow * 0.2
    high = inputs.max_flow if inputs.max_flow is not None else inputs.mass_flow
    flows = np.linspace(low * 0.8, high * 1.1, points)
    kvs = [required_kv(inputs, inlet, kappa, w).kv for w in flows]
    fig = make_subplots(specs=[[{"secondary_y": True}]])
    fig.add_trace(go.Scatter(x=flows * 3600, y=kvs, name="required Kv at the normal inlet pressure", line=dict(color=_COLOURS["outlet"], width=2)))
    cases = flow_cases(inputs)
    fig.add_trace(go.Scatter(x=[w * 3600 for _, w in cases], y=[result.value(f"valve_kv_{n}") for n, _ in cases],
                             mode="markers+text", text=[n for n, _ in cases], textposition="bottom right",
                             name="flow cases", marker=dict(size=10, color=_COLOURS["process"])))
    if inputs.rated_kv is not None:
        travel = [100 * rated_travel(inputs, kv) for kv in kvs]
        fig.add_trace(go.Scatter(x=flows * 3600, y=travel, name="travel of the rated valve",
                                 line=dict(color=_COLOURS["inlet"], dash="dash")), secondary_y=True)
        fig.add_shape(type="rect", xref="paper", x0=0, x1=1, yref="y2", y0=20, y1=80, fillcolor="#2f6b3a",
                      opacity=0.07, line_width=0, layer="below")
        fig.update_yaxes(title_text="travel, % (shaded: 20-80 %)", range=[0, 100], tickmode="linear", dtick=20,
                         secondary_y=True)
    fig.update_yaxes(title_text="required Kv, m³/h", secondary_y=False)
    spray_valve_trace(fig, inputs, result)
    fig.update_layout(title="Control valve: required Kv and travel against flow", xaxis_title="steam flow, kg/h",
                      height=420, margin=dict(l=60, r=60, t=50, b=50),
                      legend=dict(orientation="h", y=-0.2))
    return fig


def spray_valve_trace(fig, inputs, result):
    """Add the spray-water valve at the let-down's flow cases to the valve chart: its travel on the
    right axis when a rated valve is given (else its Kv on the left), its Kv in the hover text."""
    from ..calcs.letdown_equipment import flow_cases

    cases = [(n, w) for n, w in flow_cases(inputs) if f"spray_valve_kv_{n}" in result.values]
    if not cases:
        return
    kvs = [result.value(f"spray_valve_kv_{n}") for n, _ in cases]
    with_travel = all(f"spray_valve_travel_{n}" in result.values for n, _ in cases)
    y = [result.value(f"spray_valve_travel_{n}") for n, _ in cases] if with_travel else kvs
    fig.add_trace(go.Scatter(
        x=[w * 3600 for _, w in cases], y=y, mode="lines+markers",
        name="spray-water valve travel" if with_travel else "spray-water valve required Kv",
        hovertext=[f"{n} flow: spray-water valve Kv {kv:.3g} m³/h" for (n, _), kv in zip(cases, kvs)],
        line=dict(color=_COLOURS["saturation"], dash="dot"), marker=dict(symbol="diamond", size=9)),
        secondary_y=with_travel)
    if with_travel and inputs.rated_kv is None:
        fig.update_yaxes(title_text="travel, %", range=[0, 100], secondary_y=True)


def valve_case_rows(inputs, result):
    """The let-down's flow cases as table rows."""
    from ..calcs.letdown_equipment import flow_cases

    rows = []
    for name, flow in flow_cases(inputs):
        row = {"flow case": name, "flow, kg/h": flow * 3600,
               "sized at": result.value(f"valve_pressures_{name}") if f"valve_pressures_{name}" in result.values else "",
               "required Kv, m³/h": result.value(f"valve_kv_{name}"),
               "choked": "yes" if result.value(f"choked_{name}") else "no"}
        if f"valve_travel_{name}" in result.values:
            row["travel, %"] = result.value(f"valve_travel_{name}")
        if f"valve_noise_{name}" in result.values:
            row["noise at 1 m, dB(A)"] = result.value(f"valve_noise_{name}")
        if f"valve_outlet_mach_{name}" in result.values:
            row["outlet Mach"] = result.value(f"valve_outlet_mach_{name}")
        for key, heading in (("spray_water_flow", "spray water, kg/h"), ("spray_valve_kv", "spray valve Kv, m³/h"),
                             ("spray_valve_travel", "spray valve travel, %")):
            if f"{key}_{name}" in result.values:
                row[heading] = result.value(f"{key}_{name}")
        rows.append(row)
    return rows


def _turndown_series(result, clean=False):
    """(loads in %, pressures in bar(a)) of the turndown, on the fouled U or (when it differs) the clean U."""
    prefix = "required_steam_pressure_clean_" if clean else "required_steam_pressure_"
    loads = sorted(int(k[len(prefix):]) for k in result.values if k.startswith(prefix) and k[len(prefix):].isdigit())
    return loads, [result.value(f"{prefix}{load}") for load in loads]


def _u_label(result, which):
    if f"turndown_u_{which}" in result.values:
        return f"{which} U {result.value(f'turndown_u_{which}'):.3g} kW/(m²·K)"
    return "UA as at design"


def noise_chart(inputs, result, points=16):
    """Valve noise at 1 m against flow (IEC 60534-8-3), the flow cases marked, with the limit line."""
    from ..calcs.letdown_equipment import flow_cases, required_kv, sizing_kappa
    from ..calcs.letdown_station import _noise_geometry
    from ..equipment.noise import DEFAULT_NOISE_LIMIT, parse_sound_level, valve_noise
    from ..steam import SteamState

    cases = [(n, w) for n, w in flow_cases(inputs) if f"valve_noise_{n}" in result.values]
    if not cases:
        return None
    limit = parse_sound_level(inputs.noise_limit) if inputs.noise_limit is not None else DEFAULT_NOISE_LIMIT
    geometry = _noise_geometry(inputs)
    inlet = result.states["valve_inlet_normal"]
    outlet = SteamState.from_ph(inputs.outlet_pressure, inlet.enthalpy)
    kappa = sizing_kappa(inlet)
    fd = inputs.fd if inputs.fd is not None else 1.0
    fl = inputs.fl if inputs.fl is not None else 0.9
    flows = np.linspace(cases[0][1] * 0.8, cases[-1][1] * 1.1, points)
    levels = [valve_noise(w, inlet, outlet, kappa, required_kv(inputs, inlet, kappa, w).kv, geometry[1], geometry[2],
                          geometry[3], fd, fl) for w in flows]
    fig = go.Figure()
    fig.add_trace(go.Scatter(x=flows * 3600, y=levels, name="at the normal pressures",
                             line=dict(color=_COLOURS["outlet"], width=2)))
    fig.add_trace(go.Scatter(x=[w * 3600 for _, w in cases], y=[result.value(f"valve_noise_{n}") for n, _ in cases],
                             mode="markers+text", text=[n for n, _ in cases], textposition="bottom right",
                             name="flow cases (own pressures)", marker=dict(size=10, color=_COLOURS["process"])))
    fig.add_trace(go.Scatter(x=[flows[0] * 3600, flows[-1] * 3600], y=[limit, limit], mode="lines",
                             name=f"limit {limit:g} dB(A)", line=dict(color=_COLOURS["inlet"], dash="dash", width=2)))
    fig.update_layout(title="Control valve noise at 1 m from the pipe (IEC 60534-8-3)", xaxis_title="steam flow, kg/h",
                      yaxis_title="sound pressure level, dB(A)", height=420, margin=dict(l=60, r=20, t=50, b=50),
                      legend=dict(orientation="h", y=-0.2))
    return fig


def letdown_sections(inputs, result):
    """The let-down workbook's tables by heading: flow cases with noise, lines, relief device,
    and the two-stage proposal when made."""
    sections = {"Flow cases": valve_case_rows(inputs, result)}
    lines = []
    for key, label, size in (("inlet", "inlet line", inputs.inlet_size), ("outlet", "outlet line", inputs.outlet_size)):
        if size is None:
            continue
        row = {"line": label, "size": size}
        for name, heading, unit in (("velocity", "velocity", "m/s"), ("line_pressure_drop", "pressure drop", "bar difference"),
                                    ("line_pressure_drop_per_100m", "per 100 m", "bar difference")):
            if f"{key}_{name}" in result.values:
                row[f"{heading}, {unit}"] = result.value(f"{key}_{name}")
        lines.append(row)
    if lines:
        sections["Lines"] = lines
    relief = [(k, result.values[k]) for k in (
        "relief_design_flow", "relief_relieving_pressure", "relief_relieving_temperature",
        "relief_required_area_direct_integration", "relief_required_area_steam_equation", "relief_required_area",
        "relief_orifice", "relief_orifice_area", "relief_capacity_margin", "relief_inlet_loss_fraction",
        "relief_reaction_force") if k in result.values]
    if any(k == "relief_orifice" for k, _ in relief):
        sections["Relief device (preliminary; the engineer of record and the maker's certified capacity govern)"] = [
            {"quantity": v.label, "value": v.value, "unit": v.unit.replace("**2", "²")} for _, v in relief]
    if "two_stage_intermediate_pressure" in result.values:
        sections["Noise: two-stage let-down proposal"] = [
            {"stage": stage, "Kv, m³/h": result.value(f"two_stage_kv_{key}"),
             "noise at 1 m, dB(A)": result.value(f"two_stage_noise_{key}")}
            for stage, key in (("first", "first"), ("second", "second"))]
    return sections


def stall_chart(inputs, result, points=60):
    """Steam-side pressure the exchanger needs against load (clean and fouled U), with the drainage limit,
    the control valve's supply pressure and (secondary axis) the rated valve's travel."""
    from plotly.subplots import make_subplots

    travel = {tag: sorted((int(k.rsplit("_", 1)[1]), v.value) for k, v in result.values.items()
                          if k.startswith("control_valve_travel_") and k.rsplit("_", 1)[1].isdigit()
                          and (k.count("_clean_") == 1) == (tag == "clean")) for tag in ("fouled", "clean")}
    fig = make_subplots(specs=[[{"secondary_y": True}]]) if travel["fouled"] else go.Figure()
    loads, pressures = _turndown_series(result)
    clean_loads, clean_pressures = _turndown_series(result, clean=True)
    fouled_name = _u_label(result, "fouled") if clean_loads else _u_label(result, "clean") + " (no fouling)"
    fig.add_trace(go.Scatter(x=loads, y=pressures, mode="lines+markers", name=f"pressure needed, {fouled_name}",
                             line=dict(color=_COLOURS["outlet"], width=2)))
    if clean_loads:
        fig.add_trace(go.Scatter(x=clean_loads, y=clean_pressures, mode="lines+markers",
                                 name=f"pressure needed, {_u_label(result, 'clean')}",
                                 line=dict(color=_COLOURS["process"], width=2, dash="dot")))
    if inputs.condensate_back_pressure is not None:
        back = inputs.condensate_back_pressure / 1e5
        fig.add_trace(go.Scatter(x=[0, 100], y=[back, back], mode="lines",
                                 name=f"condensate back pressure {back:.3g} bar(a)",
                                 line=dict(color=_COLOURS["inlet"], dash="dash", width=2)))
        if "stall_pressure" in result.values and abs(result.value("stall_pressure") - back) > 1e-9:  # drainage given
            drain = result.value("stall_pressure")
            fig.add_trace(go.Scatter(x=[0, 100], y=[drain, drain], mode="lines",
                                     name=f"drainage stops below {drain:.3g} bar(a) (trap differential, static head, lift)",
                                     line=dict(color=_COLOURS["inlet"], dash="dot", width=2)))
        stall = result.value("stall_load_fraction") * 100
        if 0 < stall < 100:
            fig.add_vrect(x0=0, x1=stall, fillcolor=_COLOURS["inlet"], opacity=0.08, line_width=0,
                          annotation_text=f"stall below {stall:.0f} % (clean U)", annotation_position="top right")
    if inputs.control_valve_supply_pressure is not None:
        supply = inputs.control_valve_supply_pressure / 1e5
        fig.add_trace(go.Scatter(x=[0, 100], y=[supply, supply], mode="lines",
                                 name=f"control valve supply pressure {supply:.3g} bar(a)",
                                 line=dict(color=_COLOURS["saturation"], dash="dashdot", width=2)))
    for tag, dash in (("fouled", "dash"), ("clean", "dot")):
        if travel[tag]:
            fig.add_trace(go.Scatter(x=[load for load, _ in travel[tag]], y=[h for _, h in travel[tag]],
                                     mode="lines+markers", name=f"control valve travel, {tag} U (right axis)",
                                     line=dict(color="#7a5c99", dash=dash, width=1.5), marker=dict(size=5)),
                          secondary_y=True)
    if travel["fouled"]:
        fig.update_yaxes(title_text="control valve travel, %", range=[0, 100], tickmode="linear", dtick=20,
                         showgrid=False, secondary_y=True)
    fig.update_layout(title="Turndown: steam-side pressure needed against load", xaxis_title="load, % of design",
                      yaxis_title="pressure, bar(a)", xaxis_range=[0, 102], height=420,
                      margin=dict(l=60, r=20, t=50, b=50), legend=dict(orientation="h", y=-0.2))
    return fig


def turndown_rows(inputs, result):
    """Turndown table: load, duty and the steam-side pressure needed, each column naming its U."""
    loads, pressures = _turndown_series(result)
    clean = dict(zip(*_turndown_series(result, clean=True)))
    drain = None
    if inputs.condensate_back_pressure is not None:
        # No stall pressure: the static head alone drains the condensate at any steam-side pressure.
        drain = result.value("stall_pressure") if "stall_pressure" in result.values else 0.0
    fouled_name = _u_label(result, "fouled") if clean else _u_label(result, "clean") + " = fouled"
    rows = []
    for load, pressure in zip(loads, pressures):
        row = {"load, %": load, "duty, kW": result.value("duty") * load / 100,
               f"steam-side pressure, {fouled_name}, bar(a)": pressure}
        if clean:
            row[f"steam-side pressure, {_u_label(result, 'clean')}, bar(a)"] = clean[load]
        if drain is not None:
            if clean:
                row["drains, clean U"] = "yes" if clean[load] > drain else "NO - stall"
                row["drains, fouled U"] = "yes" if pressure > drain else "NO - stall"
            else:
                row["drains by pressure"] = "yes" if pressure > drain else "NO - stall"
        rows.append(row)
    return rows


CHARTS = {"letdown": lambda inputs, result: [f for f in (letdown_chart(letdown_states(inputs, result)),
                                                          valve_chart(inputs, result), noise_chart(inputs, result))
                                             if f is not None],
          "flash": flash_chart, "exchanger": stall_chart}
#: A kind's table: rows (a list of dicts), or tables by heading (a dict of heading -> rows).
TABLES = {"flash": flash_stage_rows, "letdown": letdown_sections, "exchanger": turndown_rows}


def table_for(kind, inputs, result):
    """Rows of a calculation kind's table (e.g. the flash cascade), tables by heading, or None."""
    maker = TABLES.get(kind)
    return None if maker is None else maker(inputs, result)


def tornado_chart(section, calc):
    """One-at-a-time sensitivity of the first banded result: a bar per input from its low to high end."""
    from ..calcs.base import input_fields

    labels = {f.name: f.metadata["label"] for f in input_fields(calc.Inputs)}
    key = next(iter(section["bands"]), None)
    fig = go.Figure()
    if key is None:
        return fig
    nominal = section["bands"][key]["nominal"]
    rows = [r for r in section["sensitivity"].get(key, []) if r["low"] is not None and r["high"] is not None][::-1]
    names = [labels.get(r["input"], r["input"]) for r in rows]
    fig.add_trace(go.Bar(y=names, x=[r["low"] - nominal for r in rows], base=nominal, orientation="h",
                         name="input at its low end", marker_color=_COLOURS["outlet"]))
    fig.add_trace(go.Bar(y=names, x=[r["high"] - nominal for r in rows], base=nominal, orientation="h",
                         name="input at its high end", marker_color=_COLOURS["inlet"]))
    from ..display import unit_label, words

    unit = unit_label(section["bands"][key]["unit"])
    fig.update_layout(title=f"Sensitivity of the {words(key)} (one input at a time, ± its tolerance)",
                      barmode="overlay", xaxis_title=f"{words(key)}, {unit}", height=360,
                      margin=dict(l=180, r=20, t=50, b=50), legend=dict(orientation="h", y=-0.25))
    return fig


@lru_cache(maxsize=1)
def _template_json():
    return json.loads(go.Figure(layout=dict(template="simple_white")).to_json())["layout"]["template"]


def figure_json(figure):
    """A figure as the plotly JSON a notebook renders, with the chart style applied.

    The style is added to the JSON rather than through plotly's validators, which would copy
    the whole template on every redraw (most of a widget change's time otherwise).
    """
    data = json.loads(figure.to_json())
    data["layout"]["template"] = _template_json()
    return data


def chart_for(kind, inputs, result):
    """The charts of a calculation kind, as a list (empty when the kind has none)."""
    maker = CHARTS.get(kind)
    if maker is None:
        return []
    figures = maker(inputs, result)
    return figures if isinstance(figures, list) else [figures]


__all__ = ["chart_for", "table_for", "figure_json", "letdown_chart", "saturation_dome", "isobar"]
