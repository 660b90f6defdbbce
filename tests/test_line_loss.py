"""Line pressure drop: Darcy–Weisbach with the Colebrook friction factor, and its use in sizing."""

import math

import pytest

from steamcalc.calcs.letdown.calculation import Inputs, calculate
from steamcalc.equipment.line_loss import line_pressure_drop
from steamcalc.cases.site import Site
from steamcalc.properties.steam import dynamic_viscosity


def _colebrook_by_hand(reynolds, relative_roughness):
    """Colebrook (1939) solved by fixed-point iteration, independent of fluids."""
    f = 0.02
    for _ in range(100):
        f = (-2.0 * math.log10(relative_roughness / 3.7 + 2.51 / (reynolds * math.sqrt(f)))) ** -2
    return f


@pytest.mark.parametrize("flow, density, viscosity, diameter, length, k", [
    (1.0, 5.0, 1.6e-5, 0.1023, 20.0, 1.5),      # DN100 HP steam
    (1.53, 8.0, 1.65e-5, 0.07792, 25.0, 2.0),   # DN80 HP inlet line
    (1.6, 1.9, 1.45e-5, 0.2027, 40.0, 3.0),     # DN200 LP outlet line
])
def test_darcy_weisbach_by_hand(flow, density, viscosity, diameter, length, k):
    """Hand calculation: v = ṁ/(ρA), Re = ρvD/μ, f from Colebrook by iteration,
    Δp = (f·L/D + ΣK)·ρv²/2 (Darcy–Weisbach; Crane TP-410 for the K method)."""
    velocity = flow / (density * math.pi * diameter ** 2 / 4)
    reynolds = density * velocity * diameter / viscosity
    f = _colebrook_by_hand(reynolds, 4.5e-5 / diameter)
    expected = (f * length / diameter + k) * density * velocity ** 2 / 2
    loss = line_pressure_drop(flow, density, viscosity, diameter, length, k)
    assert loss.friction_factor == pytest.approx(f, rel=1e-9)
    assert loss.pressure_drop == pytest.approx(expected, rel=1e-9)
    # Haaland's (1983) explicit form agrees with Colebrook to within about 2 %.
    haaland = (-1.8 * math.log10((4.5e-5 / diameter / 3.7) ** 1.11 + 6.9 / reynolds)) ** -2
    assert loss.friction_factor == pytest.approx(haaland, rel=0.02)


def test_moody_fully_rough_limit():
    """Source: von Kármán's fully rough limit 1/√f = −2 log10(ε/(3.7D)) (Moody chart)."""
    loss = line_pressure_drop(50.0, 5.0, 1e-6, 0.1, 10.0)
    assert loss.friction_factor == pytest.approx((-2 * math.log10(4.5e-4 / 3.7)) ** -2, rel=0.01)


def test_steam_viscosity_reference():
    """Source: IAPWS R12-08 table 4 check value μ(T = 873.15 K, ρ = 1 kg/m³) = 32.619 µPa·s
    (without the critical enhancement; digits from memory of the release's verification table)."""
    assert dynamic_viscosity(873.15, 1.0) * 1e6 == pytest.approx(32.619, abs=0.002)


def test_valve_inlet_pressure_is_header_less_the_inlet_line():
    base = dict(inlet_pressure=17.0e5, inlet_temperature=503.15, outlet_pressure=9.0e5, mass_flow=0.6,
                max_flow=0.72, inlet_size="DN65", outlet_size="DN80")
    plain = calculate(Inputs(**base), Site())
    with_line = calculate(Inputs(**base, inlet_length=15.0, inlet_fittings_k=1.5, outlet_length=30.0,
                                 outlet_fittings_k=2.5), Site())
    drop = with_line.value("inlet_line_pressure_drop") * 1e5
    assert with_line.states["valve_inlet_maximum"].pressure == pytest.approx(17.0e5 - drop)
    assert with_line.value("valve_kv") > plain.value("valve_kv")
    assert any(s.label == "Valve inlet pressure" for s in with_line.steps)
    assert with_line.value("inlet_line_pressure_drop_per_100m") == pytest.approx(
        with_line.value("inlet_line_pressure_drop") * 100 / 15.0)
    assert with_line.value("outlet_line_pressure_drop") > 0.0


def test_colebrook_converges_at_the_ends_of_its_range_and_refuses_when_it_cannot(monkeypatch):
    # At the edges of the turbulent range (Re 4,000 and 1e8, rough and smooth) Newton meets its 1e-14 stop
    # and agrees with the fixed-point hand solution; given too few steps to converge, it refuses by name
    # instead of returning an unconverged friction factor.
    import numpy as np

    import steamcalc.equipment.line_loss as line_loss
    from steamcalc.errors import NotConvergedError

    for reynolds, roughness in ((4e3, 0.05), (1e8, 1e-6)):
        f = line_loss.colebrook_friction_factors(np.array([reynolds]), roughness)[0]
        assert f == pytest.approx(_colebrook_by_hand(reynolds, roughness), rel=1e-12)
    monkeypatch.setattr(line_loss, "_COLEBROOK_STEPS", 1)
    with pytest.raises(NotConvergedError, match="did not converge in 1 Newton steps") as refused:
        line_loss.colebrook_friction_factors(np.array([1e8]), 1e-6)
    assert refused.value.field == "line friction factor (Colebrook)"
