"""Charts and tables for the workbooks (plotly): drawn from the record and the result, no engineering here.

Each kind's table rows are made by its calculation layer (``calcs/<kind>/tables.py``) in SI; here they are
drawn in the site's display system: in US each column (or row) with a unit is converted by pint and its
heading, labels and sizes read as the US record reads them (psia, lb/h, Cv, NPS).
"""

from __future__ import annotations

import json
import re
from functools import lru_cache

import plotly.graph_objects as go

from ..calcs.exchanger.tables import turndown_rows
from ..calcs.flash.tables import flash_stage_rows
from ..calcs.letdown.tables import letdown_sections, valve_case_rows  # noqa: F401  (tests read them here)

_COLOURS = {"saturation": "#5b6770", "inlet": "#b5442c", "outlet": "#2b6a99", "process": "#1d2327"}


#: A kind's table: rows (a list of dicts), or tables by heading (a dict of heading -> rows).
TABLES = {"flash": flash_stage_rows, "letdown": letdown_sections, "exchanger": turndown_rows}


def table_for(kind, inputs, result, system="SI"):
    """Rows of a calculation kind's table (e.g. the flash cascade), tables by heading, or None.

    ``system`` is the site's display system: the rows are drawn in it (:func:`shown_rows`).
    """
    maker = TABLES.get(kind)
    if maker is None:
        return None
    tables = maker(inputs, result)
    if isinstance(tables, dict):
        return {_shown_text(heading, system): shown_rows(rows, system) for heading, rows in tables.items()}
    return shown_rows(tables, system)


_HEADING_UNIT = re.compile(r"^(?P<text>.*), (?P<unit>[^,]+)$")


def _number(value):
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _shown_text(text, system):
    """A heading, label or text cell in the display system (US: quantities converted, Kv as Cv, DN as NPS)."""
    from ..render.display import trade_text, us_label

    if not isinstance(text, str):
        return text
    return trade_text(us_label(text) if system == "US" else text)


def _column(heading, system):
    """A column's heading in the display system and the function drawing its cells in it."""
    from ..render.display import convert, unit_label, written_unit

    match = _HEADING_UNIT.match(heading) if isinstance(heading, str) else None
    written = written_unit(match.group("unit")) if match else None
    if system == "SI" or written is None:
        return _shown_text(heading, system), lambda cell: _shown_text(cell, system)
    text = match.group("text")
    unit, basis = written
    target = convert(1.0, unit, system, label=text)[1]
    shown_unit = unit_label(target, basis)
    if unit == "dB":
        shown_unit = "dB(A)"

    def cell(value):
        return convert(value, unit, system, label=text)[0] if _number(value) else _shown_text(value, system)

    return (f"{_shown_text(text, system)}, {shown_unit}" if shown_unit else _shown_text(text, system)), cell


def _quantity_row(row, system):
    """A row that states its own quantity (``{"quantity", "value", "unit"}``, the relief device): its value in
    the display system and its unit as people write it (a pressure absolute, as the record holds it)."""
    from ..render.display import convert, unit_label, written_unit
    from ..units.quantities import unit_spelling

    unit = str(row.get("unit") or "")
    written = written_unit(unit)
    pint_unit, basis = written if written else (unit, "absolute")
    if not written and unit:
        try:
            pint_unit = unit_spelling(unit).replace("^", "**")
        except Exception:   # a unit not read as a pint one: shown as written
            pint_unit = unit
    label = str(row.get("quantity", ""))
    value, shown = convert(row.get("value"), pint_unit, system, label=label)
    shown = unit_label(shown, basis) if shown else ""
    return {**row, "quantity": _shown_text(label, system), "value": value if _number(value) else
            _shown_text(value, system), "unit": "dB(A)" if shown == "dB" else shown}


def shown_rows(rows, system="SI"):
    """A table's rows (from ``calcs/<kind>/tables.py``, in SI) in the display system.

    A column whose heading ends in its unit (``"flow, kg/h"``) is converted by pint with its heading
    (``"flow, lb/h"``; a Kv column becomes a Cv column without unit); a row stating its own unit
    (``{"quantity", "value", "unit"}``) is converted row by row, its unit written as people write it;
    texts read as the US record reads them (DN80 as NPS 3). SI rows are returned with units written
    (``°C``, ``%``, ``bar(a)``), numbers untouched.

    Examples
    --------
    >>> rows = [{"flow case": "normal", "flow, kg/h": 4500.0, "required Kv, m³/h": 23.3, "size": "DN80"}]
    >>> [(k, round(v, 2) if isinstance(v, float) else v) for k, v in shown_rows(rows, "US")[0].items()]
    [('flow case', 'normal'), ('flow, lb/h', 9920.8), ('required Cv', 26.94), ('size', 'NPS 3')]
    >>> shown_rows([{"quantity": "Relieving temperature", "value": 197.7, "unit": "degC"}])
    [{'quantity': 'Relieving temperature', 'value': 197.7, 'unit': '°C'}]
    """
    shown = []
    for row in rows:
        if {"quantity", "value", "unit"} <= set(row):
            shown.append(_quantity_row(row, system))
            continue
        out = {}
        for heading, value in row.items():
            new_heading, cell = _column(heading, system)
            out[new_heading] = cell(value)
        shown.append(out)
    return shown


