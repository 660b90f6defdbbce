"""Site energy basis and water cost: parsing, records, the flash water credit, bad input through the CLI."""

import json

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.economics import fuel_basis, fuel_basis_assumption
from steamcalc.calcs.flash.calculation import Inputs, calculate
from steamcalc.errors import InputError, UnitError
from steamcalc.cases.site import Price, Site, WaterCost, load_site
from tests.case_helpers import assert_refused, run_case_text

SITE = dict(operating_hours=6000.0, boiler_efficiency=0.86, fuel_price=Price(40.0, "EUR"),
            makeup_water_temperature=288.15, fuel_emission_factor=182.0)
FLASH = dict(condensate_pressure=9e5, condensate_flow=0.889, flash_pressure=3.5e5)


def _site_file(tmp_path, lines):
    path = tmp_path / "site.toml"
    path.write_text("[site]\n" + "\n".join(lines) + "\n")
    return path


@pytest.mark.parametrize("text,per_m3,currency", [
    ("2.5 EUR/m3", 2.5, "EUR"),
    ("2.5 EUR/m^3", 2.5, "EUR"),
    ("2.5 GBP / m³", 2.5, "GBP"),
    ("0.0025 USD/L", 2.5, "USD"),   # 1 m³ = 1000 L
])
def test_water_cost_parses(tmp_path, text, per_m3, currency):
    site = load_site(_site_file(tmp_path, [f'water_cost = "{text}"']))
    assert site.water_cost.per_m3 == pytest.approx(per_m3, rel=1e-12)
    assert site.water_cost.currency == currency


@pytest.mark.parametrize("value", ['"2.5 EUR/MWh"', '"2.5"', '"2.5 m3"', "2.5", '"-1 EUR/m3"'])
def test_water_cost_with_wrong_unit_is_refused(tmp_path, value):
    path = _site_file(tmp_path, [f"water_cost = {value}"])
    with pytest.raises(UnitError) as info:
        load_site(path)
    assert info.value.field == "water_cost" and "EUR/m3" in info.value.fix and str(path) in str(info.value)


@pytest.mark.parametrize("value", ['"lower"', '"Gross"', '"HHV"', "1", '""'])
def test_unknown_fuel_basis_is_refused(tmp_path, value):
    path = _site_file(tmp_path, [f"fuel_basis = {value}"])
    with pytest.raises(InputError) as info:
        load_site(path)
    assert info.value.field == "fuel_basis"
    assert '"gross"' in info.value.fix and '"net"' in info.value.fix


@pytest.mark.parametrize("basis", ["gross", "net"])
def test_site_record_round_trip_keeps_basis_and_water_cost(tmp_path, basis):
    site = load_site(_site_file(tmp_path, [f'fuel_basis = "{basis}"', 'water_cost = "2.5 EUR/m3"']))
    table = site.to_record()
    assert table["fuel_basis"] == basis
    assert table["water_cost"] == {"value": 2.5, "unit": "EUR/m**3"}
    again = Site.from_record(json.loads(json.dumps(table)))
    assert again.fuel_basis == basis and again.water_cost == WaterCost(2.5, "EUR")


def test_fuel_basis_assumption_states_the_basis_and_the_default():
    unstated = fuel_basis_assumption(Site())
    assert fuel_basis(Site()) == "gross"
    assert "gross calorific value" in unstated and "default" in unstated and "fuel_basis" in unstated
    net = fuel_basis_assumption(Site(fuel_basis="net"))
    assert "net calorific value" in net and "default" not in net
    for text in (unstated, net):
        assert all(word in text for word in ("fuel price", "boiler efficiency", "emission factor"))


@pytest.mark.parametrize("basis", ["gross", "net"])
def test_flash_record_states_its_fuel_basis(basis):
    r = calculate(Inputs(**FLASH), Site(fuel_basis=basis, **SITE))
    assert r.value("fuel_basis") == basis
    assert fuel_basis_assumption(Site(fuel_basis=basis)) in r.assumptions
    assert f"{basis} calorific value" in r.values["annual_fuel_energy_saved"].label
    # The figures are read on the stated basis, not converted: the same numbers give the same money.
    other = calculate(Inputs(**FLASH), Site(fuel_basis="net" if basis == "gross" else "gross", **SITE))
    assert r.value("annual_cost_saving") == other.value("annual_cost_saving")


