"""Rows of an input: a TOML array of tables, one table a row (the segments of a line).

A case file writes them as ``[[inputs.segments]]`` tables, or inline as
``segments = [{length = "75 m", size = "DN80"}, ...]``; a record keeps them as that inline text
in record units, which reads back as the same rows. Each row is checked column by column, and a
refusal names the row (counted from 1 in words, from 0 in the field address as a list's items are)
and the column.
"""

from __future__ import annotations

import json
import math
import tomllib
from dataclasses import dataclass

from ..errors import InputError
from .quantities import RECORD_UNITS, SI_UNITS, Q_, parse_quantity

#: Column kinds: a length above zero, a length of either sign (a rise or fall), a plain number not
#: below zero (a loss coefficient), a flag, text and a nominal pipe size.
COLUMN_KINDS = ("length", "signed_length", "number", "flag", "text", "nominal_size")
#: Most rows an input may have: far beyond a plant line's segments, and it stops a slip from a long loop.
MAX_ROWS = 200


@dataclass(frozen=True)
class Column:
    """One column of a row: its key, kind, label, example, and whether a row must give it."""

    key: str
    kind: str
    label: str
    example: str
    required: bool = False

    def __post_init__(self):
        if self.kind not in COLUMN_KINDS:
            raise ValueError(f"unknown column kind {self.kind!r}")


def _rows_from_text(text, where):
    try:
        data = tomllib.loads(f"rows = {text}")
    except tomllib.TOMLDecodeError as exc:
        raise InputError(f"is not a list of tables ({exc})", field=where, value=text[:60],
                         fix='write e.g. [{length = "75 m", size = "DN80"}]') from None
    return data["rows"]


def parse_rows(raw, where, columns):
    """The rows of an input, each a tuple of SI values (None when not given) in column order.

    Parameters
    ----------
    raw : list of dict or str
        The TOML array of tables, or its inline text.
    where : str
        The field's case-file address, for errors.
    columns : tuple of Column

    Returns
    -------
    tuple of tuple

    Examples
    --------
    >>> cols = (Column("length", "length", "Length", "'75 m'", True), Column("k", "number", "K", "2"))
    >>> parse_rows('[{length = "75 m", k = 1.5}, {length = "12 m"}]', "segments", cols)
    ((75.0, 1.5), (12.0, None))
    """
    if isinstance(raw, str):
        raw = _rows_from_text(raw, where)
    if not isinstance(raw, (list, tuple)) or not raw or not all(isinstance(row, dict) for row in raw):
        raise InputError("must be a list of tables, one a row", field=where, value=str(raw)[:60],
                         fix=f"write one [[inputs.{where}]] table a row, with "
                             f"{', '.join(c.key for c in columns if c.required)}")
    if len(raw) > MAX_ROWS:
        raise InputError(f"has {len(raw)} rows; at most {MAX_ROWS}", field=where, value=len(raw))
    keys = {c.key: c for c in columns}
    rows = []
    for index, row in enumerate(raw):
        address = f"{where}[{index}]"
        for key in row:
            if key not in keys:
                raise InputError(f"unknown key '{key}' in row {index + 1}", field=f"{address}.{key}",
                                 fix=f"the keys a row accepts are: {', '.join(keys)}")
        values = []
        for column in columns:
            given = row.get(column.key)
            if given is None:
                if column.required:
                    raise InputError(f"row {index + 1} has no {column.label.lower()}", field=f"{address}.{column.key}",
                                     fix=f"add {column.key} = {column.example} to row {index + 1}")
                values.append(None)
                continue
            values.append(_cell(given, f"{address}.{column.key}", column, index))
        rows.append(tuple(values))
    return tuple(rows)


def _cell(given, address, column, index):
    kind = column.kind
    if kind in ("length", "signed_length"):
        value = parse_quantity(given, address, "length") if not _negative_text(given) else \
            -parse_quantity(given.strip()[1:], address, "length")
        if kind == "length" and not value > 0.0:
            raise InputError(f"the {column.label.lower()} of row {index + 1} must be above zero", field=address,
                             value=given, fix=f"give e.g. {column.key} = {column.example}")
        return value
    if kind == "number":
        if isinstance(given, bool) or not isinstance(given, (int, float)) or not math.isfinite(given) or given < 0:
            raise InputError(f"the {column.label.lower()} of row {index + 1} must be a plain number, zero or above",
                             field=address, value=given, fix=f"write it without quotes or units, e.g. {column.example}")
        return float(given)
    if kind == "flag":
        if not isinstance(given, bool):
            raise InputError(f"the {column.label.lower()} of row {index + 1} must be true or false", field=address,
                             value=given, fix="write true or false")
        return given
    if not isinstance(given, str) or not given.strip():
        raise InputError(f"the {column.label.lower()} of row {index + 1} must be text", field=address,
                         value=given, fix=f"e.g. {column.key} = {column.example}")
    return given.strip()


def _negative_text(given):
    return isinstance(given, str) and given.strip().startswith("-")


def _toml_value(value):
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, (int, float)):
        return repr(float(value)) if isinstance(value, float) else str(value)
    return json.dumps(str(value), ensure_ascii=False)


def rows_text(rows, columns):
    """The rows as the record keeps them: inline TOML in record units, reading back as the same rows.

    Examples
    --------
    >>> cols = (Column("length", "length", "Length", "'75 m'", True), Column("size", "nominal_size", "Size", "'DN80'"))
    >>> rows_text(((75.0, "DN80"), (3.048, None)), cols)
    '[{length = "75.0 m", size = "DN80"}, {length = "3.048 m"}]'
    """
    unit = RECORD_UNITS["length"]
    out = []
    for row in rows:
        cells = []
        for column, value in zip(columns, row):
            if value is None:
                continue
            if column.kind in ("length", "signed_length"):
                shown = Q_(value, SI_UNITS["length"]).to(unit).magnitude
                cells.append(f"{column.key} = {_toml_value(f'{float(shown)!r} {unit}')}")
            else:
                cells.append(f"{column.key} = {_toml_value(value)}")
        out.append("{" + ", ".join(cells) + "}")
    return "[" + ", ".join(out) + "]"


def rows_given(raw):
    """The rows as the user gave them, as one inline TOML text (what the record shows as given)."""
    if isinstance(raw, str):
        return raw.strip()
    if isinstance(raw, (list, tuple)) and all(isinstance(row, dict) for row in raw):
        return "[" + ", ".join("{" + ", ".join(f"{k} = {_toml_value(v)}" for k, v in row.items()) + "}"
                               for row in raw) + "]"
    return str(raw)
