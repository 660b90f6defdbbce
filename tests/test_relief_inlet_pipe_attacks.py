"""A checker's and a hostile user's attacks on the relief valve's inlet pipe (flash vessel, heater tube rupture).

Independent re-work of the inlet loss: IF97 states from ``iapws`` (not steamcalc's wrapper), pipe bores typed in
from ASME B36.10M, the Colebrook equation solved here by fixed-point iteration, and the valve's rated flow from
the API 526 effective area with API 520 Part I's equations. Then junk inputs through the command line.

The findings of a review of the commit that added the inlet pipe (8c88b65) are kept here as tests, each saying
what was found and what is expected now; one older finding (the tube-rupture flow step's printed pi) is an
expected failure, with the reason beside it.
"""

import json
import math

import pytest
from iapws import IAPWS97

from steamcalc.calcs.exchanger.calculation import Inputs as HeaterInputs
from steamcalc.calcs.exchanger.calculation import calculate as heater
from steamcalc.calcs.flash.calculation import Inputs as FlashInputs
from steamcalc.calcs.flash.calculation import calculate as flash
from steamcalc.cases.site import Site
from steamcalc.cli import main
from tests.case_helpers import assert_refused, run_case_text
from tests.worked_step_arithmetic import written_step_problems

ATM = 101325.0
BAR = 1e5
IN2 = 645.16  # mm² per in², exact
#: Schedule 40 bores, m: outside diameter less two walls (ASME B36.10M, metric columns).
BORE = {"DN25": (33.4 - 2 * 3.38) / 1e3, "DN80": (88.9 - 2 * 5.49) / 1e3, "DN150": (168.3 - 2 * 7.11) / 1e3}
#: Commercial steel, m (0.045 mm; common practice).
ROUGHNESS = 4.5e-5
#: API 526 effective areas, in² (API 526, orifice designations D and Q).
API526 = {"D": 0.110, "Q": 11.05}


def g(bar_gauge):
    return ATM + bar_gauge * BAR


FLASH = dict(condensate_pressure=g(10.0), condensate_flow=1.0, flash_pressure=g(1.0), vessel_design_pressure=g(5.0))
HEATER = dict(steam_pressure=g(8.0), process_flow=12 / 3.6, process_inlet_temperature=328.15,
              process_outlet_temperature=358.15, process_pressure=g(4.0), steam_side_design_pressure=g(10.0),
              process_side_design_pressure=g(5.0), tube_inside_diameter=0.0157)


def _colebrook(reynolds, relative_roughness):
    """Darcy f by fixed-point iteration on 1/√f = −2 log10(ε/3.7D + 2.51/(Re √f)) (Colebrook 1939)."""
    u = 7.0
    for _ in range(200):
        u, previous = -2.0 * math.log10(relative_roughness / 3.7 + 2.51 * u / reynolds), u
        if abs(u - previous) < 1e-14:
            break
    return 1.0 / u ** 2


def _loss(flow_kg_h, state, bore, length, k):
    """Darcy–Weisbach at the inlet state: Δp = (f·L/D + ΣK)·ρ·v²/2, Pa."""
    velocity = flow_kg_h / 3600.0 / state.rho / (math.pi * bore ** 2 / 4)
    reynolds = state.rho * velocity * bore / state.mu
    f = _colebrook(reynolds, ROUGHNESS / bore)
    return (f * length / bore + k) * state.rho * velocity ** 2 / 2


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


# ---- 1. The figures re-worked by hand (these pass) -------------------------------------------------------------

@pytest.mark.parametrize("size, length, k, expected_percent, source", [
    ("DN80", 0.5, 0.5, 0.0035, "D orifice rated steam flow 236.6 kg/h; Darcy–Weisbach, Colebrook, B36.10M bore"),
    ("DN25", 3.0, 1.5, 1.6748, "the same, DN25, 3 m, ΣK 1.5"),
])
def test_flash_inlet_loss_reworked_from_the_steam_equation_and_the_d_orifice(size, length, k, expected_percent,
                                                                           source):
    """Rated flow = the D orifice's steam capacity by API 520 Part I's steam equation (SI form, A mm² = 190.5·W /
    (P1 kPa · Kd), Kd 0.975, saturated, Kn = 1), dry saturated steam at the relieving pressure (set + 10 %)."""
    set_pressure = g(5.0)
    p1 = set_pressure + 0.1 * (set_pressure - ATM)
    rated = API526["D"] * IN2 * (p1 / 1e3) * 0.975 / 190.5
    vapour = IAPWS97(P=p1 / 1e6, x=1.0)
    percent = 100 * _loss(rated, vapour, BORE[size], length, k) / (set_pressure - ATM)
    result = flash(FlashInputs(**FLASH, relief_inlet_size=size, relief_inlet_length=length,
                               relief_inlet_fittings_k=k), Site())
    assert result.value("vessel_relief_orifice") == "D"
    assert result.value("vessel_relief_inlet_loss_fraction") == pytest.approx(percent, rel=1e-4), source
    assert round(percent, 4) == pytest.approx(expected_percent, abs=1e-4), source


