"""Site steam balance: deaerator, let-down and blowdown against references worked by hand; headers closing
with the second IF97 implementation; links, verify and the what-if."""

import json
import shutil
from pathlib import Path

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.site_balance import solver
from steamcalc.calcs.site_balance.calculation import Inputs, calculate
from steamcalc.calcs.site_balance.closure import deaerator_streams, header_streams, relative_residual
from steamcalc.calcs.site_balance.comparison import comparison_rows
from steamcalc.calcs.site_balance.figures import sankey_links
from steamcalc.calcs.site_balance.items import Boiler, Deaerator, Letdown, User
from steamcalc.cases.site import Site, case_inputs, case_site, load_case
from steamcalc.cli import main
from steamcalc.errors import NotConvergedError
from steamcalc.records.record import compute_content_digest, compute_digest, read_intact_record
from tests.site_balance_cases import ATM, CASE, HAND_SITE, YEAR, coolprop_enthalpy, write_site

REPO = Path(__file__).resolve().parents[1]
DEMO = REPO / "workbooks" / "demo_site"
SITE = HAND_SITE
_cool = coolprop_enthalpy


# Deaerator mass and energy balance worked by hand with IAPWS-95 (CoolProp): the LP header holds HP saturated
# steam throttled (h_g at 11 bar(a)); boiler steam S = user + D; feedwater F = S (1 + k), k = f/(1 - f);
# D (h_s - h_mu - v (h_v - h_mu)) = F (h_fw - h_mu) - m_r (h_r - h_mu), solved for D.
DEAERATOR_TABLE = [
    # vent fraction, return fraction, return temperature K, blowdown fraction, source
    (0.0, 0.5, 353.15, 0.05, "mass and energy balance by hand, IAPWS-95 (CoolProp)"),
    (0.05, 0.5, 353.15, 0.05, "mass and energy balance by hand, IAPWS-95 (CoolProp)"),
    (0.02, 0.8, 363.15, 0.03, "mass and energy balance by hand, IAPWS-95 (CoolProp)"),
    (0.0, 0.0, 353.15, 0.10, "mass and energy balance by hand, IAPWS-95 (CoolProp)"),
]


@pytest.mark.parametrize("vent,returned,t_return,blowdown,source", DEAERATOR_TABLE)
def test_deaerator_steam_against_iapws95_by_hand(vent, returned, t_return, blowdown, source):
    p_da, user = 1.2e5, 1.0
    inputs = Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=blowdown),
                    deaerator=Deaerator(pressure=p_da, steam_header="LP", vent_fraction=vent),
                    load_cases=YEAR, letdowns=(Letdown(name="L", source="HP", target="LP"),),
                    users=(User(name="U", header="LP", flows=(("all year", user),), return_fraction=returned,
                                return_temperature=t_return if returned else None, condensate_to="cooled"),))
    r = calculate(inputs, SITE)
    h_s, h_fw, h_v = _cool(11e5, Q=1), _cool(p_da, Q=0), _cool(p_da, Q=1)
    h_mu, h_r = _cool(ATM, T=288.15), _cool(2.5e5, T=t_return)
    k = blowdown / (1 - blowdown)
    a, m_r = h_fw - h_mu, returned * user
    den = h_s - h_mu - vent * (h_v - h_mu)
    steam = (user * (1 + k) * a - m_r * (h_r - h_mu)) / (den - (1 + k) * a)
    boiler = user + steam
    makeup = boiler * (1 + k) + vent * steam - m_r - steam
    # IF97 and IAPWS-95 enthalpy differences agree to about 0.1 kJ/kg in 400 (see test_steam): 5e-4 relative.
    assert r.value("all year.deaerator_steam_flow") == pytest.approx(steam * 3600, rel=5e-4)
    assert r.value("all year.boiler_steam_flow") == pytest.approx(boiler * 3600, rel=5e-4)
    assert r.value("all year.makeup_water_flow") == pytest.approx(makeup * 3600, rel=5e-4)


# Desuperheating let-down worked by hand with IAPWS-95: m_s = m_out (h_out - h_w) / (h_in - h_w).
LETDOWN_TABLE = [
    # HP bar(a), HP temperature K, LP bar(a), target superheat K, water temperature K, source
    (17e5, 503.15, 3.5e5, 10.0, 378.15, "desuperheater energy balance by hand, IAPWS-95 (CoolProp)"),
    (41e5, 673.15, 5e5, 20.0, 378.15, "desuperheater energy balance by hand, IAPWS-95 (CoolProp)"),
]


