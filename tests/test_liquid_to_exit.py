"""A hot liquid carried to the discharge pipe's exit, flashing there (release 0.3.2).

A tube-rupture or thermal relief valve passing water a little above its boiling point at the atmosphere called a
generous discharge pipe "far too small" and failed the record: the omega equation's choking pressure G·√(ω·p0·v0),
taken from the liquid's saturation pressure p0, lay above p0, where the pipe still carries liquid, which does not
choke. Release 0.3.2 carries the liquid the whole length and lets it flash at the exit, choked there at its
saturation pressure: p1 = p0 + (f·L/D + ΣK)·G²·v0/2. Records of 0.3.1 that the change touches keep verifying, the
change listed with its release; nothing else passes for it.

Sources: API 520 Part I annex C, subcooled liquid (the flow chokes at the saturation pressure when the subcooling is
high); Darcy-Weisbach with Colebrook's friction factor, worked here by hand with iapws (IF97) and fluids, not with
steamcalc's functions. The record in tests/archive/v0_3_1_bases was issued by release 0.3.1's code (commit
5d3eda1, its version in the provenance) from the case file beside it.
"""

import json
import math
import shutil
from pathlib import Path

import pytest
from fluids.friction import Colebrook
from iapws import IAPWS97

from steamcalc.calcs.exchanger.calculation import Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.cli import main
from steamcalc.equipment.two_phase_line import two_phase_back_pressure
from steamcalc.errors import OutOfRangeError
from steamcalc.review.verify import verify_file

from .case_helpers import forged_copy

ATM = 101325.0
BAR = 1e5
ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_3_1_bases"
CHANGE = "changed by release 0.3.2"
STEP = "Tube rupture, displaced liquid: built-up back pressure (liquid to the pipe's exit, flashing there)"


def g(bar_gauge):
    return ATM + bar_gauge * BAR


#: The archived case: steam side 16 bar(g) over a process side designed for 8 bar(g); water displaced at the process
#: outlet temperature through a Q orifice's rated flow into DN300 × 20 m (K 2) to the atmosphere.
HEATER = dict(steam_pressure=g(12.0), process_flow=12 / 3.6, process_inlet_temperature=353.15, process_pressure=g(6.0),
              steam_side_design_pressure=g(16.0), process_side_design_pressure=g(8.0), tube_inside_diameter=0.0157,
              discharge_size="DN300", discharge_length=20.0, discharge_fittings_k=2.0)


def _back_pressure(outlet_celsius):
    result = calculate(Inputs(**HEATER, process_outlet_temperature=273.15 + outlet_celsius), Site())
    return result, result.value("tube_rupture_liquid_built_up_back_pressure")


def test_the_line_of_water_at_101_degc_is_liquid_to_its_exit_and_matches_a_hand_calculation():
    result, back = _back_pressure(101.0)
    assert not any(c.status == "fail" for c in result.checks if c.name.startswith("Tube rupture"))
    assert STEP in [s.label for s in result.steps]
    # By hand: the mass flux of the Q orifice's rated flow as the step states it, through DN300 schedule 40 (bore
    # 303.2 mm, ASME B36.10M, from memory); liquid at the relieving pressure and 101 °C; Colebrook at the liquid-only
    # Reynolds number of saturated liquid at the atmosphere (the record's basis); flashing where the liquid's
    # enthalpy, which the pipe keeps, is the saturated liquid's (found by bisection on IF97).
    step = next(s for s in result.steps if s.label == STEP)
    operands = dict(step.operands)
    bore = 0.3032
    assert operands["D"].value == pytest.approx(bore * 1e3, abs=0.05)
    flux = operands["G"].value
    p1 = g(8.0) + 0.1 * 8.0 * BAR
    liquid = IAPWS97(P=p1 / 1e6, T=374.15)
    viscosity = IAPWS97(P=ATM / 1e6, x=0).mu
    friction = Colebrook(flux * bore / viscosity, 4.5e-5 / bore)
    low, high = 0.5e5, 5e5
    for _ in range(60):
        mid = 0.5 * (low + high)
        low, high = (mid, high) if IAPWS97(P=mid / 1e6, x=0).h < liquid.h else (low, mid)
    assert low / BAR == pytest.approx(1.0567, abs=1e-4)   # above p_s(101 °C), 1.0509 bar(a)
    by_hand = low + (friction * 20.0 / bore + 2.0) * flux ** 2 / liquid.rho / 2
    assert back == pytest.approx(by_hand / BAR, rel=2e-4)


