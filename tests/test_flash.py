"""Flash-steam recovery: trade figures, IAPWS-95 cross-check, balances, vessel sizing, bad input."""

import math

import pytest
from CoolProp.CoolProp import PropsSI
from hypothesis import given, settings
from hypothesis import strategies as st

from steamcalc.calcs.flash.calculation import Inputs, calculate
from steamcalc.cli import main
from steamcalc.errors import InputError
from steamcalc.cases.site import Price, Site
from steamcalc.units.amounts import text_of
from tests.case_helpers import assert_refused

ATM = 1.01325e5
SITE = Site(operating_hours=6000.0, boiler_efficiency=0.86, fuel_price=Price(40.0, "EUR"),
            makeup_water_temperature=288.15, fuel_emission_factor=202.0)


def test_flash_from_10_barg_to_0_barg_is_about_16_percent():
    # Common practice (flash-steam charts): saturated condensate from 10 bar(g) to 0 bar(g)
    # flashes about 16 %.
    r = calculate(Inputs(condensate_pressure=10e5 + ATM, condensate_flow=1.0, flash_pressure=ATM), SITE)
    assert r.value("flash_fraction") == pytest.approx(0.16, abs=0.005)


@pytest.mark.parametrize("p_in,p_flash", [(9e5, 3.5e5), (17e5, 1.1e5), (5e5, 1.5e5)])
def test_flash_fraction_against_iapws95_coolprop(p_in, p_flash):
    # IAPWS-95 through CoolProp (independent library): x = (h_f(p_in) - h_f(p)) / (h_g(p) - h_f(p)).
    h_in = PropsSI("H", "P", p_in, "Q", 0, "Water")
    h_f = PropsSI("H", "P", p_flash, "Q", 0, "Water")
    h_g = PropsSI("H", "P", p_flash, "Q", 1, "Water")
    reference = (h_in - h_f) / (h_g - h_f)
    r = calculate(Inputs(condensate_pressure=p_in, condensate_flow=1.0, flash_pressure=p_flash), SITE)
    # IF97 and IAPWS-95 enthalpies differ by up to about 0.2 kJ/kg (see test_steam), i.e. about 1e-4 in x.
    assert r.value("flash_fraction") == pytest.approx(reference, abs=2e-4)


def test_subcooled_condensate_does_not_flash_and_says_so():
    r = calculate(Inputs(condensate_pressure=9e5, condensate_flow=1.0, condensate_temperature=393.15,
                         flash_pressure=3.5e5), SITE)
    assert r.value("flash_fraction") == 0.0
    assert r.value("flash_steam_flow") == 0.0
    check = next(c for c in r.checks if c.name == "Condensate flashes")
    assert check.status == "warn" and "does not flash" in text_of(check.detail)


def test_cascade_stages_add_up():
    one = calculate(Inputs(condensate_pressure=17e5, condensate_flow=1.0, flash_pressure=2e5), SITE)
    two = calculate(Inputs(condensate_pressure=17e5, condensate_flow=1.0, stages=(9e5, 2e5)), SITE)
    # Steam flashed at the higher stage leaves with more enthalpy per kg (h_g is higher there),
    # so the cascade's total flash mass is a little below the single stage's to the same pressure.
    assert 0.97 * one.value("flash_fraction") < two.value("flash_fraction") < one.value("flash_fraction")
    assert next(c for c in two.checks if c.name == "Flash energy balance (independent)").status == "pass"
    total = two.value("stage_1_flash_steam_flow") + two.value("stage_2_flash_steam_flow")
    assert total == pytest.approx(two.value("flash_steam_flow"), rel=1e-12)


def test_yearly_saving_by_hand():
    r = calculate(Inputs(condensate_pressure=9e5, condensate_flow=1.0, flash_pressure=3.5e5), SITE)
    heat_kw = r.value("recovered_heat_rate")
    assert r.value("annual_fuel_energy_saved") == pytest.approx(heat_kw * 6000 / 0.86 / 1000, rel=1e-12)
    assert r.value("annual_cost_saving") == pytest.approx(r.value("annual_fuel_energy_saved") * 40, rel=1e-12)
    assert r.value("annual_co2_avoided") == pytest.approx(r.value("annual_fuel_energy_saved") * 0.202, rel=1e-12)


