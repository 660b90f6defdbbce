"""The review workbook without a browser: compare with earlier revisions, non-record files, the verdict's style."""

import json
import shutil

import pytest

from steamcalc.cli import main
from steamcalc.ui.review import ReviewBook, _revision_key, _summary_html


@pytest.fixture(scope="module")
def records(tmp_path_factory):
    """LD-01 rev B, C and D (the flow raised each time), LD-02 rev B, an edited copy and a non-record file."""
    from pathlib import Path

    demo = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
    site = tmp_path_factory.mktemp("review") / "demo_site"
    shutil.copytree(demo, site, ignore=shutil.ignore_patterns("records"))
    base = (site / "cases" / "LD-01.toml").read_text()
    cases = [site / "cases" / "LD-01.toml", site / "cases" / "LD-02.toml"]
    for revision, flow in (("C", "5.0 t/h"), ("D", "5.2 t/h")):
        case = site / "cases" / f"LD-01{revision}.toml"
        case.write_text(base.replace('revision = "B"', f'revision = "{revision}"')
                        .replace('mass_flow = "4.5 t/h"', f'mass_flow = "{flow}"'))
        cases.append(case)
    assert main(["run", *map(str, cases), "--out", str(site / "records")]) in (0, 1)
    folder = site / "records"
    edited = json.loads((folder / "LD-01_revB.json").read_text())
    edited["results"]["outlet_temperature"]["value"] += 1.0
    (folder / "LD-01_revB_edited.json").write_text(json.dumps(edited))
    (folder / "notes.json").write_text('{"note": "not a record"}')
    return folder


def test_compare_offers_only_earlier_revisions_of_the_picked_id_and_rebuilds_on_every_pick(records):
    book = ReviewBook(records / "LD-01_revD.json")
    offered = [value for _, value in book._earlier.options if value]
    assert offered == ["LD-01_revC.json", "LD-01_revB.json", "LD-01_revB_edited.json"]
    assert book._earlier.value == "LD-01_revC.json"               # the latest earlier revision
    book._picker.value = "LD-01_revC.json"
    assert [value for _, value in book._earlier.options if value] == ["LD-01_revB.json", "LD-01_revB_edited.json"]
    book._picker.value = "LD-01_revB.json"
    assert [value for _, value in book._earlier.options if value] == []
    assert "No earlier revision of LD-01" in book._diff.value and "No differences" not in book._diff.value
    book._picker.value = "LD-02_revB.json"
    assert not any("LD-01" in value for _, value in book._earlier.options)


def test_the_comparison_runs_from_the_earlier_revision_to_the_picked_one(records):
    book = ReviewBook(records / "LD-01_revC.json")
    shown = book._diff.value
    assert "rev B → rev C" in shown and "change (rev C − rev B)" in shown
    # The steam flow rose from 4500 to 5000 kg/h: the change is +500, under the input's label.
    row = next(r for r in shown.split("<tr") if "<td>Steam flow</td>" in r)
    assert "steamcalc-diff-changed" in row and ">4,500<" in row and ">5,000<" in row and ">+500<" in row
    # The key stays in its own small column; the item is named in words.
    assert "<code>mass_flow</code>" in row and shown.index("Steam flow") < shown.index("rows the same in both")


def test_picking_a_file_that_is_no_record_says_why_and_keeps_the_record_shown(records):
    book = ReviewBook(records / "LD-01_revC.json")
    book._picker.value = "notes.json"
    said = book._pick_status.value
    assert "notes.json cannot be reviewed" in said and "not a steamcalc record" in said
    assert "still showing LD-01_revC.json" in said
    assert book._picker.value == "LD-01_revC.json" and book.path.name == "LD-01_revC.json"
    book._picker.value = "LD-01_revD.json"
    assert book._pick_status.value == ""


def test_a_failed_verdict_is_styled_as_a_failure(records):
    book = ReviewBook(records / "LD-01_revB_edited.json")
    assert "verdict: FAILED" in book.summary()
    assert "steamcalc-verdict-failed" in book._table.value
    assert "steamcalc-verdict-failed" not in ReviewBook(records / "LD-01_revB.json")._table.value
    assert "class='steamcalc-verdict-verified'" in _summary_html("verdict: VERIFIED")


def test_signing_without_a_key_says_what_to_do_in_the_workbook(records):
    book = ReviewBook(records / "LD-02_revB.json")
    book._on_sign()
    assert "in the Key file box" in book._sign_status.value and "--key" not in book._sign_status.value


@pytest.mark.parametrize("earlier, later", [("A", "B"), ("Z", "AA"), ("2", "10"), ("P1", "P2"), ("a", "B")])
def test_revision_order(earlier, later):
    assert _revision_key(earlier) < _revision_key(later)


def test_signing_in_the_workbook_refreshes_the_folders_index(tmp_path):
    from pathlib import Path

    demo = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
    site = tmp_path / "site"
    shutil.copytree(demo, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases")]) in (0, 1)   # a folder run writes index.html and index.csv
    index = site / "records" / "index.csv"
    ld02 = next(line for line in index.read_text().splitlines() if "LD-02" in line)
    assert "C. Checker" not in ld02
    assert main(["keys", "new", "--name", "C. Checker", "--out", str(tmp_path / "keys")]) == 0
    said = ReviewBook(site / "records" / "LD-02_revB.json").sign("C. Checker", key_file=tmp_path / "keys" / "c-checker.key")
    assert said.startswith("checked, signed by C. Checker") and "index" in said
    ld02 = next(line for line in index.read_text().splitlines() if "LD-02" in line)
    assert "C. Checker" in ld02
