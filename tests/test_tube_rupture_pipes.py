"""The heater's tube-rupture valves' pipes, release 0.3.2: the forward valve warns of a discharge pipe narrower than
the valve's outlet, as the let-down's relief valve and the reverse valve do (before, it passed silently); the reverse
valve states its discharge and inlet pipes not assessed when they are not given, as the forward valve does (before,
it said nothing of them).

Sources: API 526 (orifice letters and valve sizes): the smallest outlet paired with each letter as tabulated in the
Valve Selection Handbook, Table 5-1 (the Q orifice: 6Q8, an NPS 8 outlet, DN200); a pipe at least the valve's outlet
size is common practice (the valve makers' installation instructions govern); the inlet loss within 3 % of the gauge
set pressure, API 520 Part II (inlet piping). The records of release 0.3.1 in tests/archive/v0_3_1_bases were issued
by that release's code (commit 5d3eda1) from the case files beside them.
"""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.calcs.exchanger.calculation import NARROW_OUTLET_CHECK, REVERSE_NAME, Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.cli import main
from steamcalc.review.verify import verify_file

from .case_helpers import forged_copy
from .test_liquid_to_exit import HEATER

ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_3_1_bases"
CHANGE = "changed by release 0.3.2"


def _outlet_checks(size, outlet_celsius=95.0):
    result = calculate(Inputs(**dict(HEATER, discharge_size=size), process_outlet_temperature=273.15 + outlet_celsius),
                       Site())
    assert result.value("tube_rupture_orifice") == "Q"
    return [c for c in result.checks if c.name == NARROW_OUTLET_CHECK]


@pytest.mark.parametrize("size, warned", [("DN100", True), ("DN150", True), ("DN200", False), ("DN300", False)])
def test_a_pipe_narrower_than_the_q_orifices_dn200_outlet_is_warned_of(size, warned):
    checks = _outlet_checks(size)
    assert [c.status for c in checks] == (["warn"] if warned else [])
    if warned:
        assert f"the outlet pipe {size} (given), on the valve's outlet DN200" in checks[0].detail


