"""A line's pressure gradient is a quantity of its own: recorded in bar difference per 100 m, shown in US views
in psi difference per 100 ft, converted by pint — never a psi difference beside "per 100 m".

Check values are worked by hand from the unit definitions (NIST SP 811 (2008), Appendix B: 1 psi =
6894.757 Pa, 1 ft = 0.3048 m exactly; 1 bar = 10⁵ Pa exactly), written beside each row.
"""

import re
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.records.record import load_record
from steamcalc.render.display import shown_check, us_text, written_unit
from steamcalc.units.amounts import Amount
from steamcalc.units.formatting import unit_label
from steamcalc.units.quantities import Q_, to_record_unit

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "workbooks" / "demo_site"

GRADIENT_CONVERSIONS = [
    # (value, unit, to, expected, digits, source)
    (0.5, "bar_per_100m", "psi_per_100ft", 2.2104, 4,
     "NIST SP 811 B.8 via pint; by hand 0.5 × (10⁵/6894.757 = 14.5038) × 0.3048 = 2.2104"),
    (2.114, "bar_per_100m", "psi_per_100ft", 9.345, 3,
     "NIST SP 811 B.8 via pint; by hand 2.114 × 14.5038 × 0.3048 = 9.345"),
    (1.0, "bar_per_100m", "Pa/m", 1000.0, 9, "definition of the bar: 10⁵ Pa / 100 m = 1000 Pa/m"),
    (1.0, "psi_per_100ft", "Pa/m", 226.2, 1, "NIST SP 811 B.8; by hand 6894.757 / 30.48 = 226.206 Pa/m"),
]


@pytest.mark.parametrize("value,unit,to,expected,digits,source", GRADIENT_CONVERSIONS,
                         ids=[f"{r[0]} {r[1]} to {r[2]}" for r in GRADIENT_CONVERSIONS])
def test_gradient_conversions_nist_sp811(value, unit, to, expected, digits, source):
    assert round(Q_(value, unit).to(to).magnitude, digits) == expected, source


def test_a_gradient_is_recorded_from_pascals_per_metre():
    assert to_record_unit(500.0, "pressure_gradient") == pytest.approx(0.5, rel=1e-12)   # 500 Pa/m = 0.5 bar / 100 m


def test_a_gradient_reads_as_one_unit_in_each_system():
    gradient = Amount(0.5, "bar_per_100m")
    assert gradient.shown("SI", "g") == "0.5 bar difference per 100 m"
    assert gradient.shown("US", "g") == "2.21 psi difference per 100 ft"     # 2.2104, three figures at least
    assert unit_label("bar_per_100m") == "bar difference per 100 m"
    assert written_unit("bar difference per 100 m") == ("bar_per_100m", "absolute")
    assert written_unit("psi difference per 100 ft") == ("psi_per_100ft", "absolute")
    # A text written by an earlier release (an assumption, a schema-1 check) converts as a gradient too.
    assert us_text("limit 0.5 bar difference per 100 m") == "limit 2.2 psi difference per 100 ft"


def test_a_new_line_check_writes_its_gradient_and_limit_as_gradients():
    check = {"name": "Inlet line pressure drop", "status": "warn", "phrase": {
        "template": "{gradient:.2f} in DN80 exceeds {limit:g} (common practice)", "amounts": {
            "gradient": {"value": 2.114, "unit": "bar_per_100m"}, "limit": {"value": 0.5, "unit": "bar_per_100m"}}}}
    assert shown_check(check, "US")[1] == ("9.35 psi difference per 100 ft in NPS 3 exceeds 2.21 psi difference per "
                                           "100 ft (common practice)")


def _site(folder, system):
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    site = folder / "site.toml"
    site.write_text(site.read_text().replace('display_units = "SI"', f'display_units = "{system}"'))
    return folder


@pytest.fixture(scope="module")
def records(tmp_path_factory):
    made = {}
    for system in ("SI", "US"):
        site = _site(tmp_path_factory.mktemp(system) / "site", system)
        for case in ("LD-01", "HX-01", "SM-01"):   # SM-01 takes its steam flow from HX-01's record
            assert main(["run", str(site / "cases" / f"{case}.toml"), "--out", str(site / "records"), "--quiet"]) == 0
        made[system] = site / "records"
    return made


def _texts(folder, stem):
    page = re.sub(r"<[^>]+>", " ", (folder / f"{stem}.html").read_text(encoding="utf-8"))
    return [(folder / f"{stem}.md").read_text(encoding="utf-8"), page]


@pytest.mark.parametrize("stem", ["LD-01_revB", "SM-01_revA"])
def test_the_us_record_writes_gradients_per_100_ft(records, stem):
    for text in _texts(records["US"], stem):
        assert "psi difference per 100 ft" in text
        assert "per 100 m" not in text and "bar difference" not in text


@pytest.mark.parametrize("stem", ["LD-01_revB", "SM-01_revA"])
def test_the_si_record_writes_gradients_per_100_m(records, stem):
    for text in _texts(records["SI"], stem):
        assert "bar difference per 100 m" in text and "per 100 ft" not in text


def test_the_letdown_records_its_gradients_in_their_unit(records):
    record = load_record(records["SI"] / "LD-01_revB.json")
    inlet = record["results"]["inlet_line_pressure_drop_per_100m"]
    assert inlet["unit"] == "bar_per_100m" and inlet["label"] == "Inlet line pressure gradient"
    check = next(c for c in record["checks"] if c["name"] == "Inlet line pressure drop")
    amounts = check["phrase"]["amounts"]
    assert amounts["gradient"]["unit"] == amounts["limit"]["unit"] == "bar_per_100m"
    assert amounts["gradient"]["value"] == pytest.approx(inlet["value"], rel=1e-12)


def test_the_main_checks_its_gradient_against_a_gradient(records):
    record = load_record(records["SI"] / "SM-01_revA.json")
    check = next(c for c in record["checks"] if c["name"] == "Main pressure gradient")
    assert check["quantity"]["unit"] == "bar_per_100m"
    assert [limit["limit"] for limit in check["limits"]] == [{"value": 0.5, "unit": "bar_per_100m"}]
    # Hand arithmetic on the record's own results: drop (bar difference) / length (m) × 100 m.
    results = record["results"]
    assert check["quantity"]["value"] == pytest.approx(
        results["main_pressure_drop"]["value"] / results["main_length"]["value"] * 100.0, rel=1e-9)


def test_an_earlier_release_record_lists_the_gradient_as_a_declared_change(tmp_path, capsys):
    record = ROOT / "tests" / "archive" / "v0_2" / "LD-01_revA.json"
    for companion in record.parent.glob("LD-01_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    assert main(["verify", str(tmp_path / record.name)]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said and "DIFFERS" not in said
    assert "changed  inlet_line_pressure_drop_per_100m" in said
    assert "changed by release 0.3 (a line's pressure gradient is a quantity of its own" in said


def test_the_workbook_lines_table_converts_the_gradient_column():
    from steamcalc.ui.charts import shown_rows

    rows = [{"line": "inlet line", "pressure gradient, bar difference per 100 m": 2.114}]
    (us,) = shown_rows(rows, "US")
    # NIST SP 811 via pint; by hand 2.114 × 14.5038 × 0.3048 = 9.345
    assert us["pressure gradient, psi difference per 100 ft"] == pytest.approx(9.345, abs=5e-4)