def test_heater_inlet_loss_reworked_from_the_liquid_equation_and_the_q_orifice():
    """The displaced liquid governs: the Q orifice's liquid capacity W = Kd·A·√(2ρ(P1 − p_atm)) (API 520 Part I
    liquid equation, Kd 0.65, Kw = Kc = 1, Kv = 1 at this Reynolds number), water at 85 °C and P1 from IF97."""
    set_pressure = g(5.0)
    p1 = set_pressure + 0.1 * (set_pressure - ATM)
    water = IAPWS97(P=p1 / 1e6, T=358.15)
    rated = 0.65 * API526["Q"] * IN2 / 1e6 * math.sqrt(2 * water.rho * (p1 - ATM)) * 3600
    percent = 100 * _loss(rated, water, BORE["DN150"], 0.3, 0.5) / (set_pressure - ATM)
    result = heater(HeaterInputs(**HEATER, relief_inlet_size="DN150", relief_inlet_length=0.3,
                                 relief_inlet_fittings_k=0.5), Site())
    assert result.value("tube_rupture_orifice") == "Q"
    assert result.value("tube_rupture_inlet_loss_fraction") == pytest.approx(percent, rel=1e-3)
    assert percent == pytest.approx(3.596, abs=1e-3)


# ---- 2. Junk through the command line ----------------------------------------------------------------------------

FLASH_CASE = """[case]
kind = "flash"
id = "FL-X"
title = "t"
revision = "A"
prepared_by = "t"

[inputs]
condensate_pressure = "10 bar(g)"
condensate_flow = "3.6 t/h"
flash_pressure = "1 bar(g)"

[inputs.overpressure]
{design}{pipe}
"""
HEATER_CASE = """[case]
kind = "exchanger"
id = "HX-X"
title = "t"
revision = "A"
prepared_by = "t"
{site}
[inputs]
steam_pressure = "8 bar(g)"
process_flow = "12 t/h"
process_inlet_temperature = "55 degC"
process_outlet_temperature = "85 degC"
process_pressure = "4 bar(g)"
overall_u = "1.8 kW/(m^2 K)"

[inputs.overpressure]
steam_side_design_pressure = "10 bar(g)"
process_side_design_pressure = "5 bar(g)"
tube_inside_diameter = "15.7 mm"
{pipe}
"""
DESIGN = 'design_pressure = "5 bar(g)"\n'


@pytest.mark.parametrize("design, pipe, field", [
    (DESIGN, 'inlet_size = "DN80"\ninlet_length = "0 m"', "overpressure.inlet_length"),
    (DESIGN, 'inlet_size = "DN80"\ninlet_length = "-1 m"', "overpressure.inlet_length"),
    (DESIGN, 'inlet_size = "DN80"\ninlet_length = "1e9 m"', "overpressure.inlet_length"),
    (DESIGN, 'inlet_size = "DN80"\ninlet_length = nan', "overpressure.inlet_length"),
    (DESIGN, 'inlet_size = "DN9999"\ninlet_length = "0.5 m"', "overpressure.inlet_size"),
    (DESIGN, 'inlet_size = "DN80"\ninlet_length = "0.5 m"\ninlet_fittings_k = "abc"', "overpressure.inlet_fittings_k"),
    (DESIGN, 'inlet_size = "DN80"\ninlet_length = "0.5 m"\ninlet_fittings_k = nan', "overpressure.inlet_fittings_k"),
    (DESIGN, 'inlet_fittings_k = 0.5', "overpressure.inlet_size"),
    ("", 'inlet_size = "DN80"\ninlet_length = "0.5 m"', "overpressure.design_pressure"),
], ids=["0 m", "-1 m", "1e9 m", "nan", "DN9999", "k abc", "k nan", "only k", "no design pressure"])
def test_junk_inlet_pipe_inputs_are_refused_by_name(tmp_path, capsys, design, pipe, field):
    assert_refused(tmp_path, capsys, FLASH_CASE.format(design=design, pipe=pipe), field)


@pytest.mark.parametrize("text", [
    FLASH_CASE.format(design=DESIGN, pipe='inlet_size = "DN80"\ninlet_length = "0.5 m"\ninlet_fittings_k = 1e308'),
    HEATER_CASE.format(site="", pipe='inlet_size = "DN150"\ninlet_length = "0.3 m"\ninlet_fittings_k = 1e308'),
], ids=["flash", "heater"])
def test_a_huge_fittings_k_is_refused_by_name_not_an_internal_fault(tmp_path, capsys, text):
    """Found in review of 8c88b65: 'unexpected error ArithmeticError: amount inf bar is not finite. This is a fault in
    steamcalc'. Expected: refused, naming overpressure.inlet_fittings_k with a plausible range and a fix."""
    code, _, err = run_case_text(tmp_path, capsys, text)
    assert "fault in steamcalc" not in err and "unexpected error" not in err, err
    assert code == 2 and "overpressure.inlet_fittings_k" in err, err


