"""The let-down station's relief valve: API 520 Part I areas by two methods, API 526 orifices,
back pressure, inlet loss, reaction force, and bad relief input through the command line."""

import math

import pytest
from fluids.safety_valve import API520_A_steam, API520_B, API526_A_sq_inch, API526_letters

from steamcalc.calcs.letdown.calculation import Inputs, calculate
from steamcalc.equipment.relief import (
    API526_AREAS_IN2, MM2_PER_IN2, api526_orifice, back_pressure_correction, direct_integration_area,
    direct_integration_flux, reaction_force, steam_equation_area,
)
from steamcalc.cases.site import Site, case_inputs, case_site, load_case
from steamcalc.properties.steam import SteamState, saturation_temperature
from tests.case_helpers import assert_refused, run_case_text

DEMO_CASES = "workbooks/demo_site/cases"

# API 526 (7th ed., 2017), effective orifice areas in in²; digits from memory of the published
# table, and compared below with the fluids package's copy of the same table.
API526_TABLE = [
    ("D", 0.110), ("E", 0.196), ("F", 0.307), ("G", 0.503), ("H", 0.785), ("J", 1.287), ("K", 1.838),
    ("L", 2.853), ("M", 3.60), ("N", 4.34), ("P", 6.38), ("Q", 11.05), ("R", 16.0), ("T", 26.0),
]


@pytest.mark.parametrize("letter, area_in2", API526_TABLE, ids=[row[0] for row in API526_TABLE])
def test_api526_orifice_table(letter, area_in2):
    """Source: API 526 effective orifice areas (from memory) and fluids.safety_valve.API526_A_sq_inch."""
    assert dict(API526_AREAS_IN2)[letter] == area_in2
    assert API526_A_sq_inch[API526_letters.index(letter)] == pytest.approx(area_in2, rel=1e-12)
    # Exactly the letter's area selects that letter; a hair more selects the next one.
    assert api526_orifice(area_in2 * MM2_PER_IN2) == (letter, pytest.approx(area_in2 * MM2_PER_IN2))
    following = API526_TABLE.index((letter, area_in2)) + 1
    bigger = api526_orifice(area_in2 * MM2_PER_IN2 * 1.0001)
    assert (bigger is None) if following == len(API526_TABLE) else bigger[0] == API526_TABLE[following][0]


def test_steam_equation_against_fluids_api520_example():
    """Source: API 520 Part I, 10th ed., steam example (69 615 kg/h at 12 236 kPa(a), 707.04 K),
    as computed by fluids.safety_valve.API520_A_steam (which reproduces the standard's example)."""
    area, kn, ksh = steam_equation_area(69615.0, 12236e3, 707.0389, 0.975)
    reference = API520_A_steam(69615 / 3600.0, 707.0389, 12236e3, Kd=0.975, edition="10E") * 1e6
    assert area == pytest.approx(reference, rel=1e-9)
    assert round(area) == 1285
    # K_N by hand: (0.02764·12236 − 1000)/(0.03324·12236 − 1061).
    assert kn == pytest.approx((0.02764 * 12236 - 1000) / (0.03324 * 12236 - 1061), rel=1e-12)


@pytest.mark.parametrize("case, pressure, temperature", [
    ("saturated", 11e5, None),
    ("superheated", 11e5, 523.15),
    ("superheated, higher pressure", 41e5, 623.15),
])
def test_direct_integration_against_steam_equation(case, pressure, temperature):
    """Source: API 520 Part I (10th ed.) 5.7 and annex B: the steam equation (Napier's empirical
    fit with the K_SH table) and the HEM direct integration agree to a few per cent for dry and
    superheated steam; the standard does not require them to agree exactly."""
    state = (SteamState.from_p_dryness(pressure, 1.0) if temperature is None
             else SteamState.from_pT(pressure, temperature))
    flow = 10000.0
    di = direct_integration_area(flow, direct_integration_flux(state, 1.01325e5), 0.975)
    se, _, _ = steam_equation_area(flow, pressure, state.temperature, 0.975)
    assert abs(se / di - 1.0) < 0.05, (case, se, di)


