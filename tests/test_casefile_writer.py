"""Saving a case file from edited inputs: read back it gives the same Inputs and given texts; an
existing case file is never overwritten; the next free revision is named."""

import dataclasses
import shutil
import threading
import tomllib
from pathlib import Path

import pytest

from steamcalc.calcs import get_calculation
from steamcalc.cases.casefile_writer import (
    case_file_name, free_revision, next_revision, save_case, toml_text, write_new_file,
)
from steamcalc.errors import CaseFileError
from steamcalc.cases.site import case_inputs, case_site, flatten_inputs, load_case
from steamcalc.ui.forms import CaseForm

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
CASE_IDS = ("LD-01", "LD-02", "FL-01", "FL-02", "HX-01")


@pytest.fixture
def site(tmp_path):
    shutil.copytree(DEMO, tmp_path / "site", ignore=shutil.ignore_patterns("records"))
    return tmp_path / "site"


def _inputs_of(path):
    case = load_case(path)
    return case, case_inputs(case, case_site(case))


@pytest.mark.parametrize("case_id", CASE_IDS)
def test_round_trip_from_the_case_file(site, case_id):
    case, (inputs, given) = _inputs_of(site / "cases" / f"{case_id}.toml")
    calc = get_calculation(case.kind)
    saved = save_case(dataclasses.replace(case, revision="C"), flatten_inputs(calc.Inputs, case.inputs), calc.Inputs)
    assert saved.status == "written" and saved.path.name == f"{case_id}_revC.toml"
    again, (inputs_back, given_back) = _inputs_of(saved.path)
    assert inputs_back == inputs and given_back == given
    assert (again.revision, again.title, again.prepared_by, again.notes, again.uncertainty) == \
        ("C", case.title, case.prepared_by, case.notes, case.uncertainty)
    assert again.site_path.resolve() == case.site_path.resolve()


@pytest.mark.parametrize("case_id", CASE_IDS)
def test_round_trip_from_the_workbook_form(site, case_id):
    # What the workbook's button saves: the form's values (numbers typed in boxes come back as floats).
    case, (inputs, given) = _inputs_of(site / "cases" / f"{case_id}.toml")
    calc = get_calculation(case.kind)
    form = CaseForm(calc.Inputs, flatten_inputs(calc.Inputs, case.inputs))
    saved = save_case(dataclasses.replace(case, revision="D"), form.values(), calc.Inputs)
    _, (inputs_back, given_back) = _inputs_of(saved.path)
    assert inputs_back == inputs and given_back == given


def test_the_given_texts_are_kept_as_typed(site):
    case = load_case(site / "cases" / "LD-01.toml")
    calc = get_calculation(case.kind)
    values = {**flatten_inputs(calc.Inputs, case.inputs), "inlet_pressure": "16.2 bar(g)", "mass_flow": "4.8 t/h"}
    saved = save_case(dataclasses.replace(case, revision="C"), values, calc.Inputs)
    table = tomllib.loads(saved.path.read_text(encoding="utf-8"))
    assert table["inputs"]["inlet_pressure"] == "16.2 bar(g)" and table["inputs"]["mass_flow"] == "4.8 t/h"
    assert table["inputs"]["outlet_pressure"] == "header:LP"
    assert table["inputs"]["desuperheater"]["water_pressure"] == "20 bar(g)"


def test_same_inputs_as_the_opened_file_are_kept_not_written_again(site):
    case = load_case(site / "cases" / "FL-02.toml")
    calc = get_calculation(case.kind)
    form = CaseForm(calc.Inputs, flatten_inputs(calc.Inputs, case.inputs))
    before = sorted(p.name for p in (site / "cases").iterdir())
    saved = save_case(case, form.values(), calc.Inputs)
    assert saved.status == "unchanged" and saved.path.name == "FL-02.toml"
    assert sorted(p.name for p in (site / "cases").iterdir()) == before


