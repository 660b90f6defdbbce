"""Site steam balance with a back-pressure turbine: the expansion and power against IAPWS-95 worked by hand, the
let-down it relieves, headers and the turbine closing on the other IF97 engine, the record, and refusals by field."""

import ast
import json

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.site_balance.calculation import Inputs, calculate
from steamcalc.calcs.site_balance.closure import header_streams, relative_residual, turbine_residual
from steamcalc.calcs.site_balance.figures import sankey_links
from steamcalc.calcs.site_balance.items import Boiler, Deaerator, Letdown, LoadCase, Turbine, User
from steamcalc.calcs.site_balance.turbines import MIN_EXHAUST_DRYNESS
from steamcalc.cases.site import Site, case_inputs, case_site, load_case
from steamcalc.cli import main
from steamcalc.units.quantities import Q_
from tests.case_helpers import run_case_text
from tests.site_balance_cases import CASE, SITE as SITE_TEXT
from tests.test_pressure_basis import _bare_pressures
from tests.test_report_words import _html_text, _markdown_text, _problems, _without_given
from tests.worked_step_arithmetic import written_step_problems

ATM = 1.01325e5
YEAR = (LoadCase("all year", 8000 * 3600.0),)


def _balance(p_hp, t_hp, p_lp, turbine, letdown=True, user_flow=3.0):
    """A boiler on HP (the HP header holds only its steam), a let-down and a turbine HP -> LP, a fixed LP user;
    the deaerator on HP, so nothing on LP depends on the LP header's state."""
    site = Site(atmospheric_pressure=ATM, makeup_water_temperature=288.15, boiler_efficiency=0.86,
                headers={"HP": p_hp, "LP": p_lp})
    inputs = Inputs(boiler=Boiler(header="HP", pressure=p_hp, temperature=t_hp, blowdown_fraction=0.05),
                    deaerator=Deaerator(pressure=1.2e5, steam_header="HP", vent_fraction=0.0), load_cases=YEAR,
                    letdowns=(Letdown(name="L", source="HP", target="LP"),) if letdown else (),
                    turbines=(turbine,) if turbine else (),
                    users=(User(name="U", header="LP", flows=(("all year", user_flow),)),))
    return inputs, site


# The turbine worked by hand with IAPWS-95 (CoolProp): h1 = h(p1, T1) or h_g(p1), s1 likewise; h2s = h(p2, s1);
# h2 = h1 - eta_s (h1 - h2s); P = m (h1 - h2); P_e = eta_g P; exhaust dryness x = x(p2, h2).
TURBINE_TABLE = [
    # HP Pa, HP K (None: saturated), LP Pa, eta_s, eta_g, flow kg/s, exhaust phase, source
    (41e5, 673.15, 5e5, 0.70, 0.95, 2.0, "superheated",
     "isentropic-efficiency expansion worked by hand, IAPWS-95 (CoolProp 8): superheated exhaust"),
    (17e5, None, 2e5, 0.75, 0.93, 1.5, "wet",
     "isentropic-efficiency expansion worked by hand, IAPWS-95 (CoolProp 8): wet exhaust"),
    (26e5, 523.15, 3.5e5, 0.60, 0.90, 1.0, "wet",
     "isentropic-efficiency expansion worked by hand, IAPWS-95 (CoolProp 8): wet exhaust from superheated inlet"),
]


