"""The record's JSON Schema (``record.schema.json``), and checking a record against it.

Every record is checked when it is built and when it is read, so that the reports, verify,
diff and the register can rely on the record's layout: a record edited by hand into another
shape is refused by name (the file, the field as a dotted path, the value) instead of failing
somewhere later. The schema accepts every readable layout: ``steamcalc.record/1``,
``steamcalc.record/2`` (figures as data) and ``steamcalc.record/3`` (steps and checks as amounts).

This module imports no other part of steamcalc but its errors, unit names, step expressions and the figure bound, so that
:mod:`steamcalc.records.record` can use it without an import cycle.
"""

from __future__ import annotations

import json
import math
import reprlib
from functools import lru_cache
from importlib import resources

import fastjsonschema
import jsonschema_rs

from ..calcs.base import MAX_FIGURE_COORDINATE
from ..errors import RecordError
from ..units.expressions import ExpressionError, names, parse
from ..units.quantities import is_plain_unit

SCHEMA_FILE = "record.schema.json"
#: The fix for a record file that does not follow the schema.
FIX = "re-issue the record from its case file"
#: A record steamcalc is building always follows the schema; when it does not, the fault is steamcalc's.
FIX_BUILT = "this is a fault in steamcalc, not in the case: please report it"
#: Longest excerpt of an offending value an error shows.
_EXCERPT_LENGTH = 60
_TYPE_WORDS = {"object": "a table", "array": "a list", "string": "text", "number": "a number",
               "integer": "a whole number", "boolean": "true or false", "null": "null"}


@lru_cache(maxsize=1)
def record_schema():
    """The record schema, read once from the package (treat it as read-only).

    Examples
    --------
    >>> record_schema()["$id"]
    'https://steamcalc.invalid/record.schema.json'
    """
    # Checked against the draft's meta-schema by the tests, not here: that costs more than a record's validation.
    text = resources.files(__package__).joinpath(SCHEMA_FILE).read_text(encoding="utf-8")
    return json.loads(text)


@lru_cache(maxsize=1)
def _validator():
    # Compiled once per process to Python code (fastjsonschema, as nbformat uses): it names the first field a
    # record breaks the schema at, which the refusal quotes.
    return fastjsonschema.compile(record_schema())


@lru_cache(maxsize=1)
def _gate():
    # The yes-or-no answer, from the compiled Rust validator (jsonschema-rs): some thirty times faster than the
    # Python one on a let-down record's figure data, which every read of a record checks. Only a record it
    # refuses goes to the Python validator, for the field to name.
    return jsonschema_rs.Draft7Validator(record_schema())


class _Excerpt(str):
    """A shortened value, shown in an error as it stands (not quoted a second time)."""

    def __repr__(self):
        return str(self)


def _excerpt(value):
    shortener = reprlib.Repr()
    shortener.maxstring = shortener.maxother = _EXCERPT_LENGTH
    shortener.maxlist = shortener.maxtuple = 5
    shortener.maxdict = 3
    shortener.maxlevel = 2
    return _Excerpt(shortener.repr(value))


def _type_words(types):
    words = [_TYPE_WORDS.get(t, t) for t in ([types] if isinstance(types, str) else types)]
    return words[0] if len(words) == 1 else ", ".join(words[:-1]) + " or " + words[-1]


def _found_type(value):
    for python_type, word in ((bool, "true or false"), (dict, "a table"), ((list, tuple), "a list"), (str, "text"),
                              (int, "a whole number"), (float, "a number"), (type(None), "null")):
        if isinstance(value, python_type):
            return word
    return type(value).__name__