def test_a_fittings_k_of_zero_is_taken_and_a_negative_refused_with_a_fix_that_fits(tmp_path, capsys):
    """A sum of loss coefficients is 0 or more (a pipe with no fittings; the Inputs' checks and the "0 to 1000" range
    of every ``*fittings_k`` say so): a zero is taken, a negative refused by name, and the fix says what to do, not
    "write it without quotes or units"."""
    code, _, err = run_case_text(tmp_path, capsys, FLASH_CASE.format(
        design=DESIGN, pipe='inlet_size = "DN80"\ninlet_length = "0.5 m"\ninlet_fittings_k = 0'))
    assert code == 0 and "inlet_fittings_k" not in err, err
    (tmp_path / "negative").mkdir()
    code, _, err = run_case_text(tmp_path / "negative", capsys, FLASH_CASE.format(
        design=DESIGN, pipe='inlet_size = "DN80"\ninlet_length = "0.5 m"\ninlet_fittings_k = -0.5'))
    assert code == 2 and "overpressure.inlet_fittings_k" in err and "0 or more" in err, err
    assert "leave the key out" in err and "without quotes" not in err


# ---- 3. What a relief engineer would send back (found in review of 8c88b65, fixed since) ---------------

@pytest.mark.parametrize("make, name, source", [
    (lambda: heater(HeaterInputs(**HEATER, relief_inlet_size="DN80", relief_inlet_length=0.3,
                                 relief_inlet_fittings_k=0.5), Site()),
     "Tube rupture", "Q orifice: 6 in valve inlet (API 526, from memory); DN80 bore 4769 mm² < orifice 7129 mm²"),
    (lambda: flash(FlashInputs(**FLASH, relief_inlet_size="DN20", relief_inlet_length=0.5), Site()),
     "Vessel relief", "D orifice: 1 in smallest valve inlet (API 526, from memory); DN20 below it"),
], ids=["heater Q on DN80", "flash D on DN20"])
def test_an_inlet_pipe_smaller_than_the_valve_inlet_fails(make, name, source):
    """The inlet pipe is at least the valve's inlet size (API 520 Part II, inlet piping; from memory). The record
    passes or warns a DN80 pipe under a Q-orifice valve (6.9 % with ΣK 0: 'warn', 'may chatter')."""
    result = make()
    statuses = {c.name: c.status for c in result.checks
                if name in c.name and "inlet" in c.name.lower() and "fails open" not in c.name}
    assert "fail" in statuses.values(), (source, statuses)


def test_a_loss_far_beyond_the_blowdown_says_the_valve_will_chatter():
    """37.7 % of the set pressure (DN20, 30 m). API 520 Part II accepts more than 3 % only on an engineering analysis,
    and the blowdown is the maker's figure: the record warns and says that beyond the blowdown the valve will chatter
    (a failure is kept for a loss of the whole gauge set pressure); the DN20 pipe under a D-orifice valve fails on
    its size."""
    result = flash(FlashInputs(**FLASH, relief_inlet_size="DN20", relief_inlet_length=30.0,
                               relief_inlet_fittings_k=0.5), Site())
    assert result.value("vessel_relief_inlet_loss_fraction") == pytest.approx(37.7, abs=0.1)
    loss = _check(result, "Vessel relief: relief inlet pressure loss")
    assert loss.status == "warn" and "blowdown" in loss.detail.text("SI")
    assert _check(result, "Vessel relief: relief inlet pipe size").status == "fail"


def test_a_steam_loss_beyond_the_incompressible_range_says_so():
    """DN15, 10 m: Δp 2.84 bar difference on 6.51 bar(a), 44 % of the absolute pressure, worked incompressibly at
    the inlet density. steamcalc.equipment.line_loss limits that form to 10 % (COMPRESSIBLE_FRACTION, with a
    warning); the relief inlet gives none. Expected: a check or notice naming the compressible flow."""
    result = flash(FlashInputs(**FLASH, relief_inlet_size="DN15", relief_inlet_length=10.0,
                               relief_inlet_fittings_k=0.5), Site())
    texts = [c.detail.text("SI") if hasattr(c.detail, "text") else str(c.detail) for c in result.checks]
    assert any("compressib" in t for t in texts)


