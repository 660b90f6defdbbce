"""Uncertainty bands: reproducibility, the rectangular distribution, the record section, bad tolerances."""

import json
import math
import shutil

import pytest

from steamcalc.calcs.letdown import calculation as letdown
from steamcalc.cli import main
from steamcalc.errors import SteamcalcError
from steamcalc.records.record import load_record
from steamcalc.cases.site import Site
from steamcalc.runs.uncertainty import Tolerance, parse_coverage, parse_tolerances, run_uncertainty, sample_check

SITE = Site()
INPUTS = letdown.Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15)


def test_seeded_runs_are_reproducible():
    tolerances = (Tolerance("inlet_pressure", 0.3e5, False, "0.3 bar"), Tolerance("mass_flow", 0.05, True, "5 %"))
    a = run_uncertainty(letdown, INPUTS, SITE, tolerances, samples=300, seed=7)
    b = run_uncertainty(letdown, INPUTS, SITE, tolerances, samples=300, seed=7)
    c = run_uncertainty(letdown, INPUTS, SITE, tolerances, samples=300, seed=8)
    assert a == b
    assert a["bands"] != c["bands"]


def test_rectangular_distribution_standard_deviation():
    # JCGM 100:2008 4.3.7: a quantity known only to lie within ±a has u = a / sqrt(3).
    # recoverable_power is proportional to the flow, so its spread is the flow's.
    section = run_uncertainty(letdown, INPUTS, SITE, (Tolerance("mass_flow", 0.05, True, "5 %"),), samples=4000)
    band = section["bands"]["recoverable_power"]
    assert band["std"] == pytest.approx(band["nominal"] * 0.05 / math.sqrt(3), rel=0.05)
    assert band["p05"] < band["nominal"] < band["p95"]
    assert band["p05"] == pytest.approx(band["nominal"] * (1 - 0.045), rel=0.01)   # 5th percentile at -0.9 a


def test_sensitivity_names_the_dominant_input():
    tolerances = (Tolerance("inlet_temperature", 5.0, False, "5 K"), Tolerance("mass_flow", 0.001, True, "0.1 %"))
    section = run_uncertainty(letdown, INPUTS, SITE, tolerances, samples=200)
    assert section["sensitivity"]["throttled_temperature"][0]["input"] == "inlet_temperature"
    assert "most sensitive to inlet temperature" in " ".join(section["summary"])


def test_failed_samples_are_counted_not_hidden():
    # A tolerance wide enough that some samples put the outlet above the inlet.
    near = letdown.Inputs(inlet_pressure=5e5, outlet_pressure=4.8e5, mass_flow=1.0, inlet_temperature=503.15)
    section = run_uncertainty(letdown, near, SITE, (Tolerance("outlet_pressure", 0.5e5, False, "0.5 bar"),),
                              samples=200)
    assert 0 < section["valid_samples"] < 200
    assert sum(section["failed_samples"].values()) == 200 - section["valid_samples"]
    assert section["failed_sample_count"] == 200 - section["valid_samples"]
    assert "samples gave no result" in section["summary"][-1]
    # More than 1 % of the samples without a result is a warn, naming how many and why.
    name, status, detail = sample_check(section)
    assert status == "warn" and f"{section['failed_sample_count']} of 200" in detail


@pytest.mark.parametrize("failed,status", [(0, "pass"), (20, "pass"), (21, "warn")])
def test_sample_check_warns_above_one_percent(failed, status):
    section = {"samples": 2000, "failed_sample_count": failed, "failed_samples": {"outlet above inlet": failed}}
    assert sample_check(section)[1] == status


def test_band_is_the_90_percent_coverage_interval_by_default():
    tolerances = (Tolerance("inlet_temperature", 5.0, False, "5 K"),)
    section = run_uncertainty(letdown, INPUTS, SITE, tolerances, samples=400, seed=3)
    band = section["bands"]["throttled_temperature"]
    assert section["coverage"] == 0.90 and band["samples"] == 400
    assert band["low"] == band["p05"] and band["high"] == band["p95"]
    assert "90 % coverage interval" in section["summary"][0]
    assert section["property_engine"]["library"] == "seuif97"


def test_case_chosen_coverage_widens_the_band():
    tolerances = (Tolerance("inlet_temperature", 5.0, False, "5 K"),)
    narrow = run_uncertainty(letdown, INPUTS, SITE, tolerances, samples=400, seed=3)
    wide = run_uncertainty(letdown, INPUTS, SITE, tolerances, samples=400, seed=3, coverage=0.95)
    a, b = narrow["bands"]["throttled_temperature"], wide["bands"]["throttled_temperature"]
    assert b["low"] < a["low"] and b["high"] > a["high"] and b["p05"] == a["p05"]
    assert "95 % coverage interval" in wide["summary"][0]


