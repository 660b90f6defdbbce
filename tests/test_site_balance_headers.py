"""Site steam balance: the header diagram with its flows, from the record's figure data.

Consistency checks (no outside reference is needed for a mass balance): every header, let-down, the boiler,
the deaerator and each flash vessel close on the connections the record holds (what enters leaves); the
SVG drawn from the record names each header and writes each header flow, in kg/h (SI) or lb/h (US, by pint).
"""

import json
import shutil
from pathlib import Path

import pint
import pytest

from steamcalc.calcs.site_balance.calculation import Inputs, calculate
from steamcalc.calcs.site_balance.figures import figures
from steamcalc.calcs.site_balance.items import Boiler, Deaerator, Letdown, LoadCase, User
from steamcalc.cases.site import Site
from steamcalc.cli import main
from steamcalc.render.figures_svg import record_figures
from steamcalc.render.header_svg import diagram_parts, header_svg, is_header_diagram

REPO = Path(__file__).resolve().parents[1]
DEMO = REPO / "workbooks" / "demo_site"
UREG = pint.UnitRegistry()


@pytest.fixture(scope="module")
def demo_record(tmp_path_factory):
    """SB-01 issued on a copy of the demo site, with the records it links."""
    folder = tmp_path_factory.mktemp("demo") / "demo_site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    cases = [str(folder / "cases" / f"{name}.toml") for name in ("LD-01", "LD-02", "FL-01", "HX-01")]
    assert main(["run", *cases]) in (0, 1)
    out = folder / "records"
    assert main(["run", str(folder / "cases" / "SB-01.toml"), "--out", str(out)]) == 0
    return out / "SB-01_revA.json"


def _net(connections, node):
    """What enters a node less what leaves it, in the figure's unit."""
    return sum(v for _, t, v in connections if t == node) - sum(v for s, _, v in connections if s == node)


def _closing_nodes(headers, connections):
    """The nodes that must close: headers, let-downs, the boiler, the deaerator, flash vessels."""
    names = {n for s, t, _ in connections for n in (s, t)}
    return [n for n in names if n in headers or n in ("boiler", "deaerator", "blowdown flash")
            or n.startswith("let-down ") or n.startswith("flash vessel ")]


def _diagrams(record):
    return [f for f in record["figures"] if f["name"].startswith("header_diagram_")]


def test_demo_header_diagram_closes_at_every_header_from_the_record(demo_record):
    record = json.loads(demo_record.read_text(encoding="utf-8"))
    diagrams = _diagrams(record)
    assert [f["name"] for f in diagrams] == ["header_diagram_winter", "header_diagram_summer"]
    for figure in diagrams:
        assert is_header_diagram(figure)
        headers, pressures, connections = diagram_parts(figure)
        assert headers == ["HP header", "MP header", "LP header"] and pressures == sorted(pressures, reverse=True)
        total = sum(v for *_, v in connections)
        for node in _closing_nodes(headers, connections):
            assert abs(_net(connections, node)) <= 1e-9 * total, (figure["name"], node)
        for header in headers:
            assert any(t == header for _, t, _ in connections) and any(s == header for s, _, _ in connections)
        case = figure["name"].removeprefix("header_diagram_")
        boiler = next(v for s, t, v in connections if s == "boiler" and t == "HP header")
        assert boiler == pytest.approx(record["results"][f"{case}.boiler_steam_flow"]["value"], rel=1e-12)


def test_demo_header_diagram_is_verified_like_the_other_figures(demo_record, capsys):
    capsys.readouterr()
    assert main(["verify", "--all", str(demo_record)]) == 0
    listed = [line for line in capsys.readouterr().out.splitlines() if "figure header_diagram_" in line]
    assert len(listed) == 2 and all("same" in line or "points" in line for line in listed), listed


@pytest.mark.parametrize("system,unit", [("SI", "kg/h"), ("US", "lb/h")])
def test_header_svg_names_each_header_and_writes_its_flows(demo_record, system, unit):
    record = json.loads(demo_record.read_text(encoding="utf-8"))
    figure = _diagrams(record)[0]
    svg = header_svg(figure, system)
    headers, _, connections = diagram_parts(figure)
    assert svg.count('class="header-bar"') == len(headers)
    for header in headers:
        assert f">{header}<" in svg
    for source, target, value in connections:
        if source in headers or target in headers:
            shown = UREG.Quantity(value, "kg/hour").to("kg/hour" if unit == "kg/h" else "lb/hour").magnitude
            assert f"{shown:,.0f} {unit}" in svg, (source, target)
    assert svg == header_svg(figure, system)       # the same bytes each time (verify re-renders the HTML)


