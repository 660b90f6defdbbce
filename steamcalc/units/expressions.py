"""A worked step's arithmetic as data: an expression over named amounts, evaluated and written in any units.

A step keeps its expression in a small, safe subset of Python (``m_s*(h2 - h3)/(h3 - h_w)``): names,
numbers, ``+ - * / **``, and the functions :data:`ARITHMETIC`. A call of any other function (``h(p1, T1)``)
is a property lookup, which a view writes with its operands but cannot evaluate. The views write the
substituted equation from the operands in their own units, with pint; :func:`substituted` adds figures
until the written arithmetic reproduces the step's value, so the page can be checked with a calculator.
"""

from __future__ import annotations

import ast
import math
from functools import lru_cache

import pint

from .amounts import Amount, to_base  # noqa: F401  (Amount: the doctests use it)
from .formatting import _group, format_number
from .quantities import Q_  # noqa: F401  (the doctests use it)

#: Functions a step's arithmetic may use, evaluated on plain numbers or pint quantities.
ARITHMETIC = ("sqrt", "ln", "log10", "exp", "abs", "min", "max")
#: Agreement the written arithmetic must reach with the step's value (relative).
REPRODUCE = 1e-3

_BINARY = {ast.Add: (1, " + "), ast.Sub: (1, " − "), ast.Mult: (2, " × "), ast.Div: (2, " / "), ast.Pow: (4, "^")}


class ExpressionError(ValueError):
    """An expression outside the subset a record may hold."""


@lru_cache(maxsize=4096)
def parse(expression):
    """The checked syntax tree of an expression; :class:`ExpressionError` for anything outside the subset.

    Examples
    --------
    >>> sorted(names(parse("m_s*(h2 - h3)/(h3 - h_w)")))
    ['h2', 'h3', 'h_w', 'm_s']
    >>> parse("__import__('os')")
    Traceback (most recent call last):
    ...
    steamcalc.units.expressions.ExpressionError: name '__import__' is not a symbol a step may use
    """
    try:
        tree = ast.parse(expression, mode="eval")
    except SyntaxError as exc:
        raise ExpressionError(f"expression {expression!r} is not valid: {exc.msg}") from None
    for node in ast.walk(tree):
        if isinstance(node, ast.Name) and node.id.startswith("_"):
            raise ExpressionError(f"name {node.id!r} is not a symbol a step may use")
        if isinstance(node, ast.Call) and (not isinstance(node.func, ast.Name) or node.keywords):
            raise ExpressionError(f"expression {expression!r}: only plain function calls")
        if not isinstance(node, (ast.Expression, ast.BinOp, ast.UnaryOp, ast.Name, ast.Constant, ast.Call, ast.Load,
                                 ast.USub, ast.UAdd, *_BINARY)):
            raise ExpressionError(f"expression {expression!r}: {type(node).__name__} is not allowed")
        if isinstance(node, ast.Constant) and not isinstance(node.value, (int, float)):
            raise ExpressionError(f"expression {expression!r}: only numbers as constants")
    return tree


@lru_cache(maxsize=4096)
def names(tree):
    """The operand symbols of an expression (function names excluded)."""
    called = {id(n.func) for n in ast.walk(tree) if isinstance(n, ast.Call)}
    return frozenset(n.id for n in ast.walk(tree) if isinstance(n, ast.Name) and id(n) not in called)


@lru_cache(maxsize=4096)   # trees come from the parse cache, so each is met again as the same object
def is_arithmetic(tree):
    """True when the expression calls no property function: a view can evaluate it."""
    return all(n.func.id in ARITHMETIC for n in ast.walk(tree) if isinstance(n, ast.Call))


def _call(name, args):
    if name in ("min", "max"):
        return (min if name == "min" else max)(args)
    (x,) = args
    if name == "abs":
        return abs(x)
    if name == "sqrt":
        return x ** 0.5
    plain = x.to("dimensionless").magnitude if isinstance(x, pint.Quantity) else x
    return {"ln": math.log, "log10": math.log10, "exp": math.exp}[name](plain)


