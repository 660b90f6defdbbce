"""Site steam balance: the independent review's findings, each reproduced and checked fixed.

Independent figures by hand with IAPWS-95 (CoolProp). The balance worked by hand (as in test_site_balance):
a boiler of saturated steam at 11 bar(a), blowdown a fraction b of its feedwater, the deaerator at 1.2 bar(a)
heated from the LP header, one user of m = 1 kg/s on the LP header (2.5 bar(a)) fed by a throttling
let-down, returning a fraction f of its condensate at T_r. To a vented receiver a fraction
x = (h_f(2.5 bar(a)) − h_f(p_atm)) / (h_g(p_atm) − h_f(p_atm)) of it flashes off and is lost:
m_r = f m (1 − x). Deaerator steam D = (F (h_fw − h_mu) − m_r (h_r − h_mu)) / (h_s − h_mu − v (h_v − h_mu))
with F = (1 + k)(m + D), k = b/(1 − b), solved for D; make-up M = F + v D − m_r − D.
"""

import dataclasses
import json

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.site_balance.calculation import Inputs, calculate
from steamcalc.calcs.site_balance.items import Boiler, Deaerator, Flash, Letdown, LoadCase, User
from steamcalc.cases.site import Site
from steamcalc.errors import InputError
from tests.case_helpers import assert_refused, run_case_text
from tests.site_balance_cases import CASE, write_site
from tests.test_report_words import _html_text, _markdown_text, _problems, _without_given
from tests.worked_step_arithmetic import written_step_problems

ATM = 1.01325e5
SITE = Site(atmospheric_pressure=ATM, makeup_water_temperature=288.15, boiler_efficiency=0.86,
            headers={"HP": 11e5, "LP": 2.5e5})
YEAR = (LoadCase("all year", 8000 * 3600.0),)
#: IF97 (the package) against IAPWS-95 (CoolProp): enthalpy differences agree to about 0.1 kJ/kg in 400.
REL = 5e-4
#: A flash fraction is a difference of two near enthalpies over the latent heat: 0.1 kJ/kg in 160 (measured 7e-4).
REL_FLASH = 1.5e-3


def _h(p, **state):
    """Specific enthalpy, J/kg, IAPWS-95 through CoolProp."""
    if "Q" in state:
        return PropsSI("H", "P", p, "Q", state["Q"], "Water")
    return PropsSI("H", "P", p, "T", state["T"], "Water")


def _flash_to_atmosphere(p):
    """Fraction of saturated water at p (Pa) flashing off at the standard atmosphere, by hand (IAPWS-95)."""
    return (_h(p, Q=0) - _h(ATM, Q=0)) / (_h(ATM, Q=1) - _h(ATM, Q=0))


def _balance(route, returned=0.5, t_return=353.15, vent=0.02, blowdown=0.05, user=1.0):
    return Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=blowdown),
                  deaerator=Deaerator(pressure=1.2e5, steam_header="LP", vent_fraction=vent),
                  load_cases=YEAR, letdowns=(Letdown(name="L", source="HP", target="LP"),),
                  users=(User(name="U", header="LP", flows=(("all year", user),), return_fraction=returned,
                              return_temperature=t_return, condensate_to=route),))


# --- 1. Condensate to a vented receiver loses its flash --------------------------------------------------------------

VENTED_TABLE = [
    # route, return fraction, return temperature K, flash lost?, source
    ("vented receiver", 0.5, 353.15, True, "receiver flash and deaerator balance by hand, IAPWS-95 (CoolProp)"),
    ("vented receiver", 0.9, 368.15, True, "receiver flash and deaerator balance by hand, IAPWS-95 (CoolProp)"),
    ("cooled", 0.5, 353.15, False, "deaerator balance by hand, IAPWS-95 (CoolProp)"),
]


