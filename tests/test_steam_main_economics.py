"""The steam main's economic insulation thickness: the capital recovery factor by hand and against interest
tables, the chosen thickness against a hand calculation over the candidates, the checks, and the refusals."""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.calcs.steam_main.calculation import Inputs, calculate
from steamcalc.calcs.steam_main.economics import OPTION_COLUMNS, capital_recovery_factor
from steamcalc.calcs.steam_main.heat_loss import Insulation, surface_loss
from steamcalc.cases.site import Price, Site
from steamcalc.properties.steam import SteamState
from steamcalc.units.rows import parse_rows, rows_text
from tests.case_helpers import assert_refused, run_case_text

DEMO = Path(__file__).resolve().parents[1] / "workbooks" / "demo_site" / "cases" / "SM-01.toml"
SITE = Site(operating_hours=6000.0, boiler_efficiency=0.86, fuel_price=Price(40.0, "EUR"))
SEGMENTS = ((150.0, "DN80", None, None, None),)
OPTIONS = ((0.025, 45.0), (0.04, 52.0), (0.05, 57.0), (0.065, 66.0), (0.08, 80.0), (0.1, 95.0))


# Capital recovery factor A/P = i(1+i)^n/((1+i)^n - 1).
CRF_CASES = [
    # (rate, years, A/P, digits, source)
    (0.08, 10, 0.08 * 1.08 ** 10 / (1.08 ** 10 - 1), 12, "the formula worked by hand"),
    (0.08, 10, 0.14903, 5, "compound-interest table, A/P at 8 %, 10 years (from memory)"),
    (0.10, 5, 0.26380, 5, "compound-interest table, A/P at 10 %, 5 years (from memory)"),
    (0.05, 20, 0.08024, 5, "compound-interest table, A/P at 5 %, 20 years (from memory)"),
    (0.0, 10, 0.1, 12, "limit i -> 0: straight share 1/n (the formula's limit, by hand)"),
]


@pytest.mark.parametrize("rate, years, expected, digits, source", CRF_CASES)
def test_capital_recovery_factor(rate, years, expected, digits, source):
    assert round(capital_recovery_factor(rate, years), digits) == pytest.approx(round(expected, digits), abs=10 ** -digits)


def test_small_rate_approaches_the_straight_share():
    """Consistency: the factor is continuous at i = 0 (no jump between the two branches)."""
    assert capital_recovery_factor(1e-9, 10) == pytest.approx(capital_recovery_factor(0.0, 10), rel=1e-6)


def _inputs(thickness=0.05, options=OPTIONS, rate=0.08, years=10.0):
    return Inputs(supply_pressure=9e5, steam_flow=0.2, insulation_thickness=thickness, segments=SEGMENTS,
                  ambient_temperature=288.15, insulation_options=options, discount_rate=rate, evaluation_years=years)


def test_economic_thickness_against_hand_calculation():
    """Each candidate's yearly cost written out again from the heat-loss function, the site's figures and the
    factor by hand; the least total is the economic thickness (hand calculation, annualised-cost method)."""
    r = calculate(_inputs(), SITE)
    steam = SteamState.from_p_dryness(9e5, 1.0).temperature
    crf = 0.08 * 1.08 ** 10 / (1.08 ** 10 - 1)
    totals = []
    for n, (thickness, cost) in enumerate(OPTIONS, start=1):
        q = surface_loss(0.0889, steam, 288.15, 0.0, SITE.atmospheric_pressure,
                         Insulation(thickness, 0.040, 0.055, 0.1)).heat_loss
        fuel_cost = q * 6000.0 / 1e6 / 0.86 * 40.0       # W/m x h / efficiency -> MWh/m a year, x EUR/MWh
        total = fuel_cost + cost * crf
        totals.append(total)
        assert r.value(f"option_{n}_heat_loss") == pytest.approx(q, rel=1e-9)
        assert r.value(f"option_{n}_energy_cost") == pytest.approx(fuel_cost, rel=1e-9)
        assert r.value(f"option_{n}_total_cost") == pytest.approx(total, rel=1e-9)
    best = min(range(len(totals)), key=totals.__getitem__)
    assert r.value("economic_thickness") == pytest.approx(OPTIONS[best][0] * 1000)
    assert r.value("economic_total_cost") == pytest.approx(totals[best], rel=1e-9)
    figure = next(f for f in r.figures if f.name == "economic_thickness")
    assert not figure.missing
    assert next(s for s in figure.series if s.name == "total").y == pytest.approx(totals, rel=1e-9)


