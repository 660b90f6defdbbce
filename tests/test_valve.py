"""Let-down equipment: IEC 60534-2-1 valve sizing worked by hand, pipe dimensions, fail-open flow,
the turbine energy balance, and bad valve inputs."""

import json
import math
import shutil

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.letdown.calculation import Inputs, calculate
from steamcalc.cli import main
from steamcalc.equipment.piping import pipe_inner_diameter
from steamcalc.equipment.valve import kv_to_cv, size_steam_valve, valve_flow
from steamcalc.errors import InputError
from steamcalc.cases.site import Price, Site
from tests.case_helpers import assert_refused, run_case_text


def test_iec60534_non_choked_steam_by_hand():
    # IEC 60534-2-1:2011 eq. (8), (12), (15), worked by hand: W = 2000 kg/h, p1 = 1000 kPa,
    # p2 = 700 kPa, rho1 = 4.8 kg/m3, kappa = 1.30, xT = 0.70.
    x = (1000 - 700) / 1000                 # 0.3
    f_gamma = 1.30 / 1.40                   # 0.928571
    x_choked = f_gamma * 0.70               # 0.65
    y = 1 - x / (3 * x_choked)              # 0.846154
    kv = 2000 / (3.16 * y * math.sqrt(x * 1000 * 4.8))   # 19.711
    assert kv == pytest.approx(19.711, abs=1e-3)
    s = size_steam_valve(2000.0, 1000.0, 700.0, 4.8, 1.30, 0.70)
    assert not s.choked
    assert s.kv == pytest.approx(kv, rel=1e-12)
    assert s.expansion_factor == pytest.approx(y, rel=1e-12)


def test_iec60534_choked_steam_by_hand():
    # Same valve, p2 = 300 kPa: x = 0.7 >= Fgamma xT = 0.65, so x_siz = 0.65 and Y = 2/3.
    kv = 2000 / (3.16 * (2 / 3) * math.sqrt(0.65 * 1000 * 4.8))   # 16.996
    assert kv == pytest.approx(16.996, abs=1e-3)
    s = size_steam_valve(2000.0, 1000.0, 300.0, 4.8, 1.30, 0.70)
    assert s.choked
    assert s.kv == pytest.approx(kv, rel=1e-12)
    assert s.expansion_factor == pytest.approx(2 / 3, rel=1e-12)


def test_choked_boundary():
    x_choked = 1.30 / 1.40 * 0.70
    below = size_steam_valve(1000.0, 1000.0, 1000.0 * (1 - x_choked) + 1.0, 4.8, 1.30, 0.70)
    at = size_steam_valve(1000.0, 1000.0, 1000.0 * (1 - x_choked) - 1e-9, 4.8, 1.30, 0.70)
    assert not below.choked and at.choked
    # Past the boundary the required Kv no longer falls with the outlet pressure.
    further = size_steam_valve(1000.0, 1000.0, 100.0, 4.8, 1.30, 0.70)
    assert further.kv == pytest.approx(at.kv, rel=1e-6)


def test_cv_kv_factor():
    # IEC 60534-2-1:2011 Table 1: N1 = 1e-1 for Kv and 8.65e-2 for Cv (kPa): Cv/Kv = 1.156.
    assert kv_to_cv(1.0) == pytest.approx(1e-1 / 8.65e-2, rel=1e-3)


def test_against_fluids_gas_sizing():
    # Independent implementation: fluids.size_control_valve_g (ideal gas, standard-volume flow).
    from fluids.control_valve import size_control_valve_g
    T, MW, Z, p1, p2, gamma = 433.0, 44.01, 0.988, 680e3, 310e3, 1.30
    q_std = 38 / 36.0                                   # m3/s at 273.15 K, 1 atm
    rho_std = 101325 * MW / 1000 / (8.314462618 * 273.15)
    rho1 = p1 * MW / 1000 / (Z * 8.314462618 * T)
    ours = size_steam_valve(q_std * rho_std * 3600, p1 / 1e3, p2 / 1e3, rho1, gamma, 0.60).kv
    theirs = size_control_valve_g(T=T, MW=MW, mu=1.4665e-4, gamma=gamma, Z=Z, P1=p1, P2=p2, Q=q_std, xT=0.60)
    assert ours == pytest.approx(theirs, rel=5e-3)


