"""Statements a release words otherwise than the releases before it, so that their records keep verifying.

A record's statements (check details and their phrases, step equations, warnings, assumptions) are compared
with what the calculation issues today. When a release rewords a statement without changing any number or
verdict — a source cited more exactly, say — a record of an earlier release would otherwise read as edited.
Each such change is listed here, exactly: the words as the earlier releases wrote them, the words now, and the
release that changed them. ``verify`` compares such a record as if worded now and lists each rewording it
applied among its notes, naming the release; any other difference is still a difference.

Only a listed text, and only in a record issued before the release that changed it, is taken as reworded; the
record's digests are checked on the record as it stands, before any of this.
"""

from __future__ import annotations

import re
from dataclasses import dataclass


@dataclass(frozen=True)
class Rewording:
    """One statement's words, changed by a release.

    Parameters
    ----------
    since : str
        The steamcalc release that writes ``now`` (records of earlier releases wrote ``before``).
    before : str
        The exact text earlier releases wrote (a part of a statement).
    now : str
        The exact text this release writes in its place.
    why : str
        What changed, for the note ``verify`` prints.
    """

    since: str
    before: str
    now: str
    why: str


#: Every rewording since release 0.3.0, oldest first.
REWORDINGS = (
    Rewording("0.3.1", "API 520 Part II, 7.3.1", "API 520 Part II, inlet piping",
              "the inlet-loss rule cited by its subject: its clause number was not confirmed against the "
              "standard's text"),
    Rewording("0.3.1", "API 520 Part II, 4.4.1.1, eq. (1)", "API 520 Part II, open-discharge reaction force",
              "the reaction-force equation cited by its subject: its clause number was not confirmed against the "
              "standard's text"),
    Rewording("0.3.1", "API 520 Part II, 4.4.1.1", "API 520 Part II, open-discharge reaction force",
              "the reaction-force equation cited by its subject: its clause number was not confirmed against the "
              "standard's text"),
    Rewording("0.3.1", "ω = 9·(v9/v0 − 1)  [API 520 Part I annex C]", "ω = 9·(v9/v0 − 1), v9 after an isentropic "
              "flash to 0.9·p0 (a two-phase inlet) or to 0.9·p_s, 90 % of the saturation pressure (a subcooled inlet)  "
              "[API 520 Part I annex C]", "the omega parameter's step says where and how its second state is found"),
    Rewording("0.3.3", "boils at the atmosphere: it flashes in the discharge pipe once below its saturation pressure, "
              "and is taken as a homogeneous two-phase mixture from there",
              "is above its boiling point at the atmosphere: it flashes where the pressure in the discharge pipe falls "
              "to the saturation pressure at its enthalpy (its flash point, a step below; at the pipe's exit when the "
              "pipe carries it that far as liquid), and is taken as a homogeneous two-phase mixture from there",
              "a hot liquid's discharge line says where it flashes as its step computes it (on its isenthalp, since "
              "0.3.2), not at its saturation pressure"),
)

#: The parts of a record that hold the calculation's statements (never the engineer's own words or inputs).
STATEMENT_SECTIONS = ("steps", "checks", "warnings", "assumptions", "references", "cautions")
#: The texts the calculation writes in each step and each check (a check's phrase template besides); nothing else
#: of a step or a check is reworded, so data of any shape beside them is left as it is.
STATEMENT_TEXTS = {"steps": ("label", "equation", "substituted"), "checks": ("name", "detail", "source")}
#: How an assumption that is the engineer's own note begins (``records.record``): never reworded.
ENGINEERS_NOTE = "Engineer's note: "


def release(version):
    """A release's number as a tuple that orders releases (``"0.3.1"`` -> ``(0, 3, 1)``); None when unreadable.

    Only a number as steamcalc writes one reads: two or three parts of ASCII digits, none with a leading zero, and
    nothing around them (a record whose provenance was written otherwise gets no allowance of a later release).

    Examples
    --------
    >>> release("0.3.1") > release("0.3.0"), release("0.10.0") > release("0.9.2"), release("dev")
    (True, True, None)
    >>> [release(v) for v in ("0", " 0.3.1", "0.3.1\\n", "0.03.1", "0.3.1.99", "\\u0660.3.1", "-1.3")]
    [None, None, None, None, None, None, None]
    """
    text = str(version)
    if _RELEASE.fullmatch(text) is None:
        return None
    return tuple(int(part) for part in text.split("."))


#: A release number as steamcalc writes it: 0.3 or 0.3.1 (ASCII digits, no leading zeros).
_RELEASE = re.compile(r"(?:0|[1-9][0-9]*)(?:\.(?:0|[1-9][0-9]*)){1,2}", re.ASCII)


def _worded_now(text, applied, rewordings):
    if not isinstance(text, str) or text.startswith(ENGINEERS_NOTE):
        return text
    for rewording in rewordings:
        if rewording.before in text:
            text = text.replace(rewording.before, rewording.now)
            applied.setdefault(rewording, None)
    return text


def _entry_worded_now(section, entry, applied, rewordings):
    """A statement list's text, or a step's or check's texts, in this release's words."""
    if section not in STATEMENT_TEXTS:
        return _worded_now(entry, applied, rewordings)
    if not isinstance(entry, dict):
        return entry
    copy = dict(entry)
    for key in STATEMENT_TEXTS[section]:
        if key in copy:
            copy[key] = _worded_now(copy[key], applied, rewordings)
    if section == "checks" and isinstance(copy.get("phrase"), dict) and "template" in copy["phrase"]:
        copy["phrase"] = dict(copy["phrase"], template=_worded_now(copy["phrase"]["template"], applied, rewordings))
    return copy


def as_worded_now(record):
    """The record with its statements in this release's words, and the rewordings that took.

    Parameters
    ----------
    record : dict
        A record as read.

    Returns
    -------
    (dict, list of Rewording)
        The record itself and an empty list when no rewording applies (a record of this release, or one whose
        statements hold none of the earlier words); else a copy whose statement sections are reworded.

    Examples
    --------
    >>> old = {"provenance": {"steamcalc": "0.3.0"}, "warnings": ["loss 4 % (API 520 Part II, 7.3.1)"]}
    >>> new, applied = as_worded_now(old)
    >>> new["warnings"][0], [r.since for r in applied]
    ('loss 4 % (API 520 Part II, inlet piping)', ['0.3.1'])
    >>> as_worded_now(dict(old, provenance={"steamcalc": "0.3.1"}))[1]
    []
    """
    issued_by = release((record.get("provenance") or {}).get("steamcalc")) if isinstance(
        record.get("provenance"), dict) else None
    # A release that does not read ("dev", "0.3.1+local") is not known to be earlier: no allowance.
    rewordings = [r for r in REWORDINGS if issued_by is not None and issued_by < release(r.since)]
    if not rewordings:
        return record, []
    applied = {}
    copy = dict(record)
    for section in STATEMENT_SECTIONS:
        if isinstance(copy.get(section), list):
            copy[section] = [_entry_worded_now(section, entry, applied, rewordings) for entry in copy[section]]
    if not applied:
        return record, []
    return copy, list(applied)


def rewording_note(rewording):
    """What ``verify`` notes of a rewording it applied."""
    return (f"worded otherwise since steamcalc {rewording.since} ({rewording.why}): {rewording.before!r} is now "
            f"{rewording.now!r}; the numbers and verdicts are compared as before")
