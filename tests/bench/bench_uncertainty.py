"""Benchmark: the Monte Carlo bands of LD-01 (2,000 samples; target under 1 s).

Baseline: the same number of plain calculate() calls on the reference (iapws) engine;
the uncertainty run uses the fast IF97 engine for its samples.

    python tests/bench/bench_uncertainty.py
"""

import time
from pathlib import Path

from steamcalc.calcs import get_calculation
from steamcalc.site import case_inputs, case_site, load_case
from steamcalc.uncertainty import parse_tolerances, run_uncertainty

CASE = Path(__file__).resolve().parents[2] / "workbooks" / "demo_site" / "cases" / "LD-01.toml"

if __name__ == "__main__":
    case = load_case(CASE)
    site = case_site(case)
    inputs, _ = case_inputs(case, site)
    calc = get_calculation(case.kind)
    tolerances, samples, seed = parse_tolerances(calc.Inputs, case.uncertainty, inputs)
    start = time.perf_counter()
    for _ in range(samples):
        calc.calculate(inputs, site)
    baseline = time.perf_counter() - start
    start = time.perf_counter()
    section = run_uncertainty(calc, inputs, site, tolerances, samples, seed)
    ours = time.perf_counter() - start
    print(f"  {'LD-01, ' + str(samples) + ' samples':<48} {'s':>8} {'ratio':>7}")
    print(f"  {'baseline: calculate() x samples, iapws engine':<48} {baseline:>8.2f} {1.0:>7.2f}")
    print(f"  {'run_uncertainty (fast engine, + sensitivity)':<48} {ours:>8.2f} {ours / baseline:>7.2f}")
    print("  " + section["summary"][0])