@pytest.mark.parametrize("route,returned,t_return,lost,source", VENTED_TABLE)
def test_a_vented_receiver_loses_the_flash_off_the_returned_mass(route, returned, t_return, lost, source):
    vent, blowdown, user = 0.02, 0.05, 1.0
    r = calculate(_balance(route, returned, t_return, vent, blowdown, user), SITE)
    x = _flash_to_atmosphere(2.5e5) if lost else 0.0
    m_r = returned * user * (1 - x)
    h_s, h_fw, h_v = _h(11e5, Q=1), _h(1.2e5, Q=0), _h(1.2e5, Q=1)
    h_mu, h_r = _h(ATM, T=288.15), _h(2.5e5, T=t_return)
    k = blowdown / (1 - blowdown)
    a, den = h_fw - h_mu, h_s - h_mu - vent * (h_v - h_mu)
    steam = (user * (1 + k) * a - m_r * (h_r - h_mu)) / (den - (1 + k) * a)
    makeup = (user + steam) * (1 + k) + vent * steam - m_r - steam
    assert r.value("all year.deaerator_steam_flow") == pytest.approx(steam * 3600, rel=REL)
    assert r.value("all year.makeup_water_flow") == pytest.approx(makeup * 3600, rel=REL)
    flash = r.states["balances"]["all year"].return_flash_vented.get("U", 0.0)
    assert flash == pytest.approx(returned * user * x, rel=REL_FLASH, abs=1e-12)
    checks = [c.status for c in r.checks if c.name == "U: condensate flash kept"]
    assert checks == (["warn"] if lost else [])
    assert any("vented receiver" in a for a in r.assumptions)


def test_a_receiver_flash_fraction_matches_the_steam_tables():
    # 8 bar(g) on the demo site's 0.9918 bar(a) atmosphere: 14.4 % flashes (the review's figure), IAPWS-95 by hand.
    p_atm = 0.99178e5
    x = (_h(8e5 + p_atm, Q=0) - _h(p_atm, Q=0)) / (_h(p_atm, Q=1) - _h(p_atm, Q=0))
    site = dataclasses.replace(SITE, atmospheric_pressure=p_atm, headers={"HP": 11e5, "MP": 8e5 + p_atm, "LP": 2.5e5})
    inputs = Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=0.05),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="LP", vent_fraction=0.02), load_cases=YEAR,
                    letdowns=(Letdown(name="L1", source="HP", target="MP"),
                              Letdown(name="L2", source="HP", target="LP")),
                    users=(User(name="Preheater", header="MP", flows=(("all year", 1500 / 3600),), return_fraction=1.0,
                                return_temperature=371.15),
                           User(name="LP user", header="LP", flows=(("all year", 1.0),))),
                    flashes=(Flash(name="FV", from_user="Preheater", target="LP"),), without=("FV",))
    r = calculate(inputs, site)
    assert x == pytest.approx(0.144, abs=5e-4)                 # review: 14.4 %
    # by hand 1500 kg/h × 0.144 = 216 kg/h (the review's figure)
    assert r.value("what_if.all year.Preheater.return_flash_vented") == pytest.approx(1500 * x, rel=REL_FLASH)
    assert "all year.Preheater.return_flash_vented" not in r.values      # with the flash vessel, nothing to a receiver


def test_a_return_too_hot_for_a_vented_receiver_is_refused_by_field():
    with pytest.raises(InputError) as err:
        calculate(_balance("vented receiver", t_return=383.15), SITE)
    assert err.value.field == "user.U.return_temperature" and "deaerator" in err.value.fix


def test_an_unknown_return_route_is_refused_by_name(tmp_path, capsys):
    write_site(tmp_path)
    text = CASE.replace('condensate_to = "deaerator"', 'condensate_to = "drain"')
    assert_refused(tmp_path, capsys, text, "user[1].condensate_to")
    with pytest.raises(InputError) as err:
        _balance("to the river")
    assert err.value.field == "user.U.condensate_to"


# --- 2. The what-if meets the same checks -----------------------------------------------------------------------------

def test_the_what_if_is_checked_by_name():
    # The flash vessel gives the LP header steam; without it the LP let-down runs harder, beyond a maximum set between.
    site = dataclasses.replace(SITE, headers={"HP": 11e5, "MP": 6e5, "LP": 2.5e5})
    base = Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=0.05),
                  deaerator=Deaerator(pressure=1.2e5, steam_header="LP", vent_fraction=0.02), load_cases=YEAR,
                  letdowns=(Letdown(name="L1", source="HP", target="MP"), Letdown(name="L2", source="HP", target="LP")),
                  users=(User(name="M", header="MP", flows=(("all year", 1.0),), return_fraction=1.0,
                              return_temperature=363.15),
                         User(name="P", header="LP", flows=(("all year", 1.0),))),
                  flashes=(Flash(name="FV", from_user="M", target="LP"),), without=("FV",))
    r = calculate(base, site)
    steam, what_if = r.value("all year.L2.steam_flow"), r.value("what_if.all year.L2.steam_flow")
    assert what_if > steam
    limited = dataclasses.replace(base, letdowns=(base.letdowns[0], dataclasses.replace(
        base.letdowns[1], max_flow=(steam + what_if) / 2 / 3600)))
    r = calculate(limited, site)
    checks = {c.name: c.status for c in r.checks}
    assert checks["all year: let-down L2 within its valve's maximum flow"] == "pass"
    assert checks["Without FV, all year: let-down L2 within its valve's maximum flow"] == "fail"
    assert r.status == "fail"


