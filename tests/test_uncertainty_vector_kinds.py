"""The vectorised flash and exchanger sample paths against the per-sample calculate(), sample by sample.

Consistency tests, as tests/test_uncertainty_vector.py for the let-down: the same seeded inputs
through both paths (fast engine, numbers only) must give the same banded results to
RELATIVE_TOLERANCE; the vectorised path must answer only samples calculate() gives a result for
(and nearly all of them); the bands and sensitivities of run_uncertainty must agree whichever path
made them. Source of every check: calculate() itself, the path the records were issued with before.
"""

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from steamcalc.calcs import get_calculation, sample_path
from steamcalc.calcs.base import numbers_only
from steamcalc.calcs.exchanger import calculation as exchanger
from steamcalc.calcs.exchanger import vector as exchanger_vector
from steamcalc.calcs.flash import calculation as flash
from steamcalc.calcs.flash import vector as flash_vector
from steamcalc.cases.site import Site, case_inputs, case_site, load_case
from steamcalc.errors import SteamcalcError
from steamcalc.properties.engines import using_engine
from steamcalc.runs.uncertainty import Tolerance, run_uncertainty

#: Largest relative difference allowed between the two paths: both are IF97 on seuif97 and the same
#: arithmetic; they differ only in the order of a few roundings (lever rule in kJ or J, numpy's log).
RELATIVE_TOLERANCE = 1e-9
ABSOLUTE_TOLERANCE = 1e-9
#: Samples per comparison: a few thousand, as the issue asks.
SAMPLES = 2000
CASES = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site" / "cases"


def _demo(case_id):
    case = load_case(CASES / f"{case_id}.toml")
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    return inputs, site


def _t(field, value, relative=False):
    return Tolerance(field, value, relative, f"{value}")


def _flash(name):
    """(inputs, site, tolerances) of a flash variation."""
    if name in ("FL-01", "FL-02"):
        inputs, site = _demo(name)
        tolerances = (_t("condensate_pressure", 0.3e5), _t("condensate_flow", 0.05, True),
                      _t("flash_pressure", 0.1e5 if name == "FL-02" else 0.15e5))
        return inputs, site, tolerances + ((_t("lp_demand", 0.05, True),) if name == "FL-01" else ())
    inputs, site = _demo("FL-01")
    if name == "demand below the flash (part vented)":
        inputs = dataclasses.replace(inputs, lp_demand=236.0 / 3600)
        return inputs, site, (_t("condensate_flow", 0.08, True), _t("lp_demand", 0.1, True))
    if name == "subcooled condensate, some below the flash saturation":
        # Saturation at the flash pressure (3.5 bar(a)) is about 138.9 °C: some samples do not flash.
        inputs = dataclasses.replace(inputs, condensate_temperature=273.15 + 140.0)
        return inputs, site, (_t("condensate_temperature", 3.0), _t("flash_pressure", 0.1e5))
    if name == "cascade, vapour velocity, no nozzles":
        inputs = dataclasses.replace(inputs, flash_pressure=None, stages=(6e5, 3e5), vapour_velocity=2.5,
                                     k_factor=None, inlet_nozzle=None, steam_nozzle=None, condensate_nozzle=None)
        return inputs, site, (_t("condensate_pressure", 0.3e5), _t("vapour_velocity", 0.3),
                              _t("residence_time", 10.0), _t("condensate_flow", 0.05, True))
    raise KeyError(name)