@pytest.mark.parametrize("size,inner_mm,source", [
    ("DN80", 77.92, "ASME B36.10M: NPS 3 schedule 40, OD 88.9 mm, wall 5.49 mm (from memory)"),
    ("6 in", 154.08, "ASME B36.10M: NPS 6 schedule 40, OD 168.3 mm, wall 7.11 mm (from memory)"),
])
def test_b36_10m_dimensions(size, inner_mm, source):
    assert pipe_inner_diameter(size, "40") * 1000 == pytest.approx(inner_mm, abs=0.01), source


SITE = Site(operating_hours=6000.0, power_price=Price(120.0, "EUR"), ambient_temperature=288.15)
BASE = dict(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15)


def test_fail_open_flow_by_hand():
    # Taken on the densest credible steam at the upstream pressure: dry saturated (the inlet may lose its superheat).
    r = calculate(Inputs(**BASE, rated_kv=63.0, relief_set_pressure=5.5e5), SITE)
    inlet_density = PropsSI("D", "P", 17e5, "Q", 1, "Water")            # IAPWS-95, independent
    kappa = PropsSI("A", "P", 17e5, "Q", 1, "Water") ** 2 * inlet_density / 17e5
    x = (17e5 - 5.5e5) / 17e5
    x_siz = min(x, kappa / 1.40 * 0.70)
    y = 1 - x_siz / (3 * kappa / 1.40 * 0.70)
    hand = 3.16 * 63.0 * y * math.sqrt(x_siz * 1700.0 * inlet_density)
    assert r.value("fail_open_flow") == pytest.approx(hand, rel=1e-3)


def test_fail_open_flow_inverts_sizing():
    s = size_steam_valve(4500.0, 1700.0, 350.0, 7.9, 1.29, 0.70)
    assert valve_flow(s.kv, 1700.0, 350.0, 7.9, 1.29, 0.70) == pytest.approx(4500.0, rel=1e-12)


def test_turbine_energy_balance_against_iapws95():
    r = calculate(Inputs(**BASE, isentropic_efficiency=0.6), SITE)
    h1 = PropsSI("H", "P", 17e5, "T", 503.15, "Water")
    s1 = PropsSI("S", "P", 17e5, "T", 503.15, "Water")
    h2s = PropsSI("H", "P", 3.5e5, "S", s1, "Water")
    assert r.value("isentropic_enthalpy_drop") == pytest.approx((h1 - h2s) / 1e3, abs=0.5)
    # Energy balance of the turbine: P = m (h1 - h2) with h2 = h1 - eta (h1 - h2s).
    drop = r.value("isentropic_enthalpy_drop")
    assert r.value("recoverable_power") == pytest.approx(1.25 * 0.6 * drop, rel=1e-12)
    # Electrical energy: shaft power times the generator efficiency (default 0.95, common practice).
    assert r.value("annual_recoverable_energy") == pytest.approx(
        r.value("recoverable_power") * 0.95 * 6000 / 1000, rel=1e-12)
    # No fuel price at this site: only the gross electricity value, and a warn saying so.
    assert r.value("annual_electricity_value") == pytest.approx(r.value("annual_recoverable_energy") * 120, rel=1e-12)
    assert "annual_recoverable_value" not in r.values
    assert next(c for c in r.checks if c.name == "Net turbine value").status == "warn"


def test_exergy_destroyed_gouy_stodola():
    r = calculate(Inputs(**BASE), SITE)
    s1 = PropsSI("S", "P", 17e5, "T", 503.15, "Water")
    h1 = PropsSI("H", "P", 17e5, "T", 503.15, "Water")
    s2 = PropsSI("S", "P", 3.5e5, "H", h1, "Water")
    assert r.value("exergy_destroyed") == pytest.approx(288.15 * 1.25 * (s2 - s1) / 1e3, rel=2e-3)
    assert r.value("exergy_destroyed") > 0


