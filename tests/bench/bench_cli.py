"""Benchmark: command-line latency, measured as a user would (a fresh interpreter each time).

Each command runs several times, interleaved with the baselines so that machine load hits all
alike; medians are printed with their ratio to ``python -c "import iapws, pint, jinja2"``
(goal: ``run`` of one case without uncertainty and ``verify`` of one record within 2x) and to
an empty interpreter start (``--help`` and an argument error, goal under 0.15 s).

    python tests/bench/bench_cli.py
"""

import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
CASES = ROOT / "workbooks" / "demo_site" / "cases"


def seconds(args):
    start = time.perf_counter()
    subprocess.run(args, cwd=ROOT, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                   env={**os.environ, "PYTHONPATH": str(ROOT)})
    return time.perf_counter() - start


def main(repeat=5):
    out = Path(tempfile.mkdtemp(prefix="steamcalc-bench-"))
    steamcalc = [sys.executable, "-m", "steamcalc"]
    record = out / "LD-02_revA.json"
    subprocess.run(steamcalc + ["run", str(CASES / "LD-02.toml"), "--out", str(out)], cwd=ROOT,
                   stdout=subprocess.DEVNULL, env={**os.environ, "PYTHONPATH": str(ROOT)}, check=False)
    commands = {
        "empty interpreter: python -c pass": [sys.executable, "-c", "pass"],
        "baseline: python -c 'import iapws, pint, jinja2'": [sys.executable, "-c", "import iapws, pint, jinja2"],
        "steamcalc --help": steamcalc + ["--help"],
        "steamcalc verify (argument error)": steamcalc + ["verify"],
        "steamcalc run LD-02 (no uncertainty)": steamcalc + ["run", str(CASES / "LD-02.toml"), "--out", str(out)],
        "steamcalc verify LD-02": steamcalc + ["verify", str(record)],
        "steamcalc verify --engine fast LD-02": steamcalc + ["verify", "--engine", "fast", str(record)],
    }
    times = {name: [] for name in commands}
    for _ in range(repeat):
        for name, args in commands.items():
            times[name].append(seconds(args))
    shutil.rmtree(out, ignore_errors=True)
    medians = {name: statistics.median(t) for name, t in times.items()}
    empty = medians["empty interpreter: python -c pass"]
    baseline = medians["baseline: python -c 'import iapws, pint, jinja2'"]
    print(f"  {'command (median of ' + str(repeat) + ')':<48} {'s':>7} {'/ empty':>8} {'/ baseline':>10}")
    for name, value in medians.items():
        print(f"  {name:<48} {value:>7.3f} {value / empty:>8.2f} {value / baseline:>10.2f}")
    print(f"  --help above an empty start: {medians['steamcalc --help'] - empty:.3f} s")


if __name__ == "__main__":
    main()
