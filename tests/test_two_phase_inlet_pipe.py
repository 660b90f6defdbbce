"""The flashing two-phase flow along a relief valve's inlet pipe (homogeneous, omega equation of state): held to the
closed forms its momentum balance reduces to, and a pipe that would choke refused by name."""

import math

import pytest
from scipy.optimize import bisect

from steamcalc.equipment.two_phase_line import two_phase_inlet_pressure
from steamcalc.errors import OutOfRangeError


def _isothermal_resistance(p0, p2, flux, p0v0):
    """ω = 1: the omega equation is the isothermal ideal gas (API 520 Part I annex C), whose pipe-flow momentum
    balance integrates to N = (p0² − p2²)/(G²·p0·v0) − 2·ln(p0/p2) (worked by hand from dp + G²dv + fG²v/(2D)dx = 0
    with pv constant)."""
    return (p0 * p0 - p2 * p2) / (flux * flux * p0v0) - 2.0 * math.log(p0 / p2)


@pytest.mark.parametrize("mass_flow, diameter, length, k, p0, v0, source", [
    (1.5, 0.0525, 3.0, 1.0, 8.0e5, 0.02, "isothermal gas, hand integral, root by bisection"),
    (4.0, 0.0779, 10.0, 2.5, 12.0e5, 0.01, "the same, a longer pipe with more fittings"),
])
def test_omega_one_is_the_isothermal_gas_pipe(mass_flow, diameter, length, k, p0, v0, source):
    inlet = two_phase_inlet_pressure(mass_flow, diameter, length, k, 1.0, p0, v0, 2.0e-4)
    flux = mass_flow / (math.pi * diameter ** 2 / 4)
    n = inlet.resistance
    by_hand = bisect(lambda p2: _isothermal_resistance(p0, p2, flux, p0 * v0) - n, flux * math.sqrt(p0 * v0), p0,
                     xtol=1e-9, rtol=1e-14)
    assert inlet.valve_inlet_pressure == pytest.approx(by_hand, rel=1e-9), source


def test_a_nearly_incompressible_mixture_loses_what_darcy_weisbach_gives():
    """ω → 0: the volume hardly changes, and the loss tends to N·G²·v0/2 (Darcy–Weisbach in velocity heads)."""
    mass_flow, diameter, p0, v0 = 3.0, 0.0525, 6.0e5, 0.0011
    inlet = two_phase_inlet_pressure(mass_flow, diameter, 2.0, 0.5, 1e-6, p0, v0, 2.0e-4)
    flux = mass_flow / (math.pi * diameter ** 2 / 4)
    darcy = inlet.resistance * flux * flux * v0 / 2.0
    assert p0 - inlet.valve_inlet_pressure == pytest.approx(darcy, rel=1e-4)


def test_a_pipe_the_flow_cannot_pass_before_it_chokes_is_refused_by_name():
    with pytest.raises(OutOfRangeError) as caught:
        two_phase_inlet_pressure(8.0, 0.0266, 30.0, 5.0, 3.0, 6.0e5, 0.02, 2.0e-4)
    assert caught.value.field == "inlet_size" and caught.value.fix


def test_no_resistance_no_loss():
    inlet = two_phase_inlet_pressure(1.0, 0.0779, 0.0, 0.0, 2.0, 6.0e5, 0.02, 2.0e-4)
    assert inlet.valve_inlet_pressure == 6.0e5


def test_a_subcooled_liquid_flows_as_liquid_to_its_saturation_pressure_then_flashes():
    """Above its saturation pressure p0 the liquid loses N·G²·v0/2 (Darcy–Weisbach); beyond, the rest of the
    resistance is the flashing flow's from p0 (API 520 Part I annex C, C.2.3), continuous where the two meet."""
    mass_flow, diameter, p0, v0, omega = 3.0, 0.0525, 6.0e5, 0.0011, 8.0
    flux = mass_flow / (math.pi * diameter ** 2 / 4)
    short = two_phase_inlet_pressure(mass_flow, diameter, 1.0, 0.5, omega, p0, v0, 2.0e-4, liquid_from=6.5e5)
    assert short.valve_inlet_pressure == pytest.approx(6.5e5 - short.resistance * flux * flux * v0 / 2, rel=1e-12)
    # Entering exactly at its saturation pressure, it flashes from the start: the same as the two-phase inflow.
    at_saturation = two_phase_inlet_pressure(mass_flow, diameter, 3.0, 2.0, omega, p0, v0, 2.0e-4, liquid_from=p0)
    flashing = two_phase_inlet_pressure(mass_flow, diameter, 3.0, 2.0, omega, p0, v0, 2.0e-4)
    assert at_saturation.valve_inlet_pressure == pytest.approx(flashing.valve_inlet_pressure, rel=1e-12)
    # Entering just above it, the first velocity heads are the liquid's, which expands no more: the valve sees a
    # higher pressure, and the pipe loses less than the mixture flashing from the start.
    above = two_phase_inlet_pressure(mass_flow, diameter, 3.0, 2.0, omega, p0, v0, 2.0e-4, liquid_from=p0 + 500.0)
    assert above.valve_inlet_pressure > flashing.valve_inlet_pressure
    assert p0 + 500.0 - above.valve_inlet_pressure < p0 - flashing.valve_inlet_pressure