def _exchanger(name):
    inputs, site = _demo("HX-01")
    base = (_t("process_flow", 0.05, True), _t("process_inlet_temperature", 2.0), _t("process_outlet_temperature", 1.0),
            _t("overall_u", 0.1, True), _t("control_valve_supply_superheat", 5.0),
            _t("condensate_back_pressure", 0.1e5))
    if name == "HX-01":
        return inputs, site, base
    if name == "supply throttled to the steam space":
        inputs = dataclasses.replace(inputs, steam_pressure=7e5)
        return inputs, site, base + (_t("control_valve_supply_pressure", 0.3e5), _t("steam_pressure", 0.2e5))
    no_valve = {f.name: None for f in dataclasses.fields(inputs) if f.name.startswith("control_valve_")}
    if name == "saturated steam, water by volume at its default pressure":
        inputs = dataclasses.replace(inputs, **no_valve, process_flow=None, process_volume_flow=12.0 / 3600,
                                     process_pressure=None)
        return inputs, site, (_t("steam_pressure", 0.3e5), _t("process_volume_flow", 0.05, True),
                              _t("process_outlet_temperature", 2.0), _t("fouling_resistance", 2e-5))
    if name == "wet steam, a process cp, heat loss":
        inputs = dataclasses.replace(inputs, **no_valve, steam_dryness=0.95, process_fluid=None, process_cp=3900.0,
                                     heat_loss=0.03, process_side_design_pressure=None)   # no thermal relief: no liquid data
        return inputs, site, (_t("steam_dryness", 0.02), _t("process_cp", 0.05, True), _t("heat_loss", 0.01),
                              _t("installed_area", 0.1, True))
    if name == "superheated, dry-wall desuperheating and subcooling zones":
        inputs = dataclasses.replace(inputs, **no_valve, steam_superheat=30.0, desuperheating_u=150.0,
                                     condensate_subcooling=10.0, subcooling_u=600.0)
        return inputs, site, (_t("steam_superheat", 10.0), _t("condensate_subcooling", 3.0),
                              _t("desuperheating_u", 0.1, True), _t("subcooling_u", 0.1, True),
                              _t("process_flow", 0.05, True))
    if name == "shell-and-tube 1-2 with a subcooling zone (per-sample F)":
        inputs = dataclasses.replace(inputs, **no_valve, arrangement="1-2", condensate_subcooling=10.0,
                                     subcooling_u=600.0)
        return inputs, site, (_t("process_flow", 0.05, True), _t("condensate_subcooling", 3.0))
    if name == "shell-and-tube 1-2, condensing only":
        inputs = dataclasses.replace(inputs, **no_valve, arrangement="1-2", steam_temperature=None)
        return inputs, site, (_t("process_flow", 0.05, True), _t("steam_pressure", 0.3e5))
    if name == "back pressure near the outlet's saturation (stall and none)":
        # T_sat at 0.6 bar(a) is about 86 °C, at the 85 °C outlet: some samples never stall.
        inputs = dataclasses.replace(inputs, condensate_back_pressure=0.6e5, trap_static_head=None,
                                     trap_min_differential=None, lift_head=None, pump_motive_pressure=None)
        return inputs, site, (_t("condensate_back_pressure", 0.05e5), _t("process_flow", 0.05, True))
    raise KeyError(name)


FLASH = ("FL-01", "FL-02", "demand below the flash (part vented)",
         "subcooled condensate, some below the flash saturation", "cascade, vapour velocity, no nozzles")
EXCHANGER = ("HX-01", "supply throttled to the steam space", "saturated steam, water by volume at its default pressure",
             "wet steam, a process cp, heat loss", "superheated, dry-wall desuperheating and subcooling zones",
             "shell-and-tube 1-2 with a subcooling zone (per-sample F)", "shell-and-tube 1-2, condensing only",
             "back pressure near the outlet's saturation (stall and none)")
VARIATIONS = [(flash, flash_vector, _flash, name) for name in FLASH] + \
             [(exchanger, exchanger_vector, _exchanger, name) for name in EXCHANGER]
IDS = [f"{calc.KIND}: {name}" for calc, _, _, name in VARIATIONS]


def _draws(inputs, tolerances, size, seed=11):
    rng = np.random.default_rng(seed)
    return {t.field: rng.uniform(-1.0, 1.0, size) * t.half_width(getattr(inputs, t.field)) + getattr(inputs, t.field)
            for t in tolerances}


def _scalar(calc, inputs, site, columns, size, keys):
    """What calculate() gives each sample (NaN where it gives no result), and which gave one."""
    values, answered = np.full((size, len(keys)), np.nan), np.zeros(size, dtype=bool)
    with using_engine("fast"), numbers_only():
        for i in range(size):
            try:
                result = calc.calculate(dataclasses.replace(
                    inputs, **{name: column[i].item() for name, column in columns.items()}), site)
            except SteamcalcError:
                continue
            values[i] = [result.value(k) if k in result.values else np.nan for k in keys]
            answered[i] = True
    return values, answered


def _keys(calc, inputs, site):
    nominal = calc.calculate(inputs, site)
    return [k for k in calc.UNCERTAINTY_RESULTS if k in nominal.values]


@pytest.mark.parametrize("calc,vector,variation,name", VARIATIONS, ids=IDS)
def test_vectorised_samples_equal_calculate_sample_by_sample(calc, vector, variation, name):
    inputs, site, tolerances = variation(name)
    keys = _keys(calc, inputs, site)
    columns = _draws(inputs, tolerances, SAMPLES)
    with using_engine("fast"), numbers_only():
        values, answered = vector.sample_results(inputs, site, columns, SAMPLES, keys)
    expected, gave_result = _scalar(calc, inputs, site, columns, SAMPLES, keys)
    assert not (answered & ~gave_result).any()   # never a result calculate() refuses
    if "per-sample F" in name:
        assert not answered.any()                # the F factor is left to calculate()
    else:
        assert answered.sum() >= 0.99 * gave_result.sum()   # the screen leaves out only boundary samples
    assert np.allclose(values[answered], expected[answered], rtol=RELATIVE_TOLERANCE, atol=ABSOLUTE_TOLERANCE)