# --- 3. Boiler efficiency zero ----------------------------------------------------------------------------------------

def test_a_boiler_efficiency_of_zero_is_refused_by_field(tmp_path, capsys):
    write_site(tmp_path)
    text = CASE.replace('boiler_water_tds = 3000', 'boiler_water_tds = 3000\nefficiency = 0')
    assert_refused(tmp_path, capsys, text, "boiler.efficiency")
    with pytest.raises(InputError) as err:
        calculate(dataclasses.replace(_balance("cooled"), boiler=Boiler(
            header="HP", pressure=11e5, blowdown_fraction=0.05, efficiency=0.0)), SITE)
    assert err.value.field == "boiler.efficiency"


def test_equal_dissolved_solids_are_refused_not_divided_by():
    with pytest.raises(InputError) as err:
        calculate(dataclasses.replace(_balance("cooled"), boiler=Boiler(
            header="HP", pressure=11e5, feedwater_tds=150.0, boiler_water_tds=150.0)), SITE)
    assert err.value.field == "boiler.feedwater_tds"


# --- 4. A header nobody supplies is a failing check, not blamed on the returns -------------------------------------

def test_a_fixed_boiler_flow_too_small_fails_its_supply_check(tmp_path, capsys):
    write_site(tmp_path)
    text = CASE.replace('capacity = "12 t/h"', 'capacity = "12 t/h"\nflow = "1 t/h"')
    code, out, err = run_case_text(tmp_path, capsys, text)
    assert code == 1, err                                    # issued, with a failing check
    assert "HP header supplied" in out and "short by" in out
    assert "exceeds the feedwater" not in out + err


def test_a_what_if_without_a_letdown_fails_its_supply_check(tmp_path, capsys):
    write_site(tmp_path)
    text = CASE.replace('without = ["Flash"]', 'without = ["HP-MP"]')
    code, out, err = run_case_text(tmp_path, capsys, text)
    assert code == 1, err
    assert "Without HP-MP, winter: MP header supplied" in out
    assert "exceeds the feedwater" not in out + err


def test_make_up_is_never_negative_when_short():
    inputs = dataclasses.replace(_balance("cooled", returned=1.0, t_return=353.15),
                                 boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=0.05, flow=0.1))
    r = calculate(inputs, SITE)
    b = r.states["balances"]["all year"]
    assert b.shortfalls["HP"] > 0.0 and b.makeup >= 0.0 and b.returns_not_taken > 0.0
    # the deaerator still closes on mass: feedwater + vent = returns taken + steam + make-up
    returned = sum(m for m, _ in b.returns.values())
    assert b.feedwater + b.deaerator_vent == pytest.approx(returned + b.deaerator_steam + b.makeup, rel=1e-9)


def test_returns_truly_above_the_feedwater_are_still_refused():
    # Nothing short: a user returning more condensate than steam it takes is the returns' fault.
    site = dataclasses.replace(SITE, headers={"HP": 11e5, "LP": 2.5e5})
    inputs = Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=0.05, flow=2.0),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="HP", vent_fraction=0.0), load_cases=YEAR,
                    users=(User(name="U", header="HP", flows=(("all year", 0.5),), return_fraction=1.0,
                                return_temperature=353.15, condensate_to="cooled"),))
    r = calculate(inputs, site)      # the boiler vents its surplus; make-up positive: no refusal
    assert r.value("all year.makeup_water_flow") > 0.0


# --- 5. Flash steam credit when a header vents ------------------------------------------------------------------------

def test_a_venting_header_shares_its_vent_among_the_flash_steam():
    site = dataclasses.replace(SITE, headers={"HP": 17e5, "MP": 9e5, "LP": 3.5e5})
    inputs = Inputs(boiler=Boiler(header="HP", pressure=17.5e5, feedwater_tds=150.0, boiler_water_tds=3000.0,
                                  blowdown_flash_header="LP"),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="MP", vent_fraction=0.02), load_cases=YEAR,
                    letdowns=(Letdown(name="L1", source="HP", target="MP"),
                              Letdown(name="L2", source="HP", target="LP")),
                    users=(User(name="Preheater", header="MP", flows=(("all year", 1.5),), return_fraction=1.0,
                                return_temperature=371.15),
                           User(name="Small", header="LP", flows=(("all year", 30 / 3600),))),
                    flashes=(Flash(name="FV", from_user="Preheater", target="LP"),))
    r = calculate(inputs, site)
    b = r.states["balances"]["all year"]
    flashed = b.flash_steam["FV"] + b.blowdown_flash_steam
    vent = b.vents["LP"]
    assert 0.0 < vent < flashed
    used_fv = r.value("all year.FV.flash_steam_used") / 3600
    used_bd = r.value("all year.blowdown_flash_steam_used") / 3600
    # by hand: the two credits add up to what the LP header takes (flashed less vented), each pro rata
    assert used_fv + used_bd == pytest.approx(flashed - vent, rel=1e-9)
    assert used_bd / b.blowdown_flash_steam == pytest.approx(used_fv / b.flash_steam["FV"], rel=1e-9)
    assert used_bd > 0.0


