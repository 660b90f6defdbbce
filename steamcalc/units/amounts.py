"""Quantities a record keeps as data, and texts that carry them: the record's units stay at the edge.

An :class:`Amount` is a number with its record unit (and, for a pressure, whether it is a pressure or a
difference). A :class:`Phrase` is a sentence with amounts in named slots, such as a check's detail
``"{velocity:.1f} (limit {limit:g}, common practice)"``: the record keeps the template and the
amounts, and every view writes the sentence in its own units. The SI text is the template filled
with the amounts as given; the US text converts each amount with pint and writes it to as many
significant figures as its SI text shows, so a view never rewrites a text.
"""

from __future__ import annotations

import math
import re
import string
from dataclasses import dataclass, field
from functools import lru_cache

from .formatting import CV_PER_KV, US_UNITS, _group, format_number, unit_label
from .quantities import Q_

#: What an amount is, where its unit alone does not say: a flow coefficient shows as Cv in US units.
ROLES = ("", "flow_coefficient")
BASES = ("absolute", "difference")


@dataclass(frozen=True)
class Amount:
    """A number with its unit, as a record keeps it.

    Parameters
    ----------
    value : float
        The number, in ``unit``.
    unit : str
        A record unit in pint spelling (``"kg/h"``, ``"degC"``, ``"bar"``); ``""`` for a pure number.
        ``"K"`` is always a temperature difference: records hold temperatures in °C.
    basis : str
        For a pressure, ``"absolute"`` (records hold absolute pressures) or ``"difference"``.
    role : str
        ``"flow_coefficient"`` for a Kv (m³/h), which US views show as a Cv without unit.

    Examples
    --------
    >>> Amount(148.78, "degC").shown("SI", ".2f")
    '148.78 °C'
    >>> Amount(148.78, "degC").shown("US", ".2f")
    '299.80 °F'
    >>> Amount(10.0, "K").shown("US", ".2f"), Amount(2.0, "bar").shown("US", ".3f")
    ('18.00 °F', '29.01 psia')
    >>> Amount(63.0, "m**3/h", role="flow_coefficient").shown("US", "g")
    'Cv 72.8'
    """

    value: float
    unit: str = ""
    basis: str = "absolute"
    role: str = ""

    def __post_init__(self):
        if isinstance(self.value, bool) or not isinstance(self.value, (int, float)):
            raise TypeError(f"an amount is a number, not {self.value!r}")
        if not math.isfinite(self.value):
            raise ArithmeticError(f"amount {self.value} {self.unit} is not finite")
        if self.basis not in BASES or self.role not in ROLES:
            raise ValueError(f"amount basis {self.basis!r} or role {self.role!r} unknown")

    def to_record(self):
        entry = {"value": float(self.value), "unit": self.unit}
        if self.basis != "absolute":
            entry["basis"] = self.basis
        if self.role:
            entry["role"] = self.role
        return entry

    @classmethod
    def from_record(cls, entry):
        return cls(entry["value"], entry.get("unit", ""), entry.get("basis", "absolute"), entry.get("role", ""))

    def in_system(self, system):
        """(value, unit) in the display system: pint for US, the record's own for SI."""
        if system != "US":
            return self.value, self.unit
        if self.role == "flow_coefficient":
            return self.value * CV_PER_KV, ""
        if self.unit not in US_UNITS:
            return self.value, self.unit
        target = US_UNITS[self.unit]
        scale, offset = _affine(self.unit, target)
        return self.value * scale + offset, target

    def number(self, system, spec=""):
        """The number as written in ``system``; in US to the significant figures of its SI text."""
        si_text = format_number(self.value, self.unit) if not spec else _formatted(self.value, spec)
        if system != "US":
            return si_text
        value, unit = self.in_system(system)
        if (value, unit) == (self.value, self.unit):
            return si_text   # a percentage, a ratio, a currency: the same number in either system
        text = _like(si_text, value, unit, spec)
        return f"+{text}" if spec.startswith("+") and value >= 0 else text

    def unit_text(self, system):
        _, unit = self.in_system(system)
        if system == "US" and self.role == "flow_coefficient":
            return ""
        return unit_label(unit, self.basis)

    def shown(self, system="SI", spec=""):
        """The amount as a text reads it: number and unit (a Cv as ``Cv 72.8``)."""
        number = self.number(system, spec)
        if system == "US" and self.role == "flow_coefficient":
            return f"Cv {number}"
        unit = self.unit_text(system)
        return f"{number} {unit}" if unit else number


