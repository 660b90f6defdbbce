"""What every calculation kind shares: input fields, the Result, steps and checks.

A calculation module declares a frozen ``Inputs`` dataclass whose fields are made
with :func:`input_field`, so that forms, case files and records can treat every
kind alike; its ``calculate(inputs, site)`` returns a :class:`Result`.
"""

from __future__ import annotations

import contextlib
from contextvars import ContextVar

import dataclasses
import math
from dataclasses import dataclass, field

from ..errors import InputError, SteamcalcError
from ..units.amounts import Amount, Limit, Phrase, amount, text_of, verdict
from ..units.expressions import names, parse, written_step
from ..units.quantities import RECORD_UNITS, from_record_unit, to_record_unit

#: The fifth item of a kind's ``BASIS_CHANGES`` entry whose change only adds to a record (a check, a statement): a
#: record of an earlier release holds none of it, so ``verify`` explains only what the recomputation adds.
ADDS_ONLY = "adds only"

#: Whether this context wants the full record (steps, checks and the equipment sections that feed
#: no banded result) or numbers only: Monte Carlo samples keep only the banded results.
_NUMBERS_ONLY = ContextVar("steamcalc_numbers_only", default=False)


@contextlib.contextmanager
def numbers_only():
    """Within this block, in this context only, calculations skip what feeds no banded result."""
    token = _NUMBERS_ONLY.set(True)
    try:
        yield
    finally:
        _NUMBERS_ONLY.reset(token)


def full_record_wanted():
    """False inside :func:`numbers_only` (a Monte Carlo sample), True otherwise."""
    return not _NUMBERS_ONLY.get()

#: Kinds an input field can have. ``fraction`` is a plain number from 0 to 1, ``number`` a
#: plain positive number, ``flag`` true or false, ``nominal_size`` a pipe size such as "DN80",
#: ``pressure_list`` a list of pressure strings; ``pressure_difference`` has no basis ("0.1 bar").
INPUT_KINDS = ("pressure", "pressure_difference", "length", "temperature", "temperature_difference", "mass_flow",
               "velocity", "flow_coefficient", "specific_heat", "heat_transfer_coefficient", "fouling_resistance", "area",
               "volume_flow", "density", "time", "fraction", "number", "flag", "nominal_size", "text", "pressure_list",
               "dimensionless", "thermal_conductivity", "rows", "expansion_coefficient")
_PLAIN_KINDS = ("fraction", "number", "flag", "nominal_size", "text")
_RAW_KINDS = ("flag", "nominal_size", "text")

STATUSES = ("pass", "warn", "fail")


def input_field(kind, label, help, *, example, section=None, default=None, required=False, positive=False,
                key=None, columns=None):
    """A dataclass field for an ``Inputs`` class, with the metadata forms and parsers use.

    Parameters
    ----------
    kind : str
        One of :data:`INPUT_KINDS`; the value is held in the SI unit of that kind.
    label : str
        Short label for forms and reports.
    help : str
        One sentence for the form's tooltip and the case-file documentation.
    example : str
        A value as a user would type it in a case file (``"16 bar(g)"``).
    section : str, optional
        Sub-table of ``[inputs]`` the key lives in (``"desuperheater"``).
    default : float, optional
        Value used when the key is absent.
    required : bool
        The input must be given (:func:`check_fields` refuses None).
    positive : bool
        When given, the value must be above zero.
    key : str, optional
        The case-file key inside its section when it differs from the field name (field
        names are unique over all sections; keys only within their section), e.g. the field
        ``relief_inlet_size`` is ``inlet_size`` in ``[inputs.relief]``. A field given a key
        (even its own name) is named in parse errors by its case-file address, ``relief.kd``.
    """
    if kind not in INPUT_KINDS:
        raise ValueError(f"unknown input kind {kind!r}")
    return field(default=default, metadata={
        "kind": kind, "label": label, "help": help, "example": example, "section": section,
        "required": required, "positive": positive, "key": key or None, "columns": columns,
    })


def input_fields(inputs_class):
    """The fields of an Inputs class, in declaration order."""
    return dataclasses.fields(inputs_class)


def field_key(f):
    """The case-file key of an input field inside its section (the field name unless aliased)."""
    return f.metadata.get("key") or f.name


def field_path(f):
    """The case-file address of an input field: ``key``, or ``section.key`` in a sub-table."""
    section = f.metadata["section"]
    return f"{section}.{field_key(f)}" if section else field_key(f)


