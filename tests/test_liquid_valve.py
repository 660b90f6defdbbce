"""Liquid control-valve sizing (IEC 60534-2-1, incompressible) and the spray's evaporation:
the standard's equations worked by hand, fluids' liquid valve sizing as an independent
implementation, and the d²-law droplet lifetime by hand and by quadrature."""

import math

import pytest
from fluids.control_valve import size_control_valve_l
from scipy.integrate import quad

from steamcalc.equipment.desuperheater import droplet_lifetime, evaporation_length
from steamcalc.equipment.liquid_valve import (
    cavitation_indication, choked_pressure_differential, liquid_critical_pressure_ratio, relative_kv_at_travel,
    size_liquid_valve, usable_turndown,
)
from steamcalc.equipment.valve import valve_travel
from steamcalc.errors import InputError

WATER_PC_KPA = 22064.0   # IAPWS critical pressure of water, kPa(a)


def test_non_choked_by_hand():
    # 300 kg/h of water, ρ1 = 955.0 kg/m³, pv = 120.8 kPa(a), FL = 0.9, 2600 → 700 kPa(a).
    # FF = 0.96 − 0.28·√(120.8/22064) = 0.96 − 0.28 × 0.073993 = 0.939282        (eq. 3)
    # Δp_choked = 0.9² × (2600 − 0.939282 × 120.8) = 0.81 × 2486.535 = 2014.09 kPa (eq. 2)
    # Δp = 1900 kPa < 2014.09: not choked
    # Q = 300/955 = 0.314136 m³/h; ρ1/ρ0 = 955/999.1 = 0.955860
    # Kv = 0.314136/0.1 × √(0.955860/1900) = 3.14136 × 0.0224295 = 0.070459 m³/h  (eq. 1)
    s = size_liquid_valve(300.0, 2600.0, 700.0, 955.0, 120.8, WATER_PC_KPA, 0.9)
    assert s.liquid_critical_pressure_ratio == pytest.approx(0.939282, abs=1e-6)
    assert s.choked_differential == pytest.approx(2014.09, abs=0.01)
    assert not s.choked
    assert s.kv == pytest.approx(0.070459, rel=1e-5)
    # Incipient cavitation from Kc·(p1 − pv) = 0.8 × 0.81 × (2600 − 120.8) = 1606.5 kPa: 1900 is past it.
    assert s.incipient_differential == pytest.approx(1606.52, abs=0.01)
    assert s.cavitation == "incipient cavitation"


def test_choked_cavitating_by_hand():
    # The same water to 350 kPa(a): Δp = 2250 kPa ≥ Δp_choked = 2014.09 kPa, p2 = 350 > pv = 120.8: choked,
    # cavitating (not flashing). Kv = 0.314136/0.1 × √(0.955860/2014.09) = 3.14136 × 0.0217850 = 0.068435
    s = size_liquid_valve(300.0, 2600.0, 350.0, 955.0, 120.8, WATER_PC_KPA, 0.9)
    assert s.choked and s.cavitation == "choked, cavitating"
    assert s.sizing_differential == pytest.approx(2014.09, abs=0.01)
    assert s.kv == pytest.approx(0.068435, rel=1e-5)


def test_flashing_when_the_outlet_is_below_the_vapour_pressure():
    assert cavitation_indication(2600.0, 100.0, 120.8, 0.9, 0.939) == "flashing"
    assert cavitation_indication(2600.0, 2000.0, 120.8, 0.9, 0.939) == "none expected"


def test_ff_and_choked_differential_against_the_fluids_docstring_example():
    # FF of water at 90 °C (pv 70.1 kPa, pc 22120 kPa): 0.9442 (fluids documentation example).
    assert liquid_critical_pressure_ratio(70.1, 22120.0) == pytest.approx(0.9442375, abs=1e-7)
    assert choked_pressure_differential(680.0, 70.1, 0.9, 0.9442375) == pytest.approx(0.81 * (680 - 66.1911), abs=1e-3)


#: (label, W kg/h, p1 kPa(a), p2 kPa(a), ρ1 kg/m³, pv kPa(a), pc kPa(a), FL, expected Kv or None, source).
#: None: the expected value is fluids' own result at run time.
CASES = [
    ("hand, not choked", 300.0, 2600.0, 700.0, 955.0, 120.8, WATER_PC_KPA, 0.9, 0.070459,
     "IEC 60534-2-1 eq. (1)-(3) worked by hand (above)"),
    ("hand, choked", 300.0, 2600.0, 350.0, 955.0, 120.8, WATER_PC_KPA, 0.9, 0.068435,
     "IEC 60534-2-1 eq. (1)-(3) worked by hand (above)"),
    ("annex-style water 90 °C", 0.1 * 3600 * 965.4, 680.0, 220.0, 965.4, 70.1, 22120.0, 0.9, 164.995,
     "fluids 1.3.1 size_control_valve_l docstring example (water at 90 °C, Fd = 0.46, no reducers): Kv 164.995"),
    ("spray valve, normal", 216.5, 2599.2, 649.2, 955.9, 120.9, WATER_PC_KPA, 0.9, None, "fluids size_control_valve_l"),
    ("spray valve, no nozzle drop", 276.4, 2599.2, 349.2, 955.9, 120.9, WATER_PC_KPA, 0.9, None,
     "fluids size_control_valve_l"),
    ("low FL, choked", 5000.0, 1500.0, 300.0, 958.0, 101.3, WATER_PC_KPA, 0.6, None, "fluids size_control_valve_l"),
    ("flashing", 2000.0, 800.0, 90.0, 958.0, 101.3, WATER_PC_KPA, 0.85, None, "fluids size_control_valve_l"),
    ("cold water, low drop", 10000.0, 500.0, 400.0, 999.1, 1.7, WATER_PC_KPA, 0.9, None, "fluids size_control_valve_l"),
]


