"""A record's flow figure (a series of style ``flows``) drawn as a static SVG Sankey diagram.

Each point of the series is a flow from one named node to another (its label ``"source → target"``, its y
the flow, in the y axis's unit). The drawing is made from those points alone: nodes stand in columns (a
node's column is the longest chain of flows that reaches it, so sources stand left and each header right
of the headers that feed it; nodes nothing leaves stand in the last column), each node as tall as the
larger of what enters and what leaves it, and each flow a band from its source to its target whose width
is the flow, on one scale for the whole figure. Labels give each node's flow in the display unit. No
engineering is done here: what the bands show is what the record holds. Coordinates are written with one
decimal, so the same figure gives the same bytes (``steamcalc verify`` re-renders the HTML).
"""

from __future__ import annotations

from ..calcs.base import FLOW_ARROW
from .figure_spec import _transform
from .svg_text import FONT, WIDTH, _esc, _f

_NODE_COLOURS = ("#2b6a99", "#b5442c", "#2f6b3a", "#8a5a00", "#7a5c99", "#5b6770", "#1d2327")
_NODE_WIDTH = 12.0
_GAP = 14.0          # between the nodes of a column, px
_TOP, _BOTTOM = 40.0, 20.0
_LEFT, _RIGHT = 10.0, 200.0   # room for the labels of the last column


def is_flow_figure(figure):
    """Whether a record figure is a set of flows (one series of style ``flows``)."""
    series = figure.get("series") or []
    return not figure.get("missing") and len(series) == 1 and series[0].get("style") == "flows"


def flows_of(figure):
    """The figure's flows as ``[(source, target, value), ...]``, in record units, in record order."""
    series = figure["series"][0]
    flows = []
    for label, value in zip(series.get("labels", []), series["y"]):
        source, _, target = str(label).partition(FLOW_ARROW)
        flows.append((source, target, float(value)))
    return flows


def _columns(nodes, flows):
    """Column of each node: longest chain of flows reaching it; nodes nothing leaves in the last column."""
    column = {n: 0 for n in nodes}
    for _ in range(len(nodes)):            # relax: at most one pass per node (the flows hold no cycle here)
        changed = False
        for source, target, _ in flows:
            if source != target and column[target] < column[source] + 1:
                column[target] = column[source] + 1
                changed = True
        if not changed:
            break
    sinks = {n for n in nodes if not any(s == n for s, _, _ in flows)}
    last = max(column.values(), default=0)
    for n in sinks:
        if any(t == n for _, t, _ in flows):
            column[n] = last
    return column


def sankey_svg(figure, system="SI", ident="sankey"):
    """An SVG Sankey diagram of a record's flow figure.

    Parameters
    ----------
    figure : dict
        A record figure whose one series has style ``flows`` (:func:`is_flow_figure`).
    system : {"SI", "US"}
        Display units of the labels.
    ident : str
        The SVG's id.

    Returns
    -------
    str
        ``<svg>`` markup with one ``<path class="sankey-band">`` per flow of the figure data.

    Examples
    --------
    >>> figure = {"name": "f", "title": "Flows", "axes": {"x": {"label": "flow number", "unit": ""},
    ...           "y": {"label": "mass flow", "unit": "kg/h"}},
    ...           "series": [{"name": "s", "x": [0.0, 1.0, 2.0], "y": [1000.0, 600.0, 400.0], "style": "flows",
    ...                       "role": "process", "dash": "solid", "axis": "y",
    ...                       "labels": ["boiler → HP", "HP → user A", "HP → user B"]}]}
    >>> svg = sankey_svg(figure)
    >>> svg.count('class="sankey-band"'), "user A: 600 kg/h" in svg
    (3, True)
    """
    flows = flows_of(figure)
    scale, offset, unit = _transform(figure["axes"]["y"], system)
    nodes = []
    for source, target, _ in flows:
        for n in (source, target):
            if n not in nodes:
                nodes.append(n)
    column = _columns(nodes, flows)
    into = {n: sum(v for _, t, v in flows if t == n) for n in nodes}
    out = {n: sum(v for s, _, v in flows if s == n) for n in nodes}
    size = {n: max(into[n], out[n]) for n in nodes}
    columns = max(column.values(), default=0) + 1
    stacks = [[n for n in nodes if column[n] == c] for c in range(columns)]
    most = max(len(s) for s in stacks) if stacks else 1
    height = max(300.0, 40.0 * most + _TOP + _BOTTOM)
    room = height - _TOP - _BOTTOM - _GAP * (most - 1)
    heaviest = max((sum(size[n] for n in s) for s in stacks), default=0.0)
    k = room / heaviest if heaviest > 0 else 0.0
    step = (WIDTH - _LEFT - _RIGHT - _NODE_WIDTH) / max(columns - 1, 1)
    x_of, y_of = {}, {}
    for c, stack in enumerate(stacks):
        y = _TOP
        for n in stack:
            x_of[n], y_of[n] = _LEFT + c * step, y
            y += max(size[n] * k, 1.0) + _GAP
    colour = {n: _NODE_COLOURS[i % len(_NODE_COLOURS)] for i, n in enumerate(nodes)}
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" id="{_esc(ident)}" class="sankey" width="{_f(WIDTH)}" '
             f'height="{_f(height)}" viewBox="0 0 {_f(WIDTH)} {_f(height)}" font-family="{FONT}" font-size="11" '
             f'role="img" aria-label="{_esc(figure.get("title", "flows"))}">',
             f'<text x="{_f(WIDTH / 2)}" y="20.0" text-anchor="middle" font-size="14" fill="#1d2327">'
             f'{_esc(figure.get("title", ""))}</text>']
    leaving = {n: y_of[n] for n in nodes}
    entering = {n: y_of[n] for n in nodes}
    for source, target, value in flows:
        width = value * k
        x0, x1 = x_of[source] + _NODE_WIDTH, x_of[target]
        y0, y1 = leaving[source], entering[target]
        leaving[source] += width
        entering[target] += width
        xm = (x0 + x1) / 2
        shown = offset + scale * value
        parts.append(f'<path class="sankey-band" fill="{colour[source]}" fill-opacity="0.35" stroke="none" '
                     f'd="M{_f(x0)},{_f(y0)} C{_f(xm)},{_f(y0)} {_f(xm)},{_f(y1)} {_f(x1)},{_f(y1)} '
                     f'L{_f(x1)},{_f(y1 + width)} C{_f(xm)},{_f(y1 + width)} {_f(xm)},{_f(y0 + width)} '
                     f'{_f(x0)},{_f(y0 + width)} Z"><title>{_esc(source)}{FLOW_ARROW}{_esc(target)}: '
                     f'{shown:,.0f} {_esc(unit)}</title></path>')
    for n in nodes:
        h = max(size[n] * k, 1.0)
        parts.append(f'<rect class="sankey-node" x="{_f(x_of[n])}" y="{_f(y_of[n])}" width="{_f(_NODE_WIDTH)}" '
                     f'height="{_f(h)}" fill="{colour[n]}"/>')
        x_text = x_of[n] + _NODE_WIDTH + 4
        shown = offset + scale * size[n]
        parts.append(f'<text x="{_f(x_text)}" y="{_f(y_of[n] + h / 2 + 4)}" fill="#1d2327">'
                     f'{_esc(n)}: {shown:,.0f} {_esc(unit)}</text>')
    parts.append("</svg>")
    return "".join(parts)


__all__ = ["flows_of", "is_flow_figure", "sankey_svg"]