#: Smallest positive coefficient or efficiency (a fraction field declared positive) accepted.
MIN_POSITIVE_FRACTION = 0.01
#: Largest sum of loss coefficients a line's fittings input takes (any ``*fittings_k``): a long main with many
#: bends and valves is some tens of velocity heads (common practice); beyond this it is a slip, and the
#: arithmetic of the loss would overflow.
MAX_FITTINGS_K = 1000.0


def check_fields(inputs):
    """The checks every Inputs class shares: required fields given, positive fields above zero, a sum of fittings'
    loss coefficients (``*fittings_k``) at most :data:`MAX_FITTINGS_K`.

    Called first in each ``Inputs.__post_init__``; the kind's own checks follow.
    """
    for f in input_fields(type(inputs)):
        value = getattr(inputs, f.name)
        if value is None:
            if f.metadata["required"]:
                where = f"[inputs.{f.metadata['section']}]" if f.metadata["section"] else "[inputs]"
                raise InputError("is required", field=field_path(f), fix=f"add {field_key(f)} to {where}")
            continue
        if f.metadata["positive"] and value <= 0.0:
            raise InputError(f"{f.metadata['label'].lower()} must be above zero", field=field_path(f),
                             fix=f"give a {f.metadata['label'].lower()} above zero")
        if f.name.endswith("fittings_k") and isinstance(value, (int, float)) and not value <= MAX_FITTINGS_K:
            raise InputError(f"a sum of loss coefficients of {value:g} is beyond any line's fittings",
                             field=field_path(f), value=value, limits=(0.0, MAX_FITTINGS_K, ""),
                             fix="give the sum of the fittings' K (each elbow about 0.3 to 0.75, an open exit 1), "
                                 f"e.g. {f.metadata['example']}")
        # A positive coefficient or efficiency below 1 % is a slip (a percent typed as a fraction twice,
        # a stray exponent), and the sizing would divide by its square.
        if f.metadata["positive"] and f.metadata["kind"] == "fraction" and value < MIN_POSITIVE_FRACTION:
            raise InputError(f"{f.metadata['label']} of {value:g} is below {MIN_POSITIVE_FRACTION:g}: no valve, "
                             "relief device or machine has so small a figure", field=field_path(f), value=value,
                             limits=(MIN_POSITIVE_FRACTION, 1.0, ""),
                             fix=f"give the {f.metadata['label']} from the maker's data, e.g. {f.metadata['example']}")


def bar_a(pressure):
    """Absolute pressure (Pa) as steps and checks show it."""
    return f"{pressure / 1e5:.4g} bar(a)"


def deg_c(temperature):
    """Temperature (K) as steps and checks show it."""
    return f"{temperature - 273.15:.2f} °C"


def kj_kg(enthalpy):
    """Specific enthalpy (J/kg) as steps and checks show it."""
    return f"{enthalpy / 1e3:.2f} kJ/kg"


def _unit_kind(kind):
    if kind in _PLAIN_KINDS:
        return "dimensionless"
    if kind == "rows":
        return "dimensionless"
    return "pressure" if kind == "pressure_list" else kind


def to_record_inputs(inputs, given):
    """The record's ``inputs`` table: each set field in record units, with the user's text.

    A kind whose inputs are lists of items (the site balance) makes its own table (``to_record_table``).
    """
    if hasattr(type(inputs), "to_record_table"):
        return inputs.to_record_table(given)
    table = {}
    for f in input_fields(type(inputs)):
        value = getattr(inputs, f.name)
        if value is None:
            continue
        kind = f.metadata["kind"]
        unit_kind = _unit_kind(kind)
        if kind in _RAW_KINDS:
            stored = value
        elif kind == "rows":
            # One text in the case file's own form, in record units: it reads back as the same rows.
            from ..units.rows import rows_text
            stored = rows_text(value, f.metadata["columns"])
        elif kind == "pressure_list":
            stored = [to_record_unit(v, unit_kind) for v in value]
        else:
            stored = to_record_unit(value, unit_kind)
        # A pressure difference is stored in bar like a pressure; reports label it "bar difference"
        # from the field's kind (steamcalc.render.display.pressure_basis).
        table[f.name] = {"value": stored, "unit": RECORD_UNITS[unit_kind], "given": given.get(f.name, "(default)")}
    return table