@pytest.mark.parametrize("label,w,p1,p2,rho,pv,pc,fl,expected,source", CASES, ids=[c[0] for c in CASES])
def test_kv_against_sources(label, w, p1, p2, rho, pv, pc, fl, expected, source):
    ours = size_liquid_valve(w, p1, p2, rho, pv, pc, fl)
    reference = size_control_valve_l(rho=rho, Psat=pv * 1e3, Pc=pc * 1e3, mu=2.8e-4, P1=p1 * 1e3, P2=p2 * 1e3,
                                     Q=w / rho / 3600, FL=fl, full_output=True)
    # fluids takes ρ0 = 999.103 kg/m³ (water at 15 °C), this module 999.1: 2 ppm apart in Kv.
    assert ours.kv == pytest.approx(reference["Kv"], rel=1e-5), source
    assert ours.choked == reference["choked"], source
    if expected is not None:
        assert ours.kv == pytest.approx(expected, rel=1e-5), source


def test_fl_outside_zero_to_one_is_refused():
    for fl in (0.0, 1.2, -0.5):
        with pytest.raises(InputError) as err:
            size_liquid_valve(300.0, 2600.0, 700.0, 955.0, 120.8, WATER_PC_KPA, fl)
        assert err.value.field == "fl" and err.value.limits == (0.0, 1.0, "")


def test_outlet_not_below_inlet_is_refused():
    with pytest.raises(InputError):
        size_liquid_valve(300.0, 700.0, 700.0, 955.0, 120.8, WATER_PC_KPA, 0.9)


def test_travel_round_trips_and_usable_range_by_hand():
    for characteristic in ("linear", "equal-percentage"):
        for h in (0.1, 0.35, 0.8, 1.0):
            phi = relative_kv_at_travel(h, characteristic, 50.0)
            assert valve_travel(phi * 1.6, 1.6, characteristic, 50.0) == pytest.approx(h, abs=1e-12)
    # Equal-percentage, R = 50, 10-90 % travel: Φ(0.9)/Φ(0.1) = 50^0.8 = e^(0.8 × 3.91202) = 22.865.
    assert usable_turndown("equal-percentage", 50.0, (0.1, 0.9)) == pytest.approx(22.865, abs=1e-3)
    # Linear: 0.9/0.1 = 9.
    assert usable_turndown("linear", 50.0, (0.1, 0.9)) == pytest.approx(9.0)


def test_droplet_lifetime_constant_superheat_by_hand():
    # t = ρ_l·L·d0²/(4·Nu·k·ΔT) = 927 × 2.29e6 × (100e-6)² / (4 × 2 × 0.029 × 10)
    #   = 21.2283 / 2.32 = 9.15013 s
    assert droplet_lifetime(100e-6, 927.0, 2.29e6, 0.029, 10.0, 10.0) == pytest.approx(9.15013, rel=1e-5)
    # d² scaling: half the droplet, a quarter of the time.
    assert droplet_lifetime(50e-6, 927.0, 2.29e6, 0.029, 10.0, 10.0) == pytest.approx(9.15013 / 4, rel=1e-5)


@pytest.mark.parametrize("start,end", [(64.7, 10.0), (30.0, 5.0), (120.0, 20.0)])
def test_droplet_lifetime_falling_superheat_against_quadrature(start, end):
    # Source: scipy.integrate.quad of ∫₀¹ ds/(ΔT_end + (ΔT_start − ΔT_end)·s^1.5), independent of the Simpson sum.
    integral = quad(lambda s: 1.0 / (end + (start - end) * s ** 1.5), 0.0, 1.0)[0]
    expected = 927.0 * 2.29e6 * (50e-6) ** 2 / (4 * 2 * 0.029) * integral
    assert droplet_lifetime(50e-6, 927.0, 2.29e6, 0.029, start, end) == pytest.approx(expected, rel=1e-6)
    # Bounded by the lifetimes at the two constant superheats.
    assert droplet_lifetime(50e-6, 927.0, 2.29e6, 0.029, start, start) < expected < \
        droplet_lifetime(50e-6, 927.0, 2.29e6, 0.029, end, end)


def test_evaporation_length_is_lifetime_times_velocity():
    assert evaporation_length(0.972, 29.28) == pytest.approx(28.46, abs=0.01)
    with pytest.raises(InputError):
        evaporation_length(1.0, 0.0)


def test_steam_that_is_not_superheated_is_refused():
    with pytest.raises(InputError):
        droplet_lifetime(50e-6, 927.0, 2.29e6, 0.029, 10.0, 0.0)
    assert math.isfinite(droplet_lifetime(50e-6, 927.0, 2.29e6, 0.029, 10.0, 1e-3))
