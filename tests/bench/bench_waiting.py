"""Benchmark: how long an engineer waits, each goal as a ratio (issue 23, "Waiting").

Goals, each printed as measured / goal (1.00 or less meets it) beside its baseline run side by side
(interleaved A B A B, medians):

* Monte Carlo of 100,000 samples <= 1 s for every kind (LD-01, FL-01, HX-01 with the tolerances below);
  baseline: the per-sample path (``calculate()`` once per sample), timed on --loop-samples and scaled.
* ``register`` of 600 records <= 10 s: a site of the five demo cases x 120 (each its own id and flow), issued
  once into a temporary folder (or --site DIR, kept); timed as a fresh process, first as by default (every
  record recomputed and redrawn) and then as a repeat run with --remember (the register's memory); baseline:
  --before's checkout, else the default run.
* Workbook Run All <= 3 s of computing: a fresh process opening each workbook (imports, form, record,
  charts) against a one-cell baseline process (Python with ipywidgets, one widget): the difference is the
  computing; the progress line's steps are listed.
* Enter -> results <= 0.1 s and -> charts <= 0.2 s: a changed flow typed into the form, timed to the moment
  the results (and the charts) widget holds the new value; baseline: the bare ``calculate()`` of the case.

    python tests/bench/bench_waiting.py [--repeat 3] [--loop-samples 5000] [--records 600] [--site DIR]
                                        [--before /path/to/old/checkout] [--only mc,register,workbook,enter]

``--before`` (a checkout of an earlier steamcalc) is timed beside the register and the workbook openings.
"""

import os
import re
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
DEMO = ROOT / "workbooks" / "demo_site"
#: Tolerances for the kinds whose demo case has none (LD-01 keeps its own).
TOLERANCES = {"FL-01": {"condensate_pressure": "0.3 bar", "condensate_flow": "5 %", "flash_pressure": "0.15 bar",
                        "lp_demand": "5 %"},
              "HX-01": {"process_flow": "5 %", "process_inlet_temperature": "2 K", "process_outlet_temperature": "1 K",
                        "overall_u": "10 %", "control_valve_supply_superheat": "5 K",
                        "condensate_back_pressure": "0.1 bar"}}
FLOWS = {"LD": "mass_flow", "FL": "condensate_flow", "HX": "process_flow"}
GOALS = {"mc": 1.0, "register": 10.0, "run_all": 3.0, "results": 0.1, "charts": 0.2}


def _argument(name, default):
    return sys.argv[sys.argv.index(name) + 1] if name in sys.argv else default


def _median_pairs(a, b, repeat):
    """Run a() and b() in turn, ``repeat`` times each; their median seconds."""
    first, second = [], []
    for _ in range(repeat):
        first.append(a())
        second.append(b())
    return statistics.median(first), statistics.median(second)


def _row(label, seconds, goal, baseline, baseline_label, speed_up=True):
    print(f"  {label:<34} {seconds:>9.3f} s   goal {goal:>5.2f} s   ratio {seconds / goal:>6.2f}   "
          f"{baseline_label} {baseline:>8.3f} s" + (f" ({baseline / seconds:>6.1f}x)" if speed_up else ""))


def _process(code, pythonpath, cwd=ROOT):
    """Seconds of a fresh Python process running ``code`` (the whole process), and what it printed."""
    start = time.perf_counter()
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=str(cwd),
                          env={**os.environ, "PYTHONPATH": str(pythonpath)})
    if done.returncode not in (0, 1):   # 1: the register found a record not current or not valid (it still ran)
        raise RuntimeError(f"the timed process failed: {done.stderr[-2000:]}")
    return time.perf_counter() - start, done.stdout


