"""Benchmark: what a widget change costs in each workbook (target ≤ 50 ms median).

A change re-parses the form, recomputes, rebuilds the record, the charts, the table and the
preview. Printed beside the bare calculate() of the same case as the baseline.

    python tests/bench/bench_workbook.py
"""

import tempfile
from pathlib import Path

from steamcalc.calcs import get_calculation
from steamcalc.cases.site import case_inputs, case_site, load_case
from steamcalc.ui.workbook import Workbook
from timing import median_seconds  # the script's own folder

DEMO = Path(__file__).resolve().parents[2] / "workbooks" / "demo_site" / "cases"


def median_ms(fn, repeat=25):
    return median_seconds(fn, repeat) * 1e3


if __name__ == "__main__":
    print(f"  {'case':<8} {'calculate() ms':>15} {'widget change ms':>17} {'ratio':>7}")
    with tempfile.TemporaryDirectory() as out:
        for name in ("LD-01", "LD-02", "FL-01", "HX-01"):
            case = load_case(DEMO / f"{name}.toml")
            site = case_site(case)
            inputs, _ = case_inputs(case, site)
            calc = get_calculation(case.kind)
            base = median_ms(lambda: calc.calculate(inputs, site))
            workbook = Workbook(DEMO / f"{name}.toml", out)
            change = median_ms(workbook.update)
            print(f"  {name:<8} {base:>15.2f} {change:>17.2f} {change / base:>7.1f}")