def _explained(error):
    """``(field path, what is wrong, the offending value)`` of a schema error, in plain words.

    The field path is None when the record as a whole is wrong (not a table).
    """
    path = [str(part) for part in error.path[1:]]   # the first part names the record itself ("data")
    rule, expected, instance = error.rule, error.rule_definition, error.value
    if rule == "required":
        missing = next(key for key in expected if key not in instance)
        return ".".join(path + [missing]), "is missing (steamcalc always writes it)", None
    if rule == "additionalProperties":
        known = (error.definition or {}).get("properties", {})
        extra = next(key for key in instance if key not in known)
        return ".".join(path + [extra]), "is not a part of a steamcalc record", _excerpt(instance[extra])
    field = ".".join(path) or None
    if rule == "type":
        return field, f"must be {_type_words(expected)}, not {_found_type(instance)}", _excerpt(instance)
    if rule in ("enum", "const"):
        choices = expected if isinstance(expected, list) else [expected]
        return field, "must be one of " + ", ".join(str(choice) for choice in choices), _excerpt(instance)
    if rule in ("minItems", "maxItems"):
        return field, f"has {len(instance)} items where {'at least' if rule == 'minItems' else 'at most'} " \
                      f"{expected} belong", None
    if rule == "minLength":
        return field, "must not be empty", _excerpt(instance)
    if rule == "pattern":
        return field, "is not in the form steamcalc writes", _excerpt(instance)
    return field, f"breaks the schema's rule {rule!r}", _excerpt(instance)


#: Largest magnitude of a figure coordinate (the calculation layer holds its figures to the same bound).
MAX_COORDINATE = MAX_FIGURE_COORDINATE


def _figure_problem(figures):
    """What the schema cannot say of a figure: ``(field, what is wrong, value)``, or None when it is sound.

    Each series has as many y values as x values, and point labels for none or all of them; the axes its
    series and bands use exist; an axis range runs from low to high; a log axis holds no value at or below
    zero; no coordinate exceeds :data:`MAX_COORDINATE`; names are not given twice.
    """
    names = set()
    for f, figure in enumerate(figures):
        where = f"figures.{f}"
        if figure.get("name") in names:
            return f"{where}.name", "names a figure given before", _excerpt(figure.get("name"))
        names.add(figure.get("name"))
        if "missing" in figure:
            if "axes" in figure or "series" in figure or "bands" in figure:
                return f"{where}.missing", "is given beside data: a figure is either drawn or missing", None
            continue
        axes = figure.get("axes", {})
        for key, axis in axes.items():
            if not is_plain_unit(axis.get("unit", "")):
                return f"{where}.axes.{key}.unit", "is not a plain unit name", _excerpt(axis.get("unit"))
            span = axis.get("range")
            if span is not None and not (len(span) == 2 and abs(span[0]) <= MAX_COORDINATE
                                         and abs(span[1]) <= MAX_COORDINATE and span[0] < span[1]):
                return f"{where}.axes.{key}.range", "must run from a low to a higher value", _excerpt(span)
        for s, series in enumerate(figure.get("series", ())):
            at = f"{where}.series.{s}"
            x, y = series.get("x", ()), series.get("y", ())
            if len(x) != len(y):
                return f"{at}.y", f"has {len(y)} values for {len(x)} x values", None
            if series.get("labels") and len(series["labels"]) != len(x):
                return f"{at}.labels", f"has {len(series['labels'])} labels for {len(x)} points", None
            if series.get("axis", "y") not in axes or "x" not in axes:
                return f"{at}.axis", "names an axis the figure does not have", _excerpt(series.get("axis", "y"))
            for key, values in (("x", x), (series.get("axis", "y"), y)):
                name = "x" if key == "x" else "y"
                if any(abs(v) > MAX_COORDINATE for v in values):
                    return f"{at}.{name}", f"holds a value beyond ±{MAX_COORDINATE:g}", None
                if axes[key].get("scale") == "log" and any(v <= 0 for v in values):
                    return f"{at}.{name}", "holds a value at or below zero on a log axis", None
        for b, band in enumerate(figure.get("bands", ())):
            if band.get("axis") not in axes:
                return f"{where}.bands.{b}.axis", "names an axis the figure does not have", _excerpt(band.get("axis"))
            if not band.get("low", 0) < band.get("high", 0) or max(abs(band.get("low", 0)),
                                                                   abs(band.get("high", 0))) > MAX_COORDINATE:
                return f"{where}.bands.{b}", "must run from a low to a higher value", None
    return None


