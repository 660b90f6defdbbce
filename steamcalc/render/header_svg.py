"""A record's header diagram (a figure of ``headers`` and ``connections``) drawn as a static SVG.

The figure data (:mod:`steamcalc.calcs.site_balance.header_flows`) name the headers, highest pressure first,
and every connection ``"source → target"`` with its flow. The drawing takes its layout from those
connections alone: each header a horizontal bar, in the order given, its name and pressure at its left;
what feeds a header and takes from none (the boiler, a flash vessel) stands above its bar; what takes from
one header and feeds another (a let-down) stands above the lower one, its line down from the higher bar
(passing the headers between through a gap in their bars); what takes from a header and feeds none (users,
vents, the deaerator) hangs below its bar. Each connection to a header has its flow written on its line;
the flows between the other items (water, condensate, blowdown) are written under the item they reach, or
leave when they reach nothing drawn. No engineering is done here: the numbers are the record's, in the
display unit made by pint. Coordinates are written with one decimal, so the same figure gives the same bytes.
"""

from __future__ import annotations

from ..calcs.base import FLOW_ARROW
from .figure_spec import _transform
from .svg_text import FONT, WIDTH, _esc, _f
from ..units.formatting import unit_label

_LABEL_ROOM = 130.0       # left of the bars: each header's name and pressure, px
_COLUMN = 150.0           # width of one item's column, px
_LINE = 12.0              # text line height, px
_BAR = 6.0                # header bar thickness, px
_CHARS = 28               # characters of 10 px text that fit a column
_HEADER_COLOUR, _LINE_COLOUR, _TEXT = "#2b6a99", "#5b6770", "#1d2327"


def is_header_diagram(figure):
    """Whether a record figure is a header diagram: a ``headers`` series on y2 and a ``connections`` flow series.

    >>> is_header_diagram({"series": [{"name": "headers", "axis": "y2"}, {"name": "connections", "style": "flows"}]})
    True
    """
    series = figure.get("series") or []
    return (not figure.get("missing") and len(series) == 2 and series[0].get("name") == "headers"
            and series[0].get("axis") == "y2" and series[1].get("style") == "flows")


def diagram_parts(figure):
    """``(headers, pressures, connections)`` of a header diagram in record units: header node names highest
    pressure first, their pressures, and ``[(source, target, flow), ...]`` in record order."""
    heads, links = figure["series"]
    connections = []
    for label, value in zip(links.get("labels", []), links["y"]):
        source, _, target = str(label).partition(FLOW_ARROW)
        connections.append((source, target, float(value)))
    return list(heads.get("labels", [])), [float(p) for p in heads["y"]], connections


def _placement(headers, connections):
    """Where each item stands: ``{node: (band, kind, header rows it spans)}``; band i is above header i."""
    row = {h: i for i, h in enumerate(headers)}
    place = {}
    nodes = []
    for s, t, _ in connections:
        for n in (s, t):
            if n not in row and n not in nodes:
                nodes.append(n)
    for n in nodes:
        fed = [row[t] for s, t, _ in connections if s == n and t in row]
        taken = [row[s] for s, t, _ in connections if t == n and s in row]
        if fed and taken:
            place[n] = (max(fed), "link", (min(taken), max(fed)))
        elif fed:
            place[n] = (max(fed), "feeder", (max(fed), max(fed)))
        elif taken:
            place[n] = (min(taken) + 1, "sink", (min(taken), min(taken)))
    return place


def _columns(headers, place):
    """A column for each placed item: links keep theirs through every band they cross, the rest fill in.

    No column meets a header from above and below at once, so that a line into a header never seems to run
    on into an item hanging from it.
    """
    taken = {band: set() for band in range(len(headers) + 1)}
    above = {row: set() for row in range(len(headers))}      # columns that reach a header from above
    below = {row: set() for row in range(len(headers))}      # columns that leave a header downwards
    column = {}
    rank = {"link": 0, "feeder": 1, "sink": 2}
    for n, (band, kind, (top, bottom)) in sorted(place.items(), key=lambda item: (rank[item[1][1]],
                                                                                  item[1][2][0] - item[1][2][1])):
        bands = range(top + 1, bottom + 1) if kind == "link" else (band,)
        enters = (bottom,) if kind != "sink" else ()
        leaves = (top,) if kind != "feeder" else ()
        c = 0
        while (any(c in taken[b] for b in bands) or any(c in below[r] for r in enters)
               or any(c in above[r] for r in leaves)):
            c += 1
        column[n] = c
        for b in bands:
            taken[b].add(c)
        for r in enters:
            above[r].add(c)
        for r in leaves:
            below[r].add(c)
    return column, max((max(t) + 1 for t in taken.values() if t), default=1)


