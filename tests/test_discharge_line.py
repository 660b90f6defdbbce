"""The relief discharge line: built-up back pressure by isothermal compressible flow, against fluids'
isothermal gas equation, the Darcy-Weisbach limit at low Mach number and the choking pressure by hand."""

import math

import pytest
from fluids.compressible import P_isothermal_critical_flow, isothermal_gas

from steamcalc.equipment.discharge_line import back_pressure_limit, built_up_back_pressure
from steamcalc.equipment.line_loss import line_pressure_drop
from steamcalc.equipment.relief import MOLAR_MASS_WATER, R_UNIVERSAL
from steamcalc.errors import InputError

ATM = 101325.0
DN150 = 0.1541   # m, DN150 schedule 40 (ASME B36.10M)


@pytest.mark.parametrize("flow, length, fittings, source", [
    (2.0, 10.0, 1.5, "fluids.compressible.isothermal_gas (complete isothermal equation)"),
    (0.5, 30.0, 3.0, "fluids.compressible.isothermal_gas"),
    (4.0, 5.0, 0.5, "fluids.compressible.isothermal_gas"),
])
def test_against_fluids_isothermal_gas(flow, length, fittings, source):
    """The mass flow fluids finds from our outlet and exit pressures is the flow we gave (ρ at the outlet)."""
    line = built_up_back_pressure(flow, 420.0, DN150, length, fittings, ATM, 1.4e-5)
    rho1 = line.outlet_pressure * MOLAR_MASS_WATER / (R_UNIVERSAL * 420.0)
    # fluids takes the fittings as an equivalent friction: fd' = f + ΣK·D/L.
    fd = line.friction_factor + fittings * DN150 / length
    m = isothermal_gas(rho1, fd, P1=line.outlet_pressure, P2=line.exit_pressure, L=length, D=DN150)
    assert m == pytest.approx(flow, rel=1e-6), source


def test_choked_exit_by_hand():
    """Source: isothermal choking, u = √(RT/M) at the exit, so p_exit = G·√(RT/M) (worked by hand):
    8 kg/s in DN150 at 420 K is 428.9 kg/(m² s) × 440.3 m/s = 1.888 bar(a), above the atmosphere; and
    fluids.compressible.P_isothermal_critical_flow finds the same choking pressure from our outlet pressure."""
    line = built_up_back_pressure(8.0, 420.0, DN150, 20.0, 2.0, ATM, 1.4e-5)
    flux = 8.0 / (math.pi * DN150 ** 2 / 4)
    assert line.exit_choked
    assert line.exit_pressure == pytest.approx(flux * math.sqrt(R_UNIVERSAL * 420.0 / MOLAR_MASS_WATER), rel=1e-12)
    assert round(line.exit_pressure / 1e5, 3) == 1.888
    fd = line.friction_factor + 2.0 * DN150 / 20.0
    assert P_isothermal_critical_flow(line.outlet_pressure, fd, DN150, 20.0) == pytest.approx(line.exit_pressure,
                                                                                           rel=1e-6)
    assert line.outlet_pressure > line.exit_pressure


def test_low_mach_limit_is_darcy_weisbach():
    """Source: Darcy-Weisbach (steamcalc.equipment.line_loss, Crane TP-410): at low velocity the isothermal
    equation reduces to Δp = K_t·ρv²/2 at the mean density; agreement within 1 %."""
    line = built_up_back_pressure(0.2, 420.0, DN150, 30.0, 2.0, ATM, 1.4e-5)
    mean = 0.5 * (line.outlet_pressure + line.exit_pressure)
    rho = mean * MOLAR_MASS_WATER / (R_UNIVERSAL * 420.0)
    darcy = line_pressure_drop(0.2, rho, 1.4e-5, DN150, 30.0, 2.0)
    assert line.outlet_pressure - line.exit_pressure == pytest.approx(darcy.pressure_drop, rel=0.01)


def test_no_resistance_no_built_up_back_pressure():
    """Source: by definition, a valve discharging straight to atmosphere has no built-up back pressure."""
    assert built_up_back_pressure(0.5, 420.0, DN150, 0.0, 0.0, ATM, 1.4e-5).outlet_pressure == ATM


@pytest.mark.parametrize("valve_type, fraction, source", [
    ("conventional", 0.10, "common practice (API 520 Part I, conventional valves: 10 % of the gauge set pressure)"),
    ("balanced-bellows", 0.50, "API 520 Part I figure 31 (the Kb curve's range)"),
    ("pilot", 0.50, "common practice; the maker's limit governs"),
])
def test_back_pressure_limits(valve_type, fraction, source):
    assert back_pressure_limit(valve_type)[0] == fraction, source


def test_bad_line_refused_by_name():
    with pytest.raises(InputError) as caught:
        built_up_back_pressure(1.0, 420.0, DN150, -3.0, 0.0, ATM, 1.4e-5)
    assert caught.value.field == "discharge_length" and caught.value.fix
    with pytest.raises(InputError):
        back_pressure_limit("spring")
