"""A hot liquid's relief discharge line says where the liquid flashes as its step computes it (release 0.3.3).

Since 0.3.2 the line flashes at the pressure where the liquid's enthalpy is the saturated liquid's (a step of the
record), yet its assumption still said "once below its saturation pressure" (at its temperature). 0.3.3 words it
as computed; records of earlier releases in the earlier words keep verifying, the rewording named.

Source of every check: the heater records of release 0.3.1 in tests/archive/v0_3_1_bases (issued by 0.3.1's own
code from the case files beside them, with the earlier words) and records this release issues from those cases.
"""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.calcs.relief_liquid_line import FLASHING_LIQUID_WORDS
from steamcalc.cli import main
from steamcalc.review.rewordings import REWORDINGS
from steamcalc.review.verify import verify_file

from .case_helpers import forged_copy

ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_3_1_bases"
EARLIER = next(r for r in REWORDINGS if r.now == FLASHING_LIQUID_WORDS)


def _copy(stem, folder):
    for companion in ARCHIVE.glob(f"{stem}_revA.*"):
        shutil.copy(companion, folder / companion.name)
    return folder / f"{stem}_revA.json"


@pytest.mark.parametrize("stem", ["HX-FX", "HX-FO"])
def test_a_record_of_0_3_1_in_the_earlier_words_verifies_and_names_the_rewording(tmp_path, capsys, stem):
    path = _copy(stem, tmp_path)
    assert EARLIER.before in path.read_text("utf-8")
    assert main(["verify", str(path)]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said
    assert "worded otherwise since steamcalc 0.3.3" in said


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """HX-FX as this release issues it from its case file."""
    folder = tmp_path_factory.mktemp("flashing_words")
    shutil.copy(ARCHIVE / "HX-FX.toml", folder / "HX-FX.toml")
    assert main(["run", str(folder / "HX-FX.toml"), "--out", str(folder / "records")]) in (0, 1)
    return folder / "records" / "HX-FX_revA.json"


def test_this_release_says_where_the_liquid_flashes_as_its_step_computes_it(issued):
    record = json.loads(issued.read_text("utf-8"))
    assert not any(EARLIER.before in a for a in record["assumptions"])
    said = [a for a in record["assumptions"] if FLASHING_LIQUID_WORDS in a]
    assert said, record["assumptions"]
    # The step the words point to is in the record.
    assert any("pressure where the liquid flashes" in s["label"] for s in record["steps"])


def test_a_record_of_this_release_put_back_into_the_earlier_words_is_caught(issued, tmp_path):
    forged = forged_copy(issued, lambda r: r.__setitem__("assumptions", [
        a.replace(FLASHING_LIQUID_WORDS, EARLIER.before) for a in r["assumptions"]]), tmp_path)
    assert EARLIER.before in forged.read_text("utf-8")
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok and any("assumptions" in change for change in outcome.statement_changes)