def tornado_chart(section, calc, system="SI"):
    """One-at-a-time sensitivity of the first banded result: a bar per input from its low to high end.

    Drawn in the display system ``system`` (a fraction the trade states in % in %), as the bands table.
    """
    from ..calcs.base import input_fields
    from ..render.display import convert, shown_in_percent, unit_label, us_label, words

    labels = {f.name: f.metadata["label"] for f in input_fields(calc.Inputs)}
    key = next(iter(section["bands"]), None)
    fig = go.Figure()
    if key is None:
        return fig
    band = section["bands"][key]
    scale = 100.0 if band.get("unit", "") == "" and shown_in_percent(calc, key) else 1.0
    record_unit = "percent" if scale != 1.0 else band.get("unit", "")

    def shown(value):
        return convert(value * scale, record_unit, system, key)[0]

    nominal = shown(band["nominal"])
    rows = [r for r in section["sensitivity"].get(key, []) if r["low"] is not None and r["high"] is not None][::-1]
    names = [_shown_text(labels.get(r["input"], r["input"]), system) for r in rows]
    fig.add_trace(go.Bar(y=names, x=[shown(r["low"]) - nominal for r in rows], base=nominal, orientation="h",
                         name="input at its low end", marker_color=_COLOURS["outlet"]))
    fig.add_trace(go.Bar(y=names, x=[shown(r["high"]) - nominal for r in rows], base=nominal, orientation="h",
                         name="input at its high end", marker_color=_COLOURS["inlet"]))
    basis = "difference" if key in getattr(calc, "PRESSURE_DIFFERENCE_RESULTS", ()) else "absolute"
    unit = unit_label(convert(1.0, record_unit, system, key)[1], basis)
    name = us_label(words(key)) if system == "US" else words(key)
    fig.update_layout(title=f"Sensitivity of the {name} (one input at a time, ± its tolerance)",
                      barmode="overlay", xaxis_title=f"{name}, {unit}" if unit else name, height=360,
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


#: Tick labels of a log axis: every label the whole number ("0.2", "0.3", ..., "1", "2"), never plotly's
#: default between the powers of ten, which writes only the leading digit ("2 3 ... 9" for 0.2-0.9 bar(a)).
LOG_TICK_FORMAT = "~g"


def log_axes_in_full(layout):
    """Give every log axis of a plotly layout (a dict) tick labels written in full (:data:`LOG_TICK_FORMAT`).

    Examples
    --------
    >>> layout = {"xaxis": {"type": "log"}, "yaxis": {"title": {"text": "flash fraction, %"}}}
    >>> log_axes_in_full(layout)
    >>> layout["xaxis"]["tickformat"], "tickformat" in layout["yaxis"]
    ('~g', False)
    """
    for name, axis in layout.items():
        if name.startswith(("xaxis", "yaxis")) and isinstance(axis, dict) and axis.get("type") == "log":
            axis.setdefault("tickformat", LOG_TICK_FORMAT)


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
            log_axes_in_full(spec["layout"])
            figures.append(go.Figure(spec))
    return figures, missing


#: Most charts a workbook keeps drawn (a few per kind, for the last inputs and those before).
MAX_DRAWN = 48


def record_chart_json(record, drawn):
    """The record's charts as the plotly JSON a notebook renders (:func:`figure_json`), and the reasons of those
    not drawn: what :func:`record_charts` draws, each figure drawn once for its data.

    Parameters
    ----------
    record : dict
    drawn : dict
        The caller's own memory of the charts drawn, kept between calls: a figure whose data and display system
        are those of a chart drawn before (a flow changed leaves the h-s chart as it was) is not drawn again.

    Returns
    -------
    (list of dict, list of str)

    Examples
    --------
    >>> record = {"site": {"display_units": "SI"}, "figures": [{"name": "x", "title": "X", "missing": "no data"}]}
    >>> record_chart_json(record, {})
    ([], ['X: no data'])
    """
    system = record.get("site", {}).get("display_units", "SI")
    charts, missing = [], []
    for figure in record.get("figures", []):
        key = json.dumps([system, figure], sort_keys=True)
        if key not in drawn:
            figures, reasons = record_charts({"site": {"display_units": system}, "figures": [figure]})
            if len(drawn) >= MAX_DRAWN:
                drawn.pop(next(iter(drawn)))
            drawn[key] = (figure_json(figures[0]) if figures else None, reasons)
        chart, reasons = drawn[key]
        charts.extend([chart] if chart is not None else [])
        missing.extend(reasons)
    return charts, missing


__all__ = ["record_charts", "record_chart_json", "table_for", "shown_rows", "figure_json", "tornado_chart"]
