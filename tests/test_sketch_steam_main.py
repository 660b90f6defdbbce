"""The steam main's process sketch: the header, the segments (the riser as a step), the drip legs and their traps,
the user and its trap, the return line to the receiver; every number on it is the record's own, as the report
shows it, and its gauge values are what the user typed."""

import copy
import dataclasses
import re
import xml.etree.ElementTree as ET

import pytest

from steamcalc.cases.site import case_site, load_case
from steamcalc.records.build import record_for_case
from steamcalc.render.display import display_record
from steamcalc.render.sketch import sketch_points, sketch_svg
from tests.test_sketch import CASES, SVG, _readings

#: The record entries SM-01's sketch shows (section.key): the supply, each segment, the user, each drip trap,
#: the heater's trap and the return line.
EXPECTED = {
    "results.supply_pressure", "results.supply_temperature", "inputs.steam_flow",
    *(f"results.segment_{n}_{what}" for n in (1, 2, 3) for what in ("velocity", "outlet_pressure", "heat_loss")),
    "results.main_outlet_pressure", "results.main_outlet_temperature",   # superheated at the user: no dryness
    *(f"results.drip_{n}_{what}" for n in (1, 2) for what in ("position", "trap_capacity", "trap_differential")),
    "inputs.heater_condensate_flow", "results.heater_trap_capacity", "results.heater_trap_differential",
    "inputs.receiver_pressure", "results.return_flow", "results.return_flash_fraction", "results.return_velocity",
}


def _record(records, **site_changes):
    case = load_case(CASES / "SM-01.toml")
    site = case_site(case)
    if site_changes:
        site = dataclasses.replace(site, **site_changes)
    record, _ = record_for_case(case, site, with_uncertainty=False, record_folder=records)
    return record


@pytest.fixture(scope="module")
def record(demo_linked_records):
    return _record(demo_linked_records)


def test_sketch_numbers_are_the_records(record):
    shown = display_record(record)
    readings = _readings(sketch_svg(record))
    assert {key for key, _ in readings} == EXPECTED
    for key, text in readings:
        section, name = key.split(".", 1)
        assert text.split(" ")[0] == shown[section][name]["shown"], (key, text, record[section][name]["value"])


def test_gauge_beside_each_pressure_is_what_the_user_typed(record):
    readings = dict(_readings(sketch_svg(record)))
    # header:MP = 8 bar(g) and header:LP = 2.5 bar(g) in the demo site, as the case gives them
    assert readings["results.supply_pressure"].endswith(" · 8 bar(g)")
    assert readings["inputs.receiver_pressure"].endswith(" · 2.5 bar(g)")
    for key, text in readings.items():
        if " · " in text:
            absolute, gauge = text.split(" · ")
            assert absolute.endswith("bar(a)") and gauge.endswith("bar(g)"), key
    # a trap's differential is a pressure difference, said so (never a bare "bar" or "bar(a)")
    assert readings["results.heater_trap_differential"].endswith(" bar difference")
    assert readings["results.drip_1_trap_differential"].endswith(" bar difference")


def test_the_parts_of_the_main_are_drawn(record):
    svg = sketch_svg(record)
    root = ET.fromstring(svg)
    texts = [t.text for t in root.iter(f"{SVG}text")]
    tags = {p.number for p in sketch_points(record)}
    assert tags == {"1", "S1", "S2", "S3", "2", "D1", "D2", "H", "R"}
    for number in tags:
        assert number in texts, number        # each tag on the drawing as well as in the legend
    assert texts.count("T") == 3              # two drip traps and the heater's trap
    assert "MP header" in texts and "user" in texts and "receiver" in texts and "LP pressure" in texts
    # The riser (segment 2, 3 m up) is a step in the main: one vertical steam line.
    verticals = [e for e in root.iter(f"{SVG}line") if e.get("x1") == e.get("x2") and e.get("stroke") == "#2b6a99"]
    assert len(verticals) == 1
    names = {p.number: p.name for p in sketch_points(record)}
    assert names["S2"] == "DN80, 3 m, rises 3 m" and names["S1"] == "DN80, 72 m"
    assert names["R"] == "return line DN50 to the receiver"