@pytest.mark.parametrize("p_hp,t_hp,p_lp,superheat,t_water,source", LETDOWN_TABLE)
def test_desuperheating_letdown_against_iapws95_by_hand(p_hp, t_hp, p_lp, superheat, t_water, source):
    site = Site(atmospheric_pressure=ATM, makeup_water_temperature=288.15, boiler_efficiency=0.86,
                headers={"HP": p_hp, "LP": p_lp})
    p_water = p_hp + 4e5
    inputs = Inputs(boiler=Boiler(header="HP", pressure=p_hp, temperature=t_hp, blowdown_fraction=0.05),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="HP", vent_fraction=0.0),
                    load_cases=YEAR,
                    letdowns=(Letdown(name="L", source="HP", target="LP", target_superheat=superheat,
                                      water_temperature=t_water, water_pressure=p_water),),
                    users=(User(name="U", header="LP", flows=(("all year", 1.0),)),))
    r = calculate(inputs, site)
    t_sat = PropsSI("T", "P", p_lp, "Q", 0, "Water")
    h_in, h_out, h_w = _cool(p_hp, T=t_hp), _cool(p_lp, T=t_sat + superheat), _cool(p_water, T=t_water)
    steam = 1.0 * (h_out - h_w) / (h_in - h_w)
    assert r.value("all year.L.steam_flow") == pytest.approx(steam * 3600, rel=5e-4)
    assert r.value("all year.L.spray_flow") == pytest.approx((1.0 - steam) * 3600, rel=5e-3)
    assert r.value("all year.LP.temperature") == pytest.approx(t_sat + superheat - 273.15, abs=0.05)


# Boiler blowdown from the dissolved-solids (TDS) balance: solids in with the feedwater leave in the blowdown,
# F c_fw = B c_bw with F = S + B, so B = S c_fw / (c_bw - c_fw). Worked by hand for 10 000 kg/h of steam.
TDS_TABLE = [
    # feedwater TDS, boiler-water TDS, blowdown kg/h by hand, source
    (150, 3000, 10000 * 150 / 2850, "TDS mass balance by hand: 10 000 x 150 / 2850 = 526.3 kg/h"),
    (250, 3500, 10000 * 250 / 3250, "TDS mass balance by hand: 10 000 x 250 / 3250 = 769.2 kg/h"),
    (100, 2000, 10000 * 100 / 1900, "TDS mass balance by hand: 10 000 x 100 / 1900 = 526.3 kg/h"),
]


@pytest.mark.parametrize("c_fw,c_bw,blowdown,source", TDS_TABLE)
def test_blowdown_against_tds_mass_balance_by_hand(c_fw, c_bw, blowdown, source):
    inputs = Inputs(boiler=Boiler(header="HP", pressure=11e5, flow=None, feedwater_tds=c_fw, boiler_water_tds=c_bw),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="HP", vent_fraction=0.0), load_cases=YEAR,
                    users=(User(name="U", header="HP", flows=(("all year", 1.0),)),))
    r = calculate(inputs, SITE)
    steam = r.value("all year.boiler_steam_flow")
    assert r.value("all year.blowdown_flow") == pytest.approx(blowdown * steam / 10000, rel=1e-12)
    feedwater = r.value("all year.feedwater_flow")
    assert feedwater * c_fw == pytest.approx(r.value("all year.blowdown_flow") * c_bw, rel=1e-12)


def test_blowdown_fraction_is_of_the_feedwater():
    inputs = Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=0.05),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="HP", vent_fraction=0.0), load_cases=YEAR,
                    users=(User(name="U", header="HP", flows=(("all year", 1.0),)),))
    r = calculate(inputs, SITE)
    assert r.value("all year.blowdown_flow") == pytest.approx(0.05 * r.value("all year.feedwater_flow"), rel=1e-12)


def test_a_duty_user_takes_q_over_the_header_latent_heat():
    inputs = Inputs(boiler=Boiler(header="HP", pressure=11e5, blowdown_fraction=0.05),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="HP", vent_fraction=0.0), load_cases=YEAR,
                    users=(User(name="U", header="HP", duties=(("all year", 1e6),)),))
    r = calculate(inputs, SITE)
    # Saturated HP steam condensed to saturated water at 11 bar(a): Q / h_fg, IAPWS-95 (CoolProp).
    h_fg = _cool(11e5, Q=1) - _cool(11e5, Q=0)
    assert r.value("all year.U.steam_flow") == pytest.approx(1e6 / h_fg * 3600, rel=2e-4)


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    """The demo site in a folder of its own, with LD-01, LD-02, FL-01 and HX-01 issued into its records."""
    folder = tmp_path_factory.mktemp("demo") / "demo_site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    cases = [str(folder / "cases" / f"{name}.toml") for name in ("LD-01", "LD-02", "FL-01", "HX-01")]
    assert main(["run", *cases]) in (0, 1)   # warnings, not failures, in the demo records
    return folder


