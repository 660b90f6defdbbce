"""Cross-field refusals in the workbook form: the box just edited is marked, the box it conflicts with is
named (and marked dashed), and every value is written in the units typed in its box - never as the SI
number the calculation holds ("given: 1599181.2344114645") nor as a raw "inf" or "nan"."""

import html
import re
import shutil

import pytest

from steamcalc.calcs import get_calculation
from steamcalc.errors import InputError, given_text
from steamcalc.ui.forms import CONFLICT_CLASS, ERROR_CLASS, CaseForm, alternatives_for, given_in_box_units
from steamcalc.ui.workbook import Workbook

#: An SI number as Python writes it: many digits, or inf / nan, after "given:".
RAW_GIVEN = re.compile(r"given: (?:-?\d{7,}|\d+\.\d{6,}|-?inf|nan)\b")


@pytest.fixture
def letdown(tmp_path, demo_site_dir):
    folder = tmp_path / "demo_site"
    shutil.copytree(demo_site_dir, folder, ignore=shutil.ignore_patterns("records"))
    return Workbook(folder / "cases" / "LD-01.toml", tmp_path / "records")


def _text(widget_html):
    return " ".join(html.unescape(re.sub(r"<style>.*?</style>|<[^>]+>", " ", widget_html)).split())


def _refused(workbook):
    return [name for name, box in workbook.form.boxes.items() if ERROR_CLASS in box._dom_classes]


def _conflicting(workbook):
    return [name for name, box in workbook.form.boxes.items() if CONFLICT_CLASS in box._dom_classes]


def test_a_flow_typed_above_the_maximum_marks_the_flow_box_and_names_the_maximum(letdown):
    letdown.form.boxes["mass_flow"].value = "20 t/h"
    assert _refused(letdown) == ["mass_flow"]                 # the box just edited, not one further down
    assert _conflicting(letdown) == ["max_flow"]
    beside = _text(letdown.form.messages["mass_flow"].value)
    assert "Steam flow (20 t/h) conflicts with Maximum flow (5.5 t/h)" in beside
    assert "the maximum flow is below the normal flow" in beside
    assert "In conflict with Steam flow (20 t/h), just changed" in _text(letdown.form.messages["max_flow"].value)
    assert "Correct the Steam flow box" in _text(letdown._message.value)
    letdown.form.boxes["mass_flow"].value = "5 t/h"           # put right: no mark is left anywhere
    assert letdown.error is None and _refused(letdown) == [] and _conflicting(letdown) == []
    assert letdown.form.messages["max_flow"].value == ""


@pytest.mark.parametrize("field, typed, other, other_typed", [
    ("inlet_pressure", "19 bar(g)", "Highest upstream pressure", "18 bar(g)"),
    ("outlet_pressure", "17 bar(g)", "Lowest upstream pressure", "15 bar(g)"),
])
def test_pressures_in_a_cross_field_refusal_are_as_typed_in_their_boxes(letdown, field, typed, other, other_typed):
    letdown.form.boxes[field].value = typed
    assert _refused(letdown) == [field]
    shown = letdown.error + _text(letdown.form.messages[field].value) + _text(letdown._message.value)
    assert f"conflicts with {other} ({other_typed})" in shown
    assert not RAW_GIVEN.search(shown), shown
    assert "159918" not in shown and "189918" not in shown


def test_a_single_box_refusal_gives_the_pressure_as_typed_not_in_pascal(letdown):
    letdown.form.boxes["max_inlet_pressure"].value = "14 bar(g)"
    assert _refused(letdown) == ["max_inlet_pressure"] and _conflicting(letdown) == []
    beside = _text(letdown.form.messages["max_inlet_pressure"].value)
    assert "(given: 14 bar(g))" in beside and "14.99 bar(a)" in beside
    assert not RAW_GIVEN.search(beside)


@pytest.mark.parametrize("field, typed", [("xt", "inf"), ("fl", "1e400"), ("rangeability", "nan"),
                                          ("mass_flow", "inf")])
