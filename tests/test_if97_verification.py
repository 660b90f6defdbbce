"""IAPWS-IF97 verification values: steamcalc.steam against the release's own tables.

Each check value comes from tests/reference/*.csv, whose source column names the
table of IAPWS R7-97(2012). Values are compared at the nine significant digits the
tables publish.
"""

import pytest

from steamcalc.steam import (
    SteamState, backward_temperature_region1, backward_temperature_region2,
    saturation_pressure, saturation_temperature,
)
from tests.reference_data import ids, rows, significant

TABLE5 = rows("if97_table5_region1")
TABLE15 = rows("if97_table15_region2")
TABLE35 = rows("if97_table35_saturation_pressure")
TABLE36 = rows("if97_table36_saturation_temperature")
TABLE7 = rows("if97_table7_backward_region1")
TABLE24 = rows("if97_table24_backward_region2")


def _check_forward(row, region):
    state = SteamState.from_pT(float(row["pressure_MPa"]) * 1e6, float(row["temperature_K"]))
    assert state.region == region
    assert significant(state.specific_volume) == significant(float(row["v_m3_per_kg"]))
    assert significant(state.enthalpy / 1e3) == significant(float(row["h_kJ_per_kg"]))
    assert significant(state.entropy / 1e3) == significant(float(row["s_kJ_per_kgK"]))
    assert significant(state.cp / 1e3) == significant(float(row["cp_kJ_per_kgK"]))
    assert significant(state.speed_of_sound) == significant(float(row["w_m_per_s"]))


@pytest.mark.parametrize("row", TABLE5, ids=ids(TABLE5))
def test_if97_table5_region1(row):
    _check_forward(row, region=1)


@pytest.mark.parametrize("row", TABLE15, ids=ids(TABLE15))
def test_if97_table15_region2(row):
    _check_forward(row, region=2)


@pytest.mark.parametrize("row", TABLE35, ids=ids(TABLE35))
def test_if97_table35_saturation_pressure(row):
    value = saturation_pressure(float(row["temperature_K"])) / 1e6
    assert significant(value) == significant(float(row["saturation_pressure_MPa"]))


@pytest.mark.parametrize("row", TABLE36, ids=ids(TABLE36))
def test_if97_table36_saturation_temperature(row):
    value = saturation_temperature(float(row["pressure_MPa"]) * 1e6)
    assert significant(value) == significant(float(row["saturation_temperature_K"]))


@pytest.mark.parametrize("row", TABLE7, ids=ids(TABLE7))
def test_if97_table7_backward_t_ph_region1(row):
    value = backward_temperature_region1(float(row["pressure_MPa"]) * 1e6, float(row["h_kJ_per_kg"]) * 1e3)
    assert significant(value) == significant(float(row["temperature_K"]))


@pytest.mark.parametrize("row", TABLE24, ids=ids(TABLE24))
def test_if97_table24_backward_t_ph_region2(row):
    value = backward_temperature_region2(float(row["pressure_MPa"]) * 1e6, float(row["h_kJ_per_kg"]) * 1e3)
    assert significant(value) == significant(float(row["temperature_K"]))