def test_travel_checks_and_too_small_valve():
    r = calculate(Inputs(**BASE, max_flow=1.5, min_flow=0.3, rated_kv=63.0), SITE)
    for case in ("minimum", "normal", "maximum"):
        assert 0 < r.value(f"valve_travel_{case}") < 100
    small = calculate(Inputs(**BASE, rated_kv=5.0), SITE)
    assert next(c for c in small.checks if c.name == "Rated Kv sufficient").status == "fail"
    assert small.status == "fail"


def test_outlet_velocity_warns_and_suggests_a_size():
    r = calculate(Inputs(**BASE, inlet_size="DN50", outlet_size="DN50"), SITE)
    check = next(c for c in r.checks if c.name == "Outlet line velocity")
    assert check.status == "warn" and r.value("suggested_outlet_size") in str(check.detail)
    assert r.value("outlet_velocity") > 45


@pytest.mark.parametrize("kwargs,field", [
    (dict(fl=0.0), "valve.fl"), (dict(xt=0.0), "valve.xt"), (dict(characteristic="quick"), "valve.characteristic"),
    (dict(max_flow=1.0), "valve.max_flow"), (dict(min_flow=2.0), "valve.min_flow"),
    (dict(rangeability=1.0), "valve.rangeability"),
])
def test_bad_valve_inputs(kwargs, field):
    with pytest.raises(InputError) as info:
        Inputs(**BASE, **kwargs)
    assert info.value.field == field


CASE = """
[case]
kind = "letdown"
id = "V-1"
[inputs]
inlet_pressure = "16 bar(g)"
inlet_temperature = "230 degC"
outlet_pressure = "2.5 bar(g)"
mass_flow = "4.5 t/h"
{extra}
"""


@pytest.mark.parametrize("extra,code,text", [
    ("[inputs.valve]\nfl = 1.2", 2, "fl"),
    ("[inputs.valve]\nxt = -0.5", 2, "xt"),
    ("[inputs.lines]\noutlet_size = \"DN175\"", 2, "outlet_size"),
    ("[inputs.lines]\noutlet_size = \"banana\"", 2, "outlet_size"),
    ("[inputs.valve]\nrated_kv = \"5 m^3/h\"", 1, "Rated Kv sufficient"),
    ("[inputs.valve]\nrated_kv = \"5 kg/h\"", 2, "rated_kv"),
])
def test_bad_valve_case_files(tmp_path, capsys, extra, code, text):
    if code == 2:
        assert_refused(tmp_path, capsys, CASE.format(extra=extra), text)
    else:
        exit_code, out, _ = run_case_text(tmp_path, capsys, CASE.format(extra=extra))
        assert exit_code == code and text in out


def test_demo_letdown_records_carry_equipment_keys(tmp_path, demo_site_dir):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    keys = ("valve_kv", "valve_cv", "choked", "valve_travel_normal", "fail_open_flow", "inlet_velocity",
            "outlet_velocity", "recoverable_power", "exergy_destroyed")
    for case in ("LD-01", "LD-02"):
        main(["run", str(site / "cases" / f"{case}.toml")])
        record = json.loads((site / "records" / f"{case}_revB.json").read_text())
        assert all(k in record["results"] for k in keys), case
        assert main(["verify", str(site / "records" / f"{case}_revB.json")]) == 0


@pytest.mark.parametrize("arguments", [
    (1e5, 1700.0, 350.0, 7.5, 1.3, 0.7, 50.0, 25.0, 25.0),    # a valve twice the bore of its pipes
    (1e12, 1700.0, 350.0, 7.5, 1.3, 0.7, 50.0, 80.0, 80.0),   # a flow far beyond the size
])
def test_a_geometry_the_reducer_equations_do_not_hold_is_refused_by_name(arguments):
    # Found by an independent review: these ended in a bare ValueError (a square root of a negative).
    with pytest.raises(InputError, match="piping geometry factor Fp has no value"):
        size_steam_valve(*arguments)
