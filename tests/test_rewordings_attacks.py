"""Attacks on release 0.3.1's rewordings (steamcalc.review.rewordings, used by verify) that found defects.

Source of every check: the records of release 0.3.0 in tests/archive/v0_3 (issued with the earlier words), edited
and their digests recomputed as any forger can (tests/case_helpers.forged_copy), and the module's own contract:
only listed words, only in a record issued before the release that changed them, only in the calculation's
statements (never the engineer's own words).
"""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.review.register import build_register
from steamcalc.review.rewordings import as_worded_now
from steamcalc.review.verify import verify_file

from .case_helpers import forged_copy

ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_3"
NOTE = "worded otherwise since steamcalc 0.3.1"


@pytest.mark.parametrize("stated", ["dev", "", "unknown", "0.3.1+local", "0.3.1rc1"])
def test_a_record_whose_release_does_not_read_gets_no_rewording(stated):
    """A release that cannot be read is not known to be earlier than 0.3.1 ("0.3.1+local" is 0.3.1 itself): the
    allowance is for records that state an earlier release only."""
    record = {"provenance": {"steamcalc": stated}, "warnings": ["loss 4 % (API 520 Part II, 7.3.1)"]}
    assert as_worded_now(record) == (record, [])


def test_a_record_stating_no_readable_release_in_the_earlier_words_does_not_verify(tmp_path):
    forged = forged_copy(ARCHIVE / "FL-01_revB.json",
                         lambda r: r["provenance"].__setitem__("steamcalc", "dev"), tmp_path)
    _, _, outcome, error = verify_file(forged)
    assert error is None
    assert not outcome.ok and any("warnings" in change for change in outcome.statement_changes)
    assert not any(NOTE in note for note in outcome.notes)


def test_an_engineers_note_is_not_reworded_nor_said_to_be(tmp_path):
    """An engineer's note (an assumption "Engineer's note: ...") is the engineer's own words: none of the 0.3.1
    rewordings applies to it, and verify notes no rewording for a record whose statements hold none of the earlier
    words (LD-01 rev B of 0.3.0 holds none)."""
    source = ARCHIVE / "LD-01_revB.json"
    assert "7.3.1" not in source.read_text("utf-8")
    said = "Engineer's note: inlet loss to be checked by the vendor per API 520 Part II, 7.3.1"
    forged = forged_copy(source, lambda r: r["assumptions"].append(said), tmp_path)
    record = json.loads(forged.read_text("utf-8"))
    assert as_worded_now(record)[1] == []
    _, _, outcome, error = verify_file(forged)
    assert error is None and outcome.ok
    assert not any(NOTE in note for note in outcome.notes)


def _deep(depth):
    value = "x"
    for _ in range(depth):
        value = [value]
    return value


@pytest.fixture
def nested(tmp_path):
    """A 0.3.0 record with data nested 600 lists deep beside a check (the schema lets a check carry more keys; the
    JSON reads and digests at that depth)."""
    forged = forged_copy(ARCHIVE / "LD-01_revB.json", lambda r: r["checks"][0].__setitem__("extra", _deep(600)),
                         tmp_path)
    folder = tmp_path / "records"
    folder.mkdir()
    shutil.copy(forged, folder / forged.name)
    return folder / forged.name


def test_verify_of_a_deeply_nested_earlier_record_does_not_fail_inside_the_rewording(nested):
    _, _, outcome, error = verify_file(nested)   # a RecursionError in the rewording before the fix
    assert error is None and outcome.error is None


def test_one_deeply_nested_earlier_record_does_not_stop_the_register(nested):
    rows = build_register(nested.parent)   # "internal error: RecursionError" for the whole register before the fix
    assert [row.json for row in rows] == [nested.name]


def test_every_statement_0_3_0_wrote_in_the_earlier_words_is_still_reworded(tmp_path):
    """The fix rewords only the calculation's texts: a flash record with its relief inlet pipe given (the inlet-loss
    check's detail, phrase and source, the assumption, the reaction-force step) put back into the words of 0.3.0,
    stating release 0.3.0, digests recomputed, still verifies, naming both rewordings."""
    from steamcalc.cli import main
    from steamcalc.review.rewordings import REWORDINGS

    root = Path(__file__).resolve().parents[1] / "workbooks" / "demo_site"
    site = tmp_path / "site"
    (site / "cases").mkdir(parents=True)
    shutil.copy(root / "site.toml", site / "site.toml")
    case = (root / "cases" / "FL-01.toml").read_text("utf-8")
    case = case.replace("[inputs.overpressure]\n", '[inputs.overpressure]\ninlet_size = "DN50"\ninlet_length = "4 m"\n')
    (site / "cases" / "FL-01.toml").write_text(case, "utf-8")
    assert main(["run", str(site / "cases")]) in (0, 1)
    issued = next((site / "records").glob("FL-01_rev*.json"))

    def as_0_3_0(record):
        text = json.dumps(record)
        for rewording in (REWORDINGS[2], REWORDINGS[0]):   # every reaction force back to "..., 4.4.1.1"
            text = text.replace(rewording.now, rewording.before)
        record.clear()
        record.update(json.loads(text))
        record["provenance"]["steamcalc"] = "0.3.0"
    before = json.loads(issued.read_text("utf-8"))
    assert sum(json.dumps(before).count(r.now) for r in REWORDINGS[:2]) >= 5
    forged = forged_copy(issued, as_0_3_0, tmp_path)
    _, _, outcome, error = verify_file(forged)
    assert error is None and outcome.ok, outcome.differences()
    assert sum(NOTE in note for note in outcome.notes) == 2
