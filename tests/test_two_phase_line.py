"""The two-phase relief discharge line (homogeneous flow, omega equation of state): against an independent
integration of the momentum balance along the pipe with scipy's solve_ivp, the isothermal-gas limit ω = 1 against
fluids.compressible, the incompressible limit ω → 0 against Darcy-Weisbach, the omega equation against IF97
isenthalpic states, and bad input refused by name."""

import math

import pytest
from fluids.compressible import P_isothermal_critical_flow, isothermal_gas
from scipy.integrate import solve_ivp

from steamcalc.equipment.two_phase_line import (
    omega_volume, two_phase_back_pressure, two_phase_reaction_force,
)
from steamcalc.errors import InputError
from steamcalc.properties.steam import SteamState

ATM = 101325.0
DN50, DN80, DN100 = 0.0525, 0.0779, 0.1023   # m, schedule 40 bores (ASME B36.10M)
MU_L = 2.8e-4   # Pa·s, saturated water near 100 °C (IAPWS 2008 viscosity, rounded)


def _marched(line, diameter, length, fittings_k, omega, p0, v0, v_of_p=None):
    """Outlet pressure by marching the momentum balance upstream from the exit with solve_ivp (RK45), the distance
    as a function of pressure, dx/dp = 2D (1 + G² dv/dp) / (f G² v), stopped by an event where it reaches the pipe's
    length (the fittings as an equivalent length K·D/f): independent of the module's quadrature and root search.
    Pressure is the variable because dp/dx is infinite at a choked exit."""
    g, f = line.mass_flux, line.friction_factor
    total = length + fittings_k * diameter / f
    volume = v_of_p or (lambda p: omega_volume(p, omega, p0, v0))

    def slope(p, y):
        dvdp = (volume(p * 1.0001) - volume(p * 0.9999)) / (p * 0.0002) if v_of_p else -omega * p0 * v0 / p ** 2
        return [2.0 * diameter * (1.0 + g * g * dvdp) / (f * g * g * volume(p))]

    def reached(p, y):
        return y[0] - total

    reached.terminal = True
    top = p0 * (1.0 - 1e-6)
    solved = solve_ivp(slope, (line.exit_pressure, top), [0.0], events=reached, rtol=1e-11, atol=1e-9,
                       max_step=(top - line.exit_pressure) / 50)
    return solved.t_events[0][0]


@pytest.mark.parametrize("flow, diameter, length, fittings_k, omega, p0, v0, source", [
    (2.22, DN50, 6.0, 1.5, 3.71, 7.68e5, 0.00732, "solve_ivp march (choked exit)"),
    (2.22, DN80, 6.0, 1.5, 3.71, 7.68e5, 0.00732, "solve_ivp march (exit at the atmosphere)"),
    (4.0, DN100, 20.0, 3.0, 8.0, 11.0e5, 0.0060, "solve_ivp march (choked exit, large ω)"),
    (1.0, DN80, 15.0, 0.5, 0.6, 5.0e5, 0.0300, "solve_ivp march (ω below 1)"),
])
def test_against_an_integration_along_the_pipe(flow, diameter, length, fittings_k, omega, p0, v0, source):
    line = two_phase_back_pressure(flow, diameter, length, fittings_k, ATM, omega, p0, v0, MU_L)
    assert line.outlet_pressure == pytest.approx(_marched(line, diameter, length, fittings_k, omega, p0, v0),
                                                 rel=1e-6), source
    assert line.outlet_pressure > line.exit_pressure


def test_choked_exit_by_hand():
    """Source: the omega method's critical flux G = p_c/√(ω p0 v0) (API 520 Part I annex C, C.2.2.1, with
    p_c = η_c p0), solved for the exit pressure by hand: 2.22 kg/s in a 52.5 mm bore is 1025.5 kg/(m² s);
    √(3.71 × 7.68e5 × 0.00732) = 144.4 m/s; p_e = 1.481 bar(a), above the atmosphere."""
    line = two_phase_back_pressure(2.22, DN50, 6.0, 1.5, ATM, 3.71, 7.68e5, 0.00732, MU_L)
    assert line.exit_choked and round(line.exit_pressure / 1e5, 3) == 1.481


@pytest.mark.parametrize("flow, length, fittings_k, choked, source", [
    (0.3, 10.0, 1.5, False, "fluids.compressible.isothermal_gas (complete isothermal equation)"),
    (1.5, 30.0, 2.0, True, "fluids.compressible.P_isothermal_critical_flow (isothermal choking)"),
])
def test_omega_one_is_isothermal_gas(flow, length, fittings_k, choked, source):
    """ω = 1 makes pv constant: the omega line is the isothermal ideal-gas line (p0 v0 = RT/M)."""
    p0, v0 = 5.0e5, 0.37
    line = two_phase_back_pressure(flow, DN80, length, fittings_k, ATM, 1.0, p0, v0, 1.3e-5)
    assert line.exit_choked == choked
    fd = line.friction_factor + fittings_k * DN80 / length   # fluids carries fittings as friction
    if choked:
        assert P_isothermal_critical_flow(line.outlet_pressure, fd, DN80, length) == pytest.approx(
            line.exit_pressure, rel=1e-6), source
    else:
        rho1 = line.outlet_pressure / (p0 * v0)
        assert isothermal_gas(rho1, fd, P1=line.outlet_pressure, P2=line.exit_pressure, L=length,
                              D=DN80) == pytest.approx(flow, rel=1e-6), source


