"""A record's figure drawn as a plotting specification, in the display units (SI or US).

The record holds each figure as data (axes with their units, series, shaded bands), computed by the
kind's calculation layer. This module only draws: it turns one figure into a plotly-style dict
(``{"data": [...], "layout": {...}}``) that the HTML record draws as SVG
(:mod:`steamcalc.render.figures_svg`) and the workbook hands to plotly. Values change units through
pint (:func:`steamcalc.render.display.convert`), never by rewriting text.
"""

from __future__ import annotations

from .display import convert, trade_text, us_label
from ..units.formatting import unit_label

_COLOURS = {"reference": "#5b6770", "inlet": "#b5442c", "outlet": "#2b6a99", "process": "#1d2327",
            "limit": "#b5442c", "secondary": "#7a5c99"}
_MODES = {"line": "lines", "markers": "markers", "line+markers": "lines+markers", "flows": "markers"}
_BAND_COLOURS = {"x": "#b5442c", "y": "#2f6b3a", "y2": "#2f6b3a"}


def _transform(axis, system):
    """(scale, offset, unit) turning the axis's record values into display values: v' = offset + scale·v.

    Two points fix the map, which holds for every unit pint converts (affine ones, °C to °F, too).
    """
    unit = axis.get("unit", "")
    key = "kv" if "Kv" in axis.get("label", "") else None
    zero, shown = convert(0.0, unit, system, key, axis.get("label", ""))
    one, _ = convert(1.0, unit, system, key, axis.get("label", ""))
    return one - zero, zero, shown


def _axis_title(axis, shown_unit, system):
    label = trade_text(axis.get("label", ""))
    label = us_label(label) if system == "US" else label
    unit = unit_label(shown_unit, axis.get("basis") or ("difference" if shown_unit == "K" else "absolute"))
    if shown_unit == "dB" and "A-weighted" in label:
        label, unit = label.replace(", A-weighted", ""), "dB(A)"
    return f"{label}, {unit}" if unit else label


def figure_title(figure, system="SI"):
    """A figure's title in the display system: in US a Kv named Cv, DN sizes as NPS and the quantities
    written in it in US units (the record's figure keeps its own title).

    Examples
    --------
    >>> figure_title({"title": "Control valve: required Kv and travel against flow"}, "US")
    'Control valve: required Cv and travel against flow'
    >>> figure_title({"title": "Control valve: required Kv and travel against flow"}, "SI")
    'Control valve: required Kv and travel against flow'
    """
    title = figure.get("title", "")
    return trade_text(us_label(title)) if system == "US" else title


def _scaled(values, transform):
    scale, offset, _ = transform
    return [offset + scale * v for v in values]


def figure_spec(figure, system="SI"):
    """One figure of a record as a plotly-style dict in the display system, or None when it is missing.

    Parameters
    ----------
    figure : dict
        An entry of the record's ``figures`` list.
    system : {"SI", "US"}

    Returns
    -------
    dict or None
        ``{"data": [scatter traces], "layout": {...}}``.

    Examples
    --------
    >>> figure = {"name": "f", "title": "Flow", "axes": {"x": {"label": "steam flow", "unit": "kg/h", "scale": "linear"},
    ...           "y": {"label": "pressure", "unit": "bar", "scale": "linear", "basis": "absolute"}},
    ...           "series": [{"name": "line", "x": [0.0, 1000.0], "y": [1.0, 2.0], "style": "line", "role": "outlet",
    ...                       "dash": "solid", "axis": "y"}]}
    >>> spec = figure_spec(figure, "US")
    >>> [round(v, 1) for v in spec["data"][0]["x"]], spec["layout"]["xaxis"]["title"]["text"]
    ([0.0, 2204.6], 'steam flow, lb/h')
    >>> spec["layout"]["yaxis"]["title"]["text"]
    'pressure, psia'
    """
    if figure.get("missing") or "axes" not in figure:
        return None
    axes = figure["axes"]
    transforms = {key: _transform(axis, system) for key, axis in axes.items()}
    data = []
    for series in figure.get("series", []):
        axis = series.get("axis", "y")
        colour = _COLOURS.get(series.get("role"), _COLOURS["process"])
        mode = _MODES.get(series.get("style"), "lines")
        trace = {"type": "scatter", "name": us_label(series["name"]) if system == "US" else series["name"],
                 "x": _scaled(series["x"], transforms["x"]), "y": _scaled(series["y"], transforms[axis]),
                 "mode": mode, "line": {"color": colour, "width": 2 if series.get("role") != "reference" else 1.5}}
        if series.get("dash", "solid") != "solid":
            trace["line"]["dash"] = series["dash"]
        if "markers" in mode:
            trace["marker"] = {"size": 10, "color": colour}
        if series.get("labels"):
            trace["text"] = list(series["labels"])
            trace["mode"] = mode + "+text"
            trace["textposition"] = "top right" if series.get("role") == "process" else "bottom right"
        if axis == "y2":
            trace["yaxis"] = "y2"
        data.append(trace)
    layout = {"title": {"text": figure_title(figure, system)}, "height": 420,
              "margin": {"l": 60, "r": 60 if "y2" in axes else 20, "t": 50, "b": 50},
              "legend": {"orientation": "h", "y": -0.2}, "shapes": []}
    for key, name in (("x", "xaxis"), ("y", "yaxis"), ("y2", "yaxis2")):
        if key not in axes:
            continue
        axis = axes[key]
        entry = {"title": {"text": _axis_title(axis, transforms[key][2], system)}}
        if axis.get("scale") == "log":
            entry["type"] = "log"
        if axis.get("range"):
            entry["range"] = _scaled(axis["range"], transforms[key])
        if key == "y2":
            entry.update(overlaying="y", side="right", showgrid=False)
        layout[name] = entry
    for band in figure.get("bands", []):
        axis = band["axis"]
        low, high = _scaled([band["low"], band["high"]], transforms[axis])
        shape = {"type": "rect", "fillcolor": _BAND_COLOURS.get(axis, "#2f6b3a"), "opacity": 0.08, "line": {"width": 0},
                 "layer": "below", "name": band["label"]}
        if axis == "x":
            shape.update(xref="x", x0=low, x1=high, yref="paper", y0=0, y1=1)
        else:
            shape.update(xref="paper", x0=0, x1=1, yref=axis, y0=low, y1=high)
        layout["shapes"].append(shape)
    return {"data": data, "layout": layout}


def band_notes(figure, system="SI"):
    """What each shaded band of a figure means, one line each (drawn under the chart), in the display system."""
    return [trade_text(us_label(band["label"])) if system == "US" else band["label"]
            for band in figure.get("bands", [])]


__all__ = ["figure_spec", "figure_title", "band_notes"]
