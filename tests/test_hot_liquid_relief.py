"""A water hotter than its boiling point at a tube-rupture relief valve's outlet flashes in the nozzle: release 0.3.1
sizes it by API 520 Part I annex C instead of the liquid equation, which undersized the valve; records of 0.3.0 that
the change touches keep verifying, the change listed with its release, and nothing else passes for it.

Sources: API 520 Part I annex C, subcooled liquid in the high-subcooling region, G = √(2ρ(P1 − p_sat)) (a flux worked
here by hand with iapws, not steamcalc's functions); Kd 0.65 for preliminary sizing. The records of release 0.3.0 in
tests/archive/v0_3_hot_liquid were issued by that release's code (commit fbeb782, its version in the provenance)
from the case files beside them.
"""

import json
import math
import shutil
from pathlib import Path

import pytest
from iapws import IAPWS97

from steamcalc.calcs.exchanger.calculation import Inputs, calculate
from steamcalc.cases.site import Site
from steamcalc.cli import main
from steamcalc.review.verify import verify_file

from .case_helpers import forged_copy

ATM = 101325.0
BAR = 1e5
KD = 0.65                        # API 520 Part I, liquid and subcooled flashing liquid, preliminary sizing
ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_3_hot_liquid"
CHANGE = "changed by release 0.3.1"


def g(bar_gauge):
    return ATM + bar_gauge * BAR


#: Steam side 16 bar(g) over a process side designed for 8 bar(g) (1.3 × 8 < 16: a relief case for the process
#: side, API 521 with ASME VIII-1 UG-99(b)); pressurised water leaving at 150 °C.
FORWARD = dict(steam_pressure=g(12.0), process_flow=12 / 3.6, process_inlet_temperature=393.15,
               process_outlet_temperature=423.15, process_pressure=g(6.0), steam_side_design_pressure=g(16.0),
               process_side_design_pressure=g(8.0), tube_inside_diameter=0.0157)


def test_the_forward_valves_hot_displaced_liquid_is_sized_as_flashing():
    """The displaced water at 150 °C relieved from 9.8 bar(g) boils at the atmosphere (p_sat 4.76 bar(a)): its flux
    chokes near its saturation pressure. Annex C's high-subcooling flux is the least a flashing-liquid sizing may
    give; the liquid equation over P1 − p_atm gave 4,646 mm² (release 0.3.0)."""
    result = calculate(Inputs(**FORWARD), Site())
    p1 = g(8.0) + 0.1 * 8.0 * BAR
    liquid = IAPWS97(P=p1 / 1e6, T=423.15)
    p_sat = IAPWS97(T=423.15, x=0).P * 1e6
    assert p_sat > ATM
    displaced = result.value("tube_rupture_flow") / IAPWS97(P=p1 / 1e6, h=_supply_enthalpy(result) / 1e3).rho \
        * liquid.rho
    high_subcooling = displaced / 3600 / (KD * math.sqrt(2 * liquid.rho * (p1 - p_sat))) * 1e6
    area = result.value("tube_rupture_required_area")
    assert area >= high_subcooling * (1 - 1e-3)
    assert area > 4645.5462 * 1.2   # the 0.3.0 record's liquid-equation area (tests/archive/v0_3_hot_liquid)
    assert any("flashes in the nozzle" in a for a in result.assumptions)


def _supply_enthalpy(result):
    # The steam reaches the break from the supply at 12 bar(g), saturated (the case gives no superheat).
    return IAPWS97(P=g(12.0) / 1e6, x=1).h * 1e3


def test_a_cold_displaced_liquid_is_sized_by_the_liquid_equation_as_before():
    cold = dict(FORWARD, process_inlet_temperature=328.15, process_outlet_temperature=358.15)
    result = calculate(Inputs(**cold), Site())
    labels = [s.label for s in result.steps]
    assert not any("flashing in the valve" in label for label in labels)
    assert "Tube rupture: required area, displaced liquid" in labels


@pytest.mark.parametrize("name", ["HX-FH_revA.json", "HX-RH_revA.json"])
def test_a_0_3_0_record_the_change_touches_verifies_and_names_it(tmp_path, capsys, name):
    for companion in ARCHIVE.glob(f"{Path(name).stem}.*"):
        shutil.copy(companion, tmp_path / companion.name)
    assert json.loads((tmp_path / name).read_text("utf-8"))["provenance"]["steamcalc"] == "0.3.0"
    assert main(["verify", str(tmp_path / name)]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said and CHANGE in said and "flashes in the nozzle" in said


def test_a_0_3_0_record_the_change_touches_is_still_held_to_everything_else(tmp_path):
    """The allowance covers the tube-rupture valve only: the duty edited (digests recomputed) is a difference."""
    def edit(record):
        record["results"]["duty"]["value"] *= 1.01
    forged = forged_copy(ARCHIVE / "HX-FH_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok and any(c.key == "duty" and c.verdict == "differs" for c in outcome.comparisons)


def test_a_0_3_0_record_the_change_does_not_touch_gets_no_allowance(tmp_path, capsys):
    """A cold liquid takes the same path in both releases: an edited relief area in a record claiming 0.3.0 is a
    difference, not a change of basis."""
    case = tmp_path / "HX-FC.toml"
    case.write_text((ARCHIVE / "HX-FH.toml").read_text("utf-8").replace('id = "HX-FH"', 'id = "HX-FC"')
                    .replace('"120 degC"', '"55 degC"').replace('"150 degC"', '"85 degC"'))
    assert main(["run", str(case), "--out", str(tmp_path / "out")]) in (0, 1)
    capsys.readouterr()

    def edit(record):
        record["provenance"]["steamcalc"] = "0.3.0"
        record["results"]["tube_rupture_required_area"]["value"] *= 0.8
    forged = forged_copy(tmp_path / "out" / "HX-FC_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok
    assert any(c.key == "tube_rupture_required_area" and c.verdict == "differs" for c in outcome.comparisons)
    assert not any(CHANGE in note for note in outcome.notes)


@pytest.mark.parametrize("key", ["tube_rupture_flow", "tube_rupture_relieving_pressure"])
def test_the_0_3_1_allowance_does_not_cover_the_break_flow_or_the_relieving_pressure(tmp_path, key):
    """Found by an independent checker of release 0.3.2: the allowance of 0.3.1's change named every "Tube rupture*"
    and "tube_rupture_*" figure, so a 0.3.0 record it touched verified with the break's flow or the relieving pressure
    halved (digests recomputed). The change sizes the valve (at the atmosphere and at its back pressure) and its lines
    anew; the flow through the break and the relieving pressure come before it. Expected: a difference."""
    def edit(record):
        record["results"][key]["value"] *= 0.5
    forged = forged_copy(ARCHIVE / "HX-FH_revA.json", edit, tmp_path)
    _, _, outcome, _ = verify_file(forged)
    assert not outcome.ok and any(c.key == key and c.verdict == "differs" for c in outcome.comparisons)