def test_a_0_3_1_record_with_a_narrow_pipe_verifies_and_names_the_change(tmp_path, capsys):
    for companion in ARCHIVE.glob("HX-NO_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    record = json.loads((tmp_path / "HX-NO_revA.json").read_text("utf-8"))
    assert record["provenance"]["steamcalc"] == "0.3.1"
    assert not any(c["name"] == NARROW_OUTLET_CHECK for c in record["checks"])
    assert main(["verify", str(tmp_path / "HX-NO_revA.json")]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said and CHANGE in said and "narrower than the outlet API 526 pairs" in said


def test_a_0_3_1_record_with_a_wide_pipe_gets_no_allowance_for_a_planted_warning(tmp_path, capsys):
    """The change applies only where the recomputation warns: a warning of a narrow pipe planted in a record whose
    pipe is wide (its digests recomputed) is a difference."""
    case = tmp_path / "HX-NW.toml"
    case.write_text((ARCHIVE / "HX-NO.toml").read_text("utf-8").replace('id = "HX-NO"', 'id = "HX-NW"')
                    .replace('"DN150"', '"DN200"'))
    assert main(["run", str(case), "--out", str(tmp_path / "out")]) in (0, 1)
    capsys.readouterr()
    planted = (f"{NARROW_OUTLET_CHECK}: the outlet pipe DN150 (given) is narrower than the valve's outlet: run it "
               "at the outlet size or larger")

    def edit(record):
        record["provenance"]["steamcalc"] = "0.3.1"
        record["warnings"].append(planted)
    forged = forged_copy(tmp_path / "out" / "HX-NW_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok
    assert any(planted[:40] in line for line in outcome.statement_changes)
    assert not any(CHANGE in note for note in outcome.notes)


def test_a_0_3_1_reverse_valve_record_without_pipes_verifies_with_the_two_notices_listed(tmp_path, capsys):
    for companion in ARCHIVE.glob("HX-RN_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    record = json.loads((tmp_path / "HX-RN_revA.json").read_text("utf-8"))
    assert record["provenance"]["steamcalc"] == "0.3.1"
    assert not any(c["name"].startswith(REVERSE_NAME + ": ") and "not assessed" in json.dumps(c)
                   for c in record["checks"])
    assert main(["verify", str(tmp_path / "HX-RN_revA.json")]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said
    for pipe in ("discharge pipe", "inlet pipe"):
        assert f"the reverse tube-rupture valve's {pipe}, when not given, is stated as not assessed" in said


def test_a_0_3_1_reverse_valve_record_with_its_pipes_gets_no_allowance_for_a_planted_notice(tmp_path, capsys):
    """With both pipes given the recomputation states neither as not assessed: the allowance does not open, and a
    notice planted in the record (digests recomputed) is a difference. (The water leaves at 90 °C, below its boiling
    point: no other change of 0.3.2 applies to this record.)"""
    case = tmp_path / "HX-RP.toml"
    case.write_text((ARCHIVE / "HX-RN.toml").read_text("utf-8").replace('id = "HX-RN"', 'id = "HX-RP"')
                    .replace('"110 degC"', '"90 degC"')
                    + 'discharge_size = "DN80"\ndischarge_length = "10 m"\ninlet_size = "DN50"\ninlet_length = "1 m"\n')
    assert main(["run", str(case), "--out", str(tmp_path / "out")]) in (0, 1)
    capsys.readouterr()
    planted = f"{REVERSE_NAME}: relief inlet pressure loss: not assessed: the relief valve's inlet pipe is not given"

    def edit(record):
        record["provenance"]["steamcalc"] = "0.3.1"
        record["warnings"].append(planted)
    forged = forged_copy(tmp_path / "out" / "HX-RP_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok
    assert any(planted[:40] in line for line in outcome.statement_changes)
    assert not any(CHANGE in note for note in outcome.notes)


def _forged_0_3_1(tmp_path, name, edit):
    """A 0.3.1 record of the archive edited as a forger would, its digests recomputed: its verification."""
    _, _, outcome, error = verify_file(forged_copy(ARCHIVE / name, edit, tmp_path))
    assert error is None, error
    return outcome


def test_a_status_the_records_own_checks_do_not_give_is_not_explained_by_the_change(tmp_path):
    """HX-NO (0.3.1) states warnings besides the narrow outlet's: a status edited to pass, which the change of 0.3.2
    (a warning added) would otherwise explain, is a difference (before, VERIFIED)."""
    outcome = _forged_0_3_1(tmp_path, "HX-NO_revA.json", lambda r: r.update(status="pass"))
    assert not outcome.ok and "status: recorded 'pass', recomputed 'warn'" in outcome.differences()


@pytest.mark.parametrize("name, section, text", [
    ("HX-RN_revA.json", "assumptions", f"{REVERSE_NAME}: discharge line: checked by the vendor, adequate"),
    ("HX-RN_revA.json", "assumptions", f"{REVERSE_NAME}: relief inlet pressure loss: 1.2 % of the set pressure"),
    ("HX-NO_revA.json", "warnings", f"{NARROW_OUTLET_CHECK}: the pipe is wide enough"),
])
def test_a_statement_planted_under_a_change_that_only_adds_is_a_difference(tmp_path, name, section, text):
    """The changes of 0.3.2 only add a check and its warning: a statement the record holds that the recomputation does
    not issue is not theirs to explain (before, VERIFIED with a note)."""
    outcome = _forged_0_3_1(tmp_path, name, lambda r: r[section].append(text))
    assert not outcome.ok and any(text in line for line in outcome.differences()), outcome.differences()


def test_a_narrow_outlet_check_planted_as_passing_is_a_difference(tmp_path):
    """A 0.3.1 record cannot hold the check 0.3.2 adds: one planted as passing is a difference (before, VERIFIED)."""
    planted = {"name": NARROW_OUTLET_CHECK, "status": "pass", "detail": "the pipe is wide enough", "kind": "notice"}
    outcome = _forged_0_3_1(tmp_path, "HX-NO_revA.json", lambda r: r["checks"].append(planted))
    assert not outcome.ok and any("the pipe is wide enough" in line for line in outcome.differences())