def from_record_inputs(inputs_class, table):
    """Rebuild an Inputs object from a record's ``inputs`` table (absolute values)."""
    if hasattr(inputs_class, "from_record_table"):   # a kind of item lists reads its own table
        return inputs_class.from_record_table(table)
    names = {f.name: f for f in input_fields(inputs_class)}
    values = {}
    for name, entry in table.items():
        if name not in names:
            raise InputError(f"record input '{name}' is not an input of this kind", field=name)
        kind = names[name].metadata["kind"]
        unit_kind = _unit_kind(kind)
        if kind in _RAW_KINDS:
            values[name] = entry["value"]
        elif kind == "rows":
            from ..units.rows import parse_rows
            values[name] = parse_rows(entry["value"], name, names[name].metadata["columns"])
        elif kind == "pressure_list":
            values[name] = tuple(from_record_unit(v, entry.get("unit", ""), unit_kind) for v in entry["value"])
        else:
            values[name] = from_record_unit(entry["value"], entry.get("unit", ""), unit_kind)
    return inputs_class(**values)


@dataclass(frozen=True)
class Step:
    """One worked step: what is found, the equation, the equation with numbers, the value.

    A step made by :meth:`Result.work` also keeps its ``expression`` (the arithmetic, or a property
    lookup such as ``h(p1, T1)``) and its ``operands`` as amounts, so each view writes the numbers in
    its own units; ``substituted`` is then the SI writing of it. ``units_fixed`` marks an equation whose
    constant holds only in the units given (an IEC or API constant): views show it in those units.
    """

    label: str
    equation: str
    substituted: str
    value: float | str
    unit: str = ""
    expression: str = ""
    operands: tuple = ()      # ((symbol, Amount), ...)
    units_fixed: bool = False
    role: str = ""            # "flow_coefficient" for a Kv

    def written(self, system="SI"):
        """The equation with its numbers in ``system`` (a step of text only: as it was written, in SI)."""
        if not self.expression:
            return self.substituted
        number = isinstance(self.value, (int, float)) and not isinstance(self.value, bool)
        target = Amount(self.value, self.unit, role=self.role) if number else None
        return written_step(self.equation, self.expression, dict(self.operands), target, system, self.units_fixed)

    def to_record(self):
        entry = {"label": self.label, "equation": self.equation, "substituted": self.written(),
                 "value": {"value": self.value, "unit": self.unit}}
        if self.role:
            entry["value"]["role"] = self.role
        if self.expression:
            entry["expression"] = self.expression
            entry["operands"] = {symbol: a.to_record() for symbol, a in self.operands}
            if self.units_fixed:
                entry["units_fixed"] = True
        return entry


@dataclass(frozen=True)
class Check:
    """An engineering check on the result: ``pass``, ``warn`` or ``fail``, with its reason.

    A check of a quantity against limits (``kind="limit"``) keeps both; its status is the verdict of
    :func:`~steamcalc.units.amounts.verdict`, which ``verify`` recomputes from the record alone. A
    ``"condition"`` is a verdict the calculation reaches otherwise (site data missing, a phase). A
    ``"notice"`` is a statement that cannot warn or fail (a throttle raises entropy): shown apart, never as
    a pass.
    ``detail`` is a text, or a :class:`~steamcalc.units.amounts.Phrase` each view writes in its units.
    """

    name: str
    status: str
    detail: object
    quantity: Amount | None = None
    limits: tuple = ()
    source: str = ""
    notice: bool = False

    def __post_init__(self):
        if self.status not in STATUSES:
            raise ValueError(f"check status must be one of {STATUSES}")
        if self.notice and (self.status != "pass" or self.quantity is not None):
            raise ValueError(f"notice {self.name!r} is a statement: it has no limit and cannot warn or fail")
        if self.quantity is not None and self.status != verdict(self.quantity, self.limits):
            raise ValueError(f"check {self.name!r}: status {self.status} is not its quantity's verdict")

    @property
    def kind(self):
        return "notice" if self.notice else "limit" if self.quantity is not None else "condition"

    def to_record(self):
        entry = {"name": self.name, "status": self.status, "detail": text_of(self.detail), "kind": self.kind}
        if isinstance(self.detail, Phrase):
            entry["phrase"] = self.detail.to_record()
        if self.quantity is not None:
            entry["quantity"] = self.quantity.to_record()
            entry["limits"] = [limit.to_record() for limit in self.limits]
        if self.source:
            entry["source"] = self.source
        return entry


#: How a series is drawn; the views choose colours and symbols from ``role``. ``flows``: each point a flow
#: between two named nodes, labelled ``"<source>`` :data:`FLOW_ARROW` ``<target>"`` with the flow as y
#: (drawn as a Sankey diagram).
SERIES_STYLES = ("line", "markers", "line+markers", "flows")
#: Between the source and the target node in the label of a point of a ``flows`` series.
FLOW_ARROW = " → "
SERIES_DASHES = ("solid", "dot", "dash", "dashdot")
SERIES_ROLES = ("reference", "inlet", "outlet", "process", "limit", "secondary")


