"""A US site (the demo site with display_units = "US") in US units where the first pass left SI: the HTML
record's chart titles and band notes, the workbook's text summary, the process sketch, a refusal naming a
header box, the site-balance workbook and the steam-main record's texts. The JSON record stays in SI.

Conversions are pint's; check values are worked from the unit definitions (NIST SP 811: 1 ft = 0.3048 m,
1 lb = 0.45359237 kg, 1 psi = 6894.757 Pa, 1 Btu_IT = 1055.05585262 J, °F = 1.8·°C + 32) beside each check.
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
from steamcalc.render.display import display_record
from steamcalc.render.figure_spec import band_notes, figure_spec, figure_title
from steamcalc.render.sketch import sketch_svg
from steamcalc.ui.forms import given_in_box_units
from steamcalc.ui.site_balance import BalanceBook
from steamcalc.ui.workbook import Workbook

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"

#: SI units as views write them: none may be left in a US view.
SI_WRITTEN = re.compile(r"kg/h|\bbar\b|bar\(a\)|bar difference|°C|kJ/kg|m³/h|\bKv\b|\bDN\d|\bm/s\b|mm²|\bkW\b|W/m")
FT = 0.3048            # m, NIST SP 811
LB = 0.45359237        # kg, NIST SP 811
PSI = 6894.757293168   # Pa, NIST SP 811
BTU = 1055.05585262    # J (international table Btu), NIST SP 811


@pytest.fixture(scope="module")
def us_site(tmp_path_factory):
    folder = tmp_path_factory.mktemp("us_more") / "site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    site = folder / "site.toml"
    site.write_text(site.read_text().replace('display_units = "SI"', 'display_units = "US"'))
    return folder


@pytest.fixture(scope="module")
def us_records(us_site, tmp_path_factory):
    out = tmp_path_factory.mktemp("us_more_records")
    with contextlib.redirect_stdout(io.StringIO()):
        main(["run", str(us_site / "cases"), "--out", str(out), "--quiet"])
    return out


def _text(markup):
    return re.sub(r"\s+", " ", html.unescape(re.sub(r"<[^>]+>", " ", markup)))


# (a) chart titles, axes and band notes of the HTML record ---------------------------------------------------

def test_the_html_charts_of_a_us_letdown_say_cv_and_us_units_while_the_figure_data_stays_si(us_records):
    page = (us_records / "LD-01_revB.html").read_text()
    svgs = re.findall(r"<svg.*?</svg>", page, flags=re.S)
    charts = [_text(svg) for svg in svgs if "Kv" in svg or "Cv" in svg or "flow" in svg]
    assert any("required Cv and travel against flow" in chart for chart in charts)
    for svg in svgs:
        assert not SI_WRITTEN.findall(_text(svg)), SI_WRITTEN.findall(_text(svg))[:5]
    headings = re.findall(r"Chart \d+: ([^<(]*)", page)
    assert headings and not any("Kv" in heading for heading in headings), headings
    record = json.loads((us_records / "LD-01_revB.json").read_text())
    valve = next(f for f in record["figures"] if "Kv" in f["title"])   # the record keeps its own title, in SI
    assert valve["axes"]["x"]["unit"] == "kg/h" and valve["axes"]["y"]["unit"] == "m**3/h"


def test_figure_title_and_band_notes_in_us():
    figure = {"title": "Control valve: required Kv and travel against flow",
              "bands": [{"axis": "y", "low": 1.0, "high": 2.0, "label": "outlet between 3.5 bar(a) and 4 bar(a)"}]}
    assert figure_title(figure, "US") == "Control valve: required Cv and travel against flow"
    assert figure_title(figure, "SI") == figure["title"]
    assert band_notes(figure, "US") == ["outlet between 51 psia and 58 psia"]   # 3.5e5/6894.757 = 50.8, 2 figures
    assert band_notes(figure) == ["outlet between 3.5 bar(a) and 4 bar(a)"]


def test_a_heat_loss_per_length_is_drawn_in_btu_per_hour_foot(us_records):
    record = json.loads((us_records / "SM-01_revA.json").read_text())
    figure = next(f for f in record["figures"] if f["axes"]["y"]["unit"] == "W/m")
    spec = figure_spec(figure, "US")
    assert spec["layout"]["yaxis"]["title"]["text"] == "heat loss, Btu/(h·ft)"
    per_w_per_m = 3600.0 / BTU * FT                                    # 1 W/m = 1.04002 Btu/(h·ft), NIST SP 811
    # pint's Btu is 1055.056 J (ISO 31-4's rounding of the international table Btu): agreement to 1e-6
    assert spec["data"][0]["y"][0] == pytest.approx(figure["series"][0]["y"][0] * per_w_per_m, rel=1e-6)


# (b) the workbook's text summary ----------------------------------------------------------------------------

@pytest.mark.parametrize("case", ["LD-01", "FL-01", "HX-01", "SM-01"])
def test_the_workbook_summary_is_in_us_units(us_site, tmp_path, case):
    summary = Workbook(us_site / "cases" / f"{case}.toml", tmp_path).summary(compute_bands=False)
    assert not SI_WRITTEN.findall(summary), [line for line in summary.splitlines() if SI_WRITTEN.search(line)][:5]
    assert "psia" in summary or "lb/h" in summary


# (c) the process sketch ---------------------------------------------------------------------------------------

@pytest.mark.parametrize("record_file", ["LD-01_revB.json", "FL-01_revB.json", "HX-01_revB.json"])
def test_the_sketch_reads_in_us_units(us_records, record_file):
    record = json.loads((us_records / record_file).read_text())
    drawn = _text(sketch_svg(record))
    assert not SI_WRITTEN.findall(drawn) and not re.search(r"\d m\b", drawn), drawn


def test_the_flash_vessel_diameter_in_the_sketch_is_in_feet(us_records):
    record = json.loads((us_records / "FL-01_revB.json").read_text())
    diameter = record["results"]["vessel_diameter"]
    assert diameter["unit"] == "m"
    shown = re.search(r"Ø ([\d.]+) ft", _text(sketch_svg(record)))
    assert float(shown.group(1)) == pytest.approx(diameter["value"] / FT, rel=5e-4)       # 1 ft = 0.3048 m
    si = dict(record, site=dict(record["site"], display_units="SI"))
    assert re.search(r"Ø [\d.]+ m\b", _text(sketch_svg(si)))


# (d) a header box in a refusal ---------------------------------------------------------------------------------

def test_a_header_value_in_a_refusal_is_in_psia_on_a_us_site():
    assert given_in_box_units(1499181.23, "pressure", "header:HP", "US") == "header:HP, 217.4 psia"   # /6894.757
    assert given_in_box_units(1499181.23, "pressure", "header:HP") == "header:HP, 14.99 bar(a)"
    assert given_in_box_units(1499181.23, "pressure", "14 bar(g)", "US") == "14 bar(g)"   # as typed


def test_a_refusal_on_a_header_box_writes_its_pressures_in_psia(us_site, tmp_path):
    workbook = Workbook(us_site / "cases" / "LD-01.toml", tmp_path)
    workbook.form.boxes["inlet_pressure"].value = "header:LP"
    error = workbook.error
    assert error and "header:LP" in error
    assert "bar(a)" not in error and "psia" in error, error
    typed_elsewhere = re.sub(r"\([^()]*bar\(g\)\)", "", error)        # what the user typed stays as typed
    assert not SI_WRITTEN.findall(typed_elsewhere), error
    conflict = _text("".join(message.value for message in workbook.form.messages.values()))
    assert "psia" in conflict and "bar(a)" not in conflict


def test_a_refusal_on_an_si_site_keeps_bar():
    from steamcalc.calcs import get_calculation
    from steamcalc.ui.wording import FormWords

    words = FormWords(get_calculation("letdown").Inputs)
    assert words.quantities("the inlet pressure 3.492 bar(a)") == "the inlet pressure 3.492 bar(a)"
    us = FormWords(get_calculation("letdown").Inputs, "US")
    assert us.quantities("the inlet pressure 3.492 bar(a)") == "the inlet pressure 50.65 psia"   # 3.492e5 / 6894.757


# the two new kinds ----------------------------------------------------------------------------------------------

def test_the_balance_workbook_is_in_us_units(us_site, us_records):
    book = BalanceBook(us_site / "cases" / "SB-01.toml", us_records)
    assert book.error is None and book.system == "US"
    summary, headers = book.summary(), book.headers()
    assert "boiler steam, lb/h" in summary.columns and "fuel input, Btu/h" in summary.columns
    assert "temperature, °F" in headers.columns and "vent, lb/h" in headers.columns
    record = json.loads((us_records / "SB-01_revA.json").read_text())
    case = book.load_cases()[0]
    boiler = record["results"][f"{case}.boiler_steam_flow"]
    assert boiler["unit"] == "kg/h"
    assert summary.loc[case, "boiler steam, lb/h"] == pytest.approx(boiler["value"] / LB, rel=1e-12)
    temperature = record["results"][f"{case}.HP.temperature"]["value"]
    assert headers.loc[(case, "HP"), "temperature, °F"] == pytest.approx(temperature * 1.8 + 32, rel=1e-12)
    checks = " ".join(book.checks()["detail"]) + " ".join(book.checks()["check"])
    assert not SI_WRITTEN.findall(checks) and "lb/h" in checks
    comparison = book.comparison()
    assert not any(unit in ("m³", "t") for unit in comparison["unit"])
    sankey = book.sankey(case)
    assert "lb/h" in sankey.layout.title.text and "kg/h" not in sankey.data[0].link.hovertemplate


def test_the_steam_main_record_writes_its_texts_in_us_units(us_records):
    record = json.loads((us_records / "SM-01_revA.json").read_text())
    shown = display_record(record)
    atmosphere = next(a for a in shown["assumptions"] if "site atmosphere" in a)
    assert "psia" in atmosphere and "bar(a)" not in atmosphere
    texts = [entry["shown"] for entry in shown["results"].values() if isinstance(entry.get("shown"), str)
             and "deep" in entry["shown"]]
    assert texts and all(" in deep" in text and "mm" not in text for text in texts), texts
    conductivity = next(entry for key, entry in shown["inputs"].items() if key.startswith("conductivity"))
    assert conductivity["shown_unit"] == "Btu/(h·ft·°F)"
    assert record["inputs"]["segments"]["value"] == json.loads((us_records / "SM-01_revA.json").read_text())[
        "inputs"]["segments"]["value"]                                 # the record itself is not changed
    segments = shown["inputs"]["segments"]["shown"]
    assert "DN" not in segments and not re.search(r'"[\d.]+ m"', segments), segments


def test_nps_sizes_with_their_dn_beside_them_are_said_once_in_us(us_site, tmp_path):
    summary = Workbook(us_site / "cases" / "HX-01.toml", tmp_path).summary(compute_bands=False)
    relief = next(line for line in summary.splitlines() if "Thermal relief: minimum size" in line)
    assert "NPS 3/4 × NPS 1 (common practice)" in relief and "(NPS" not in relief, relief


def test_us_form_examples_are_us_units_that_read_back_to_the_si_example():
    """A US form's placeholders show US units (psig, °F, lb/h, ft...), each typeable, each the SI example's
    quantity to its three significant figures (conversion factors: NIST SP 811 through pint)."""
    from steamcalc.calcs import get_calculation, kinds
    from steamcalc.calcs.base import input_fields
    from steamcalc.ui.forms import example_in
    from steamcalc.units.quantities import parse_pressure, parse_quantity

    def read(text, kind):
        return parse_pressure(text, "example") if kind == "pressure" else parse_quantity(text, "example", kind)

    shown = 0
    for kind_name in kinds():
        for f in input_fields(get_calculation(kind_name).Inputs):
            kind, example = f.metadata["kind"], str(f.metadata["example"])
            us = example_in(example, kind, "US")
            if us == example:
                continue
            shown += 1
            assert not any(si in us for si in ("bar", "°C", "t/h", "kg", " m", "kW")), us
            assert read(us, kind) == pytest.approx(read(example, kind), rel=5e-3, abs=700.0), (example, us)
    assert shown >= 40


def test_fuel_energy_is_shown_in_million_btu_on_a_us_site():
    """1 MWh = 3.412142 MMBtu (NIST SP 811, B.9: 1 Btu_IT = 1.05505585262 kJ); the balance's yearly fuel in MMBtu.
    pint's Btu is that value rounded to 1055.056 J (1.4e-7 apart), hence the tolerance."""
    from steamcalc.units.formatting import US_UNITS
    from steamcalc.units.quantities import Q_

    assert US_UNITS["MWh"] == "MMBtu"
    assert Q_(1.0, "MWh").to("MMBtu").magnitude == pytest.approx(3.6e9 / 1.05505585262e9, rel=1e-6)