def test_direct_integration_against_ideal_gas_nozzle():
    """Source: ideal-gas critical flow, G* = √(kpρ (2/(k+1))^((k+1)/(k−1))) (API 520 Part I eq. 9
    basis); far from saturation, steam is nearly ideal and the isentrope's κ nearly constant."""
    state = SteamState.from_pT(10e5, 673.15)
    k = state.isentropic_exponent
    ideal = math.sqrt(k * state.pressure * state.density * (2 / (k + 1)) ** ((k + 1) / (k - 1)))
    flow = direct_integration_flux(state, 1e5)
    assert flow.choked
    assert flow.mass_flux == pytest.approx(ideal, rel=0.01)
    # The throat pressure ratio is near the ideal-gas critical ratio (2/(k+1))^(k/(k−1)).
    assert flow.throat_pressure / state.pressure == pytest.approx((2 / (k + 1)) ** (k / (k - 1)), rel=0.02)


@pytest.mark.parametrize("state", [SteamState.from_pT(10e5, 473.15), SteamState.from_p_dryness(11e5, 0.95),
                                   SteamState.from_pT(150e5, 773.15)], ids=["superheated", "wet", "high pressure"])
def test_parabolic_throat_search_agrees_with_golden_section(state):
    """Consistency: the quick search near the critical ratio finds the same largest flux as a
    40-step golden-section search over the whole range."""
    from steamcalc.equipment.relief import _golden_max, _parabolic_max, isentrope_point

    p0, h0, s0 = state.pressure, state.enthalpy, state.entropy

    def flux(p):
        rho, h, x = isentrope_point(p, s0, state.temperature * (p / p0) ** 0.23)
        return rho * math.sqrt(2 * (h0 - h)), x

    quick = _parabolic_max(flux, p0, 1e5, 0.999 * p0)
    thorough = _golden_max(flux, 1e5, 0.999 * p0, 40)
    assert flux(quick)[0] == pytest.approx(flux(thorough)[0], rel=1e-8)


def test_direct_integration_subcritical_back_pressure():
    """Consistency: with the back pressure above the critical pressure the flow is not choked and
    the flux is the isentropic flux at the back pressure (less than the choked flux)."""
    state = SteamState.from_pT(10e5, 523.15)
    choked = direct_integration_flux(state, 1e5)
    subcritical = direct_integration_flux(state, 8e5)
    assert choked.choked and not subcritical.choked
    assert subcritical.mass_flux < choked.mass_flux
    assert subcritical.throat_pressure == pytest.approx(8e5)


def test_reaction_force_by_hand():
    """Source: API 520 Part II (7th ed.) equation (1), SI form, worked by hand:
    W = 10 000 kg/h = 2.7778 kg/s, k = 1.3, T = 473.15 K, M = 18.015:
    129.41 × 2.7778 × √(1.3 × 473.15 / (2.3 × 18.015)) = 1385.0 N;
    exit static pressure W/A·√(R·T_e/(kM)), T_e = 2T/(k+1) = 411.43 K, A = 8213 mm²:
    338.2 kg/(m² s) × 382.2 m/s = 129.26 kPa(a) → 27.94 kPa(g); 10⁻³ × 8213 × 27.94 = 229.4 N."""
    force, p_exit = reaction_force(10000.0, 473.15, 1.3, 8213.0, 101325.0)
    assert p_exit / 1e3 == pytest.approx(27.94, abs=0.01)
    assert force == pytest.approx(1385.0 + 229.4, abs=0.2)
    # A large discharge exits at atmospheric pressure: the momentum term alone.
    force_large, p_large = reaction_force(10000.0, 473.15, 1.3, 1e5, 101325.0)
    assert p_large == 0.0 and force_large == pytest.approx(1385.0, abs=0.1)


def test_balanced_bellows_kb_against_fluids():
    """Source: API 520 Part I figure 31 as tabulated in fluids.safety_valve.API520_B."""
    kb, note = back_pressure_correction("balanced-bellows", 1e6, 5e5, 0.10, 101325.0)
    assert kb == pytest.approx(API520_B(1e6, 5e5, 0.1), rel=1e-12)
    assert "figure 31" in note
    assert back_pressure_correction("conventional", 1e6, 5e5, 0.10, 101325.0)[0] == 1.0
    assert back_pressure_correction("pilot", 1e6, 5e5, 0.10, 101325.0)[0] == 1.0


