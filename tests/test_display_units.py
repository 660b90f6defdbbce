"""Display rules (steamcalc.render.display): units as people write them, figures per quantity, fractions in %,
money, yes/no, and the US customary display (°F, psia, Kv → Cv, DN → NPS) — the record never changes."""

import copy
import json
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.render.display import (CV_PER_KV, convert, display_record, format_number, nps_text, unit_label, us_text,
                               verify_table)
from steamcalc.records.record import load_record
from steamcalc.review.verify import verify_record

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"


@pytest.mark.parametrize("unit,basis,shown", [
    ("m**3/h", "absolute", "m³/h"), ("percent", "absolute", "%"), ("degC", "absolute", "°C"),
    ("kW/(m**2*K)", "absolute", "kW/(m²·K)"), ("bar", "absolute", "bar(a)"), ("bar", "difference", "bar difference"),
    ("kPa", "difference", "kPa difference"), ("psi", "absolute", "psia"), ("delta_degF", "absolute", "°F"),
    ("kJ/(kg*K)", "absolute", "kJ/(kg·K)"), ("m**2*K/kW", "absolute", "m²·K/kW"), ("mm**2", "absolute", "mm²"),
    ("kg/(m**2*s)", "absolute", "kg/(m²·s)"), ("Btu/(h*ft**2*delta_degF)", "absolute", "Btu/(h·ft²·°F)"),
    ("", "absolute", ""), ("EUR", "absolute", "EUR"),
])
def test_units_as_people_write_them(unit, basis, shown):
    assert unit_label(unit, basis) == shown


# Figures per quantity (common practice for calculation records): temperatures to 0.1 K, four
# significant figures otherwise, whole numbers with thousands separators from 1000, money whole.
@pytest.mark.parametrize("value,unit,shown", [
    (148.77848829869544, "degC", "148.8"), (10.0, "K", "10.0"), (62.263083, "K", "62.3"),
    (0.073837707, "", "0.07384"), (2865.6907, "kJ/kg", "2,866"), (4716.514, "kg/h", "4,717"),
    (216.51405, "kg/h", "216.5"), (0.52849267, "bar", "0.5285"), (16.991812, "bar", "16.99"),
    (48882.2387, "EUR", "48,882"), (139864.536, "EUR", "139,865"), (4597.97, "mm**2", "4,598"),
    (74.6206, "percent", "74.6"), (7.3838, "percent", "7.4"), (0.53, "percent", "0.53"), (10.0, "percent", "10"),
    (100.925944, "dB", "100.9"), (63.0, "m**3/h", "63"), (True, "", "yes"), (False, "", "no"), (None, "", "—"),
    ("DN80", "", "DN80"), (0.0, "kg/h", "0"),
])
def test_figures_per_quantity(value, unit, shown):
    assert format_number(value, unit) == shown


def test_inputs_keep_the_figures_the_user_gave():
    assert format_number(0.9, "", trim=True) == "0.9" and format_number(0.9, "") == "0.9000"


def test_kv_to_cv():
    # Cv = Kv × (1 m³/h in US gal/min) / √(1 bar in psi) = 1.156 Kv (IEC 60534-1: Kv = 0.865 Cv, from memory).
    assert CV_PER_KV == pytest.approx(1.156, abs=5e-4)
    assert 1 / CV_PER_KV == pytest.approx(0.865, abs=5e-4)
    assert convert(30.0, "m**3/h", "US", key="valve_kv")[0] == pytest.approx(34.68, abs=0.01)
    # A volume flow in m³/h (not a Kv) is US gal/min: 1 m³/h = 4.4029 gpm (US gallon 3.785411784 L, NIST SP 811).
    assert convert(1.0, "m**3/h", "US", key="condensate_volume_flow")[0] == pytest.approx(4.40287, rel=1e-5)


@pytest.mark.parametrize("dn,nps", [("DN15", "NPS ½"), ("DN25", "NPS 1"), ("DN40", "NPS 1½"), ("DN80", "NPS 3"),
                                    ("DN150", "NPS 6"), ("DN200", "NPS 8"), ("DN600", "NPS 24")])
def test_dn_to_nps(dn, nps):
    # ASME B36.10M: DN and NPS sizes share outside diameters (common practice equivalence).
    assert nps_text(f"the {dn} line") == f"the {nps} line"


@pytest.mark.parametrize("si,us", [
    ("h1 = h(16.99 bar(a), 230.00 °C)", "h1 = h(246.4 psia, 446.00 °F)"),
    ("x = (1546.3 − 349.2) kPa(a) / 1546.3 kPa(a)", "x = (224.27 − 50.65) psia / 224.27 psia"),
    ("T3 = 138.78 °C + 10.00 K", "T3 = 281.80 °F + 18.00 °F"),
    ("Kvs 63.00 m³/h ≥ required 30.81 m³/h", "Cvs 72.83 ≥ required 35.62"),
    ("Kv 31.2 and 65.5 m³/h, noise 97.7 and 96.0 dB(A) at 1 m", "Cv 36.1 and 75.7, noise 97.7 and 96.0 dB(A) at 3.3 ft"),
    ("Ẋ_d = 288.15 K × 1.2500 kg/s", "Ẋ_d = 518.67 °R × 2.7558 lb/s"),
    ("p_stall = 1.792 bar(a) + 10 kPa difference", "p_stall = 25.99 psia + 1.5 psi difference"),
    ("0.0 kPa(g) over 4.5 bar(g) in DN80", "0.0 psig over 65 psig in NPS 3"),
    ("residual 0.0e+00 (tolerance 1e-03); 55 % margin", "residual 0.0e+00 (tolerance 1e-03); 55 % margin"),
])
def test_texts_in_us_units(si, us):
    assert us_text(si) == us
    assert "bar" not in us and "kPa" not in us