def evaluate(tree, values):
    """The expression's value with ``values`` (numbers or pint quantities) for its symbols.

    Examples
    --------
    >>> evaluate(parse("m*(h1 - h2)"), {"m": 2.0, "h1": 10.0, "h2": 4.0})
    12.0
    >>> round(evaluate(parse("m*(h1 - h2)"), {"m": Q_(3600, "kg/h"), "h1": Q_(10, "kJ/kg"),
    ...                                      "h2": Q_(4, "kJ/kg")}).to("kW").magnitude, 9)
    6.0
    """
    def walk(node):
        if isinstance(node, ast.Expression):
            return walk(node.body)
        if isinstance(node, ast.Constant):
            return float(node.value)   # never an integer power: 10**10**10 overflows at once instead of running on
        if isinstance(node, ast.Name):
            return values[node.id]
        if isinstance(node, ast.UnaryOp):
            return -walk(node.operand) if isinstance(node.op, ast.USub) else walk(node.operand)
        if isinstance(node, ast.Call):
            if node.func.id not in ARITHMETIC:
                raise ExpressionError(f"{node.func.id}() is a property lookup, not arithmetic")
            return _call(node.func.id, [walk(a) for a in node.args])
        left, right = walk(node.left), walk(node.right)
        op = type(node.op)
        if op is ast.Add:
            return left + right
        if op is ast.Sub:
            return left - right
        if op is ast.Mult:
            return left * right
        if op is ast.Div:
            return left / right
        return left ** right
    return walk(tree)


def write(tree, name_text):
    """The expression written for people (``×``, ``−``), each symbol written by ``name_text(symbol)``.

    Examples
    --------
    >>> write(parse("m_s*(h2 - h3)/(h3 - h_w)"), str)
    'm_s × (h2 − h3) / (h3 − h_w)'
    >>> write(parse("a - (b - c) + (d + e)"), str), write(parse("sqrt(x**2)"), str)
    ('a − (b − c) + d + e', 'sqrt(x^2)')
    >>> write(parse("v**2"), lambda symbol: "28.89 m/s")
    '(28.89 m/s)^2'
    """
    def walk(node):
        if isinstance(node, ast.Expression):
            return walk(node.body)[0]
        if isinstance(node, ast.Constant):
            return format(node.value, "g") if isinstance(node.value, float) else str(node.value), 9
        if isinstance(node, ast.Name):
            return name_text(node.id), 9
        if isinstance(node, ast.UnaryOp):
            text, precedence = walk(node.operand)
            text = f"({text})" if precedence < 3 else text
            return ("−" if isinstance(node.op, ast.USub) else "") + text, 3
        if isinstance(node, ast.Call):
            return f"{node.func.id}({', '.join(walk(a)[0] for a in node.args)})", 9
        precedence, symbol = _BINARY[type(node.op)]
        (left, lp), (right, rp) = walk(node.left), walk(node.right)
        right_assoc = isinstance(node.op, ast.Pow)
        if lp < precedence or (right_assoc and lp == precedence) or (right_assoc and " " in left):
            left = f"({left})"   # "(28.89 m/s)^2", never "28.89 m/s^2", which reads as an acceleration
        if rp < precedence or (not right_assoc and rp == precedence and isinstance(node.op, (ast.Sub, ast.Div))):
            right = f"({right})"
        return f"{left}{symbol}{right}", precedence
    return walk(tree)


def _number(amount, system, figures):
    value, unit = amount.in_system(system)
    if figures is None:
        return format_number(value, unit)
    if value == 0:
        return "0"
    decimals = max(figures - 1 - math.floor(math.log10(abs(value))), 0)
    return _group(f"{value:.{decimals}f}")


def written_value(text):
    """The number a substituted amount's text shows (``'4,500'`` → 4500.0)."""
    return float(text.replace(",", ""))


def reproduces(tree, amounts, system, target, figures=None, units_fixed=False):
    """True when the expression, evaluated on the amounts as written, gives ``target`` within 1e-3.

    Each written number is taken to its coherent SI base unit, where arithmetic on plain numbers is
    dimensionally sound (°C to K with its offset, a record "K" as a difference); a step in fixed units is
    evaluated on its numbers as written.
    """
    if not is_arithmetic(tree):
        return True
    try:
        if units_fixed:
            got = evaluate(tree, {n: written_value(_number(a, system, figures)) for n, a in amounts.items()})
            want = target.value
        else:
            values = {}
            for name, a in amounts.items():
                scale, offset = to_base(a.in_system(system)[1])
                values[name] = written_value(_number(a, system, figures)) * scale + offset
            got = evaluate(tree, values)
            value, unit = target.in_system(system)
            scale, offset = to_base(unit)
            want = value * scale + offset
    except (ZeroDivisionError, ValueError, OverflowError, TypeError):
        return False
    return abs(got - want) <= REPRODUCE * abs(want) + 1e-12


