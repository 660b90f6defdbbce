"""Files the commands write, and the register's and index's view of a folder (issue 22, items 7, 10, 11, 12, 15).

- Every named output (register --html/--csv, diff --html, the run index, run --pdf/--notebook) refuses an
  existing file the command did not make itself unless --force; a record's own files are never written over by
  another command's output, and folders, devices and FIFOs never at all (one rule: ``refuse_foreign_file``).
- The register compares a record with its case file: the ``[uncertainty]`` table too, the file named as steamcalc
  names it (``<id>.toml``, ``<id>_rev<R>.toml`` as the workbooks save) before a backup copy, with a warning when
  several files give one id.
- Running one case refreshes the folder's index, as a sign-off does.
- verify and register of a folder without records exit 2 naming it.
- Every link the register and the index write is a relative file link.
"""

import csv
import os
import re
import shutil
import stat
from pathlib import Path
from urllib.parse import unquote

import pytest

from steamcalc.cli import main
from steamcalc.errors import RecordConflictError
from steamcalc.records.issuing import refuse_foreign_file
from steamcalc.review.register import build_register, file_link

UNCERTAINTY = '\n[uncertainty]\ninlet_pressure = "0.3 bar"\nmass_flow = "5 %"\nsamples = 40\nseed = 3\n'


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """The demo site with LD-02 (given a small [uncertainty] table) and FL-01 issued once, with their index."""
    demo = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
    site = tmp_path_factory.mktemp("outputs") / "site"
    shutil.copytree(demo, site, ignore=shutil.ignore_patterns("records"))
    for name in ("FL-02", "HX-01", "LD-01"):
        (site / "cases" / f"{name}.toml").unlink()
    case = site / "cases" / "LD-02.toml"
    case.write_text(case.read_text() + UNCERTAINTY)
    assert main(["run", "--quiet", str(case), str(site / "cases" / "FL-01.toml")]) == 0
    keys = tmp_path_factory.mktemp("keys")
    assert main(["keys", "new", "--name", "C. Checker", "--out", str(keys)]) == 0
    shutil.copy(keys / "c-checker.pub", site / "trusted_signers")
    return site


@pytest.fixture
def site(issued, tmp_path):
    folder = tmp_path / "site"
    shutil.copytree(issued, folder)
    return folder


