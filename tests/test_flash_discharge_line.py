"""The flash vessel's two-phase relief discharge line: the built-up back pressure worked by hand from IF97 states
(the iapws package), fluids' Colebrook and a solve_ivp integration of the momentum balance; the reaction force by
hand; the limits of each valve type; the notice when no pipe is given; a pipe too small for the flow; and the
outlet-pipe inputs refused by field."""

import math

import pytest
from fluids.friction import friction_factor
from iapws import IAPWS97
from scipy.integrate import solve_ivp

from steamcalc.calcs.flash.calculation import Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.errors import InputError

ATM = 101325.0
BAR = 1e5
ROUGHNESS = 4.5e-5            # m, commercial steel (Crane TP-410; common practice)
DN_SCH40 = {"DN80": (88.9 - 2 * 5.49) / 1e3, "DN100": (114.3 - 2 * 6.02) / 1e3}   # ASME B36.10M, m


def g(bar_gauge):
    return ATM + bar_gauge * BAR


# 8 t/h of condensate saturated at 10 bar(g) into a vessel relieving at 5.5 bar(g): two-phase relief, K orifice.
TWO_PHASE = dict(condensate_pressure=g(10.0), condensate_flow=1.0, flash_pressure=g(1.0),
                 vessel_design_pressure=g(5.0), inlet_capacity=8 / 3.6)


def _flash(**pipe):
    return calculate(Inputs(**TWO_PHASE, **pipe), Site())


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


def _hand_back_pressure(result, size, length, fittings_k):
    """Pa(a), by hand: the relieving mixture and its constant-enthalpy state at the atmosphere from iapws (IF97),
    ω through both, the rated flow of the orifice, Colebrook (fluids) at the liquid-only Reynolds number of
    saturated water at the atmosphere (iapws), then the momentum balance dx/dp = 2D(1 + G² dv/dp)/(f G² v) marched
    with solve_ivp until x reaches L + ΣK·D/f."""
    h_in = IAPWS97(P=g(10.0) / 1e6, x=0.0).h
    p0 = result.value("vessel_relief_relieving_pressure") * BAR
    v0 = IAPWS97(P=p0 / 1e6, h=h_in).v
    v_e = IAPWS97(P=ATM / 1e6, h=h_in).v
    omega = (v_e / v0 - 1.0) / (p0 / ATM - 1.0)
    rated = 8000.0 * result.value("vessel_relief_orifice_area") / result.value("vessel_relief_required_area") / 3600
    d = DN_SCH40[size]
    gflux = rated / (math.pi * d * d / 4)
    mu = IAPWS97(P=ATM / 1e6, x=0.0).mu
    f = friction_factor(Re=gflux * d / mu, eD=ROUGHNESS / d, Method="Colebrook")
    total = length + fittings_k * d / f
    p_exit = max(ATM, gflux * math.sqrt(omega * p0 * v0))

    def slope(p, y):
        v = v0 * (omega * (p0 / p - 1.0) + 1.0)
        return [2.0 * d * (1.0 - gflux * gflux * omega * p0 * v0 / p ** 2) / (f * gflux * gflux * v)]

    def reached(p, y):
        return y[0] - total

    reached.terminal = True
    solved = solve_ivp(slope, (p_exit, p0), [0.0], events=reached, rtol=1e-11, atol=1e-9,
                       max_step=(p0 - p_exit) / 50)
    return solved.t_events[0][0], p_exit, gflux, v0 * (omega * (p0 / p_exit - 1.0) + 1.0), d


@pytest.mark.parametrize("size, length, fittings_k, source", [
    ("DN100", 6.0, 1.5, "iapws IF97 states, fluids Colebrook, scipy solve_ivp (exit at the atmosphere)"),
    ("DN80", 10.0, 2.0, "iapws IF97 states, fluids Colebrook, scipy solve_ivp (choked exit)"),
])
def test_back_pressure_and_reaction_force_by_hand(size, length, fittings_k, source):
    result = _flash(discharge_size=size, discharge_length=length, discharge_fittings_k=fittings_k)
    p1, p_exit, gflux, v_e, d = _hand_back_pressure(result, size, length, fittings_k)
    # The bore agrees with ASME B36.10M within 0.1 mm; the back pressure within 0.05 % (IF97 by two libraries).
    assert result.value("vessel_relief_built_up_back_pressure") * BAR == pytest.approx(p1, rel=5e-4), source
    area = math.pi * d * d / 4
    # API 520 Part II, 4.4.1.1: momentum and pressure at the open exit, worked by hand.
    force = gflux ** 2 * v_e * area + (p_exit - ATM) * area
    assert result.value("vessel_relief_reaction_force") == pytest.approx(force, rel=2e-3), source


@pytest.mark.parametrize("valve_type, status, source", [
    ("conventional", "warn", "10 % of the gauge set pressure (common practice; API 520 Part I, 5.3.3)"),
    ("balanced-bellows", "pass", "50 % of the gauge set pressure (API 520 Part I, figure 31)"),
])
def test_limit_of_each_valve_type(valve_type, status, source):
    result = _flash(discharge_size="DN80", discharge_length=10.0, discharge_fittings_k=2.0,
                    relief_valve_type=valve_type)
    share = result.value("vessel_relief_built_up_back_pressure_fraction")
    assert 10.0 < share < 50.0
    assert _check(result, "Vessel relief: built-up back pressure").status == status, source


def test_no_pipe_is_a_notice():
    """Source: the brief (an optional input not given is said, not silent); a notice cannot change the verdict."""
    result = _flash()
    said = _check(result, "Vessel relief: discharge line")
    assert said.notice and "not assessed" in said.detail
    assert "vessel_relief_built_up_back_pressure" not in result.values


def test_pipe_too_small_fails():
    """Source: the omega method's choking pressure G·√(ω p0 v0) (API 520 Part I annex C) above the relieving
    pressure in a DN15 pipe: the valve could not pass its flow."""
    result = _flash(discharge_size="DN15", discharge_length=20.0, discharge_fittings_k=1.0)
    check = _check(result, "Vessel relief: built-up back pressure")
    assert check.status == "fail" and "larger" in check.detail


@pytest.mark.parametrize("pipe, field", [
    (dict(discharge_size="DN100"), "overpressure.discharge_length"),
    (dict(discharge_length=6.0, discharge_fittings_k=1.5), "overpressure.discharge_size"),
    (dict(discharge_fittings_k=1.5), "overpressure.discharge_size"),
    (dict(discharge_size="DN100", discharge_length=-1.0), "overpressure.discharge_length"),
])
def test_outlet_pipe_inputs_refused_by_field(pipe, field):
    with pytest.raises(InputError) as caught:
        Inputs(**TWO_PHASE, **pipe)
    assert caught.value.field == field and caught.value.fix


def test_demo_fl01_discharge_line():
    """Source: the demo case's outlet pipe (demo figures: DN100, 6 m, ΣK 1.5) within 10 % of the gauge set
    pressure of its conventional valve."""
    from steamcalc.cases.site import case_inputs, case_site, load_case

    case = load_case("workbooks/demo_site/cases/FL-01.toml")
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    result = calculate(inputs, site)
    assert _check(result, "Vessel relief: built-up back pressure").status == "pass"
    assert 0.0 < result.value("vessel_relief_built_up_back_pressure_fraction") < 10.0