@dataclass(frozen=True)
class Axis:
    """A figure axis: what it shows in words, its record unit (pint), linear or log, an optional range."""

    label: str
    unit: str = ""
    scale: str = "linear"
    low: float | None = None
    high: float | None = None
    basis: str | None = None   # "absolute" for an axis of absolute pressures

    def __post_init__(self):
        # Checked when made, like a series, so that a bad range marks its figure missing.
        if self.low is not None and self.high is not None:
            object.__setattr__(self, "low", _finite(self.low))
            object.__setattr__(self, "high", _finite(self.high))

    def to_record(self):
        entry = {"label": self.label, "unit": self.unit, "scale": self.scale}
        if self.low is not None and self.high is not None:
            entry["range"] = [self.low, self.high]
        if self.basis:
            entry["basis"] = self.basis
        return entry


@dataclass(frozen=True)
class Series:
    """One data series of a figure, in the units of its axes (x and ``axis``: "y" or "y2")."""

    name: str
    x: tuple
    y: tuple
    style: str = "line"
    role: str = "process"
    dash: str = "solid"
    axis: str = "y"
    labels: tuple = ()

    def __post_init__(self):
        # Checked when made, inside the figure's own calculation, so a bad point marks the figure missing.
        object.__setattr__(self, "x", tuple(_finite(v) for v in self.x))
        object.__setattr__(self, "y", tuple(_finite(v) for v in self.y))
        if len(self.x) != len(self.y):
            raise ValueError(f"series {self.name!r} has {len(self.x)} x values and {len(self.y)} y values")

    def to_record(self):
        entry = {"name": self.name, "x": list(self.x), "y": list(self.y),
                 "style": self.style, "role": self.role, "dash": self.dash, "axis": self.axis}
        if self.labels:
            entry["labels"] = [str(label) for label in self.labels]
        return entry


@dataclass(frozen=True)
class Band:
    """A shaded span of an axis ("x", "y" or "y2") from ``low`` to ``high``, with its meaning in words."""

    axis: str
    low: float
    high: float
    label: str

    def __post_init__(self):
        object.__setattr__(self, "low", _finite(self.low))
        object.__setattr__(self, "high", _finite(self.high))

    def to_record(self):
        return {"axis": self.axis, "low": self.low, "high": self.high, "label": self.label}


@dataclass(frozen=True)
class Figure:
    """A figure as data: axes, series and bands, computed by its kind's calculation layer.

    A figure that could not be computed keeps its name and title and says why in ``missing``;
    the record is issued all the same.
    """

    name: str
    title: str
    x: Axis | None = None
    y: Axis | None = None
    y2: Axis | None = None
    series: tuple = ()
    bands: tuple = ()
    missing: str = ""

    def to_record(self):
        entry = {"name": self.name, "title": self.title}
        if self.missing:
            entry["missing"] = self.missing
            return entry
        entry["axes"] = {key: axis.to_record() for key, axis in (("x", self.x), ("y", self.y), ("y2", self.y2))
                         if axis is not None}
        entry["series"] = [s.to_record() for s in self.series]
        if self.bands:
            entry["bands"] = [b.to_record() for b in self.bands]
        return entry


def figure_or_missing(name, title, build):
    """A kind's figure from ``build()``; when it cannot be computed, the figure marked missing with the reason.

    ``build`` may return None (the case has nothing to draw). A range error or an arithmetic
    failure in a figure never stops the record being issued: the record says why the figure is missing.
    """
    try:
        return build()
    except SteamcalcError as exc:
        return Figure(name, title, missing=f"not drawn: {exc.message}")
    except (ArithmeticError, ValueError) as exc:
        return Figure(name, title, missing=f"not drawn: {exc}")
    except Exception as exc:   # a fault in the figure's own code must not stop the record: it is named instead
        return Figure(name, title, missing=f"not drawn: a fault in steamcalc's figure code ({type(exc).__name__}: "
                                           f"{exc}); please report it - the results and checks are not affected")


#: Largest magnitude of a figure coordinate: far beyond any quantity of a steam system, and small enough
#: that a drawing's arithmetic (spans, ticks) stays finite. The record schema holds figures to it too.
MAX_FIGURE_COORDINATE = 1e15


