"""Records issued by earlier releases keep verifying on this one.

``tests/archive/v0_2/`` holds the demo site's records as steamcalc 0.2 issued them (schema
``steamcalc.record/1``, no figure data), with the HTML and Markdown that release drew;
``tests/archive/v0_3/`` those of this release (schema 2), kept for the releases after it. Each must verify:
its digests intact, every result, check and statement reproduced, and its reports either matching what this
release draws or reported as drawn by the release that issued the record — never as edited.
"""

import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main

ARCHIVE = Path(__file__).resolve().parent / "archive"
RECORDS = sorted(ARCHIVE.glob("v*/*_rev*.json"))


def test_the_archive_holds_both_releases():
    assert {path.parent.name for path in RECORDS} >= {"v0_2"}
    assert len([p for p in RECORDS if p.parent.name == "v0_2"]) == 5


@pytest.mark.parametrize("record", RECORDS, ids=lambda p: f"{p.parent.name}/{p.stem}")
def test_an_archived_record_verifies(record, tmp_path, capsys):
    # A copy: verify takes the record's lock beside it, and nothing may be written into the repository.
    for companion in record.parent.glob(f"{record.stem}.*"):
        shutil.copy(companion, tmp_path / companion.name)
    assert main(["verify", str(tmp_path / record.name)]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said and "DIFFERS" not in said
    if record.parent.name == "v0_2":
        assert f"companion {record.stem}.html: drawn by the earlier release that issued the record" in said


def test_an_edited_report_of_an_archived_record_is_still_caught(tmp_path, capsys):
    # "Older" is only for a report that names the record's digest: one that does not is reported as edited.
    record = ARCHIVE / "v0_2" / "LD-02_revA.json"
    for companion in record.parent.glob("LD-02_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    html = tmp_path / "LD-02_revA.html"
    html.write_text(html.read_text(encoding="utf-8").replace("sha256:", "sha256:0"), encoding="utf-8")
    assert main(["verify", str(tmp_path / record.name)]) == 1
    assert "companion LD-02_revA.html: DIFFERS" in capsys.readouterr().out