def _demo(case_id):
    case = load_case(f"{DEMO_CASES}/{case_id}.toml")
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    return calculate(inputs, site)


ISSUE_KEYS = ("relief_required_area", "relief_orifice", "relief_capacity_margin", "relief_inlet_loss_fraction",
              "relief_reaction_force", "valve_noise_minimum", "valve_noise_normal", "valve_noise_maximum",
              "valve_outlet_mach_maximum", "inlet_line_pressure_drop", "outlet_line_pressure_drop",
              "inlet_line_pressure_drop_per_100m", "outlet_line_pressure_drop_per_100m", "spray_failure_temperature")


@pytest.mark.parametrize("case_id", ["LD-01", "LD-02"])
def test_demo_cases_carry_the_station_keys(case_id):
    result = _demo(case_id)
    missing = [k for k in ISSUE_KEYS if k not in result.values]
    assert not missing
    letter = result.value("relief_orifice")
    area = result.value("relief_orifice_area")
    assert area >= result.value("relief_required_area")
    assert result.value("relief_capacity_margin") == pytest.approx(100 * (area / result.value("relief_required_area") - 1))
    assert any("engineer of record" in c and "certified capacity" in c for c in result.cautions)
    assert letter in dict(API526_AREAS_IN2)


def test_relief_load_balance_and_governing_area():
    """Consistency: the governing area is the larger of the two methods, and the rated flow of the
    chosen orifice scales the load by the area ratio."""
    result = _demo("LD-01")
    areas = [result.value(k) for k in ("relief_required_area_direct_integration",
                                       "relief_required_area_steam_equation")]
    assert result.value("relief_required_area") == max(areas)
    assert result.value("relief_rated_flow") == pytest.approx(
        result.value("relief_design_flow") * result.value("relief_orifice_area") / max(areas))


BASE = """
[case]
kind = "letdown"
id = "RV-T"
title = "relief test"
revision = "A"
prepared_by = "T"

[inputs]
inlet_pressure = "16 bar(g)"
inlet_temperature = "230 degC"
outlet_pressure = "2.5 bar(g)"
mass_flow = "4.5 t/h"

[inputs.valve]
rated_kv = "63 m^3/h"
valve_size = "DN80"
outlet_expander_size = "DN200"   # the DN80 outlet runs near Mach 0.3: expanded into the line, as the demo is
{valve}
[inputs.lines]
inlet_size = "DN80"
outlet_size = "DN200"

[inputs.relief]
{relief}
"""


def _text(relief, valve=""):
    return BASE.format(relief=relief, valve=valve)


@pytest.mark.parametrize("relief, field", [
    ('set_pressure = "2.5 bar(g)"', "relief.set_pressure"),
    ('set_pressure = "4.5 bar(g)"\nback_pressure = "4.5 bar(g)"', "relief.back_pressure"),
    ('set_pressure = "4.5 bar(g)"\nvalve_type = "spring"', "relief.valve_type"),
    ('set_pressure = "4.5 bar(g)"\ninlet_size = "DN100"\ninlet_length = "-1.5 m"', "relief.inlet_length"),
    ('set_pressure = "4.5 bar(g)"\ninlet_fittings_k = -0.5', "relief.inlet_fittings_k"),
    ('set_pressure = "4.5 bar(g)"\noverpressure = "2 %"', "relief.overpressure"),
    ('set_pressure = "4.5 bar(g)"\noverpressure = "25 %"', "relief.overpressure"),
    ('set_pressure = "4.5 bar(g)"\nkd = 1.4', "relief.kd"),
    ('set_pressure = "4.5 bar(g)"\nspring = 1', "relief.spring"),
])
def test_bad_relief_input_is_refused(tmp_path, capsys, relief, field):
    """Bad relief input: exit 2, the file and the field named, nothing written."""
    assert_refused(tmp_path, capsys, _text(relief), field)


def test_superseded_set_pressure_key_still_works_with_a_warning(tmp_path, capsys):
    code, out, err = run_case_text(tmp_path, capsys, _text("", valve='relief_set_pressure = "4.5 bar(g)"'))
    assert code == 0, err
    assert "superseded" in out
    assert "relief_orifice" in (tmp_path / "out" / "RV-T_revA.json").read_text()