def test_infinite_or_not_a_number_is_said_in_words(letdown, field, typed):
    letdown.form.boxes[field].value = typed
    beside = _text(letdown.form.messages[field].value)
    assert "Not accepted" in beside
    assert ("given: infinite" in beside) or ("given: not a number" in beside)
    assert not RAW_GIVEN.search(beside) and "given: inf)" not in beside


def test_an_unrelated_edit_does_not_move_the_blame(letdown):
    letdown.form.boxes["mass_flow"].value = "20 t/h"
    letdown.form.boxes["noise_limit"].value = "86 dB(A)"       # the same refusal stands
    assert _refused(letdown) == ["mass_flow"] and _conflicting(letdown) == ["max_flow"]


def test_a_refusal_standing_before_any_edit_stays_at_its_own_box(tmp_path, demo_site_dir):
    folder = tmp_path / "demo_site"
    shutil.copytree(demo_site_dir, folder, ignore=shutil.ignore_patterns("records"))
    case = folder / "cases" / "LD-01.toml"
    case.write_text(case.read_text().replace('max_flow = "5.5 t/h"', 'max_flow = "4 t/h"'))
    workbook = Workbook(case, tmp_path / "records")
    assert _refused(workbook) == ["max_flow"] and _conflicting(workbook) == []
    workbook.form.boxes["noise_limit"].value = "86 dB(A)"      # an unrelated box: not blamed
    assert _refused(workbook) == ["max_flow"]


def test_the_form_without_edits_marks_the_box_the_error_names():
    calc = get_calculation("letdown")
    form = CaseForm(calc.Inputs, {"max_inlet_pressure": "14 bar(g)"}, alternatives=alternatives_for(calc))
    exc = InputError("the highest upstream pressure 14.99 bar(a) is below the inlet pressure 16.99 bar(a)",
                     field="valve.max_inlet_pressure", value=1499181.2344114645)
    assert form.show_error(exc) == "max_inlet_pressure"
    assert "(given: 14 bar(g))" in _text(form.messages["max_inlet_pressure"].value)


# Values held in SI written in the units typed in the box (the conversions by pint; a gauge reading is given
# back as typed when the absolute value stands an atmosphere above it, ISO 2533 range of inhabited places).
@pytest.mark.parametrize("value, kind, typed, written", [
    (1499181.2344114645, "pressure", "14 bar(g)", "14 bar(g)"),
    (1499181.2344114645, "pressure", "header:HP", "header:HP, 14.99 bar(a)"),
    (1499181.2344114645, "pressure", "", "14.99 bar(a)"),
    (1000000.0, "pressure", "145.0377 psia", "145 psia"),
    (5.555555555555555, "mass_flow", "20 t/h", "20 t/h"),
    (5.555555555555555, "mass_flow", "", "20,000 kg/h"),
    (422.03888888888889, "temperature", "300 degF", "300 degF"),
    (0.3, "fraction", "30 %", "30 %"),
    (0.5, "number", "0.5", "0.5"),
    (30000.0, "pressure_difference", "0.3 bar", "0.3 bar"),
])
def test_values_are_written_in_the_units_typed(value, kind, typed, written):
    assert given_in_box_units(value, kind, typed) == written


@pytest.mark.parametrize("value, message, written", [
    (float("inf"), "", "infinite"), (float("-inf"), "", "minus infinite"), (float("nan"), "", "not a number"),
    (1599181.2344114645, "the lowest upstream pressure 15.99 bar(a) is not above", ""),   # stated already
    (0.3, "accumulation 30 % is outside 0-21 %", ""),
    (1.2, "rangeability must be above 1", "1.2"),          # a limit in the message is not the value
    (1599181.2344114645, "no number here", "1.59918e+06"),
    ("16 barg", "", "'16 barg'"),
])
def test_the_error_itself_never_writes_a_raw_si_number_or_inf(value, message, written):
    assert given_text(value, message) == written


def test_the_command_line_message_states_a_pressure_once():
    exc = InputError("the lowest upstream pressure 15.99 bar(a) is not above the outlet pressure 17.99 bar(a)",
                     field="valve.min_inlet_pressure", value=1599181.2344114645, fix="check the pressure")
    assert "given" not in str(exc) and "1599181" not in str(exc)
