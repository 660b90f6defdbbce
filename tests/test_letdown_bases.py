"""Let-down bases a checker would challenge: net turbine value, the relief load at the highest
upstream pressure, one pressure pair per flow case, κ at saturation, velocity limits by state.

Independent references: IAPWS-95 through CoolProp (a general-purpose reference library) for
every property; the IEC 60534-2-1:2011 equations worked by hand; ASME B36.10M pipe bores.
"""

import math

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.letdown.calculation import Inputs, calculate
from steamcalc.errors import InputError
from steamcalc.cases.site import Price, Site
from tests.case_helpers import assert_refused

ATM = 1.01325e5
SITE = Site(operating_hours=6000.0, power_price=Price(120.0, "EUR"), fuel_price=Price(40.0, "EUR"),
            boiler_efficiency=0.86, ambient_temperature=288.15)
BASE = dict(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15)


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


def _iec_flow(kv, p1, p2, rho1, kappa, xt, fp=1.0):
    """IEC 60534-2-1:2011 eq. (8) with (12), (15) solved for W, kg/h (p in Pa), by hand."""
    x = (p1 - p2) / p1
    x_choked = kappa / 1.40 * xt
    x_siz = min(x, x_choked)
    y = 1 - x_siz / (3 * x_choked)
    return 3.16 * fp * kv * y * math.sqrt(x_siz * p1 / 1e3 * rho1)


def _iec_kv(w, p1, p2, rho1, kappa, xt):
    return w / _iec_flow(1.0, p1, p2, rho1, kappa, xt)


def _kappa_iapws95(p, t=None, dryness=None):
    if dryness is None:
        rho, w = PropsSI("D", "P", p, "T", t, "Water"), PropsSI("A", "P", p, "T", t, "Water")
    else:
        rho, w = PropsSI("D", "P", p, "Q", dryness, "Water"), PropsSI("A", "P", p, "Q", dryness, "Water")
    return w * w * rho / p


# -- 1. turbine value is net of the make-up fuel ---------------------------------------------

def test_net_turbine_value_by_hand_against_iapws95():
    r = calculate(Inputs(**BASE, isentropic_efficiency=0.55, generator_efficiency=0.95), SITE)
    h1 = PropsSI("H", "P", 17e5, "T", 503.15, "Water")
    s1 = PropsSI("S", "P", 17e5, "T", 503.15, "Water")
    h2s = PropsSI("H", "P", 3.5e5, "S", s1, "Water")
    shaft = 1.25 * 0.55 * (h1 - h2s)                       # W
    electricity = shaft * 0.95 * 6000 / 1e6 * 120           # EUR a year
    makeup_fuel = shaft * 6000 / 1e6 / 0.86 * 40            # EUR a year: boiler makes up the shaft work
    assert r.value("recoverable_power") == pytest.approx(shaft / 1e3, rel=2e-4)
    assert r.value("annual_electricity_value") == pytest.approx(electricity, rel=2e-4)
    assert r.value("annual_makeup_fuel_cost") == pytest.approx(makeup_fuel, rel=2e-4)
    assert r.value("annual_recoverable_value") == pytest.approx(electricity - makeup_fuel, rel=2e-4)
    # The v0.1 figure (shaft power at the power price) overstated the value by about 40 %.
    gross = shaft * 6000 / 1e6 * 120
    assert 0.35 < 1 - r.value("annual_recoverable_value") / gross < 0.5


def test_turbine_exhaust_state_against_iapws95():
    r = calculate(Inputs(**BASE, isentropic_efficiency=0.55), SITE)
    h1 = PropsSI("H", "P", 17e5, "T", 503.15, "Water")
    h2s = PropsSI("H", "P", 3.5e5, "S", PropsSI("S", "P", 17e5, "T", 503.15, "Water"), "Water")
    h_exhaust = h1 - 0.55 * (h1 - h2s)
    quality = PropsSI("Q", "P", 3.5e5, "H", h_exhaust, "Water")
    t_exhaust = PropsSI("T", "P", 3.5e5, "H", h_exhaust, "Water") - 273.15
    assert r.value("turbine_exhaust_temperature") == pytest.approx(t_exhaust, abs=0.02)
    assert r.value("turbine_exhaust_dryness") == pytest.approx(quality if 0 <= quality <= 1 else 1.0, abs=1e-4)
    assert _check(r, "Turbine exhaust state").status == ("warn" if 0 <= quality < 1 else "pass")


