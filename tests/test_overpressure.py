"""Overpressure of the flash vessel and the steam heater: relief loads by hand, the tube-rupture rule, the flow
through a ruptured tube, thermal expansion, and bad overpressure input refused by name with a fix."""

import math

import pytest
from CoolProp.CoolProp import PropsSI

from steamcalc.calcs.exchanger.calculation import Inputs as HeaterInputs
from steamcalc.calcs.exchanger.calculation import calculate as heater
from steamcalc.calcs.flash.calculation import Inputs as FlashInputs
from steamcalc.calcs.flash.calculation import calculate as flash
from steamcalc.cases.site import Site
from steamcalc.errors import InputError
from steamcalc.properties.steam import SteamState
from tests.case_helpers import assert_refused, run_case_text

ATM = 101325.0
BAR = 1e5


def g(bar_gauge):
    return ATM + bar_gauge * BAR


FLASH = dict(condensate_pressure=g(10.0), condensate_flow=1.0, flash_pressure=g(1.0))
HEATER = dict(steam_pressure=g(8.0), process_flow=12 / 3.6, process_inlet_temperature=328.15,
              process_outlet_temperature=358.15, process_pressure=g(4.0))


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


def test_flash_vessel_not_assessed_is_a_warning():
    """Source: the brief (an optional input not given is said, not silent): a statement among the warnings that
    cannot fail, so that records of earlier releases keep their verdict."""
    result = flash(FlashInputs(**FLASH), Site())
    said = _check(result, "Flash vessel overpressure protection")
    assert said.notice and "not assessed" in said.detail
    assert any(w.startswith("Flash vessel overpressure protection: not assessed") for w in result.warnings)
    heater_result = heater(HeaterInputs(**HEATER), Site())
    assert any(w.startswith("Heater overpressure protection: not assessed") for w in heater_result.warnings)
    assert "vessel_relief_required_area" not in result.values


def test_blocked_outlet_load_by_hand():
    """Source: the flash balance x = (h_in − h_f(P1))/h_fg(P1) at the relieving pressure, worked by hand on IF97
    (IAPWS R7-97) states: set 5 bar(g), relieving 5.5 bar(g)."""
    result = flash(FlashInputs(**FLASH, vessel_design_pressure=g(5.0)), Site())
    p_r = g(5.0) + 0.1 * 5.0 * BAR
    h_in = SteamState.from_p_dryness(g(10.0), 0.0).enthalpy
    h_f, h_g = (SteamState.from_p_dryness(p_r, x).enthalpy for x in (0.0, 1.0))
    assert result.value("vessel_relief_relieving_pressure") == pytest.approx(p_r / BAR, rel=1e-12)
    assert result.value("vessel_relief_blocked_outlet_load") == pytest.approx(3600 * (h_in - h_f) / (h_g - h_f),
                                                                              rel=1e-9)
    # No inlet capacity: that case is named as not assessed.
    assert _check(result, "Vessel relief, inlet fails open").status == "warn"


@pytest.mark.parametrize("level_held, governing, orifice", [
    (True, "inlet fails open, level held", "E"),
    (None, "inlet fails open, vessel filling (two-phase)", "K"),
])
def test_failed_open_inlet_governs(level_held, governing, orifice):
    """Source: API 520 Part I (steam: annex B and the steam equation; two-phase: annex C) and API 526 letters;
    8 t/h of condensate saturated at 10 bar(g) into a vessel relieving at 5.5 bar(g)."""
    result = flash(FlashInputs(**FLASH, vessel_design_pressure=g(5.0), inlet_capacity=8 / 3.6, level_held=level_held),
                   Site())
    assert result.value("vessel_relief_governing_case").startswith(governing)
    assert result.value("vessel_relief_orifice") == orifice


@pytest.mark.parametrize("basis, high, low, test, needed, source", [
    ("test pressure", 10.0, 10.0, None, "no", "API 521: LP test 1.3 × 10 = 13 bar(g) ≥ HP design 10"),
    ("test pressure", 10.0, 7.5, None, "yes", "API 521 with ASME VIII-1 UG-99(b): 1.3 × 7.5 = 9.75 < 10 bar(g)"),
    ("test pressure", 10.0, 7.5, 10.5, "no", "API 521: a stated test pressure 10.5 bar(g) ≥ 10 bar(g)"),
    ("10/13", 13.0, 10.0, None, "no", "API 521 10/13 rule: 10 bar(g) = 10/13 of 13 bar(g)"),
    ("10/13", 13.0, 9.9, None, "yes", "API 521 10/13 rule: 9.9 bar(g) < 10 bar(g)"),
])
def test_tube_rupture_rule(basis, high, low, test, needed, source):
    result = heater(HeaterInputs(**HEATER, steam_side_design_pressure=g(high), process_side_design_pressure=g(low),
                                 process_side_test_pressure=None if test is None else g(test), rupture_basis=basis),
                    Site())
    assert result.value("tube_rupture_relief_needed") == needed, source


