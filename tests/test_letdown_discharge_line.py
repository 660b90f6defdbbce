"""The let-down relief valve's discharge line: the built-up back pressure in its outlet pipe worked by hand with
fluids' isothermal gas equation, the reaction force by API 520 Part II's equation worked by hand, the limit of each
valve type, the notice when no pipe is given, and bad outlet-pipe input refused by field."""

import math

import pytest
from fluids.compressible import P_isothermal_critical_flow, isothermal_gas
from fluids.friction import friction_factor
from iapws import IAPWS97
from scipy.optimize import brentq

from steamcalc.calcs.letdown.calculation import Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.properties.steam import SteamState
from tests.case_helpers import assert_refused, run_case_text
from tests.test_relief import _text

ATM = 101325.0
R_UNIVERSAL = 8314.462618     # J/(kmol K), CODATA 2018
MOLAR_MASS_WATER = 18.015268  # kg/kmol, IAPWS
ROUGHNESS = 4.5e-5            # m, commercial steel (Crane TP-410; common practice)
#: Inner diameters of schedule 40 pipe, m (ASME B36.10M: OD less twice the wall).
SCHEDULE_40 = {"DN150": (168.28 - 2 * 7.11) / 1e3, "DN250": (273.05 - 2 * 9.27) / 1e3}

COMMON = dict(inlet_pressure=17.01e5, inlet_temperature=503.15, outlet_pressure=3.5e5, mass_flow=1.25, rated_kv=63.0,
              set_pressure=5.5e5)


def _step(result, label):
    return next(s for s in result.steps if s.label == label)


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


def _hand_back_pressure(result, size, length, fittings_k):
    """Built-up back pressure by hand, Pa(a): the rated flow through the pipe, the relieving steam throttled to the
    atmosphere (IF97 enthalpy, iapws for T and μ), Colebrook's f from fluids, then the outlet pressure whose flow
    fluids.compressible.isothermal_gas gives as the rated flow with the exit at the atmosphere, or, when the exit
    chokes above it, the outlet pressure whose isothermal choking pressure fluids finds at the exit."""
    flow = result.value("relief_rated_flow") / 3600.0
    relieving = SteamState.from_pT(result.value("relief_relieving_pressure") * 1e5,
                                   result.value("relief_relieving_temperature") + 273.15)
    pipe = IAPWS97(P=ATM / 1e6, h=relieving.enthalpy / 1e3)
    # The record's bore, within 0.1 mm of the ASME B36.10M figure (OD 273.05 or 273.0 mm for DN250 differ by 0.05).
    diameter = dict(_step(result, "Relief discharge line: built-up back pressure").operands)["D"].value / 1e3
    assert diameter == pytest.approx(SCHEDULE_40[size], abs=1e-4)
    area = math.pi * diameter ** 2 / 4
    reynolds = flow / area * diameter / pipe.mu
    f = friction_factor(Re=reynolds, eD=ROUGHNESS / diameter, Method="Colebrook")
    # fluids' isothermal_gas has no fittings: they are carried as friction, f' = f + ΣK·D/L.
    f_total = f + fittings_k * diameter / length
    gas = R_UNIVERSAL * pipe.T / MOLAR_MASS_WATER
    choked_exit = flow / area * math.sqrt(gas)   # isothermal choking: u = √(RT/M) at the exit

    def choking(p1):
        return P_isothermal_critical_flow(p1, f_total, diameter, length)

    if choked_exit > ATM:
        # The exit chokes above the atmosphere: the outlet pressure is the one at which this pipe chokes there.
        return brentq(lambda p1: choking(p1) - choked_exit, ATM, 50 * ATM, xtol=1e-6), pipe.T, True

    def residual(p1):
        return isothermal_gas(p1 / gas, f_total, P1=p1, P2=ATM, L=length, D=diameter) - flow

    # The outlet pressure lies above the atmosphere and below the one at which this pipe would choke with its exit
    # at the atmosphere (fluids.compressible.P_isothermal_critical_flow), where the flow is the most it can pass.
    most = brentq(lambda p1: choking(p1) - ATM, ATM, 50 * ATM)
    return brentq(residual, ATM * 1.0001, most * (1 - 1e-9), xtol=1e-6), pipe.T, False