def test_souders_brown_published_form():
    # Souders & Brown (1934): v = K sqrt((rho_L - rho_V) / rho_V); D = sqrt(4 Q / (pi v)).
    r = calculate(Inputs(condensate_pressure=9e5, condensate_flow=1.0, flash_pressure=3.5e5, k_factor=0.06), SITE)
    rho_l = PropsSI("D", "P", 3.5e5, "Q", 0, "Water")
    rho_v = PropsSI("D", "P", 3.5e5, "Q", 1, "Water")
    v = 0.06 * math.sqrt((rho_l - rho_v) / rho_v)
    q = r.value("flash_steam_flow") / 3600 / rho_v
    assert r.value("vessel_vapour_diameter") == pytest.approx(math.sqrt(4 * q / (math.pi * v)), rel=1e-3)


def test_vented_receiver_is_reported_as_a_loss():
    r = calculate(Inputs(condensate_pressure=17e5, condensate_flow=0.3, flash_pressure=ATM + 0.1e5, vented=True),
                  SITE)
    check = next(c for c in r.checks if c.name == "Vented receiver")
    assert check.status == "warn" and "lost" in text_of(check.detail)


def test_flash_above_demand_warns():
    r = calculate(Inputs(condensate_pressure=17e5, condensate_flow=1.0, flash_pressure=3.5e5, lp_demand=0.01), SITE)
    assert next(c for c in r.checks if c.name == "Flash steam within the low-pressure demand").status == "warn"


def test_flash_above_demand_is_credited_only_on_what_the_users_take():
    # Hand calculation on IAPWS-95 (CoolProp, independent library): the credit is the demand's mass of flash
    # steam raised from make-up water, Q = m_demand · (h_g(p_flash) − h(1.01325 bar, 15 °C)); the rest is vented.
    p_in, p_flash, flow, demand = 17e5, 3.5e5, 1.0, 0.05
    r = calculate(Inputs(condensate_pressure=p_in, condensate_flow=flow, flash_pressure=p_flash, lp_demand=demand),
                  SITE)
    h_g = PropsSI("H", "P", p_flash, "Q", 1, "Water")
    h_makeup = PropsSI("H", "P", ATM, "T", 288.15, "Water")
    assert r.value("recovered_heat_rate") == pytest.approx(demand * (h_g - h_makeup) / 1e3, rel=2e-4)
    flash = r.value("flash_steam_flow") / 3600
    assert r.value("vented_flash_steam_flow") == pytest.approx((flash - demand) * 3600, rel=1e-12)
    assert r.value("vented_flash_heat_rate") == pytest.approx((flash - demand) * (h_g - h_makeup) / 1e3, rel=2e-4)
    # The money follows the credited heat only: fuel = Q·t/η at the fuel price (site data above).
    fuel = r.value("recovered_heat_rate") * 6000 / 0.86 / 1e3
    assert r.value("annual_cost_saving") == pytest.approx(fuel * 40.0, rel=1e-12)
    assert r.value("annual_co2_avoided") == pytest.approx(fuel * 202.0 / 1e3, rel=1e-12)
    # Within the demand nothing is vented and all the flash steam is credited.
    within = calculate(Inputs(condensate_pressure=p_in, condensate_flow=flow, flash_pressure=p_flash, lp_demand=1.0),
                       SITE)
    assert "vented_flash_steam_flow" not in within.values
    assert within.value("recovered_heat_rate") == pytest.approx(within.value("flash_steam_flow") / 3600
                                                               * (h_g - h_makeup) / 1e3, rel=2e-4)


@settings(max_examples=60, deadline=None)
@given(p_in=st.floats(2e5, 80e5), r1=st.floats(0.2, 0.9), r2=st.floats(0.2, 0.9), flow=st.floats(0.01, 20.0),
       subcool=st.floats(0.0, 30.0), cascade=st.booleans())
def test_balances_close_over_random_inputs(p_in, r1, r2, flow, subcool, cascade):
    from steamcalc.properties.steam import saturation_temperature
    t = saturation_temperature(p_in) - subcool
    stages = (p_in * r1, p_in * r1 * r2)
    inputs = Inputs(condensate_pressure=p_in, condensate_flow=flow, condensate_temperature=t if subcool else None,
                    stages=stages if cascade else None, flash_pressure=None if cascade else stages[1])
    r = calculate(inputs, SITE)
    # Mass: flash plus residual is the condensate, exactly in the recorded unit.
    assert r.value("flash_steam_flow") + r.value("residual_condensate_flow") == pytest.approx(flow * 3600, rel=1e-15)
    assert 0.0 <= r.value("flash_fraction") < 1.0
    assert next(c for c in r.checks if c.name == "Flash energy balance (independent)").status == "pass"