def test_the_back_pressure_rises_without_a_jump_as_the_water_passes_its_boiling_point():
    """Below about 99.84 °C the liquid leaves the pipe as liquid at the atmosphere; above, its enthalpy (a compressed
    liquid's, a little above the saturated liquid's at its temperature) is above the saturated liquid's at the
    atmosphere and it flashes at the exit. Across the switch the back pressure moves by the difference of the two
    lines' friction (below 0.002 bar here); from there it rises with the temperature."""
    temperatures = [99.0, 99.8, 99.85, 99.9, 100.0, 100.5, 101.0, 103.0]
    pressures = [_back_pressure(t)[1] for t in temperatures]
    steps = [b - a for a, b in zip(pressures, pressures[1:])]
    assert max(abs(s) for s in steps[:2]) < 2e-3   # 99.0 → 99.8 → 99.85 °C, across the switch
    assert all(s > 0 for s in steps[2:])           # flashing at the exit: its flash point rises with the temperature
    assert max(steps) < 0.1                        # 101 → 103 °C, the largest interval


def test_the_omega_line_and_the_liquid_line_meet_where_the_critical_pressure_reaches_p0():
    """Just below the switch the omega integral from a choked exit at about p0 gives the same outlet pressure as the
    liquid carried to the exit (continuity of the two branches)."""
    args = dict(inner_diameter=0.1, length=30.0, fittings_k=1.5, atmospheric_pressure=ATM, omega=40.0,
                reference_pressure=1.3e5, reference_volume=0.00105, liquid_viscosity=2.8e-4, liquid_up_to=9.0e5)
    critical_flux = 1.3e5 / math.sqrt(40.0 * 1.3e5 * 0.00105)
    area = math.pi * 0.1 ** 2 / 4
    below = two_phase_back_pressure(critical_flux * area * (1 - 1e-7), **args)
    above = two_phase_back_pressure(critical_flux * area * (1 + 1e-7), **args)
    assert not below.liquid_to_exit and above.liquid_to_exit
    assert above.outlet_pressure == pytest.approx(below.outlet_pressure, rel=1e-5)


def test_a_mixture_two_phase_from_the_valve_is_still_refused_when_the_pipe_chokes_above_its_pressure():
    with pytest.raises(OutOfRangeError, match="far too small"):
        two_phase_back_pressure(50.0, 0.05, 10.0, 1.0, ATM, 5.0, 3.0e5, 0.02, 2.8e-4)