def test_tube_rupture_flow_by_napier():
    """Source: Napier's formula for saturated steam in critical flow, W = p·A/70 (lb/s, psia, in²), the basis of
    API 520 Part I's steam equation, worked by hand for two tube bores of 15.7 mm at 9.0 bar(a), choked into the
    process side relieving at 3.3 bar(g); agreement 3 % (Napier's constant against the isentrope on IF97)."""
    result = heater(HeaterInputs(**{**HEATER, "process_pressure": g(2.0)}, steam_side_design_pressure=g(10.0),
                                 process_side_design_pressure=g(3.0), tube_inside_diameter=0.0157), Site())
    area_in2 = 2 * math.pi / 4 * 15.7 ** 2 / 645.16
    napier_lb_s = g(8.0) / 6894.757 * area_in2 / 70.0
    assert result.value("tube_rupture_flow") == pytest.approx(napier_lb_s * 0.45359237 * 3600, rel=0.03)
    assert result.value("tube_rupture_orifice") in ("P", "Q", "R", "T")   # the displaced liquid governs


def test_thermal_expansion_by_hand():
    """Source: API 521's hydraulic-expansion equation q = α_v·φ/(ρ·c_p) worked by hand for a light oil
    (α_v 0.0007 1/K, ρ 850 kg/m³, c_p 2.1 kJ/(kg K)) heated by the heater's duty."""
    result = heater(HeaterInputs(**{**HEATER, "process_pressure": None}, process_cp=2100.0, process_density=850.0,
                                 process_expansion_coefficient=0.0007, steam_side_design_pressure=g(10.0),
                                 process_side_design_pressure=g(10.0)), Site())
    phi = result.value("steam_side_heat") * 1e3
    assert result.value("thermal_relief_flow") == pytest.approx(0.0007 * phi / (850.0 * 2100.0) * 3.6e6, rel=1e-9)


def test_water_expansion_coefficient_against_coolprop():
    """Source: CoolProp's IAPWS-95 isobaric expansion coefficient of water at the blocked-in temperature, the
    saturation temperature of the 8 bar(g) steam, and the relieving pressure 11 bar(g) (an independent
    reference; α_v of water rises with temperature, so this is the largest from the 85 °C outlet up); the
    record's α_v from IF97 agrees within 0.5 %."""
    result = heater(HeaterInputs(**HEATER, steam_side_design_pressure=g(10.0), process_side_design_pressure=g(10.0)),
                    Site())
    step = next(s for s in result.steps if s.label.startswith("Thermal relief: cubic expansion"))
    t_steam = PropsSI("T", "P", g(8.0), "Q", 1, "Water")
    reference = PropsSI("ISOBARIC_EXPANSION_COEFFICIENT", "T", t_steam, "P", g(11.0), "Water")
    assert step.value / 1e6 == pytest.approx(reference, rel=0.005)


@pytest.mark.parametrize("make, field", [
    (lambda: FlashInputs(**FLASH, vessel_design_pressure=g(0.5)), "overpressure.design_pressure"),
    (lambda: FlashInputs(**FLASH, inlet_capacity=1.0), "overpressure.design_pressure"),
    (lambda: FlashInputs(**FLASH, vessel_design_pressure=g(5.0), relief_set_pressure=g(6.0)),
     "overpressure.set_pressure"),
    (lambda: HeaterInputs(**HEATER, steam_side_design_pressure=g(6.0), process_side_design_pressure=g(10.0)),
     "overpressure.steam_side_design_pressure"),
    (lambda: HeaterInputs(**HEATER, steam_side_design_pressure=g(10.0), process_side_design_pressure=g(3.0)),
     "overpressure.process_side_design_pressure"),
    (lambda: HeaterInputs(**HEATER, tube_inside_diameter=0.30, shell_inside_diameter=0.273),
     "overpressure.tube_inside_diameter"),
    (lambda: HeaterInputs(**{**HEATER, "process_pressure": None}, process_cp=2100.0, process_density=850.0,
                          steam_side_design_pressure=g(10.0), process_side_design_pressure=g(10.0)),
     "overpressure.expansion_coefficient"),
])
def test_bad_overpressure_input_refused_by_name(make, field):
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
{overpressure}
"""


def test_design_pressure_below_operating_refused_through_the_command_line(tmp_path, capsys):
    assert_refused(tmp_path, capsys, FLASH_CASE.format(overpressure='design_pressure = "0.5 bar(g)"'),
                   "overpressure.design_pressure")


def test_flash_case_with_overpressure_issues_and_names_the_caution(tmp_path, capsys):
    code, out, err = run_case_text(tmp_path, capsys, FLASH_CASE.format(
        overpressure='design_pressure = "5 bar(g)"\ninlet_capacity = "8 t/h"\nlevel_held = true\n'
                     'discharge_size = "DN50"\ndischarge_length = "6 m"\ndischarge_fittings_k = 1.5'))
    assert code == 0, err
    text = (tmp_path / "out" / "FL-T_revA.json").read_text()
    assert "vessel_relief_built_up_back_pressure" in text and "vessel_relief_reaction_force" in text
    assert "certified two-phase capacity" in text and "local pressure-equipment code" in text


@pytest.mark.parametrize("case_id, calculate, expected", [
    ("FL-01", flash, {"vessel_relief_orifice": "J", "vessel_relief_governing_case":
                      "inlet fails open, vessel filling (two-phase) (direct integration)"}),
    ("HX-01", heater, {"tube_rupture_relief_needed": "no"}),
])
def test_demo_cases_show_the_overpressure_sections(case_id, calculate, expected):
    """Source: the demo cases' [inputs.overpressure] (demo figures); the sections appear with their caution."""
    from steamcalc.cases.site import case_inputs, case_site, load_case

    case = load_case(f"workbooks/demo_site/cases/{case_id}.toml")
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    result = calculate(inputs, site)
    for key, value in expected.items():
        assert result.value(key) == value
    assert any("certified two-phase capacity" in c for c in result.cautions)


