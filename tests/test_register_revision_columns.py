"""A register row's revision columns set after the row is made (the register learns which revision is the latest
only once every file is read) read exactly as if they had been set when it was made."""

import itertools

import pytest

from steamcalc.review.register import RegisterRow, revision_columns


def _row(case_changes, warnings, later):
    row = RegisterRow(json="LD-01_revA.json", id="LD-01", revision="A", warnings=list(warnings),
                      case_changes=case_changes)
    revision_columns(row, later)
    row.stale += ["site data changed", "companions do not match"]   # what a row adds after these columns
    return row


@pytest.mark.parametrize("case_changes, warnings, later", itertools.product(
    [None, [], ["mass_flow"], ["mass_flow", "outlet_pressure"]],
    [(), ("LD-01.toml and LD-01_copy.toml give this id",)],
    [None, "B"]))
def test_set_afterwards_as_when_made(case_changes, warnings, later):
    made = _row(case_changes, warnings, later)
    afterwards = _row(case_changes, warnings, None)
    revision_columns(afterwards, later)
    assert made.as_dict() == afterwards.as_dict()
    assert made.superseded == ("no" if later is None else "by revision B")
    if later is not None:
        assert made.stale[0] == "superseded by revision B" and "case edited after issue" not in made.stale
        assert made.case_file.startswith("later revision" if case_changes else
                                         "same" if case_changes == [] else "no case file found")
    elif case_changes:
        assert made.stale[0] == "case edited after issue"
        assert made.case_file.startswith("edited after issue: " + ", ".join(case_changes))
    for warning in warnings:
        assert made.case_file.endswith(f"; warning: {warning}")
