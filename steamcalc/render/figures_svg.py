"""Static SVG of a record's figures, for the HTML (and so the PDF) record.

The record is issued where no browser runs, so its figures are drawn here, from the figure data the
record holds (through :func:`steamcalc.render.figure_spec.figure_spec`, the same plotting specification
the workbook hands to plotly), as plain SVG: no scripts, no fonts or images fetched, nothing random. What is drawn is what those charts use — scatter
traces (lines, markers, text beside markers), linear and log axes with ticks and titles, a
secondary y-axis on the right, rectangles (shaded bands) and text annotations, and a legend
below the plot. Every coordinate is written with one decimal, so the same figure gives the
same bytes, which ``steamcalc verify`` relies on when it re-renders a record's HTML.
"""

from __future__ import annotations

import math

from .svg_text import FONT, WIDTH, _esc, _f  # noqa: F401 - FONT and WIDTH are read from here too

_DASHES = {"dot": "2,3", "dash": "7,4", "dashdot": "7,3,2,3", "longdash": "12,4", "longdashdot": "12,3,2,3"}
_COLOURWAY = ("#2b6a99", "#b5442c", "#1d2327", "#2f6b3a", "#8a5a00", "#5b6770")
_CHAR_WIDTH = 6.1   # mean advance of an 11 px sans-serif character, px (for legend layout only)


def _get(table, *path):
    """A nested entry of a figure's dict, or None where any level is missing."""
    for key in path:
        if not isinstance(table, dict):
            return None
        table = table.get(key)
    return table


def _seq(values):
    """A trace's coordinates as a sequence (plotly holds them as a tuple, a numpy array or None)."""
    return () if values is None else values


def nice_ticks(low, high, target=6, dtick=None):
    """Round tick values covering [low, high]: steps of 1, 2 or 5 times a power of ten.

    Examples
    --------
    >>> nice_ticks(0.0, 102.0)
    [0.0, 20.0, 40.0, 60.0, 80.0, 100.0]
    >>> nice_ticks(2504.4, 3065.7)
    [2600.0, 2700.0, 2800.0, 2900.0, 3000.0]
    >>> nice_ticks(0, 100, dtick=20)
    [0.0, 20.0, 40.0, 60.0, 80.0, 100.0]
    """
    if not (math.isfinite(low) and math.isfinite(high)) or high <= low:
        return []
    if dtick is None:
        span = high - low
        power = 10.0 ** math.floor(math.log10(span / target))
        # the round step giving the number of ticks nearest the target (the larger step on a tie)
        candidates = [m * power * f for f in (0.1, 1.0, 10.0) for m in (5.0, 2.0, 1.0)]
        step = min(candidates, key=lambda c: (round(abs(span / c - target), 9), -c))
    else:
        step = float(dtick)
    first = math.ceil(low / step - 1e-9)
    ticks = []
    k = first
    while k * step <= high + step * 1e-9:
        ticks.append(round(k * step, 12) + 0.0)
        k += 1
    return ticks


def _tick_decimals(ticks):
    """The decimals the tick step needs."""
    step = min((b - a for a, b in zip(ticks, ticks[1:])), default=1.0) or 1.0
    return next(d for d in range(12) if abs(round(step, d) - step) <= 1e-9 * step or d == 11)


def _log_ticks(low, high):
    """Ticks of a log axis over [10**low, 10**high]: each decade, with 2 and 5 when few decades show."""
    decades = range(math.floor(low), math.ceil(high) + 1)
    multipliers = (1, 2, 5) if high - low < 3 else (1,)
    ticks = [m * 10.0 ** d for d in decades for m in multipliers]
    return [t for t in ticks if low - 1e-9 <= math.log10(t) <= high + 1e-9]


