"""Site steam balance: the what-if takes the boiler's blowdown recovery out of service ("blowdown recovery").

Checked against the balance worked by hand with IAPWS-95 (CoolProp): a boiler of saturated steam at 11 bar(a)
with blowdown a fraction f of its feedwater, the deaerator heated from the boiler's header, one user on the LP
header fed by a throttling let-down and, with the recovery, the blowdown flashed to the LP header and/or its
residual cooled against the make-up water. Per kg of boiler steam S: blowdown B = k S with k = f/(1 - f);
flash steam x B with x = (h_f,HP - h_f,LP)/(h_g,LP - h_f,LP); cooler heat q B with q = ε (1 - x)(h_f,r - h(p_r,
T_mu)) (the residual the smaller capacity rate, common practice for a blowdown cooler); deaerator steam
D = d S with d = [(1 + k)(h_fw - h_mu) - k q] / [h_g - h_mu - v (h_v - h_mu)]; the HP header S = (U - x k S) + D,
so S = U / (1 + x k - d); make-up M = (1 + k) S - (1 - v) D; fuel P = [S (h_g - h_fw) + B (h_f,HP - h_fw)] / η.
Without the recovery x = q = 0: fuel and make-up water rise by what the recovery saved.
"""

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.site_balance.calculation import Inputs, calculate
from steamcalc.calcs.site_balance.items import Boiler, Deaerator, Letdown, LoadCase, User
from steamcalc.cases.site import Site
from steamcalc.errors import InputError
from tests.case_helpers import run_case_text
from tests.site_balance_cases import CASE, write_site

ATM = 1.01325e5
P_HP, P_LP, P_DA = 11e5, 2.5e5, 1.3e5
T_MU, EFFICIENCY, F, VENT, USER = 288.15, 0.86, 0.05, 0.02, 2.0
SITE = Site(atmospheric_pressure=ATM, makeup_water_temperature=T_MU, boiler_efficiency=EFFICIENCY,
            headers={"HP": P_HP, "LP": P_LP})
YEAR = (LoadCase("all year", 8000 * 3600.0),)
#: IF97 (the package) against IAPWS-95 (CoolProp, the hand figures): the flows and fuel here agree to 3e-5
#: (measured), the rises (differences of two near figures, 0.1-1 % of them) to 7e-4.
REL, REL_DIFFERENCE = 1e-4, 2e-3


def _h(p, **state):
    """Specific enthalpy, J/kg, from IAPWS-95 through CoolProp."""
    if "Q" in state:
        return PropsSI("H", "P", p, "Q", state["Q"], "Water")
    return PropsSI("H", "P", p, "T", state["T"], "Water")


def _by_hand(flash, effectiveness):
    """Boiler steam, make-up water (kg/s) and fuel (W) of the balance, worked by hand (module docstring)."""
    h_g, h_f_hp = _h(P_HP, Q=1), _h(P_HP, Q=0)
    h_fw, h_v, h_mu = _h(P_DA, Q=0), _h(P_DA, Q=1), _h(ATM, T=T_MU)
    k = F / (1 - F)
    x = (h_f_hp - _h(P_LP, Q=0)) / (_h(P_LP, Q=1) - _h(P_LP, Q=0)) if flash else 0.0
    p_r, h_r = (P_LP, _h(P_LP, Q=0)) if flash else (P_HP, h_f_hp)
    q = effectiveness * (1 - x) * (h_r - _h(p_r, T=T_MU))
    d = ((1 + k) * (h_fw - h_mu) - k * q) / (h_g - h_mu - VENT * (h_v - h_mu))
    steam = USER / (1 + x * k - d)
    makeup = (1 + k) * steam - (1 - VENT) * d * steam
    fuel = (steam * (h_g - h_fw) + k * steam * (h_f_hp - h_fw)) / EFFICIENCY
    return steam, makeup, fuel


def _inputs(flash, effectiveness, without=("blowdown recovery",)):
    return Inputs(boiler=Boiler(header="HP", pressure=P_HP, blowdown_fraction=F,
                                blowdown_flash_header="LP" if flash else None,
                                blowdown_cooler_effectiveness=effectiveness or None),
                  deaerator=Deaerator(pressure=P_DA, steam_header="HP", vent_fraction=VENT), load_cases=YEAR,
                  letdowns=(Letdown(name="HP-LP", source="HP", target="LP"),),
                  users=(User(name="Process", header="LP", flows=(("all year", USER),)),), without=without)


