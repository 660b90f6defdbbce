"""The fixes to the heater's reverse tube-rupture valve after an independent review
(tests/test_reverse_valve_review.py holds the findings): the inlet loss of both fluids the valve passes, the larger
held against 3 %; design pressures at or below the atmosphere, or relieving above water's critical pressure, refused
by their case-file keys; the discharge pipe held against the valve's outlet as the let-down's is; a liquid discharge
line that would reach the set pressure gives no figure; a sum of loss coefficients of 0 taken from a case file.

Figures are worked by hand with iapws (IF97) and fluids.
"""

import json
import math

import pytest
from fluids.friction import friction_factor
from iapws import IAPWS97

from steamcalc.calcs.exchanger.calculation import Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.cli import main
from steamcalc.errors import InputError
from tests.case_helpers import run_case_text
from tests.test_heater_reverse_rupture_valve import CASE, VALVE

ATM = 101325.0
BAR = 1e5
NAME = "Tube rupture, process side the higher"
#: Schedule 40 bore of DN80, m: outside diameter less two walls (ASME B36.10M, metric columns).
DN80 = (88.9 - 2 * 5.49) / 1e3
ROUGHNESS = 4.5e-5               # m, commercial steel (common practice)
API526_L = 2.853 * 645.16        # API 526 effective area of the L orifice, in² → mm²


def g(bar_gauge):
    return ATM + bar_gauge * BAR


HEATER = dict(steam_pressure=g(3.0), process_flow=12 / 3.6, process_inlet_temperature=328.15,
              process_outlet_temperature=358.15, process_pressure=g(4.0), steam_side_design_pressure=g(5.0),
              process_side_design_pressure=g(16.0), tube_inside_diameter=0.0157)
#: A 0.5 bar(g) steam side: the displaced steam's inlet loss is the larger.
LOW = dict(HEATER, steam_pressure=g(0.3), process_inlet_temperature=313.15, process_outlet_temperature=353.15,
           steam_side_design_pressure=g(0.5), process_side_design_pressure=g(10.0))
LOW_PIPES = dict(discharge_size="DN100", discharge_length=3.0, relief_inlet_size="DN80", relief_inlet_length=0.3,
                 relief_inlet_fittings_k=0.36)


def _step(result, label):
    return next(s for s in result.steps if s.label == label)


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


def _text(detail):
    return detail if isinstance(detail, str) else detail.text("SI")


@pytest.fixture(scope="module")
def low():
    return calculate(Inputs(**LOW, **LOW_PIPES), Site())


def test_the_displaced_steam_inlet_loss_by_hand_governs_the_check(low):
    """Darcy-Weisbach Δp = (f·L/D + ΣK)·ρ·v²/2, f by Colebrook (fluids), saturated steam at P1 = 0.55 bar(g)
    (iapws), at the L orifice's rated flow for the displaced steam (its flow times the L area over the area the steam
    needs, API 526 and the record's own sizing step): 3.7 % of the gauge set pressure, above the liquid's 2.9 % and
    above 3 % (API 520 Part II, inlet piping: a warning)."""
    p_set = g(0.5)
    p1 = p_set + 0.1 * (p_set - ATM)
    steam = IAPWS97(P=p1 / 1e6, x=1)
    sized = dict(_step(low, f"{NAME}, displaced steam, at the built-up back pressure: required area, "
                            "direct integration").operands)
    rated = sized["W"].value * API526_L / _step(low, f"{NAME}, displaced steam, at the built-up back pressure: "
                                                     "required area, direct integration").value
    assert low.value("tube_rupture_reverse_inlet_rated_flow") == pytest.approx(rated, rel=1e-6)
    velocity = rated / 3600 / steam.rho / (math.pi * DN80 ** 2 / 4)
    f = friction_factor(Re=steam.rho * velocity * DN80 / steam.mu, eD=ROUGHNESS / DN80, Method="Colebrook")
    share = (f * 0.3 / DN80 + 0.36) * steam.rho * velocity ** 2 / 2 / (p_set - ATM) * 100
    assert low.value("tube_rupture_reverse_inlet_loss_fraction") == pytest.approx(share, rel=1e-4)
    assert round(share, 1) == 3.7
    liquid_share = low.value("tube_rupture_reverse_inlet_loss_fraction_liquid")
    assert round(liquid_share, 1) == 2.9 and liquid_share < share
    assert _check(low, f"{NAME}: relief inlet pressure loss").status == "warn"
    # The liquid's steps are in the record, named by it; a notice says which fluid the check holds.
    assert _step(low, f"{NAME}, process liquid: inlet loss, of the gauge set pressure").value == liquid_share
    notice = _check(low, f"{NAME}: relief inlet pressure loss of each fluid")
    assert notice.notice and "no more than the displaced steam" in _text(notice.detail)


