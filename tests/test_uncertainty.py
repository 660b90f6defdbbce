"""Uncertainty bands: reproducibility, the rectangular distribution, the record section, bad tolerances."""

import json
import math
import shutil

import pytest

from steamcalc.calcs import letdown
from steamcalc.cli import main
from steamcalc.errors import SteamcalcError
from steamcalc.record import load_record
from steamcalc.site import Site
from steamcalc.uncertainty import Tolerance, parse_tolerances, run_uncertainty

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
    assert "samples gave no result" in section["summary"][-1]


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
    path = site / "records" / "LD-01_revA.json"
    record = load_record(path)
    section = record["uncertainty"]
    assert section["samples"] == 2000 and section["valid_samples"] == 2000
    assert any(line.startswith("outlet temperature") and "most sensitive to" in line for line in section["summary"])
    assert "Uncertainty" in (site / "records" / "LD-01_revA.html").read_text()
    capsys.readouterr()
    assert main(["verify", str(path)]) == 0
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
