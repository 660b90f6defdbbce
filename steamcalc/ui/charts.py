"""Charts and tables for the workbooks (plotly): drawn from the record and the result, no engineering here.

Each kind's table rows are made by its calculation layer (``calcs/<kind>/tables.py``); here they are only listed.
"""

from __future__ import annotations

import json
from functools import lru_cache

import plotly.graph_objects as go

from ..calcs.exchanger.tables import turndown_rows
from ..calcs.flash.tables import flash_stage_rows
from ..calcs.letdown.tables import letdown_sections, valve_case_rows  # noqa: F401  (tests read them here)

_COLOURS = {"saturation": "#5b6770", "inlet": "#b5442c", "outlet": "#2b6a99", "process": "#1d2327"}


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