def _demo_result(demo):
    case = load_case(demo / "cases" / "SB-01.toml")
    site = case_site(case)
    inputs, _ = case_inputs(case, site, read_record=read_intact_record)
    return inputs, site, calculate(inputs, site)


def test_demo_headers_close_with_the_other_if97_engine(demo):
    _, site, r = _demo_result(demo)
    for name, b in r.states["balances"].items():
        for header in site.headers:
            inflows, outflows = header_streams(site, b, header)
            if not inflows:
                continue
            for engine in ("fast", "iapws"):
                assert relative_residual(inflows, outflows, engine) <= 1e-6, (name, header, engine)
            assert sum(s.mass_flow for s in inflows) == pytest.approx(sum(s.mass_flow for s in outflows), rel=1e-12)
        inflows, outflows = deaerator_streams(b)
        for engine in ("fast", "iapws"):
            assert relative_residual(inflows, outflows, engine) <= 1e-6, (name, "deaerator", engine)
        assert b.last_change <= solver.TOLERANCE


def test_demo_balance_issues_verifies_and_names_its_links(demo, capsys):
    out = demo / "records"
    assert main(["run", str(demo / "cases" / "SB-01.toml"), "--out", str(out)]) == 0
    record_path = out / "SB-01_revA.json"
    record = json.loads(record_path.read_text(encoding="utf-8"))
    linked = {record["inputs"][k]["value"] for k in record["inputs"] if k.endswith(".link.record_id")}
    assert linked == {"LD-01", "LD-02", "FL-01", "HX-01"}
    ld01 = json.loads((out / "LD-01_revB.json").read_text(encoding="utf-8"))
    assert record["inputs"]["letdown.LD-01.link.content_digest"]["value"] == ld01["content_digest"]
    capsys.readouterr()
    assert main(["verify", str(record_path)]) == 0
    # Each load case's steam flows, as Sankey data the workbook draws.
    nodes, sources, targets, values = sankey_links(next(f for f in record["figures"] if f["name"] == "steam_flows_winter"))
    assert "boiler" in nodes and "HP header" in nodes and len(sources) == len(targets) == len(values)
    rows = comparison_rows(record)
    assert [row["figure"] for row in rows][:3] == ["fuel energy a year", "make-up water a year", "CO₂ a year"]


def test_verify_fails_when_a_linked_record_has_changed(demo, tmp_path, capsys):
    out = tmp_path / "records"
    assert main(["run", str(demo / "cases" / "SB-01.toml"), "--out", str(out)]) == 0
    for name in ("LD-01", "LD-02", "FL-01", "HX-01"):
        shutil.copy(demo / "records" / f"{name}_revB.json", out)
    capsys.readouterr()
    assert main(["verify", str(out / "SB-01_revA.json")]) == 0
    linked = out / "LD-01_revB.json"
    record = json.loads(linked.read_text(encoding="utf-8"))
    record["title"] = "edited and re-digested"
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    linked.write_text(json.dumps(record), encoding="utf-8")
    capsys.readouterr()
    assert main(["verify", str(out / "SB-01_revA.json")]) == 1
    assert "LD-01_revB.json has changed since the balance used it" in capsys.readouterr().out


def test_what_if_without_the_flash_needs_more_let_down_and_fuel(tmp_path):
    write_site(tmp_path)
    (tmp_path / "case.toml").write_text(CASE)
    case = load_case(tmp_path / "case.toml")
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    r = calculate(inputs, site)
    for name in ("winter", "summer"):
        flash = r.value(f"{name}.Flash.flash_steam_used")
        assert flash > 0
        assert "what_if." + f"{name}.Flash.flash_steam_flow" not in r.values
    assert r.value("what_if_annual_fuel_energy_difference") > 0
    assert r.value("what_if_annual_total_cost_difference") == pytest.approx(
        r.value("what_if_annual_total_cost") - r.value("annual_total_cost"), rel=1e-12)


