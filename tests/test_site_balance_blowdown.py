"""Site steam balance, blowdown heat recovery: the flash fraction and the make-up cooler against IAPWS-95
(CoolProp) worked by hand; headers, deaerator and recovery closing with the other IF97 engine; refusals by
name; and the record's HTML drawing the steam flows as a Sankey SVG, one band per flow of the figure data."""

import re
import shutil
from pathlib import Path

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.site_balance import solver
from steamcalc.calcs.site_balance.blowdown import flash_fraction
from steamcalc.calcs.site_balance.calculation import Inputs, calculate
from steamcalc.calcs.site_balance.closure import (blowdown_streams, deaerator_streams, header_streams,
                                                  relative_residual)
from steamcalc.calcs.site_balance.items import Boiler, Deaerator, Letdown, User
from steamcalc.cases.site import Site
from steamcalc.cli import main
from steamcalc.errors import InputError
from tests.site_balance_cases import ATM, CASE, HAND_SITE, YEAR, coolprop_enthalpy, write_site

REPO = Path(__file__).resolve().parents[1]
DEMO = REPO / "workbooks" / "demo_site"
SITE = HAND_SITE
_cool = coolprop_enthalpy


def _inputs(flash_header=None, approach=None, effectiveness=None, blowdown=0.05, vent=0.02):
    return Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=blowdown,
                                blowdown_flash_header=flash_header, blowdown_cooler_approach=approach,
                                blowdown_cooler_effectiveness=effectiveness),
                  deaerator=Deaerator(pressure=1.2e5, steam_header="LP", vent_fraction=vent),
                  load_cases=YEAR, letdowns=(Letdown(name="L", source="HP", target="LP"),),
                  users=(User(name="U", header="LP", flows=(("all year", 2.0),), return_fraction=0.5,
                              return_temperature=353.15, condensate_to="cooled"),))


# Flash of saturated blowdown water: x = (h_f(p_boiler) - h_f(p_flash)) / (h_g(p_flash) - h_f(p_flash)).
FLASH_TABLE = [
    # boiler Pa(a), flash Pa(a), source
    (11e5, 2.5e5, "flash energy balance by hand, IAPWS-95 (CoolProp)"),
    (17.5e5, 3.5e5, "flash energy balance by hand, IAPWS-95 (CoolProp)"),
    (41e5, 1.5e5, "flash energy balance by hand, IAPWS-95 (CoolProp)"),
]


@pytest.mark.parametrize("p_boiler,p_flash,source", FLASH_TABLE)
def test_blowdown_flash_fraction_against_iapws95_by_hand(p_boiler, p_flash, source):
    h_bd, h_f, h_g = _cool(p_boiler, Q=0), _cool(p_flash, Q=0), _cool(p_flash, Q=1)
    expected = (h_bd - h_f) / (h_g - h_f)
    from steamcalc.properties.steam import SteamState
    h_if97 = SteamState.from_p_dryness(p_boiler, 0.0).enthalpy
    # IF97 and IAPWS-95 enthalpy differences agree to about 0.1 kJ/kg (see test_steam): 1e-3 of a fraction near 0.1.
    assert flash_fraction(h_if97, p_flash) == pytest.approx(expected, rel=1e-3)


def test_blowdown_flash_steam_joins_its_header_in_the_balance():
    r = calculate(_inputs(flash_header="LP"), SITE)
    h_bd, h_f, h_g = _cool(11e5, Q=0), _cool(2.5e5, Q=0), _cool(2.5e5, Q=1)
    x = (h_bd - h_f) / (h_g - h_f)                      # flash energy balance by hand, IAPWS-95 (CoolProp)
    blowdown = r.value("all year.blowdown_flow")
    assert r.value("all year.blowdown_flash_steam_flow") == pytest.approx(x * blowdown, rel=1e-3)
    # The flash steam displaces let-down steam: less boiler steam than without the flash vessel.
    plain = calculate(_inputs(), SITE)
    assert r.value("all year.boiler_steam_flow") < plain.value("all year.boiler_steam_flow")
    assert r.value("all year.L.steam_flow") < plain.value("all year.L.steam_flow")