@pytest.mark.parametrize("p_hp,t_hp,p_lp,eta_s,eta_g,flow,phase,source", TURBINE_TABLE)
def test_turbine_exhaust_and_power_against_iapws95_by_hand(p_hp, t_hp, p_lp, eta_s, eta_g, flow, phase, source):
    turbine = Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=eta_s, flow=flow,
                      generator_efficiency=eta_g)
    inputs, site = _balance(p_hp, t_hp, p_lp, turbine)
    r = calculate(inputs, site)
    if t_hp is None:
        h_1, s_1 = PropsSI("H", "P", p_hp, "Q", 1, "Water"), PropsSI("S", "P", p_hp, "Q", 1, "Water")
    else:
        h_1, s_1 = PropsSI("H", "P", p_hp, "T", t_hp, "Water"), PropsSI("S", "P", p_hp, "T", t_hp, "Water")
    h_2s = PropsSI("H", "P", p_lp, "S", s_1, "Water")
    h_2 = h_1 - eta_s * (h_1 - h_2s)
    shaft = flow * (h_1 - h_2)
    # IF97 against IAPWS-95: h and s of the two formulations differ slightly, and h2s = h(p2, s1) carries the entropy
    # difference times T2s; here the exhaust enthalpies differ by at most 0.07 kJ/kg (3e-5 of h; 5e-5 allowed) and
    # the drops by at most 5e-4.
    assert r.value("all year.TG.exhaust_enthalpy") == pytest.approx(h_2 / 1e3, rel=5e-5)
    assert r.value("all year.TG.shaft_power") == pytest.approx(shaft / 1e3, rel=5e-4)
    assert r.value("all year.TG.electric_power") == pytest.approx(eta_g * shaft / 1e3, rel=5e-4)
    b = r.states["balances"]["all year"]
    if phase == "wet":
        dryness = PropsSI("Q", "P", p_lp, "H", h_2, "Water")
        assert 0.0 < dryness < 1.0
        assert r.value("all year.TG.exhaust_dryness") == pytest.approx(dryness, abs=1e-4)
        assert b.turbine_expansion["TG"].exhaust.phase == "wet"
    else:
        t_2 = PropsSI("T", "P", p_lp, "H", h_2, "Water")
        assert r.value("all year.TG.exhaust_dryness") == 1.0
        # 0.06 kJ/kg of IF97 against IAPWS-95 at cp about 2.1 kJ/(kg K), and the two formulations' own T(p, h):
        # about 0.06 K here.
        assert r.value("all year.TG.exhaust_temperature") == pytest.approx(t_2 - 273.15, abs=0.1)
    # The year's electricity: P_e x hours.
    assert r.value("annual_turbine_electricity") == pytest.approx(
        r.value("all year.TG.electric_power") * 8000 / 1e3, rel=1e-12)


@pytest.mark.parametrize("turbine,passed", [
    (Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=0.7, flow=1.2), 1.2),
    (Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=0.7, max_flow=2.0), 2.0),
])
def test_the_let_down_falls_by_the_turbine_flow(turbine, passed):
    # Consistency: the LP header's demand is fixed flows only, so what the turbine passes the let-down does not.
    without = calculate(*_balance(41e5, 673.15, 5e5, None))
    inputs, site = _balance(41e5, 673.15, 5e5, turbine)
    with_turbine = calculate(inputs, site)
    letdown_before = without.value("all year.L.steam_flow")
    assert letdown_before == pytest.approx(3.0 * 3600, rel=1e-12)
    assert with_turbine.value("all year.TG.steam_flow") == pytest.approx(passed * 3600, rel=1e-12)
    assert with_turbine.value("all year.L.steam_flow") == pytest.approx(letdown_before - passed * 3600, rel=1e-12)
    assert with_turbine.value("all year.LP.closed_by") == (
        "let-down L" if turbine.flow is not None else "turbine TG and let-down L")
    # The what-if switch takes the turbine out: the same let-down as without it.
    what_if = calculate(Inputs(**{**inputs.__dict__, "without": ("TG",)}), site)
    assert what_if.value("what_if.all year.L.steam_flow") == pytest.approx(letdown_before, rel=1e-12)
    assert what_if.value("what_if_annual_turbine_electricity") == 0.0
    assert what_if.value("what_if_annual_turbine_electricity_difference") == pytest.approx(
        -what_if.value("annual_turbine_electricity"), rel=1e-12)


def test_a_balancing_turbine_without_a_maximum_closes_the_header_alone():
    r = calculate(*_balance(41e5, 673.15, 5e5, Turbine(name="TG", source="HP", target="LP",
                                                        isentropic_efficiency=0.7)))
    assert r.value("all year.LP.closed_by") == "turbine TG"
    assert r.value("all year.L.steam_flow") == 0.0
    assert r.value("all year.TG.steam_flow") == pytest.approx(3.0 * 3600, rel=1e-12)


