"""A US site (the demo site with display_units = "US") reads in US units everywhere a user looks: the
workbook's tables and charts (the tornado too), the warnings `run` prints and the values `verify` prints.

Conversions are pint's; the check values below are worked from the unit definitions (NIST SP 811:
°F = 1.8·°C + 32, 1 lb = 0.45359237 kg, 1 psi = 6894.757 Pa) and written beside each check.
"""

import contextlib
import html
import io
import json
import re
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.render.display import comparisons_shown, shown_check, written_unit
from steamcalc.ui.charts import record_charts, shown_rows, table_for, tornado_chart
from steamcalc.ui.workbook import Workbook

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"

#: SI units as the views write them: none may be left in a US view (a size as DN, a Kv, kg/h, bar(a) ...).
SI_WRITTEN = re.compile(r"kg/h|\bbar\b|bar\(a\)|bar difference|°C|kJ/kg|m³/h|\bKv\b|\bDN\d|\bm/s\b|mm²|\bkW\b")


def _us_site(folder):
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    site = folder / "site.toml"
    site.write_text(site.read_text().replace('display_units = "SI"', 'display_units = "US"'))
    return folder


@pytest.fixture(scope="module")
def us_site(tmp_path_factory):
    return _us_site(tmp_path_factory.mktemp("us") / "site")


def _cells(table_html):
    return html.unescape(re.sub(r"<[^>]+>", " | ", table_html))


@pytest.mark.parametrize("case", ["LD-01", "FL-01", "HX-01"])
def test_every_table_row_of_the_workbook_is_in_us_units(us_site, tmp_path, case):
    workbook = Workbook(us_site / "cases" / f"{case}.toml", tmp_path / "records")
    shown = _cells(workbook._table.value)
    assert shown.strip(), "the workbook shows no table"
    assert not SI_WRITTEN.findall(shown), SI_WRITTEN.findall(shown)[:5]
    assert "lb/h" in shown or "psia" in shown


def test_the_letdown_flow_cases_convert_by_pint(us_site, tmp_path):
    workbook = Workbook(us_site / "cases" / "LD-01.toml", tmp_path / "records")
    si = table_for("letdown", workbook.inputs, workbook.result, "SI")
    us = table_for("letdown", workbook.inputs, workbook.result, "US")
    normal_si = si["Flow cases"][1]
    normal_us = us["Flow cases"][1]
    assert normal_us["flow, lb/h"] == pytest.approx(normal_si["flow, kg/h"] / 0.45359237, rel=1e-12)  # NIST SP 811
    assert normal_us["valve inlet, psia"] == pytest.approx(normal_si["valve inlet, bar(a)"] * 1e5 / 6894.757293168,
                                                           rel=1e-9)
    assert normal_us["required Cv"] == pytest.approx(normal_si["required Kv, m³/h"] * 1.156, rel=1e-3)  # IEC 60534-1
    relief = next(rows for heading, rows in us.items() if heading.startswith("Relief device"))
    temperature = next(row for row in relief if row["quantity"] == "Relieving temperature")
    si_temperature = next(row for heading, rows in si.items() if heading.startswith("Relief device")
                          for row in rows if row["quantity"] == "Relieving temperature")
    assert temperature["unit"] == "°F" and si_temperature["unit"] == "°C"
    assert temperature["value"] == pytest.approx(si_temperature["value"] * 1.8 + 32, rel=1e-12)


def test_si_tables_keep_their_numbers_and_write_their_units():
    rows = [{"quantity": "Relief capacity margin over the relief load", "value": 38.7, "unit": "percent"},
            {"quantity": "Relieving pressure (set + overpressure)", "value": 5.94, "unit": "bar"}]
    assert [(r["value"], r["unit"]) for r in shown_rows(rows)] == [(38.7, "%"), (5.94, "bar(a)")]
    flow = [{"flow, kg/h": 4500.0}]
    assert shown_rows(flow) == flow