# --- 6. Refusals by their own field -----------------------------------------------------------------------------------

def _desuperheated(**letdown):
    return Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=0.05),
                  deaerator=Deaerator(pressure=1.2e5, steam_header="LP", vent_fraction=0.02), load_cases=YEAR,
                  letdowns=(Letdown(name="L", source="HP", target="LP", **letdown),),
                  users=(User(name="U", header="LP", flows=(("all year", 1.0),)),))


REFUSAL_TABLE = [
    # what, inputs, field, words in the message; source of the limit
    ("target below saturation", lambda: _desuperheated(target_temperature=373.15), "letdown.L.target_temperature",
     "127.41 °C"),   # T_sat(2.5 bar(a)) = 127.41 °C, IAPWS-IF97 Table 35 region 4 (and CoolProp 127.41 °C)
    ("no superheat", lambda: _desuperheated(target_superheat=0.0), "letdown.L.target_superheat", "0 K"),
    ("boiler above the critical pressure", lambda: dataclasses.replace(
        _desuperheated(), boiler=Boiler(header="HP", pressure=230e5, blowdown_fraction=0.05)), "boiler.pressure",
     "220.64"),      # IAPWS-IF97 critical pressure 22.064 MPa
    ("vent near all the heating steam", lambda: dataclasses.replace(
        _desuperheated(), deaerator=Deaerator(pressure=1.2e5, steam_header="LP", vent_fraction=0.999)),
     "deaerator.vent_fraction", "no balance exists"),
]


@pytest.mark.parametrize("what,make,field,words", REFUSAL_TABLE)
def test_each_bad_input_is_refused_by_its_own_field(what, make, field, words):
    with pytest.raises(InputError) as err:
        calculate(make(), SITE)
    assert err.value.field == field, what
    assert words in err.value.message and err.value.fix


def test_vent_limit_is_where_the_deaerator_cannot_close():
    # By hand (IAPWS-95), no blowdown recovery: a balance exists only while h_s − h_mu − v (h_v − h_mu) exceeds
    # (1 + k)(h_fw − h_mu), each kg of heating steam raised by the boiler needing its own feedwater heated (0.886).
    h_s, h_mu, h_v, h_fw = _h(11e5, Q=1), _h(ATM, T=288.15), _h(1.2e5, Q=1), _h(1.2e5, Q=0)
    k = 0.05 / 0.95
    limit = (h_s - h_mu - (1 + k) * (h_fw - h_mu)) / (h_v - h_mu)
    assert limit == pytest.approx(0.886, abs=1e-3)
    ok = dataclasses.replace(_desuperheated(), deaerator=Deaerator(pressure=1.2e5, steam_header="LP",
                                                                    vent_fraction=round(limit - 0.05, 2)))
    calculate(ok, SITE)      # settles below the limit
    with pytest.raises(InputError):
        calculate(dataclasses.replace(ok, deaerator=Deaerator(pressure=1.2e5, steam_header="LP",
                                                              vent_fraction=round(limit + 0.005, 3))), SITE)


# --- 7. Blowdown rate -------------------------------------------------------------------------------------------------

BLOWDOWN_TABLE = [
    # feedwater TDS, boiler-water TDS, share of feedwater (by hand c_fw / c_bw), status, source
    (150.0, 3000.0, 0.05, "pass", "TDS mass balance by hand: 150/3000"),
    (150.0, 1000.0, 0.15, "warn", "TDS mass balance by hand: 150/1000"),
]


@pytest.mark.parametrize("c_fw,c_bw,share,status,source", BLOWDOWN_TABLE)
def test_the_blowdown_rate_is_checked_against_common_practice(c_fw, c_bw, share, status, source):
    inputs = dataclasses.replace(_desuperheated(), boiler=Boiler(header="HP", pressure=11e5, feedwater_tds=c_fw,
                                                                 boiler_water_tds=c_bw))
    r = calculate(inputs, SITE)
    check = next(c for c in r.checks if c.name == "all year: boiler blowdown rate")
    assert check.status == status
    assert check.quantity.value == pytest.approx(share * 100, rel=1e-9)
    assert "common practice" in check.source