@pytest.mark.parametrize("raw,value", [(0.95, 0.95), ("95 %", 0.95), ("80%", 0.8)])
def test_coverage_setting(raw, value):
    assert parse_coverage({"coverage": raw}) == pytest.approx(value)


@pytest.mark.parametrize("raw", [1.0, 0.2, "high", True])
def test_bad_coverage_is_refused(raw):
    with pytest.raises(SteamcalcError) as info:
        parse_tolerances(letdown.Inputs, {"mass_flow": "5 %", "coverage": raw}, INPUTS)
    assert info.value.field == "uncertainty.coverage"


def test_samples_run_on_the_fast_engine_and_the_nominal_on_the_reference():
    from steamcalc.properties.engines import current_engine
    seen = []
    real = letdown.calculate

    def spy(inputs, site):
        seen.append(current_engine())
        return real(inputs, site)

    class Calc:
        Inputs, UNCERTAINTY_RESULTS, calculate = letdown.Inputs, letdown.UNCERTAINTY_RESULTS, staticmethod(spy)

    run_uncertainty(Calc, INPUTS, SITE, (Tolerance("mass_flow", 0.05, True, "5 %"),), samples=20)
    assert seen[0] == "iapws" and set(seen[1:]) == {"fast"} and current_engine() == "iapws"


@pytest.mark.parametrize("table,text", [
    ({"inlet_pressure": "0.3 bar(g)"}, "no gauge or absolute basis"),
    ({"inlet_temperature": "5 degC"}, "difference"),
    ({"inlet_superheat": "5 K"}, "does not give"),
    ({"schedule": "1"}, "cannot take a tolerance"),
    ({"mass_flow": "-5 %"}, "must be above zero"),
    ({"mass_flow": "5 m"}, "not a mass flow"),
    ({"mass_flow": "5 %", "samples": 5}, "samples"),
])
def test_bad_tolerances(table, text):
    with pytest.raises(SteamcalcError) as info:
        parse_tolerances(letdown.Inputs, table, INPUTS)
    assert text in str(info.value)


def test_ld01_record_carries_uncertainty_and_reverifies(tmp_path, demo_site_dir, capsys):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases" / "LD-01.toml")]) == 0
    path = site / "records" / "LD-01_revB.json"
    record = load_record(path)
    section = record["uncertainty"]
    assert section["samples"] == 2000 and section["valid_samples"] == 2000
    check = next(c for c in record["checks"] if c["name"] == "Uncertainty samples")
    assert (check["status"], check["detail"]) == ("pass", "all 2000 samples gave a result")
    # Kept as data: the share of samples without a result against the 1 % above which it warns.
    assert check["kind"] == "limit" and check["quantity"] == {"value": 0.0, "unit": "percent"}
    assert check["limits"] == [{"comparison": "<=", "limit": {"value": 1.0, "unit": "percent"}, "breach": "warn"}]
    assert any(line.startswith("outlet temperature") and "most sensitive to" in line for line in section["summary"])
    assert "Uncertainty" in (site / "records" / "LD-01_revB.html").read_text()
    capsys.readouterr()
    assert main(["verify", "--all", str(path)]) == 0
    assert "uncertainty.outlet_temperature.p95" in capsys.readouterr().out
    # An edited band is caught twice: by the digest and by the recomputation.
    record["uncertainty"]["bands"]["outlet_temperature"]["p95"] += 1.0
    path.write_text(json.dumps(record))
    assert main(["verify", str(path)]) == 1
    out = capsys.readouterr().out
    assert "EDITED" in out and "uncertainty.outlet_temperature.p95" in out and "differs" in out


def test_unknown_uncertainty_key_in_case_file_exits_2(tmp_path, demo_site_dir, capsys):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    case = site / "cases" / "LD-01.toml"
    case.write_text(case.read_text().replace('mass_flow = "5 %"', 'mass_flwo = "5 %"'))
    assert main(["run", str(case)]) == 2
    assert "mass_flwo" in capsys.readouterr().err


def test_a_record_whose_samples_partly_fail_verifies_as_issued(tmp_path, demo_site_dir, capsys):
    # run and verify add the samples' check (and its warning) the same way: a widened flow tolerance
    # whose samples partly give no result issued, then failed its own verify ("warnings: not issued").
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    case = site / "cases" / "LD-01.toml"
    case.write_text(case.read_text().replace('mass_flow = "5 %"', 'mass_flow = "90 %"'))
    assert main(["run", str(case)]) == 0
    record = load_record(site / "records" / "LD-01_revB.json")
    assert any(w.startswith("Uncertainty samples:") for w in record["warnings"])
    capsys.readouterr()
    assert main(["verify", str(site / "records" / "LD-01_revB.json")]) == 0
    assert "verdict: VERIFIED" in capsys.readouterr().out
