"""The steam main after its independent check: each finding reproduced and now right, against a hand
calculation or an independent reference named beside it (ht and iapws for heat loss, iapws IAPWS-IF97 called
directly for the steam states, fluids for the return line's two-phase drop)."""

import math
from pathlib import Path

import pytest

from steamcalc.calcs.steam_main.calculation import Inputs, calculate
from steamcalc.calcs.steam_main.economics import evaluate_options
from steamcalc.calcs.steam_main.heat_loss import BARE_STEEL_EMISSIVITY, Insulation, surface_loss
from steamcalc.calcs.steam_main.loads import drip_positions
from steamcalc.cases.site import Price, Site, case_site, load_case
from steamcalc.records.build import record_for_case
from steamcalc.units.amounts import text_of
from tests.case_helpers import run_case_text
from tests.test_steam_main import _hand_loss

ATM = 101325.0
CASES = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site" / "cases"
#: The demo main's segments (SM-01): 72 m level, a 3 m riser, 75 m level, all DN80 schedule 40.
DEMO_SEGMENTS = ((72.0, "DN80", None, 2.1, None), (3.0, "DN80", None, 0.6, 3.0), (75.0, "DN80", None, 1.8, None))
DN80_OD = 0.0889   # ASME B36.10M NPS 3: 88.9 mm outside diameter


def _iapws(p_pa, **kw):
    """IAPWS-IF97 called directly (the iapws package), independent of steamcalc's property layer."""
    from iapws import IAPWS97
    return IAPWS97(P=p_pa / 1e6, **kw)


def _check(result, name):
    return next(c for c in result.checks if c.name == name)


# --- 11: a bare main radiates as bare steel, whatever the jacket emissivity ---------------------------------------
@pytest.mark.parametrize("jacket_emissivity, source", [
    (0.1, "hand calculation, Churchill-Chu + Stefan-Boltzmann at eps 0.8 (bare oxidised steel, common practice)"),
    (0.9, "hand calculation, Churchill-Chu + Stefan-Boltzmann at eps 0.8 (bare oxidised steel, common practice)"),
])
def test_bare_pipe_at_zero_thickness_uses_bare_steel_emissivity(jacket_emissivity, source):
    """DN80 at 175.3 °C in still air at 15 °C, 0 mm insulation with an aluminium (0.1) jacket given: was 391 W/m
    at the demo site (jacket emissivity on bare steel), now the bare figure, 765 W/m by hand at sea level."""
    t_steam, t_air = 175.0 + 273.15, 15.0 + 273.15
    hand, _ = _hand_loss(DN80_OD, t_steam, t_air, 0.0, 0.0, 0.04, 0.056, BARE_STEEL_EMISSIVITY)
    zero = surface_loss(DN80_OD, t_steam, t_air, 0.0, ATM, Insulation(0.0, 0.04, 0.056, jacket_emissivity))
    bare = surface_loss(DN80_OD, t_steam, t_air, 0.0, ATM)
    assert zero.heat_loss == pytest.approx(hand, rel=1e-6), source
    assert zero.heat_loss == pytest.approx(bare.heat_loss, rel=1e-12)
    # 765 W/m at sea level (101.325 kPa); the demo site's record says 763 W/m at its 180 m atmosphere.
    assert zero.heat_loss == pytest.approx(765.2, abs=0.5), "by hand (worked above)"
    # The economic thickness's 0 mm option is the same bare pipe.
    site = Site(operating_hours=6000.0, boiler_efficiency=0.86, fuel_price=Price(40.0, "EUR"))
    options = evaluate_options(((0.0, 0.0), (0.05, 57.0)), DN80_OD, t_steam, t_air, 0.0, ATM,
                               Insulation(0.05, 0.04, 0.056, jacket_emissivity), site, 0.08, 10)
    assert options[0].heat_loss == pytest.approx(hand, rel=1e-6), source


def test_bare_main_record_agrees_with_its_warning():
    r = calculate(Inputs(supply_pressure=9e5, steam_flow=750 / 3600, insulation_thickness=0.0,
                         segments=((50.0, "DN80", None, None, None),)), Site())
    assert r.value("segment_1_heat_loss") == pytest.approx(r.value("segment_1_bare_heat_loss"), rel=1e-12)
    assert f"{r.value('segment_1_bare_heat_loss'):.0f}" in text_of(_check(r, "Segment 1: bare main").detail)