@pytest.mark.parametrize("kwargs,field", [
    (dict(flash_pressure=9e5), "flash_pressure"),
    (dict(flash_pressure=10e5), "flash_pressure"),
    (dict(stages=(3e5, 5e5)), "stages[1]"),
    (dict(flash_pressure=3e5, condensate_flow=-1.0), "condensate_flow"),
    (dict(), "flash_pressure"),
    (dict(flash_pressure=3e5, stages=(3e5,)), "stages"),
])
def test_bad_inputs(kwargs, field):
    base = dict(condensate_pressure=9e5, condensate_flow=1.0)
    base.update(kwargs)
    with pytest.raises(InputError) as info:
        Inputs(**base)
    assert info.value.field == field


CASE = """
[case]
kind = "flash"
id = "F-1"
[inputs]
condensate_pressure = "8 bar(g)"
condensate_flow = "3.2 t/h"
{extra}
"""


@pytest.mark.parametrize("extra,field", [
    ('flash_pressure = "8 bar(g)"', "flash_pressure"),
    ('stages = ["2 bar(g)", "5 bar(g)"]', "stages[1]"),
    ('flash_pressure = "2 bar(g)"\ncondensate_temperature = "250 degC"', "condensate_temperature"),
    ('flash_pressure = "2 bar(g)"\n[inputs.vessel]\ninlet_nozzle = "DN77"', "inlet_nozzle"),
    ('flash_pressure = "2 bar(g)"\nlp_demand = "-1 t/h"', "lp_demand"),
])
def test_bad_flash_case_exits_2_with_field(tmp_path, capsys, extra, field):
    assert_refused(tmp_path, capsys, CASE.format(extra=extra), field)


def test_negative_flow_case_exits_2(tmp_path, capsys):
    text = CASE.format(extra='flash_pressure = "2 bar(g)"').replace('"3.2 t/h"', '"-3.2 t/h"')
    assert_refused(tmp_path, capsys, text, "condensate_flow")


def test_demo_flash_cases_run_and_verify(tmp_path, demo_site_dir):
    import shutil
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    for case in ("FL-01", "FL-02"):
        assert main(["run", str(site / "cases" / f"{case}.toml")]) == 0
        assert main(["verify", str(site / "records" / f"{case}_revB.json")]) == 0


def test_demand_check_needs_no_site_data():
    r = calculate(Inputs(condensate_pressure=17e5, condensate_flow=1.0, flash_pressure=3.5e5, lp_demand=0.01), Site())
    assert next(c for c in r.checks if c.name == "Flash steam within the low-pressure demand").status == "warn"


# --- Vessel: vapour area, liquid hold-up, nozzle buildability, height -----------------------------

def _coolprop_saturated(p):
    """IAPWS-95 through CoolProp (independent library): rho_f, rho_g, h_f, h_g at p."""
    return (PropsSI("D", "P", p, "Q", 0, "Water"), PropsSI("D", "P", p, "Q", 1, "Water"),
            PropsSI("H", "P", p, "Q", 0, "Water"), PropsSI("H", "P", p, "Q", 1, "Water"))


def _hand_vessel(p_in, p_flash, flow, k, residence, bores):
    """The three diameters and the height worked by hand from IAPWS-95 (CoolProp) properties."""
    rho_f, rho_g, h_f, h_g = _coolprop_saturated(p_flash)
    x = (PropsSI("H", "P", p_in, "Q", 0, "Water") - h_f) / (h_g - h_f)
    v_allow = k * math.sqrt((rho_f - rho_g) / rho_g)                   # Souders & Brown (1934)
    d_vapour = math.sqrt(4 * (x * flow / rho_g) / (math.pi * v_allow))
    holdup = (1 - x) * flow / rho_f * residence                         # V = V_f · t
    d_holdup = (4 * holdup / math.pi) ** (1 / 3)                        # liquid depth = D
    d_nozzles = 2 * max(bores) if bores else 0.0                        # ASME VIII-1 UG-36(b)(1): d ≤ D/2
    return x, d_vapour, d_holdup, d_nozzles, holdup


# ASME B36.10M schedule 40 inside diameters, m (6.065 in, 2.067 in, 3.068 in).
DN150, DN50, DN80 = 0.15405, 0.0525, 0.07793


