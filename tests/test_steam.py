"""SteamState: cross-check with IAPWS-95, practitioners' steam-table figures, round trips, errors."""

import math

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.errors import AmbiguousStateError, OutOfRangeError, SteamcalcError
from steamcalc.properties.steam import SteamState, saturation_pressure, saturation_temperature
from tests.reference_data import ids, rows

# IAPWS-95 (the scientific formulation) through CoolProp, a general-purpose reference
# library, over regions 1 and 2 and the wet region. IF97 is a fast fit to IAPWS-95,
# so the two differ slightly by design. Largest differences measured on this grid:
# h 0.23 kJ/kg (cold compressed liquid), s 0.018 % , density 0.012 %, T_sat 0.008 K.
# Tolerances sit just above those: a formulation or unit error shows as far larger.
H_TOLERANCE = 0.3e3          # J/kg
S_RELATIVE_TOLERANCE = 3e-4
RHO_RELATIVE_TOLERANCE = 2e-4
TSAT_TOLERANCE = 0.01        # K

PRESSURES = np.geomspace(0.05e5, 100e5, 10)
TEMPERATURES = np.linspace(280.0, 800.0, 14)
GRID = [(p, t) for p in PRESSURES for t in TEMPERATURES if abs(t - saturation_temperature(p)) > 1.0]


@pytest.mark.parametrize("pressure,temperature", GRID)
def test_single_phase_against_iapws95_coolprop(pressure, temperature):
    state = SteamState.from_pT(pressure, temperature)
    assert abs(state.enthalpy - PropsSI("H", "P", pressure, "T", temperature, "Water")) < H_TOLERANCE
    reference_s = PropsSI("S", "P", pressure, "T", temperature, "Water")
    assert abs(state.entropy - reference_s) / reference_s < S_RELATIVE_TOLERANCE
    reference_rho = PropsSI("D", "P", pressure, "T", temperature, "Water")
    assert abs(state.density - reference_rho) / reference_rho < RHO_RELATIVE_TOLERANCE


@pytest.mark.parametrize("pressure", PRESSURES)
@pytest.mark.parametrize("dryness", [0.0, 0.5, 0.9, 1.0])
def test_wet_region_against_iapws95_coolprop(pressure, dryness):
    state = SteamState.from_p_dryness(pressure, dryness)
    assert abs(state.temperature - PropsSI("T", "P", pressure, "Q", dryness, "Water")) < TSAT_TOLERANCE
    assert abs(state.enthalpy - PropsSI("H", "P", pressure, "Q", dryness, "Water")) < H_TOLERANCE


FACTS = rows("steam_table_facts")


@pytest.mark.parametrize("row", FACTS, ids=ids(FACTS))
def test_practitioner_steam_table_figures(row):
    p = float(row["pressure_bar_a"]) * 1e5
    expected, tolerance = float(row["expected"]), float(row["tolerance"])
    if row["check"] == "saturation_temperature":
        value = saturation_temperature(p) - 273.15
    elif row["check"] == "saturated_liquid_enthalpy":
        value = SteamState.from_p_dryness(p, 0.0).enthalpy / 1e3
    elif row["check"] == "saturated_vapour_enthalpy":
        value = SteamState.from_p_dryness(p, 1.0).enthalpy / 1e3
    else:
        value = SteamState.from_pT(p, float(row["temperature_degC"]) + 273.15).enthalpy / 1e3
    assert abs(value - expected) <= tolerance, row["source"]


@pytest.mark.parametrize("pressure,temperature", GRID[::3])
def test_round_trip_pT_ph_ps(pressure, temperature):
    first = SteamState.from_pT(pressure, temperature)
    by_h = SteamState.from_ph(pressure, first.enthalpy)
    by_s = SteamState.from_ps(pressure, first.entropy)
    assert by_h.temperature == pytest.approx(temperature, abs=1e-6)
    assert by_s.temperature == pytest.approx(temperature, abs=1e-6)
    assert by_s.enthalpy == pytest.approx(first.enthalpy, rel=1e-9)
    assert by_h.phase == first.phase == by_s.phase


@pytest.mark.parametrize("dryness", [0.05, 0.5, 0.95])
def test_round_trip_wet_p_dryness_ph_T_dryness(dryness):
    first = SteamState.from_p_dryness(3e5, dryness)
    by_h = SteamState.from_ph(3e5, first.enthalpy)
    by_t = SteamState.from_T_dryness(first.temperature, dryness)
    assert by_h.dryness == pytest.approx(dryness, abs=1e-9)
    assert by_t.enthalpy == pytest.approx(first.enthalpy, rel=1e-9)
    assert by_h.phase == "wet"


