"""Typing units as people write them: each spelling read to its SI value, the traps refused with a fix.

Check values are the units' definitions; the source column names where each comes from.
"""

import re

import pytest

from steamcalc.calcs import get_calculation, kinds
from steamcalc.calcs.base import input_fields
from steamcalc.errors import UnitError
from steamcalc.units.quantities import _EXAMPLES, parse_quantity, unit_spelling

BIPM = "BIPM SI Brochure (9th ed., 2019), 5.4: superscript powers, solidus, the degree Celsius"
DATA_SHEETS = "common practice: data-sheet spellings, a solidus dividing by all that follows it"
NIST = "NIST SP 811 (2008) B.8: 1 Btu_IT/(h·ft²·°F) = 5.678 263 W/(m²·K)"


@pytest.mark.parametrize("text,kind,si_value,source", [
    ("40 m³/h", "flow_coefficient", 40.0, BIPM),
    ("40 m3/h", "flow_coefficient", 40.0, DATA_SHEETS),
    ("40 m^3/h", "flow_coefficient", 40.0, DATA_SHEETS),
    ("12 m3/h", "volume_flow", 12.0 / 3600.0, DATA_SHEETS),
    ("12 m³/h", "volume_flow", 12.0 / 3600.0, BIPM),
    ("1.8 kW/(m²·K)", "heat_transfer_coefficient", 1800.0, BIPM),
    ("1.8 kW/(m^2 K)", "heat_transfer_coefficient", 1800.0, DATA_SHEETS),
    ("1.8 kW/m2K", "heat_transfer_coefficient", 1800.0, DATA_SHEETS),
    ("1.8 kW/m^2K", "heat_transfer_coefficient", 1800.0, DATA_SHEETS),
    ("1800 W/m²K", "heat_transfer_coefficient", 1800.0, DATA_SHEETS),
    ("1800 W/m2/K", "heat_transfer_coefficient", 1800.0, BIPM),
    ("1 Btu/(h·ft²·°F)", "heat_transfer_coefficient", 5.678263, NIST),
    ("0.1 m²·K/kW", "fouling_resistance", 1e-4, BIPM),
    ("0.1 m2K/kW", "fouling_resistance", 1e-4, DATA_SHEETS),
    ("3.9 kJ/(kg·K)", "specific_heat", 3900.0, BIPM),
    ("3.9 kJ/kgK", "specific_heat", 3900.0, DATA_SHEETS),
    ("3.9 kJ/kg°C", "specific_heat", 3900.0, DATA_SHEETS + " (a °C inside a compound unit is a difference)"),
    ("3.9 kJ/(kg·°C)", "specific_heat", 3900.0, BIPM + " (1 °C of difference is 1 K)"),
    ("2.6 m²", "area", 2.6, BIPM),
    ("2.6 m2", "area", 2.6, DATA_SHEETS),
    ("1030 kg/m³", "density", 1030.0, BIPM),
    ("1030 kg/m3", "density", 1030.0, DATA_SHEETS),
    ("230 °C", "temperature", 503.15, BIPM + " (T/K = t/°C + 273.15)"),
    ("230 degC", "temperature", 503.15, "pint's spelling, kept for case files written with it"),
    ("230 ℃", "temperature", 503.15, "Unicode U+2103, the degree Celsius sign"),
    ("230 deg C", "temperature", 503.15, DATA_SHEETS),
    ("446 °F", "temperature", 503.15, "NIST SP 811 (2008) 4.2.1.1: t/°F = 1.8 t/°C + 32"),
    ("10 K", "temperature_difference", 10.0, BIPM),
    ("10 delta_degC", "temperature_difference", 10.0, "pint's spelling, kept for case files written with it"),
    ("4.5 t/h", "mass_flow", 1.25, BIPM + " (t = 1000 kg, h = 3600 s)"),
])
def test_spellings_read_to_their_si_value(text, kind, si_value, source):
    assert parse_quantity(text, "field", kind) == pytest.approx(si_value, rel=1e-6), source


@pytest.mark.parametrize("text,kind,what,fix", [
    ("230 C", "temperature", "coulomb", "'230 °C'"),
    ("10 C", "temperature_difference", "coulomb", "'10 °C'"),
    ("1 kJ/(kg C)", "specific_heat", "coulomb", "'1 kJ/(kg °C)'"),
    ("446 F", "temperature", "farad", "'446 °F'"),
])
def test_a_bare_c_or_f_is_refused_with_a_fix(text, kind, what, fix):
    with pytest.raises(UnitError) as info:
        parse_quantity(text, "inlet_temperature", kind)
    message = str(info.value)
    assert what in message and fix in message and "inlet_temperature" in message


@pytest.mark.parametrize("text,fix", [("10 °C", "'10 K'"), ("18 °F", "'10 K'"), ("10 degC", "'10 K'")])
def test_a_temperature_for_a_difference_is_refused_with_the_kelvin_value(text, fix):
    with pytest.raises(UnitError) as info:
        parse_quantity(text, "target_superheat", "temperature_difference")
    assert fix in str(info.value) and "delta_degC" not in str(info.value)


def test_the_spelling_is_what_pint_reads():
    assert unit_spelling("W/m²K") == "W/(m^2*K)" and unit_spelling("kW/(m^2 K)") == "kW/(m^2 K)"


PROGRAMMER_SPELLING = re.compile(r"\^|\*\*|\bdeg[CF]\b|delta_|\bpercent\b")   # "equal-percentage" is a trade word


@pytest.mark.parametrize("kind,example", sorted(_EXAMPLES.items()))
def test_messages_give_the_common_spelling_and_it_is_read(kind, example):
    assert not PROGRAMMER_SPELLING.search(example), example
    if kind not in ("pressure", "pressure_difference", "time"):
        parse_quantity(example.split(" or ")[0].strip("'"), "field", kind)


@pytest.mark.parametrize("kind", kinds())
def test_form_placeholders_show_the_common_spelling(kind):
    # The forms show each field's example as its placeholder ("e.g. 230 °C").
    for f in input_fields(get_calculation(kind).Inputs):
        example = f.metadata["example"]
        assert not PROGRAMMER_SPELLING.search(example), (f.name, example)
