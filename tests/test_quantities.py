"""Quantity strings: pressure basis, units, dimensions, the site atmosphere."""

import pytest

from steamcalc.errors import OutOfRangeError, UnitError
from steamcalc.units.quantities import parse_pressure, parse_quantity, standard_atmosphere_pressure


@pytest.mark.parametrize("text,expected", [
    ("16 bar(g)", 17.01325e5), ("16 barg", 17.01325e5), ("17 bar(a)", 17e5), ("17 bara", 17e5),
    ("250 kPa(a)", 2.5e5), ("150 kPa(g)", 2.51325e5), ("1.7 MPa(a)", 17e5), ("100 psia", 689475.7293168361),
    ("0 psig", 101325.0), ("  3.5e0 bar(a) ", 3.5e5), ("500 mbar(a)", 0.5e5),
])
def test_pressure_strings(text, expected):
    assert parse_pressure(text, "p") == pytest.approx(expected, rel=1e-12)


def test_gauge_uses_site_atmosphere():
    assert parse_pressure("2.5 bar(g)", "p", atmospheric_pressure=0.99e5) == pytest.approx(3.49e5)


@pytest.mark.parametrize("text", ["16 bar", "250 kPa", "30 psi", "1 MPa", "16"])
def test_bare_pressure_is_refused_with_fix(text):
    with pytest.raises(UnitError) as info:
        parse_pressure(text, "inlet_pressure")
    message = str(info.value)
    assert "inlet_pressure" in message
    assert "Fix:" in message


def test_pressure_number_not_string():
    with pytest.raises(UnitError, match="basis"):
        parse_pressure(16, "inlet_pressure")


def test_negative_absolute_pressure_refused():
    with pytest.raises(UnitError, match="below zero"):
        parse_pressure("-2 bar(g)", "outlet_pressure")


def test_wrong_dimension_for_pressure():
    with pytest.raises(UnitError, match="not a pressure"):
        parse_pressure("5 m", "inlet_pressure")


@pytest.mark.parametrize("text,kind,expected", [
    ("230 degC", "temperature", 503.15), ("230 °C", "temperature", 503.15), ("446 degF", "temperature", 503.15),
    ("503.15 K", "temperature", 503.15), ("25 K", "temperature_difference", 25.0),
    ("25 delta_degC", "temperature_difference", 25.0), ("4.5 t/h", "mass_flow", 1.25),
    ("4500 kg/h", "mass_flow", 1.25), ("1.25 kg/s", "mass_flow", 1.25), ("180 m", "length", 180.0),
])
def test_quantities(text, kind, expected):
    assert parse_quantity(text, "x", kind) == pytest.approx(expected, rel=1e-9)


def test_lb_per_hour():
    # 1 lb = 0.45359237 kg exactly (international avoirdupois pound).
    assert parse_quantity("10000 lb/h", "mass_flow", "mass_flow") == pytest.approx(4535.9237 / 3600)


@pytest.mark.parametrize("text,kind,match", [
    ("5 m", "mass_flow", "not a mass flow"), ("25 degC", "temperature_difference", "temperature difference"),
    ("230", "temperature", "no unit"), ("hot", "temperature", "not a number"),
    ("4 furlongs/fortnight", "mass_flow", "not a mass flow"), ("3 wombats", "mass_flow", "not known"),
    ("-300 degC", "temperature", "absolute zero"),
])
def test_bad_quantities(text, kind, match):
    with pytest.raises(UnitError, match=match):
        parse_quantity(text, "field_x", kind)


def test_standard_atmosphere():
    # ISO 2533 standard atmosphere: 1000 m gives 89 875 Pa (table value, from memory).
    assert standard_atmosphere_pressure(1000.0) == pytest.approx(89875, abs=5)
    with pytest.raises(OutOfRangeError):
        standard_atmosphere_pressure(20000.0)