def substituted(tree, amounts, system="SI", target=None, units_fixed=False):
    """The expression with each symbol replaced by its amount in ``system``, to enough figures.

    Numbers are first written to the figures their quantity calls for; when the arithmetic so written
    does not reproduce ``target`` within 1e-3 (a difference of near numbers), every number gains a
    figure, up to ten. A step in fixed units is written in its own (SI) units.

    Examples
    --------
    >>> tree = parse("m_s*(h2 - h3)/(h3 - h_w)")
    >>> amounts = {"m_s": Amount(4500.0, "kg/h"), "h2": Amount(2950.12, "kJ/kg"),
    ...            "h3": Amount(2760.3, "kJ/kg"), "h_w": Amount(440.2, "kJ/kg")}
    >>> substituted(tree, amounts, "SI", Amount(368.1, "kg/h"))
    '4,500.0 kg/h × (2,950.1 kJ/kg − 2,760.3 kJ/kg) / (2,760.3 kJ/kg − 440.20 kJ/kg)'
    >>> substituted(tree, amounts, "US", Amount(368.1, "kg/h"))
    '9,920.8 lb/h × (1,268.3 Btu/lb − 1,186.7 Btu/lb) / (1,186.7 Btu/lb − 189.25 Btu/lb)'
    >>> substituted(parse("T2 - T_sat2"), {"T2": Amount(150.3, "degC"), "T_sat2": Amount(149.8, "degC")},
    ...             "US", Amount(0.5, "K"))
    '302.5 °F − 301.6 °F'
    """
    system = "SI" if units_fixed else system
    figures = None
    if target is not None and is_arithmetic(tree):
        for attempt in (None, 5, 6, 7, 8, 9, 10):
            if reproduces(tree, amounts, system, target, attempt, units_fixed):
                figures = attempt
                break
        else:
            figures = 10

    def name_text(symbol):
        amount = amounts[symbol]
        text = _number(amount, system, figures)
        unit = amount.unit_text(system)
        if system == "US" and amount.role == "flow_coefficient":
            return f"Cv {text}"
        return f"{text} {unit}" if unit else text
    return write(tree, name_text)



def written_step(equation, expression, operands, target, system="SI", units_fixed=False):
    """A step's equation with its numbers: the left side of ``equation``, then its substituted expression.

    Examples
    --------
    >>> written_step("m_3 = m_s + m_w", "m_s + m_w", {"m_s": Amount(4500.0, "kg/h"), "m_w": Amount(216.5, "kg/h")},
    ...              Amount(4716.5, "kg/h"))
    'm_3 = 4,500 kg/h + 216.5 kg/h'
    """
    exact = [_exact(a) for a in operands.values()] + [_exact(target)]
    if None in exact:
        return _written_step(equation, expression, tuple(operands.items()), target, system, units_fixed)
    return _written_remembered(equation, expression, tuple(zip(operands, exact[:-1])), exact[-1], system, units_fixed)


def _exact(item):
    """An amount as a key that tells apart what its writing may tell apart (0.0 and -0.0, 1 and 1.0); None
    for anything else (a subclass, another type), which is written without being remembered."""
    if item is None:
        return ()
    if type(item) is not Amount:
        return None
    return repr(item.value), item.value, item.unit, item.basis, item.role


@lru_cache(maxsize=8192)
def _written_remembered(equation, expression, operands, target, system, units_fixed):
    # A step is written the same wherever it comes from: a site's records share most of theirs (the states of
    # its headers), and verify and the reports write each one again.
    return _written_step(equation, expression, tuple((symbol, Amount(*key[1:])) for symbol, key in operands),
                         Amount(*target[1:]) if target else None, system, units_fixed)


def _written_step(equation, expression, operands, target, system, units_fixed):
    text = substituted(parse(expression), dict(operands), system, target, units_fixed)
    lhs = equation.split(" = ", 1)[0] if " = " in equation else ""
    return f"{lhs} = {text}" if lhs and lhs != text else text
