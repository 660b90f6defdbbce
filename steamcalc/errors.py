"""Errors raised by steamcalc.

Every error a user can cause is a :class:`SteamcalcError`. Each carries the
field (or variable) it concerns, the offending value, the valid range where
there is one, and a sentence saying how to fix it, so that the command line
and the workbooks can report it without a traceback.
"""

from __future__ import annotations


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

    def explained(self, message=None, fix=None):
        """What is wrong, the value given, its range and the fix, without the file or field.

        ``message`` and ``fix`` replace the error's own texts (the workbook words them for its form).
        """
        parts = [self.message if message is None else message]
        if self.value is not None and f"{self.value!r}" not in self.message:
            parts.append(f"(given: {self.value!r})")
        if self.limits is not None:
            low, high, unit = self.limits
            parts.append(f"Valid range: {low:g} to {high:g}{' ' + unit if unit else ''}.")
        fix = self.fix if fix is None else fix
        if fix:
            parts.append(f"Fix: {fix}")
        return " ".join(parts)


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