def test_wet_turbine_exhaust_warns_and_dry_one_passes():
    wet = calculate(Inputs(**BASE, isentropic_efficiency=0.9), SITE)
    assert wet.value("turbine_exhaust_dryness") < 1 and _check(wet, "Turbine exhaust state").status == "warn"
    hot = calculate(Inputs(**{**BASE, "inlet_temperature": 623.15}, isentropic_efficiency=0.5), SITE)
    assert hot.value("turbine_exhaust_dryness") == 1.0 and _check(hot, "Turbine exhaust state").status == "pass"


def test_makeup_fuel_closes_the_first_law():
    # Boiler heat = heat to the low-pressure users + shaft work: the make-up fuel energy is the
    # shaft energy over the boiler efficiency (consistency).
    r = calculate(Inputs(**BASE), SITE)
    shaft_mwh = r.value("recoverable_power") * 6000 / 1e3
    assert r.value("annual_makeup_fuel_energy") * 0.86 == pytest.approx(shaft_mwh, rel=1e-12)


# -- 2. relief load at the highest upstream pressure -------------------------------------------

#: The highest upstream pressure given as what the upstream reaches: the hand figures below take it as it is.
RELIEVING = "relieving pressure"


@pytest.mark.parametrize("basis,accumulation,p_up,source", [
    # p_up = p_set + a·(p_set − p_atm), accumulation on the gauge set pressure (API 520 Part I, from memory)
    (None, None, 19e5 + 0.10 * (19e5 - 101325.0), "default: set pressure, 10 % accumulation (hand)"),
    ("set pressure", 0.03, 19e5 + 0.03 * (19e5 - 101325.0), "boiler safety valve, 3 % (hand)"),
    ("relieving pressure", None, 19e5, "taken as given (hand)"),
])
def test_relief_load_at_the_upstream_relieving_pressure(basis, accumulation, p_up, source):
    r = calculate(Inputs(**BASE, rated_kv=63.0, max_inlet_pressure=19e5, upstream_pressure_basis=basis,
                         upstream_accumulation=accumulation), SITE)
    rho, kappa = PropsSI("D", "P", p_up, "Q", 1, "Water"), _kappa_iapws95(p_up, dryness=1.0)
    assert r.value("fail_open_flow") == pytest.approx(_iec_flow(63.0, p_up, 3.5e5, rho, kappa, 0.70), rel=1e-3), source
    operands = dict(next(s for s in r.steps if s.label == "Fail-open flow").operands)
    assert operands["p1"].value == pytest.approx(p_up / 1e3, rel=1e-12), source
    # The minimum flow is still sized at the pressure given, not at the relieving pressure.
    if basis != RELIEVING:
        assert r.value("upstream_relieving_pressure") == pytest.approx(p_up / 1e5, rel=1e-12)
        assert any("set pressure" in a and "accumulation" in a for a in r.assumptions)


@pytest.mark.parametrize("kwargs,field", [
    (dict(upstream_pressure_basis="highest"), "valve.upstream_pressure_basis"),
    (dict(upstream_accumulation=0.3), "valve.upstream_accumulation"),
    (dict(upstream_pressure_basis=RELIEVING, upstream_accumulation=0.1), "valve.upstream_accumulation"),
])
def test_upstream_pressure_basis_refused_by_name(kwargs, field):
    with pytest.raises(InputError) as caught:
        Inputs(**BASE, rated_kv=63.0, max_inlet_pressure=19e5, **kwargs)
    assert caught.value.field == field


def test_upstream_pressure_basis_needs_a_highest_upstream_pressure():
    with pytest.raises(InputError) as caught:
        Inputs(**BASE, rated_kv=63.0, upstream_accumulation=0.1)
    assert caught.value.field == "valve.upstream_accumulation"