# --- 12: superheated steam makes no running condensate until it reaches saturation -----------------------------------
def test_superheated_main_drains_nothing_while_running():
    """Supply at 214.7 °C, 8.99 bar(a), 750 kg/h over the demo main: arrives superheated (IF97), so the running
    load is 0 (was 19.4 kg/h condensed at the latent heat as if saturated)."""
    r = calculate(Inputs(supply_pressure=8.99e5, supply_temperature=214.7 + 273.15, steam_flow=750 / 3600,
                         insulation_thickness=0.05, conductivity_150=0.056, segments=DEMO_SEGMENTS,
                         drip_spacing=75.0), Site())
    t_sat = _iapws(r.value("main_outlet_pressure") * 1e5, x=1.0).T - 273.15   # iapws IF97, region 4
    assert r.value("main_outlet_temperature") > t_sat + 10.0
    assert r.value("running_load_total") == 0.0
    assert r.value("steam_delivered") == pytest.approx(750.0, rel=1e-12)


def test_running_load_once_the_steam_reaches_saturation_by_hand():
    """40 kg/h of steam 5 K superheated at 9 bar(a) through 150 m of DN80 gives up its superheat within the first
    segment: the running load is the heat loss less that superheat, at the latent heat (iapws IF97 by hand)."""
    p, flow = 9e5, 40 / 3600
    t_sat = _iapws(p, x=1.0).T
    inputs = Inputs(supply_pressure=p, supply_superheat=5.0, steam_flow=flow, insulation_thickness=0.05,
                    segments=((150.0, "DN80", None, None, None),))
    r = calculate(inputs, Site())
    supply = _iapws(p, T=t_sat + 5.0)
    h_g, h_f = _iapws(p, x=1.0).h * 1e3, _iapws(p, x=0.0).h * 1e3
    q = r.value("segment_1_heat_loss") * 150.0                      # W over the segment
    hand = (q - flow * (supply.h * 1e3 - h_g)) / (h_g - h_f) * 3600  # kg/h
    assert r.value("running_load_total") == pytest.approx(hand, rel=1e-6), "by hand, iapws IF97"
    # Warm-up to the supply temperature (not saturation), by hand: DN80 sch 40 (ASME B36.10M, 5.49 mm wall).
    d_o, d_i = DN80_OD, DN80_OD - 2 * 0.00549
    steel = 7850 * math.pi / 4 * (d_o ** 2 - d_i ** 2) * 150
    wool = 100 * math.pi / 4 * ((d_o + 0.1) ** 2 - d_o ** 2) * 150
    rise = supply.T - 293.15
    warm = ((steel * 490 * rise + wool * 840 * rise / 2) / ((h_g - h_f) * 1200) + q / (h_g - h_f) / 2) * 3600
    assert r.value("warmup_load_total") == pytest.approx(warm, rel=1e-6), "by hand, common-practice steel and wool"


# --- 13: SM-01 takes the MP header's superheat, as HX-01 does --------------------------------------------------------
@pytest.fixture(scope="module")
def demo(demo_linked_records):
    case = load_case(CASES / "SM-01.toml")
    return record_for_case(case, case_site(case), with_uncertainty=False, record_folder=demo_linked_records)[0]


def test_demo_main_carries_the_headers_superheat(demo, monkeypatch):
    """SM-01 at 38 K superheat (HX-01 revision B's supply, 213.32 °C at 8.9918 bar(a)): heat loss 57.1 → 75.5 W/m
    (hand calculation with Churchill-Chu and radiation at 213.32 °C), running load 15.2 → 0 kg/h."""
    res = demo["results"]
    assert res["supply_temperature"]["value"] == pytest.approx(213.319, abs=0.01), "HX-01 revision B record"
    case = load_case(CASES / "SM-01.toml")
    monkeypatch.setattr("tests.test_steam_main.ATM", case_site(case).atmospheric_pressure)   # the site's 180 m air
    hand, _ = _hand_loss(DN80_OD, 213.319 + 273.15, 288.15, 0.0, 0.05, 0.040, 0.056, 0.1)
    assert res["segment_1_heat_loss"]["value"] == pytest.approx(hand, rel=1e-4), "hand calculation"
    assert res["segment_1_heat_loss"]["value"] == pytest.approx(75.5, abs=0.1)
    assert res["running_load_total"]["value"] == 0.0
    assert res["steam_delivered"]["value"] == pytest.approx(710.3, abs=0.05)
    # The steam flow is HX-01 revision B's, read from its record ([inputs.load_link]), no longer a copied figure.
    assert demo["inputs"]["steam_flow"]["given"].startswith("710.3") and demo["inputs"]["load_link_record_id"]["value"] == "HX-01"