def test_when_the_liquid_loses_more_the_check_is_as_before():
    """The bellows valve of tests/test_heater_reverse_rupture_valve.py: the liquid's 4.9 % is the larger; the steam's
    is stated beside it."""
    result = calculate(Inputs(**HEATER, relief_valve_type="balanced-bellows", discharge_size="DN65",
                              discharge_length=15.0, discharge_fittings_k=2.0, relief_inlet_size="DN50",
                              relief_inlet_length=1.0, relief_inlet_fittings_k=0.5), Site())
    assert round(result.value("tube_rupture_reverse_inlet_loss_fraction"), 1) == 4.9
    assert result.value("tube_rupture_reverse_inlet_loss_fraction_steam") < 4.9
    assert "no more than the process liquid" in _text(_check(result, f"{NAME}: relief inlet pressure loss of each "
                                                                       "fluid").detail)


@pytest.mark.parametrize("change, field", [
    (dict(steam_pressure=g(-0.5), process_inlet_temperature=313.15, process_outlet_temperature=333.15,
          steam_side_design_pressure=g(0.0)), "overpressure.steam_side_design_pressure"),
    # The forward valve: the steam side the higher, the process side designed for 0 bar(g) or for vacuum.
    (dict(process_pressure=g(-0.2), process_side_design_pressure=g(0.0)), "overpressure.process_side_design_pressure"),
    (dict(process_pressure=g(-0.1), process_inlet_temperature=313.15, process_outlet_temperature=333.15,
          process_side_design_pressure=g(-0.05)), "overpressure.process_side_design_pressure"),
    (dict(process_side_design_pressure=g(205.0), tube_inside_diameter=0.005),
     "overpressure.process_side_design_pressure"),
], ids=["steam-side-atmospheric", "process-side-atmospheric", "process-side-vacuum", "process-side-205-barg"])
def test_design_pressures_no_valve_can_be_set_at_are_refused_by_their_keys(change, field):
    """A relief valve is set at its side's design pressure: at or below the atmosphere it cannot open (the sizing
    divided by the gauge set pressure: ZeroDivisionError); a relieving pressure (set + 10 %) at or above water's
    critical pressure, 220.64 bar(a) (IAPWS R7-97), has no saturation state for the thermal relief."""
    with pytest.raises(InputError) as caught:
        calculate(Inputs(**{**HEATER, **change}), Site())
    assert caught.value.field == field and caught.value.fix
    assert "(given:" not in str(caught.value)   # the value is written in the message, in bar


def test_a_process_side_just_below_the_critical_limit_and_a_liquid_other_than_water_are_assessed():
    """199 bar(g) relieves at 219.9 bar(a), below 220.64 bar(a); a liquid other than water has no IF97 states to
    run out of."""
    calculate(Inputs(**{**HEATER, "process_side_design_pressure": g(199.0), "tube_inside_diameter": 0.005}), Site())
    calculate(Inputs(**{**HEATER, "process_side_design_pressure": g(205.0), "tube_inside_diameter": 0.005,
                        "process_cp": 2100.0, "process_density": 850.0, "process_expansion_coefficient": 0.0007}),
              Site())


