"""Saving and starting a new plant as an engineer expects.

Run All in a notebook someone has open never saves a record by itself (headless runs still do); the Save
button keeps its size whatever the message beside it; a refused record save offers the next free revision,
as the case-file save does. ``new-site`` copies the template's trusted public keys and every case file (the
revisions the workbooks saved too), never a private key, refuses special files by name, and on a full disk
or a read-only folder says which file and what to do (exit 2, nothing left behind). The README's let-down
example runs as written; the review workbook has the folder's register; the flash chart's log axis writes
its labels in full. These are behaviour checks (common practice for document control: nothing issued
unseen, nothing overwritten); no engineering value is checked here.
"""

import errno
import json
import os
import re
import shutil
import tempfile
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.ui.workbook import Workbook, interactive_session

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "workbooks" / "demo_site"


@pytest.fixture(autouse=True)
def _no_user_settings(tmp_path, monkeypatch):
    monkeypatch.delenv("STEAMCALC_SETTINGS", raising=False)
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "no-config"))
    monkeypatch.delenv("JPY_SESSION_NAME", raising=False)


@pytest.fixture
def site(tmp_path):
    folder = tmp_path / "demo_site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    return folder


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    said = capsys.readouterr()
    return code, said.out + said.err


def _clean_refusal(code, text, *names):
    return code == 2 and "internal error" not in text and "Traceback" not in text and all(n in text for n in names)


# -- the workbook's record save ---------------------------------------------------------------------------------

def test_run_all_in_an_open_notebook_saves_nothing_but_a_headless_run_does(site, tmp_path, monkeypatch):
    records = tmp_path / "records"
    workbook = Workbook(site / "cases" / "LD-02.toml", records)
    monkeypatch.setenv("JPY_SESSION_NAME", str(ROOT / "workbooks" / "letdown.ipynb"))   # as a Jupyter server sets it
    assert interactive_session()
    said = workbook.save()
    assert said.startswith("not saved by Run All: press Save record") and "LD-02 rev B" in said
    assert not records.exists() or not list(records.glob("*.json"))
    workbook._on_save()   # the button saves, in the session too
    assert "New record saved" in workbook._save_status.value and (records / "LD-02_revB.json").exists()
    monkeypatch.delenv("JPY_SESSION_NAME")
    assert workbook.save().startswith("unchanged, kept: record LD-02 rev B")   # headless: the save cell saves


def test_the_save_button_keeps_its_size_after_a_refusal(site, tmp_path):
    workbook = Workbook(site / "cases" / "LD-02.toml", tmp_path / "records")
    view = workbook.save_view()
    button = workbook._save_button
    assert (button.layout.min_width, button.layout.flex) == ("12em", "0 0 auto")
    assert workbook._save_status.layout.flex == "1 1 auto" and workbook._save_status.layout.min_width == "0"
    workbook.save()
    workbook.form.boxes["mass_flow"].value = "2.2 t/h"
    workbook._on_save()
    assert "steamcalc-save-refused" in workbook._save_status._dom_classes
    assert (button.description, button.layout.min_width, button.layout.flex) == ("Save record", "12em", "0 0 auto")
    assert view.children[0] is button and "white-space:normal" in workbook._save_status.value


def test_a_refused_record_save_offers_the_next_free_revision_and_saves_under_it(site, tmp_path):
    records = tmp_path / "records"
    workbook = Workbook(site / "cases" / "LD-02.toml", records)
    workbook.save()
    # Revision C is taken by another record already: D is the one offered.
    other = json.loads((records / "LD-02_revB.json").read_text())
    (records / "LD-02_revC.json").write_text(json.dumps(dict(other, revision="C")))
    workbook.form.boxes["mass_flow"].value = "2.2 t/h"
    said = workbook.save()
    assert said.startswith("not saved") and "save them as revision D" in said and "raise the Revision box" in said
    workbook._on_save()
    offer = workbook._save_next
    assert offer.layout.display is None and offer.description == "Save as revision D"
    offer.click()
    assert workbook._revision.value == "D" and (records / "LD-02_revD.json").exists()
    assert json.loads((records / "LD-02_revD.json").read_text())["inputs"]["mass_flow"]["given"] == "2.2 t/h"
    assert "New record saved" in workbook._save_status.value and offer.layout.display == "none"


