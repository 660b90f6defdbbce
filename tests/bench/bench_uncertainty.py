"""Benchmark: the Monte Carlo bands of LD-01 (2,000 samples with the sensitivity; goal 0.2 s).

Side by side in one run: the samples on the reference engine (iapws) as the baseline, and on the
fast engine (seuif97) as records make them. With ``--before PATH`` (a checkout of an earlier
steamcalc) the same run of that version is timed too, in a subprocess, interleaved.

    python tests/bench/bench_uncertainty.py [--before /path/to/old/steamcalc/checkout]
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
from steamcalc.site import case_inputs, case_site, load_case
from steamcalc.uncertainty import parse_tolerances, run_uncertainty
case = load_case({str(CASE)!r}); site = case_site(case); inputs, _ = case_inputs(case, site)
calc = get_calculation(case.kind)
tolerances, samples, seed = parse_tolerances(calc.Inputs, case.uncertainty, inputs)
run_uncertainty(calc, inputs, site, tolerances, 20, seed)
start = time.perf_counter(); run_uncertainty(calc, inputs, site, tolerances, samples, seed)
print(time.perf_counter() - start)
"""


def in_process(engine, repeat):
    from steamcalc.calcs import get_calculation
    from steamcalc.site import case_inputs, case_site, load_case
    from steamcalc.uncertainty import parse_tolerances, run_uncertainty

    case = load_case(CASE)
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    calc = get_calculation(case.kind)
    tolerances, samples, seed = parse_tolerances(calc.Inputs, case.uncertainty, inputs)
    run_uncertainty(calc, inputs, site, tolerances, 20, seed, engine=engine)
    runs = []
    for _ in range(repeat):
        start = time.perf_counter()
        section = run_uncertainty(calc, inputs, site, tolerances, samples, seed, engine=engine)
        runs.append(time.perf_counter() - start)
    return statistics.median(runs), section


def before(path):
    done = subprocess.run([sys.executable, "-c", TIMER], capture_output=True, text=True,
                          env={**os.environ, "PYTHONPATH": str(path)}, check=True)
    return float(done.stdout.split()[-1])


if __name__ == "__main__":
    old = sys.argv[sys.argv.index("--before") + 1] if "--before" in sys.argv else None
    reference, _ = in_process("iapws", 1)
    times, old_times = [], []
    for _ in range(3):
        if old:
            old_times.append(before(old))
        times.append(in_process("fast", 1)[0])
    fast, section = in_process("fast", 1)
    fast = statistics.median(times + [fast])
    print(f"  {'LD-01, ' + str(section['samples']) + ' samples with sensitivity':<52} {'s':>8} {'ratio':>7}")
    print(f"  {'baseline: samples on the reference engine (iapws)':<52} {reference:>8.2f} {1.0:>7.2f}")
    if old:
        median_old = statistics.median(old_times)
        print(f"  {'before: ' + str(old):<52} {median_old:>8.2f} {median_old / reference:>7.2f}")
    print(f"  {'run_uncertainty (fast engine, seuif97)':<52} {fast:>8.2f} {fast / reference:>7.2f}")
    if old:
        print(f"  now {median_old / fast:.2f}x faster than before")
    print("  " + section["summary"][0])
