"""The relief valve's inlet pipe of the flash vessel and of the heater's tube-rupture valve: its loss at the valve's
rated flow, worked by hand with an independent friction factor, against 3 % of the gauge set pressure (API 520
Part II, 7.3.1); the pipe given by halves refused by name; a two-phase governing case says it is not computed; a
record with the pipe issues and verifies."""

import json
import math

import pytest
from fluids.friction import friction_factor

from steamcalc.calcs.exchanger.calculation import Inputs as HeaterInputs
from steamcalc.calcs.exchanger.calculation import calculate as heater
from steamcalc.calcs.flash.calculation import Inputs as FlashInputs
from steamcalc.calcs.flash.calculation import calculate as flash
from steamcalc.cases.site import Site
from steamcalc.cli import main
from steamcalc.errors import InputError
from steamcalc.properties.steam import SteamState, dynamic_viscosity
from tests.case_helpers import assert_refused, run_case_text
from tests.worked_step_arithmetic import written_step_problems

ATM = 101325.0
BAR = 1e5
#: Schedule 40 bores, m: outside diameter less two walls, in the metric columns of ASME B36.10M (DN25: 33.4 mm,
#: wall 3.38 mm; DN20: 26.7 mm, 2.87 mm; DN50: 60.3 mm, 3.91 mm; DN80: 88.9 mm, 5.49 mm).
BORE = {"DN20": (26.7 - 2 * 2.87) / 1e3, "DN25": (33.4 - 2 * 3.38) / 1e3, "DN50": (60.3 - 2 * 3.91) / 1e3, "DN80": (88.9 - 2 * 5.49) / 1e3}
#: Commercial steel, m (Moody's chart, 0.045 mm; common practice).
ROUGHNESS = 4.5e-5


def g(bar_gauge):
    return ATM + bar_gauge * BAR


FLASH = dict(condensate_pressure=g(10.0), condensate_flow=1.0, flash_pressure=g(1.0), vessel_design_pressure=g(5.0))
HEATER = dict(steam_pressure=g(8.0), process_flow=12 / 3.6, process_inlet_temperature=328.15,
              process_outlet_temperature=358.15, process_pressure=g(4.0), steam_side_design_pressure=g(10.0),
              process_side_design_pressure=g(5.0), tube_inside_diameter=0.0157)


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


def _loss_by_hand(state, flow_kg_h, size, length, fittings_k):
    """Darcy–Weisbach with the Colebrook friction factor of fluids (Colebrook 1939), bore by ASME B36.10M."""
    bore = BORE[size]
    area = math.pi * bore ** 2 / 4
    velocity = flow_kg_h / 3600 / state.density / area
    reynolds = state.density * velocity * bore / dynamic_viscosity(state.temperature, state.density)
    f = friction_factor(reynolds, ROUGHNESS / bore, Method="Colebrook")
    return (f * length / bore + fittings_k) * state.density * velocity ** 2 / 2


@pytest.mark.parametrize("size, length, k, status, source", [
    ("DN80", 0.5, 0.5, "pass", "Darcy–Weisbach, Colebrook by fluids; API 520 Part II 7.3.1 (3 %)"),
    ("DN25", 3.0, 1.5, "pass", "the same, a D orifice's own inlet size, 3 m: 1.7 %"),
    ("DN20", 3.0, 1.5, "warn", "the same, a narrower pipe: 5.3 %, above 3 %"),
])
def test_flash_vessel_relief_inlet_loss_by_hand(size, length, k, status, source):
    result = flash(FlashInputs(**FLASH, relief_inlet_size=size, relief_inlet_length=length, relief_inlet_fittings_k=k),
                   Site())
    p_r = g(5.0) + 0.1 * 5.0 * BAR
    vapour = SteamState.from_p_dryness(p_r, 1.0)
    load = result.value("vessel_relief_blocked_outlet_load")
    rated = load * result.value("vessel_relief_orifice_area") / result.value("vessel_relief_required_area")
    expected = _loss_by_hand(vapour, rated, size, length, k) / (g(5.0) - ATM) * 100
    assert result.value("vessel_relief_inlet_loss_fraction") == pytest.approx(expected, rel=1e-6), source
    assert _check(result, "Vessel relief: relief inlet pressure loss").status == status