def test_fail_open_and_bypass_at_the_highest_upstream_pressure_by_hand():
    p_max, p_set = 19e5, 5.5e5
    r = calculate(Inputs(**BASE, rated_kv=63.0, bypass_kv=25.0, max_inlet_pressure=p_max, upstream_pressure_basis=RELIEVING,
                         relief_set_pressure=p_set), SITE)
    # The densest credible steam at the highest pressure: dry saturated (IAPWS-95 through CoolProp, by hand).
    rho = PropsSI("D", "P", p_max, "Q", 1, "Water")
    kappa = _kappa_iapws95(p_max, dryness=1)
    assert r.value("fail_open_flow") == pytest.approx(_iec_flow(63.0, p_max, p_set, rho, kappa, 0.70), rel=1e-3)
    assert r.value("bypass_open_flow") == pytest.approx(_iec_flow(25.0, p_max, p_set, rho, kappa, 0.70), rel=1e-3)
    # What the normal inlet temperature (230 °C) would give is shown beside it, and is less.
    rho_normal, kappa_normal = PropsSI("D", "P", p_max, "T", 503.15, "Water"), _kappa_iapws95(p_max, 503.15)
    assert r.value("fail_open_flow_at_normal_temperature") == pytest.approx(
        _iec_flow(63.0, p_max, p_set, rho_normal, kappa_normal, 0.70), rel=1e-3)
    assert r.value("fail_open_flow") > r.value("fail_open_flow_at_normal_temperature") * 1.02
    assert r.value("relief_design_flow") == max(r.value("fail_open_flow"), r.value("bypass_open_flow"))
    step = next(s for s in r.steps if s.label == "Fail-open flow")
    operands = dict(step.operands)
    assert "p1 the highest upstream pressure, p2 the relief set pressure" in step.equation
    assert operands["p1"].value == pytest.approx(1900.0) and operands["p2"].value == pytest.approx(550.0)
    # Above the normal-pressure figure: the v0.1 basis understated the relief load.
    normal = calculate(Inputs(**BASE, rated_kv=63.0, relief_set_pressure=p_set), SITE)
    assert r.value("fail_open_flow") > normal.value("fail_open_flow") * 1.1


def test_relief_load_on_the_least_superheat_given():
    # valve.relief_min_superheat: the steam keeps at least 20 K of superheat at the highest pressure, so the
    # load is taken at T_sat(19 bar(a)) + 20 K (IAPWS-95 through CoolProp, by hand); above the normal
    # inlet temperature the normal inlet state is kept.
    p_max, p_set = 19e5, 5.5e5
    t = PropsSI("T", "P", p_max, "Q", 1, "Water") + 20.0
    r = calculate(Inputs(**BASE, rated_kv=63.0, max_inlet_pressure=p_max, upstream_pressure_basis=RELIEVING, relief_set_pressure=p_set,
                         relief_min_superheat=20.0), SITE)
    rho, kappa = PropsSI("D", "P", p_max, "T", t, "Water"), _kappa_iapws95(p_max, t)
    assert r.value("fail_open_flow") == pytest.approx(_iec_flow(63.0, p_max, p_set, rho, kappa, 0.70), rel=1e-3)
    assert any("least superheat given, 20 K" in a for a in r.assumptions)
    kept = calculate(Inputs(**BASE, rated_kv=63.0, max_inlet_pressure=p_max, upstream_pressure_basis=RELIEVING, relief_set_pressure=p_set,
                            relief_min_superheat=80.0), SITE)
    assert "fail_open_flow_at_normal_temperature" not in kept.values


def test_bypass_alone_governs_when_larger():
    r = calculate(Inputs(**BASE, rated_kv=20.0, bypass_kv=60.0, max_inlet_pressure=19e5, upstream_pressure_basis=RELIEVING), SITE)
    assert r.value("relief_design_flow") == r.value("bypass_open_flow") > r.value("fail_open_flow")
    assert "bypass valve wide open" in str(_check(r, "Relief design flow for the relief designer").detail)


def test_no_highest_pressure_warns_and_no_set_pressure_says_normal_outlet():
    r = calculate(Inputs(**BASE, rated_kv=63.0), SITE)
    assert _check(r, "Highest upstream pressure given").status == "warn"
    step = next(s for s in r.steps if s.label == "Fail-open flow")
    assert "normal outlet pressure" in step.equation
    assert "normal outlet pressure" in str(_check(r, "Relief design flow for the relief designer").detail)


# -- 3. one pressure pair per flow case ---------------------------------------------------------