@lru_cache(maxsize=None)
def _affine(unit, target):
    """Every unit conversion is affine (°C to °F has an offset): its scale and offset, found once by pint."""
    zero = float(Q_(0.0, unit).to(target).magnitude)
    return float(Q_(1.0, unit).to(target).magnitude) - zero, zero


@lru_cache(maxsize=None)
def to_base(unit):
    """Scale and offset from a unit to its coherent SI base unit (°C to K: 1 and 273.15; a record "K" a difference).

    Arithmetic on magnitudes in base units is dimensionally coherent, so a step can be evaluated on plain
    numbers once each is in base units.
    """
    base = Q_(1.0, pint_unit(unit)).to_base_units().units
    zero = float(Q_(0.0, pint_unit(unit)).to(base).magnitude)
    return float(Q_(1.0, pint_unit(unit)).to(base).magnitude) - zero, zero


def pint_unit(unit):
    """The pint unit for arithmetic on a record unit: a record's ``"K"`` is a temperature difference.

    Examples
    --------
    >>> (Q_(148.78, "degC") + Q_(10.0, pint_unit("K"))).to("degC").magnitude
    158.78
    """
    return {"K": "delta_degC", "": "dimensionless"}.get(unit, unit)


def _formatted(value, spec):
    text = format(value, spec)
    return text.replace("e-0", "e-").replace("e+0", "e+") if "e" in text and "g" not in spec else text


def _significant(text):
    mantissa = text.lower().split("e")[0]
    digits = re.sub(r"[^0-9]", "", mantissa).lstrip("0")
    return max(len(digits), 3)   # "63" m³/h is not a 2-figure Kv: never fewer than 3 figures


def _like(si_text, value, unit, spec):
    """``value`` written with as many significant figures as ``si_text`` shows."""
    if value == 0:
        return si_text
    figures = _significant(si_text)
    if "e" in si_text.lower() or abs(value) < 1e-3:
        return f"{value:.{figures - 1}e}".replace("e-0", "e-").replace("e+0", "e+")
    decimals = max(figures - 1 - math.floor(math.log10(abs(value))), 0)
    text = f"{value:.{decimals}f}"
    return _group(text) if ("," in si_text or abs(value) >= 1e4) else text


def amount(value, unit="", basis="absolute", role=""):
    """An :class:`Amount`, or the Amount given (so calculations pass either)."""
    if isinstance(value, Amount):
        return value
    if isinstance(value, tuple):
        return Amount(*value)
    return Amount(value, unit, basis, role)


_FORMATTER = string.Formatter()
_KV_WORD = re.compile(r"\bKv(s?)\b")
_NAMES_CV = re.compile(r"\bCvs?\s*(?:of\s*|=\s*|≥\s*|≤\s*)?$")