def test_omega_to_zero_is_darcy_weisbach():
    """Source: Darcy-Weisbach, Δp = (f L/D + ΣK)·G² v/2 for an incompressible liquid (Crane TP-410, chapter 1):
    ω → 0 makes the volume constant."""
    v0 = 1.0 / 958.0
    line = two_phase_back_pressure(3.0, DN50, 12.0, 2.0, ATM, 1e-9, 3.0e5, v0, MU_L)
    assert line.outlet_pressure - ATM == pytest.approx(line.resistance * line.mass_flux ** 2 * v0 / 2.0, rel=1e-6)


@pytest.mark.parametrize("upstream, relieving, diameter", [
    (10e5, 6.6e5, DN80), (10e5, 6.6e5, DN100), (10e5, 3.0e5, DN80), (20e5, 12e5, DN80), (20e5, 12e5, DN100),
])
def test_pipe_omega_against_if97_isenthalpic_states(upstream, relieving, diameter):
    """Source: IAPWS-IF97 (IAPWS R7-97) mixture volumes along the constant-enthalpy expansion of condensate
    saturated at the upstream pressure (bar(g)) flashed to the relieving pressure: the same line marched with IF97
    volumes (solve_ivp) gives a back pressure within 1 % of the omega line with the pipe's ω (exit at the
    atmosphere), while the nozzle's isentropic two-point ω (API 520 Part I annex C) falls short by 3 to 13 %,
    which is why the pipe takes its own ω."""
    from steamcalc.equipment.two_phase_line import pipe_omega
    from steamcalc.equipment.two_phase_relief import second_point

    source = SteamState.from_p_dryness(ATM + upstream, 0.0)
    p0 = ATM + relieving
    mixture = SteamState.from_ph(p0, source.enthalpy)
    v0 = 1.0 / mixture.density

    def if97_volume(p):
        return 1.0 / SteamState.from_ph(p, source.enthalpy).density

    omega = pipe_omega(p0, v0, ATM, if97_volume(ATM))
    line = two_phase_back_pressure(2.22, diameter, 6.0, 1.5, ATM, omega, p0, v0, MU_L)
    assert not line.exit_choked
    marched = _marched(line, diameter, 6.0, 1.5, omega, p0, None, v_of_p=if97_volume)
    assert line.outlet_pressure == pytest.approx(marched, rel=0.01)
    nozzle = two_phase_back_pressure(2.22, diameter, 6.0, 1.5, ATM, second_point(mixture)[0], p0, v0, MU_L)
    assert 0.86 * marched < nozzle.outlet_pressure < 0.98 * marched


def test_reaction_force_by_hand():
    """Source: momentum balance at the open exit (API 520 Part II, 4.4.1.1), worked by hand:
    F = G²·v_e·A + (p_e − p_atm)·A."""
    line = two_phase_back_pressure(2.22, DN50, 6.0, 1.5, ATM, 3.71, 7.68e5, 0.00732, MU_L)
    area = math.pi * DN50 ** 2 / 4
    v_e = 0.00732 * (3.71 * (7.68e5 / line.exit_pressure - 1.0) + 1.0)
    hand = (2.22 / area) ** 2 * v_e * area + (line.exit_pressure - ATM) * area
    assert two_phase_reaction_force(line, DN50, ATM) == pytest.approx(hand, rel=1e-12)


@pytest.mark.parametrize("args, field", [
    ((2.0, DN80, -1.0, 0.0), "discharge_length"),
    ((2.0, DN80, 5.0, -0.5), "discharge_fittings_k"),
    ((2.0, 0.0, 5.0, 0.5), "discharge line inner diameter"),
    ((40.0, 0.01, 5.0, 0.5), "discharge_size"),      # chokes above the relieving pressure
    ((2.22, 0.02, 200.0, 5.0), "discharge_size"),    # friction would reach the relieving pressure
])
def test_bad_line_refused_by_name(args, field):
    with pytest.raises(InputError) as caught:
        two_phase_back_pressure(*args, ATM, 3.71, 7.68e5, 0.00732, MU_L)
    assert caught.value.field == field


def test_subcooled_liquid_flashes_at_its_saturation_pressure():
    """Source: API 520 Part I annex C, C.2.3.1 (a subcooled liquid's omega equation holds below its saturation
    pressure p_s; above it the liquid is incompressible), worked by hand: the two-phase part marched with solve_ivp
    from the exit to p_s, the rest of the pipe's resistance taken by the liquid, Δp = (N − N_tp)·G²v0/2
    (Darcy-Weisbach)."""
    p_s, v0, p_relieving = 2.7e5, 1.0 / 935.0, 4.3e5
    line = two_phase_back_pressure(1.2, 0.0266, 30.0, 3.0, ATM, 9.0, p_s, v0, MU_L, liquid_up_to=p_relieving)
    assert p_s < line.outlet_pressure < p_relieving
    g, f = line.mass_flux, line.friction_factor
    total = 30.0 + 3.0 * 0.0266 / f

    def slope(p, y):
        v = omega_volume(p, 9.0, p_s, v0)
        return [2.0 * 0.0266 * (1.0 - g * g * 9.0 * p_s * v0 / p ** 2) / (f * g * g * v)]

    two_phase = solve_ivp(slope, (line.exit_pressure, p_s), [0.0], rtol=1e-11, atol=1e-9).y[0, -1]
    hand = p_s + (total - two_phase) * f / 0.0266 * g * g * v0 / 2.0
    assert line.outlet_pressure == pytest.approx(hand, rel=1e-6)