def test_maximum_flow_sized_at_the_lowest_upstream_pressure_by_hand():
    p_min, p_max = 15e5, 19e5
    r = calculate(Inputs(**BASE, max_flow=1.5, min_flow=0.3, min_inlet_pressure=p_min, max_inlet_pressure=p_max),
                  SITE)
    for case, flow, p1 in (("maximum", 1.5, p_min), ("minimum", 0.3, p_max), ("normal", 1.25, 17e5)):
        rho = PropsSI("D", "P", p1, "T", 503.15, "Water")
        hand = _iec_kv(flow * 3600, p1, 3.5e5, rho, _kappa_iapws95(p1, 503.15), 0.70)
        assert r.value(f"valve_kv_{case}") == pytest.approx(hand, rel=1e-3), case
        assert r.value(f"valve_inlet_pressure_{case}") == pytest.approx(p1 / 1e5, rel=1e-12), case
    assert r.value("valve_kv") == r.value("valve_kv_maximum")


@pytest.mark.parametrize("kwargs,field", [
    (dict(max_inlet_pressure=16e5), "valve.max_inlet_pressure"),
    (dict(min_inlet_pressure=18e5), "valve.min_inlet_pressure"),
    (dict(min_inlet_pressure=3e5), "valve.min_inlet_pressure"),
])
def test_bad_upstream_pressures(kwargs, field):
    with pytest.raises(InputError) as info:
        Inputs(**BASE, **kwargs)
    assert info.value.field == field


def test_inlet_temperature_wet_at_the_highest_pressure_is_refused():
    # 230 degC is below saturation at 40 bar(a) (250.4 degC, IAPWS-IF97 table 35 neighbourhood).
    with pytest.raises(InputError) as info:
        calculate(Inputs(**BASE, rated_kv=63.0, max_inlet_pressure=40e5), SITE)
    assert info.value.field == "valve.max_inlet_pressure"


CASE = """
[case]
kind = "letdown"
id = "V-2"
[inputs]
inlet_pressure = "16 bar(g)"
inlet_temperature = "230 degC"
outlet_pressure = "2.5 bar(g)"
mass_flow = "4.5 t/h"
[inputs.valve]
{extra}
"""


@pytest.mark.parametrize("extra,field", [
    ('max_inlet_pressure = "12 bar(g)"', "max_inlet_pressure"),
    ('min_inlet_pressure = "1 bar(g)"', "min_inlet_pressure"),
    ('bypass_kv = "-3 m^3/h"', "bypass_kv"),
    ('bypass_kv = "3 kg/h"', "bypass_kv"),
])
def test_bad_upstream_pressures_through_the_command_line(tmp_path, capsys, extra, field):
    assert_refused(tmp_path, capsys, CASE.format(extra=extra), field)


# -- 4. κ is continuous at dry saturation --------------------------------------------------------

def test_kappa_of_dry_saturated_steam_matches_a_small_superheat():
    dry = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=12e5, mass_flow=1.0, inlet_dryness=1.0), SITE)
    hot = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=12e5, mass_flow=1.0, inlet_superheat=0.01), SITE)
    assert dry.value("valve_kv") == pytest.approx(hot.value("valve_kv"), rel=1e-3)
    # IAPWS-95 saturated vapour: κ = w²ρ/p on the vapour side of the saturation line.
    assert dry.value("isentropic_exponent") == pytest.approx(_kappa_iapws95(17e5, dryness=1.0), rel=2e-3)
    assert any("discontinuous" in a for a in dry.assumptions)


def test_wet_steam_keeps_its_own_kappa_and_says_so():
    wet = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=12e5, mass_flow=1.0, inlet_dryness=0.98), SITE)
    assert wet.value("isentropic_exponent") == pytest.approx(1.035 + 0.1 * 0.98, rel=1e-12)
    assert any("discontinuous" in a for a in wet.assumptions)


# -- 5. velocity limits by state; preferred sizes --------------------------------------------------

DESUPERHEATED = dict(BASE, target_superheat=10.0, water_temperature=378.15, water_pressure=21e5)


def test_desuperheated_outlet_is_judged_on_the_wet_limit():
    r = calculate(Inputs(**DESUPERHEATED, outlet_size="DN150"), SITE)
    assert "30 m/s" in r.values["suggested_outlet_size"].label
    assert "within 30 m/s" in str(_check(r, "Outlet line velocity").detail) or "exceeds 30 m/s" in \
        str(_check(r, "Outlet line velocity").detail)
    dry = calculate(Inputs(**{**BASE, "inlet_temperature": 623.15}, outlet_size="DN150"), SITE)
    assert "45 m/s" in dry.values["suggested_outlet_size"].label