@pytest.mark.parametrize("case", ["LD-01", "FL-01", "HX-01"])
def test_every_workbook_chart_is_in_us_units(us_site, tmp_path, case):
    workbook = Workbook(us_site / "cases" / f"{case}.toml", tmp_path / "records")
    figures, missing = record_charts(workbook.record)
    assert figures and not missing
    for figure in figures:
        layout = figure.to_plotly_json()["layout"]
        texts = [layout["title"]["text"]] + [layout[axis]["title"]["text"] for axis in ("xaxis", "yaxis", "yaxis2")
                                             if axis in layout] + [trace.name for trace in figure.data]
        assert not SI_WRITTEN.findall(" ".join(texts)), texts


def test_the_tornado_chart_is_drawn_in_us_units(us_site, tmp_path):
    workbook = Workbook(us_site / "cases" / "LD-01.toml", tmp_path / "records")
    section = workbook.compute_uncertainty()
    figure = tornado_chart(section, workbook.calc, "US")
    key = next(iter(section["bands"]))
    assert figure.layout.xaxis.title.text.endswith("°F")
    assert figure.data[0].base == pytest.approx(section["bands"][key]["nominal"] * 1.8 + 32, rel=1e-12)
    shown = json.dumps(workbook._tornado.outputs[0]["data"]["application/vnd.plotly.v1+json"]["layout"], ensure_ascii=False)
    assert "°F" in shown and "°C" not in shown


def test_run_prints_its_warnings_in_us_units(us_site, tmp_path):
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        main(["run", str(us_site / "cases" / "LD-02.toml"), "--out", str(tmp_path), "--quiet"])
    warnings = [line for line in out.getvalue().splitlines() if line.strip().startswith(("warn:", "fail:"))]
    assert warnings
    assert any("psi difference" in line for line in warnings)
    assert not any("bar difference" in line or "bar(a)" in line for line in warnings), warnings


def test_shown_check_writes_a_phrase_in_us_units():
    check = {"name": "Inlet line pressure drop", "status": "warn", "detail": "1.37 bar difference per 100 m",
             "phrase": {"template": "{drop:.2f} per 100 m", "amounts": {
                 "drop": {"value": 1.371161311297632, "unit": "bar", "basis": "difference"}}}}
    assert shown_check(check, "US") == ("Inlet line pressure drop", "19.9 psi difference per 100 m")
    assert shown_check(check, "SI")[1] == "1.37 bar difference per 100 m"


def test_verify_prints_an_input_typed_in_degf_in_degf(tmp_path):
    site = _us_site(tmp_path / "site")
    case = site / "cases" / "LD-02.toml"
    case.write_text(case.read_text().replace('inlet_temperature = "230 degC"', 'inlet_temperature = "750 degF"'))
    with contextlib.redirect_stdout(io.StringIO()):
        main(["run", str(case), "--out", str(tmp_path / "records"), "--quiet"])
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        assert main(["verify", "--all", str(tmp_path / "records" / "LD-02_revB.json")]) == 0
    printed = out.getvalue()
    row = next(line for line in printed.splitlines() if line.strip().startswith("Inlet temperature "))
    assert re.search(r"\b750\s+750\s+°F\b", row), row             # 750 °F = 398.8889 °C, NIST SP 811
    assert "398.88889" not in printed
    table = printed[printed.index("result "):printed.index("(tolerance:")]
    assert not re.search(r"°C|kg/h|bar\(a\)|kJ/kg", table)
    assert "values in US customary units" in printed


def test_comparisons_shown_keeps_the_verdicts_and_si_records_as_they_are():
    from types import SimpleNamespace as C

    row = C(key="outlet_temperature", recorded=148.778, recomputed=148.779, unit="degC", abs_diff=0.001,
            rel_diff=6.7e-6, verdict="differs")
    record = {"kind": "letdown", "site": {"display_units": "SI"}, "results": {}}
    assert comparisons_shown([row], record) == ([row], record)
    (shown,), _ = comparisons_shown([row], dict(record, site={"display_units": "US"}))
    assert shown.verdict == "differs" and shown.rel_diff == 6.7e-6
    assert shown.recorded == pytest.approx(148.778 * 1.8 + 32) and shown.abs_diff == pytest.approx(0.0018)
    assert row.unit == "degC"                                     # the comparison itself is not changed


def test_written_units_are_read_back_for_pint():
    assert written_unit("psia") == ("psi", "absolute") and written_unit("dB(A)") == ("dB", "absolute")
