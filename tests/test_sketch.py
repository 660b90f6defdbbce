"""The process sketch: every number it writes is the record's own (its results, or the inputs where the
state is an input), formatted as the report formats it; gauge values agree with what the user typed."""

import dataclasses
import re
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from steamcalc.render.display import display_record
from steamcalc.render.report import format_number
from steamcalc.records.build import record_for_case
from steamcalc.cases.site import case_site, load_case
from steamcalc.render.sketch import sketch_points, sketch_svg

CASES = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site" / "cases"
SVG = "{http://www.w3.org/2000/svg}"

#: The record entries each demo case's sketch must show (section.key).
EXPECTED = {
    "LD-01": {"inputs.inlet_pressure", "results.inlet_temperature", "results.inlet_mass_flow",
              "inputs.outlet_pressure", "results.throttled_temperature", "inputs.water_pressure",
              "inputs.water_temperature", "results.spray_water_flow", "results.outlet_temperature",
              "results.outlet_mass_flow"},
    "LD-02": {"inputs.inlet_pressure", "results.inlet_temperature", "results.inlet_mass_flow",
              "inputs.outlet_pressure", "results.throttled_temperature"},
    "FL-01": {"inputs.condensate_pressure", "results.condensate_temperature", "results.condensate_flow",
              "inputs.flash_pressure", "results.residual_condensate_temperature", "results.flash_steam_flow",
              "results.residual_condensate_flow"},
    "FL-02": {"inputs.condensate_pressure", "results.condensate_temperature", "results.condensate_flow",
              "inputs.flash_pressure", "results.residual_condensate_temperature", "results.flash_steam_flow",
              "results.residual_condensate_flow"},
    "HX-01": {"inputs.steam_pressure", "results.steam_saturation_temperature", "results.steam_flow",
              "results.required_steam_pressure_100", "results.duty", "inputs.condensate_back_pressure",
              "results.condensate_flow", "inputs.process_inlet_temperature",
              "inputs.process_outlet_temperature", "results.process_flow"},
}


def _record(case_id, **site_changes):
    case = load_case(CASES / f"{case_id}.toml")
    site = case_site(case)
    if site_changes:
        site = dataclasses.replace(site, **site_changes)
    record, _ = record_for_case(case, site, with_uncertainty=False)
    return record


@pytest.fixture(scope="module")
def records():
    return {case_id: _record(case_id) for case_id in EXPECTED}


def _readings(svg):
    """(section.key, text) of every number written on the sketch."""
    root = ET.fromstring(svg)
    return [(t.get("data-key"), t.text) for t in root.iter(f"{SVG}text") if t.get("data-key")]


@pytest.mark.parametrize("case_id", sorted(EXPECTED))
def test_sketch_numbers_are_the_records(records, case_id):
    record = records[case_id]
    shown = display_record(record)
    readings = _readings(sketch_svg(record))
    assert {key for key, _ in readings} == EXPECTED[case_id]
    for key, text in readings:
        section, name = key.split(".", 1)
        entry = shown[section][name]
        assert text.split(" ")[0] == entry["shown"], (key, text, entry["value"])


@pytest.mark.parametrize("case_id", sorted(EXPECTED))
def test_gauge_beside_each_pressure_is_what_the_user_typed(records, case_id):
    record = records[case_id]
    for key, text in _readings(sketch_svg(record)):
        section, name = key.split(".", 1)
        if " · " not in text:
            continue
        absolute, gauge = text.split(" · ")
        assert absolute.endswith("bar(a)") and gauge.endswith("bar(g)")
        given = record[section][name].get("given", "")
        typed = re.search(r"([0-9.]+) bar\(g\)$", given or "")
        if typed:     # "header:HP = 16 bar(g)" or "0.1 bar(g)": the sketch shows the same gauge value
            assert float(gauge.split(" ")[0]) == pytest.approx(float(typed.group(1)), abs=1e-6)


def test_letdown_without_desuperheater_has_no_spray_point(records):
    numbers = [p.number for p in sketch_points(records["LD-02"])]
    assert numbers == ["1", "2"]
    assert "desuperheater" not in sketch_svg(records["LD-02"])
    assert "desuperheater" in sketch_svg(records["LD-01"])


def test_vented_flash_says_the_steam_is_lost(records):
    assert "to vent (lost)" in sketch_svg(records["FL-02"])
    assert "to LP header" in sketch_svg(records["FL-01"])


def test_us_display_shows_psia_psig_and_degrees_f():
    record = _record("LD-02", display_units="US")
    readings = dict(_readings(sketch_svg(record)))
    assert readings["inputs.inlet_pressure"].endswith("psig") and "psia · " in readings["inputs.inlet_pressure"]
    assert readings["results.inlet_temperature"] == f"{format_number(230 * 1.8 + 32, 'degF')} °F"
    assert readings["results.inlet_mass_flow"].endswith("lb/h")


def test_sketch_is_plain_svg_and_escapes_user_text(records):
    record = dict(records["FL-01"], id="<b>x</b>")
    svg = sketch_svg(record)
    assert "<script" not in svg and "<b>x</b>" not in svg
    ET.fromstring(svg)


def test_unknown_kind_has_no_sketch():
    assert sketch_svg({"kind": "boiler"}) == "" and sketch_points({"kind": "boiler"}) == []


def test_cascade_shows_each_stages_steam_at_its_own_pressure(tmp_path):
    (tmp_path / "cases").mkdir()
    (tmp_path / "site.toml").write_text((CASES.parent / "site.toml").read_text(encoding="utf-8"), encoding="utf-8")
    text = (CASES / "FL-02.toml").read_text(encoding="utf-8")
    text = re.sub(r"(?m)^flash_pressure = .*$", 'stages = ["8 bar(g)", "header:LP"]', text)
    text = re.sub(r"(?m)^vented = .*$", "", text)
    (tmp_path / "cases" / "FL-09.toml").write_text(text, encoding="utf-8")
    case = load_case(tmp_path / "cases" / "FL-09.toml")
    record, _ = record_for_case(case, case_site(case), with_uncertainty=False)
    readings = _readings(sketch_svg(record))
    steam = [text for key, text in readings if key.startswith("results.stage_")]
    assert steam[0].endswith("8 bar(g) (stage 1)") and steam[2].endswith("2.5 bar(g) (stage 2)")
    shown = display_record(record)
    for key, text in readings:
        section, name = key.split(".", 1)
        assert text.split(" ")[0] == shown[section][name]["shown"], (key, text)
    assert 'text-anchor="middle" font-weight="bold">vessels</text>' in sketch_svg(record)


def test_workbook_sketch_follows_the_inputs_and_greys_out_while_one_is_refused(tmp_path):
    from steamcalc.ui.workbook import Workbook

    wb = Workbook(CASES / "FL-01.toml", tmp_path / "records")
    assert 'data-key="results.condensate_flow">3,200 kg/h<' in wb.sketch_view().value
    wb.form.boxes["condensate_flow"].value = "3.6 t/h"
    assert 'data-key="results.condensate_flow">3,600 kg/h<' in wb.sketch_view().value
    wb.form.boxes["condensate_flow"].value = "lots"
    assert "Out of date" in wb.sketch_view().value and ">3,600 kg/h<" in wb.sketch_view().value
    wb.form.boxes["condensate_flow"].value = "3.7 t/h"
    assert "Out of date" not in wb.sketch_view().value and ">3,700 kg/h<" in wb.sketch_view().value
