"""The let-down's spray-water valve and evaporation: LD-01 carries the keys, the figures agree
with the IEC 60534-2-1 liquid equations and the d²-law worked from the recorded numbers, and
bad spray inputs are refused through the command line with the field named and nothing written."""

import math

import pytest

from steamcalc.calcs import get_calculation
from steamcalc.calcs.letdown.calculation import Inputs, calculate
from steamcalc.errors import InputError
from steamcalc.cases.site import Site, case_inputs, case_site, load_case
from steamcalc.properties.steam import CRITICAL_PRESSURE, SteamState, saturation_pressure
from tests.case_helpers import assert_refused, run_case_text

SPRAY_KEYS = [f"spray_valve_kv_{c}" for c in ("minimum", "normal", "maximum")] + \
    [f"spray_valve_travel_{c}" for c in ("minimum", "normal", "maximum")] + \
    ["spray_valve_cavitation", "spray_turndown", "desuperheater_min_velocity", "evaporation_length"]

CASE = """
[case]
kind = "letdown"
id = "SP-01"
title = "spray valve test"
revision = "A"
prepared_by = "tester"

[inputs]
inlet_pressure = "16 bar(g)"
inlet_temperature = "230 degC"
outlet_pressure = "2.5 bar(g)"
mass_flow = "4.5 t/h"

[inputs.desuperheater]
target_superheat = "10 K"
water_temperature = "105 degC"
water_pressure = "20 bar(g)"
spray_supply_pressure = "25 bar(g)"
nozzle_differential = "3 bar"
spray_valve_fl = 0.90
spray_valve_rated_kv = "0.16 m^3/h"
sensor_distance = "6 m"
droplet_size = "50 um"     # the nozzle maker's figure

[inputs.valve]
max_flow = "5.5 t/h"
min_flow = "1.0 t/h"

[inputs.lines]
outlet_size = "DN200"
"""


@pytest.fixture(scope="module")
def ld01():
    case = load_case(__import__("pathlib").Path(__file__).resolve().parent.parent
                     / "workbooks" / "demo_site" / "cases" / "LD-01.toml")
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    return inputs, calculate(inputs, site)


def test_ld01_carries_the_spray_keys(ld01):
    _, result = ld01
    missing = [k for k in SPRAY_KEYS if k not in result.values]
    assert not missing
    names = {c.name for c in result.checks}
    assert {"Spray valve cavitation", "Spray turndown within the valve's range", "Steam velocity at the desuperheater",
            "Temperature sensor beyond the evaporation length", "Spray valve rated Kv sufficient"} <= names
    assert result.status != "fail"
    for key in SPRAY_KEYS:   # a trade label, never the code key
        assert result.values[key].label and "_" not in result.values[key].label


def test_ld01_spray_valve_by_hand(ld01):
    inputs, result = ld01
    # The normal case's spray is the desuperheater's own balance.
    assert result.value("spray_water_flow_normal") == pytest.approx(result.value("spray_water_flow"), rel=1e-12)
    supply, p2 = inputs.spray_supply_pressure, inputs.outlet_pressure + inputs.nozzle_differential
    rho = SteamState.from_pT(supply, inputs.water_temperature).density
    pv = saturation_pressure(inputs.water_temperature)
    ff = 0.96 - 0.28 * math.sqrt(pv / CRITICAL_PRESSURE)                       # IEC 60534-2-1 eq. (3)
    dp_choked = 0.90 ** 2 * (supply - ff * pv)                                  # eq. (2), Pa
    dp = supply - p2
    assert dp < dp_choked                                                       # LD-01: not choked
    for case in ("minimum", "normal", "maximum"):
        w = result.value(f"spray_water_flow_{case}")                            # kg/h
        kv = (w / rho) / 0.1 * math.sqrt((rho / 999.1) / (dp / 1e3))            # eq. (1), Δp in kPa
        assert result.value(f"spray_valve_kv_{case}") == pytest.approx(kv, rel=1e-9)
        travel = 1 + math.log(kv / 0.16) / math.log(50.0)                       # equal-percentage, R = 50
        assert result.value(f"spray_valve_travel_{case}") == pytest.approx(100 * travel, rel=1e-9)
    assert result.value("spray_turndown") == pytest.approx(
        result.value("spray_water_flow_maximum") / result.value("spray_water_flow_minimum"), rel=1e-12)
    # Δp 19.5 bar difference is past Kc·(p1 − pv) = 0.648 × (25.99 − 1.21) = 16.06 bar: incipient cavitation.
    assert result.value("spray_valve_cavitation") == "incipient cavitation"