class _Axis:
    """One axis: its data range (log10 units on a log axis) and the pixel span it maps to."""

    def __init__(self, spec, values, pixel_low, pixel_high):
        self.log = spec.get("type") == "log"
        self.title = _get(spec, "title", "text") or ""
        self.dtick = spec.get("dtick") if spec.get("tickmode") == "linear" else None
        data = [t for t in self._transformed(values) if t is not None and math.isfinite(t)]
        if spec.get("range") is not None:
            self.low, self.high = float(spec["range"][0]), float(spec["range"][1])
        elif data:
            low, high = min(data), max(data)
            pad = (high - low) * 0.05 or (abs(high) * 0.05 or 1.0)
            self.low, self.high = low - pad, high + pad
        else:
            self.low, self.high = 0.0, 1.0
        self.pixel_low, self.pixel_high = pixel_low, pixel_high

    def transform(self, value):
        if value is None or isinstance(value, str):
            return None
        value = float(value)
        if self.log:
            return math.log10(value) if value > 0 else None
        return value

    def _transformed(self, values):
        """:meth:`transform` of each value, in one loop (a chart's every point passes here)."""
        floats = [None if value is None or isinstance(value, str) else float(value) for value in values]
        if self.log:
            log10 = math.log10
            return [None if t is None or not t > 0 else log10(t) for t in floats]
        return floats

    def pixels(self, values):
        """:meth:`pixel` of each value, in one loop, with the same arithmetic."""
        low, span = self.low, self.high - self.low
        base, extent = self.pixel_low, self.pixel_high - self.pixel_low
        isfinite, log, log10 = math.isfinite, self.log, math.log10
        out = []
        for value in values:
            if value is None or isinstance(value, str):
                out.append(None)
                continue
            t = float(value)
            if log:
                if not t > 0:
                    out.append(None)
                    continue
                t = log10(t)
            out.append(base + (t - low) / span * extent if isfinite(t) else None)
        return out

    def pixel(self, value):
        """Pixel position of a data value (None when it cannot be drawn on this axis)."""
        # transform() written out: this runs for every point of every trace.
        if value is None or isinstance(value, str):
            return None
        t = float(value)
        if self.log:
            if not t > 0:
                return None
            t = math.log10(t)
        if not math.isfinite(t):
            return None
        return self.pixel_low + (t - self.low) / (self.high - self.low) * (self.pixel_high - self.pixel_low)

    def fraction(self, fraction):
        return self.pixel_low + fraction * (self.pixel_high - self.pixel_low)

    def ticks(self):
        """(value, label) of each tick."""
        if self.log:
            values = _log_ticks(self.low, self.high)
            return [(v, f"{v:g}") for v in values]
        values = nice_ticks(self.low, self.high, dtick=self.dtick)
        decimals = _tick_decimals(values)   # the same for every tick: found once
        return [(v, f"{v:,.{decimals}f}") for v in values]


def _trace_colour(trace, index):
    for colour in (_get(trace, "line", "color"), _get(trace, "marker", "color")):
        if isinstance(colour, str):
            return colour
    return _COLOURWAY[index % len(_COLOURWAY)]


def _mode(trace):
    if trace.get("mode"):
        return set(trace["mode"].split("+"))
    # plotly's default: lines and markers for fewer than 20 points, else lines.
    return {"lines", "markers"} if len(_seq(trace.get("x"))) < 20 else {"lines"}


def _legend_rows(entries, width):
    """Legend entries laid out left to right, wrapped to the chart's width: rows of (x, entry)."""
    rows, row, x = [], [], 0.0
    for entry in entries:
        item = 34.0 + _CHAR_WIDTH * len(entry[0]) + 16.0
        if row and x + item > width:
            rows.append(row)
            row, x = [], 0.0
        row.append((x, entry))
        x += item
    if row:
        rows.append(row)
    return rows


