"""Figures as data: computed by the calculation, recomputed by verify, compared by diff, never stopping a record."""

import json
import shutil

import pytest

from steamcalc.calcs.base import Figure, figure_or_missing
from steamcalc.cli import main
from tests.case_helpers import forged_copy


@pytest.fixture
def issued(tmp_path, demo_site_dir):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases" / "LD-01.toml"), "--quiet"]) == 0
    return site / "records" / "LD-01_revB.json"


@pytest.mark.parametrize("edit", [
    lambda r: r["figures"][1]["series"][0]["y"].__setitem__(10, 18.2),
    lambda r: r["figures"][2]["series"][2].update(y=[95.0, 95.0]),
    lambda r: r["figures"][0]["series"][1].update(name="outlet pressure isobar"),
    lambda r: r["figures"].reverse(),
    lambda r: r["figures"].__setitem__(2, {"name": "noise", "title": r["figures"][2]["title"], "missing": "not drawn"}),
], ids=["a Kv point", "the noise limit", "a series name", "the order", "marked missing"])
def test_forged_figure_data_fails_verify(issued, tmp_path, capsys, edit):
    forged = forged_copy(issued, edit, tmp_path)
    capsys.readouterr()
    assert main(["verify", str(forged)]) == 1
    said = capsys.readouterr().out
    assert "integrity: intact" in said and "verdict: FAILED" in said


def test_diff_shows_a_changed_figure(issued, tmp_path, capsys):
    forged = forged_copy(issued, lambda r: r["figures"][1]["series"][0]["y"].__setitem__(10, 18.2), tmp_path)
    capsys.readouterr()
    assert main(["diff", str(issued), str(forged)]) == 0
    said = capsys.readouterr().out
    assert "Figures (their data)" in said and "first difference at series[0].y[10]" in said


def test_a_fault_in_figure_code_marks_the_figure_missing_not_the_record():
    def broken():
        raise KeyError("valve_kv_maximum")

    figure = figure_or_missing("noise", "Noise", broken)
    assert isinstance(figure, Figure) and "fault in steamcalc's figure code (KeyError" in figure.missing


def test_a_supercritical_let_down_is_issued_without_a_superheat(tmp_path, capsys):
    # The superheat of water above the critical pressure is not defined: no result, an assumption says so.
    case = tmp_path / "LD-SC.toml"
    case.write_text('[case]\nkind = "letdown"\nid = "LD-SC"\ntitle = "t"\nrevision = "A"\nprepared_by = "x"\n\n'
                    '[inputs]\ninlet_pressure = "221 bar(a)"\ninlet_temperature = "560 degC"\n'
                    'outlet_pressure = "40 bar(a)"\nmass_flow = "10 t/h"\n', encoding="utf-8")
    assert main(["run", str(case), "--out", str(tmp_path / "out"), "--quiet"]) in (0, 1)
    record = json.loads((tmp_path / "out" / "LD-SC_revA.json").read_text(encoding="utf-8"))
    assert "inlet_superheat" not in record["results"]
    assert any(a.startswith("Inlet superheat: not defined") for a in record["assumptions"])
    assert main(["verify", str(tmp_path / "out" / "LD-SC_revA.json")]) == 0
