"""The two IF97 engines behind steamcalc.properties.steam: the fast engine (seuif97) against the IAPWS-IF97
verification tables (in tests/test_if97_verification.py) and against the reference engine (iapws); the engine choice is explicit and
context-local; each engine imports neither the other nor the calculations; ``verify --engine fast``
reproduces every demo record."""

import ast
import shutil
import subprocess
import sys
import threading
from pathlib import Path

import numpy as np
import pytest

from steamcalc.cli import main
from steamcalc.properties.engines import FAST_ENGINE, REFERENCE_ENGINE, current_engine, other_engine, using_engine
from steamcalc.errors import InputError
from steamcalc.properties.steam import SteamState, saturation_temperature

PACKAGE = Path(__file__).resolve().parent.parent / "steamcalc"


# The fast engine against IAPWS R7-97(2012)'s own verification tables: tests/test_if97_verification.py.


# -- the fast engine against the reference engine: both evaluate IF97, so they agree far more ---------------
# -- closely than IF97 and IAPWS-95 do. 1e-9 relative on regions 1, 2, 3 and the wet region to 165 bar(a). ---
RELATIVE = 1e-9
PRESSURES = [0.02e5, 0.5e5, 1e5, 3.5e5, 17e5, 60e5, 150e5, 160e5, 250e5, 500e5, 999e5]
TEMPERATURES = np.linspace(275.0, 1070.0, 23)
ENTHALPIES = np.linspace(100e3, 3700e3, 25)
PT_GRID = [(p, t) for p in PRESSURES for t in TEMPERATURES
           if p > 220.64e5 or abs(t - saturation_temperature(p)) > 1e-3]
PH_GRID = [(p, h) for p in PRESSURES for h in ENTHALPIES]
PROPERTIES = ("temperature", "enthalpy", "entropy", "density", "cp", "cv", "speed_of_sound", "dryness")


def largest_relative_difference(reference, fast):
    worst = 0.0
    for name in PROPERTIES:
        a, b = getattr(reference, name), getattr(fast, name)
        assert (a is None) == (b is None), name
        if a is not None:
            worst = max(worst, abs(a - b) / max(abs(a), 1e-12))
    return worst


@pytest.mark.parametrize("pressure,temperature", PT_GRID)
def test_fast_matches_iapws_on_the_p_t_grid(pressure, temperature):
    reference = SteamState.from_pT(pressure, temperature)
    fast = SteamState.from_pT(pressure, temperature, engine=FAST_ENGINE)
    assert fast.phase == reference.phase and fast.region == reference.region
    assert largest_relative_difference(reference, fast) < RELATIVE


@pytest.mark.parametrize("pressure,enthalpy", PH_GRID)
def test_fast_matches_iapws_on_the_p_h_grid(pressure, enthalpy):
    reference = SteamState.from_ph(pressure, enthalpy)
    fast = SteamState.from_ph(pressure, enthalpy, engine=FAST_ENGINE)
    assert fast.phase == reference.phase and fast.region == reference.region
    assert largest_relative_difference(reference, fast) < RELATIVE
    back = SteamState.from_ps(pressure, reference.entropy, engine=FAST_ENGINE)
    assert back.enthalpy == pytest.approx(enthalpy, rel=RELATIVE)


@pytest.mark.parametrize("pressure", [0.01e5, 1e5, 10e5, 100e5, 160e5])
@pytest.mark.parametrize("dryness", [0.0, 0.3, 1.0])
def test_fast_matches_iapws_saturated_and_wet(pressure, dryness):
    reference = SteamState.from_p_dryness(pressure, dryness)
    fast = SteamState.from_p_dryness(pressure, dryness, engine=FAST_ENGINE)
    assert fast.phase == reference.phase
    assert largest_relative_difference(reference, fast) < RELATIVE
    t_sat = reference.temperature
    by_t = SteamState.from_T_dryness(t_sat, dryness, engine=FAST_ENGINE)
    assert by_t.enthalpy == pytest.approx(reference.enthalpy, rel=RELATIVE)


@pytest.mark.parametrize("pressure", [170e5, 190e5, 210e5])
def test_saturation_above_623_k_agrees_to_the_backward_equations(pressure):
    # Above 623.15 K both engines take the saturated volumes from the region-3 backward equations
    # v'(p), v''(p) (IAPWS SR5-05) for wet steam; iapws refines the ends x = 0 and 1 on the basic
    # equation, seuif97 cannot (its (T, v) function reads a volume inside the dome as wet steam).
    for dryness, tolerance in ((0.5, RELATIVE), (0.0, 1e-5), (1.0, 2e-5)):
        reference = SteamState.from_p_dryness(pressure, dryness)
        fast = SteamState.from_p_dryness(pressure, dryness, engine=FAST_ENGINE)
        assert fast.enthalpy == pytest.approx(reference.enthalpy, rel=tolerance)


def test_arrays_match_the_scalar_fast_engine_and_iapws():
    from steamcalc.properties.steam import PHASES
    from steamcalc.properties.steam_arrays import states_ph
    p = np.array([g[0] for g in PH_GRID])
    h = np.array([g[1] for g in PH_GRID])
    arrays = states_ph(p, h)
    for i, (pi, hi) in enumerate(PH_GRID):
        reference = SteamState.from_ph(pi, hi)
        assert arrays.temperature[i] == pytest.approx(reference.temperature, rel=RELATIVE)
        assert arrays.entropy[i] == pytest.approx(reference.entropy, rel=RELATIVE)
        assert PHASES[arrays.phase[i]] == reference.phase


