"""Crash recovery moves only the record's own files (issue 22, item 8).

A staging folder left by a killed writer is rolled forward from its commit list. A list planted or edited to
name ``../site.toml``, an absolute path, another record's file or a link must not move anything: the next
writer refuses it, names the list and leaves every file where it was.
"""

import json
import os
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.records.issuing import WORK_FOLDER

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"


@pytest.fixture
def site(tmp_path):
    shutil.copytree(DEMO, tmp_path / "site", ignore=shutil.ignore_patterns("records"))
    return tmp_path / "site"


def _plant(records, names, staged_name=None, link_to=None):
    staging = records / WORK_FOLDER / "FL-01_revB.staged"
    staging.mkdir(parents=True)
    for name in names if isinstance(names, list) else [names]:
        target = staging / (staged_name or Path(name).name)
        if link_to is not None:
            os.symlink(link_to, target)
        else:
            target.write_text("planted\n")
    (staging / "COMMIT").write_text(json.dumps(names))
    return staging


@pytest.mark.parametrize("names", [
    ["../site.toml"],
    ["FL-01_revB.json", "../cases/FL-01.toml"],
    ["/etc/hostname"],
    ["FL-02_revB.json"],        # another record's file
    ["FL-01_revB.toml"],        # not a file of a record's set
    "FL-01_revB.json",          # not a list
])
def test_a_planted_commit_list_is_refused_and_nothing_moves(site, capsys, names):
    records = site / "records"
    before = {p: p.read_bytes() for p in site.rglob("*") if p.is_file()}
    _plant(records, names)
    code = main(["run", str(site / "cases" / "FL-01.toml")])
    err = capsys.readouterr().err
    assert code == 2
    assert "commit list" in err and "COMMIT" in err
    for path, content in before.items():
        assert path.read_bytes() == content, path
    assert not (records / "FL-01_revB.json").exists()


def test_a_link_in_the_staging_folder_is_refused(site, capsys):
    records = site / "records"
    _plant(records, ["FL-01_revB.json"], link_to=site / "site.toml")
    assert main(["run", str(site / "cases" / "FL-01.toml")]) == 2
    assert "commit list" in capsys.readouterr().err
    assert not (records / "FL-01_revB.json").exists()


def test_a_genuine_commit_list_still_rolls_forward(site):
    # The list an interrupted writer leaves (its own names) is finished by the next run.
    records = site / "records"
    assert main(["run", str(site / "cases" / "FL-01.toml")]) == 0
    saved = {s: (records / f"FL-01_revB{s}").read_text() for s in (".json", ".html", ".md")}
    for suffix in saved:
        (records / f"FL-01_revB{suffix}").unlink()
    staging = records / WORK_FOLDER / "FL-01_revB.staged"
    staging.mkdir()
    for suffix, text in saved.items():
        (staging / f"FL-01_revB{suffix}").write_text(text)
    (staging / "COMMIT").write_text(json.dumps([f"FL-01_revB{s}" for s in saved]))
    assert main(["run", str(site / "cases" / "FL-01.toml")]) == 0
    assert {s: (records / f"FL-01_revB{s}").read_text() for s in saved} == saved
    assert not staging.exists()
