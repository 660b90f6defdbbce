"""IAPWS-IF97 verification values: steamcalc.properties.steam, on both engines, against the release's own tables.

Each check value comes from tests/reference/*.csv, whose source column names the
table of IAPWS R7-97(2012). Values are compared at the nine significant digits the
tables publish. Every table is checked on the reference engine (iapws) and on the fast
engine (seuif97).
"""

import pytest

from steamcalc.properties.engines import FAST_ENGINE, REFERENCE_ENGINE, engine_module
from steamcalc.properties.steam import SteamState, saturation_pressure, saturation_temperature
from tests.reference_data import ids, rows, significant

TABLE5 = rows("if97_table5_region1")
TABLE15 = rows("if97_table15_region2")
TABLE35 = rows("if97_table35_saturation_pressure")
TABLE36 = rows("if97_table36_saturation_temperature")
TABLE7 = rows("if97_table7_backward_region1")
TABLE24 = rows("if97_table24_backward_region2")


ENGINES = pytest.mark.parametrize("engine", [REFERENCE_ENGINE, FAST_ENGINE])


def _check_forward(row, region, engine):
    state = SteamState.from_pT(float(row["pressure_MPa"]) * 1e6, float(row["temperature_K"]), engine=engine)
    assert state.region == region and state.engine == engine
    assert significant(state.specific_volume) == significant(float(row["v_m3_per_kg"]))
    assert significant(state.enthalpy / 1e3) == significant(float(row["h_kJ_per_kg"]))
    assert significant(state.entropy / 1e3) == significant(float(row["s_kJ_per_kgK"]))
    assert significant(state.cp / 1e3) == significant(float(row["cp_kJ_per_kgK"]))
    assert significant(state.speed_of_sound) == significant(float(row["w_m_per_s"]))


@ENGINES
@pytest.mark.parametrize("row", TABLE5, ids=ids(TABLE5))
def test_if97_table5_region1(row, engine):
    _check_forward(row, 1, engine)


@ENGINES
@pytest.mark.parametrize("row", TABLE15, ids=ids(TABLE15))
def test_if97_table15_region2(row, engine):
    _check_forward(row, 2, engine)


@ENGINES
@pytest.mark.parametrize("row", TABLE35, ids=ids(TABLE35))
def test_if97_table35_saturation_pressure(row, engine):
    value = saturation_pressure(float(row["temperature_K"]), engine=engine) / 1e6
    assert significant(value) == significant(float(row["saturation_pressure_MPa"]))


@ENGINES
@pytest.mark.parametrize("row", TABLE36, ids=ids(TABLE36))
def test_if97_table36_saturation_temperature(row, engine):
    value = saturation_temperature(float(row["pressure_MPa"]) * 1e6, engine=engine)
    assert significant(value) == significant(float(row["saturation_temperature_K"]))


@ENGINES
@pytest.mark.parametrize("row", TABLE7, ids=ids(TABLE7))
def test_if97_table7_backward_t_ph_region1(row, engine):
    value = engine_module(engine).backward_temperature_ph(float(row["pressure_MPa"]) * 1e6,
                                                          float(row["h_kJ_per_kg"]) * 1e3, 1)
    assert significant(value) == significant(float(row["temperature_K"]))


@ENGINES
@pytest.mark.parametrize("row", TABLE24, ids=ids(TABLE24))
def test_if97_table24_backward_t_ph_region2(row, engine):
    value = engine_module(engine).backward_temperature_ph(float(row["pressure_MPa"]) * 1e6,
                                                          float(row["h_kJ_per_kg"]) * 1e3, 2)
    assert significant(value) == significant(float(row["temperature_K"]))