def test_the_html_record_draws_the_header_diagrams(demo_record):
    record = json.loads(demo_record.read_text(encoding="utf-8"))
    charts = record_figures(record)["charts"]
    drawn = [c for c in charts if c["title"].startswith("Header diagram")]
    assert len(drawn) == 2 and all('class="header-diagram"' in str(c["svg"]) and not c["missing"] for c in drawn)


SITE = Site(atmospheric_pressure=1.01325e5, makeup_water_temperature=288.15, boiler_efficiency=0.86,
            headers={"HP": 11e5, "MP": 6e5, "LP": 2.5e5})
YEAR = (LoadCase("all year", 8000 * 3600.0),)


@pytest.mark.parametrize("boiler_flow,letdowns,closed", [
    (2.0, (), "the HP header vents the boiler's surplus; MP and LP are short"),
    (None, (Letdown(name="A", source="HP", target="LP"),), "a let-down from HP to LP passes the MP header"),
    (None, (Letdown(name="A", source="HP", target="MP", target_superheat=10.0),
            Letdown(name="B", source="MP", target="LP")), "a desuperheated let-down with spray from the deaerator"),
])
def test_header_diagram_closes_with_vents_shortfalls_and_spray(boiler_flow, letdowns, closed):
    inputs = Inputs(boiler=Boiler(header="HP", pressure=11e5, flow=boiler_flow, blowdown_fraction=0.05),
                    deaerator=Deaerator(pressure=1.3e5, steam_header="LP", vent_fraction=0.01),
                    load_cases=YEAR, letdowns=letdowns,
                    users=(User(name="Dryer", header="HP", flows=(("all year", 0.5),)),
                           User(name="Press", header="MP", flows=(("all year", 0.3),), return_fraction=0.5,
                                return_temperature=353.15, condensate_to="cooled"),
                           User(name="Tracing", header="LP", flows=(("all year", 0.2),))))
    result = calculate(inputs, SITE)
    figure = next(f for f in figures(inputs, SITE, result.states["balances"])
                  if f.name == "header_diagram_all year").to_record()
    headers, _, connections = diagram_parts(figure)
    total = sum(v for *_, v in connections)
    for node in _closing_nodes(headers, connections):
        assert abs(_net(connections, node)) <= 1e-9 * total, (closed, node)
    svg = header_svg(figure)
    for name in ("Dryer", "Press", "Tracing", "deaerator", "boiler"):
        assert f">{name}<" in svg, (closed, name)


def test_the_workbook_shows_the_header_diagram_from_the_record(demo_record):
    from steamcalc.ui.site_balance import BalanceBook

    book = BalanceBook(demo_record.parent.parent / "cases" / "SB-01.toml", demo_record.parent)
    assert book.error is None, book.error
    svg = book.header_diagram("summer").data
    assert 'class="header-diagram"' in svg and ">LP header<" in svg and "kg/h" in svg


def test_header_diagram_closes_with_a_turbine_beside_the_letdown():
    """A balancing turbine HP -> LP beside the let-down: the turbine is a node of its own, its flow in equals
    its flow out, and the headers still close (the turbine's figures from the calculation layer)."""
    from steamcalc.calcs.site_balance.items import Turbine
    from tests.test_site_balance_turbine import _balance

    turbine = Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=0.6, max_flow=1.0)
    inputs, site = _balance(41e5, 673.15, 5e5, turbine)
    result = calculate(inputs, site)
    drawn = [f for f in figures(inputs, site, result.states["balances"]) if f.name.startswith("header_diagram_")]
    assert drawn, "no header diagram"
    for figure in drawn:
        record_figure = figure.to_record()
        headers, _, connections = diagram_parts(record_figure)
        names = {n for s, t, _ in connections for n in (s, t)}
        turbine_nodes = [n for n in names if "TG" in n]
        assert turbine_nodes, names
        total = sum(v for *_, v in connections)
        for node in _closing_nodes(headers, connections) + turbine_nodes:
            assert abs(_net(connections, node)) <= 1e-9 * total, (figure, node)
        assert "TG" in header_svg(record_figure, "SI")