def test_the_refusal_through_the_command_line_names_the_key(tmp_path, capsys):
    text = CASE.format(site="", valve="").replace('steam_side_design_pressure = "5 bar(g)"',
                                                  'steam_side_design_pressure = "0 bar(g)"').replace(
        'steam_pressure = "3 bar(g)"', 'steam_pressure = "-0.5 bar(g)"').replace(
        'process_outlet_temperature = "85 degC"', 'process_outlet_temperature = "60 degC"').replace(
        'process_inlet_temperature = "55 degC"', 'process_inlet_temperature = "40 degC"')
    code, _, err = run_case_text(tmp_path, capsys, text)
    assert code == 2 and "overpressure.steam_side_design_pressure" in err and "Fix:" in err, err
    assert "unexpected error" not in err


@pytest.mark.parametrize("size, narrower", [("DN65", True), ("DN80", False), ("DN100", False)])
def test_the_discharge_pipe_is_held_against_the_valve_outlet(size, narrower):
    """API 526's smallest H and J valves, 1.5H3 and 2J3, have an NPS 3 (DN80) outlet (as tabulated in the Valve
    Selection Handbook, Table 5-1): a DN65 pipe warns, as the let-down's relief valve does (common practice)."""
    result = calculate(Inputs(**HEATER, discharge_size=size, discharge_length=6.0), Site())
    assert result.value("tube_rupture_reverse_orifice") in ("H", "J")
    said = [c for c in result.checks if c.name == f"{NAME}: discharge line size"]
    assert len(said) == int(narrower)
    if narrower:
        assert said[0].status == "warn" and "DN65 (given), on the valve's outlet DN80 " in _text(said[0].detail)


def test_a_liquid_line_that_would_reach_the_set_pressure_gives_no_figure():
    """An 80 mm tube bore (a T orifice) into DN50 pipes: at the T orifice's rated liquid flow the pipe's loss
    (Darcy-Weisbach) would be some 1000 bar, far above the 5 bar(g) set pressure: a failing check that says why, and
    no back pressure or reaction force among the results (as the steam's chokes)."""
    result = calculate(Inputs(**{**HEATER, "tube_inside_diameter": 0.08}, relief_valve_type="balanced-bellows",
                              discharge_size="DN50", discharge_length=15.0, discharge_fittings_k=2.0), Site())
    check = _check(result, f"{NAME}, process liquid: built-up back pressure")
    assert check.status == "fail" and "no back pressure or reaction force is given" in _text(check.detail)
    assert not [k for k in result.values if k.startswith("tube_rupture_reverse_liquid_")]
    assert not [s for s in result.steps if s.label.startswith(f"{NAME}, process liquid: built-up back pressure")]


def test_a_sum_of_loss_coefficients_of_zero_is_taken_from_a_case_file(tmp_path, capsys):
    """discharge_fittings_k = 0: a straight pipe, as the Inputs' check ("0 or more") and the 0 to 1000 range say; the
    same record as with the key left out; a negative is told "0 or more"."""
    runs = {}
    for name, k in (("zero", "discharge_fittings_k = 0"), ("none", "")):
        (tmp_path / name).mkdir()
        valve = VALVE.replace("discharge_fittings_k = 2.0", k)
        code, _, err = run_case_text(tmp_path / name, capsys, CASE.format(site="", valve=valve))
        assert code == 0, err
        runs[name] = json.loads((tmp_path / name / "out" / "HX-R_revA.json").read_text())["results"]
    assert runs["zero"]["tube_rupture_reverse_steam_built_up_back_pressure"] == \
        runs["none"]["tube_rupture_reverse_steam_built_up_back_pressure"]
    assert main(["verify", str(tmp_path / "zero" / "out" / "HX-R_revA.json")]) == 0
    (tmp_path / "negative").mkdir()
    code, _, err = run_case_text(tmp_path / "negative", capsys, CASE.format(
        site="", valve=VALVE.replace("discharge_fittings_k = 2.0", "discharge_fittings_k = -1")))
    assert code == 2 and "overpressure.discharge_fittings_k" in err and "0 or more" in err, err