def test_a_0_3_1_record_the_change_touches_verifies_and_names_it(tmp_path, capsys):
    for companion in ARCHIVE.glob("HX-FX_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    record = json.loads((tmp_path / "HX-FX_revA.json").read_text("utf-8"))
    assert record["provenance"]["steamcalc"] == "0.3.1" and record["status"] == "fail"
    assert main(["verify", str(tmp_path / "HX-FX_revA.json")]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said and CHANGE in said and "flashes at its exit" in said


def test_a_0_3_1_record_the_change_touches_is_still_held_to_everything_else(tmp_path):
    def edit(record):
        record["results"]["duty"]["value"] *= 1.01
    forged = forged_copy(ARCHIVE / "HX-FX_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok and any(c.key == "duty" and c.verdict == "differs" for c in outcome.comparisons)


def test_a_0_3_1_record_the_change_does_not_touch_gets_no_allowance(tmp_path, capsys):
    """Water at 95 °C leaves the pipe as liquid at the atmosphere in both releases: an edited back pressure in a
    record claiming 0.3.1 is a difference, not a change of basis."""
    case = tmp_path / "HX-FY.toml"
    case.write_text((ARCHIVE / "HX-FX.toml").read_text("utf-8").replace('id = "HX-FX"', 'id = "HX-FY"')
                    .replace('"101 degC"', '"95 degC"'))
    assert main(["run", str(case), "--out", str(tmp_path / "out")]) in (0, 1)
    capsys.readouterr()

    def edit(record):
        record["provenance"]["steamcalc"] = "0.3.1"
        record["results"]["tube_rupture_liquid_built_up_back_pressure"]["value"] *= 0.9
    forged = forged_copy(tmp_path / "out" / "HX-FY_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok
    assert any(c.key == "tube_rupture_liquid_built_up_back_pressure" and c.verdict == "differs"
               for c in outcome.comparisons)
    assert not any(CHANGE in note for note in outcome.notes)


@pytest.mark.parametrize("key", ["tube_rupture_flow", "tube_rupture_relieving_pressure", "thermal_relief_vapour_load",
                                 "thermal_relief_required_area"])
def test_the_change_does_not_excuse_what_comes_before_the_line_or_another_valve(tmp_path, key):
    """Found by a checker: in a record of 0.3.1 the change touches, the allowance named every 'tube_rupture_*' and
    'thermal_relief_*' figure, so the steam through the break, the relieving pressure, or the thermal relief's (whose
    line the change does not touch: its water boils) could be edited by half and the record still VERIFIED. The
    change explains only what the discharge line and the sizing at its back pressure write."""
    def edit(record):
        record["results"][key]["value"] *= 0.5
    forged = forged_copy(ARCHIVE / "HX-FX_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok and any(c.key == key and c.verdict == "differs" for c in outcome.comparisons)


def test_a_flash_vessels_relief_load_is_not_excused_by_the_change(tmp_path):
    """A flash vessel filling with 105 °C condensate relieves liquid that reaches the pipe's exit (DN50 × 5 m): a
    record claiming 0.3.1 with its relief load halved is a difference, not the change of basis."""
    from steamcalc.calcs.flash.calculation import Inputs as FlashInputs
    from steamcalc.calcs.flash.calculation import calculate as flash

    inputs = FlashInputs(condensate_pressure=g(12.0), condensate_flow=3.2 / 3.6, condensate_temperature=378.15,
                         flash_pressure=g(0.5), vessel_design_pressure=g(7.0), inlet_capacity=9 / 3.6,
                         level_held=False, discharge_size="DN50", discharge_length=5.0, discharge_fittings_k=1.0)
    assert any(s.label == "Vessel relief: built-up back pressure (liquid to the pipe's exit, flashing there)"
               for s in flash(inputs, Site()).steps)
    case = tmp_path / "FL-FX.toml"
    case.write_text('[case]\nkind = "flash"\nid = "FL-FX"\ntitle = "t"\nrevision = "A"\nprepared_by = "t"\n\n'
                    '[inputs]\ncondensate_pressure = "12 bar(g)"\ncondensate_flow = "3.2 t/h"\n'
                    'condensate_temperature = "105 degC"\nflash_pressure = "0.5 bar(g)"\n\n[inputs.overpressure]\n'
                    'design_pressure = "7 bar(g)"\ninlet_capacity = "9 t/h"\nlevel_held = false\n'
                    'discharge_size = "DN50"\ndischarge_length = "5 m"\ndischarge_fittings_k = 1.0\n', "utf-8")
    assert main(["run", str(case), "--out", str(tmp_path / "out")]) in (0, 1)

    def edit(record):
        record["provenance"]["steamcalc"] = "0.3.1"
        record["results"]["vessel_relief_failed_open_load"]["value"] *= 0.5
    forged = forged_copy(tmp_path / "out" / "FL-FX_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok
    assert any(c.key == "vessel_relief_failed_open_load" and c.verdict == "differs" for c in outcome.comparisons)


@pytest.mark.parametrize("residual, verified", [("1.1e-15", True), ("2.0e-04", False)])
def test_a_touched_records_other_checks_are_compared_within_the_tolerance(tmp_path, residual, verified):
    """Found by a checker: a 0.3.1 flash record the change touches (105 °C condensate, DN50 × 5 m) failed to verify on
    its energy balance, recorded 'residual 1.9e-15' and recomputed '2.1e-15': the change adds checks, and with their
    count changed the others were compared word for word. A residual at round-off is no difference; one of 2e-4 is."""
    def edit(record):
        for check in record["checks"]:
            if check["name"] == "Heater energy balance (independent)":
                check["detail"] = check["detail"].replace("residual 7.9e-16", f"residual {residual}")
    forged = forged_copy(ARCHIVE / "HX-FX_revA.json", edit, tmp_path)
    assert any(f"residual {residual}" in c["detail"] for c in json.loads(forged.read_text("utf-8"))["checks"])
    _, _, outcome, _ = verify_file(forged)
    assert outcome.ok is verified


def test_a_record_the_earlier_release_did_not_fail_gets_no_allowance_when_its_inputs_are_changed(tmp_path, capsys):
    """Found by an independent checker: a record the change does not touch (water at 140 °C, DN300 × 40 m, a mixture
    in the pipe), relabelled 0.3.1 with its discharge pipe changed to DN150 (digests recomputed), recomputed on the
    new path and verified, the figures of the DN300 pipe shown as changed by release 0.3.2. Expected: the allowance
    asks for what 0.3.1 wrote on that path, the line's failure ("far too small"); without it, a difference."""
    case = tmp_path / "HX-FO.toml"
    case.write_text((ARCHIVE / "HX-FX.toml").read_text("utf-8").replace('id = "HX-FX"', 'id = "HX-FO"')
                    .replace('"101 degC"', '"140 degC"').replace('discharge_length = "20 m"', 'discharge_length = "40 m"'))
    assert main(["run", str(case), "--out", str(tmp_path / "out")]) in (0, 1)
    capsys.readouterr()

    def edit(record):
        record["provenance"]["steamcalc"] = "0.3.1"
        record["inputs"]["discharge_size"].update(value="DN150", given="DN150")
    forged = forged_copy(tmp_path / "out" / "HX-FO_revA.json", edit, tmp_path)
    # The pipe as issued has a mixture in it; DN150 carries the liquid to its exit (the changed path).
    for size, on_path in (("DN300", False), ("DN150", True)):
        result = calculate(Inputs(**dict(HEATER, discharge_size=size, discharge_length=40.0),
                                  process_outlet_temperature=413.15), Site())
        assert (STEP in [s.label for s in result.steps]) is on_path
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok
    assert not any("hot liquid whose flux" in note for note in outcome.notes)


def test_a_0_3_1_record_of_a_liquid_flashing_in_its_pipe_verifies_with_the_flash_point_change_listed(tmp_path, capsys):
    """Water at 140 °C (DN300 × 40 m): release 0.3.1 took its flash point at its saturation pressure, 3.615 bar(a);
    0.3.2 where its enthalpy, which the pipe keeps, is the saturated liquid's (higher). The record of 0.3.1, issued by
    that release's code (tests/archive/v0_3_1_bases/HX-FO), verifies with the change named."""
    for companion in ARCHIVE.glob("HX-FO_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    record = json.loads((tmp_path / "HX-FO_revA.json").read_text("utf-8"))
    assert record["provenance"]["steamcalc"] == "0.3.1"
    assert main(["verify", str(tmp_path / "HX-FO_revA.json")]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said and CHANGE in said and "keeps its enthalpy and flashes where" in said
    step = next(s for s in calculate(Inputs(**dict(HEATER, discharge_length=40.0), process_outlet_temperature=413.15),
                                     Site()).steps if "pressure where the liquid flashes" in s.label)
    assert step.value > IAPWS97(T=413.15, x=0).P * 10   # bar(a): above the saturation pressure at 140 °C
