"""Steam-heated exchanger: LMTD, F factors, balances, stall load by hand, water properties, bad input."""

import math
import shutil

import pytest
from CoolProp.CoolProp import PropsSI
from hypothesis import given, settings
from hypothesis import strategies as st

from steamcalc.calcs.exchanger import Inputs, calculate, lmtd, required_saturation_temperature, stall_load
from steamcalc.cli import main
from steamcalc.errors import InputError
from steamcalc.site import Site
from tests.case_helpers import assert_refused
from steamcalc.steam import saturation_pressure, saturation_temperature

SITE = Site()
BASE = dict(steam_pressure=9e5, process_flow=12000 / 3600, process_inlet_temperature=328.15,
            process_outlet_temperature=358.15)


def test_lmtd_formula_and_ht():
    from ht import LMTD
    # (dT1 - dT2) / ln(dT1 / dT2) by hand: dT1 = 120, dT2 = 90.
    by_hand = (120 - 90) / math.log(120 / 90)
    assert lmtd(448.15, 448.15, 328.15, 358.15) == pytest.approx(by_hand, rel=1e-12)
    assert lmtd(400.0, 350.0, 300.0, 330.0) == pytest.approx(LMTD(400.0, 350.0, 300.0, 330.0), rel=1e-12)


def test_f_factor_one_shell_pass_against_bowman_equation():
    # Bowman, Mueller & Nagle (1940), one shell pass, two tube passes, R = 1, worked by hand at P = 0.5:
    # F = sqrt(2) P/(1-P) / ln[(2 - P(2 - sqrt 2)) / (2 - P(2 + sqrt 2))] = 0.8023.
    p = 0.5
    by_hand = math.sqrt(2) * p / (1 - p) / math.log((2 - p * (2 - math.sqrt(2))) / (2 - p * (2 + math.sqrt(2))))
    assert by_hand == pytest.approx(0.8023, abs=1e-4)
    from steamcalc.calcs.exchanger import _f_factor
    # R = 1, P = 0.5: hot 200 -> 150, cold 100 -> 150.
    assert _f_factor("1-2", 200.0, 150.0, 100.0, 150.0) == pytest.approx(by_hand, rel=1e-6)


def test_f_factor_two_shell_passes_beats_one():
    from steamcalc.calcs.exchanger import _f_factor
    one = _f_factor("1-2", 200.0, 140.0, 100.0, 150.0)
    two = _f_factor("2-4", 200.0, 140.0, 100.0, 150.0)
    assert 0.5 < one < two < 1.0
    assert _f_factor("counterflow", 200.0, 140.0, 100.0, 150.0) == 1.0


def test_condensing_zone_has_no_f_correction():
    a = calculate(Inputs(**BASE, arrangement="1-2", overall_u=1800.0), SITE)
    b = calculate(Inputs(**BASE, arrangement="counterflow", overall_u=1800.0), SITE)
    assert a.value("required_area") == pytest.approx(b.value("required_area"), rel=1e-12)


def test_water_duty_against_iapws95_coolprop():
    r = calculate(Inputs(**BASE, process_pressure=5e5), SITE)
    dh = PropsSI("H", "P", 5e5, "T", 358.15, "Water") - PropsSI("H", "P", 5e5, "T", 328.15, "Water")
    # Measured difference 4.3e-4 relative: IF97 region 1 reproduces IAPWS-95 liquid enthalpy
    # differences to a few parts in 1e4 here; 1e-3 still catches any formulation or unit error.
    assert r.value("duty") == pytest.approx(12000 / 3600 * dh / 1e3, rel=1e-3)


def test_hx_stall_load_by_hand():
    # HX-01-like: saturated at 9 bar(a), U 1.8 kW/m2K, 2.6 m2, back pressure 1.8 bar(a).
    r = calculate(Inputs(**BASE, overall_u=1800.0, installed_area=2.6, condensate_back_pressure=1.8e5), SITE)
    t_back = saturation_temperature(1.8e5)
    q_stall = 1800.0 * 2.6 * 30.0 / math.log((t_back - 328.15) / (t_back - 358.15))
    assert r.value("stall_load_fraction") == pytest.approx(q_stall / (r.value("duty") * 1e3), rel=1e-9)
    assert 0.45 < r.value("stall_load_fraction") < 0.55