@pytest.mark.parametrize("p_in,p_flash,flow,residence,nozzles,bores,governs,source", [
    (9.0e5, 3.5e5, 0.889, 60.0, ("DN50", "DN150", "DN40"), (DN50, DN150), "liquid hold-up",
     "hand: Souders–Brown, hold-up depth = D, 2 × bore; IAPWS-95 (CoolProp)"),
    (9.0e5, 3.5e5, 0.889, 5.0, ("DN50", "DN150", None), (DN50, DN150), "nozzle buildability",
     "hand, as above; 5 s hold-up"),
    (17e5, 1.1e5, 1.0, 10.0, (None, None, None), (), "vapour area",
     "hand, as above; no nozzles given"),
    (17e5, 1.1e5, 0.3, 180.0, (None, "DN80", None), (DN80,), "liquid hold-up",
     "hand, as above; 3 min hold-up"),
])
def test_vessel_diameter_is_the_largest_criterion_by_hand(p_in, p_flash, flow, residence, nozzles, bores,
                                                          governs, source):
    inlet, steam, drain = nozzles
    r = calculate(Inputs(condensate_pressure=p_in, condensate_flow=flow, flash_pressure=p_flash, k_factor=0.06,
                         residence_time=residence, inlet_nozzle=inlet, steam_nozzle=steam,
                         condensate_nozzle=drain), SITE)
    _, d_vapour, d_holdup, d_nozzles, holdup = _hand_vessel(p_in, p_flash, flow, 0.06, residence, bores)
    # IF97 and IAPWS-95 saturated densities agree to about 1e-4 relative; B36.10M bores to 0.1 mm.
    assert r.value("vessel_vapour_diameter") == pytest.approx(d_vapour, rel=1e-3)
    assert r.value("vessel_holdup_diameter") == pytest.approx(d_holdup, rel=1e-3)
    assert r.value("vessel_liquid_holdup") == pytest.approx(holdup, rel=1e-3)
    if bores:
        assert r.value("vessel_nozzle_diameter") == pytest.approx(d_nozzles, rel=1e-3)
    assert r.value("vessel_governing_criterion") == governs
    assert r.value("vessel_diameter") == pytest.approx(max(d_vapour, d_holdup, d_nozzles), rel=1e-3)


@pytest.mark.parametrize("inlet,inlet_bore,source", [
    ("DN50", DN50, "hand: Svrcek & Monnery (1993) stack, 0.3 m + d/2 and max(0.9 m + d/2, D/2)"),
    (None, 0.0, "hand, as above, no inlet nozzle given"),
])
def test_vessel_height_stack_by_hand(inlet, inlet_bore, source):
    r = calculate(Inputs(condensate_pressure=9e5, condensate_flow=0.889, flash_pressure=3.5e5, k_factor=0.06,
                         inlet_nozzle=inlet), SITE)
    d = r.value("vessel_diameter")
    holdup_depth = r.value("vessel_liquid_holdup") / (math.pi * d ** 2 / 4)
    stacked = holdup_depth + (0.3 + inlet_bore / 2) + max(0.9 + inlet_bore / 2, d / 2)
    assert r.value("vessel_height") == pytest.approx(max(stacked, 2.5 * d), rel=1e-3)
    assert r.value("vessel_minimum_height") == pytest.approx(2.5 * d, rel=1e-12)


def test_holdup_diameter_scales_with_cube_root_of_residence_time():
    # Consistency: V ∝ t and D_L ∝ V^(1/3).
    base = dict(condensate_pressure=9e5, condensate_flow=0.889, flash_pressure=3.5e5)
    one = calculate(Inputs(residence_time=60.0, **base), SITE).value("vessel_holdup_diameter")
    eight = calculate(Inputs(residence_time=480.0, **base), SITE).value("vessel_holdup_diameter")
    assert eight == pytest.approx(2 * one, rel=1e-12)


def test_default_residence_time_is_stated():
    r = calculate(Inputs(condensate_pressure=9e5, condensate_flow=0.889, flash_pressure=3.5e5), SITE)
    assert r.value("vessel_residence_time") == 1.0
    assert any("residence time 1 min" in a and "common practice" in a for a in r.assumptions)
    given = calculate(Inputs(condensate_pressure=9e5, condensate_flow=0.889, flash_pressure=3.5e5,
                             residence_time=120.0), SITE)
    assert not any("residence time 1 min" in a for a in given.assumptions)