@pytest.mark.parametrize("size, length, equivalent, fittings_k, choked, source", [
    ("DN250", 12.0, None, 1.9, False,
     "fluids.compressible.isothermal_gas, exit at the atmosphere; Colebrook by fluids.friction; iapws IF97"),
    ("DN150", 6.0, 4.0, 1.0, True,
     "fluids.compressible.P_isothermal_critical_flow, exit choked; equivalent length added to the straight length"),
])
def test_built_up_back_pressure_by_hand(size, length, equivalent, fittings_k, choked, source):
    result = calculate(Inputs(**COMMON, relief_discharge_size=size, relief_discharge_length=length,
                              relief_discharge_equivalent_length=equivalent, relief_discharge_fittings_k=fittings_k),
                       Site())
    total = length + (equivalent or 0.0)
    hand, temperature, exit_choked = _hand_back_pressure(result, size, total, fittings_k)
    assert exit_choked == choked
    assert result.value("relief_built_up_back_pressure") * 1e5 == pytest.approx(hand, rel=1e-4), source
    step = _step(result, "Relief discharge line: built-up back pressure")
    operands = dict(step.operands)
    assert operands["L"].value == pytest.approx(total) and operands["K"].value == fittings_k
    assert operands["T"].value == pytest.approx(temperature - 273.15, abs=0.01)
    share = 100 * (hand - ATM) / (COMMON["set_pressure"] - ATM)
    assert result.value("relief_built_up_back_pressure_fraction") == pytest.approx(share, rel=1e-3)
    check = _check(result, "Relief built-up back pressure")
    assert check.quantity.value == pytest.approx(share, rel=1e-3)
    assert check.limits[0].limit.value == 10.0 and "API 520 Part I" in check.source
    assert check.status == ("pass" if share <= 10.0 else "warn")


def test_reaction_force_by_hand():
    """Source: API 520 Part II (7th ed.), 4.4.1.1, equation (1), SI form, worked by hand:
    F = 129.41·W·√(kT/((k+1)M)) + 10⁻³·A_o·P2 with W kg/s, T K, M kg/kmol, A_o mm², P2 kPa(g); P2 the static
    pressure of a sonic exit, W/A_o·√(R·T_e/(k·M)) with T_e = 2T/(k+1), nil below the atmosphere. The outlet pipe
    given is the one whose exit area counts."""
    narrow = calculate(Inputs(**COMMON, relief_discharge_size="DN150", relief_discharge_length=6.0), Site())
    wide = calculate(Inputs(**COMMON, relief_discharge_size="DN250", relief_discharge_length=6.0), Site())
    for result, size in ((narrow, "DN150"), (wide, "DN250")):
        k = dict(_step(result, "Reaction force of the open discharge").operands)["k"].value
        w = result.value("relief_rated_flow") / 3600.0
        t = result.value("relief_relieving_temperature") + 273.15
        area = math.pi * SCHEDULE_40[size] ** 2 / 4
        exit_temperature = 2 * t / (k + 1)
        p2 = max(0.0, w / area * math.sqrt(R_UNIVERSAL * exit_temperature / (k * MOLAR_MASS_WATER)) - ATM)
        force = 129.41 * w * math.sqrt(k * t / ((k + 1) * MOLAR_MASS_WATER)) + 1e-3 * area * 1e6 * p2 / 1e3
        assert result.value("relief_reaction_force") == pytest.approx(force, rel=1e-3)
    # The narrow pipe's exit is choked above the atmosphere: its pressure term adds to the force.
    assert narrow.value("relief_reaction_force") > wide.value("relief_reaction_force")
    # A pipe narrower than the valve's outlet (DN200 for the Q orifice, API 526) is warned of (common practice).
    assert narrow.value("relief_orifice") == "Q"
    assert _check(narrow, "Relief discharge line size").status == "warn"
    assert not any(c.name == "Relief discharge line size" for c in wide.checks)