@pytest.mark.parametrize("hours,cost,source", [
    (6000.0, 2.5, "hand: V = m_flash·t/ρ, C = V·c; ρ at 15 °C, 1 atm from IAPWS-95 (CoolProp)"),
    (8000.0, 4.0, "as above"),
])
def test_water_credit_on_the_flash_steam_by_hand(hours, cost, source):
    site = Site(**{**SITE, "operating_hours": hours}, water_cost=WaterCost(cost, "EUR"))
    r = calculate(Inputs(**FLASH), site)
    rho = PropsSI("D", "T", 288.15, "P", 101325.0, "Water")
    volume = r.value("flash_steam_flow") * hours / rho
    assert r.value("annual_water_saved") == pytest.approx(volume, rel=1e-4)
    assert r.value("annual_water_cost_saving") == pytest.approx(volume * cost, rel=1e-4)
    assert r.value("annual_total_saving") == pytest.approx(
        r.value("annual_cost_saving") + r.value("annual_water_cost_saving"), rel=1e-12)
    assert any("make-up water cost" in a and "residual condensate" in a for a in r.assumptions)


def test_water_in_another_currency_gives_no_total_and_says_so():
    r = calculate(Inputs(**FLASH), Site(**SITE, water_cost=WaterCost(2.0, "GBP")))
    assert "annual_total_saving" not in r.values
    check = next(c for c in r.checks if c.name == "One currency for fuel and water")
    assert check.status == "warn" and "GBP" in check.detail


def test_no_water_cost_no_water_credit():
    r = calculate(Inputs(**FLASH), Site(**SITE))
    assert "annual_water_cost_saving" not in r.values and "annual_total_saving" not in r.values


# --- Bad input through `steamcalc run`: exit 2, file, field, value and fix, no traceback -----------

CASE = """
[case]
kind = "flash"
id = "F-1"
site = "site.toml"
[inputs]
condensate_pressure = "8 bar(g)"
condensate_flow = "3.2 t/h"
flash_pressure = "2 bar(g)"
{vessel}
"""


@pytest.mark.parametrize("line,field,value", [
    ('fuel_basis = "lower"', "fuel_basis", "lower"),
    ('fuel_basis = "HHV"', "fuel_basis", "HHV"),
    ('water_cost = "2.5 EUR/MWh"', "water_cost", "2.5 EUR/MWh"),
    ('water_cost = "2.5"', "water_cost", "2.5"),
])
def test_bad_site_key_through_the_cli_exits_2(tmp_path, capsys, line, field, value):
    site = _site_file(tmp_path, ['operating_hours = "6000 h"', line])
    code, _, err = run_case_text(tmp_path, capsys, CASE.format(vessel=""))
    assert code == 2, err
    assert str(site) in err or "site.toml" in err
    assert f"field '{field}'" in err and value in err and "Fix:" in err
    assert "Traceback" not in err
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("vessel,field", [
    ('[inputs.vessel]\nresidence_time = "-1 min"', "residence_time"),
    ('[inputs.vessel]\nresidence_time = "0 s"', "residence_time"),
    ('[inputs.vessel]\nresidence_time = 2', "residence_time"),
    ('[inputs.vessel]\nresidence_time = "2 m"', "residence_time"),
])
def test_bad_residence_time_through_the_cli_exits_2(tmp_path, capsys, vessel, field):
    _site_file(tmp_path, ['fuel_basis = "gross"'])
    assert_refused(tmp_path, capsys, CASE.format(vessel=vessel), field)


def test_negative_residence_time_message_names_value_and_fix(tmp_path, capsys):
    _site_file(tmp_path, ['fuel_basis = "gross"'])
    code, _, err = run_case_text(tmp_path, capsys, CASE.format(vessel='[inputs.vessel]\nresidence_time = "-1 min"'))
    assert code == 2 and "vessel.residence_time" in err and "-1 min" in err and "Fix:" in err