def test_a_wet_exhaust_below_the_usual_dryness_warns():
    # Saturated 41 bar(a) to 1.5 bar(a) at 80 %: well below 0.90 dry (IAPWS-95 gives x about 0.85, CoolProp).
    r = calculate(*_balance(41e5, None, 1.5e5, Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=0.8,
                                                        flow=1.0)))
    dryness = r.value("all year.TG.exhaust_dryness")
    assert dryness < MIN_EXHAUST_DRYNESS
    check = next(c for c in r.checks if c.name == "all year: turbine TG exhaust dryness")
    assert check.status == "warn"


@pytest.mark.parametrize("engine", ["fast", "iapws"])
@pytest.mark.parametrize("p_hp,t_hp,p_lp,eta_s,eta_g,flow,phase,source", TURBINE_TABLE)
def test_headers_and_turbine_close_on_either_if97_engine(engine, p_hp, t_hp, p_lp, eta_s, eta_g, flow, phase, source):
    turbine = Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=eta_s, flow=flow)
    inputs, site = _balance(p_hp, t_hp, p_lp, turbine)
    b = calculate(inputs, site).states["balances"]["all year"]
    for header in site.headers:
        inflows, outflows = header_streams(site, b, header)
        assert relative_residual(inflows, outflows, engine) <= 1e-6, header
        assert sum(s.mass_flow for s in inflows) == pytest.approx(sum(s.mass_flow for s in outflows), rel=1e-12)
    assert turbine_residual(b, "TG", engine) <= 1e-6


TURBINE = """
[[inputs.turbine]]
name = "TG-1"
from = "HP"
to = "LP"
flow = "balances the exhaust header"
max_flow = "2 t/h"
isentropic_efficiency = 0.55
generator_efficiency = 0.93
"""
POWER_PRICE = 'power_price = "120 EUR/MWh"\n'


def _write_site(folder):
    (folder / "site.toml").write_text(SITE_TEXT.replace('fuel_price = "40 EUR/MWh"\n',
                                                        'fuel_price = "40 EUR/MWh"\n' + POWER_PRICE))


def test_a_balance_with_a_turbine_issues_a_record_that_verifies(tmp_path, capsys):
    _write_site(tmp_path)
    code, _, err = run_case_text(tmp_path, capsys, CASE + TURBINE)
    assert code in (0, 1), err
    path = next((tmp_path / "out").glob("SB-T_rev*.json"))
    record = json.loads(path.read_text(encoding="utf-8"))
    results = record["results"]
    for case in ("winter", "summer"):
        assert results[f"{case}.TG-1.steam_flow"]["value"] > 0
        closed = results[f"{case}.LP.closed_by"]["value"]
        assert closed.startswith("turbine TG-1") or closed == "vent", closed
        nodes, sources, targets, values = sankey_links(next(f for f in record["figures"]
                                                            if f["name"] == f"steam_flows_{case}"))
        assert "turbine TG-1" in nodes
        into = [v for s, t, v in zip(sources, targets, values) if nodes[t] == "turbine TG-1"]
        assert into == [pytest.approx(results[f"{case}.TG-1.steam_flow"]["value"], rel=1e-12)]
    energy = results["annual_turbine_electricity"]["value"]
    assert energy == pytest.approx(sum(results[f"{c}.TG-1.electric_power"]["value"] * h
                                       for c, h in (("winter", 3500), ("summer", 2500))) / 1e3, rel=1e-12)
    assert results["annual_turbine_electricity_value"]["value"] == pytest.approx(energy * 120, rel=1e-12)
    assert results["annual_turbine_electricity_value"]["unit"] == "EUR"
    assert written_step_problems(record) == []
    for step in record["steps"]:   # each turbine step's expression on its recorded operands gives its value
        if "turbine" in step["label"]:
            values = {name: Q_(entry["value"], entry["unit"] or "dimensionless")
                      for name, entry in step["operands"].items()}
            got = eval(compile(ast.parse(step["expression"], mode="eval"), "<step>", "eval"), {"__builtins__": {}},
                       values)
            assert got.to(step["value"]["unit"]).magnitude == pytest.approx(step["value"]["value"], rel=1e-9)
    steps = [s["label"] for s in record["steps"]]
    assert "winter: turbine TG-1 shaft power" in steps and "winter: turbine TG-1 exhaust enthalpy" in steps
    checks = {c["name"]: c["status"] for c in record["checks"]}
    assert checks["winter: turbine TG-1 closes with its shaft power (independent)"] == "pass"
    capsys.readouterr()
    assert main(["verify", str(path)]) == 0
    # The record's words: no code keys or unit-library spellings, every pressure with its basis (the rules of
    # tests/test_report_words.py and tests/test_pressure_basis.py, on this record the demo does not issue).
    for report in (path.with_suffix(".html"), path.with_suffix(".md")):
        raw = _without_given(report.read_text(encoding="utf-8"), record, report.suffix)
        text = _html_text(raw) if report.suffix == ".html" else _markdown_text(raw)
        assert _problems(text) == [], report.name
        assert _bare_pressures(text) == [], report.name
    assert not [t for t in json.dumps(record).split('"') if "from memory" in t]


