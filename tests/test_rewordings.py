"""Statements reworded by a release (steamcalc.review.rewordings): records of earlier releases keep verifying, each
rewording listed with the release that made it, and nothing else passes for one.

Source of every check: the records of release 0.3.0 in tests/archive/v0_3 (issued with the earlier words) and
records issued by this release from the demo site.
"""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.review.rewordings import REWORDINGS, as_worded_now, release
from steamcalc.review.verify import verify_file

from .case_helpers import forged_copy

ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_3"
ROOT = Path(__file__).resolve().parents[1]


def _copy(name, folder):
    for companion in ARCHIVE.glob(f"{Path(name).stem}.*"):
        shutil.copy(companion, folder / companion.name)
    return folder / name


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """The demo site's records as this release issues them."""
    site = tmp_path_factory.mktemp("rewordings") / "site"
    shutil.copytree(ROOT / "workbooks" / "demo_site", site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases")]) in (0, 1)
    return site / "records"


@pytest.mark.parametrize("name, before", [
    ("FL-01_revB.json", "API 520 Part II, 7.3.1"),
    ("FL-01_revB.json", "API 520 Part II, 4.4.1.1"),
])
def test_a_record_of_0_3_0_in_the_earlier_words_verifies_and_names_the_rewording(tmp_path, capsys, name, before):
    path = _copy(name, tmp_path)
    assert before in path.read_text("utf-8")
    assert main(["verify", str(path)]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said
    assert "note: worded otherwise since steamcalc 0.3.1" in said and repr(before) in said


def test_this_release_writes_none_of_the_earlier_words(issued):
    texts = [path.read_text("utf-8") for path in issued.glob("*.json")]
    assert len(texts) >= 7
    for rewording in REWORDINGS:
        assert not any(rewording.before in text for text in texts), rewording.before
    assert any(REWORDINGS[0].now in text for text in texts)


def test_a_record_of_this_release_given_the_earlier_words_is_caught(issued, tmp_path):
    """The allowance is for records issued before the rewording only: a record of this release put back into the
    earlier words (its digests recomputed, as a forger would) no longer reproduces its statements."""
    source = next(p for p in issued.glob("FL-01_rev*.json"))
    forged = forged_copy(source, lambda r: r.__setitem__("warnings", [
        w.replace("API 520 Part II, inlet piping", "API 520 Part II, 7.3.1") for w in r["warnings"]]), tmp_path)
    assert "7.3.1" in forged.read_text("utf-8")
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok and any("warnings" in change for change in outcome.statement_changes)


def test_an_earlier_record_edited_beyond_its_rewording_is_still_caught(tmp_path):
    """Its numbers and verdicts are compared as before: the 3 % limit edited to 5 % in the reworded statement is
    a difference, not a rewording."""
    path = _copy("FL-01_revB.json", tmp_path)

    def edit(record):
        record["warnings"] = [w.replace("below 3 % of the gauge set pressure", "below 5 % of the gauge set pressure")
                              for w in record["warnings"]]
    before = json.loads(path.read_text("utf-8"))
    assert any("below 3 % of the gauge set pressure (API 520 Part II, 7.3.1)" in w for w in before["warnings"])
    forged = forged_copy(path, edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok and outcome.statement_changes


def test_a_record_claiming_a_later_release_gets_no_rewording():
    record = {"provenance": {"steamcalc": "0.3.1"}, "checks": [{"detail": "x (API 520 Part II, 7.3.1)"}]}
    assert as_worded_now(record) == (record, [])
    record["provenance"] = {"steamcalc": "0.3.0"}
    reworded, applied = as_worded_now(record)
    assert reworded["checks"][0]["detail"] == "x (API 520 Part II, inlet piping)" and len(applied) == 1
    assert record["checks"][0]["detail"] == "x (API 520 Part II, 7.3.1)"   # the record itself is never changed


def test_the_digests_are_checked_on_the_record_as_it_stands(tmp_path):
    """A rewording never mends an edit: the words changed in the file without new digests is EDITED."""
    path = _copy("FL-01_revB.json", tmp_path)
    record = json.loads(path.read_text("utf-8"))
    record["warnings"] = [w.replace("API 520 Part II, 7.3.1", "API 520 Part II, inlet piping")
                          for w in record["warnings"]]
    path.write_text(json.dumps(record, indent=2), "utf-8")
    _, _, outcome, _ = verify_file(path)
    assert not outcome.digest_ok


def test_rewordings_are_in_release_order_and_name_a_later_release():
    assert [release(r.since) for r in REWORDINGS] == sorted(release(r.since) for r in REWORDINGS)
    assert all(release(r.since) > (0, 3, 0) for r in REWORDINGS)
    assert len({(r.before, r.since) for r in REWORDINGS}) == len(REWORDINGS)


def test_the_omega_steps_words_now_are_the_calculations():
    from steamcalc.calcs.overpressure import OMEGA_EQUATION

    assert any(r.now == OMEGA_EQUATION for r in REWORDINGS)