@pytest.mark.parametrize("kind,name,what", [
    ("flash", "demand below the flash (part vented)", "some samples vent, some do not"),
    ("flash", "subcooled condensate, some below the flash saturation", "some samples do not flash"),
    ("exchanger", "back pressure near the outlet's saturation (stall and none)", "some samples never stall"),
])
def test_variations_cover_both_sides_of_their_boundary(kind, name, what):
    calc, vector, variation = (flash, flash_vector, _flash) if kind == "flash" else (exchanger, exchanger_vector,
                                                                                      _exchanger)
    inputs, site, tolerances = variation(name)
    keys = _keys(calc, inputs, site)
    with using_engine("fast"), numbers_only():
        values, answered = vector.sample_results(inputs, site, _draws(inputs, tolerances, 500), 500, keys)
    if kind == "exchanger":
        stall = values[answered, keys.index("stall_load_fraction")]
        assert (stall == 0.0).any() and (stall > 0.0).any(), what
    elif "vent" in what:
        heat_per_flash = values[:, keys.index("recovered_heat_rate")] / values[:, keys.index("flash_steam_flow")]
        assert heat_per_flash.max() - heat_per_flash.min() > 0.05, what   # credited on less than all the flash
    else:
        fraction = values[:, keys.index("flash_fraction")]
        assert (fraction == 0.0).any() and (fraction > 0.0).any(), what


@pytest.mark.parametrize("inputs,tolerance,calc,vector", [
    # Some samples' condensate is above saturation: steam, not condensate.
    (flash.Inputs(condensate_pressure=9e5, condensate_flow=1.0, condensate_temperature=273.15 + 174.0,
                  flash_pressure=3e5), Tolerance("condensate_temperature", 3.0, False, "3 K"), flash, flash_vector),
    # Some samples' steam saturation is not above the process outlet.
    (exchanger.Inputs(steam_pressure=1.6e5, process_flow=1.0, process_inlet_temperature=328.15,
                      process_outlet_temperature=383.15), Tolerance("steam_pressure", 0.2e5, False, "0.2 bar"),
     exchanger, exchanger_vector),
])
def test_vectorised_path_answers_only_samples_calculate_answers(inputs, tolerance, calc, vector):
    site = Site()
    keys = _keys(calc, inputs, site)
    columns = _draws(inputs, (tolerance,), 500)
    with using_engine("fast"), numbers_only():
        values, answered = vector.sample_results(inputs, site, columns, 500, keys)
    expected, gave_result = _scalar(calc, inputs, site, columns, 500, keys)
    assert 0 < gave_result.sum() < 500
    assert not (answered & ~gave_result).any()
    assert answered.sum() >= 0.95 * gave_result.sum()
    assert np.allclose(values[answered], expected[answered], rtol=RELATIVE_TOLERANCE, atol=ABSOLUTE_TOLERANCE)


@pytest.mark.parametrize("calc,variation,name", [(flash, _flash, "FL-01"), (flash, _flash, "FL-02"),
                                                 (exchanger, _exchanger, "HX-01"),
                                                 (exchanger, _exchanger, "supply throttled to the steam space")])
def test_bands_and_sensitivity_equal_the_per_sample_path(calc, variation, name, monkeypatch):
    inputs, site, tolerances = variation(name)
    calls = []
    real = calc.calculate
    monkeypatch.setattr(calc, "calculate", lambda *args: calls.append(1) or real(*args))
    fast = run_uncertainty(calc, inputs, site, tolerances, samples=500, seed=5)
    assert len(calls) == 1   # the nominal only: every sample and sensitivity end took the vectorised path
    loop = run_uncertainty(calc, inputs, site, tolerances, samples=500, seed=5, vectorised=False)
    assert fast["failed_samples"] == loop["failed_samples"] and fast["valid_samples"] == loop["valid_samples"]
    assert fast["summary"] == loop["summary"]
    for key, band in loop["bands"].items():
        for stat in ("p05", "p50", "p95", "low", "high", "mean", "std", "nominal"):
            assert fast["bands"][key][stat] == pytest.approx(band[stat], rel=RELATIVE_TOLERANCE, abs=ABSOLUTE_TOLERANCE)
    for key, rows in loop["sensitivity"].items():
        for a, b in zip(fast["sensitivity"][key], rows):
            assert a["input"] == b["input"]
            for side in ("low", "high"):
                assert a[side] == pytest.approx(b[side], rel=RELATIVE_TOLERANCE, abs=ABSOLUTE_TOLERANCE)


def test_registry_gives_each_kind_its_path():
    for kind, vector in (("flash", flash_vector), ("exchanger", exchanger_vector)):
        calc = get_calculation(kind)
        assert sample_path(calc) is vector
        assert set(calc.UNCERTAINTY_RESULTS) == set(vector.RESULTS)