def figure_svg(figure, ident="chart"):
    """A plotting specification (or a plotly figure) as one self-contained SVG element.

    Parameters
    ----------
    figure : dict or plotly.graph_objects.Figure
        ``{"data": [...], "layout": {...}}`` as :func:`steamcalc.render.figure_spec.figure_spec` makes
        it, or a plotly figure; scatter traces only (other trace types are refused: the record charts
        have none).
    ident : str
        Prefix of the element ids (the plot's clip path), unique within the page.

    Returns
    -------
    str
        ``<svg ...>...</svg>``, without scripts or external references.

    Examples
    --------
    >>> import plotly.graph_objects as go
    >>> fig = go.Figure(go.Scatter(x=[0, 1, 2], y=[0, 1, 4], name="y = x²"))
    >>> svg = figure_svg(fig.update_layout(title="A parabola"), "doc")
    >>> svg.startswith("<svg") and "<script" not in svg and "A parabola" in svg
    True
    >>> svg == figure_svg(fig, "doc")
    True
    """
    # Read once as plain dicts: plotly's property objects are slow to walk point by point.
    spec = figure.to_plotly_json() if hasattr(figure, "to_plotly_json") else figure
    layout = spec.get("layout", {})
    traces = [dict(t) for t in spec.get("data", ())]
    for trace in traces:
        trace.setdefault("type", "scatter")
    traces = [t for t in traces if t.get("visible") is not False]
    for trace in traces:
        if trace.get("type") != "scatter":
            raise ValueError(f"figure_svg draws scatter traces only, not {trace.get('type')!r}")
    title = _get(layout, "title", "text") or ""
    height_plot = float(layout.get("height") or 450)
    margin = layout.get("margin", {})
    left = float(margin.get("l", 70)) + 10.0
    right_margin = float(margin.get("r", 30))
    has_y2 = any(t.get("yaxis") == "y2" for t in traces)
    right = WIDTH - (max(right_margin, 60.0) if has_y2 else max(right_margin, 20.0))
    top = float(margin.get("t", 60)) + (8.0 if title else 0.0)
    bottom = height_plot - float(margin.get("b", 60))

    def values(axis_name, attribute):
        out = []
        for t in traces:
            if (t.get("xaxis") or "x") == axis_name or (t.get("yaxis") or "y") == axis_name:
                out.extend(_seq(t.get(attribute)))
        return out

    x_axis = _Axis(layout.get("xaxis", {}), values("x", "x"), left, right)
    y_axis = _Axis(layout.get("yaxis", {}), values("y", "y"), bottom, top)
    y2_axis = _Axis(layout.get("yaxis2", {}), values("y2", "y"), bottom, top) if has_y2 else None
    legend = [(t["name"], t, i) for i, t in enumerate(traces) if t.get("name") and t.get("showlegend") is not False]
    legend_top = bottom + 46.0
    rows = _legend_rows(legend, WIDTH - 2 * 20.0)
    height = legend_top + 20.0 * len(rows) + 8.0
    clip = f"{ident}-plot"
    out = [f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {_f(WIDTH)} {_f(height)}" width="{_f(WIDTH)}" '
           f'height="{_f(height)}" style="max-width:100%;height:auto" role="img" aria-label="{_esc(title)}" '
           f'font-family="{FONT}" font-size="11">',
           f"<title>{_esc(title)}</title>",
           f'<defs><clipPath id="{_esc(clip)}"><rect x="{_f(left)}" y="{_f(top)}" width="{_f(right - left)}" '
           f'height="{_f(bottom - top)}"/></clipPath></defs>',
           f'<rect x="0" y="0" width="{_f(WIDTH)}" height="{_f(height)}" fill="#ffffff"/>']
    if title:
        out.append(f'<text x="{_f(left)}" y="24.0" font-size="14" font-weight="bold" fill="#1d2327">{_esc(title)}</text>')
    out.extend(_shapes(layout, x_axis, y_axis, y2_axis, clip))
    out.extend(_grid_and_axes(x_axis, y_axis, y2_axis, left, right, top, bottom))
    for index, trace in enumerate(traces):
        out.extend(_trace(trace, index, x_axis, y2_axis if trace.get("yaxis") == "y2" else y_axis, clip))
    out.extend(_annotations(layout, x_axis, y_axis, y2_axis))
    for row_number, row in enumerate(rows):
        y = legend_top + 20.0 * row_number
        for x, (name, trace, index) in row:
            out.extend(_legend_item(20.0 + x, y, name, trace, index))
    out.append("</svg>")
    return "\n".join(out)


