"""A worked step written from memory reads exactly as written afresh, in SI and US, and amounts that print
differently (0.0 and -0.0, 1 and 1.0) are never taken for one another."""

import json
from pathlib import Path

import pytest

from steamcalc.units.amounts import Amount
from steamcalc.units.expressions import _exact, _written_step, written_step

ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_3"


def _steps():
    for path in sorted(ARCHIVE.glob("*.json")):
        record = json.loads(path.read_text(encoding="utf-8"))
        for i, step in enumerate(record["steps"]):
            if step.get("expression"):
                yield f"{path.stem} step {i + 1}", step


STEPS = list(_steps())


def _amount(entry):
    return Amount(entry["value"], entry["unit"], entry.get("basis", "absolute"), entry.get("role", ""))


@pytest.mark.parametrize("system", ["SI", "US"])
def test_every_archived_step_reads_the_same_from_memory(system):
    assert len(STEPS) > 100
    for name, step in STEPS:
        operands = {symbol: _amount(a) for symbol, a in step["operands"].items()}
        value = step["value"]
        target = _amount(value) if isinstance(value.get("value"), (int, float)) else None
        fixed = bool(step.get("units_fixed"))
        fresh = _written_step(step["equation"], step["expression"], tuple(operands.items()), target, system, fixed)
        for _ in range(2):   # the first call writes it, the second reads it back from memory
            assert written_step(step["equation"], step["expression"], operands, target, system, fixed) == fresh, name


def test_amounts_that_print_differently_are_different_keys():
    assert _exact(Amount(0.0, "K")) != _exact(Amount(-0.0, "K"))
    assert _exact(Amount(1, "K")) != _exact(Amount(1.0, "K"))
    assert _exact(Amount(1.0, "bar")) != _exact(Amount(1.0, "bar", basis="difference"))