def header_svg(figure, system="SI", ident="headers"):
    """An SVG header diagram of a record's header-diagram figure, its flows in the display units.

    Parameters
    ----------
    figure : dict
        A record figure with a ``headers`` series (y2: pressures) and a ``connections`` series of style
        ``flows`` (:func:`is_header_diagram`).
    system : {"SI", "US"}
        Display units of the flows and pressures.
    ident : str
        The SVG's id.

    Returns
    -------
    str
        ``<svg>`` markup: one ``<rect class="header-bar">`` per header, one ``<g class="header-item">`` per
        item, each connection's flow written once.

    Examples
    --------
    >>> figure = {"name": "h", "title": "Headers", "axes": {"x": {"label": "connection number", "unit": ""},
    ...           "y": {"label": "mass flow", "unit": "kg/h"},
    ...           "y2": {"label": "header pressure", "unit": "bar", "basis": "absolute"}},
    ...           "series": [{"name": "headers", "x": [0.0, 1.0], "y": [11.0, 3.0], "style": "markers",
    ...                       "axis": "y2", "labels": ["HP header", "LP header"]},
    ...                      {"name": "connections", "x": [0.0, 1.0, 2.0, 3.0], "y": [1000.0, 400.0, 400.0, 600.0],
    ...                       "style": "flows", "axis": "y", "labels": ["boiler → HP header",
    ...                       "HP header → let-down A", "let-down A → LP header", "HP header → dryer"]}]}
    >>> svg = header_svg(figure)
    >>> svg.count('class="header-bar"'), "1,000 kg/h" in svg, "11 bar(a)" in svg
    (2, True, True)
    >>> "2,205 lb/h" in header_svg(figure, "US")
    True
    """
    headers, pressures, connections = diagram_parts(figure)
    f_scale, f_offset, f_unit = _transform(figure["axes"]["y"], system)
    p_scale, p_offset, p_unit = _transform(figure["axes"]["y2"], system)
    p_text = unit_label(p_unit, figure["axes"]["y2"].get("basis") or "absolute")

    def flow(value):
        return f"{f_offset + f_scale * value:,.0f} {f_unit}"

    row = {h: i for i, h in enumerate(headers)}
    place = _placement(headers, connections)
    column, columns = _columns(headers, place)
    # Flows between items (neither end a header), written under the item they reach, else the one they leave.
    notes = {n: [] for n in place}
    for s, t, v in connections:
        if s in row or t in row:
            continue
        node, words = (t, f"from {s}") if t in place else (s, f"to {t}")
        if node in place:
            # One line when it fits the column, else the flow on a line of its own.
            notes[node].extend([f"{words}: {flow(v)}"] if len(words) + len(flow(v)) < _CHARS else
                               [f"{words}:", flow(v)])
    width = max(WIDTH, _LABEL_ROOM + columns * _COLUMN + 10.0)
    band_height = []
    for band in range(len(headers) + 1):
        members = [n for n, (b, _, _) in place.items() if b == band]
        above = max((4 + len(notes[n]) for n in members if place[n][1] != "sink"), default=0)
        below = max((4 + len(notes[n]) for n in members if place[n][1] == "sink"), default=0)
        band_height.append(max(40.0, (above + below) * _LINE + 30.0))
    y_bar, y = [], 40.0 + band_height[0]
    for i in range(len(headers)):
        y_bar.append(y)
        y += _BAR + band_height[i + 1]
    height = y + 10.0
    x_of = {n: _LABEL_ROOM + (column[n] + 0.5) * _COLUMN for n in place}
    parts = [f'<svg xmlns="http://www.w3.org/2000/svg" id="{_esc(ident)}" class="header-diagram" '
             f'width="{_f(width)}" height="{_f(height)}" viewBox="0 0 {_f(width)} {_f(height)}" '
             'style="max-width:100%;height:auto" '
             f'font-family="{FONT}" font-size="10" role="img" aria-label="{_esc(figure.get("title", "headers"))}">',
             f'<text x="{_f(width / 2)}" y="20.0" text-anchor="middle" font-size="14" fill="{_TEXT}">'
             f'{_esc(figure.get("title", ""))} ({_esc(f_unit)})</text>']
    for i, (h, p) in enumerate(zip(headers, pressures)):
        parts.append(f'<rect class="header-bar" x="{_f(_LABEL_ROOM)}" y="{_f(y_bar[i])}" '
                     f'width="{_f(width - _LABEL_ROOM - 10)}" height="{_f(_BAR)}" fill="{_HEADER_COLOUR}"/>')
        parts.append(f'<text x="{_f(_LABEL_ROOM - 8)}" y="{_f(y_bar[i] + 2)}" text-anchor="end" font-size="12" '
                     f'font-weight="bold" fill="{_TEXT}">{_esc(h)}</text>')
        parts.append(f'<text x="{_f(_LABEL_ROOM - 8)}" y="{_f(y_bar[i] + 15)}" text-anchor="end" fill="{_TEXT}">'
                     f'{p_offset + p_scale * p:,.4g} {_esc(p_text)}</text>')

    def text(x, y, words, anchor="middle", weight=""):
        bold = ' font-weight="bold"' if weight else ""
        return f'<text x="{_f(x)}" y="{_f(y)}" text-anchor="{anchor}"{bold} fill="{_TEXT}">{_esc(words)}</text>'

    def line(x, y0, y1):
        return (f'<line x1="{_f(x)}" y1="{_f(y0)}" x2="{_f(x)}" y2="{_f(y1)}" stroke="{_LINE_COLOUR}" '
                f'stroke-width="1.5"/>')

    for n, (band, kind, (top, bottom)) in place.items():
        x = x_of[n]
        group = ['<g class="header-item">']
        into = [(s, v) for s, t, v in connections if t == n and s in row]
        out = [(t, v) for s, t, v in connections if s == n and t in row]
        if kind == "sink":
            y0 = y_bar[band - 1] + _BAR
            group.append(line(x, y0, y0 + 24))
            group.append(text(x + 4, y0 + 16, flow(sum(v for _, v in into)), "start"))
            y_text = y0 + 24 + _LINE
            group.append(text(x, y_text, n, weight="bold"))
        else:
            y_target = y_bar[band]
            lines = 2 + len(notes[n])
            y_box = y_target - 24 - lines * _LINE
            group.append(line(x, y_box + (len(notes[n]) + 0.5) * _LINE, y_target))
            group.append(text(x + 4, y_target - 8, flow(sum(v for _, v in out)), "start"))
            if kind == "link":
                y_source = y_bar[top] + _BAR
                group.append(line(x, y_source, y_box - _LINE))
                group.append(text(x + 4, y_source + _LINE, flow(sum(v for _, v in into)), "start"))
                for crossed in range(top + 1, bottom):
                    group.append(f'<rect x="{_f(x - 4)}" y="{_f(y_bar[crossed] - 1)}" width="8.0" '
                                 f'height="{_f(_BAR + 2)}" fill="#ffffff"/>')
                    group.append(line(x, y_bar[crossed] - 1, y_bar[crossed] + _BAR + 1))
            y_text = y_box
            group.append(text(x, y_text, n, weight="bold"))
        for k, note in enumerate(notes[n], start=1):
            group.append(text(x, y_text + k * _LINE, note))
        group.append("</g>")
        parts.append("".join(group))
    parts.append("</svg>")
    return "".join(parts)


__all__ = ["diagram_parts", "header_svg", "is_header_diagram"]