def test_the_next_free_revision_skips_a_revision_saved_as_a_case_file(site, tmp_path):
    workbook = Workbook(site / "cases" / "LD-02.toml", tmp_path / "records")
    (site / "cases" / "LD-02_revC.toml").write_text((site / "cases" / "LD-02.toml").read_text())
    assert workbook.next_free_revision() == "D"


# -- new-site ---------------------------------------------------------------------------------------------------

@pytest.fixture
def template(site, tmp_path):
    """The demo site with two trusted public keys and a revision the workbook saved as a case file."""
    assert main(["keys", "new", "--name", "C. Checker", "--out", str(tmp_path / "keys")]) == 0
    assert main(["keys", "new", "--name", "D. Approver", "--out", str(tmp_path / "keys")]) == 0
    for name in ("c-checker.pub", "d-approver.pub"):
        shutil.copy(tmp_path / "keys" / name, site / "trusted_signers" / name)
    text = (site / "cases" / "LD-01.toml").read_text().replace('revision = "B"', 'revision = "C"')
    (site / "cases" / "LD-01_revC.toml").write_text(text.replace('mass_flow = "4.5 t/h"', 'mass_flow = "5 t/h"'))
    return site


def test_new_site_copies_the_trusted_keys_and_every_case_file(template, tmp_path, capsys):
    target = tmp_path / "plant2"
    code, text = _run(["new-site", target, "--from", template], capsys)
    assert code == 0, text
    assert sorted(p.name for p in (target / "trusted_signers").iterdir()) == [
        "README.txt", "c-checker.pub", "d-approver.pub"]
    for name in ("c-checker.pub", "d-approver.pub"):
        assert (target / "trusted_signers" / name).read_bytes() == (template / "trusted_signers" / name).read_bytes()
    assert sorted(p.name for p in (target / "cases").iterdir()) == sorted(p.name for p in (template / "cases").iterdir())
    assert (target / "cases" / "LD-01_revC.toml").read_text() == (template / "cases" / "LD-01_revC.toml").read_text()
    assert not (target / "records").exists() and not list(tmp_path.glob(".plant2.*"))
    # The keys are the new plant's trusted signers: verify names them.
    assert main(["run", str(target / "cases" / "LD-02.toml"), "--quiet"]) == 0
    code, text = _run(["sign", target / "records" / "LD-02_revB.json", "--key", tmp_path / "keys" / "c-checker.key"],
                      capsys)
    assert code == 0, text
    code, text = _run(["verify", target / "records" / "LD-02_revB.json"], capsys)
    assert code == 0 and "valid, trusted" in text and f"{target.resolve() / 'trusted_signers'} (2 keys" in text


@pytest.mark.parametrize("name", ["c-checker.key", "c-checker-copy.pub"], ids=["named .key", "named .pub"])
def test_new_site_never_copies_a_private_key(template, tmp_path, capsys, name):
    shutil.copy(tmp_path / "keys" / "c-checker.key", template / "trusted_signers" / name)
    target = tmp_path / "plant2"
    code, text = _run(["new-site", target, "--from", template], capsys)
    assert _clean_refusal(code, text, name, "private key", "Fix:")
    assert not target.exists() and not list(tmp_path.glob(".plant2.*"))


def test_new_site_refuses_a_pipe_in_the_template_at_once(template, tmp_path, capsys):
    os.mkfifo(template / "cases" / "LD-09.toml")
    code, text = _run(["new-site", tmp_path / "plant2", "--from", template], capsys)
    assert _clean_refusal(code, text, "LD-09.toml", "not a regular file")
    assert not (tmp_path / "plant2").exists()


@pytest.mark.parametrize("number", [errno.ENOSPC, errno.EDQUOT])
def test_new_site_on_a_full_disk_names_the_file_and_leaves_nothing(template, tmp_path, capsys, monkeypatch, number):
    real = os.write
    written = []

    def write(fd, data):
        target = os.readlink(f"/proc/self/fd/{fd}")
        if target.startswith(str(tmp_path / ".plant2.")):
            written.append(target)
            if len(written) > 3:   # some files fit, then the disk is full
                raise OSError(number, os.strerror(number))
        return real(fd, data)
    monkeypatch.setattr(os, "write", write)
    code, text = _run(["new-site", tmp_path / "plant2", "--from", template], capsys)
    assert _clean_refusal(code, text, str(tmp_path / "plant2"), os.strerror(number), "Fix:", "nothing was left behind")
    assert re.search(rf"{re.escape(str(tmp_path / 'plant2'))}/\S+: could not write the new site's file", text)
    assert not (tmp_path / "plant2").exists() and not list(tmp_path.glob(".plant2.*"))


