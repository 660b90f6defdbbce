"""The vectorised let-down sample path against the per-sample calculate(), sample by sample.

Consistency tests: the same seeded inputs through both paths (fast engine, numbers only) must
give the same banded results to RELATIVE_TOLERANCE, the vectorised path must answer only the
samples calculate() gives a result for, and a freshly issued LD-01 record must still verify.
"""

import dataclasses
import shutil
from pathlib import Path

import numpy as np
import pytest

from steamcalc.calcs import get_calculation, sample_path
from steamcalc.calcs.letdown import calculation as letdown
from steamcalc.calcs.letdown import vector as letdown_vector
from steamcalc.calcs.base import numbers_only
from steamcalc.calcs.letdown.spray import SPRAY_FIELDS
from steamcalc.cli import main
from steamcalc.properties.engines import using_engine
from steamcalc.errors import SteamcalcError
from steamcalc.records.record import load_record
from steamcalc.cases.site import Site, case_inputs, case_site, load_case
from steamcalc.runs.uncertainty import Tolerance, parse_tolerances, run_uncertainty

#: Largest relative difference allowed between the two paths (both are IF97 on seuif97; they
#: differ only in rounding, the array Colebrook solution and the Kv fixed point over arrays).
RELATIVE_TOLERANCE = 1e-9
#: For results that are zero or near it (superheat of wet steam, spray when unreachable).
ABSOLUTE_TOLERANCE = 1e-9
SAMPLES = 300
LD01 = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site" / "cases" / "LD-01.toml"


@pytest.fixture(scope="module")
def ld01():
    case = load_case(LD01)
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    tolerances, _, _ = parse_tolerances(letdown.Inputs, case.uncertainty, inputs)
    return inputs, site, tolerances


def _without(tolerances, *names):
    return tuple(t for t in tolerances if t.field not in names)


def _variation(name, inputs, site, tolerances):
    """LD-01 changed one way, with tolerances that fit the change: (inputs, site, tolerances)."""
    if name == "no desuperheater":
        inputs = dataclasses.replace(inputs, target_superheat=None, water_temperature=None, water_pressure=None,
                                     **{name: None for name in SPRAY_FIELDS})
        tolerances = _without(tolerances, "water_temperature")
    elif name == "wet inlet by dryness":
        # Throttled steam on both sides of saturation; the spray target unreachable for some samples.
        inputs = dataclasses.replace(inputs, inlet_temperature=None, inlet_dryness=0.965)
        tolerances = _without(tolerances, "inlet_temperature") + (Tolerance("inlet_dryness", 0.02, False, "0.02"),)
    elif name == "inlet by superheat":
        inputs = dataclasses.replace(inputs, inlet_temperature=None, inlet_superheat=25.0)
        tolerances = _without(tolerances, "inlet_temperature") + (Tolerance("inlet_superheat", 5.0, False, "5 K"),)
    elif name == "no inlet line":
        inputs = dataclasses.replace(inputs, inlet_length=None)
    elif name == "dry saturated inlet, no inlet line":
        inputs = dataclasses.replace(inputs, inlet_temperature=None, inlet_dryness=1.0, inlet_length=None)
        tolerances = _without(tolerances, "inlet_temperature")
    elif name == "valve, turbine and spray inputs toleranced":
        tolerances = (Tolerance("xt", 0.05, False, "0.05"), Tolerance("max_flow", 0.05, True, "5 %"),
                      Tolerance("min_inlet_pressure", 0.3e5, False, "0.3 bar"),
                      Tolerance("inlet_fittings_k", 0.5, False, "0.5"),
                      Tolerance("isentropic_efficiency", 0.05, False, "0.05"),
                      Tolerance("target_superheat", 2.0, False, "2 K"), Tolerance("water_pressure", 1e5, False, "1 bar"))
    elif name != "LD-01":
        raise KeyError(name)
    return inputs, site, tolerances


VARIATIONS = ("LD-01", "no desuperheater", "wet inlet by dryness", "inlet by superheat", "no inlet line",
              "dry saturated inlet, no inlet line", "valve, turbine and spray inputs toleranced")


def _draws(inputs, tolerances, size, seed=11):
    rng = np.random.default_rng(seed)
    return {t.field: rng.uniform(-1.0, 1.0, size) * t.half_width(getattr(inputs, t.field)) + getattr(inputs, t.field)
            for t in tolerances}