def _step_problem(steps):
    """What the schema cannot say of a worked step: its expression in the subset views evaluate, over exactly
    the operands it names; ``(field, what is wrong, value)`` or None."""
    for i, step in enumerate(steps):
        if not isinstance(step, dict) or "expression" not in step:
            continue
        try:
            symbols = names(parse(step["expression"]))
        except ExpressionError:
            return f"steps.{i}.expression", "is not an expression a step may hold", _excerpt(step["expression"])
        if set(symbols) != set(step.get("operands", {})):
            return f"steps.{i}.operands", "are not the symbols its expression uses", _excerpt(sorted(symbols))
    return None


def _follows_schema(record):
    """The record follows the JSON schema (its structure only), by the Rust validator; False for a value it
    cannot take (a Python object that JSON has no word for), which the Python validator then explains."""
    try:
        return _gate().is_valid(record)
    except (ValueError, TypeError, OverflowError):
        return False


#: What a refusal says of a NaN or an infinity (JSON has neither).
NOT_FINITE = "holds a number that is not finite (NaN or an infinity), which JSON cannot hold"


def _gate_problem(record):
    """Where the Rust validator refuses a record the Python one passes (a NaN, which JSON cannot hold, is the one
    case known): ``(field, what is wrong, value)``, so that no record passes either one's reading of the schema."""
    try:
        error = next(iter(_gate().iter_errors(record)), None)
    except (ValueError, TypeError, OverflowError):
        error = None
    if error is None:   # a value it could not read as JSON (a Python object)
        return None, "holds a value that JSON cannot hold", None
    field = ".".join(str(part) for part in error.instance_path) or None
    value = record
    try:
        for part in error.instance_path:
            value = value[part]
    except (KeyError, IndexError, TypeError):
        value = error.instance
    if isinstance(value, float) and not math.isfinite(value):   # the Rust validator reads it as null
        return field, NOT_FINITE, _excerpt(value)
    return field, f"breaks the schema: {error.message}", _excerpt(value)


def validate_record(record, source=None, from_text=False):
    """Check a record against the record schema.

    Parameters
    ----------
    record : dict
        A record as built (:func:`steamcalc.records.record.build_record`) or as read from its file.
    source : str or Path, optional
        The record's file, named in the error.
    from_text : bool
        The record was just read from JSON text (it holds JSON's own values only), so the compiled validator's
        yes is enough; a record being built is held to both validators.

    Raises
    ------
    RecordError
        If the record does not follow the schema: the error names the field as a dotted path
        (``figures.0.series.2.x.5``), the offending value shortened, and the fix: re-issuing the
        file, or, for a record being built (no ``source``), reporting the fault in steamcalc.

    Examples
    --------
    >>> try:
    ...     validate_record(["not", "a", "table"], source="LD-01_revA.json")
    ... except RecordError as exc:
    ...     print(exc.message)
    does not follow the steamcalc record schema: it must be a table, not a list
    """
    follows = _follows_schema(record)
    try:
        # A record read from its file holds JSON's own values only, and the compiled validator's yes stands; a
        # record being built may hold Python values that it reads as JSON (a Decimal, an Enum member), so
        # both validators must pass it.
        if not follows or not from_text:
            _validator()(record)
    except fastjsonschema.JsonSchemaValueException as error:
        field, what, value = _explained(error)
    else:
        problem = _gate_problem(record) if not follows else None
        if problem is not None and not from_text and problem[1] != NOT_FINITE:
            problem = None   # a Python value of a record being built that fastjsonschema takes (a numpy float)
        if problem is None and isinstance(record, dict):
            problem = _figure_problem(record.get("figures") or ()) or _step_problem(record.get("steps") or ())
        if problem is None:
            return
        field, what, value = problem
    raise RecordError(f"does not follow the steamcalc record schema: it {what}", field=field, value=value,
                      source=source, fix=FIX if source is not None else FIX_BUILT)


__all__ = ["FIX", "FIX_BUILT", "SCHEMA_FILE", "record_schema", "validate_record"]