RECOVERY_TABLE = [
    # blowdown flash to LP, cooler effectiveness, source
    (True, 0.0, "flash vessel energy balance and site balance by hand, IAPWS-95 (CoolProp)"),
    (False, 0.6, "counter-flow cooler by effectiveness and site balance by hand, IAPWS-95 (CoolProp)"),
    (True, 0.6, "flash vessel, cooler on its residual and site balance by hand, IAPWS-95 (CoolProp)"),
]


@pytest.mark.parametrize("flash,effectiveness,source", RECOVERY_TABLE)
def test_without_the_blowdown_recovery_fuel_and_water_rise_by_what_it_saved(flash, effectiveness, source):
    r = calculate(_inputs(flash, effectiveness), SITE)
    steam, makeup, fuel = _by_hand(flash, effectiveness)
    steam_0, makeup_0, fuel_0 = _by_hand(False, 0.0)
    assert r.value("all year.boiler_steam_flow") == pytest.approx(steam * 3600, rel=REL)
    assert r.value("all year.makeup_water_flow") == pytest.approx(makeup * 3600, rel=REL)
    assert r.value("all year.fuel_power") == pytest.approx(fuel / 1e3, rel=REL)
    assert r.value("what_if.all year.boiler_steam_flow") == pytest.approx(steam_0 * 3600, rel=REL)
    assert r.value("what_if.all year.makeup_water_flow") == pytest.approx(makeup_0 * 3600, rel=REL)
    assert r.value("what_if.all year.fuel_power") == pytest.approx(fuel_0 / 1e3, rel=REL)
    # The rises, by hand: more fuel and more make-up water without the recovery.
    more_fuel = r.value("what_if.all year.fuel_power") - r.value("all year.fuel_power")
    more_water = r.value("what_if.all year.makeup_water_flow") - r.value("all year.makeup_water_flow")
    assert more_fuel == pytest.approx((fuel_0 - fuel) / 1e3, rel=REL_DIFFERENCE) and more_fuel > 0
    assert more_water == pytest.approx((makeup_0 - makeup) * 3600, rel=REL_DIFFERENCE) and more_water > 0
    year = 8000 * 3600.0 / 3.6e9
    assert r.value("what_if_annual_fuel_energy_difference") == pytest.approx(more_fuel * 1e3 * year, rel=1e-9)
    # Nothing recovered in the what-if; the balance's own figures keep their recovery.
    assert r.value("all year.blowdown_heat_saved") > 0
    assert r.value("what_if.all year.blowdown_heat_saved") == 0.0
    if flash:
        assert r.value("what_if.all year.blowdown_flash_steam_flow") == 0.0
    if effectiveness:
        assert r.value("what_if.all year.blowdown_heat_recovered") == 0.0


def test_the_what_if_says_what_it_takes_out_in_words():
    r = calculate(_inputs(True, 0.6), SITE)
    assert r.values["what_if_annual_fuel_energy_difference"].label.startswith("Without blowdown recovery, more fuel")


def test_a_boiler_without_recovery_has_none_to_take_out():
    with pytest.raises(InputError) as caught:
        _inputs(False, 0.0)
    assert caught.value.field == "what_if.without"


@pytest.fixture
def site(tmp_path):
    return write_site(tmp_path)


BLOWDOWN = 'boiler_water_tds = 3000\n'


@pytest.mark.parametrize("boiler_extra,without,words", [
    ("", '"blowdown recovery"', "the boiler has no blowdown recovery to take out of service"),
    ('blowdown_flash_header = "LP"\n', '"Blowdown"', '"blowdown recovery" (the boiler\'s blowdown flash and cooler)'),
    ('blowdown_flash_header = "LP"\n', '"Flash", "Flash"', "names an item twice"),
])
def test_what_if_names_are_refused_with_the_valid_ones(tmp_path, capsys, site, boiler_extra, without, words):
    text = CASE.replace(BLOWDOWN, BLOWDOWN + boiler_extra, 1).replace('without = ["Flash"]', f"without = [{without}]")
    code, _, err = run_case_text(tmp_path, capsys, text)
    assert code == 2 and "what_if.without" in err and words in err and "Fix:" in err, err
    assert "Traceback" not in err


def test_the_case_file_takes_the_blowdown_recovery_out(tmp_path, capsys, site):
    text = CASE.replace(BLOWDOWN, BLOWDOWN + 'blowdown_flash_header = "LP"\nblowdown_cooler_approach = "10 K"\n', 1)
    code, _, err = run_case_text(tmp_path, capsys, text.replace('without = ["Flash"]',
                                                                'without = ["Flash", "blowdown recovery"]'))
    assert code in (0, 1), err