def _scalar(inputs, site, columns, size, keys):
    """What calculate() gives each sample (NaN where it gives no result), and which gave one."""
    values, answered = np.full((size, len(keys)), np.nan), np.zeros(size, dtype=bool)
    with using_engine("fast"), numbers_only():
        for i in range(size):
            try:
                result = letdown.calculate(dataclasses.replace(
                    inputs, **{name: column[i].item() for name, column in columns.items()}), site)
            except SteamcalcError:
                continue
            values[i] = [result.value(k) if k in result.values else np.nan for k in keys]
            answered[i] = True
    return values, answered


def _keys(inputs, site):
    nominal = letdown.calculate(inputs, site)
    return [k for k in letdown.UNCERTAINTY_RESULTS if k in nominal.values]


def _assert_same(vector, scalar, answered):
    both = vector[answered]
    expected = scalar[answered]
    assert np.allclose(both, expected, rtol=RELATIVE_TOLERANCE, atol=ABSOLUTE_TOLERANCE, equal_nan=False), \
        np.max(np.abs(both - expected) / np.maximum(np.abs(expected), 1e-300))


@pytest.mark.parametrize("name", VARIATIONS)
def test_vectorised_samples_equal_calculate_sample_by_sample(ld01, name):
    inputs, site, tolerances = _variation(name, *ld01)
    keys = _keys(inputs, site)
    columns = _draws(inputs, tolerances, SAMPLES)
    values, answered = letdown_vector.sample_results(inputs, site, columns, SAMPLES, keys)
    expected, gave_result = _scalar(inputs, site, columns, SAMPLES, keys)
    assert gave_result.all() and answered.all()
    _assert_same(values, expected, answered)


def test_wet_inlet_variation_covers_both_sides_of_saturation(ld01):
    inputs, site, tolerances = _variation("wet inlet by dryness", *ld01)
    keys = _keys(inputs, site)
    values, _ = letdown_vector.sample_results(inputs, site, _draws(inputs, tolerances, SAMPLES), SAMPLES, keys)
    superheat = values[:, keys.index("outlet_superheat")]
    spray = values[:, keys.index("spray_water_flow")]
    # Some samples throttle to wet steam (no superheat, no spray), others reach the spray target.
    assert (superheat == 0.0).any() and (spray > 0.0).any() and (spray == 0.0).any()


@pytest.mark.parametrize("inputs,tolerance", [
    # Some samples put the outlet above the inlet.
    (letdown.Inputs(inlet_pressure=5e5, outlet_pressure=4.8e5, mass_flow=1.0, inlet_temperature=503.15),
     Tolerance("outlet_pressure", 0.5e5, False, "0.5 bar")),
    # Some samples lose half the valve's drop or more in the inlet line.
    (letdown.Inputs(inlet_pressure=17e5, outlet_pressure=3.5e5, mass_flow=1.25, inlet_temperature=503.15,
                    inlet_size="DN50", inlet_length=75.0, inlet_fittings_k=2.0),
     Tolerance("mass_flow", 0.12, True, "12 %")),
    # Some samples' inlet steam falls below saturation.
    (letdown.Inputs(inlet_pressure=10e5, outlet_pressure=3e5, mass_flow=1.0, inlet_temperature=456.0),
     Tolerance("inlet_temperature", 4.0, False, "4 K")),
])
def test_vectorised_path_answers_only_samples_calculate_answers(inputs, tolerance):
    site = Site()
    keys = _keys(inputs, site)
    columns = _draws(inputs, (tolerance,), SAMPLES)
    values, answered = letdown_vector.sample_results(inputs, site, columns, SAMPLES, keys)
    expected, gave_result = _scalar(inputs, site, columns, SAMPLES, keys)
    assert 0 < gave_result.sum() < SAMPLES
    assert not (answered & ~gave_result).any()
    assert answered.sum() >= 0.95 * gave_result.sum()   # the screen leaves out only boundary samples
    _assert_same(values, expected, answered)