def test_changed_inputs_under_the_same_revision_are_refused_with_the_next_revision(site):
    path = site / "cases" / "LD-01.toml"
    original = path.read_bytes()
    case = load_case(path)
    calc = get_calculation(case.kind)
    values = {**flatten_inputs(calc.Inputs, case.inputs), "mass_flow": "4.8 t/h"}
    with pytest.raises(CaseFileError) as refused:
        save_case(case, values, calc.Inputs)
    text = str(refused.value)
    assert "LD-01.toml" in text and "not overwritten" in text and "LD-01_revC.toml" in text
    assert path.read_bytes() == original and not (site / "cases" / "LD-01_revB.toml").exists()
    # The second attempt at revision C writes C; a third with other inputs is refused, naming D.
    assert save_case(dataclasses.replace(case, revision="C"), values, calc.Inputs).status == "written"
    first = (site / "cases" / "LD-01_revC.toml").read_bytes()
    with pytest.raises(CaseFileError, match="LD-01_revD.toml"):
        save_case(dataclasses.replace(case, revision="C"), {**values, "mass_flow": "5 t/h"}, calc.Inputs)
    assert (site / "cases" / "LD-01_revC.toml").read_bytes() == first
    assert save_case(dataclasses.replace(case, revision="C"), values, calc.Inputs).status == "unchanged"


def test_a_taken_file_name_is_never_replaced(site):
    taken = site / "cases" / "HX-01_revC.toml"
    taken.write_text("# someone's notes, not a case file\n", encoding="utf-8")
    case = load_case(site / "cases" / "HX-01.toml")
    calc = get_calculation(case.kind)
    with pytest.raises(CaseFileError, match="already exists.*HX-01_revD.toml"):
        save_case(dataclasses.replace(case, revision="C"), flatten_inputs(calc.Inputs, case.inputs), calc.Inputs)
    assert taken.read_text(encoding="utf-8") == "# someone's notes, not a case file\n"
    assert free_revision(site / "cases", "HX-01", "B") == "D"


