"""Charts and tables for the workbooks (plotly): drawn from the record and the result, no engineering here."""

from __future__ import annotations

import json
from functools import lru_cache

import plotly.graph_objects as go

from ..calcs.exchanger.figures import turndown_series

_COLOURS = {"saturation": "#5b6770", "inlet": "#b5442c", "outlet": "#2b6a99", "process": "#1d2327"}


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


def valve_case_rows(inputs, result):
    """The let-down's flow cases as table rows."""
    from ..calcs.letdown.equipment import flow_cases

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


def _u_label(result, which):
    if f"turndown_u_{which}" in result.values:
        return f"{which} U {result.value(f'turndown_u_{which}'):.3g} kW/(m²·K)"
    return "UA as at design"


def turndown_rows(inputs, result):
    """Turndown table: load, duty and the steam-side pressure needed, each column naming its U."""
    loads, pressures = turndown_series(result)
    clean = dict(zip(*turndown_series(result, clean=True)))
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
    from ..render.display import unit_label, words

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


def record_charts(record):
    """The record's figures as plotly figures in its display system, and the reasons of those not drawn.

    Drawn only from the figure data the record holds (:func:`steamcalc.render.figure_spec.figure_spec`),
    the same as the HTML record draws.

    Returns
    -------
    (list of plotly.graph_objects.Figure, list of str)
    """
    from ..render.display import SYSTEMS
    from ..render.figure_spec import figure_spec

    system = record.get("site", {}).get("display_units", "SI")
    system = system if system in SYSTEMS else "SI"
    figures, missing = [], []
    for figure in record.get("figures", []):
        spec = figure_spec(figure, system)
        if spec is None:
            missing.append(f"{figure.get('title', figure.get('name', 'figure'))}: {figure.get('missing', 'no data')}")
        else:
            figures.append(go.Figure(spec))
    return figures, missing


__all__ = ["record_charts", "table_for", "figure_json", "tornado_chart"]