@pytest.mark.parametrize("name", ("LD-01", "wet inlet by dryness", "valve, turbine and spray inputs toleranced"))
def test_bands_and_sensitivity_equal_the_per_sample_path(ld01, name, monkeypatch):
    inputs, site, tolerances = _variation(name, *ld01)
    calls = []
    real = letdown.calculate
    monkeypatch.setattr(letdown, "calculate", lambda *args: calls.append(1) or real(*args))
    fast = run_uncertainty(letdown, inputs, site, tolerances, samples=SAMPLES, seed=5)
    assert len(calls) == 1   # the nominal only: every sample and sensitivity end took the vectorised path
    loop = run_uncertainty(letdown, inputs, site, tolerances, samples=SAMPLES, seed=5, vectorised=False)
    assert fast["failed_samples"] == loop["failed_samples"] and fast["valid_samples"] == loop["valid_samples"]
    for key, band in loop["bands"].items():
        for stat in ("p05", "p50", "p95", "low", "high", "mean", "std", "nominal"):
            assert fast["bands"][key][stat] == pytest.approx(band[stat], rel=RELATIVE_TOLERANCE, abs=ABSOLUTE_TOLERANCE)
    for key, rows in loop["sensitivity"].items():
        for a, b in zip(fast["sensitivity"][key], rows):
            assert a["input"] == b["input"]
            for side in ("low", "high"):
                assert a[side] == pytest.approx(b[side], rel=RELATIVE_TOLERANCE, abs=ABSOLUTE_TOLERANCE)


def test_failed_samples_keep_their_reasons():
    near = letdown.Inputs(inlet_pressure=5e5, outlet_pressure=4.8e5, mass_flow=1.0, inlet_temperature=503.15)
    tolerances = (Tolerance("outlet_pressure", 0.5e5, False, "0.5 bar"),)
    fast = run_uncertainty(letdown, near, Site(), tolerances, samples=200)
    loop = run_uncertainty(letdown, near, Site(), tolerances, samples=200, vectorised=False)
    assert fast["failed_samples"] == loop["failed_samples"] and fast["failed_sample_count"] > 0


def test_a_tolerance_box_with_invalid_corners_takes_the_per_sample_path(ld01):
    # Inlet pressure down to the lowest upstream pressure and below: some samples are refused
    # by the Inputs checks themselves, which only the constructor knows.
    inputs, site, _ = ld01
    tolerances = (Tolerance("inlet_pressure", 1.5e5, False, "1.5 bar"),)
    fast = run_uncertainty(letdown, inputs, site, tolerances, samples=100)
    loop = run_uncertainty(letdown, inputs, site, tolerances, samples=100, vectorised=False)
    assert fast["failed_sample_count"] == loop["failed_sample_count"] > 0
    assert fast["bands"] == loop["bands"]


def test_registry_gives_the_path_only_to_the_registered_kind():
    assert sample_path(get_calculation("letdown")) is letdown_vector
    assert set(letdown.UNCERTAINTY_RESULTS) <= set(letdown_vector.RESULTS)

    class Wrapped:   # a stand-in with the same KIND is not the registered module
        KIND, Inputs, UNCERTAINTY_RESULTS, calculate = letdown.KIND, letdown.Inputs, letdown.UNCERTAINTY_RESULTS, \
            staticmethod(letdown.calculate)

    assert sample_path(Wrapped) is None


def test_fresh_ld01_record_verifies(tmp_path, demo_site_dir, capsys):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases" / "LD-01.toml")]) == 0
    path = site / "records" / "LD-01_revB.json"
    capsys.readouterr()
    assert main(["verify", "--all", str(path)]) == 0   # --all: every comparison, the bands' among them
    out = capsys.readouterr().out
    assert "uncertainty.valve_kv.p95" in out


def test_array_engine_refusal_falls_back_to_calculate(ld01, monkeypatch):
    from steamcalc.errors import OutOfRangeError

    inputs, site, tolerances = ld01
    loop = run_uncertainty(letdown, inputs, site, tolerances, samples=50, vectorised=False)

    def refuse(*args):
        raise OutOfRangeError("enthalpy[3] of 1e9 kJ/kg is outside IF97", field="enthalpy")

    monkeypatch.setattr(letdown_vector, "sample_results", refuse)
    assert run_uncertainty(letdown, inputs, site, tolerances, samples=50) == loop


def test_reference_engine_samples_never_take_the_vectorised_path(ld01, monkeypatch):
    inputs, site, tolerances = ld01

    def unused(*args):
        raise AssertionError("the vectorised path runs on the fast engine only")

    monkeypatch.setattr(letdown_vector, "sample_results", unused)
    section = run_uncertainty(letdown, inputs, site, tolerances[:1], samples=10, engine="iapws")
    assert section["valid_samples"] == 10 and section["property_engine"]["engine"] == "iapws"