def test_a_header_that_vents_in_summer_and_lets_down_in_winter_is_flagged(tmp_path):
    write_site(tmp_path)
    text = CASE.replace('load = { winter = "700 kW", summer = "100 kW" }', 'load = "0 kW"').replace(
        'name = "Evaporator"\nheader = "LP"\nload = "2.5 t/h"',
        'name = "Evaporator"\nheader = "LP"\nload = { winter = "2.5 t/h", summer = "0 t/h" }')
    (tmp_path / "case.toml").write_text(text)
    case = load_case(tmp_path / "case.toml")
    site = case_site(case)
    r = calculate(case_inputs(case, site)[0], site)
    assert r.value("summer.LP.closed_by") == "vent" and r.value("winter.LP.closed_by") == "let-down HP-LP"
    check = next(c for c in r.checks if c.name == "LP header vents in one load case and lets down in another")
    assert check.status == "warn"
    flash = next(c for c in r.checks if c.name == "summer: flash vessel Flash steam taken by the LP header")
    assert flash.status == "warn"
    assert r.value("summer.Flash.flash_steam_used") < r.value("summer.Flash.flash_steam_flow")


def test_a_boiler_beyond_its_rating_fails_the_record(tmp_path, capsys):
    write_site(tmp_path)
    (tmp_path / "case.toml").write_text(CASE.replace('capacity = "12 t/h"', 'capacity = "5 t/h"'))
    assert main(["run", str(tmp_path / "case.toml"), "--out", str(tmp_path / "out")]) == 1
    record = json.loads((tmp_path / "out" / "SB-T_revA.json").read_text(encoding="utf-8"))
    failing = [c["name"] for c in record["checks"] if c["status"] == "fail"]
    assert "winter: boiler within its rating" in failing


def test_a_case_that_does_not_settle_is_refused_by_name(tmp_path, capsys, monkeypatch):
    write_site(tmp_path)
    (tmp_path / "case.toml").write_text(CASE)
    monkeypatch.setattr(solver, "MAX_SWEEPS", 2)
    assert main(["run", str(tmp_path / "case.toml"), "--out", str(tmp_path / "out")]) == 2
    err = capsys.readouterr().err
    assert "load_case.winter" in err and "did not settle" in err and "Traceback" not in err
    assert not (tmp_path / "out").exists()
    with pytest.raises(NotConvergedError):
        case = load_case(tmp_path / "case.toml")
        site = case_site(case)
        calculate(case_inputs(case, site)[0], site)


def test_record_inputs_round_trip(tmp_path):
    write_site(tmp_path)
    (tmp_path / "case.toml").write_text(CASE)
    case = load_case(tmp_path / "case.toml")
    site = case_site(case)
    inputs, given = case_inputs(case, site)
    again = Inputs.from_record_table(json.loads(json.dumps(inputs.to_record_table(given))))
    a, b = calculate(inputs, site), calculate(again, site)
    assert set(a.values) == set(b.values)
    for key, value in a.values.items():
        if isinstance(value.value, str):
            assert value.value == b.values[key].value
        else:
            assert value.value == pytest.approx(b.values[key].value, rel=1e-12), key


def test_register_marks_the_balance_stale_when_a_linked_record_is_superseded_or_changed(tmp_path, capsys):
    site = tmp_path / "demo_site"
    shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases"), "--quiet"]) in (0, 1)   # the balance runs after what it links
    capsys.readouterr()
    assert main(["register", str(site)]) in (0, 1)
    assert "STALE" not in capsys.readouterr().out
    case = site / "cases" / "LD-02.toml"
    case.write_text(case.read_text().replace('revision = "B"', 'revision = "C"'))
    assert main(["run", str(case), "--quiet"]) in (0, 1)
    capsys.readouterr()
    main(["register", str(site)])
    out = capsys.readouterr().out
    assert "STALE: linked record LD-02 revision B (letdown.LD-02): revision C of LD-02 lies beside it" in out
    # Changed under the balance (edited, re-digested as a forger would): named as changed.
    linked = site / "records" / "FL-01_revB.json"
    record = json.loads(linked.read_text(encoding="utf-8"))
    record["title"] = "edited"
    record["content_digest"], record["digest"] = compute_content_digest(record), None
    record["digest"] = compute_digest(record)
    linked.write_text(json.dumps(record), encoding="utf-8")
    capsys.readouterr()
    main(["register", str(site)])
    assert "FL-01_revB.json has changed since the balance used it" in capsys.readouterr().out
