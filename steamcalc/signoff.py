"""Diff two records, and the checker's sign-off after a passing verification (locked, issued as a set)."""

from __future__ import annotations

from datetime import datetime, timezone

from .errors import RecordError
from pathlib import Path

from .record import compute_digest
from .review import verify_record


def _value(entry):
    if isinstance(entry, dict):
        unit = entry.get("unit", "")
        return entry.get("value"), unit
    return entry, ""


def diff_records(old, new):
    """What changed between two records: inputs, assumptions, results, checks.

    Parameters
    ----------
    old, new : dict
        Two records (usually two revisions of one case).

    Returns
    -------
    list of dict
        One row per change: ``section``, ``key``, ``old``, ``new``, ``unit``, ``change`` (the
        numeric difference where both are numbers, else 'added', 'removed' or 'changed'), and
        ``unit_label``, the unit as people write it (pressures with their basis).
    """
    rows = _diff_rows(old, new)
    from .display import pressure_basis
    from .report import format_unit

    for row in rows:
        row["unit_label"] = format_unit(row["unit"], pressure_basis(new, row["section"], row["key"])) \
            if row["unit"] else ""
    return rows


def _diff_rows(old, new):
    rows = []
    for section in ("inputs", "results"):
        a, b = old.get(section, {}), new.get(section, {})
        for key in list(a) + [k for k in b if k not in a]:
            old_value, unit = _value(a.get(key))
            new_value, new_unit = _value(b.get(key))
            unit = unit or new_unit
            if key not in b:
                rows.append(dict(section=section, key=key, old=old_value, new=None, unit=unit, change="removed"))
            elif key not in a:
                rows.append(dict(section=section, key=key, old=None, new=new_value, unit=unit, change="added"))
            elif old_value != new_value or (section == "inputs" and a[key].get("given") != b[key].get("given")):
                numeric = all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in (old_value, new_value))
                change = new_value - old_value if numeric else "changed"
                if numeric and old_value and abs(change) <= 1e-12 * abs(old_value):
                    change = "as given: " + f"{a[key].get('given')} → {b[key].get('given')}"
                rows.append(dict(section=section, key=key, old=old_value, new=new_value, unit=unit, change=change))
    old_assumptions, new_assumptions = old.get("assumptions", []), new.get("assumptions", [])
    for text in old_assumptions:
        if text not in new_assumptions:
            rows.append(dict(section="assumptions", key="", old=text, new=None, unit="", change="removed"))
    for text in new_assumptions:
        if text not in old_assumptions:
            rows.append(dict(section="assumptions", key="", old=None, new=text, unit="", change="added"))
    old_checks = {c["name"]: c for c in old.get("checks", [])}
    new_checks = {c["name"]: c for c in new.get("checks", [])}
    for name in list(old_checks) + [n for n in new_checks if n not in old_checks]:
        a, b = old_checks.get(name), new_checks.get(name)
        if a is None or b is None or a["status"] != b["status"] or a["detail"] != b["detail"]:
            rows.append(dict(section="checks", key=name,
                             old=None if a is None else f"{a['status']}: {a['detail']}",
                             new=None if b is None else f"{b['status']}: {b['detail']}", unit="",
                             change="added" if a is None else "removed" if b is None else
                             ("status " + a["status"] + " → " + b["status"]) if a["status"] != b["status"] else "detail"))
    for key in ("status", "revision"):
        if old.get(key) != new.get(key):
            rows.append(dict(section="record", key=key, old=old.get(key), new=new.get(key), unit="", change="changed"))
    old_site, new_site = old.get("site", {}), new.get("site", {})
    for key in list(old_site) + [k for k in new_site if k not in old_site]:
        if old_site.get(key) != new_site.get(key):
            rows.append(dict(section="site", key=key, old=_short(old_site.get(key)), new=_short(new_site.get(key)),
                             unit="", change="changed"))
    return rows


def _short(value):
    if isinstance(value, dict) and "value" in value:
        if not isinstance(value["value"], float):
            return value["value"]
        from .report import format_unit

        return f"{value['value']:g} {format_unit(value.get('unit', ''))}".strip()
    if isinstance(value, dict):
        return ", ".join(f"{k} {_short(v)}" for k, v in value.items())
    return value


def sign_record(path, record, checker, now=None):
    """Sign a record as checked, after a passing verification; write it and its reports back in place.

    The sign-off holds the record's lock from reading to writing, and re-reads the file under
    it: of two checkers signing at once, the second waits, finds the record signed, and is
    refused (no sign-off is lost). The signed JSON and its reports are issued as one set
    (:func:`steamcalc.issuing.issue_set`), so a kill leaves the unsigned set or the signed one.

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
    from .issuing import issue_set, record_lock, recover
    from .record import load_record

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
        from .report import RENDERERS
        from .record import record_text

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