def test_tube_rupture_relief_inlet_loss_of_the_displaced_liquid_by_hand():
    """The displaced liquid governs this heater's tube-rupture valve: the inlet pipe carries liquid at its rated
    flow (API 520 Part II, 7.3.1: the loss at the rated capacity)."""
    result = heater(HeaterInputs(**HEATER, relief_inlet_size="DN80", relief_inlet_length=0.3), Site())
    assert result.value("tube_rupture_governing_case") == "displaced liquid"
    p_r = g(5.0) + 0.1 * 5.0 * BAR
    relieving = SteamState.from_ph(p_r, SteamState.from_p_dryness(g(8.0), 1.0).enthalpy)
    liquid = SteamState.from_pT(p_r, min(358.15, relieving.saturation_temperature - 1.0))
    step = next(s for s in result.steps if s.label.startswith("Tube rupture: inlet pressure loss at the rated flow"))
    operands = dict(step.operands)
    assert operands["rho"].value == pytest.approx(liquid.density, rel=1e-12)
    fraction = result.value("tube_rupture_inlet_loss_fraction")
    velocity = operands["v"].value
    flow_kg_h = velocity * liquid.density * math.pi * BORE["DN80"] ** 2 / 4 * 3600
    expected = _loss_by_hand(liquid, flow_kg_h, "DN80", 0.3, 0.0) / (g(5.0) - ATM) * 100
    assert fraction == pytest.approx(expected, rel=1e-6)


def test_a_loss_of_the_whole_set_pressure_fails():
    """At 100 % of the gauge set pressure no pressure is left to drive the flow (common practice): steam through a
    narrow pipe under a D-orifice valve."""
    result = flash(FlashInputs(**FLASH, relief_inlet_size="DN15", relief_inlet_length=40.0,
                               relief_inlet_fittings_k=20.0), Site())
    assert result.value("vessel_relief_inlet_loss_fraction") > 100
    check = _check(result, "Vessel relief: relief inlet pressure loss")
    assert check.status == "fail" and "cannot pass its rated flow" in check.detail.text("SI")


def test_a_liquid_that_would_fall_below_its_saturation_pressure_flashes_and_here_chokes():
    """The heater's displaced liquid (85 °C) through DN25 under a Q-orifice valve: by Darcy–Weisbach it would lose
    hundreds of bar, far below its saturation pressure, so it flashes in the pipe; the flashing flow chokes before
    the valve, which cannot receive its rated flow (API 520 Part I annex C, C.2.3)."""
    result = heater(HeaterInputs(**HEATER, relief_inlet_size="DN25", relief_inlet_length=1.0), Site())
    check = _check(result, "Tube rupture: relief inlet pressure loss")
    assert check.status == "fail" and "could not receive its rated flow" in str(check.detail)


def test_without_the_pipe_the_notice_is_as_before():
    """Records of earlier releases keep their verdict: the notice's words are unchanged."""
    result = flash(FlashInputs(**FLASH), Site())
    check = _check(result, "Vessel relief: relief inlet pressure loss")
    assert check.kind == "notice"
    assert check.detail.text("SI").startswith("not assessed: the relief valve's inlet pipe is not among the inputs")


def test_a_two_phase_governing_case_works_the_mixtures_loss():
    """The filling vessel relieves a flashing mixture: its inlet pipe's loss by homogeneous flow and the omega
    equation (API 520 Part I annex C; Leung 1996), with the inlet pipe's own omega as a step."""
    result = flash(FlashInputs(**FLASH, inlet_capacity=8 / 3.6, relief_inlet_size="DN80", relief_inlet_length=0.5,
                               relief_inlet_fittings_k=0.5), Site())
    assert "two-phase" in result.value("vessel_relief_governing_case")
    assert _check(result, "Vessel relief: relief inlet pressure loss").status == "pass"
    labels = [s.label for s in result.steps]
    assert "Vessel relief: omega parameter of the inlet pipe (IF97, constant enthalpy)" in labels
    assert "Vessel relief: inlet pressure loss at the rated flow (two-phase mixture)" in labels
    assert 0.0 < result.value("vessel_relief_inlet_loss_fraction") < 3.0


def test_a_two_phase_inlet_pipe_that_chokes_fails():
    result = flash(FlashInputs(**FLASH, inlet_capacity=8 / 3.6, relief_inlet_size="DN80", relief_inlet_length=90.0,
                               relief_inlet_fittings_k=50.0), Site())
    check = _check(result, "Vessel relief: relief inlet pressure loss")
    assert check.status == "fail" and "chokes" in str(check.detail)