def test_turbine_inputs_round_trip_through_the_record(tmp_path):
    _write_site(tmp_path)
    (tmp_path / "case.toml").write_text(CASE + TURBINE)
    case = load_case(tmp_path / "case.toml")
    site = case_site(case)
    inputs, given = case_inputs(case, site)
    assert inputs.turbines[0].max_flow == pytest.approx(2000 / 3600, rel=1e-12)
    again = Inputs.from_record_table(json.loads(json.dumps(inputs.to_record_table(given))))
    assert again.turbines == inputs.turbines
    a, b = calculate(inputs, site), calculate(again, site)
    assert set(a.values) == set(b.values)
    for key, value in a.values.items():
        if isinstance(value.value, str):
            assert value.value == b.values[key].value
        else:
            assert value.value == pytest.approx(b.values[key].value, rel=1e-12), key


REFUSALS = [
    # (what, edit of the turbine, field named, words in the message)
    ("isentropic efficiency zero", ("isentropic_efficiency = 0.55", "isentropic_efficiency = 0"),
     "turbine[0].isentropic_efficiency", "above 0 and at most 1"),
    ("isentropic efficiency above one", ("isentropic_efficiency = 0.55", "isentropic_efficiency = 1.2"),
     "turbine[0].isentropic_efficiency", "above 0 and at most 1"),
    ("isentropic efficiency as a percentage text", ("isentropic_efficiency = 0.55", 'isentropic_efficiency = "55 %"'),
     "turbine[0].isentropic_efficiency", "plain number"),
    ("isentropic efficiency missing", ("isentropic_efficiency = 0.55\n", ""), "turbine[0].isentropic_efficiency",
     "is required"),
    ("generator efficiency above one", ("generator_efficiency = 0.93", "generator_efficiency = 93"),
     "turbine[0].generator_efficiency", "above 0 and at most 1"),
    ("exhaust header above the inlet", ('from = "HP"\nto = "LP"\nflow', 'from = "LP"\nto = "MP"\nflow'),
     "turbine.TG-1.to", "not below its inlet header"),
    ("exhaust header at the inlet's pressure", ('from = "HP"\nto = "LP"\nflow', 'from = "LP"\nto = "LP"\nflow'),
     "turbine.TG-1.to", "its own inlet header"),
    ("unknown header", ('to = "LP"\nflow', 'to = "XP"\nflow'), "turbine[0].to", "is not in the site file"),
    ("negative flow", ('flow = "balances the exhaust header"', 'flow = "-1 t/h"'), "turbine[0].flow",
     "cannot be negative"),
    ("flow above its maximum", ('flow = "balances the exhaust header"', 'flow = "3 t/h"'), "turbine[0].flow",
     "above its maximum"),
    ("unknown key", ("generator_efficiency = 0.93", "efficiency = 0.93"), "turbine[0].efficiency", "unknown key"),
    ("a name a let-down has", ('name = "TG-1"', 'name = "HP-MP"'), "turbine.name", "used by a letdown and a turbine"),
    ("balancing the boiler's header", ('from = "HP"\nto = "LP"\nflow', 'from = "MP"\nto = "HP"\nflow'),
     "turbine.TG-1.flow", "balances the boiler's header HP"),
]