@pytest.fixture(scope="module")
def records(tmp_path_factory):
    """The demo site run twice: SI and US display."""
    out = {}
    for system in ("SI", "US"):
        site = tmp_path_factory.mktemp(f"display_{system}") / "site"
        shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records"))
        text = (site / "site.toml").read_text().replace('display_units = "SI"', f'display_units = "{system}"')
        (site / "site.toml").write_text(text)
        main(["run", str(site / "cases"), "--quiet"])
        out[system] = site / "records"
    return out


def test_display_never_changes_the_record(records):
    record = load_record(records["US"] / "LD-01_revB.json")
    before = copy.deepcopy(record)
    display_record(record)
    assert record == before
    assert record["results"]["outlet_temperature"]["unit"] == "degC"


def test_fractions_the_trade_states_in_percent(records):
    flash = display_record(load_record(records["SI"] / "FL-01_revB.json"))
    assert (flash["results"]["flash_fraction"]["shown"], flash["results"]["flash_fraction"]["shown_unit"]) == \
        ("7.4", "%")
    heater = display_record(load_record(records["SI"] / "HX-01_revB.json"))
    assert heater["results"]["area_margin"]["shown_unit"] == "%"
    assert heater["results"]["stall_load_fraction"]["shown"] == "58.4"
    letdown = display_record(load_record(records["SI"] / "LD-01_revB.json"))
    assert letdown["results"]["valve_travel_normal"]["shown"] == "74.6" and letdown["inputs"]["overpressure"]["shown"] == "10"
    assert letdown["results"]["choked"]["shown"] == "yes"
    assert letdown["results"]["annual_recoverable_value"]["shown"] == "82,800"
    # The JSON keeps the fraction: 0.0738 of the condensate, not 7.4.
    assert load_record(records["SI"] / "FL-01_revB.json")["results"]["flash_fraction"]["value"] < 1


def test_co2_is_written_as_the_trade_writes_it(records):
    page = (records["SI"] / "FL-01_revB.html").read_text()
    assert "CO₂ a year" in page and "CO2" not in page


def test_us_display_covers_kv_nps_bands_and_steps(records):
    page = (records["US"] / "LD-01_revB.md").read_text()
    assert "| Required Cv (sized on the maximum flow) |" in page          # Kv → Cv in the results
    assert "| Inlet line: smallest size under 148 ft/s | NPS 3 |" in page  # DN → NPS and m/s → ft/s
    assert "| Outlet temperature | 299.8 | 297.3 | 299.8 | 302.2 | °F |" in page   # the band, in °F
    assert "`h1 = h(246.4 psia, 446.0 °F)`" in page                     # a step's substitution, from its operands
    # N6 = 3.16 keeps the units it holds in (kg/h, kPa, kg/m³), and the page says so.
    assert "kPa(a) × 7.171 kg/m³)) (in the units shown: the equation's constant is for them)`" in page
    assert "°R" not in page   # a superheat or a temperature difference is never written in rankine
    assert "Inlet temperature ± 9.0 °F" in page                          # a tolerance (a difference)
    shown = display_record(load_record(records["US"] / "LD-01_revB.json"))
    band = shown["uncertainty"]["bands"]["valve_kv"]
    assert band["label"].startswith("Required Cv") and band["shown_unit"] == ""


def test_us_reports_still_verify_and_match_their_json(records, capsys):
    for path in sorted(records["US"].glob("*.json")):
        assert main(["verify", str(path)]) == 0, path.name
    printed = capsys.readouterr().out
    assert printed.count("matches the JSON") == 2 * len(list((DEMO / "cases").glob("*.toml")))


def test_verify_table_has_a_unit_column_and_words(records):
    record = load_record(records["SI"] / "HX-01_revB.json")
    table = verify_table(verify_record(record).comparisons, record)
    header, *rows = table.splitlines()
    assert header.split() == ["result", "recorded", "recomputed", "unit", "abs.", "diff", "rel.", "diff",
                              "tolerance", "verdict", "key"]
    row = next(r for r in rows if r.strip().startswith("Service U (with fouling)"))
    assert "kW/(m²·K)" in row and row.rstrip().endswith("service_u")
    pressure = next(r for r in rows if r.strip().startswith("Static head of condensate at the trap"))
    assert "kPa difference" in pressure


def test_records_as_issued_are_unchanged_by_display(records):
    # Only rendering changes: the JSON holds record units; a fraction the trade states in % stays a plain fraction,
    # and every margin is kept in percent (one unit for margins, as the relief capacity margin is).
    record = json.loads((records["SI"] / "HX-01_revB.json").read_text())
    assert record["results"]["service_u"]["unit"] == "kW/(m**2*K)"
    assert record["results"]["stall_load_fraction"]["unit"] == "" and record["results"]["stall_load_fraction"]["value"] < 1
    margins = {key: entry["unit"] for key, entry in record["results"].items() if key.endswith("_margin")}
    assert margins and set(margins.values()) == {"percent"}, margins