def test_ld01_velocity_and_evaporation_by_hand(ld01):
    inputs, result = ld01
    step = {s.label: s for s in result.steps}
    throttled_min = SteamState.from_ph(inputs.outlet_pressure, result.states["valve_inlet_minimum"].enthalpy)
    area = math.pi * 0.2027 ** 2 / 4                    # DN200 schedule 40 bore 202.7 mm (ASME B36.10M)
    v = inputs.min_flow / (throttled_min.density * area)
    assert result.value("desuperheater_min_velocity") == pytest.approx(v, rel=2e-3)
    assert step["Evaporation length"].value == pytest.approx(
        result.value("spray_droplet_lifetime") * float(step["Evaporation length"].written().split("×")[1].split("m/s")[0]),
        rel=1e-3)
    assert result.value("evaporation_length") > inputs.sensor_distance
    assert next(c for c in result.checks if c.name == "Temperature sensor beyond the evaporation length").status == "warn"


def test_turndown_beyond_a_linear_valve_warns():
    base = dict(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15,
                target_superheat=10.0, water_temperature=378.15, water_pressure=21e5, max_flow=1.5, min_flow=0.1,
                spray_valve_characteristic="linear")
    result = calculate(Inputs(**base), Site())
    assert result.value("spray_turndown") > 9.0
    assert next(c for c in result.checks if c.name == "Spray turndown within the valve's range").status == "warn"


def test_choked_spray_valve_without_nozzle_drop():
    result = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15,
                              target_superheat=10.0, water_temperature=378.15, water_pressure=21e5,
                              spray_supply_pressure=30e5), Site())
    assert result.value("spray_valve_cavitation") == "choked, cavitating"
    assert any("Spray-water valve, not given" in a and "nozzle differential 0" in a for a in result.assumptions)


def test_the_case_runs_and_verifies(tmp_path, capsys):
    code, out, err = run_case_text(tmp_path, capsys, CASE)
    assert code == 0, err


BAD = {
    "sensor at the spray": (('sensor_distance = "6 m"', 'sensor_distance = "0 m"'), "desuperheater.sensor_distance"),
    "sensor upstream": (('sensor_distance = "6 m"', 'sensor_distance = "-2 m"'), "desuperheater.sensor_distance"),
    "FL above 1": (("spray_valve_fl = 0.90", "spray_valve_fl = 1.2"), "desuperheater.spray_valve_fl"),
    "FL zero": (("spray_valve_fl = 0.90", "spray_valve_fl = 0"), "desuperheater.spray_valve_fl"),
    "supply below the steam": (('"25 bar(g)"', '"2 bar(g)"'), "desuperheater.spray_supply_pressure"),
    "supply equal to steam plus nozzle": (('"25 bar(g)"', '"5.5 bar(g)"'), "desuperheater.spray_supply_pressure"),
    "supply below steam plus nozzle": (('"25 bar(g)"', '"4 bar(g)"'), "desuperheater.spray_supply_pressure"),
    "nozzle differential too large for the water pressure": (
        ('spray_supply_pressure = "25 bar(g)"\nnozzle_differential = "3 bar"', 'nozzle_differential = "18 bar"'),
        "desuperheater.nozzle_differential"),
    "negative nozzle differential": (('nozzle_differential = "3 bar"', 'nozzle_differential = "-1 bar"'),
                                     "desuperheater.nozzle_differential"),
    "unknown characteristic": (('spray_valve_fl = 0.90', 'spray_valve_fl = 0.90\nspray_valve_characteristic = "quick"'),
                               "desuperheater.spray_valve_characteristic"),
}


@pytest.mark.parametrize("name", list(BAD))
def test_bad_spray_input_exits_2_names_the_field_and_writes_nothing(name, tmp_path, capsys):
    (old, new), field = BAD[name]
    assert old in CASE
    assert_refused(tmp_path, capsys, CASE.replace(old, new), field)


def test_spray_data_without_a_desuperheater_is_refused():
    with pytest.raises(InputError) as err:
        Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15,
               sensor_distance=6.0)
    assert err.value.field == "desuperheater.sensor_distance"


def test_letdown_without_spray_keys_is_unchanged_in_shape():
    result = calculate(Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15),
                       Site())
    assert not any(k.startswith("spray_valve") for k in result.values)
    assert get_calculation("letdown").Inputs is Inputs


def test_valve_figure_shows_the_spray_valve_at_the_flow_cases(ld01):
    from steamcalc.ui.charts import table_for

    inputs, result = ld01
    valve = next(f for f in result.figures if f.name == "valve")
    spray = next(s for s in valve.series if s.name == "spray-water valve travel")
    assert list(spray.x) == [1000.0, 4500.0, 5500.0]
    assert list(spray.y) == [result.value(f"spray_valve_travel_{c}") for c in ("minimum", "normal", "maximum")]
    assert spray.axis == "y2" and spray.labels == ("minimum", "normal", "maximum")
    rows = table_for("letdown", inputs, result)["Flow cases"]
    assert [r["spray valve Kv, m³/h"] for r in rows] == [
        result.value(f"spray_valve_kv_{c}") for c in ("minimum", "normal", "maximum")]
