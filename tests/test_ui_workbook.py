"""The live workbook without a browser: stale marking, the live summary, the cascade example, saving, bands."""

import re
import shutil

import nbformat
import pytest

from steamcalc.ui.forms import ERROR_CLASS
from steamcalc.ui.workbook import STALE_CLASS, Workbook


@pytest.fixture
def site(tmp_path, demo_site_dir):
    folder = tmp_path / "demo_site"
    shutil.copytree(demo_site_dir, folder, ignore=shutil.ignore_patterns("records"))
    return folder


def _views(workbook):
    return [workbook._results_html, workbook._chart, workbook._table, workbook._preview]


def test_refused_input_marks_every_view_stale_until_fixed(site, tmp_path):
    workbook = Workbook(site / "cases" / "FL-01.toml", tmp_path / "records")
    workbook.results_view(), workbook.chart_view(), workbook.preview_view()
    before = workbook.record
    workbook.form.boxes["condensate_flow"].value = "3.2 t"
    assert ERROR_CLASS in workbook.form.boxes["condensate_flow"]._dom_classes
    beside = workbook.form.messages["condensate_flow"].value
    assert "Not accepted" in beside and "Condensate flow" in beside
    assert all(STALE_CLASS in view._dom_classes for view in _views(workbook))
    assert all(banner.layout.display is None for banner in workbook._banners)
    assert "Stale: an input above is not accepted" in workbook._results_html.value
    assert workbook._save_button.disabled
    assert workbook.record is before                             # the last accepted result stays, marked
    assert workbook._summary.value.count("INPUT NOT ACCEPTED") == 1

    workbook.form.boxes["condensate_flow"].value = "3.5 t/h"
    assert ERROR_CLASS not in workbook.form.boxes["condensate_flow"]._dom_classes
    assert workbook.form.messages["condensate_flow"].value == ""
    assert not any(STALE_CLASS in view._dom_classes for view in _views(workbook))
    assert all(banner.layout.display == "none" for banner in workbook._banners)
    assert not workbook._save_button.disabled
    assert "3,500" in workbook._summary.value and "INPUT NOT ACCEPTED" not in workbook._summary.value


def test_the_summary_view_follows_every_change_and_is_plain_text_headless(site, tmp_path):
    workbook = Workbook(site / "cases" / "LD-02.toml", tmp_path / "records")
    view = workbook.summary_view()
    assert view._repr_mimebundle_()["text/plain"] == workbook.summary(compute_bands=False)
    workbook.form.boxes["mass_flow"].value = "2.5 t/h"
    assert "2,500" in view.value
    assert view._repr_mimebundle_()["text/plain"] == workbook.summary(compute_bands=False)


def _cascade_example(notebook):
    text = "".join(cell.source for cell in nbformat.read(notebook, as_version=4).cells if cell.cell_type == "markdown")
    match = re.search(r"for example\s+`([^`]+)`", text)
    assert match, "the flash workbook's cascade example is missing"
    return match.group(1)


def test_the_flash_workbooks_cascade_example_runs_as_shown_on_the_demo_case(site, tmp_path, demo_site_dir):
    example = _cascade_example(demo_site_dir.parent / "flash_recovery.ipynb")
    workbook = Workbook(site / "cases" / "FL-01.toml", tmp_path / "records")
    workbook.form.boxes["stages"].value = example          # typed as shown; nothing else touched
    assert workbook.error is None
    assert workbook.form.boxes["flash_pressure"].value == ""
    assert "Flash pressure (it was header:LP) emptied" in workbook.form.messages["stages"].value
    assert workbook.record["inputs"]["stages"]["given"] == example
    assert "stage_2_flash_fraction" in workbook.record["results"]


def test_a_first_stage_at_the_condensate_pressure_is_still_refused(site, tmp_path):
    workbook = Workbook(site / "cases" / "FL-01.toml", tmp_path / "records")
    workbook.form.boxes["stages"].value = "8 bar(g), 2.5 bar(g)"
    assert workbook.error is not None and "Cascade stage pressures, item 1" in workbook.error
    assert "below the condensate pressure" in workbook.form.messages["stages"].value


def test_second_save_says_unchanged_kept_and_links_the_files(site, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    workbook = Workbook(site / "cases" / "LD-02.toml", "records")
    workbook._on_save()
    first = workbook._save_status.value
    assert "New record saved" in first and "steamcalc-save-written" in workbook._save_status._dom_classes
    assert "href='records/LD-02_revB.json'" in first and "href='records/LD-02_revB.html'" in first
    workbook._on_save()
    second = workbook._save_status.value
    assert "Unchanged, kept" in second and "New record saved" not in second
    assert "steamcalc-save-unchanged" in workbook._save_status._dom_classes
    assert workbook.save().startswith("unchanged, kept: record LD-02 rev B")


def test_a_changed_record_under_the_same_revision_tells_to_raise_the_revision_box(site, tmp_path):
    workbook = Workbook(site / "cases" / "LD-02.toml", tmp_path / "records")
    workbook.save()
    workbook.form.boxes["mass_flow"].value = "2.2 t/h"
    said = workbook.save()
    assert said.startswith("not saved") and "raise the Revision box" in said
    assert "[case]" not in said and "case file" not in said
    workbook._revision.value = "C"
    assert workbook.save().startswith("saved: record LD-02 rev C")


def test_a_bad_revision_is_refused_beside_the_revision_box(site, tmp_path):
    workbook = Workbook(site / "cases" / "LD-02.toml", tmp_path / "records")
    workbook._revision.value = "B/1"
    assert "Revision not accepted" in workbook._revision_message.value and workbook._save_button.disabled
    workbook._revision.value = "B"
    assert workbook._revision_message.value == "" and not workbook._save_button.disabled


def test_bands_button_is_disabled_and_says_computing_while_it_runs(site, tmp_path, monkeypatch):
    import steamcalc.ui.workbook as module

    workbook = Workbook(site / "cases" / "LD-01.toml", tmp_path / "records")
    seen = []
    real = module.record_for_case

    def watching(*args, **kwargs):
        button = workbook._bands_button
        seen.append((button.disabled, button.description, "computing…" in workbook._bands.value))
        return real(*args, **kwargs)

    monkeypatch.setattr(module, "record_for_case", watching)
    assert workbook.compute_uncertainty() is not None
    assert seen == [(True, "computing…", True)]
    assert not workbook._bands_button.disabled and workbook._bands_button.description == "Compute bands"
    assert "coverage" in workbook._bands.value