def _grid_and_axes(x_axis, y_axis, y2_axis, left, right, top, bottom):
    out = ['<g stroke="#e3e7ea" stroke-width="1">']
    x_ticks = [(x_axis.pixel(v), v, t) for v, t in x_axis.ticks()]
    y_ticks = [(y_axis.pixel(v), v, t) for v, t in y_axis.ticks()]
    for px, _, _ in x_ticks:
        out.append(f'<line x1="{_f(px)}" y1="{_f(top)}" x2="{_f(px)}" y2="{_f(bottom)}"/>')
    for py, _, _ in y_ticks:
        out.append(f'<line x1="{_f(left)}" y1="{_f(py)}" x2="{_f(right)}" y2="{_f(py)}"/>')
    out.append("</g>")
    out.append(f'<g stroke="#1d2327" stroke-width="1" fill="none"><polyline points="{_f(left)},{_f(top)} '
               f'{_f(left)},{_f(bottom)} {_f(right)},{_f(bottom)}"/>'
               + (f'<line x1="{_f(right)}" y1="{_f(top)}" x2="{_f(right)}" y2="{_f(bottom)}"/>' if y2_axis else "")
               + "</g>")
    out.append('<g fill="#1d2327">')
    for px, _, text in x_ticks:
        out.append(f'<line x1="{_f(px)}" y1="{_f(bottom)}" x2="{_f(px)}" y2="{_f(bottom + 5)}" stroke="#1d2327"/>'
                   f'<text x="{_f(px)}" y="{_f(bottom + 18)}" text-anchor="middle">{_esc(text)}</text>')
    for py, _, text in y_ticks:
        out.append(f'<line x1="{_f(left - 5)}" y1="{_f(py)}" x2="{_f(left)}" y2="{_f(py)}" stroke="#1d2327"/>'
                   f'<text x="{_f(left - 8)}" y="{_f(py + 4)}" text-anchor="end">{_esc(text)}</text>')
    if y2_axis is not None:
        for value, text in y2_axis.ticks():
            py = y2_axis.pixel(value)
            out.append(f'<line x1="{_f(right)}" y1="{_f(py)}" x2="{_f(right + 5)}" y2="{_f(py)}" stroke="#1d2327"/>'
                       f'<text x="{_f(right + 8)}" y="{_f(py + 4)}">{_esc(text)}</text>')
    middle_y = (top + bottom) / 2
    if x_axis.title:
        out.append(f'<text x="{_f((left + right) / 2)}" y="{_f(bottom + 36)}" text-anchor="middle">'
                   f"{_esc(x_axis.title)}</text>")
    if y_axis.title:
        out.append(f'<text x="{_f(left - 52)}" y="{_f(middle_y)}" text-anchor="middle" '
                   f'transform="rotate(-90 {_f(left - 52)} {_f(middle_y)})">{_esc(y_axis.title)}</text>')
    if y2_axis is not None and y2_axis.title:
        out.append(f'<text x="{_f(right + 40)}" y="{_f(middle_y)}" text-anchor="middle" '
                   f'transform="rotate(90 {_f(right + 40)} {_f(middle_y)})">{_esc(y2_axis.title)}</text>')
    out.append("</g>")
    return out


def _axis_for(ref, x_axis, y_axis, y2_axis):
    return {"x": x_axis, "y": y_axis, "y2": y2_axis}.get((ref or "").replace(" domain", ""))


def _position(ref, value, x_axis, y_axis, y2_axis, horizontal):
    """Pixel of a shape or annotation coordinate given in data, paper or axis-domain units."""
    ref = ref or ("x" if horizontal else "y")
    if ref == "paper":
        return (x_axis if horizontal else y_axis).fraction(float(value))
    axis = _axis_for(ref, x_axis, y_axis, y2_axis)
    if axis is None:
        return None
    if ref.endswith(" domain"):
        return axis.fraction(float(value))
    return axis.pixel(value)


