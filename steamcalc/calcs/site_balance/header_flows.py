"""The balance's header diagram as data: per load case, every flow into and out of each header, and around them.

The record holds it as a figure of two series: ``headers`` (style ``markers`` on the y2 axis, one point per
header, highest pressure first, its y the header pressure in bar(a) and its label the header's node name)
and ``connections`` (style ``flows`` on the y axis, one point per connection, its y the flow in kg/h and its
label ``"<source> → <target>"``). Connections are what the solver put into and took out of each header (the
boiler, let-downs, flash vessels and the blowdown flash in; users, the deaerator, let-downs and vents out; a
header nothing feeds gets a ``shortfall`` in), an idle let-down at zero flow, and the water around them: the
deaerator's make-up, returns, vent and feedwater, the boiler's blowdown, the desuperheaters' spray, the
condensate a flash vessel takes and the residual it returns. Every header, let-down, the boiler, the
deaerator and each flash vessel close on these flows (what enters leaves), which the tests check from the
record alone. The HTML record draws it as SVG (:mod:`steamcalc.render.header_svg`).
"""

from __future__ import annotations

from ..base import FLOW_ARROW as ARROW
from ..base import Axis, Figure, Series

#: The solver's names of header inflows and outflows, as the diagram's nodes are named (users read them).
_NODE_NAMES = {"boiler steam": "boiler", "blowdown flash steam": "blowdown flash",
               "deaerator heating steam": "deaerator"}


def header_node(header):
    """The diagram's node name of a header.

    >>> header_node("LP")
    'LP header'
    """
    return f"{header} header"


def _node(name):
    name = _NODE_NAMES.get(name, name)
    if name.startswith("turbine ") and name.endswith(" exhaust"):   # one node: the steam in is the exhaust out
        name = name[:-len(" exhaust")]
    return name[len("user "):] if name.startswith("user ") else name


def connections(inputs, site, b):
    """The connections of one solved load case: ``[(source, target, kg/s), ...]`` in a fixed order.

    Parameters
    ----------
    inputs : Inputs
    site : steamcalc.cases.site.Site
    b : CaseBalance
        The solved load case (:func:`steamcalc.calcs.site_balance.solver.solve_case`).

    Returns
    -------
    list of tuple
        Header flows first (each header from the highest pressure down: what enters, then what leaves), then
        the water around the boiler, deaerator, let-downs and flash vessels.
    """
    order = sorted(site.headers, key=lambda h: -site.headers[h])
    links = []
    for h in order:
        node = header_node(h)
        for name, m, _ in b.inflows.get(h, ()):
            if name == "blowdown flash steam" and m <= 0.0:
                continue
            links.append((_node(name), node, m))
        if h in b.shortfalls:
            links.append(("shortfall", node, b.shortfalls[h]))
        for ld in sorted(inputs.letdowns, key=lambda ld: ld.name):
            if ld.target == h and b.letdown_steam.get(ld.name) == 0.0:
                links.append((f"let-down {ld.name}", node, 0.0))           # idle: shown, at zero
        for name, m in b.outflows.get(h, ()):
            if name == "deaerator heating steam" and m <= 0.0:
                continue
            links.append((node, _node(name), m))
        for ld in sorted(inputs.letdowns, key=lambda ld: ld.name):
            if ld.source == h and b.letdown_steam.get(ld.name) == 0.0:
                links.append((node, f"let-down {ld.name}", 0.0))
    for ld in sorted(inputs.letdowns, key=lambda ld: ld.name):
        if b.letdown_spray.get(ld.name, 0.0) > 0.0:
            links.append(("deaerator", f"let-down {ld.name}", b.letdown_spray[ld.name]))
    spray = sum(b.letdown_spray.values())
    links.append(("deaerator", "boiler", b.feedwater - spray))
    if b.blowdown_flash_steam > 0.0:
        links.append(("boiler", "blowdown flash", b.blowdown))
        links.append(("blowdown flash", "blowdown drain", b.blowdown_residual))
    elif b.blowdown > 0.0:
        links.append(("boiler", "blowdown drain", b.blowdown))
    residual = 0.0
    for f in sorted(inputs.flashes, key=lambda f: f.name):
        if f.name in b.flash_steam:
            links.append((f.from_user, f"flash vessel {f.name}", b.flash_steam[f.name] + b.flash_residual[f.name]))
            links.append((f"flash vessel {f.name}", "deaerator", b.flash_residual[f.name]))
            residual += b.flash_residual[f.name]
    returned = sum(m for m, _ in b.returns.values()) - residual
    if returned > 0.0:
        links.append(("condensate returned", "deaerator", returned))
    links.append(("make-up water", "deaerator", b.makeup))
    if b.deaerator_vent > 0.0:
        links.append(("deaerator", "deaerator vent", b.deaerator_vent))
    return links


def header_figure(inputs, site, case, b):
    """The header diagram of one load case as figure data (headers in bar(a), flows in kg/h)."""
    order = sorted(site.headers, key=lambda h: -site.headers[h])
    headers = Series("headers", tuple(float(i) for i in range(len(order))),
                     tuple(site.headers[h] / 1e5 for h in order), style="markers", role="reference", axis="y2",
                     labels=tuple(header_node(h) for h in order))
    links = connections(inputs, site, b)
    flows = Series("connections", tuple(float(i) for i in range(len(links))), tuple(m * 3600 for *_, m in links),
                   style="flows", role="process", labels=tuple(f"{s}{ARROW}{t}" for s, t, _ in links))
    return Figure(f"header_diagram_{case}", f"Header diagram with flows, {case}", x=Axis("connection number"),
                  y=Axis("mass flow", "kg/h"), y2=Axis("header pressure", "bar", basis="absolute"),
                  series=(headers, flows))