@pytest.mark.parametrize("text, per_kelvin, source", [
    ("700 ppm/K", 7.0e-4, "1 ppm = 1e-6 (SI Brochure, 9th ed.)"),
    ("389 ppm/°F", 389e-6 * 1.8, "1 °F difference = 5/9 K (NIST SP 811, B.9)"),
    ("0.07 %/K", 7.0e-4, "1 % = 1e-2"),
])
def test_expansion_coefficient_is_a_quantity_with_its_unit(text, per_kelvin, source):
    """The process liquid's expansion coefficient is typed with its unit, like every other quantity."""
    from steamcalc.calcs.base import input_fields
    from steamcalc.units.quantities import parse_quantity

    kind = next(f.metadata["kind"] for f in input_fields(HeaterInputs) if f.name == "process_expansion_coefficient")
    assert kind == "expansion_coefficient"
    assert parse_quantity(text, "overpressure.expansion_coefficient", kind) == pytest.approx(per_kelvin, rel=1e-12)


def test_expansion_coefficient_without_a_unit_is_refused_with_the_fix():
    from steamcalc.errors import UnitError
    from steamcalc.units.quantities import parse_quantity

    with pytest.raises(UnitError) as caught:
        parse_quantity("0.0007", "overpressure.expansion_coefficient", "expansion_coefficient")
    assert caught.value.field == "overpressure.expansion_coefficient" and "ppm/K" in caught.value.fix


def test_a_heater_record_with_its_liquids_expansion_coefficient_issues_and_verifies(tmp_path):
    """Run from a case file with a liquid other than water: the coefficient is kept in ppm/K, shown in ppm/°F on
    a US view (1 K = 1.8 °F difference, NIST SP 811), and the record verifies."""
    import json
    import shutil
    from pathlib import Path

    from steamcalc.cli import main
    from steamcalc.render.report import render_markdown

    demo = Path(__file__).resolve().parents[1] / "workbooks" / "demo_site"
    shutil.copy(demo / "site.toml", tmp_path / "site.toml")
    (tmp_path / "cases").mkdir()
    text = (demo / "cases" / "HX-01.toml").read_text(encoding="utf-8")
    text = text.replace('id = "HX-01"', 'id = "HX-09"').replace(
        'process_fluid = "water"', 'process_cp = "2.1 kJ/(kg·K)"\nprocess_density = "850 kg/m³"')
    text = text.replace("[inputs.overpressure]\n", '[inputs.overpressure]\nexpansion_coefficient = "900 ppm/K"\n')
    (tmp_path / "cases" / "HX-09.toml").write_text(text, encoding="utf-8")
    assert main(["run", str(tmp_path / "cases" / "HX-09.toml")]) in (0, 1)
    path = next((tmp_path / "records").glob("HX-09_rev*.json"))
    record = json.loads(path.read_text(encoding="utf-8"))
    assert record["inputs"]["process_expansion_coefficient"]["value"] == pytest.approx(900.0)
    assert record["inputs"]["process_expansion_coefficient"]["unit"] == "ppm/K"
    assert main(["verify", str(path)]) == 0
    record["site"]["display_units"] = "US"
    assert "| 500 | ppm/°F |" in render_markdown(record)
