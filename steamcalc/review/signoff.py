"""The checker's sign-off after a passing verification (locked, issued as a set).

Comparing two records lives in :mod:`steamcalc.review.diff`; ``diff_records`` is re-exported here for the
callers that import it from this module.
"""

from __future__ import annotations

from datetime import datetime, timezone

from ..errors import RecordError
from pathlib import Path

from ..records.record import compute_digest
from .diff import diff_records  # noqa: F401  (re-exported, see the module docstring)
from .verify import verify_record


def sign_record(path, record, checker, now=None):
    """Sign a record as checked, after a passing verification; write it and its reports back in place.

    The sign-off holds the record's lock from reading to writing, and re-reads the file under
    it: of two checkers signing at once, the second waits, finds the record signed, and is
    refused (no sign-off is lost). The signed JSON and its reports are issued as one set
    (:func:`steamcalc.records.issuing.issue_set`), so a kill leaves the unsigned set or the signed one.

    Parameters
    ----------
    path : str or Path
        The record's JSON file (rewritten atomically).
    record : dict
        The record as read from it.
    checker : str
        The checker's name.
    now : str, optional
        ISO 8601 UTC time of the sign-off (defaults to now).

    Returns
    -------
    dict
        The signed record.

    Raises
    ------
    RecordError
        If the record is already signed, has a failing check, does not verify, or changed on
        disk since it was read.
    """
    from ..records.issuing import issue_set, record_lock, recover
    from ..records.record import load_record

    checker = (checker or "").strip()
    if not checker:
        raise RecordError("the checker's name is empty", field="--by", fix="give --by \"Your Name\"")
    if len(checker) > 200 or any(ch < " " or "\x7f" <= ch < "\xa0" for ch in checker):
        raise RecordError("the checker's name must be one line of plain text (at most 200 characters)",
                          field="--by", fix="give --by \"Your Name\"")
    path = Path(path)
    stem = path.stem  # the reports sit beside the JSON under its name, whatever it was renamed to
    with record_lock(path.parent, stem):
        recover(path.parent, stem)
        on_disk = load_record(path)
        if on_disk.get("digest") != record.get("digest"):
            if on_disk.get("checked_by"):
                raise RecordError(f"already signed by {on_disk['checked_by']} while you were checking it",
                                  source=path, fix="a signed record stays as signed; reload it to see the sign-off")
            raise RecordError("the record changed on disk since it was read", source=path,
                              fix="read it again, verify it, then sign")
        signed = _signed(path, on_disk, checker, now)
        from ..render.report import RENDERERS
        from ..records.record import record_text

        # The JSON moves into place first: a report never says "signed" beside an unsigned JSON.
        files = [(path.name, record_text(signed))]
        files += [(f"{stem}{suffix}", render(signed)) for suffix, render in RENDERERS.items()]
        issue_set(path.parent, stem, files)
    return signed


def _signed(path, record, checker, now):
    if record.get("checked_by"):
        raise RecordError(f"already signed by {record['checked_by']}", source=path,
                          fix="a signed record stays as signed; raise the revision to issue a new one")
    if record.get("status") == "fail":
        failing = "; ".join(str(c.get("name")) for c in record.get("checks", []) if c.get("status") == "fail")
        raise RecordError(f"the record has failing checks ({failing}) and cannot be signed", source=path,
                          fix="resolve the failing checks in a new revision")
    outcome = verify_record(record)
    if not outcome.ok:
        what = "its digest does not match (the file was edited)" if not (outcome.digest_ok and outcome.content_digest_ok) \
            else (outcome.error or "its results are not reproduced")
        raise RecordError(f"the record does not verify: {what}", source=path,
                          fix="run steamcalc verify for the details; only a verified record can be signed")
    signed = dict(record)
    when = now or datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ")
    reproduced = sum(1 for c in outcome.comparisons if c.verdict == "same")
    signed["checked_by"] = checker
    signed["signoff"] = {
        "by": checker, "date": when,
        "verification": {
            "integrity": "intact",
            "results_reproduced": f"{reproduced} of {len(outcome.comparisons)}",
            "checks_reproduced": not outcome.check_changes,
            "version_changes": {k: {"record": a, "checker": b} for k, (a, b) in outcome.version_changes.items()},
        },
    }
    signed["digest"] = compute_digest(signed)
    return signed