# --- 14: the touch check says the value and the limit, worded by its verdict ----------------------------------------
def test_hot_jacket_warning_says_it_is_hot():
    """10 mm of insulation with a painted jacket on DN80 at 8.99 bar(a), saturated: the jacket is above 55 °C
    (common practice); the warning says so with both figures."""
    r = calculate(Inputs(supply_pressure=8.99e5, steam_flow=750 / 3600, insulation_thickness=0.005,
                         jacket_emissivity=0.9, segments=((50.0, "DN80", None, None, None),)), Site())
    check = _check(r, "Segment 1: jacket touch temperature")
    text = text_of(check.detail)
    assert check.status == "warn" and "above the touch limit" in text and "cool enough" not in text
    assert f"{r.value('segment_1_surface_temperature'):.0f} °C" in text and "55 °C" in text
    gradient = text_of(_check(r, "Main pressure gradient").detail)
    assert "within the 0.5" in gradient


# --- 15: wet steam at the user -----------------------------------------------------------------------------------------
def test_wet_steam_at_the_user_warns_and_delivered_steam_is_net_of_drips():
    """30 kg/h saturated over the demo main arrives at dryness about 0.5: warned against 0.95 (common practice);
    the steam delivered is the flow less the running load, which the drips take (balance: ṁ(1 − x) by IF97)."""
    flow = 30 / 3600
    r = calculate(Inputs(supply_pressure=8.99e5, steam_flow=flow, insulation_thickness=0.05, segments=DEMO_SEGMENTS,
                         drip_spacing=75.0), Site())
    dryness = r.value("main_outlet_dryness")
    assert 0.4 < dryness < 0.6
    check = _check(r, "Dryness at the user")
    assert check.status == "warn" and "0.95" in text_of(check.detail)
    assert r.value("steam_delivered") == pytest.approx(30.0 - r.value("running_load_total"), rel=1e-12)
    assert r.value("steam_delivered") == pytest.approx(30.0 * dryness, rel=1e-2), "balance by IF97 states"


# --- 16: drips at the spacing on a gently rising run ---------------------------------------------------------------
def test_rising_run_gets_drips_at_the_spacing():
    """200 m rising 0.8 m (1 in 250) at 50 m spacing: legs at 50, 100, 150, 200 m (was one, at 200 m, taking all
    306 kg/h of warm-up load)."""
    r = calculate(Inputs(supply_pressure=8.99e5, steam_flow=750 / 3600, insulation_thickness=0.05,
                         segments=((200.0, "DN80", None, None, 0.8),)), Site())
    assert r.value("drip_points") == 4
    assert [r.value(f"drip_{n}_position") for n in range(1, 5)] == [50.0, 100.0, 150.0, 200.0]
    warm = [r.value(f"drip_{n}_warmup_load") for n in range(1, 5)]
    assert sum(warm) == pytest.approx(r.value("warmup_load_total"))
    assert max(warm) == pytest.approx(r.value("warmup_load_total") / 4, rel=1e-9)


def test_riser_keeps_its_foot_drip_and_restarts_the_count():
    from types import SimpleNamespace as S
    run = [S(segment=S(length=40.0, rise=0.0)), S(segment=S(length=4.0, rise=4.0)), S(segment=S(length=60.0, rise=0.0))]
    assert [(p[0], p[2]) for p in drip_positions(run, 50.0)] == [
        (40.0, "foot of a riser"), (94.0, "spacing along the run"), (104.0, "end of the main, before the user")]