# Make-up cooler, counter-flow. The blowdown is a small stream against the make-up water, so with an approach
# temperature its outlet reaches T_mu + dT: Q = m_r (h_r - h(p_r, T_mu + dT)); with an effectiveness,
# Q = eps m_r (h_r - h(p_r, T_mu)). h_r: saturated water at the flash pressure, or at the boiler's without flash.
COOLER_TABLE = [
    # flash header, approach K, effectiveness, source
    (None, 10.0, None, "counter-flow cooler by hand (approach at the cold end), IAPWS-95 (CoolProp)"),
    ("LP", 10.0, None, "counter-flow cooler by hand (approach at the cold end), IAPWS-95 (CoolProp)"),
    ("LP", None, 0.6, "counter-flow cooler by hand (effectiveness, blowdown the smaller capacity), IAPWS-95 (CoolProp)"),
]


@pytest.mark.parametrize("flash_header,approach,effectiveness,source", COOLER_TABLE)
def test_blowdown_cooler_heat_by_hand(flash_header, approach, effectiveness, source):
    r = calculate(_inputs(flash_header, approach, effectiveness), SITE)
    p_r = 2.5e5 if flash_header else 11e5
    h_r = _cool(p_r, Q=0)
    blowdown = r.value("all year.blowdown_flow") / 3600
    residual = blowdown - (r.value("all year.blowdown_flash_steam_flow") / 3600 if flash_header else 0.0)
    t_mu = 288.15
    if approach is not None:
        expected = residual * (h_r - _cool(p_r, T=t_mu + approach))
    else:
        expected = effectiveness * residual * (h_r - _cool(p_r, T=t_mu))
    assert r.value("all year.blowdown_heat_recovered") * 1e3 == pytest.approx(expected, rel=2e-3)
    # The heat goes into the make-up water: h_mu,out = h_mu + Q / m_mu.
    makeup = r.value("all year.makeup_water_flow") / 3600
    h_out = _cool(ATM, T=t_mu) + expected / makeup
    t_out = PropsSI("T", "P", 1.2e5, "H", h_out, "Water") - 273.15
    assert r.value("all year.makeup_temperature_to_deaerator") == pytest.approx(t_out, abs=0.05)
    # The heat lost in blowdown is what leaves to drain above make-up water: the residual less the cooler's heat.
    lost = residual * (h_r - _cool(ATM, T=t_mu)) - expected
    assert r.value("all year.blowdown_heat_loss") * 1e3 == pytest.approx(lost, rel=5e-3)
    # A year of it: the load case's hours.
    assert r.value("annual_blowdown_heat_recovered") == pytest.approx(
        r.value("all year.blowdown_heat_recovered") * 8000 / 1e3, rel=1e-9)


def test_cooler_saves_deaerator_steam_and_fuel():
    plain = calculate(_inputs(), SITE)
    cooled = calculate(_inputs(approach=10.0), SITE)
    assert cooled.value("all year.deaerator_steam_flow") < plain.value("all year.deaerator_steam_flow")
    assert cooled.value("all year.fuel_power") < plain.value("all year.fuel_power")


@pytest.mark.parametrize("engine", ["fast", "iapws"])
def test_headers_deaerator_and_recovery_close_with_the_other_if97_engine(engine):
    site = Site(atmospheric_pressure=ATM, makeup_water_temperature=288.15, boiler_efficiency=0.86,
                headers={"HP": 11e5, "MP": 6e5, "LP": 2.5e5})
    inputs = Inputs(boiler=Boiler(header="HP", pressure=12e5, temperature=473.15, feedwater_tds=150,
                                  boiler_water_tds=3000, blowdown_flash_header="MP", blowdown_cooler_approach=8.0),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="LP", vent_fraction=0.02),
                    load_cases=YEAR, letdowns=(Letdown(name="A", source="HP", target="MP"),
                                               Letdown(name="B", source="MP", target="LP")),
                    users=(User(name="M", header="MP", flows=(("all year", 1.0),), return_fraction=0.8,
                                return_temperature=363.15, condensate_to="cooled"),
                           User(name="U", header="LP", flows=(("all year", 2.0),), return_fraction=0.5,
                                return_temperature=353.15, condensate_to="cooled")))
    r = calculate(inputs, site)
    b = r.states["balances"]["all year"]
    assert b.blowdown_flash_steam > 0.0 and b.blowdown_heat_recovered > 0.0
    assert b.last_change <= solver.TOLERANCE
    for header in site.headers:
        inflows, outflows = header_streams(site, b, header)
        assert relative_residual(inflows, outflows, engine) <= 1e-6, header
        assert sum(s.mass_flow for s in inflows) == pytest.approx(sum(s.mass_flow for s in outflows), rel=1e-12)
    for name, streams in (("deaerator", deaerator_streams(b)), ("recovery", blowdown_streams(b))):
        assert relative_residual(*streams, engine) <= 1e-6, name
    recovery_in, recovery_out = blowdown_streams(b)
    assert sum(s.mass_flow for s in recovery_in) == pytest.approx(sum(s.mass_flow for s in recovery_out), rel=1e-12)