def _cli(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out + out.err


def _rows(folder):
    return {f"{r.id} rev {r.revision}": r for r in build_register(folder, recompute=False)}


def _edit(path, old, new):
    text = path.read_text()
    assert old in text, old
    path.write_text(text.replace(old, new))


# -- item 7: one rule for every file a command writes ------------------------------------------------------------

def _victims(site):
    """Files a mistyped --html or --csv must not destroy: name -> path."""
    records = site / "records"
    key = site / "trusted_signers" / "c-checker.pub"
    return {"case file": site / "cases" / "LD-02.toml", "site file": site / "site.toml",
            "record": records / "LD-02_revB.json", "record's HTML": records / "LD-02_revB.html",
            "record's Markdown": records / "LD-02_revB.md", "trusted signers file": key,
            "records index": records / "index.html", "records index CSV": records / "index.csv"}


@pytest.mark.parametrize("option", ["--html", "--csv"])
def test_register_refuses_every_file_it_did_not_write(site, capsys, option):
    for what, path in _victims(site).items():
        before = path.read_bytes()
        code, text = _cli(["register", site, option, path], capsys)
        assert code == 2, (what, text)
        assert str(path) in text and "--force" in text and "Traceback" not in text, (what, text)
        assert path.read_bytes() == before, what


def test_register_force_replaces_a_foreign_file_but_never_a_records_file(site, tmp_path, capsys):
    notes = tmp_path / "notes.csv"
    notes.write_text("my,own\n")
    assert _cli(["register", site, "--csv", notes], capsys)[0] == 2
    assert notes.read_text() == "my,own\n"
    code, text = _cli(["register", site, "--csv", notes, "--force"], capsys)
    assert code == 0, text
    assert notes.read_text().startswith("id,revision,kind,title,status,verification,")
    records = site / "records"
    for path in (records / "LD-02_revB.json", records / "LD-02_revB.html", records / "LD-02_revB.md"):
        before = path.read_bytes()
        code, text = _cli(["register", site, "--html", path, "--force"], capsys)
        assert code == 2 and "not even with --force" in text and str(path) in text, text
        assert path.read_bytes() == before


def test_register_replaces_its_own_register_but_not_another_outputs(site, tmp_path, capsys):
    page, table = tmp_path / "register.html", tmp_path / "register.csv"
    for _ in range(2):   # the second time over its own files
        code, text = _cli(["register", site, "--html", page, "--csv", table], capsys)
        assert code == 0, text
    assert 'content="steamcalc register"' in page.read_text()
    # A register is not a comparison, and a comparison is not a register.
    a = site / "records" / "LD-02_revB.json"
    code, text = _cli(["diff", a, a, "--html", page], capsys)
    assert code == 2 and "it is a register" in text and "not a comparison" in text
    changes = tmp_path / "changes.html"
    assert _cli(["diff", a, a, "--html", changes], capsys)[0] == 0
    code, text = _cli(["register", site, "--html", changes], capsys)
    assert code == 2 and "it is a comparison" in text
    code, text = _cli(["register", site, "--html", page, "--csv", page], capsys)
    assert code == 2 and "the same file" in text


def test_diff_html_onto_a_records_companion_is_refused_even_with_force(site, capsys):
    records = site / "records"
    a, companion = records / "LD-02_revB.json", records / "FL-01_revB.html"
    before = companion.read_bytes()
    for extra in ([], ["--force"]):
        code, text = _cli(["diff", a, a, "--html", companion, *extra], capsys)
        assert code == 2 and str(companion) in text and "issued record" in text, text
        assert companion.read_bytes() == before


def _special_files(tmp_path):
    """A FIFO, and a character device (the null device's numbers) when this process may make one."""
    fifo = tmp_path / "pipe.html"
    os.mkfifo(fifo)
    found = [fifo]
    device = tmp_path / "null.csv"
    try:
        os.mknod(device, 0o666 | stat.S_IFCHR, os.makedev(1, 3))
    except (OSError, AttributeError):   # not root, or no mknod here: the FIFO and os.devnull still stand
        return found
    return found + [device]


def test_special_files_are_refused_even_with_force(site, tmp_path, capsys):
    a = site / "records" / "LD-02_revB.json"
    for path in _special_files(tmp_path):
        kind = stat.S_IFMT(path.lstat().st_mode)
        for argv in (["register", site, "--html", path, "--force"], ["register", site, "--csv", path, "--force"],
                     ["diff", a, a, "--html", path, "--force"]):
            code, text = _cli(argv, capsys)
            assert code == 2 and "device, FIFO or socket" in text and str(path) in text, text
            assert stat.S_IFMT(path.lstat().st_mode) == kind   # still the FIFO or device, not a file
    # The system's own null device, by the guard itself (nothing is written either way).
    with pytest.raises(RecordConflictError, match="not even with --force"):
        refuse_foreign_file(os.devnull, force=True, made_as="register")
    folder = tmp_path / "a folder"
    folder.mkdir()
    code, text = _cli(["register", site, "--html", folder, "--force"], capsys)
    assert code == 2 and "a folder, not a file" in text


def test_a_link_is_refused_and_force_replaces_the_link_not_what_it_points_to(site, tmp_path, capsys):
    target = site / "site.toml"
    before = target.read_bytes()
    link = tmp_path / "register.html"
    link.symlink_to(target)
    code, text = _cli(["register", site, "--html", link], capsys)
    assert code == 2 and "symbolic link" in text
    assert _cli(["register", site, "--html", link, "--force"], capsys)[0] == 0
    assert not link.is_symlink() and target.read_bytes() == before


def test_run_refuses_a_foreign_pdf_or_workbook_before_making_one(site, capsys):
    records = site / "records"
    pdf, notebook = records / "LD-02_revB.pdf", records / "LD-02_revB.ipynb"
    pdf.write_bytes(b"%PDF-1.4 my own scan")
    code, text = _cli(["run", site / "cases" / "LD-02.toml", "--pdf"], capsys)
    assert code == 2 and str(pdf) in text and "--force" in text
    assert pdf.read_bytes() == b"%PDF-1.4 my own scan"
    os.mkfifo(notebook)
    code, text = _cli(["run", site / "cases" / "LD-02.toml", "--notebook", "--force"], capsys)
    assert code == 2 and "device, FIFO or socket" in text and stat.S_ISFIFO(notebook.lstat().st_mode)


def test_the_run_index_refuses_a_foreign_index_unless_forced(site, capsys):
    records = site / "records"
    (records / "index.html").write_text("<html>our plant's own page</html>")
    cases = [site / "cases" / "LD-02.toml", site / "cases" / "FL-01.toml"]
    code, text = _cli(["run", "--quiet", *cases], capsys)
    assert code == 2 and "no index written" in text and str(records / "index.html") in text
    assert (records / "index.html").read_text() == "<html>our plant's own page</html>"
    assert _cli(["run", "--quiet", *cases, "--force"], capsys)[0] == 0
    assert 'content="steamcalc index"' in (records / "index.html").read_text()


# -- item 10: what the register compares a record with ------------------------------------------------------------

@pytest.mark.parametrize("old, new, change", [
    ('mass_flow = "5 %"', 'mass_flow = "8 %"', "uncertainty tolerance mass_flow"),
    ('samples = 40', 'samples = 50', "uncertainty samples"),
    ('seed = 3', 'seed = 4', "uncertainty seed"),
    ('seed = 3', 'seed = 3\ncoverage = 0.95', "uncertainty coverage"),
    ('mass_flow = "5 %"', 'mass_flow = "5 %"\noutlet_pressure = "0.1 bar"', "uncertainty tolerance outlet_pressure"),
    ('inlet_pressure = "0.3 bar"\n', '', "uncertainty tolerance inlet_pressure"),
])
def test_an_edited_uncertainty_table_makes_the_record_not_current(site, capsys, old, new, change):
    assert _rows(site)["LD-02 rev B"].current
    _edit(site / "cases" / "LD-02.toml", old, new)
    row = _rows(site)["LD-02 rev B"]
    assert row.stale == ["case edited after issue"] and row.case_file == f"edited after issue: {change}"
    code, text = _cli(["register", site], capsys)
    assert code == 1 and change in text


def test_a_removed_uncertainty_table_makes_the_record_not_current(site):
    case = site / "cases" / "LD-02.toml"
    case.write_text(case.read_text().split("\n[uncertainty]")[0] + "\n")
    assert _rows(site)["LD-02 rev B"].case_file.startswith("edited after issue: uncertainty (the case has no")


def test_a_backup_copy_is_not_compared_and_is_warned_of(site, capsys):
    cases = site / "cases"
    copy = cases / "LD-02 copy.toml"
    shutil.copy(cases / "LD-02.toml", copy)
    _edit(copy, '"2.0 t/h"', '"2.6 t/h"')   # the backup drifts; the case itself is as issued
    row = _rows(site)["LD-02 rev B"]
    assert row.current and row.case_file.startswith("same; warning: 2 case files give LD-02: LD-02.toml")
    assert "LD-02 copy.toml" in row.warnings[0]
    code, text = _cli(["register", site], capsys)
    assert code == 0 and "warning: 2 case files give LD-02" in text
    # And the other way round: the case edited, the backup as issued - the record is not current.
    shutil.copy(cases / "LD-02.toml", copy)
    _edit(cases / "LD-02.toml", '"2.0 t/h"', '"2.6 t/h"')
    row = _rows(site)["LD-02 rev B"]
    assert row.stale == ["case edited after issue"] and "inputs mass_flow" in row.case_file


def test_the_newest_revision_saved_as_the_workbooks_name_it_is_current(site, capsys):
    cases = site / "cases"
    rev_b = cases / "LD-02_revC.toml"
    shutil.copy(cases / "LD-02.toml", rev_b)
    _edit(rev_b, 'revision = "B"', 'revision = "C"')
    _edit(rev_b, '"2.0 t/h"', '"2.2 t/h"')
    # Saved but not issued: revision B is no longer the case.
    row = _rows(site)["LD-02 rev B"]
    assert row.stale == ["case edited after issue"] and "LD-02_revC.toml is at revision C" in row.case_file
    assert _cli(["run", rev_b], capsys)[0] == 0
    rows = _rows(site)
    assert rows["LD-02 rev C"].current and rows["LD-02 rev C"].case_file == "same", rows["LD-02 rev C"].case_file
    assert rows["LD-02 rev C"].warnings == []   # one file per revision, each under steamcalc's name
    assert rows["LD-02 rev B"].superseded == "by revision C" and rows["LD-02 rev B"].case_file == "later revision"
    code, text = _cli(["register", site], capsys)
    assert code == 1 and "superseded by revision C" in text and "case files give" not in text


# -- item 11: one case run refreshes the index --------------------------------------------------------------------

def test_running_one_case_refreshes_the_index(site, capsys):
    records = site / "records"
    case = site / "cases" / "LD-02.toml"
    _edit(case, 'revision = "B"', 'revision = "C"')
    code, text = _cli(["run", case], capsys)
    assert code == 0 and "index refreshed" in text, text
    names = [r["json"] for r in csv.DictReader((records / "index.csv").read_text().splitlines())]
    assert "LD-02_revC.json" in names and "FL-01_revB.json" in names
    row = next(r for r in csv.DictReader((records / "index.csv").read_text().splitlines())
               if r["json"] == "LD-02_revB.json")
    assert row["superseded"] == "by revision C"
    assert "LD-02_revC.html" in (records / "index.html").read_text()


def test_running_one_case_makes_no_index_where_there_was_none(site, tmp_path, capsys):
    out = tmp_path / "elsewhere"
    code, text = _cli(["run", site / "cases" / "LD-02.toml", "--out", out], capsys)
    assert code == 0 and "index refreshed" not in text and "index:" not in text
    assert not (out / "index.html").exists() and not (out / "index.csv").exists()


def test_running_one_case_leaves_a_foreign_index_and_says_so(site, capsys):
    records = site / "records"
    (records / "index.csv").write_text("my,own,spreadsheet\n")
    _edit(site / "cases" / "LD-02.toml", 'revision = "B"', 'revision = "C"')
    code, text = _cli(["run", site / "cases" / "LD-02.toml"], capsys)
    assert code == 0 and "index not refreshed: index.csv" in text
    assert (records / "index.csv").read_text() == "my,own,spreadsheet\n"


# -- item 12: a folder without records ------------------------------------------------------------------------------

def test_verify_and_register_of_a_folder_without_records_exit_2_naming_it(site, tmp_path, capsys):
    empty = tmp_path / "empty"
    empty.mkdir()
    pages = tmp_path / "pages"
    pages.mkdir()
    (pages / "LD-02_revB.html").write_text("<html></html>")
    for folder in (empty, pages):
        for command in ("verify", "register"):
            code, text = _cli([command, folder], capsys)
            assert code == 2 and str(folder) in text and "no records" in text, (command, text)
            assert "Traceback" not in text
    shutil.rmtree(site / "records")
    code, text = _cli(["register", site], capsys)
    assert code == 2 and str(site / "records") in text and "no records folder" in text


# -- item 15: links are relative file links only --------------------------------------------------------------------

def _hrefs(page):
    return re.findall(r"href=['\"]([^'\"]*)['\"]", page.read_text())


def test_every_link_of_the_register_and_the_index_is_a_relative_file_link(site, tmp_path, capsys):
    records = site / "records"
    crafted = ["javascript:alert(1).json", "http:x.json", "data:text,html.json", "?q=1#x.json"]
    for name in crafted:
        shutil.copy(records / "LD-02_revB.json", records / name)
    for page in (records / "register.html", tmp_path / "elsewhere" / "register.html"):
        _cli(["register", site, "--html", page], capsys)
        hrefs = _hrefs(page)
        assert len(hrefs) == 2 + len(crafted)
        for href in hrefs:
            assert re.match(r"\.\.?/", href) and ":" not in href and "?" not in href and "#" not in href, href
            # Each link leads to a record file, from wherever the page is.
            assert (page.parent / unquote(href)).resolve().parent == records.resolve(), href
    assert main(["run", "--quiet", str(site / "cases" / "LD-02.toml"), str(site / "cases" / "FL-01.toml")]) == 0
    for href in _hrefs(records / "index.html"):
        assert href.startswith("./") and ":" not in href and (records / unquote(href)).is_file(), href


@pytest.mark.parametrize("target, base, link", [
    ("javascript:alert(1).json", None, "./javascript%3Aalert%281%29.json"),
    ("//evil.example/x.json", None, "./x.json"),
    ("/s/records/a b.json", "/s/records", "./a%20b.json"),
    ("/s/records/A.json", "/s/out/pages", "../../records/A.json"),
])
def test_file_link(target, base, link):
    assert file_link(target, base) == link