# -- Monte Carlo -----------------------------------------------------------------------------------------------
def monte_carlo(repeat, loop_samples):
    from steamcalc.calcs import get_calculation
    from steamcalc.cases.site import case_inputs, case_site, load_case
    from steamcalc.runs.uncertainty import parse_tolerances, run_uncertainty

    print("  Monte Carlo, 100,000 samples with the sensitivity (fast engine)")
    for case_id in ("LD-01", "FL-01", "HX-01"):
        case = load_case(DEMO / "cases" / f"{case_id}.toml")
        site = case_site(case)
        inputs, _ = case_inputs(case, site)
        calc = get_calculation(case.kind)
        table = {**TOLERANCES.get(case_id, {}), **{k: v for k, v in case.uncertainty.items()
                                                   if k not in ("samples", "seed")}}
        tolerances, _, _ = parse_tolerances(calc.Inputs, table, inputs)
        nominal = calc.calculate(inputs, site)

        def vectorised():
            start = time.perf_counter()
            run_uncertainty(calc, inputs, site, tolerances, 100_000, 1, nominal_result=nominal)
            return time.perf_counter() - start

        def per_sample():
            start = time.perf_counter()
            run_uncertainty(calc, inputs, site, tolerances, loop_samples, 1, nominal_result=nominal, vectorised=False)
            return (time.perf_counter() - start) * 100_000 / loop_samples

        vectorised()   # warm-up: the array engine's first calls
        fast, loop = _median_pairs(vectorised, per_sample, repeat)
        _row(f"{case_id} ({calc.KIND})", fast, GOALS["mc"], loop, f"per-sample path (x{100_000 // loop_samples} of "
             f"{loop_samples})")