@pytest.mark.parametrize("number, fix", [(errno.EROFS, "writable drive"), (errno.EACCES, "you may write to")])
def test_new_site_into_a_read_only_folder_names_it_and_the_fix(template, tmp_path, capsys, monkeypatch, number, fix):
    def mkdtemp(*args, **kwargs):
        raise OSError(number, os.strerror(number))
    monkeypatch.setattr(tempfile, "mkdtemp", mkdtemp)
    code, text = _run(["new-site", tmp_path / "plant2", "--from", template], capsys)
    assert _clean_refusal(code, text, str(tmp_path / "plant2"), os.strerror(number), fix)
    assert not (tmp_path / "plant2").exists()


def test_new_site_without_a_template_finds_the_demo_site_from_any_folder(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    code, text = _run(["new-site", "plant2"], capsys)
    assert code == 0, text
    assert (tmp_path / "plant2" / "cases" / "LD-01.toml").exists() and (tmp_path / "plant2" / "letdown.ipynb").exists()


# -- the README's example, the review workbook's register, the flash chart's axis, the relief table ----------------

def test_the_readme_let_down_example_runs_as_written(tmp_path, capsys):
    readme = (ROOT / "README.md").read_text()
    example = next(b for b in re.findall(r"```toml\n(.*?)```", readme, re.S) if 'id = "LD-01"' in b)
    assert "relief_set_pressure" not in example and "[inputs.relief]" in example
    (tmp_path / "cases").mkdir()
    shutil.copy(DEMO / "site.toml", tmp_path / "site.toml")
    (tmp_path / "cases" / "LD-01.toml").write_text(example)
    code, text = _run(["run", tmp_path / "cases" / "LD-01.toml"], capsys)
    assert code == 0 and "LD-01 rev B: WARN - written" in text and "superseded" not in text, text
    record = json.loads((tmp_path / "records" / "LD-01_revB.json").read_text())
    assert record["inputs"]["set_pressure"]["given"] == "4.5 bar(g)"


def test_the_review_workbook_shows_the_register_of_the_folder(site, tmp_path, monkeypatch):
    from steamcalc.ui.review import ReviewBook

    assert main(["run", str(site / "cases"), "--quiet"]) in (0, 1)
    monkeypatch.chdir(site.parent)
    book = ReviewBook(site / "records" / "LD-02_revB.json")
    view = book.register_view()
    table = view.children[1]
    assert "Build the register" in table.value
    view.children[0].children[0].click()
    demo = len(list((DEMO / "cases").glob("*.toml")))
    assert f"{demo} of {demo} records" in table.value and "trusted signers:" in table.value
    assert table.value.count("<tr>") == demo + 1 and "href='./demo_site/records/LD-02_revB.json'" in table.value
    notebook = json.loads((ROOT / "workbooks" / "review.ipynb").read_text())
    cells = [c for c in notebook["cells"] if c["cell_type"] == "code" and "register_view" in "".join(c["source"])]
    assert len(cells) == 1 and "nbval-ignore-output" in cells[0]["metadata"]["tags"]


def test_the_flash_chart_writes_its_log_axis_labels_in_full(site, tmp_path):
    from steamcalc.ui.charts import record_charts

    workbook = Workbook(site / "cases" / "FL-02.toml", tmp_path / "records")
    figures, _ = record_charts(workbook.record)
    log_axes = [axis for figure in figures for axis in (figure.layout.xaxis, figure.layout.yaxis)
                if axis.type == "log"]
    assert log_axes and all(axis.tickformat == "~g" for axis in log_axes)


def test_the_workbook_relief_table_writes_units_as_people_do(site, tmp_path):
    workbook = Workbook(site / "cases" / "LD-01.toml", tmp_path / "records")
    table = workbook._table.value
    relief = table[table.index("Relief device"):]
    relief = relief[:relief.index("</table>")]
    cells = re.findall(r"<td[^>]*>([^<]*)</td>", relief)
    assert "°C" in cells and "%" in cells and "bar(a)" in cells and "mm²" in cells
    assert not {"degC", "percent", "bar", "mm**2"} & set(cells)
