"""Benchmark: a batch of 500 cases, one process against the worker pool.

Writes 500 variants of the demo cases (without their [uncertainty] tables) to a temporary folder and runs them with
``steamcalc.batch.batch.run_cases``: once in this process (the baseline), once in worker
processes; prints the time per case and the ratio.

The demo batch repeats the seven demo cases under new ids, so a worker's memory of the states its cases share
serves most of each case. A third line runs the batch again with each let-down, flash and heater case at its own
flow (0.2 % apart, as a sweep would be), where only the states a flow does not change are shared.

    python tests/bench/bench_batch.py
"""

import os
import re
import shutil
import tempfile
import time
from pathlib import Path

from steamcalc.batch.batch import run_one, run_cases

DEMO = Path(__file__).resolve().parents[2] / "workbooks" / "demo_site"


#: The flow each distinct case changes, by the id's first letters (site balances and mains link by id: unchanged).
FLOWS = {"LD": "mass_flow", "FL": "condensate_flow", "HX": "process_flow"}


def make_cases(folder, count=500, distinct=False):
    shutil.copy(DEMO / "site.toml", folder / "site.toml")
    (folder / "cases").mkdir()
    templates = sorted((DEMO / "cases").glob("*.toml"))
    paths = []
    for i in range(count):
        template = templates[i % len(templates)]
        # Without the Monte Carlo table: this measures the batch machinery, not the bands.
        text = re.sub(r"\[uncertainty\].*?(?=^\[|\Z)", "", template.read_text(), flags=re.S | re.M)
        # The first round keeps the demo ids, so that the site balance's copies find the records they link.
        case_id = template.stem if i < len(templates) else f"{template.stem}-{i:03d}"
        text = text.replace(f'id = "{template.stem}"', f'id = "{case_id}"')
        key = FLOWS.get(template.stem[:2])
        if distinct and key and i >= len(templates):
            # Down for a let-down (its maximum flow stays above the normal flow), up for the others.
            scale = 1 - 0.0002 * i if template.stem.startswith("LD") else 1 + 0.0004 * i
            text = re.sub(rf'^({key} = )"([0-9.]+) ([^"]+)"',
                          lambda m: f'{m.group(1)}"{float(m.group(2)) * scale:.5f} {m.group(3)}"', text, count=1,
                          flags=re.M)
        path = folder / "cases" / f"{case_id}.toml"
        path.write_text(text)
        paths.append(path)
    return paths


if __name__ == "__main__":
    with tempfile.TemporaryDirectory() as tmp:
        paths = make_cases(Path(tmp))
        start = time.perf_counter()
        outcomes = [run_one(p, out_override=Path(tmp) / "serial") for p in paths]
        serial = time.perf_counter() - start
        start = time.perf_counter()
        pooled = run_cases(paths, out_override=Path(tmp) / "pool", progress=False)
        parallel = time.perf_counter() - start
        os.mkdir(Path(tmp) / "distinct")
        distinct_paths = make_cases(Path(tmp) / "distinct", distinct=True)
        start = time.perf_counter()
        spread = run_cases(distinct_paths, out_override=Path(tmp) / "distinct" / "pool", progress=False)
        distinct = time.perf_counter() - start
    ok = sum(o.ok for o in outcomes), sum(o.ok for o in pooled)
    print(f"  {'500 cases':<34} {'total s':>9} {'ms/case':>9} {'ratio':>7}")
    print(f"  {'baseline: one process':<34} {serial:>9.2f} {serial / len(paths) * 1e3:>9.2f} {1.0:>7.2f}")
    print(f"  {f'worker pool ({os.cpu_count()} cores)':<34} {parallel:>9.2f} {parallel / len(paths) * 1e3:>9.2f} "
          f"{parallel / serial:>7.2f}")
    print(f"  {'worker pool, each case its own flow':<34} {distinct:>9.2f} {distinct / len(paths) * 1e3:>9.2f} "
          f"{distinct / serial:>7.2f}")
    print(f"  records written: {ok[0]}, {ok[1]} and {sum(o.ok for o in spread)} of {len(paths)}")
