"""Let-down calculation: hand-worked facts, balances over random inputs, checks."""

import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from steamcalc.calcs.letdown.calculation import Inputs, calculate
from steamcalc.errors import InputError
from steamcalc.cases.site import Site
from steamcalc.properties.steam import SteamState, saturation_temperature

SITE = Site()


def test_throttling_15bara_350C_to_1bara():
    # Steam-table fact (common practice): from 15 bar(a), 350 degC to 1 bar(a) the steam
    # stays superheated at about 336-337 degC; the inlet enthalpy (about 3148-3149 kJ/kg)
    # lies above both saturated enthalpies at 1 bar(a), so no liquid/vapour split balances it.
    result = calculate(Inputs(inlet_pressure=15e5, outlet_pressure=1e5, mass_flow=1.0,
                              inlet_temperature=623.15), SITE)
    assert result.value("outlet_phase") == "superheated"
    assert 336.0 <= result.value("outlet_temperature") <= 337.0
    assert 3148.0 <= result.value("inlet_enthalpy") <= 3149.5
    h_g = SteamState.from_p_dryness(1e5, 1.0).enthalpy / 1e3
    h_f = SteamState.from_p_dryness(1e5, 0.0).enthalpy / 1e3
    assert result.value("outlet_enthalpy") > h_g > h_f
    assert result.value("outlet_dryness") == 1.0


def test_wet_inlet_throttles_towards_dry_and_is_flagged():
    result = calculate(Inputs(inlet_pressure=10e5, outlet_pressure=1.5e5, mass_flow=0.5, inlet_dryness=0.95),
                       SITE)
    checks = {c.name: c.status for c in result.checks}
    assert checks["Inlet steam state"] == "warn"
    assert result.value("outlet_dryness") > 0.95


def test_very_wet_inlet_stays_wet_and_outlet_is_flagged():
    result = calculate(Inputs(inlet_pressure=10e5, outlet_pressure=5e5, mass_flow=0.5, inlet_dryness=0.80),
                       SITE)
    assert result.value("outlet_phase") == "wet"
    assert {c.name: c.status for c in result.checks}["Outlet steam state"] == "warn"


def test_superheat_input_equals_temperature_input():
    t_sat = saturation_temperature(17e5)
    a = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.0, inlet_superheat=25.0), SITE)
    b = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.0,
                         inlet_temperature=t_sat + 25.0), SITE)
    assert a.value("outlet_temperature") == pytest.approx(b.value("outlet_temperature"), abs=1e-9)


def test_desuperheater_hand_balance():
    # Worked by hand from the step values: m_w = m_s (h2 - h3) / (h3 - h_w).
    inputs = Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15,
                    target_superheat=10.0, water_temperature=378.15, water_pressure=21e5)
    r = calculate(inputs, SITE)
    h2 = r.value("inlet_enthalpy")
    h3 = r.value("outlet_enthalpy")
    hw = r.value("spray_water_enthalpy")
    assert r.value("spray_water_flow") == pytest.approx(4500 * (h2 - h3) / (h3 - hw), rel=1e-12)
    assert r.value("outlet_superheat") == pytest.approx(10.0, abs=1e-6)
    desuperheater_checks = [c for c in r.checks if ("esuperheat" in c.name or "Spray" in c.name)
                            and not c.name.startswith("Spray valve")]   # the spray valve's own: test_letdown_spray
    assert len(desuperheater_checks) == 5 and all(c.status == "pass" for c in desuperheater_checks)


def test_target_close_to_saturation_warns():
    r = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.0, inlet_temperature=503.15,
                         target_superheat=3.0, water_temperature=378.15, water_pressure=21e5), SITE)
    assert {c.name: c.status for c in r.checks}["Desuperheat margin above saturation"] == "warn"
    assert r.status in ("warn", "fail")


def test_unreachable_target_fails_but_gives_a_result():
    r = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.0, inlet_temperature=503.15,
                         target_temperature=473.15 + 30, water_temperature=378.15, water_pressure=21e5), SITE)
    assert r.status == "fail"
    assert r.value("spray_water_flow") == 0.0


@pytest.mark.parametrize("kwargs,field", [
    (dict(inlet_temperature=503.15, inlet_superheat=10.0), "inlet_superheat"),
    (dict(), "inlet_temperature"),
    (dict(inlet_temperature=503.15, mass_flow=-1.0), "mass_flow"),
    (dict(inlet_temperature=503.15, target_superheat=10.0), "desuperheater.water_temperature"),
    (dict(inlet_temperature=503.15, water_temperature=378.15), "desuperheater.target_superheat"),
    (dict(inlet_superheat=0.0), "inlet_superheat"),
])
def test_inputs_refuse_bad_combinations(kwargs, field):
    base = dict(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.0)
    base.update(kwargs)
    with pytest.raises(InputError) as info:
        Inputs(**base)
    assert info.value.field == field


# -- balances over random valid inputs -------------------------------------------------------
pressures = st.floats(min_value=2e5, max_value=60e5)


@settings(max_examples=60, deadline=None)
@given(p1=pressures, ratio=st.floats(0.1, 0.9), superheat=st.floats(1.0, 150.0),
       flow=st.floats(0.01, 50.0), target=st.floats(5.0, 20.0), water_t=st.floats(290.0, 380.0))
def test_balances_close_over_random_inputs(p1, ratio, superheat, flow, target, water_t):
    p2 = p1 * ratio
    inputs = Inputs(inlet_pressure=p1, outlet_pressure=p2, mass_flow=flow, inlet_superheat=superheat)
    plain = calculate(inputs, SITE)
    # Valve: isenthalpic, mass conserved exactly.
    assert plain.value("outlet_enthalpy") == pytest.approx(plain.value("inlet_enthalpy"), rel=1e-9)
    assert plain.value("outlet_mass_flow") == plain.value("inlet_mass_flow")

    water_p = p2 + 10e5
    assume(plain.value("throttled_superheat") > target)
    assume(water_t - 273.15 < plain.value("outlet_saturation_temperature") + target)
    desuper = calculate(Inputs(inlet_pressure=p1, outlet_pressure=p2, mass_flow=flow, inlet_superheat=superheat,
                               target_superheat=target, water_temperature=water_t, water_pressure=water_p), SITE)
    steam, spray, out = (desuper.value(k) for k in ("inlet_mass_flow", "spray_water_flow", "outlet_mass_flow"))
    assert out == steam + spray
    energy_in = steam * desuper.value("inlet_enthalpy") + spray * desuper.value("spray_water_enthalpy")
    energy_out = out * desuper.value("outlet_enthalpy")
    assert abs(energy_in - energy_out) <= 1e-9 * energy_out
