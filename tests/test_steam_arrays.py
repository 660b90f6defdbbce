"""The array API (on the fast engine, seuif97) and the fast engine against the iapws reference path.

Both evaluate IAPWS-IF97, so they must agree far more closely than IF97 and IAPWS-95 do.
"""

import numpy as np
import pytest

from steamcalc.errors import OutOfRangeError
from steamcalc.properties.steam import PHASES, SteamState
from steamcalc.properties.steam import using_engine
from steamcalc.properties.steam_arrays import saturation_arrays, states_ph, states_ps
from tests.reference_data import rows, significant

PRESSURES = [0.02e5, 0.5e5, 1e5, 3.5e5, 17e5, 60e5, 150e5, 250e5]
ENTHALPIES = np.linspace(100e3, 3700e3, 13)
GRID = [(p, h) for p in PRESSURES for h in ENTHALPIES]


def test_states_ph_match_steamstate():
    p = np.array([g[0] for g in GRID])
    h = np.array([g[1] for g in GRID])
    arrays = states_ph(p, h)
    for i, (pi, hi) in enumerate(GRID):
        ref = SteamState.from_ph(pi, hi)
        # Region 3 included: its density is refined on the basic equation, as the iapws path does.
        assert arrays.temperature[i] == pytest.approx(ref.temperature, rel=1e-9), (pi, hi)
        assert arrays.entropy[i] == pytest.approx(ref.entropy, rel=1e-9), (pi, hi)
        assert PHASES[arrays.phase[i]] == ref.phase, (pi, hi)
        expected_dryness = ref.dryness if ref.dryness is not None else (1.0 if ref.phase == "superheated vapour" else 0.0)
        assert arrays.dryness[i] == pytest.approx(expected_dryness, abs=1e-9)


def test_states_ps_round_trip():
    p = np.full(20, 3.5e5)
    h = np.linspace(300e3, 3200e3, 20)
    forward = states_ph(p, h)
    back = states_ps(p, forward.entropy)
    assert np.allclose(back.enthalpy, h, rtol=1e-9)


def test_saturation_arrays():
    sat = saturation_arrays([1e5, 10e5])
    assert sat["h_g"][0] == pytest.approx(SteamState.from_p_dryness(1e5, 1.0).enthalpy, rel=1e-9)
    assert sat["t_sat"][1] == pytest.approx(SteamState.from_p_dryness(10e5, 0.0).temperature, abs=1e-6)


def test_array_range_errors_name_the_index():
    with pytest.raises(OutOfRangeError) as info:
        states_ph([1e5, 1e5, 1e5], [2000e3, 9000e3, 2000e3])
    assert "enthalpy[1]" in str(info.value)
    with pytest.raises(OutOfRangeError):
        states_ph([-1.0], [2000e3])


@pytest.mark.parametrize("pressure,temperature", [(p, t) for p in PRESSURES[1:6] for t in (300.0, 450.0, 650.0)])
def test_fast_engine_matches_iapws(pressure, temperature):
    ref = SteamState.from_pT(pressure, temperature)
    with using_engine("fast"):
        fast = SteamState.from_pT(pressure, temperature)
        fast_h = SteamState.from_ph(pressure, ref.enthalpy)
        fast_s = SteamState.from_ps(pressure, ref.entropy)
    assert fast.enthalpy == pytest.approx(ref.enthalpy, rel=1e-9)
    assert fast.isentropic_exponent == pytest.approx(ref.isentropic_exponent, rel=1e-9)
    assert fast_h.temperature == pytest.approx(temperature, abs=1e-6)
    assert fast_s.temperature == pytest.approx(temperature, abs=1e-6)
    assert fast.phase == ref.phase and fast.region == ref.region


def test_fast_engine_verification_table5():
    # IAPWS R7-97(2012) Table 5 through the fast engine too.
    for row in rows("if97_table5_region1"):
        with using_engine("fast"):
            state = SteamState.from_pT(float(row["pressure_MPa"]) * 1e6, float(row["temperature_K"]))
        assert significant(state.enthalpy / 1e3) == significant(float(row["h_kJ_per_kg"]))
        assert significant(state.speed_of_sound) == significant(float(row["w_m_per_s"]))


def test_fast_engine_wet_states():
    ref = SteamState.from_ph(3.5e5, 2000e3)
    with using_engine("fast"):
        fast = SteamState.from_ph(3.5e5, 2000e3)
        sat = SteamState.from_p_dryness(3.5e5, 1.0)
    assert fast.phase == "wet" and fast.dryness == pytest.approx(ref.dryness, rel=1e-9)
    assert sat.enthalpy == pytest.approx(SteamState.from_p_dryness(3.5e5, 1.0).enthalpy, rel=1e-9)


@pytest.mark.parametrize("offset", [1.0, -1.0])
def test_fast_engine_just_off_the_saturation_line(offset):
    # A start on the wrong side of saturation would put the Newton steps in the wrong region.
    h_g = SteamState.from_p_dryness(3.5e5, 1.0).enthalpy
    h_f = SteamState.from_p_dryness(3.5e5, 0.0).enthalpy
    h = h_g + offset if offset > 0 else h_f + offset
    ref = SteamState.from_ph(3.5e5, h)
    with using_engine("fast"):
        fast = SteamState.from_ph(3.5e5, h)
    assert fast.phase == ref.phase
    assert fast.temperature == pytest.approx(ref.temperature, abs=1e-6)
