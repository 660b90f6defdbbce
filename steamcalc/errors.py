"""Errors raised by steamcalc.

Every error a user can cause is a :class:`SteamcalcError`. Each carries the
field (or variable) it concerns, the offending value, the valid range where
there is one, and a sentence saying how to fix it, so that the command line
and the workbooks can report it without a traceback.
"""

from __future__ import annotations

import math
import re


class SteamcalcError(Exception):
    """Base class of every error a user can cause.

    Parameters
    ----------
    message : str
        What is wrong, in plain words.
    field : str, optional
        The input field, case-file key or property the error concerns.
    value : object, optional
        The offending value, as given.
    limits : tuple, optional
        ``(low, high, unit)`` of the valid range, where there is one.
    fix : str, optional
        How to put it right.
    source : str, optional
        The file the value came from; the command line fills it in.
    """

    def __init__(self, message, *, field=None, value=None, limits=None, fix=None, source=None):
        super().__init__(message)
        self.message = message
        self.field = field
        self.value = value
        self.limits = limits
        self.fix = fix
        self.source = source

    def for_field(self, field):
        """Return this error re-addressed to the input field that caused it."""
        self.field = field
        return self

    def with_source(self, source):
        """Return this error with the file it came from filled in (if not already)."""
        if self.source is None:
            self.source = str(source)
        return self

    def __str__(self):
        parts = []
        if self.source:
            parts.append(f"{self.source}:")
        if self.field:
            parts.append(f"field '{self.field}':")
        parts.append(self.explained())
        return " ".join(parts)

    def explained(self, message=None, fix=None, given=None):
        """What is wrong, the value given, its range and the fix, without the file or field.

        ``message`` and ``fix`` replace the error's own texts (the workbook words them for its form);
        ``given`` replaces the value's own writing (the form writes it in the units typed in the box;
        ``""`` leaves it out).
        """
        parts = [self.message if message is None else message]
        given = given_text(self.value, parts[0]) if given is None else given
        if given and given not in parts[0]:
            parts.append(f"(given: {given})")
        if self.limits is not None:
            low, high, unit = self.limits
            parts.append(f"Valid range: {low:g} to {high:g}{' ' + unit if unit else ''}.")
        fix = self.fix if fix is None else fix
        if fix:
            parts.append(f"Fix: {fix}")
        return " ".join(parts)


#: What a value held in SI may be scaled by when a message writes it in the trade's units: Pa to bar, kPa or
#: MPa; J to kJ, W to kW; a fraction to %; kg/s to kg/h or t/h; m to mm or µm (and K to °C, by subtraction).
_WRITTEN_SCALES = (1.0, 1e-5, 1e-3, 1e-6, 100.0, 3600.0, 3.6, 1e3, 1e6)
#: How messages write numbers (``f"{p / 1e5:.4g} bar(a)"``, ``f"{t - 273.15:.2f} °C"``): a number of the
#: message that one of these writes of the value gives is that value, already stated.
_WRITINGS = (".4g", ".5g", ".6g", ".2f", ".1f")
_NUMBER_IN_TEXT = re.compile(r"(?<![\w.])-?\d[\d,]*(?:\.\d+)?(?:[eE][+-]?\d+)?")


def _stated(value, message):
    """True when ``message`` already writes the number ``value`` (held in SI) in some unit of the trade."""
    written = {m.group(0).replace(",", "") for m in _NUMBER_IN_TEXT.finditer(str(message or ""))}
    if not written:
        return False
    candidates = [value * scale for scale in _WRITTEN_SCALES] + [value - 273.15]
    return any(format(c, spec) in written for c in candidates for spec in _WRITINGS)


def given_text(value, message=""):
    """How an error writes the value it was given: text quoted as typed, a number to six figures, an
    infinity or NaN in words; ``""`` for a number the message already states (in its own units).

    A calculation holds its values in SI (Pa, K, kg/s), and its messages write them in the trade's
    units (``18.99 bar(a)``): the SI number is not repeated beside them.

    Examples
    --------
    >>> given_text("16 barg"), given_text(0.5), given_text(float("inf")), given_text(float("nan"))
    ("'16 barg'", '0.5', 'infinite', 'not a number')
    >>> given_text(1899181.2344114645, "the highest upstream pressure 18.99 bar(a) is below the inlet pressure")
    ''
    >>> given_text(1899181.2344114645)
    '1.89918e+06'
    """
    if value is None:
        return ""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return repr(value)
    if math.isnan(value):
        return "not a number"
    if math.isinf(value):
        return "infinite" if value > 0 else "minus infinite"
    if _stated(value, message):
        return ""
    return f"{value:.6g}"


class InputError(SteamcalcError):
    """An input value or combination of inputs that cannot be used."""


class UnitError(InputError):
    """A quantity string with a missing, wrong or ambiguous unit."""


class CaseFileError(InputError):
    """A case or site file that cannot be read or has unknown or missing keys."""


class OutOfRangeError(InputError):
    """A state outside the validity range of IAPWS-IF97 or of a calculation."""


class AmbiguousStateError(InputError):
    """A pair of properties that does not fix one state (p, T on the saturation line)."""


class NotConvergedError(SteamcalcError):
    """An iteration that did not meet its stated tolerance within its steps.

    A result that did not converge is never given as one: the case is refused, naming the iteration
    (``field``), the last residual (``value``) and the tolerance.
    """


class RecordError(SteamcalcError):
    """A record file that cannot be read or is not a steamcalc record."""


class RecordConflictError(SteamcalcError):
    """Writing a record would replace a different record of the same id and revision."""


class RecordBusyError(RecordError):
    """Another writer holds the record's lock (a run, a workbook save or a sign-off)."""