@pytest.mark.parametrize("what,edit,field,words", REFUSALS, ids=[r[0] for r in REFUSALS])
def test_bad_turbine_input_is_refused_by_name(tmp_path, capsys, what, edit, field, words):
    _write_site(tmp_path)
    old, new = edit
    assert old in TURBINE, what
    code, _, err = run_case_text(tmp_path, capsys, CASE + TURBINE.replace(old, new, 1))
    assert code == 2, err
    assert field in err and words in err and str(tmp_path / "case.toml") in err, err
    assert "Fix:" in err or "Valid range" in err, err
    assert "Traceback" not in err and not (tmp_path / "out").exists()


def test_two_turbines_balancing_one_header_are_refused(tmp_path, capsys):
    _write_site(tmp_path)
    second = TURBINE.replace('name = "TG-1"', 'name = "TG-2"')
    code, _, err = run_case_text(tmp_path, capsys, CASE + TURBINE + second)
    assert code == 2 and "turbine.TG-2.flow" in err and "both balance header LP" in err, err


def test_a_turbine_off_a_let_down_header_draws_its_steam_through_that_let_down(tmp_path):
    # Consistency: an MP -> LP turbine at a fixed flow; the MP header is made up by the HP-MP let-down (a throttle,
    # so the MP steam stays the HP steam's enthalpy and the MP users take the same), which passes the turbine's
    # steam besides the users'.
    _write_site(tmp_path)
    turbine = TURBINE.replace('from = "HP"', 'from = "MP"').replace('flow = "balances the exhaust header"',
                                                                     'flow = "1.2 t/h"')
    results = {}
    for name, text in (("without", CASE), ("with", CASE + turbine)):
        (tmp_path / f"{name}.toml").write_text(text)
        case = load_case(tmp_path / f"{name}.toml")
        site = case_site(case)
        results[name] = calculate(case_inputs(case, site)[0], site)
    for case in ("winter", "summer"):
        before, after = (results[n].value(f"{case}.HP-MP.steam_flow") for n in ("without", "with"))
        assert after - before == pytest.approx(1200.0, rel=1e-8)
        assert results["with"].value(f"{case}.MP.closed_by") == "let-down HP-MP"


def test_the_what_if_table_shows_the_turbines_electricity():
    """The comparison table (read from the record's results only) carries the electricity row when turbines run."""
    from steamcalc.calcs.site_balance.comparison import comparison_rows

    turbine = Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=0.6, flow=1.0)
    inputs, site = _balance(41e5, 673.15, 5e5, turbine)
    result = calculate(Inputs(**{**inputs.__dict__, "without": ("TG",)}), site)
    record = {"results": {k: {"value": result.value(k)} for k in result.values}}
    rows = {r["figure"]: r for r in comparison_rows(record)}
    row = rows["electricity the turbines generate a year"]
    assert row["balance"] > 0 and row["what-if"] == 0.0
    assert row["difference"] == pytest.approx(-row["balance"], rel=1e-12)


def test_the_what_if_checks_each_running_turbines_exhaust_dryness_too():
    """A what-if is a balance the site may run: a turbine still running in it gets its exhaust-dryness check, named
    for the what-if; one taken out of service gets none."""
    turbine = Turbine(name="TG", source="HP", target="LP", isentropic_efficiency=0.75, flow=1.5,
                      generator_efficiency=0.93)
    inputs, site = _balance(17e5, None, 2e5, turbine)   # a wet exhaust (the table's second row)
    second_user = User(name="U2", header="LP", flows=(("all year", 0.2),))
    running = calculate(Inputs(**{**inputs.__dict__, "users": inputs.users + (second_user,), "without": ("U2",)}),
                        site)
    checks = {c.name: c for c in running.checks}
    base, what_if = checks["all year: turbine TG exhaust dryness"], checks["Without U2, all year: turbine TG exhaust dryness"]
    # The users' flows do not reach the HP header's state: the same wet exhaust, the same verdict, a check not a notice.
    assert what_if.status == base.status and what_if.kind == base.kind != "notice"
    assert running.value("all year.TG.exhaust_dryness") < 1.0
    stopped = calculate(Inputs(**{**inputs.__dict__, "without": ("TG",)}), site)
    assert not [c for c in stopped.checks if c.name.startswith("Without TG") and "exhaust dryness" in c.name]
