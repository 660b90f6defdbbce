"""Steps and checks kept as amounts: what the record shows is recomputed by verify, edits are caught.

A forger who edits a record and recomputes both public digests must still fail ``verify``: the check
verdicts are recomputed from the record's own quantity and limits, and every text the record shows (a
result's label, a step's operands, the uncertainty summary and sensitivity order) from the calculation.
"""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from tests.case_helpers import forged_copy
from steamcalc.review.verify import recorded_verdict_changes
from steamcalc.units.amounts import Amount, Limit, Phrase, verdict


DEMO_SITE = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    site = tmp_path_factory.mktemp("site")
    shutil.copytree(DEMO_SITE, site, dirs_exist_ok=True, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases" / "LD-01.toml"), "--quiet"]) == 0
    return site / "records" / "LD-01_revB.json"


def _first_limit_check(record):
    return next(c for c in record["checks"] if c.get("kind") == "limit")


def _first_worked_step(record):
    return next(s for s in record["steps"] if "operands" in s and s["operands"])


def _flip_status(record):
    check = _first_limit_check(record)
    check["status"] = "warn" if check["status"] == "pass" else "pass"


def _loosen_limit(record):
    check = _first_limit_check(record)
    check["limits"][0]["limit"]["value"] *= 10


def _edit_operand(record):
    step = _first_worked_step(record)
    symbol = next(iter(step["operands"]))
    step["operands"][symbol]["value"] *= 1.01


def _edit_label(record):
    key = next(iter(record["results"]))
    record["results"][key]["label"] = "Something else"


def _edit_summary(record):
    record["uncertainty"]["summary"][0] = record["uncertainty"]["summary"][0].replace("most sensitive to",
                                                                                      "least sensitive to")


def _reorder_sensitivity(record):
    first = next(iter(record["uncertainty"]["sensitivity"]))
    record["uncertainty"]["sensitivity"][first].reverse()


def _edit_phrase(record):
    check = next(c for c in record["checks"] if "phrase" in c)
    check["phrase"]["template"] = "all in order"


@pytest.mark.parametrize("edit", [_flip_status, _loosen_limit, _edit_operand, _edit_label, _edit_summary,
                                  _reorder_sensitivity, _edit_phrase],
                         ids=["a check's status", "a check's limit", "a step's operand", "a result's label",
                              "the uncertainty summary", "the sensitivity order", "a check's wording"])
def test_an_edit_of_what_the_record_shows_fails_verify(issued, tmp_path, capsys, edit):
    forged = forged_copy(issued, edit, tmp_path)
    capsys.readouterr()
    assert main(["verify", str(forged)]) == 1
    said = capsys.readouterr().out
    assert "integrity: intact" in said and "verdict: FAILED" in said


def test_the_issued_record_verifies_and_keeps_steps_and_checks_as_data(issued, capsys):
    record = json.loads(issued.read_text(encoding="utf-8"))
    assert record["schema"] == "steamcalc.record/3"
    assert all("expression" in step for step in record["steps"])
    assert sum(c.get("kind") == "limit" for c in record["checks"]) >= 5
    assert recorded_verdict_changes(record["checks"]) == []
    assert main(["verify", str(issued)]) == 0


def test_a_status_flipped_in_the_file_is_named_from_the_record_alone(issued):
    record = json.loads(issued.read_text(encoding="utf-8"))
    _flip_status(record)
    name = _first_limit_check(record)["name"]
    changes = recorded_verdict_changes(record["checks"])
    assert len(changes) == 1 and name in changes[0] and "its quantity against its limits gives" in changes[0]


@pytest.mark.parametrize("quantity, limits, expected", [
    (Amount(39.9, "m/s"), [Limit("<=", Amount(40.0, "m/s"), "warn")], "pass"),
    (Amount(40.0, "m/s"), [Limit("<=", Amount(40.0, "m/s"), "warn")], "pass"),
    (Amount(40.0, "m/s"), [Limit("<", Amount(40.0, "m/s"), "warn")], "warn"),
    (Amount(70.0, "m/s"), [Limit("<=", Amount(40.0, "m/s"), "warn"), Limit("<=", Amount(60.0, "m/s"), "fail")], "fail"),
    (Amount(0.5, "bar", "difference"), [Limit(">=", Amount(50.0, "kPa", "difference"), "fail")], "pass"),
    (Amount(3.0, "K"), [Limit(">=", Amount(5.0, "K"), "warn")], "warn"),
], ids=["below", "at the limit", "at a strict limit", "past both", "other units", "a superheat"])
def test_a_verdict_is_its_quantity_against_its_limits(quantity, limits, expected):
    # The comparison rule itself (common practice for a limit "of at most"): equal to the limit passes.
    assert verdict(quantity, limits) == expected


def test_a_phrase_is_written_in_each_system_from_its_amounts():
    phrase = Phrase.of("water at {water:.2f}, below the target {target:.2f}", water=(105.0, "degC"),
                       target=(148.78, "degC"))
    assert phrase.text("SI") == "water at 105.00 °C, below the target 148.78 °C"
    # 105 °C = 221 °F and 148.78 °C = 299.80 °F (°F = 1.8 °C + 32, exact).
    assert phrase.text("US") == "water at 221.00 °F, below the target 299.80 °F"
    assert Phrase.from_record(phrase.to_record()) == phrase


def test_a_record_relabelled_as_an_earlier_schema_gets_no_allowance(issued, tmp_path, capsys):
    # An earlier release's record may differ where a later release changed a basis (the relief load); a record
    # of this release relabelled schema 2, its relief load edited and its digests recomputed, still fails.
    def relabel(record):
        record["schema"] = "steamcalc.record/2"
        record["results"]["relief_design_flow"]["value"] *= 0.9

    forged = forged_copy(issued, relabel, tmp_path)
    capsys.readouterr()
    assert main(["verify", str(forged)]) == 1
    said = capsys.readouterr().out
    assert "differs  relief_design_flow" in said and "verdict: FAILED" in said


@pytest.mark.parametrize("expression, field", [
    ("__import__('os').system('echo forged')", "steps.3.expression"),   # outside the subset: refused, never run
    ("T_sat2 + 1", "steps.3.operands"),                                  # symbols that are not its operands
], ids=["a call outside the subset", "other symbols"])
def test_a_step_expression_edited_by_hand_is_refused_by_name(issued, tmp_path, capsys, expression, field):
    def edit(record):
        record["site"]["display_units"] = "US"   # the US view writes the steps from their expressions
        record["steps"][3]["expression"] = expression

    forged = forged_copy(issued, edit, tmp_path)
    capsys.readouterr()
    assert main(["verify", str(forged)]) != 0
    said = capsys.readouterr()
    assert f"field '{field}'" in said.out + said.err and "internal error" not in said.out + said.err


def test_a_power_tower_in_an_expression_overflows_at_once_instead_of_running_on():
    from steamcalc.units.expressions import parse, substituted

    tree = parse("x**10**10**10")
    text = substituted(tree, {"x": Amount(2.0, "")}, "US", Amount(4.0, ""))
    assert text.startswith("2")