# -- register ----------------------------------------------------------------------------------------------------
def make_site(folder, records):
    """The demo site with ``records`` case files (the five demo cases in turn, each with its own id and a flow
    0.2 % above the one before), issued; the number of records written."""
    from steamcalc.cli import main

    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    # The let-down, flash and heater demo cases: the site balance and the steam main link records by id,
    # so copies of them under new ids would link nothing.
    templates = {p.stem: p.read_text() for p in (folder / "cases").glob("*.toml") if p.stem[:2] in FLOWS}
    for p in (folder / "cases").glob("*.toml"):
        p.unlink()
    for i in range(-(-records // len(templates))):
        for stem, text in sorted(templates.items()):
            key = FLOWS[stem[:2]]
            text = text.replace(f'id = "{stem}"', f'id = "{stem}-{i:03d}"')
            # Down for LD (its maximum flow stays above the normal flow), up for the others.
            scale = 1 - 0.001 * i if stem.startswith("LD") else 1 + 0.002 * i
            text = re.sub(rf'^({key} = )"([0-9.]+) ([^"]+)"',
                          lambda m: f'{m.group(1)}"{float(m.group(2)) * scale:.4f} {m.group(3)}"', text, count=1,
                          flags=re.M)
            (folder / "cases" / f"{stem}-{i:03d}.toml").write_text(text)
    main(["run", str(folder / "cases")])
    return len(list((folder / "records").glob("*.json")))


REGISTER = "from steamcalc.cli import main; main(['register', {site!r}{fresh}])"


def register(repeat, records, site, before):
    kept = site is not None
    folder = Path(site) if kept else Path(tempfile.mkdtemp()) / "site"
    try:
        if not (folder / "records").is_dir():
            print(f"  issuing a site of {records} records in {folder} (once) ...", flush=True)
            make_site(folder, records)
        count = len(list((folder / "records").glob("*.json")))
        with tempfile.TemporaryDirectory() as cache:
            os.environ["STEAMCALC_CACHE"] = cache   # the memory of this benchmark only

            def fresh():
                return _process(REGISTER.format(site=str(folder), fresh=""), ROOT)[0]

            def repeated():
                return _process(REGISTER.format(site=str(folder), fresh=", '--remember'"), ROOT)[0]

            def old():
                return _process(REGISTER.format(site=str(folder), fresh=""), before, cwd=before)[0]

            repeated()   # the first run fills the memory
            baseline, label = (old, "before") if before else (fresh, "default")
            print(f"  register of {count} records (a fresh process each); baseline: "
                  + (f"the checkout {before}" if before else "the default run, every record recomputed and redrawn"))
            first, base = _median_pairs(fresh, baseline, repeat)
            again, base2 = _median_pairs(repeated, baseline, repeat)
            _row("default run: all recomputed", first, GOALS["register"], base, label)
            _row("repeat run with --remember", again, GOALS["register"], base2, label)
            del os.environ["STEAMCALC_CACHE"]
    finally:
        if not kept:
            shutil.rmtree(folder.parent, ignore_errors=True)


# -- workbooks ---------------------------------------------------------------------------------------------------
OPEN = """
import time
start = time.perf_counter()
from steamcalc.ui.workbook import Workbook
workbook = Workbook.open({case!r}, {out!r})
print(time.perf_counter() - start)
"""
ONE_CELL = "import ipywidgets; ipywidgets.Text(value='1')"


def run_all(repeat, before):
    from steamcalc.ui.progress import ProgressLine

    print("  workbook Run All: a fresh process opening the workbook, against a one-cell process"
          + (f"; before: the checkout {before}" if before else ""))
    with tempfile.TemporaryDirectory() as out:
        for case_id in ("LD-01", "FL-01", "HX-01"):
            case = str(DEMO / "cases" / f"{case_id}.toml")
            opened, cell = _median_pairs(lambda: _process(OPEN.format(case=case, out=out), ROOT, ROOT / "workbooks")[0],
                                         lambda: _process(ONE_CELL, ROOT)[0], repeat)
            _row(f"{case_id}: computing (open - one cell)", opened - cell, GOALS["run_all"], cell, "one cell",
                 speed_up=False)
            if before:
                old = statistics.median(_process(OPEN.format(case=case, out=out), before, Path(before) / "workbooks")[0]
                                        for _ in range(repeat))
                _row(f"{case_id}: before, computing", old - cell, GOALS["run_all"], cell, "one cell", speed_up=False)
    line = ProgressLine(live=False)
    from steamcalc.ui import workbook as workbook_module

    real = workbook_module.ProgressLine
    workbook_module.ProgressLine = lambda live: line
    try:
        with tempfile.TemporaryDirectory() as out:
            workbook_module.Workbook.open(DEMO / "cases" / "LD-01.toml", out)
    finally:
        workbook_module.ProgressLine = real
    print("  progress line while it runs: " + " | ".join(line.steps) + f" | then: {line.text}")


def enter(repeat):
    from steamcalc.ui.workbook import Workbook

    print("  Enter on a changed flow: until the results, and the charts, hold the new inputs")
    with tempfile.TemporaryDirectory() as out:
        for case_id in ("LD-01", "LD-02", "FL-01", "HX-01"):
            workbook = Workbook(DEMO / "cases" / f"{case_id}.toml", out)
            box = workbook.form.boxes[FLOWS[case_id[:2]]]
            number, unit = box.value.split(" ", 1)
            marks = {}
            workbook._results_html.observe(lambda c: marks.setdefault("results", time.perf_counter()), "value")
            workbook._chart.observe(lambda c: marks.setdefault("charts", time.perf_counter()), "outputs")
            times, step = {"results": [], "charts": []}, [0]

            def change():
                step[0] += 1
                marks.clear()
                start = time.perf_counter()
                box.value = f"{float(number) * (1 + 0.01 * step[0]):.4g} {unit}"
                end = time.perf_counter()   # a view whose drawing came out the same sent nothing: the update's end
                for key in times:
                    times[key].append(marks.get(key, end) - start)
                return marks.get("charts", end) - start

            inputs, site = workbook.inputs, workbook.site

            def bare():
                start = time.perf_counter()
                workbook.calc.calculate(inputs, site)
                return time.perf_counter() - start

            change()
            _median_pairs(change, bare, 4 * repeat)
            base = statistics.median(bare() for _ in range(3))
            for key in times:
                _row(f"{case_id}: Enter -> {key}", statistics.median(times[key][1:]), GOALS[key], base,
                     "calculate()")


if __name__ == "__main__":
    repeat = int(_argument("--repeat", 3))
    only = _argument("--only", "mc,register,workbook,enter").split(",")
    before = _argument("--before", None)
    if "mc" in only:
        monte_carlo(repeat, int(_argument("--loop-samples", 5000)))
    if "register" in only:
        register(repeat, int(_argument("--records", 600)), _argument("--site", None), before)
    if "workbook" in only:
        run_all(repeat, before)
    if "enter" in only:
        enter(repeat)