def test_no_tube_rupture_case_says_the_inlet_pipe_is_not_assessed():
    result = heater(HeaterInputs(**{**HEATER, "process_side_design_pressure": g(10.0)}, relief_inlet_size="DN80",
                                 relief_inlet_length=0.5), Site())
    assert result.value("tube_rupture_relief_needed") == "no"
    assert _check(result, "Tube rupture: inlet pipe not assessed").kind == "notice"


@pytest.mark.parametrize("make, field", [
    (lambda: FlashInputs(**FLASH, relief_inlet_size="DN80"), "overpressure.inlet_length"),
    (lambda: FlashInputs(**FLASH, relief_inlet_length=0.5), "overpressure.inlet_size"),
    (lambda: FlashInputs(**FLASH, relief_inlet_size="DN80", relief_inlet_length=0.5, relief_inlet_fittings_k=-1.0),
     "overpressure.inlet_fittings_k"),
    (lambda: HeaterInputs(**HEATER, relief_inlet_fittings_k=0.5), "overpressure.inlet_size"),
    (lambda: FlashInputs(**{k: v for k, v in FLASH.items() if k != "vessel_design_pressure"},
                         relief_inlet_size="DN80", relief_inlet_length=0.5), "overpressure.design_pressure"),
])
def test_an_inlet_pipe_given_by_halves_is_refused_by_name(make, field):
    with pytest.raises(InputError) as caught:
        make()
    assert caught.value.field == field and caught.value.fix


FLASH_CASE = """[case]
kind = "flash"
id = "FL-T"
title = "t"
revision = "A"
prepared_by = "t"

[inputs]
condensate_pressure = "10 bar(g)"
condensate_flow = "1 t/h"
flash_pressure = "1 bar(g)"

[inputs.overpressure]
design_pressure = "5 bar(g)"
{pipe}
"""


def test_an_unknown_inlet_size_is_refused_through_the_command_line(tmp_path, capsys):
    assert_refused(tmp_path, capsys, FLASH_CASE.format(pipe='inlet_size = "DN33"\ninlet_length = "0.5 m"'),
                   "overpressure.inlet_size")


def test_a_flash_record_with_its_inlet_pipe_issues_verifies_and_writes_its_steps_in_us_units(tmp_path, capsys):
    code, out, err = run_case_text(tmp_path, capsys, FLASH_CASE.format(
        pipe='inlet_size = "DN80"\ninlet_length = "0.5 m"\ninlet_fittings_k = 0.5'))
    assert code == 0, err
    path = tmp_path / "out" / "FL-T_revA.json"
    record = json.loads(path.read_text())
    assert record["inputs"]["relief_inlet_size"]["given"] == "DN80"
    assert "vessel_relief_inlet_loss_fraction" in record["results"]
    assert written_step_problems(record) == []
    assert main(["verify", str(path)]) == 0
    assert "VERIFIED" in capsys.readouterr().out


def test_a_two_phase_flash_record_with_its_inlet_pipe_issues_and_verifies(tmp_path, capsys):
    code, out, err = run_case_text(tmp_path, capsys, FLASH_CASE.format(
        pipe='inlet_capacity = "8 t/h"\ninlet_size = "DN80"\ninlet_length = "0.5 m"\ninlet_fittings_k = 0.5'))
    assert code == 0, err
    path = tmp_path / "out" / "FL-T_revA.json"
    record = json.loads(path.read_text())
    assert "two-phase" in record["results"]["vessel_relief_governing_case"]["value"]
    assert "vessel_relief_inlet_loss_fraction" in record["results"]
    assert written_step_problems(record) == []
    assert main(["verify", str(path)]) == 0
    assert "VERIFIED" in capsys.readouterr().out


def test_a_load_beyond_the_t_orifice_says_the_inlet_pipe_is_not_assessed():
    """Found in review: with no single API 526 orifice large enough, a given inlet pipe vanished without a word."""
    result = flash(FlashInputs(**FLASH, inlet_capacity=1000 / 3.6, relief_inlet_size="DN200", relief_inlet_length=1.0),
                   Site())
    assert result.value("vessel_relief_orifice") == "larger than T"
    assert _check(result, "Vessel relief: inlet pipe not assessed").kind == "notice"
