"""Worked steps and checks are data: each view writes them in its own units, and the written arithmetic holds.

For every demo record, in SI and in US units, each worked step's substituted equation is evaluated as a
checker would evaluate it with a calculator: the numbers as the page prints them, each with its operand's
unit in that system (pint), the operations of the step's expression. It must give the value the page shows
for the step within 1e-3. The step's expression on the record's own operands must give its value to 1e-9
(the step states the arithmetic the calculation did). Checks of a quantity against limits carry a verdict
that those give.
"""

import ast
import json
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.units.formatting import CV_PER_KV
from steamcalc.units.quantities import Q_
from tests.worked_step_arithmetic import _FUNCTIONS, arithmetic, written_step_problems

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
DEMO_CASES = sorted((DEMO / "cases").glob("*.toml"))


@pytest.fixture(scope="module")
def demo_records(tmp_path_factory):
    """The demo site's records issued afresh as one run (the site balance reads the records it links)."""
    site = tmp_path_factory.mktemp("steps") / "site"
    shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records"))
    out = site / "issued"
    assert main(["run", str(site / "cases"), "--out", str(out), "--quiet"]) in (0, 1)
    return {path.stem: json.loads(next(out.glob(f"{path.stem}_rev*.json")).read_text(encoding="utf-8"))
            for path in DEMO_CASES}


@pytest.mark.parametrize("system", ["SI", "US"])
@pytest.mark.parametrize("case", [p.stem for p in DEMO_CASES])
def test_each_written_step_reproduces_its_value(demo_records, case, system):
    record = demo_records[case]
    assert all("expression" in step for step in record["steps"]), "every step is kept as data"
    assert sum(arithmetic(step) for step in record["steps"]) >= 5
    assert written_step_problems(record, (system,)) == []


@pytest.mark.parametrize("case", [p.stem for p in DEMO_CASES])
def test_each_step_expression_gives_its_value_on_the_record_operands(demo_records, case):
    for step in demo_records[case]["steps"]:
        if "expression" not in step or not arithmetic(step) or not isinstance(step["value"]["value"], float):
            continue
        values = {name: Q_(entry["value"], {"K": "delta_degC"}.get(entry["unit"], entry["unit"]) or "dimensionless")
                  for name, entry in step["operands"].items()}
        if step.get("units_fixed"):
            values = {name: q.magnitude for name, q in values.items()}
        got = eval(compile(ast.parse(step["expression"], mode="eval"), "<step>", "eval"),
                   {"__builtins__": {}, **_FUNCTIONS}, values)
        unit = step["value"]["unit"]
        got = got.to({"K": "delta_degC"}.get(unit, unit) or "dimensionless").magnitude if hasattr(got, "to") else got
        assert got == pytest.approx(step["value"]["value"], rel=1e-9, abs=1e-12), f"{case}: {step['label']}"


def test_cv_per_kv_is_the_iec_factor():
    # IEC 60534-1: Kv = 0.865 Cv, i.e. Cv = 1.156 Kv (to the standard's printed digits).
    assert round(CV_PER_KV, 3) == 1.156
