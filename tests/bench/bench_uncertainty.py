"""Benchmark: the Monte Carlo bands of LD-01 (2,000 samples with the sensitivity; goal 0.2 s).

Side by side in one run, interleaved, on the fast engine (seuif97): the per-sample path
(``calculate()`` once per sample, numbers only) as the baseline, and the vectorised path
(``steamcalc.calcs.letdown.vector``, all samples at once) as records make them — both with the
nominal case computed inside the run, and the vectorised one also with the nominal passed in,
as ``steamcalc run`` does (it has computed the record's result already). With ``--iapws`` the
per-sample path on the reference engine is timed once too; with ``--before PATH`` (a checkout
of an earlier steamcalc) the same run of that version, in a subprocess.

    python tests/bench/bench_uncertainty.py [--repeat 3] [--iapws] [--before /path/to/old/checkout]
"""

import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
CASE = ROOT / "workbooks" / "demo_site" / "cases" / "LD-01.toml"

TIMER = f"""
import time
from steamcalc.calcs import get_calculation
from steamcalc.cases.site import case_inputs, case_site, load_case
from steamcalc.runs.uncertainty import parse_tolerances, run_uncertainty
case = load_case({str(CASE)!r}); site = case_site(case); inputs, _ = case_inputs(case, site)
calc = get_calculation(case.kind)
tolerances, samples, seed = parse_tolerances(calc.Inputs, case.uncertainty, inputs)
run_uncertainty(calc, inputs, site, tolerances, 20, seed)
start = time.perf_counter(); run_uncertainty(calc, inputs, site, tolerances, samples, seed)
print(time.perf_counter() - start)
"""


def _case():
    from steamcalc.calcs import get_calculation
    from steamcalc.cases.site import case_inputs, case_site, load_case
    from steamcalc.runs.uncertainty import parse_tolerances

    case = load_case(CASE)
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    calc = get_calculation(case.kind)
    tolerances, samples, seed = parse_tolerances(calc.Inputs, case.uncertainty, inputs)
    return calc, inputs, site, tolerances, samples, seed


def timed(engine="fast", vectorised=True, nominal=False):
    """(wall, CPU) seconds for one run of LD-01's bands, and the section it made. The CPU time of
    this process is less disturbed than the wall time on a shared machine."""
    from steamcalc.runs.uncertainty import run_uncertainty

    calc, inputs, site, tolerances, samples, seed = _case()
    given = calc.calculate(inputs, site) if nominal else None
    start, cpu = time.perf_counter(), time.process_time()
    section = run_uncertainty(calc, inputs, site, tolerances, samples, seed, engine=engine, vectorised=vectorised,
                              nominal_result=given)
    return (time.perf_counter() - start, time.process_time() - cpu), section


def before(path):
    # Run from the checkout itself: ``python -c`` puts the working folder first on the path.
    done = subprocess.run([sys.executable, "-c", TIMER], capture_output=True, text=True, cwd=str(path),
                          env={**os.environ, "PYTHONPATH": str(path)}, check=True)
    return float(done.stdout.split()[-1])


def _row(label, seconds, baseline):
    if isinstance(seconds, float):
        print(f"  {label:<62} {seconds:>8.3f} {'':>8} {baseline[0] / seconds:>9.1f}")
        return
    print(f"  {label:<62} {seconds[0]:>8.3f} {seconds[1]:>8.3f} {baseline[0] / seconds[0]:>9.1f}")


if __name__ == "__main__":
    repeat = int(sys.argv[sys.argv.index("--repeat") + 1]) if "--repeat" in sys.argv else 3
    old = sys.argv[sys.argv.index("--before") + 1] if "--before" in sys.argv else None
    timed(vectorised=True)   # warm-up: imports, the array engine
    timed(vectorised=False)
    runs = {"loop": [], "vector": [], "vector_nominal": [], "old": []}
    for _ in range(repeat):
        runs["loop"].append(timed(vectorised=False)[0])
        runs["vector"].append(timed(vectorised=True)[0])
        seconds, section = timed(vectorised=True, nominal=True)
        runs["vector_nominal"].append(seconds)
        if old:
            runs["old"].append(before(old))
    median = {k: tuple(statistics.median(column) for column in zip(*v)) if k != "old" else statistics.median(v)
              for k, v in runs.items() if v}
    loop = median["loop"]
    print(f"  {'LD-01, ' + str(section['samples']) + ' samples with sensitivity (median of ' + str(repeat) + ')':<62}"
          f" {'wall s':>8} {'CPU s':>8} {'speed-up':>9}")
    if "--iapws" in sys.argv:
        _row("per-sample path on the reference engine (iapws)", timed(engine="iapws", vectorised=False)[0], loop)
    if old:
        _row("before: " + str(old), median["old"], loop)
    _row("baseline: per-sample path, calculate() per sample (seuif97)", loop, loop)
    _row("vectorised path (seuif97), nominal computed in the run", median["vector"], loop)
    _row("vectorised path, nominal passed in (as steamcalc run does)", median["vector_nominal"], loop)
    print(f"  goal 0.2 s: vectorised {median['vector'][0]:.3f} s wall ({median['vector'][1]:.3f} s CPU), "
          f"{loop[0] / median['vector'][0]:.1f}x the per-sample path")
    print("  " + section["summary"][0])