@pytest.mark.parametrize("flow", [0.4, 0.6, 0.9, 1.3, 2.0, 3.0])
def test_suggested_sizes_skip_non_preferred_sizes(flow):
    r = calculate(Inputs(**{**BASE, "mass_flow": flow}), SITE)
    for key in ("suggested_inlet_size", "suggested_outlet_size"):
        assert r.value(key) not in ("DN90", "DN125"), key


def test_non_preferred_sizes_when_asked():
    # Find a flow whose smallest size under the limit is DN90 (ASME B36.10M NPS 3-1/2 sch 40, 90.12 mm bore).
    bore_80, bore_90 = 0.07792, 0.09012
    rho = PropsSI("D", "P", 17e5, "T", 503.15, "Water")
    flow = 45.0 * rho * math.pi / 4 * (bore_80 + bore_90) ** 2 / 4   # between the two sizes' capacity
    asked = calculate(Inputs(**{**BASE, "mass_flow": flow}, non_preferred_sizes=True), SITE)
    default = calculate(Inputs(**{**BASE, "mass_flow": flow}), SITE)
    assert asked.value("suggested_inlet_size") == "DN90"
    assert default.value("suggested_inlet_size") == "DN100"


def test_inlet_line_velocity_at_the_maximum_flow_uses_the_lowest_upstream_pressure():
    # Independent: IAPWS-95 density at the lowest upstream pressure, ASME B36.10M DN80 sch 40 bore 77.92 mm.
    r = calculate(Inputs(**BASE, max_flow=1.5, min_inlet_pressure=15e5, inlet_size="DN80"), SITE)
    rho = PropsSI("D", "P", 15e5, "T", 503.15, "Water")
    hand = 1.5 / rho / (math.pi / 4 * 0.07792 ** 2)
    assert r.value("inlet_velocity") == pytest.approx(hand, rel=1e-3)


def test_relief_load_is_on_saturated_steam_and_shows_the_normal_temperature_figure():
    # The basis is dry saturated steam at the highest pressure; the normal inlet temperature's figure is shown
    # beside it, not used (IAPWS-95 through CoolProp, by hand).
    r = calculate(Inputs(**BASE, rated_kv=63.0, max_inlet_pressure=19e5, upstream_pressure_basis=RELIEVING), SITE)
    rho, kappa = PropsSI("D", "P", 19e5, "Q", 1, "Water"), _kappa_iapws95(19e5, dryness=1.0)
    assert r.value("fail_open_flow") == pytest.approx(_iec_flow(63.0, 19e5, 3.5e5, rho, kappa, 0.70), rel=1e-3)
    rho, kappa = PropsSI("D", "P", 19e5, "T", 503.15, "Water"), _kappa_iapws95(19e5, 503.15)
    assert r.value("fail_open_flow_at_normal_temperature") == pytest.approx(
        _iec_flow(63.0, 19e5, 3.5e5, rho, kappa, 0.70), rel=1e-3)
    assert any("on dry saturated steam" in a for a in r.assumptions)


def test_supercritical_inlet_inside_if97_runs():
    # IAPWS-IF97 covers 1000 bar(a) to 800 degC; 250 bar(a), 600 degC is region 2 above the critical
    # pressure. Independent: IAPWS-95 through CoolProp for the throttled temperature.
    r = calculate(Inputs(inlet_pressure=250e5, outlet_pressure=100e5, mass_flow=5.0, inlet_temperature=873.15), SITE)
    h1 = PropsSI("H", "P", 250e5, "T", 873.15, "Water")
    assert r.value("outlet_temperature") == pytest.approx(PropsSI("T", "P", 100e5, "H", h1, "Water") - 273.15,
                                                           abs=0.1)
    assert "inlet_saturation_temperature" not in r.values


def test_supercritical_pressure_liquid_is_refused():
    with pytest.raises(InputError) as info:
        calculate(Inputs(inlet_pressure=250e5, outlet_pressure=100e5, mass_flow=5.0, inlet_temperature=573.15), SITE)
    assert info.value.field == "inlet_temperature" and "critical temperature" in str(info.value)