@pytest.mark.parametrize("boiler_keys,field,words", [
    ('blowdown_flash_header = "XP"', "boiler.blowdown_flash_header", "not in the site file"),
    ('blowdown_flash_header = "HP"\npressure_note = 1', "boiler.pressure_note", "unknown key"),
    ('blowdown_cooler_approach = "10 K"\nblowdown_cooler_effectiveness = 0.5', "boiler.blowdown_cooler_effectiveness",
     "not both"),
    ('blowdown_cooler_effectiveness = 1.5', "boiler.blowdown_cooler_effectiveness", "from 0 to 1"),
])
def test_bad_blowdown_recovery_in_a_case_file_is_refused_by_name(tmp_path, capsys, boiler_keys, field, words):
    write_site(tmp_path)
    case = CASE.replace("boiler_water_tds = 3000\n", f"boiler_water_tds = 3000\n{boiler_keys}\n")
    (tmp_path / "case.toml").write_text(case)
    assert main(["run", str(tmp_path / "case.toml"), "--out", str(tmp_path / "out")]) == 2
    err = capsys.readouterr().err
    assert field.split(".")[-1] in err and words in err and "Traceback" not in err
    assert not (tmp_path / "out").exists() or not list((tmp_path / "out").glob("*.json"))


def test_a_flash_at_or_above_the_boiler_pressure_is_refused_by_name():
    site = Site(atmospheric_pressure=ATM, makeup_water_temperature=288.15, boiler_efficiency=0.86,
                headers={"HP": 11e5, "LP": 2.5e5, "XHP": 14e5})
    with pytest.raises(InputError) as info:
        calculate(_inputs(flash_header="XHP"), site)
    assert info.value.field == "boiler.blowdown_flash_header" and "not below the boiler" in str(info.value)
    with pytest.raises(InputError) as info:
        calculate(_inputs(flash_header="NOPE"), SITE)
    assert info.value.field == "boiler.blowdown_flash_header"


@pytest.fixture(scope="module")
def demo_html(tmp_path_factory):
    """The demo site's SB-01 issued (with the records it links) in a folder of its own: its JSON and HTML."""
    import json
    folder = tmp_path_factory.mktemp("demo") / "demo_site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    cases = [str(folder / "cases" / f"{name}.toml") for name in ("LD-01", "LD-02", "FL-01", "HX-01", "SB-01")]
    assert main(["run", "--quiet", *cases]) in (0, 1)
    record = json.loads(next((folder / "records").glob("SB-01_rev*.json")).read_text())
    html = next((folder / "records").glob("SB-01_rev*.html")).read_text()
    return record, html


def test_demo_balance_recovers_blowdown(demo_html):
    record, _ = demo_html
    results = record["results"]
    for case in ("winter", "summer"):
        assert results[f"{case}.blowdown_flash_steam_flow"]["value"] > 0.0
        assert results[f"{case}.blowdown_heat_recovered"]["value"] > 0.0
    assert results["annual_blowdown_heat_saved"]["value"] > 0.0


def test_html_record_draws_each_flow_figure_as_a_sankey_with_one_band_per_flow(demo_html):
    record, html = demo_html
    flow_figures = [f for f in record["figures"] if f.get("series") and f["series"][0]["style"] == "flows"]
    assert len(flow_figures) == 2          # one per load case: winter and summer
    svgs = re.findall(r'<svg[^>]*class="sankey".*?</svg>', html, re.S)
    assert len(svgs) == len(flow_figures)
    for figure, svg in zip(flow_figures, svgs):
        labels = figure["series"][0]["labels"]
        assert svg.count('class="sankey-band"') == len(labels) == len(figure["series"][0]["y"])
        for label in labels:
            source, _, target = label.partition(" → ")
            assert f"<title>{source} → {target}:" in svg
        assert "blowdown flash → LP header" in labels