def _finite(value):
    """A figure coordinate as the record keeps it: a finite float within :data:`MAX_FIGURE_COORDINATE`."""
    value = float(value)
    if not math.isfinite(value) or abs(value) > MAX_FIGURE_COORDINATE:
        raise ArithmeticError(f"figure coordinate {value:g} is not a finite value within ±{MAX_FIGURE_COORDINATE:g}")
    return value


@dataclass(frozen=True)
class ResultValue:
    """A result: its label, value and unit string (pint-parsable; '' for none)."""

    label: str
    value: float | str
    unit: str = ""

    def to_record(self):
        if self.unit or not isinstance(self.value, str):
            return {"value": self.value, "unit": self.unit, "label": self.label}
        return {"value": self.value, "label": self.label}


@dataclass
class Result:
    """What a calculation returns. Built inside ``calculate()``; treated as read-only after.

    ``states`` keeps the SteamStates the calculation found, by name; it is not part of the record.
    ``figures`` holds the kind's :class:`Figure` data, which is.
    """

    values: dict = field(default_factory=dict)
    steps: list = field(default_factory=list)
    checks: list = field(default_factory=list)
    assumptions: list = field(default_factory=list)
    references: list = field(default_factory=list)
    warnings: list = field(default_factory=list)
    cautions: list = field(default_factory=list)
    states: dict = field(default_factory=dict)
    figures: list = field(default_factory=list)

    def add(self, key, label, value, unit=""):
        """Add a result value. A float must be finite: a NaN or infinity is a bug, not a result.

        A value of None is a quantity the state does not define (the superheat of water above the
        critical pressure): no result is added, and the record says so among its assumptions.
        """
        if value is None:
            self.assumptions.append(f"{label}: not defined for this state, so not given")
            return None
        if isinstance(value, float) and not math.isfinite(value):
            raise ArithmeticError(f"result {key} is not finite ({value})")
        self.values[key] = ResultValue(label, value, unit)
        return value

    def work(self, label, equation, expression, value, unit="", *, units_fixed=False, role="", **operands):
        """Add a worked step whose operands are amounts: ``work(label, "m_3 = m_s + m_w", "m_s + m_w",
        value, "kg/h", m_s=(…, "kg/h"), m_w=(…, "kg/h"))``. An operand is an Amount or (value, unit[, basis]).
        """
        if not full_record_wanted():
            return   # a Monte Carlo sample keeps no steps
        given = {symbol: amount(a) for symbol, a in operands.items()}
        if names(parse(expression)) != set(given):
            raise ValueError(f"step {label!r}: expression symbols {sorted(names(parse(expression)))} but operands "
                             f"{sorted(given)}")
        # The SI substitution is written when the record is made (Step.to_record), not here: a result that
        # never becomes a record (a batch row, a workbook preview) does not pay for it.
        self.steps.append(Step(label, equation, "", value, unit, expression, tuple(given.items()), units_fixed, role))

    def check(self, name, status, detail):
        """Add a check whose verdict the calculation reaches itself; ``detail`` a text or a Phrase."""
        self.checks.append(Check(name, status, detail))
        if status == "warn":
            self.warnings.append(f"{name}: {text_of(detail)}")

    def notice(self, name, detail, act=False):
        """Add a notice: a statement shown among the checks that cannot warn or fail (it changes no status).

        ``act`` adds it to the warnings as well, for a statement the engineer must act on (the relief load the
        relief designer needs).
        """
        self.checks.append(Check(name, "pass", detail, notice=True))
        if act:
            self.warnings.append(f"{name}: {text_of(detail)}")

    def check_limit(self, name, quantity, limits, detail, source=""):
        """Add a check of ``quantity`` against ``limits`` ((comparison, limit, breach) or Limit); its verdict.

        Returns the status, so the calculation can add advice that depends on it.
        """
        quantity = amount(quantity)
        limits = tuple(limit if isinstance(limit, Limit) else Limit(limit[0], amount(limit[1]), *limit[2:])
                       for limit in limits)
        status = verdict(quantity, limits)
        detail = detail(status) if callable(detail) else detail
        self.checks.append(Check(name, status, detail, quantity, limits, source))
        if status == "warn":
            self.warnings.append(f"{name}: {text_of(detail)}")
        return status

    @property
    def status(self):
        """Worst check status: ``fail`` over ``warn`` over ``pass``."""
        statuses = {c.status for c in self.checks}
        return "fail" if "fail" in statuses else "warn" if "warn" in statuses else "pass"

    def value(self, key):
        return self.values[key].value