def test_installed_far_from_economic_warns_and_near_passes():
    def verdict(thickness):
        r = calculate(_inputs(thickness=thickness), SITE)
        return next(c for c in r.checks if c.name == "Installed thickness against the economic thickness").status
    economic = calculate(_inputs(), SITE).value("economic_thickness") / 1000
    assert verdict(economic) == "pass"
    assert verdict(0.025 if economic >= 0.05 else 0.1) == "warn"


def test_economic_at_the_end_of_the_list_warns():
    """Installed costs so low the thickest wins: the least may lie beyond the list, said so."""
    r = calculate(_inputs(options=((0.025, 1.0), (0.04, 1.1), (0.05, 1.2))), SITE)
    assert r.value("economic_thickness") == pytest.approx(50.0)
    assert any(c.name == "Economic thickness inside the candidates" and c.status == "warn" for c in r.checks)


def test_no_candidates_is_a_notice():
    r = calculate(Inputs(supply_pressure=9e5, steam_flow=0.2, insulation_thickness=0.05, segments=SEGMENTS), SITE)
    notice = next(c for c in r.checks if c.name == "Economic insulation thickness")
    assert notice.notice and notice.status == "pass" and "economic_thickness" not in r.values


def test_options_read_back_from_the_record_text():
    rows = parse_rows([{"thickness": "0 mm", "cost": 0}, {"thickness": "40 mm", "cost": 52.5}], "insulation.options",
                      OPTION_COLUMNS)
    assert rows == ((0.0, 0.0), (0.04, 52.5))
    assert parse_rows(rows_text(rows, OPTION_COLUMNS), "insulation.options", OPTION_COLUMNS) == rows


def test_demo_case_economic_thickness(tmp_path, capsys, demo_linked_records):
    """SM-01 lists six candidates; its 50 mm lies within one step of the economic 65 mm (invented demo costs)."""
    text = DEMO.read_text().replace('site = "../site.toml"', f'site = "{DEMO.parent.parent / "site.toml"}"')
    (tmp_path / "out").mkdir()
    shutil.copy(demo_linked_records / "HX-01_revB.json", tmp_path / "out")   # the heater SM-01 takes its flow from
    code, _, err = run_case_text(tmp_path, capsys, text, name="SM-01.toml")
    assert code == 0, err
    record = json.loads((tmp_path / "out" / "SM-01_revA.json").read_text())
    text = json.dumps(record)
    assert "economic_thickness" in text and "Installed thickness against the economic thickness" in text


CASE = """[case]
kind = "steam_main"
id = "SM-E"
[inputs]
supply_pressure = "8 bar(g)"
steam_flow = "750 kg/h"
[[inputs.segments]]
length = "150 m"
size = "DN80"
[inputs.insulation]
thickness = "50 mm"
{extra}
[[inputs.insulation.options]]
thickness = "40 mm"
cost = 52.0
[[inputs.insulation.options]]
thickness = "{second}"
cost = {cost}
"""
RATES = "discount_rate = 0.08\nevaluation_years = 10"


@pytest.mark.parametrize("extra, second, cost, field", [
    (RATES, "50 mm", "-57.0", "insulation.options[1].cost"),              # a negative installed cost
    (RATES, "40 mm", "57.0", "insulation.options[1].thickness"),          # thicknesses not increasing
    (RATES, "25 mm", "57.0", "insulation.options[1].thickness"),
    (RATES, "-5 mm", "57.0", "insulation.options[1].thickness"),          # thinner than zero
    ("discount_rate = 0.8\nevaluation_years = 10", "50 mm", "57.0", "insulation.discount_rate"),   # above 0.5
    ("discount_rate = 8\nevaluation_years = 10", "50 mm", "57.0", "insulation.discount_rate"),     # 8 % typed as 8
    ("discount_rate = -0.02\nevaluation_years = 10", "50 mm", "57.0", "insulation.discount_rate"),
    ("evaluation_years = 10", "50 mm", "57.0", "insulation.discount_rate"),                        # rate missing
    ("discount_rate = 0.08\nevaluation_years = 200", "50 mm", "57.0", "insulation.evaluation_years"),
])
def test_bad_options_refused_by_name(tmp_path, capsys, extra, second, cost, field):
    """Refused with the file and the field named, exit 2, no record written."""
    assert_refused(tmp_path, capsys, CASE.format(extra=extra, second=second, cost=cost), field)


def test_rate_without_options_refused(tmp_path, capsys):
    text = CASE.format(extra=RATES, second="50 mm", cost="57.0").split("[[inputs.insulation.options]]")[0]
    assert_refused(tmp_path, capsys, text, "insulation.discount_rate")


def test_one_option_refused(tmp_path, capsys):
    text = CASE.format(extra=RATES, second="50 mm", cost="57.0").rsplit("[[inputs.insulation.options]]", 1)[0]
    assert_refused(tmp_path, capsys, text, "insulation.options")