# -- the choice of engine ------------------------------------------------------------------------------------
def test_default_is_the_reference_engine_and_states_say_which_made_them():
    assert current_engine() == REFERENCE_ENGINE
    assert SteamState.from_pT(10e5, 500.0).engine == REFERENCE_ENGINE
    with using_engine(FAST_ENGINE):
        assert SteamState.from_pT(10e5, 500.0).engine == FAST_ENGINE
        # An explicit engine wins over the context's.
        assert SteamState.from_pT(10e5, 500.0, engine=REFERENCE_ENGINE).engine == REFERENCE_ENGINE
        assert other_engine() == REFERENCE_ENGINE
    assert current_engine() == REFERENCE_ENGINE and other_engine() == FAST_ENGINE


def test_engine_choice_does_not_leak_into_another_thread():
    # A threaded worker (e.g. a Dask worker) runs a record and a Monte Carlo side by side.
    inside, seen = threading.Event(), []

    def record_thread():
        inside.wait(5)
        seen.append(SteamState.from_ph(3.5e5, 2865e3).engine)

    worker = threading.Thread(target=record_thread)
    worker.start()
    with using_engine(FAST_ENGINE):
        inside.set()
        worker.join(5)
    assert seen == [REFERENCE_ENGINE]


def test_engine_choice_is_restored_after_an_error():
    with pytest.raises(ZeroDivisionError), using_engine(FAST_ENGINE):
        1 / 0
    assert current_engine() == REFERENCE_ENGINE


def test_unknown_engine_is_an_input_error_naming_the_choices():
    with pytest.raises(InputError) as info:
        SteamState.from_pT(1e5, 400.0, engine="coolprop")
    assert "iapws" in str(info.value) and "fast" in str(info.value)


# -- imports: each engine alone, CoolProp in the tests only, a light command line ---------------------------
def _imports(path):
    tree = ast.parse(path.read_text(encoding="utf-8"))
    names = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            names.update(alias.name for alias in node.names)
        elif isinstance(node, ast.ImportFrom):
            names.add("." * node.level + (node.module or ""))
    return names


@pytest.mark.parametrize("module,forbidden", [
    ("iapws_engine.py", ("seuif97", ".seuif97_engine", "...calcs", "..steam")),
    ("seuif97_engine.py", ("iapws", ".iapws_engine", "...calcs", "..steam")),
])
def test_each_engine_imports_neither_the_other_nor_the_calculations(module, forbidden):
    imports = _imports(PACKAGE / "properties" / "engines" / module)
    assert not [name for name in imports if any(name == f or name.startswith(f + ".") for f in forbidden)]


def test_coolprop_is_not_imported_by_the_package():
    offenders = [str(p) for p in PACKAGE.rglob("*.py") if any("CoolProp" in n for n in _imports(p))]
    assert offenders == []


def _modules_after(code):
    probe = (f"import sys\n{code}\n"
             "print(' '.join(m for m in ('iapws', 'seuif97', 'CoolProp', 'numpy', 'pint', 'jinja2', 'scipy') "
             "if m in sys.modules))")
    done = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, check=True,
                          cwd=PACKAGE.parent)
    return done.stdout.split()


def test_command_line_help_imports_no_heavy_library():
    assert _modules_after("from steamcalc.cli import _parser\n_parser().format_help()") == []


def test_fast_engine_alone_does_not_import_iapws():
    loaded = _modules_after("from steamcalc.properties.steam import SteamState\nSteamState.from_pT(1e5, 400.0, engine='fast')")
    assert "seuif97" in loaded and "iapws" not in loaded and "CoolProp" not in loaded


# -- cross-engine verification of every demo record -----------------------------------------------------------
def test_verify_with_the_fast_engine_reproduces_every_demo_record(tmp_path, demo_site_dir, capsys):
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases"), "--quiet"]) in (0, 1)
    records = sorted((site / "records").glob("*.json"))
    assert len(records) == len(list((site / "cases").glob("*.toml")))
    capsys.readouterr()
    assert main(["verify", "--engine", "fast", *map(str, records)]) == 0
    out = capsys.readouterr().out
    assert out.count("verdict: VERIFIED") == len(records)
    assert out.count("recomputed on the fast IF97 engine") == len(records)
    assert "largest relative difference" in out and "NOT REPRODUCED" not in out


def test_verify_with_an_unknown_engine_is_a_usage_error(tmp_path, capsys):
    with pytest.raises(SystemExit) as info:
        main(["verify", "--engine", "other", str(tmp_path / "x.json")])
    assert info.value.code == 2


def test_review_workbook_offers_the_fast_engine_cross_check(tmp_path, demo_site_dir):
    from steamcalc.ui.review import ReviewBook
    site = tmp_path / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    book = ReviewBook(site / "records" / "LD-02_revB.json", case_file=site / "cases" / "LD-02.toml")
    text = book.cross_check()
    assert "largest relative difference" in text and text.endswith("cross-check: AGREES")
    book._cross_button.click()
    assert "AGREES" in book._cross_status.value


def test_one_case_run_and_fast_verify_import_only_what_they_use(tmp_path, demo_site_dir):
    # A single record never needs CoolProp (tests only); it loads both IF97 engines: iapws for the
    # record, the other for the independent energy balances (steamcalc.calcs.balance). A fast-engine
    # verification recomputes every result on seuif97 (and re-sums its balances on iapws).
    case = demo_site_dir / "cases" / "LD-02.toml"
    run = _modules_after("from steamcalc.cli import main\n"
                         f"assert main(['run', {str(case)!r}, '--out', {str(tmp_path)!r}]) in (0, 1)")
    assert "CoolProp" not in run and "seuif97" in run and "iapws" in run
    record = str(tmp_path / "LD-02_revB.json")
    fast = _modules_after(f"from steamcalc.cli import main\nassert main(['verify', '--engine', 'fast', {record!r}]) == 0")
    assert "seuif97" in fast and "CoolProp" not in fast