@dataclass(frozen=True)
class Phrase:
    """A sentence with amounts in named slots: ``Phrase("{v:.1f} above {limit:g}", v=..., limit=...)``.

    Each slot is ``{name}`` or ``{name:spec}`` (a Python format spec for the SI number); the unit is
    written after the number by the view. A slot whose amount has no unit writes the number only.

    Examples
    --------
    >>> p = Phrase.of("flash steam {flash:.1f} exceeds the demand {demand:.1f}",
    ...               flash=Amount(175.04, "kg/h"), demand=Amount(100.0, "kg/h"))
    >>> p.text("SI")
    'flash steam 175.0 kg/h exceeds the demand 100.0 kg/h'
    >>> p.text("US")
    'flash steam 385.9 lb/h exceeds the demand 220.5 lb/h'
    >>> kv = Phrase.of("Kvs {rated:.2f} ≥ required {needed:.2f}", rated=Amount(63.0, "m**3/h", role="flow_coefficient"),
    ...                needed=Amount(30.81, "m**3/h", role="flow_coefficient"))
    >>> kv.text("SI"), kv.text("US")
    ('Kvs 63.00 m³/h ≥ required 30.81 m³/h', 'Cvs 72.83 ≥ required Cv 35.62')
    """

    template: str
    amounts: tuple = field(default_factory=tuple)   # ((name, Amount), ...), in slot order

    @classmethod
    def of(cls, template, **amounts):
        slots = [name for _, name, _, _ in _FORMATTER.parse(template) if name is not None]
        missing = [name for name in slots if name not in amounts]
        unused = [name for name in amounts if name not in slots]
        if missing or unused:
            raise ValueError(f"phrase {template!r}: slots without amounts {missing}, amounts without slots {unused}")
        return cls(template, tuple((name, amount(a)) for name, a in amounts.items()))

    def text(self, system="SI"):
        amounts = dict(self.amounts)
        parts = []
        for literal, name, spec, _ in _FORMATTER.parse(self.template):
            if system == "US":
                literal = _KV_WORD.sub(r"Cv\1", literal)   # a US reader knows the flow coefficient as Cv
            parts.append(literal)
            if name is None:
                continue
            shown = amounts[name].shown(system, spec or "")
            if shown.startswith("Cv ") and _NAMES_CV.search("".join(parts)):
                shown = shown[3:]   # "Cvs 72.83", not "Cvs Cv 72.83"
            parts.append(shown)
        return "".join(parts)

    def __str__(self):
        return self.text("SI")

    def to_record(self):
        return {"template": self.template, "amounts": {name: a.to_record() for name, a in self.amounts}}

    @classmethod
    def from_record(cls, entry):
        return cls(entry["template"], tuple((name, Amount.from_record(a)) for name, a in entry["amounts"].items()))


def text_of(detail, system="SI"):
    """A detail as text: a :class:`Phrase` written in ``system``, a plain string as it is."""
    return detail.text(system) if isinstance(detail, Phrase) else detail


#: How a quantity must stand against its limit to pass, and the words views write for it.
COMPARISONS = {"<=": "at most", "<": "below", ">=": "at least", ">": "above"}
BREACHES = ("warn", "fail")


@dataclass(frozen=True)
class Limit:
    """One limit of a check: the quantity passes when ``quantity <comparison> limit``; else ``breach``.

    Examples
    --------
    >>> verdict(Amount(45.0, "m/s"), [Limit("<=", Amount(40.0, "m/s"), "warn"),
    ...                                Limit("<=", Amount(60.0, "m/s"), "fail")])
    'warn'
    >>> verdict(Amount(120.0, "degC"), [Limit(">", Amount(373.15, "K_absolute"), "fail")])
    Traceback (most recent call last):
    ...
    ValueError: limit unit 'K_absolute' is not comparable with 'degC'
    """

    comparison: str
    limit: Amount
    breach: str = "warn"

    def __post_init__(self):
        if self.comparison not in COMPARISONS or self.breach not in BREACHES:
            raise ValueError(f"limit {self.comparison!r}/{self.breach!r}: comparison one of {list(COMPARISONS)}, "
                             f"breach one of {BREACHES}")

    def to_record(self):
        return {"comparison": self.comparison, "limit": self.limit.to_record(), "breach": self.breach}

    @classmethod
    def from_record(cls, entry):
        return cls(entry["comparison"], Amount.from_record(entry["limit"]), entry.get("breach", "warn"))

    def holds(self, quantity):
        a, b = quantity.value, self.limit.value
        if self.limit.unit != quantity.unit:
            try:
                scale, offset = _affine(pint_unit(self.limit.unit), pint_unit(quantity.unit))
            except Exception:
                raise ValueError(f"limit unit {self.limit.unit!r} is not comparable with {quantity.unit!r}") from None
            b = b * scale + offset
        return {"<=": a <= b, "<": a < b, ">=": a >= b, ">": a > b}[self.comparison]


def verdict(quantity, limits):
    """``pass``, or the worst breach among the limits the quantity does not meet."""
    breaches = {limit.breach for limit in limits if not limit.holds(quantity)}
    return "fail" if "fail" in breaches else "warn" if "warn" in breaches else "pass"