def _shapes(layout, x_axis, y_axis, y2_axis, clip):
    out = []
    for shape in layout.get("shapes", ()):
        if shape.get("type") != "rect":
            continue
        x0 = _position(shape.get("xref"), shape.get("x0"), x_axis, y_axis, y2_axis, True)
        x1 = _position(shape.get("xref"), shape.get("x1"), x_axis, y_axis, y2_axis, True)
        y0 = _position(shape.get("yref"), shape.get("y0"), x_axis, y_axis, y2_axis, False)
        y1 = _position(shape.get("yref"), shape.get("y1"), x_axis, y_axis, y2_axis, False)
        if None in (x0, x1, y0, y1):
            continue
        opacity = shape.get("opacity", 1.0)
        out.append(f'<rect x="{_f(min(x0, x1))}" y="{_f(min(y0, y1))}" width="{_f(abs(x1 - x0))}" '
                   f'height="{_f(abs(y1 - y0))}" fill="{_esc(shape.get("fillcolor") or "#cccccc")}" '
                   f'fill-opacity="{opacity:.3g}" clip-path="url(#{_esc(clip)})"/>')
    return out


def _annotations(layout, x_axis, y_axis, y2_axis):
    out = []
    for note in layout.get("annotations", ()):
        if not note.get("text"):
            continue
        x = _position(note.get("xref"), note.get("x"), x_axis, y_axis, y2_axis, True)
        y = _position(note.get("yref"), note.get("y"), x_axis, y_axis, y2_axis, False)
        if x is None or y is None:
            continue
        anchor = {"left": "start", "right": "end", "center": "middle"}.get(note.get("xanchor") or "center", "middle")
        dx = {"start": 4.0, "end": -4.0}.get(anchor, 0.0)
        dy = {"top": 14.0, "bottom": -4.0}.get(note.get("yanchor") or "middle", 4.0)
        out.append(f'<text x="{_f(x + dx)}" y="{_f(y + dy)}" text-anchor="{anchor}" fill="#1d2327">'
                   f"{_esc(note['text'])}</text>")
    return out


def _dash(trace):
    dash = _DASHES.get(_get(trace, "line", "dash"))
    return f' stroke-dasharray="{dash}"' if dash else ""


def _line_width(trace):
    width = _get(trace, "line", "width")
    return 2.0 if width is None else float(width)


def _marker(x, y, size, colour):
    return f'<circle cx="{_f(x)}" cy="{_f(y)}" r="{_f(size / 2)}" fill="{_esc(colour)}"/>'


def _trace(trace, index, x_axis, y_axis, clip):
    colour = _trace_colour(trace, index)
    mode = _mode(trace)
    xs, ys = _seq(trace.get("x")), _seq(trace.get("y"))
    n = min(len(xs), len(ys))   # as zip pairs them
    points = list(zip(x_axis.pixels(xs[:n]), y_axis.pixels(ys[:n])))
    out = [f'<g clip-path="url(#{_esc(clip)})">']
    if "lines" in mode:
        run = []
        for point in points + [(None, None)]:   # a point that cannot be drawn breaks the line
            if None in point:
                if len(run) > 1:
                    # Each coordinate as _f writes it: one decimal, and "-0.0" (only ever a whole number) as "0.0".
                    points_text = " ".join([f"{a:.1f},{b:.1f}" for a, b in run]).replace("-0.0", "0.0")
                    out.append(f'<polyline fill="none" stroke="{_esc(colour)}" stroke-width="{_line_width(trace):g}"'
                               f'{_dash(trace)} points="{points_text}"/>')
                run = []
            else:
                run.append(point)
    size = float(_get(trace, "marker", "size") or 6.0)
    if "markers" in mode:
        # _marker written out, its radius and colour written once for the trace's every point.
        tail = f'" r="{_f(size / 2)}" fill="{_esc(colour)}"/>'
        out.extend(f'<circle cx="{_f(x)}" cy="{_f(y)}{tail}' for x, y in points if None not in (x, y))
    if "text" in mode and trace.get("text") is not None:
        text = trace["text"]
        texts = [text] * len(points) if isinstance(text, str) else list(text)
        position = trace.get("textposition") if isinstance(trace.get("textposition"), str) else "middle center"
        vertical, _, horizontal = position.partition(" ")
        dy = {"top": -size / 2 - 4, "bottom": size / 2 + 11}.get(vertical, 4.0)
        dx = {"right": size / 2 + 2, "left": -size / 2 - 2}.get(horizontal, 0.0)
        anchor = {"right": "start", "left": "end"}.get(horizontal, "middle")
        for (x, y), text in zip(points, texts):
            if None not in (x, y) and text:
                out.append(f'<text x="{_f(x + dx)}" y="{_f(y + dy)}" text-anchor="{anchor}" fill="#1d2327">'
                           f"{_esc(text)}</text>")
    out.append("</g>")
    return out