def test_two_different_set_pressures_are_refused(tmp_path, capsys):
    assert_refused(tmp_path, capsys, _text('set_pressure = "4.5 bar(g)"', valve='relief_set_pressure = "5 bar(g)"'),
                   "relief.set_pressure")


def test_inlet_loss_three_per_cent_rule():
    """Source: API 520 Part II 7.3.1, the inlet loss below 3 % of the gauge set pressure."""
    common = dict(inlet_pressure=17.01e5, inlet_temperature=503.15, outlet_pressure=3.5e5, mass_flow=1.25,
                  rated_kv=63.0, set_pressure=5.5e5, relief_inlet_length=1.5)
    short = calculate(Inputs(**common, relief_inlet_size="DN150"), Site())
    narrow = calculate(Inputs(**common, relief_inlet_size="DN80"), Site())
    assert short.value("relief_inlet_loss_fraction") < narrow.value("relief_inlet_loss_fraction")
    status = [next(c.status for c in r.checks if c.name == "Relief inlet loss") for r in (short, narrow)]
    assert short.value("relief_inlet_loss_fraction") < 3.0 < narrow.value("relief_inlet_loss_fraction")
    assert status == ["pass", "warn"]


def test_downstream_design_conditions():
    """Set pressure above the design pressure and the spray-failure temperature above the design
    temperature each fail; within them each pass."""
    common = dict(inlet_pressure=17.01e5, inlet_temperature=503.15, outlet_pressure=3.5e5, mass_flow=1.25,
                  rated_kv=63.0, set_pressure=5.5e5)
    t_throttled = calculate(Inputs(**common), Site()).value("spray_failure_temperature") + 273.15
    bad = calculate(Inputs(**common, design_pressure=5.0e5, design_temperature=t_throttled - 5.0), Site())
    good = calculate(Inputs(**common, design_pressure=7.0e5, design_temperature=t_throttled + 5.0), Site())
    names = ("Downstream design temperature", "Relief set pressure within design pressure")
    assert [next(c.status for c in bad.checks if c.name == n) for n in names] == ["fail", "fail"]
    assert [next(c.status for c in good.checks if c.name == n) for n in names] == ["pass", "pass"]
    assert t_throttled > saturation_temperature(3.5e5)


def test_isentrope_converges_near_saturation_and_refuses_when_it_cannot(monkeypatch):
    # Near the saturation line (1 K of superheat at 5 bar(a)), Newton on T meets its 1e-6 K step; given one step
    # from a poor start it refuses by name: a result that did not converge is never used to size a device.
    import steamcalc.equipment.relief as relief
    from steamcalc.errors import NotConvergedError

    start = SteamState.from_pT(5e5, saturation_temperature(5e5) + 1.0)
    rho, h, x = relief.isentrope_point(5e5, start.entropy, start.temperature + 40.0)
    assert x is None and rho == pytest.approx(start.density, rel=1e-9) and h == pytest.approx(start.enthalpy, rel=1e-9)
    monkeypatch.setattr(relief, "ISENTROPE_STEPS", 1)
    with pytest.raises(NotConvergedError, match="did not converge in 1 Newton steps") as refused:
        relief.isentrope_point(5e5, start.entropy, start.temperature + 40.0)
    assert refused.value.field == "relief isentrope (direct integration)"


def test_a_set_pressure_below_15_psig_says_it_is_outside_the_usual_code_scope():
    # 15 psig = 1.034 bar above the atmosphere (ASME VIII-1 scope, from memory): below it the record says the
    # local code decides; above it nothing is said.
    low = calculate(Inputs(inlet_pressure=6e5, outlet_pressure=1.5e5, mass_flow=0.5, inlet_temperature=453.15,
                           rated_kv=20.0, set_pressure=1.9e5), Site())
    notice = next(c for c in low.checks if c.name == "Relief set pressure within the usual pressure-vessel scope")
    assert notice.kind == "notice" and "1.034 bar difference (15 psig) above the atmosphere" in str(notice.detail)
    high = calculate(Inputs(inlet_pressure=6e5, outlet_pressure=1.5e5, mass_flow=0.5, inlet_temperature=453.15,
                            rated_kv=20.0, set_pressure=2.5e5), Site())
    assert not any(c.name.startswith("Relief set pressure within the usual") for c in high.checks)
