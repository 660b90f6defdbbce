"""The balance's figures as data: per load case, the steam flows between boiler, headers, users and vents.

Each flow is a link "source → target" with its mass flow (a Sankey diagram's data). The record holds it as a
series of style ``flows``, x the link's number and y its flow, each labelled ``"<source> → <target>"``; the
workbook draws it as plotly's Sankey diagram (:func:`sankey_links`), the HTML record as an SVG Sankey
(:mod:`steamcalc.render.sankey_svg`). Each load case also has its header diagram with the flows on it
(:mod:`.header_flows`).
"""

from __future__ import annotations

from ..base import FLOW_ARROW as ARROW
from ..base import Axis, Figure, Series, figure_or_missing
from .header_flows import header_figure


def _links(inputs, b):
    links = [("boiler", f"{inputs.boiler.header} header", b.boiler_steam)]
    for ld in sorted(inputs.letdowns, key=lambda ld: ld.name):
        steam = b.letdown_steam.get(ld.name, 0.0)
        if steam > 0.0:
            links.append((f"{ld.source} header", f"{ld.target} header", steam))
            if b.letdown_spray.get(ld.name, 0.0) > 0.0:
                links.append((f"spray water ({ld.name})", f"{ld.target} header", b.letdown_spray[ld.name]))
    for t in sorted(inputs.turbines, key=lambda t: t.name):
        if b.turbine_flow.get(t.name, 0.0) > 0.0:
            links.append((f"{t.source} header", f"turbine {t.name}", b.turbine_flow[t.name]))
            links.append((f"turbine {t.name}", f"{t.target} header", b.turbine_flow[t.name]))
    for f in sorted(inputs.flashes, key=lambda f: f.name):
        if b.flash_steam.get(f.name, 0.0) > 0.0:
            links.append((f"flash vessel {f.name}", f"{f.target} header", b.flash_steam[f.name]))
    if b.blowdown_flash_steam > 0.0:
        links.append(("blowdown flash", f"{inputs.boiler.blowdown_flash_header} header", b.blowdown_flash_steam))
    for u in sorted(inputs.users, key=lambda u: u.name):
        if b.user_flows.get(u.name, 0.0) > 0.0:
            links.append((f"{u.header} header", u.name, b.user_flows[u.name]))
    if b.deaerator_steam > 0.0:
        links.append((f"{inputs.deaerator.steam_header} header", "deaerator", b.deaerator_steam))
    for h, m in sorted(b.vents.items()):
        links.append((f"{h} header", f"vent from {h}", m))
    for h, m in sorted(b.shortfalls.items()):
        links.append(("shortfall", f"{h} header", m))
    return links


def flow_figure(inputs, case, b):
    """The steam flows of one load case as Sankey data."""
    links = _links(inputs, b)
    series = Series("steam flows", tuple(float(i) for i in range(len(links))), tuple(m * 3600 for *_, m in links),
                    style="flows", role="process", labels=tuple(f"{s}{ARROW}{t}" for s, t, _ in links))
    return Figure(f"steam_flows_{case}", f"Steam flows, {case}", x=Axis("flow number"),
                  y=Axis("mass flow", "kg/h"), series=(series,))


def figures(inputs, site, balances):
    """One steam-flow figure per load case, then one header diagram per load case."""
    return [figure_or_missing(f"steam_flows_{name}", f"Steam flows, {name}",
                              lambda name=name, b=b: flow_figure(inputs, name, b)) for name, b in balances.items()] + [
        figure_or_missing(f"header_diagram_{name}", f"Header diagram with flows, {name}",
                          lambda name=name, b=b: header_figure(inputs, site, name, b)) for name, b in balances.items()]


def sankey_links(figure):
    """(nodes, sources, targets, values) of a recorded steam-flow figure, for plotly's Sankey diagram."""
    nodes, sources, targets, values = [], [], [], []
    series = figure["series"][0]
    for label, value in zip(series.get("labels", []), series["y"]):
        source, _, target = label.partition(ARROW)
        for name in (source, target):
            if name not in nodes:
                nodes.append(name)
        sources.append(nodes.index(source))
        targets.append(nodes.index(target))
        values.append(value)
    return nodes, sources, targets, values