def _legend_item(x, y, name, trace, index):
    colour = _trace_colour(trace, index)
    mode = _mode(trace)
    out = []
    if "lines" in mode:
        out.append(f'<line x1="{_f(x)}" y1="{_f(y)}" x2="{_f(x + 28)}" y2="{_f(y)}" stroke="{_esc(colour)}" '
                   f'stroke-width="{_line_width(trace):g}"{_dash(trace)}/>')
    if "markers" in mode:
        out.append(_marker(x + 14, y, 8.0, colour))
    out.append(f'<text x="{_f(x + 34)}" y="{_f(y + 4)}" fill="#1d2327">{_esc(name)}</text>')
    return out


def record_figures(record, shown=None):
    """The process sketch and the figures of a record, for its HTML page, drawn from the record alone.

    ``shown`` is the record as :func:`steamcalc.render.display.display_record` shows it, when the caller has it.

    Returns
    -------
    dict
        ``sketch`` (SVG markup or ""), ``charts`` (a list of dicts with ``title``, ``svg`` and ``notes``,
        or ``missing`` with the reason a figure was not drawn) and ``note`` (why the record has no figure
        data, or "").
    """
    from markupsafe import Markup

    from .display import SYSTEMS
    from .figure_spec import band_notes, figure_spec, figure_title
    from .header_svg import header_svg, is_header_diagram
    from .sankey_svg import is_flow_figure, sankey_svg
    from .sketch import sketch_svg

    sketch = Markup(sketch_svg(record, shown))
    if "figures" not in record:
        return {"sketch": sketch, "charts": [],
                "note": "This record was issued by an earlier release (schema 1), which kept no figure data: "
                        "its charts are not redrawn here. Re-issue the case under a new revision for charts drawn from figure data."}
    system = record.get("site", {}).get("display_units", "SI")
    system = system if system in SYSTEMS else "SI"
    charts = []
    for number, figure in enumerate(record["figures"], start=1):
        try:
            if is_flow_figure(figure):
                spec = svg = sankey_svg(figure, system, f"steamcalc-chart-{number}")
            elif is_header_diagram(figure):
                spec = svg = header_svg(figure, system, f"steamcalc-chart-{number}")
            else:
                spec = figure_spec(figure, system)
                svg = None if spec is None else figure_svg(spec, f"steamcalc-chart-{number}")
        except (ArithmeticError, ValueError, KeyError, TypeError, AttributeError) as exc:
            # A record read from a file has passed its schema; this is for one built in memory by hand
            # (pint's unknown-unit error is an AttributeError).
            charts.append({"title": figure_title(figure, system) or f"Figure {number}", "svg": "", "notes": [],
                           "missing": f"could not be drawn from the figure data ({type(exc).__name__}: {exc})"})
            continue
        if spec is None:
            charts.append({"title": figure_title(figure, system) or f"Figure {number}", "svg": "",
                           "missing": figure.get("missing", "no data"), "notes": []})
            continue
        charts.append({"title": figure_title(figure, system) or f"Figure {number}", "missing": "",
                       "notes": band_notes(figure, system), "svg": Markup(svg)})
    return {"sketch": sketch, "charts": charts, "note": ""}


__all__ = ["figure_svg", "nice_ticks", "record_figures"]