def test_cascade_stage_vessels_have_heights():
    r = calculate(Inputs(condensate_pressure=17e5, condensate_flow=1.0, stages=(9e5, 2e5)), SITE)
    for i in (1, 2):
        assert r.value(f"stage_{i}_vessel_height") >= 2.5 * r.value(f"stage_{i}_vessel_diameter")
    assert r.value("vessel_diameter") == max(r.value("stage_1_vessel_diameter"), r.value("stage_2_vessel_diameter"))


# --- Inlet line: two-phase velocity, momentum, API RP 14E for information only --------------------

@pytest.mark.parametrize("p_in,p_flash,flow,inlet,bore,source", [
    (9.0e5, 3.5e5, 0.889, "DN50", DN50, "fluids.two_phase_voidage.homogeneous void fraction; IAPWS-95 (CoolProp)"),
    (9.0e5, 3.5e5, 0.889, "DN80", DN80, "as above"),
    (17e5, 1.1e5, 0.3, "DN50", DN50, "as above"),
])
def test_inlet_two_phase_velocity_and_momentum_against_fluids(p_in, p_flash, flow, inlet, bore, source):
    from fluids.two_phase_voidage import homogeneous

    r = calculate(Inputs(condensate_pressure=p_in, condensate_flow=flow, flash_pressure=p_flash,
                         inlet_nozzle=inlet), SITE)
    rho_f, rho_g, h_f, h_g = _coolprop_saturated(p_flash)
    x = (PropsSI("H", "P", p_in, "Q", 0, "Water") - h_f) / (h_g - h_f)
    alpha = homogeneous(x, rho_f, rho_g)
    rho = alpha * rho_g + (1 - alpha) * rho_f          # mixture density from the void fraction
    velocity = flow / (rho * math.pi * bore ** 2 / 4)
    assert r.value("inlet_line_velocity") == pytest.approx(velocity, rel=2e-3)
    assert r.value("inlet_momentum") == pytest.approx(rho * velocity ** 2, rel=4e-3)


@pytest.mark.parametrize("inlet,velocity_status,momentum_status", [
    ("DN50", "warn", "warn"),     # about 16.3 m/s and 6.7 kPa
    ("DN65", "pass", "warn"),     # about 11.4 m/s and 3.3 kPa
    ("DN80", "pass", "pass"),     # about 7.4 m/s and 1.38 kPa, just under the 1.4 kPa limit
    ("DN100", "pass", "pass"),
])
def test_inlet_checks_judge_two_phase_velocity_and_momentum(inlet, velocity_status, momentum_status):
    r = calculate(Inputs(condensate_pressure=9e5, condensate_flow=0.889, flash_pressure=3.5e5,
                         inlet_nozzle=inlet), SITE)
    checks = {c.name: c for c in r.checks}
    assert checks["Inlet line two-phase velocity"].status == velocity_status
    assert checks["Inlet nozzle momentum"].status == momentum_status
    assert (r.value("inlet_line_velocity") > 15.0) == (velocity_status == "warn")
    assert (r.value("inlet_momentum") > 1400.0) == (momentum_status == "warn")


def test_api_rp_14e_is_information_only():
    # A line below the API RP 14E erosional velocity but above the two-phase limit still warns:
    # the erosional figure no longer judges the line.
    r = calculate(Inputs(condensate_pressure=9e5, condensate_flow=0.889, flash_pressure=3.5e5,
                         inlet_nozzle="DN50"), SITE)
    assert 15.0 < r.value("inlet_line_velocity") < r.value("inlet_line_erosional_velocity")
    check = next(c for c in r.checks if c.name == "Inlet line two-phase velocity")
    assert check.status == "warn" and "for information only" in text_of(check.detail)
    assert any("API RP 14E" in a and "outside its scope" in a for a in r.assumptions)
    assert "information only" in r.values["inlet_line_erosional_velocity"].label


def test_vessel_without_nozzle_sizes_warns_that_buildability_was_not_checked():
    bare = calculate(Inputs(condensate_pressure=9e5, condensate_flow=0.9, flash_pressure=3.5e5), SITE)
    check = next(c for c in bare.checks if c.name == "Vessel diameter")
    assert check.status == "warn" and "no nozzle sizes given" in text_of(check.detail)
    sized = calculate(Inputs(condensate_pressure=9e5, condensate_flow=0.9, flash_pressure=3.5e5,
                             inlet_nozzle="DN80", steam_nozzle="DN150", condensate_nozzle="DN50"), SITE)
    assert next(c for c in sized.checks if c.name == "Vessel diameter").status == "pass"