def test_saturation_functions_are_inverse():
    for t in (300.0, 400.0, 500.0, 600.0):
        assert saturation_temperature(saturation_pressure(t)) == pytest.approx(t, abs=1e-6)


def test_phases():
    assert SteamState.from_pT(10e5, 300.0).phase == "compressed liquid"
    assert SteamState.from_pT(10e5, 500.0).phase == "superheated vapour"
    assert SteamState.from_pT(25e6, 700.0).phase == "supercritical"
    assert SteamState.from_p_dryness(10e5, 0.0).phase == "saturated liquid"
    assert SteamState.from_p_dryness(10e5, 1.0).phase == "saturated vapour"
    assert SteamState.from_p_dryness(10e5, 0.4).phase == "wet"


def test_superheat_and_subcooling():
    p = 10e5
    t_sat = saturation_temperature(p)
    assert SteamState.from_pT(p, t_sat + 25).superheat == pytest.approx(25, abs=1e-9)
    assert SteamState.from_pT(p, t_sat - 30).subcooling == pytest.approx(30, abs=1e-9)
    assert SteamState.from_p_dryness(p, 0.5).superheat == 0.0


def test_saturation_line_is_ambiguous():
    p = 5e5
    with pytest.raises(AmbiguousStateError) as info:
        SteamState.from_pT(p, saturation_temperature(p))
    assert info.value.field == "temperature"
    assert "dryness" in str(info.value)


@pytest.mark.parametrize("call,variable", [
    (lambda: SteamState.from_pT(1e5, 1500.0), "temperature"),
    (lambda: SteamState.from_pT(150e6, 500.0), "pressure"),
    (lambda: SteamState.from_pT(-1e5, 500.0), "pressure"),
    (lambda: SteamState.from_ph(1e5, 9000e3), "enthalpy"),
    (lambda: SteamState.from_ps(1e5, 20e3), "entropy"),
    (lambda: SteamState.from_p_dryness(30e6, 0.5), "pressure"),
    (lambda: SteamState.from_p_dryness(1e5, 1.2), "dryness"),
    (lambda: SteamState.from_T_dryness(700.0, 0.5), "temperature"),
    (lambda: saturation_temperature(math.nan), "pressure"),
])
def test_out_of_range_names_variable_and_limits(call, variable):
    with pytest.raises(OutOfRangeError) as info:
        call()
    assert isinstance(info.value, SteamcalcError)
    assert info.value.field == variable
    assert info.value.limits is not None
    assert "Valid range" in str(info.value)


@pytest.mark.parametrize("engine", ["iapws", "fast"])
def test_250_bar_600_degc_is_inside_if97(engine):
    # IF97 region 2 reaches 100 MPa at 600 degC (IAPWS R7-97(2012), figure 1): a supercritical-pressure
    # let-down inlet is a valid state, not a saturation error. h from IF97 equation (15).
    state = SteamState.from_pT(250e5, 873.15, engine=engine)
    assert state.phase == "supercritical" and state.region == 2
    assert state.superheat is None and state.saturation_temperature is None
    assert state.enthalpy / 1e3 == pytest.approx(3493.69, abs=0.01)


@pytest.mark.parametrize("call,words", [
    # Each message names the variable, the real limit and the IF97 region it bounds.
    (lambda: saturation_temperature(250e5), ("pressure of 250 bar(a)", "critical pressure 220.64 bar(a)",
                                             "region 4")),
    (lambda: SteamState.from_p_dryness(250e5, 1.0), ("pressure of 250 bar(a)", "220.64 bar(a)", "region 4")),
    (lambda: SteamState.from_T_dryness(700.0, 0.5), ("temperature of 700 K", "critical temperature", "region 4")),
    (lambda: SteamState.from_pT(1001e5, 700.0), ("pressure of 1001 bar(a)", "1000 bar(a)", "regions 1-3")),
    (lambda: SteamState.from_pT(1e5, 1100.0), ("temperature of 1100 K", "800 degC", "region 2", "region 5")),
    (lambda: SteamState.from_pT(1e5, 270.0), ("temperature of 270 K", "0 degC", "regions 1 and 2")),
    (lambda: SteamState.from_ph(10e5, 5000e3), ("enthalpy of 5000 kJ/kg at 10 bar(a)", "800 degC", "region 2")),
    (lambda: SteamState.from_ph(10e5, -10e3), ("enthalpy of -10 kJ/kg", "0 degC", "region 1")),
    (lambda: SteamState.from_p_dryness(1e5, 1.2), ("dryness of 1.2", "above 1", "region 4")),
])
def test_range_messages_name_the_limit_and_the_region(call, words):
    with pytest.raises(OutOfRangeError) as info:
        call()
    text = str(info.value)
    assert all(w in text for w in words), text
    assert "IAPWS-IF97 used here" not in text
