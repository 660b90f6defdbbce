"""The input form without a browser: help lines and tooltips, alternatives, refused inputs beside their box."""

import pytest

from steamcalc.calcs import get_calculation
from steamcalc.calcs.base import input_fields
from steamcalc.errors import InputError
from steamcalc.ui.forms import ERROR_CLASS, CaseForm, alternatives_for
from steamcalc.ui.wording import FormWords


def _form(kind, values):
    calc = get_calculation(kind)
    return CaseForm(calc.Inputs, values, headers=("HP", "MP", "LP"), alternatives=alternatives_for(calc))


@pytest.mark.parametrize("kind", ["letdown", "flash", "exchanger"])
def test_every_box_shows_its_help_as_tooltip_and_description_line(kind):
    form = _form(kind, {})
    words = FormWords(get_calculation(kind).Inputs)
    for f in input_fields(get_calculation(kind).Inputs):
        sentence = words.text(f.metadata["help"])
        assert form.boxes[f.name].tooltip.startswith(sentence)
        assert sentence.replace("'", "&#x27;") in form.help[f.name].value


def test_help_names_inputs_by_their_labels_not_case_file_keys():
    form = _form("flash", {})
    assert "flash_pressure" not in form.help["stages"].value
    assert "Flash pressure" in form.boxes["stages"].tooltip
    assert "process_volume_flow" not in _form("exchanger", {}).boxes["process_flow"].tooltip


def test_inlet_state_alternatives_say_so_on_the_form():
    form = _form("letdown", {})
    for name in ("inlet_temperature", "inlet_superheat", "inlet_dryness"):
        line = form.help[name].value
        assert "Alternatives: give one of Inlet temperature, Inlet superheat or Inlet dryness fraction" in line
        assert "filling one empties the others" in form.boxes[name].tooltip
    assert "Alternatives" not in form.help["mass_flow"].value


def test_filling_an_alternative_empties_the_others_and_says_so_once():
    form = _form("letdown", {"inlet_temperature": "230 degC"})
    calls = []
    form.observe(lambda: calls.append(form.values()))
    form.boxes["inlet_superheat"].value = "25 K"
    assert form.boxes["inlet_temperature"].value == ""
    assert calls == [{"inlet_superheat": "25 K"}]          # one recomputation, with one inlet state
    form.clear_errors()
    assert "Inlet temperature (it was 230 degC) emptied" in form.messages["inlet_superheat"].value
    form.boxes["mass_flow"].value = "4 t/h"                # the note lasts until the next change
    form.clear_errors()
    assert form.messages["inlet_superheat"].value == ""


def test_refused_input_is_shown_beside_its_box_in_form_words():
    form = _form("flash", {"flash_pressure": "header:LP"})
    exc = InputError("give flash_pressure or stages (exactly one)", field="flash_pressure",
                     fix="one vessel: flash_pressure; a cascade: stages = [...]")
    assert form.show_error(exc) == "flash_pressure"
    assert ERROR_CLASS in form.boxes["flash_pressure"]._dom_classes
    shown = form.messages["flash_pressure"].value
    assert "Not accepted" in shown and "flash_pressure" not in shown and "stages =" not in shown
    assert "Cascade stage pressures" in shown
    form.clear_errors()
    assert ERROR_CLASS not in form.boxes["flash_pressure"]._dom_classes
    assert form.messages["flash_pressure"].value == ""


def test_list_item_and_section_addresses_find_their_box():
    form = _form("flash", {})
    assert form.show_error(InputError("too high", field="stages[1]")) == "stages"
    assert "Cascade stage pressures, item 2" in form.messages["stages"].value
    assert form.show_error(InputError("no", field="vessel.vapour_velocity")) == "vapour_velocity"
    assert form.show_error(InputError("no", field="temperature")) is None


@pytest.mark.parametrize("fix, said", [
    ("add mass_flow to [inputs]", "fill in the 'Steam flow' box"),
    ("give target_superheat or target_temperature, not both", "give 'Target superheat' or 'Target temperature'"),
    ("Superseded by [inputs.relief] set_pressure", "Superseded by 'Relief set pressure'"),
])
def test_case_file_fixes_become_what_to_do_in_the_form(fix, said):
    assert said in FormWords(get_calculation("letdown").Inputs).fix(fix)


def test_plain_words_that_are_also_keys_stay_words():
    words = FormWords(get_calculation("flash").Inputs)
    assert words.text("flash above the demand is vented") == "flash above the demand is vented"