@pytest.mark.parametrize("valve_type, limit, source", [
    ("conventional", 10.0, "API 520 Part I, 5.3.3 (10 % of the gauge set pressure; common practice)"),
    ("balanced-bellows", 50.0, "API 520 Part I, figure 31 (the Kb curve's range); the maker's limit governs"),
    ("pilot", 50.0, "common practice; the maker's limit governs"),
])
def test_limit_by_valve_type(valve_type, limit, source):
    result = calculate(Inputs(**COMMON, relief_valve_type=valve_type, relief_discharge_size="DN200",
                              relief_discharge_length=12.0, relief_discharge_fittings_k=1.9), Site())
    check = _check(result, "Relief built-up back pressure")
    assert check.limits[0].limit.value == limit, source
    share = result.value("relief_built_up_back_pressure_fraction")
    assert 10.0 < share < 50.0   # the same pipe: too much for a conventional valve, within a balanced one's range
    assert check.status == ("warn" if valve_type == "conventional" else "pass")
    assert any(w.startswith("Relief built-up back pressure") for w in result.warnings) == (valve_type == "conventional")


def test_no_outlet_pipe_is_a_notice_not_a_warning():
    """Without the outlet pipe the record says it was not assessed: a statement, which changes no verdict."""
    result = calculate(Inputs(**COMMON), Site())
    notice = _check(result, "Relief discharge line")
    assert notice.notice and notice.status == "pass" and "not assessed" in notice.detail
    assert "relief_built_up_back_pressure" not in result.values
    assert not any("discharge line" in w for w in result.warnings)
    assert result.value("relief_reaction_force") > 0.0   # the reaction force is found as before


def test_demo_case_assesses_its_discharge_line(tmp_path, capsys):
    """The demo let-down LD-01 gives its outlet pipe: DN250 × 12 m, within the conventional valve's 10 %."""
    from steamcalc.cli import main

    assert main(["run", "workbooks/demo_site/cases/LD-01.toml", "--out", str(tmp_path), "--quiet"]) == 0
    import json

    record = json.loads(next(tmp_path.glob("LD-01_rev*.json")).read_text(encoding="utf-8"))
    check = next(c for c in record["checks"] if c["name"] == "Relief built-up back pressure")
    assert check["status"] == "pass" and check["source"]
    assert 0.0 < record["results"]["relief_built_up_back_pressure_fraction"]["value"] < 10.0
    assert any(s["label"] == "Relief discharge line: built-up back pressure" for s in record["steps"])


@pytest.mark.parametrize("relief, field", [
    ('set_pressure = "4.5 bar(g)"\ndischarge_size = "DN250"\ndischarge_length = "-12 m"', "relief.discharge_length"),
    ('set_pressure = "4.5 bar(g)"\ndischarge_length = "12 m"\nvalve_type = "spring-loaded"', "relief.valve_type"),
    ('set_pressure = "4.5 bar(g)"\ndischarge_length = "12 m"\ndischarge_fittings_k = -1.0',
     "relief.discharge_fittings_k"),
    ('set_pressure = "4.5 bar(g)"\ndischarge_length = "12 m"\ndischarge_equivalent_length = "-3 m"',
     "relief.discharge_equivalent_length"),
    ('set_pressure = "4.5 bar(g)"\ndischarge_fittings_k = 1.9', "relief.discharge_fittings_k"),
    ('set_pressure = "4.5 bar(g)"\ndischarge_size = "DN255"\ndischarge_length = "12 m"', "relief.discharge_size"),
])
def test_bad_outlet_pipe_input_is_refused(tmp_path, capsys, relief, field):
    """Bad outlet-pipe input: exit 2, the file and the field named, nothing written."""
    assert_refused(tmp_path, capsys, _text(relief), field)


def test_a_refusal_says_what_to_do(tmp_path, capsys):
    code, _, err = run_case_text(tmp_path, capsys, _text('set_pressure = "4.5 bar(g)"\ndischarge_fittings_k = 1.9'))
    assert code == 2 and "discharge_length" in err and "Traceback" not in err