def test_two_savers_at_once_one_writes_the_others_are_refused(site):
    case = dataclasses.replace(load_case(site / "cases" / "LD-02.toml"), revision="C")
    calc = get_calculation(case.kind)
    flat = flatten_inputs(calc.Inputs, case.inputs)
    outcomes = []

    def saver(number):
        try:
            outcomes.append(save_case(case, {**flat, "mass_flow": f"{2 + number / 10:g} t/h"}, calc.Inputs).status)
        except CaseFileError:
            outcomes.append("refused")

    threads = [threading.Thread(target=saver, args=(n,)) for n in range(8)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert sorted(outcomes) == ["refused"] * 7 + ["written"]
    assert not [p for p in (site / "cases").iterdir() if p.name.endswith(".partial")]
    load_case(site / "cases" / "LD-02_revC.toml")                      # whole and readable


def test_write_new_file_refuses_an_existing_name(tmp_path):
    write_new_file(tmp_path / "a.toml", "x = 1\n")
    with pytest.raises(FileExistsError):
        write_new_file(tmp_path / "a.toml", "x = 2\n")
    assert (tmp_path / "a.toml").read_text() == "x = 1\n"
    assert [p.name for p in tmp_path.iterdir()] == ["a.toml"]


def test_hostile_texts_round_trip(site):
    case = load_case(site / "cases" / "FL-01.toml")
    calc = get_calculation(case.kind)
    odd = 'Flash "A" \\ tank\tone\u00e9\u2013\u202e end'
    case = dataclasses.replace(case, revision="C", title=odd, prepared_by="O'Neil \"the checker\"",
                               notes=("line one\nline two", "\x01 control", "[not a table]"))
    saved = save_case(case, flatten_inputs(calc.Inputs, case.inputs), calc.Inputs)
    again = load_case(saved.path)
    assert (again.title, again.prepared_by, again.notes) == (case.title, case.prepared_by, case.notes)


def test_text_that_cannot_be_encoded_is_refused_and_leaves_no_partial_file(site):
    # A lone surrogate (a browser can send one) raised UnicodeEncodeError and left '.LD-01_revC.toml.*.partial'
    case = load_case(site / "cases" / "LD-01.toml")
    calc = get_calculation(case.kind)
    with pytest.raises(CaseFileError) as info:
        save_case(dataclasses.replace(case, revision="C", title="half \ud800 pair"),
                  flatten_inputs(calc.Inputs, case.inputs), calc.Inputs)
    assert info.value.fix
    assert sorted(p.name for p in (site / "cases").iterdir()) == sorted(p.name for p in (DEMO / "cases").iterdir())


@pytest.mark.parametrize("field, value", [("id", "../../evil"), ("revision", "../x"), ("revision", "a/b"),
                                          ("revision", "\uff22"), ("id", ".hidden")])
def test_an_id_or_revision_that_is_not_a_plain_file_name_is_refused(site, field, value):
    # save_case took id and revision as given: '../../evil' was written two folders up
    case = load_case(site / "cases" / "LD-01.toml")
    calc = get_calculation(case.kind)
    with pytest.raises(CaseFileError) as info:
        save_case(dataclasses.replace(case, **{field: value}), flatten_inputs(calc.Inputs, case.inputs), calc.Inputs)
    assert info.value.field == field
    assert not list(site.parent.rglob("*evil*")) and not list(site.parent.rglob("*_rev*"))


@pytest.mark.parametrize("revision, expected", [
    ("A", "B"), ("Z", "AA"), ("AZ", "BA"), ("b", "c"), ("1", "2"), ("09", "10"), ("B1", "B2"), ("1.2", "1.3"),
    ("P-", "P-1"),
])
def test_next_revision(revision, expected):
    assert next_revision(revision) == expected


def test_toml_text_round_trips_values():
    document = {"case": {"id": "X", "n": 3, "f": 0.1, "on": True}, "inputs": {"list": ["a", "b"], "t": {"k": 1.5}}}
    assert tomllib.loads(toml_text(document)) == document
    assert case_file_name("X", "B") == "X_revB.toml"


def test_round_trip_of_a_list_of_stage_pressures(site):
    text = (site / "cases" / "FL-02.toml").read_text(encoding="utf-8")
    text = text.replace('id = "FL-02"', 'id = "FL-09"')
    lines = [line for line in text.splitlines() if not line.startswith(("flash_pressure", "vented"))]
    lines.insert(lines.index("[inputs]") + 1, 'stages = ["8 bar(g)", "header:LP"]')
    (site / "cases" / "FL-09.toml").write_text("\n".join(lines) + "\n", encoding="utf-8")
    case, (inputs, given) = _inputs_of(site / "cases" / "FL-09.toml")
    calc = get_calculation(case.kind)
    form = CaseForm(calc.Inputs, flatten_inputs(calc.Inputs, case.inputs))
    saved = save_case(dataclasses.replace(case, revision="C"), form.values(), calc.Inputs)
    assert tomllib.loads(saved.path.read_text(encoding="utf-8"))["inputs"]["stages"] == ["8 bar(g)", "header:LP"]
    _, (inputs_back, given_back) = _inputs_of(saved.path)
    assert inputs_back == inputs and given_back == given


def test_workbook_save_case_button_headless(site):
    from steamcalc.ui.workbook import Workbook

    wb = Workbook(site / "cases" / "FL-01.toml", site / "records")
    saver = wb._case_saver
    assert saver.save().startswith("unchanged, kept") and "FL-01.toml" in saver.save()
    wb.form.boxes["condensate_flow"].value = "3.6 t/h"
    text = saver.save()
    assert text.startswith("not saved") and "Raise the Revision box above to C" in text
    saver._on_click()
    assert saver.next_button.description == "Save as revision C" and saver.next_button.layout.display is None
    saver._save_as_next()
    assert wb._revision.value == "C" and "case file saved" in saver.status.value
    assert tomllib.loads((site / "cases" / "FL-01_revC.toml").read_text(encoding="utf-8"))["case"]["revision"] == "C"
    assert saver.next_button.layout.display == "none"
    wb.form.boxes["condensate_flow"].value = "lots"
    assert saver.save().startswith("not saved: the inputs are not accepted")