def test_the_rated_flow_is_in_the_record():
    """The loss step prints v but not the rated flow it comes from (W·A_orifice/A_required), nor ε or Re: a
    checker cannot trace v. Expected: a step or result for the rated flow, kg/h."""
    result = flash(FlashInputs(**FLASH, relief_inlet_size="DN80", relief_inlet_length=0.5), Site())
    rated = [s for s in result.steps if "rated" in s.label.lower() and str(s.unit) in ("kg/h", "kilogram / hour")]
    assert rated or any("rated_flow" in key for key in result.values)


def test_a_flash_vessel_without_a_relief_load_says_its_inlet_pipe_is_not_assessed():
    """Condensate that does not flash at the relieving pressure: the given inlet pipe vanishes from the record
    without a word (the heater's no-relief case says 'inlet pipe not assessed')."""
    result = flash(FlashInputs(condensate_pressure=g(3.0), condensate_flow=1.0, flash_pressure=g(1.0),
                               vessel_design_pressure=g(5.0), relief_inlet_size="DN80", relief_inlet_length=0.5),
                   Site())
    assert any("inlet" in c.name.lower() and "relief" in c.name.lower() and "fails open" not in c.name
               for c in result.checks)


# Known, older than the inlet pipe: the tube-rupture flow step's expression holds 3.14159265 and prints 3.14159. The
# page's arithmetic reproduces the value (8e-7), but the arithmetic checker refuses a constant printed otherwise.
# Writing the step with a pi operand would make every heater record of release 0.3.0 with a tube-rupture relief
# fail verify (its expression differs): left for the next release, with a basis change.
@pytest.mark.xfail(strict=True, reason="the tube-rupture flow step prints pi as 3.14159 (older than the inlet pipe)")
@pytest.mark.parametrize("units", ["SI", "US"])
def test_a_heater_record_with_its_inlet_pipe_verifies_and_its_steps_reproduce(tmp_path, capsys, units):
    """Found in review of 8c88b65, for a step older than the inlet pipe: 'Tube rupture: steam through two open tube ends'
    prints π as 3.14159 while the expression holds 3.14159265, so written_step_problems finds it in SI and US.
    The new test file checks the step arithmetic of a flash record only."""
    site = tmp_path / "site.toml"
    site.write_text(f'[site]\nname = "t"\ndisplay_units = "{units}"\n')
    text = HEATER_CASE.format(site='site = "site.toml"\n',
                              pipe='inlet_size = "NPS 6"\ninlet_length = "1 ft"\ninlet_fittings_k = 0.5')
    code, _, err = run_case_text(tmp_path, capsys, text)
    assert code in (0, 1), err
    path = tmp_path / "out" / "HX-X_revA.json"
    record = json.loads(path.read_text())
    assert "tube_rupture_inlet_loss_fraction" in record["results"]
    assert main(["verify", str(path)]) == 0
    assert written_step_problems(record) == []


@pytest.mark.parametrize("units", ["SI", "US"])
def test_a_heater_record_with_its_inlet_pipe_writes_the_new_steps_so_they_reproduce(tmp_path, capsys, units):
    """The inlet pipe's own steps (velocity, loss, share) reproduce their values as printed, in SI and US; the one
    step that does not is the older tube-rupture flow step (the xfail above)."""
    site = tmp_path / "site.toml"
    site.write_text(f'[site]\nname = "t"\ndisplay_units = "{units}"\n')
    text = HEATER_CASE.format(site='site = "site.toml"\n',
                              pipe='inlet_size = "NPS 6"\ninlet_length = "1 ft"\ninlet_fittings_k = 0.5')
    code, _, err = run_case_text(tmp_path, capsys, text)
    assert code in (0, 1), err
    path = tmp_path / "out" / "HX-X_revA.json"
    record = json.loads(path.read_text())
    assert "tube_rupture_inlet_rated_flow" in record["results"]
    assert main(["verify", str(path)]) == 0
    problems = written_step_problems(record)
    assert all("steam through two open tube ends" in p for p in problems), problems


@pytest.mark.parametrize("pipe", ['discharge_size = "DN50"\ndischarge_length = "6 m"\ndischarge_fittings_k = 1e308',
                                  'discharge_size = "DN50"\ndischarge_length = "6 m"\ndischarge_fittings_k = 5e3'],
                         ids=["1e308", "5000"])
def test_any_fittings_k_beyond_a_line_is_refused_by_name(tmp_path, capsys, pipe):
    """Found beside the inlet pipe: the discharge pipe's K of 1e308 ended in "unexpected error ValueError ... This is
    a fault in steamcalc". Every ``*fittings_k`` input is held to 0 to 1000 (common practice: a long main is some
    tens of velocity heads)."""
    code, _, err = run_case_text(tmp_path, capsys, FLASH_CASE.format(design=DESIGN, pipe=pipe))
    assert "fault in steamcalc" not in err and "unexpected error" not in err, err
    assert code == 2 and "overpressure.discharge_fittings_k" in err and "0 to 1000" in err, err