def test_turndown_inverse():
    # At the stall load the needed saturation temperature is the back pressure's.
    ua, duty = 4680.0, 419e3
    fraction = stall_load(duty, ua, 328.15, 358.15, 1.8e5)
    t = required_saturation_temperature(fraction * duty, ua, 328.15, 358.15)
    assert saturation_pressure(t) == pytest.approx(1.8e5, rel=1e-9)


def test_superheated_steam_and_subcooling_zones():
    r = calculate(Inputs(**BASE, steam_temperature=493.15, condensate_subcooling=20.0, overall_u=1800.0), SITE)
    zones = r.value("desuperheating_duty") + r.value("condensing_duty") + r.value("subcooling_duty")
    assert zones == pytest.approx(r.value("duty"), rel=1e-9)
    # More heat per kg of steam than saturated steam to saturated condensate: less steam.
    plain = calculate(Inputs(**BASE), SITE)
    assert r.value("steam_flow") < plain.value("steam_flow")


@settings(max_examples=40, deadline=None)
@given(p=st.floats(2e5, 20e5), t_in=st.floats(283.15, 330.0), rise=st.floats(5.0, 40.0), flow=st.floats(0.1, 20.0),
       loss=st.floats(0.0, 0.1), superheat=st.floats(0.0, 60.0), sub=st.floats(0.0, 15.0))
def test_duty_balances_close(p, t_in, rise, flow, loss, superheat, sub):
    t_sat = saturation_temperature(p)
    t_out = t_in + rise
    if t_sat - t_out < 10.0 or t_sat - sub <= t_in + 1:
        return
    r = calculate(Inputs(steam_pressure=p, process_flow=flow, process_inlet_temperature=t_in,
                         process_outlet_temperature=t_out, heat_loss=loss or None,
                         steam_temperature=t_sat + superheat if superheat > 0.5 else None,
                         condensate_subcooling=sub or None), SITE)
    steam_heat = r.value("steam_flow") / 3600 * (r.value("steam_enthalpy") - r.value("condensate_enthalpy"))
    assert steam_heat == pytest.approx(r.value("duty") * (1 + loss), rel=1e-9)
    assert r.value("condensate_flow") == r.value("steam_flow")


@pytest.mark.parametrize("kwargs,field", [
    (dict(process_outlet_temperature=320.0), "process_outlet_temperature"),
    (dict(overall_u=-5.0), "overall_u"),
    (dict(arrangement="3-6"), "arrangement"),
    (dict(process_fluid="glycol"), "process_cp"),
    (dict(process_flow=None), "process_flow"),
])
def test_bad_inputs(kwargs, field):
    args = dict(BASE)
    args.update(kwargs)
    with pytest.raises(InputError) as info:
        Inputs(**args)
    assert info.value.field == field


CASE = """
[case]
kind = "exchanger"
id = "H-1"
[inputs]
steam_pressure = "8 bar(g)"
process_flow = "12 t/h"
process_inlet_temperature = "55 degC"
process_outlet_temperature = "85 degC"
{extra}
"""


@pytest.mark.parametrize("extra,old,new,field", [
    ("", '"85 degC"', '"45 degC"', "process_outlet_temperature"),
    ("", '"8 bar(g)"', '"-0.5 bar(g)"', "steam_pressure"),
    ('overall_u = "-1.8 kW/(m^2 K)"', "", "", "overall_u"),
    ('overall_u = "1.8 kW"', "", "", "overall_u"),
    ('installed_area = "2.6 m"', "", "", "installed_area"),
])
def test_bad_exchanger_case_exits_2(tmp_path, capsys, extra, old, new, field):
    text = CASE.format(extra=extra)
    if old:
        text = text.replace(old, new)
    assert_refused(tmp_path, capsys, text, field)


def test_demo_hx01_runs_and_verifies(tmp_path, demo_site_dir):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases" / "HX-01.toml")]) == 0
    assert main(["verify", str(site / "records" / "HX-01_revA.json")]) == 0