def test_a_blowdown_no_balance_can_hold_is_refused_by_field():
    # The review's 150 against 151: 150 kg of blowdown per kg of steam, each heated in the deaerator from make-up.
    with pytest.raises(InputError) as err:
        calculate(dataclasses.replace(_desuperheated(), boiler=Boiler(header="HP", pressure=11e5, feedwater_tds=150.0,
                                                                      boiler_water_tds=151.0)), SITE)
    assert err.value.field == "boiler.feedwater_tds" and "no balance exists" in err.value.message


# --- 8. The deaerator's vent on its feedwater -------------------------------------------------------------------------

VENT_TABLE = [
    # vent of feedwater, return fraction, source
    (0.002, 0.5, "deaerator mass and energy balance by hand, vent on the feedwater, IAPWS-95 (CoolProp)"),
    (0.005, 0.9, "deaerator mass and energy balance by hand, vent on the feedwater, IAPWS-95 (CoolProp)"),
]


@pytest.mark.parametrize("w,returned,source", VENT_TABLE)
def test_a_vent_stated_on_the_feedwater_against_iapws95_by_hand(w, returned, source):
    # D (h_s − h_mu) = F (h_fw − h_mu) + w F (h_v − h_mu) − m_r (h_r − h_mu), F = (1 + k)(m + D);
    # M = F + w F − m_r − D
    base = _balance("cooled", returned=returned)
    inputs = dataclasses.replace(base, deaerator=Deaerator(pressure=1.2e5, steam_header="LP", vent_fraction=0.0,
                                                           vent_of_feedwater=w))
    r = calculate(inputs, SITE)
    h_s, h_fw, h_v = _h(11e5, Q=1), _h(1.2e5, Q=0), _h(1.2e5, Q=1)
    h_mu, h_r = _h(ATM, T=288.15), _h(2.5e5, T=353.15)
    k, user = 0.05 / 0.95, 1.0
    a, latent, m_r = h_fw - h_mu, h_v - h_mu, returned * user
    steam = ((1 + k) * user * (a + w * latent) - m_r * (h_r - h_mu)) / (h_s - h_mu - (1 + k) * (a + w * latent))
    feedwater = (1 + k) * (user + steam)
    assert r.value("all year.deaerator_steam_flow") == pytest.approx(steam * 3600, rel=REL)
    assert r.value("all year.deaerator_vent_flow") == pytest.approx(w * feedwater * 3600, rel=REL)
    assert r.value("all year.makeup_water_flow") == pytest.approx((feedwater * (1 + w) - m_r - steam) * 3600, rel=REL)
    assert any("fraction of its feedwater" in a for a in r.assumptions)


def test_both_vent_bases_are_refused_by_field(tmp_path, capsys):
    write_site(tmp_path)
    text = CASE.replace("vent_fraction = 0.02", "vent_fraction = 0.02\nvent_of_feedwater = 0.002")
    assert_refused(tmp_path, capsys, text, "deaerator.vent_of_feedwater")


# --- The records of the changed balances: worked steps reproduce, reports in the trade's words --------------------

RECORD_TABLE = [
    # what, edit of the shared test case
    ("vented receivers", lambda text: text),
    ("vent on the feedwater", lambda text: text.replace("vent_fraction = 0.02", "vent_of_feedwater = 0.002")),
    ("a header short", lambda text: text.replace('capacity = "12 t/h"', 'capacity = "12 t/h"\nflow = "1 t/h"')),
]


@pytest.mark.parametrize("what,edit", RECORD_TABLE)
def test_each_changed_balance_issues_a_record_whose_steps_reproduce(what, edit, tmp_path, capsys):
    write_site(tmp_path)
    code, _, err = run_case_text(tmp_path, capsys, edit(CASE))
    assert code in (0, 1), err
    record = json.loads((tmp_path / "out" / "SB-T_revA.json").read_text(encoding="utf-8"))
    assert written_step_problems(record) == [], what
    for report in (tmp_path / "out").glob("SB-T_revA.*"):
        if report.suffix in (".html", ".md"):
            raw = _without_given(report.read_text(encoding="utf-8"), record, report.suffix)
            text = _html_text(raw) if report.suffix == ".html" else _markdown_text(raw)
            assert _problems(text) == [], (what, report.name)