def test_drip_legs_sit_where_the_record_puts_them(record):
    """Drip 1 at the riser's foot (72 m): on the lower run, below the step; drip 2 at the end, on the upper run."""
    root = ET.fromstring(sketch_svg(record))
    riser = next(e for e in root.iter(f"{SVG}line") if e.get("x1") == e.get("x2") and e.get("stroke") == "#2b6a99")
    pockets = [e for e in root.iter(f"{SVG}rect") if e.get("width") == "10"]
    assert len(pockets) == 2
    foot, end = sorted(pockets, key=lambda e: float(e.get("x")))
    assert float(foot.get("x")) + 5 == pytest.approx(float(riser.get("x1")))
    assert float(foot.get("y")) == pytest.approx(float(riser.get("y1")))       # the lower level
    assert float(end.get("y")) == pytest.approx(float(riser.get("y2")))        # the upper level


def test_a_main_from_a_let_down_record_and_without_a_return(record):
    linked = copy.deepcopy(record)
    linked["inputs"]["supply_link_record_id"] = {"value": "LD-01", "unit": "", "given": "LD-01"}
    for key in [k for k in linked["results"] if k.startswith(("return_", "heater_trap_"))]:
        del linked["results"][key]
    svg = sketch_svg(linked)
    assert "LD-01 outlet" in svg and "receiver" not in svg and "traps discharge to a safe drain" in svg
    assert {p.number for p in sketch_points(linked)} == {"1", "S1", "S2", "S3", "2", "D1", "D2"}
    ET.fromstring(svg)


def test_us_display_shows_psia_nps_and_feet(demo_linked_records):
    record = _record(demo_linked_records, display_units="US")
    readings = dict(_readings(sketch_svg(record)))
    assert readings["results.supply_pressure"].endswith("psig") and "psia · " in readings["results.supply_pressure"]
    assert readings["results.segment_1_velocity"].endswith("ft/s (steam)")
    assert readings["inputs.steam_flow"].endswith("lb/h")
    names = {p.number: p.name for p in sketch_points(record)}
    assert names["S1"].startswith("NPS 3, 236") and names["S1"].endswith(" ft")
    assert re.search(r"\bDN\d", sketch_svg(record)) is None


def test_sketch_is_plain_svg_and_escapes_record_text(record):
    hostile = copy.deepcopy(record)
    hostile["id"] = "<b>x</b>"
    hostile["inputs"]["segments"]["value"] = hostile["inputs"]["segments"]["value"].replace('"DN80"', '"<i>DN80</i>"')
    svg = sketch_svg(hostile)
    assert "<script" not in svg and "<b>x</b>" not in svg and "<i>" not in svg
    ET.fromstring(svg)
    unreadable = copy.deepcopy(record)
    unreadable["inputs"]["segments"]["value"] = "not rows"
    names = {p.number: p.name for p in sketch_points(unreadable)}
    assert names["S1"] == "segment 1"          # drawn alike, named by number, never a traceback
    ET.fromstring(sketch_svg(unreadable))


def test_workbook_shows_the_main_sketch(tmp_path):
    from steamcalc.ui.workbook import Workbook

    import shutil

    # A copy of the demo site without its records (a run of the workbooks may have left some in the repository's).
    site = tmp_path / "site"
    shutil.copytree(CASES.parent, site, ignore=shutil.ignore_patterns("records"))
    wb = Workbook(site / "cases" / "SM-01.toml", tmp_path / "records")   # HX-01, whose flow SM-01 takes, issued first
    assert wb.issued == ["HX-01 rev B issued from HX-01.toml (it was not in records/)"]
    assert "Steam main and condensate return SM-01" in wb.sketch_view().value
    # A steam flow typed beside the heater link is refused until the link is cleared; then it is the sketch's.
    wb.form.boxes["steam_flow"].value = "800 kg/h"
    assert wb.error is not None and "not given twice" in wb.error
    wb.form.boxes["load_link_revision"].value = ""
    wb.form.boxes["load_link_record_id"].value = ""
    # The link gave the heater's condensate into the return line too (release 0.3.2): without it, that flow is asked.
    assert wb.error is not None and "give the heater's condensate flow and its trap inlet pressure together" in wb.error
    wb.form.boxes["heater_condensate_flow"].value = "800 kg/h"
    assert wb.error is None
    assert 'data-key="inputs.steam_flow">800 kg/h<' in wb.sketch_view().value
