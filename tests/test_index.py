"""The records index (index.html, index.csv): each record once, pointing at its own file, after copies
of record files; `sign` writes it again so it shows the signature."""

import csv
import json
import re
import shutil

import pytest

from steamcalc.batch.batch import refresh_index, write_index
from steamcalc.cli import main


@pytest.fixture
def records(tmp_path, demo_site_dir):
    """The demo site with two records (LD-02 and FL-01) and their index."""
    site = tmp_path / "demo_site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases" / "LD-02.toml"), str(site / "cases" / "FL-01.toml"), "--quiet"]) == 0
    return site / "records"


@pytest.fixture
def key(tmp_path):
    """C. Checker's private key file (a sign-off is made with a key; a name alone is refused)."""
    assert main(["keys", "new", "--name", "C. Checker", "--out", str(tmp_path / "keys")]) == 0
    return tmp_path / "keys" / "c-checker.key"


def _csv(folder):
    return list(csv.DictReader((folder / "index.csv").read_text().splitlines()))


def _links(folder):
    return re.findall(r"href='\./([^']*)'", (folder / "index.html").read_text())


def test_an_identical_copy_in_the_same_folder_is_listed_once(records):
    shutil.copy(records / "LD-02_revB.json", records / "LD-02_revB (copy).json")
    write_index(records)
    rows = _csv(records)
    assert [(r["id"], r["json"]) for r in rows] == [("FL-01", "FL-01_revB.json"), ("LD-02", "LD-02_revB.json")]
    ld02 = rows[1]
    assert ld02["html"] == "LD-02_revB.html" and ld02["copies"] == "LD-02_revB (copy).json"
    assert _links(records).count("LD-02_revB.json") == 1 and "LD-02_revB%20%28copy%29.json" not in _links(records)
    page = (records / "index.html").read_text()
    assert "2 records in this folder (and 1 identical copy of them" in page
    # The copy is one row whichever name sorts first: the row is on the file steamcalc named.
    (records / "LD-02_revB.json").rename(records / "zz.json")
    shutil.copy(records / "zz.json", records / "LD-02_revB.json")
    write_index(records)
    assert [r["json"] for r in _csv(records) if r["id"] == "LD-02"] == ["LD-02_revB.json"]


def test_a_copy_that_differs_is_its_own_row_pointing_at_its_own_file(records):
    record = json.loads((records / "LD-02_revB.json").read_text())
    record["title"] = "edited by hand"   # a different digest: another record (verify calls it edited)
    (records / "LD-02_edited.json").write_text(json.dumps(record))
    write_index(records)
    rows = {r["json"]: r for r in _csv(records)}
    assert set(rows) == {"FL-01_revB.json", "LD-02_revB.json", "LD-02_edited.json"}
    # No HTML beside the edited copy: no link to a file that is not there.
    assert rows["LD-02_edited.json"]["html"] == "" and rows["LD-02_revB.json"]["html"] == "LD-02_revB.html"
    assert "LD-02_edited.html" not in _links(records) and "LD-02_edited.json" in _links(records)
    assert "(no HTML beside the JSON)" in (records / "index.html").read_text()


def test_a_record_copied_to_another_folder_is_indexed_there_at_its_own_file(records, tmp_path):
    copy = tmp_path / "copy"
    copy.mkdir()
    for suffix in (".json", ".html"):
        shutil.copy(records / f"LD-02_revB{suffix}", copy / f"LD-02_revB{suffix}")
    write_index(copy)
    assert [(r["json"], r["html"], r["copies"]) for r in _csv(copy)] == [("LD-02_revB.json", "LD-02_revB.html", "")]
    assert _links(copy) == ["LD-02_revB.html", "LD-02_revB.json"]
    # The original folder's index is untouched by the copy.
    assert [r["json"] for r in _csv(records)] == ["FL-01_revB.json", "LD-02_revB.json"]


def test_sign_refreshes_the_index(records, key, capsys):
    before_csv, before_html = (records / "index.csv").read_text(), (records / "index.html").read_text()
    assert "C. Checker" not in before_csv + before_html
    assert main(["sign", str(records / "LD-02_revB.json"), "--key", str(key)]) == 0
    out = capsys.readouterr().out
    assert f"index refreshed: {records / 'index.html'} and {records / 'index.csv'}" in out
    row = next(r for r in _csv(records) if r["id"] == "LD-02")
    assert row["signatures"].startswith("checked: C. Checker") and row["signatures"].endswith("unknown key")
    assert "C. Checker" in (records / "index.html").read_text()


def test_sign_with_a_key_refreshes_the_index(records, tmp_path, capsys):
    assert main(["keys", "new", "--name", "K. Checker", "--out", str(tmp_path / "keys")]) == 0
    shutil.copy(tmp_path / "keys" / "k-checker.pub", records.parent / "trusted_signers" / "k-checker.pub")
    assert main(["sign", str(records / "FL-01_revB.json"), "--key", str(tmp_path / "keys" / "k-checker.key")]) == 0
    assert "index refreshed:" in capsys.readouterr().out
    row = next(r for r in _csv(records) if r["id"] == "FL-01")
    assert row["signatures"].startswith("checked: K. Checker") and row["signatures"].endswith("trusted")


def test_the_refresh_keeps_the_cases_the_last_batch_could_not_run(records, key, capsys):
    bad = records.parent / "cases" / "BAD.toml"
    bad.write_text((records.parent / "cases" / "LD-02.toml").read_text().replace('mass_flow = "2.0 t/h"',
                                                                                 'mass_flow = "2.0 bananas"'))
    assert main(["run", str(bad), str(records.parent / "cases" / "LD-02.toml"), "--quiet"]) == 2
    assert "BAD.toml" in (records / "index.html").read_text()
    capsys.readouterr()
    assert main(["sign", str(records / "LD-02_revB.json"), "--key", str(key)]) == 0
    page = (records / "index.html").read_text()
    assert "Cases not run in the last batch" in page and "BAD.toml" in page and "C. Checker" in page


def test_a_foreign_index_is_not_replaced_by_sign(records, key, capsys):
    (records / "index.csv").write_text("my,own,spreadsheet\n")
    assert main(["sign", str(records / "LD-02_revB.json"), "--key", str(key)]) == 0
    assert "index not refreshed: index.csv" in capsys.readouterr().out
    assert (records / "index.csv").read_text() == "my,own,spreadsheet\n"


def test_no_index_is_made_by_sign_where_there_was_none(tmp_path, demo_site_dir, key):
    site = tmp_path / "demo_site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases" / "LD-02.toml")]) == 0
    assert main(["sign", str(site / "records" / "LD-02_revB.json"), "--key", str(key)]) == 0
    assert not (site / "records" / "index.html").exists() and refresh_index(site / "records") is None
