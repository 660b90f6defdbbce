"""A checker's calculator: a worked step evaluated on the numbers its page prints, each in its operand's unit.

Shared by ``tests/test_worked_steps.py`` (the demo records) and ``tests/issue_every_case.py`` (every drawn
case): independent of steamcalc's own writer, it reads the printed numbers back, gives each the unit its
operand has in the page's system (pint), and runs the step's expression on them.
"""

import ast
import math
import re

from steamcalc.render.display import display_record
from steamcalc.units.formatting import US_UNITS
from steamcalc.units.quantities import Q_

_PRINTED_NUMBER = re.compile(r"(?<![\w.])-?(?:\d{1,3}(?:,\d{3})+|\d+)(?:\.\d+)?(?:e[+-]?\d+)?(?![\w²³⁴])")
_POWER_OF_TEN = re.compile(r"(\d[\d.,]*) × 10([⁻]?[⁰¹²³⁴⁵⁶⁷⁸⁹]+)")
_FROM_SUPERSCRIPT = str.maketrans("⁻⁰¹²³⁴⁵⁶⁷⁸⁹", "-0123456789")
_FUNCTIONS = {"sqrt": lambda x: x ** 0.5, "ln": lambda x: math.log(_plain(x)), "log10": lambda x: math.log10(_plain(x)),
              "exp": lambda x: math.exp(_plain(x)), "abs": abs, "min": min, "max": max}


def _plain(x):
    return x.to("dimensionless").magnitude if hasattr(x, "to") else x


def _unit_in(entry, system):
    """The unit an operand is written in: the record's in SI, pint's US counterpart in US (Kv as a bare Cv)."""
    unit = entry.get("unit", "")
    if system == "US" and entry.get("role") == "flow_coefficient":
        return ""
    return US_UNITS.get(unit, unit) if system == "US" else unit


def _symbols_in_print_order(tree):
    """Names and numbers of an expression in the order a left-to-right writing prints them."""
    order = []

    def walk(node):
        if isinstance(node, ast.BinOp):
            walk(node.left)
            walk(node.right)
        elif isinstance(node, ast.UnaryOp):
            walk(node.operand)
        elif isinstance(node, ast.Call):
            for arg in node.args:
                walk(arg)
        elif isinstance(node, (ast.Name, ast.Constant)):
            order.append(node)
        elif isinstance(node, ast.Expression):
            walk(node.body)
    walk(tree)
    return order


def evaluate_as_printed(step, system, fixed=False):
    """The step's arithmetic on the numbers its substitution prints, each in its operand's unit."""
    tree = ast.parse(step["expression"], mode="eval")
    written = step["substituted"].split(" = ", 1)[1] if " = " in step["substituted"] else step["substituted"]
    written = written.split(" (in the units shown")[0]
    # The page writes 2.839e-4 as "2.839 × 10⁻⁴": read it back as the number it is.
    written = _POWER_OF_TEN.sub(lambda m: f"{m.group(1)}e{m.group(2).translate(_FROM_SUPERSCRIPT)}", written)
    printed = [float(n.replace(",", "")) for n in _PRINTED_NUMBER.findall(written.replace("−", "-"))]
    order = _symbols_in_print_order(tree)
    assert len(printed) == len(order), f"{step['label']}: {written!r} prints {printed}, expression has {len(order)}"
    values = {}
    for node, number in zip(order, printed):
        if isinstance(node, ast.Name):
            operand = step["operands"][node.id]
            unit = _unit_in(operand, system)
            # A record's "K" is a temperature difference (temperatures are in °C); a step in fixed units
            # is evaluated on its numbers as printed, in the units its constant is for.
            values[node.id] = number if fixed else Q_(number, {"K": "delta_degC"}.get(unit, unit) or "dimensionless")
        else:
            assert math.isclose(number, node.value), f"{step['label']}: constant {node.value} printed as {number}"
    return eval(compile(tree, "<step>", "eval"), {"__builtins__": {}, **_FUNCTIONS}, values)


def arithmetic(step):
    tree = ast.parse(step["expression"], mode="eval")
    return all(n.func.id in _FUNCTIONS for n in ast.walk(tree) if isinstance(n, ast.Call))




def written_step_problems(record, systems=("SI", "US")):
    """Each arithmetic step whose printed arithmetic misses its shown value by more than 1e-3, in each system."""
    problems = []
    for system in systems:
        shown = display_record({**record, "site": {**record["site"], "display_units": system}})
        for step in shown["steps"]:
            if "expression" not in step or not arithmetic(step) or not isinstance(step["value"].get("value"), float):
                continue
            fixed = step.get("units_fixed", False)
            try:
                got = evaluate_as_printed(step, "SI" if fixed else system, fixed)
                unit = step["value"]["unit"]
                if hasattr(got, "to"):
                    got = got.to({"K": "delta_degC"}.get(unit, unit) or "dimensionless").magnitude
            except Exception as exc:   # a page a calculator cannot evaluate is itself the finding
                problems.append(f"{system}: {step['label']}: {step['substituted']} cannot be evaluated ({exc})")
                continue
            want = step["value"]["value"]
            if not math.isclose(got, want, rel_tol=1e-3, abs_tol=1e-9):
                problems.append(f"{system}: {step['label']}: {step['substituted']} gives {got:.6g}, shown {want:.6g}")
    return problems