# --- 17: the trap's back pressure includes the return line's friction ---------------------------------------------
def test_trap_back_pressure_includes_the_return_lines_drop():
    """The demo's return at its first issue (saturated main, 750 kg/h): heater trap differential
    4 bar(g) − (LP receiver + 2 m of water + line drop) = 1.199 bar difference (was 1.318, the drop left out).
    Water density by iapws IF97; the drop by fluids.two_phase_dP (Müller-Steinhagen-Heck) called directly."""
    from fluids.two_phase import two_phase_dP

    from steamcalc.properties.steam import dynamic_viscosity
    site = Site(atmospheric_pressure=99200.0)
    receiver, trap = 2.5e5 + 99200.0, 4e5 + 99200.0
    r = calculate(Inputs(supply_pressure=8e5 + 99200.0, steam_flow=750 / 3600, insulation_thickness=0.05,
                         conductivity_150=0.056, segments=DEMO_SEGMENTS, drip_spacing=75.0, receiver_pressure=receiver,
                         return_size="DN50", return_schedule="80", return_length=160.0, lift=2.0,
                         heater_condensate_flow=750 / 3600, heater_trap_pressure=trap), site)
    liquid, vapour = _iapws(receiver, x=0.0), _iapws(receiver, x=1.0)
    total = r.value("return_flow") / 3600
    drop = two_phase_dP(total, r.value("return_flash_fraction"), liquid.rho, 0.0493, 160.0, rhog=vapour.rho,
                        mul=dynamic_viscosity(liquid.T, liquid.rho), mug=dynamic_viscosity(vapour.T, vapour.rho),
                        roughness=4.57e-5, Method="Muller_Steinhagen_Heck")
    hand = (trap - receiver - liquid.rho * 9.80665 * 2.0 - drop) / 1e5
    assert r.value("heater_trap_differential") == pytest.approx(hand, rel=2e-3), "by hand, fluids and iapws"
    assert r.value("heater_trap_differential") == pytest.approx(1.199, abs=0.002)


# --- 18: bad input refused by field, with the fix ---------------------------------------------------------------------
CASE = """[case]
kind = "steam_main"
id = "SM-T"
[inputs]
supply_pressure = "8 bar(g)"
steam_flow = "{flow}"
{extra}
[[inputs.segments]]
length = "150 m"
size = "DN80"
[inputs.insulation]
thickness = "50 mm"
"""


@pytest.mark.parametrize("flow, extra, field, words", [
    ("750 kg/h", 'drip_spacing = "0.001 m"', "drip_spacing", "5 m"),
    ("750 kg/h", 'wind_speed = "-5 m/s"', "wind_speed", "below zero"),
    ("750 kg/h", 'wind_speed = "90 m/s"', "wind_speed", "km/h"),
    ("5 kg/h", "", "steam_flow", "condenses all the steam"),
    ("750 kg/h", 'ambient_temperature = "200 degC"', "ambient_temperature", "200"),
    ("750 kg/h", 'supply_superheat = "38 K"\nsupply_temperature = "220 degC"', "supply_superheat", "twice"),
])
def test_bad_input_refused_by_field_with_a_fix(tmp_path, capsys, flow, extra, field, words):
    code, _, err = run_case_text(tmp_path, capsys, CASE.format(flow=flow, extra=extra))
    assert code == 2 and field in err and str(tmp_path / "case.toml") in err, err
    assert words in err and "Fix:" in err and "Traceback" not in err, err
    assert not (tmp_path / "out").exists()


# --- 19: the return line's warm-up case, and no size that fits -------------------------------------------------------
def test_return_line_worked_at_warm_up_too_and_no_fitting_size_fails():
    """A superheated main with no heater: only the warm-up case reaches the return, and it governs. With a drop
    limit no size can meet, the record fails the check instead of staying silent."""
    base = dict(supply_pressure=8.99e5, supply_superheat=38.0, steam_flow=750 / 3600, insulation_thickness=0.05,
                segments=DEMO_SEGMENTS, drip_spacing=75.0, receiver_pressure=3.5e5, return_size="DN25",
                return_length=160.0)
    r = calculate(Inputs(**base), Site())
    assert r.value("return_governing_case") == "warm-up"
    assert r.value("return_flow") == pytest.approx(r.value("warmup_load_total"))
    tight = calculate(Inputs(**base, return_drop_limit=0.01), Site())
    assert _check(tight, "Return line size for the limits").status == "fail"


def test_a_return_too_small_for_its_flow_fails_the_trap_differential_instead_of_refusing():
    """DN15 for 720 kg/h of flashing condensate: its own friction drop stands above the traps' inlets. The
    receiver and lift alone are below them, so the input is not wrong; the design is, and the record fails."""
    r = calculate(Inputs(supply_pressure=9e5, steam_flow=0.2, insulation_thickness=0.05,
                         segments=((150.0, "DN80", None, None, None),), receiver_pressure=3.5e5, return_size="DN15",
                         return_length=100.0, heater_condensate_flow=0.2, heater_trap_pressure=5e5), Site())
    check = _check(r, "Heater trap: differential pressure")
    assert check.status == "fail" and "larger return line" in text_of(check.detail)
    assert r.value("heater_trap_differential") < 0.0
    back = r.value("trap_back_pressure")
    assert r.value("heater_trap_differential") == pytest.approx(5.0 - back, rel=1e-12), "by hand: 5 bar(a) − p_b"
