"""The calculation record: model, canonical JSON, digests, provenance and safe writing.

A record (schema ``steamcalc.record/1``) states every input, assumption, step,
result, check and caution of one calculation, and the software that made it.

Two digests are kept:

``digest``
    SHA-256 over the canonical JSON of every other key (``created`` included).
    Any edit to the file changes it: this is the tamper evidence.
``content_digest``
    SHA-256 over the same JSON without ``created``, ``provenance``, the sign-off
    (``checked_by``, ``signoff``) and the digests: the engineering content alone. Re-running an
    unchanged case gives the same content digest, so the existing record (and
    its original creation time) is kept rather than replaced.
"""

from __future__ import annotations

import copy
import hashlib
import json
import os
import platform
import tempfile
from datetime import datetime, timezone
from functools import lru_cache
from importlib import metadata
from pathlib import Path

from .errors import RecordConflictError, RecordError

SCHEMA = "steamcalc.record/1"
_PROVENANCE_PACKAGES = ("steamcalc", "iapws", "seuif97", "pint", "numpy", "jinja2")
# The checker's sign-off is not content: signing must leave the content digest as it was.
_NOT_CONTENT = ("created", "provenance", "digest", "content_digest", "checked_by", "signoff", "signatures")


@lru_cache(maxsize=1)
def _versions():
    versions = {}
    for name in _PROVENANCE_PACKAGES:
        try:
            versions[name] = metadata.version(name)
        except metadata.PackageNotFoundError:
            if name == "steamcalc":
                from . import __version__
                versions[name] = __version__
    versions["python"] = platform.python_version()
    return versions


def provenance():
    """Versions of the software that computes a record (read once per process)."""
    return dict(_versions())


def canonical_json(data):
    """Canonical JSON text: sorted keys, no spaces, UTF-8, NaN refused.

    Examples
    --------
    >>> canonical_json({"b": 1, "a": [1.5, "x"]})
    '{"a":[1.5,"x"],"b":1}'
    """
    return json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False)


def _sha256(text):
    return "sha256:" + hashlib.sha256(text.encode("utf-8")).hexdigest()


def compute_digest(record):
    """Digest over every key but ``digest`` itself."""
    return _sha256(canonical_json({k: v for k, v in record.items() if k != "digest"}))


def compute_content_digest(record):
    """Digest over the engineering content: everything but time, provenance and digests."""
    return _sha256(canonical_json({k: v for k, v in record.items() if k not in _NOT_CONTENT}))


def build_record(*, kind, case_id, revision, title, prepared_by, site, inputs_table, result,
                 notes=(), created=None, uncertainty=None):
    """Assemble a record dictionary from a calculation's result.

    Parameters
    ----------
    kind, case_id, revision, title, prepared_by : str
        The case's identity.
    site : steamcalc.site.Site
        Site the case ran against.
    inputs_table : dict
        The record's ``inputs`` table (:func:`steamcalc.calcs.base.to_record_inputs`).
    result : steamcalc.calcs.base.Result
        What ``calculate()`` returned.
    notes : sequence of str
        The engineer's own assumptions, appended to the calculation's.
    created : str, optional
        ISO 8601 UTC time; now when not given.
    uncertainty : dict, optional
        The uncertainty section (:func:`steamcalc.uncertainty.run_uncertainty`).
    """
    record = {
        "schema": SCHEMA,
        "kind": kind, "id": case_id, "revision": revision, "title": title,
        "prepared_by": prepared_by, "checked_by": None,
        "created": created or datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
        "site": site.to_record(),
        "inputs": inputs_table,
        "assumptions": list(result.assumptions) + [f"Engineer's note: {n}" for n in notes],
        "references": list(result.references),
        "steps": [s.to_record() for s in result.steps],
        "results": {k: v.to_record() for k, v in result.values.items()},
        "checks": [c.to_record() for c in result.checks],
        "status": result.status,
        "warnings": list(result.warnings),
        "cautions": list(result.cautions),
        "provenance": provenance(),
    }
    if uncertainty is not None:
        record["uncertainty"] = uncertainty
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    return record


def record_stem(record):
    """File name without suffix: ``<id>_rev<revision>``."""
    return f"{record['id']}_rev{record['revision']}"


def load_record(path):
    """Read a record file and check it is a steamcalc record (not yet its digest)."""
    path = Path(path)
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise RecordError("record file not found", source=path) from None
    except (json.JSONDecodeError, UnicodeDecodeError) as exc:
        raise RecordError(f"not a JSON file: {exc}", source=path) from None
    if not isinstance(data, dict) or data.get("schema") != SCHEMA:
        raise RecordError(f"not a steamcalc record (schema is not {SCHEMA!r})", source=path,
                          field="schema")
    for key in ("kind", "id", "revision", "inputs", "results", "checks", "site", "digest"):
        if key not in data:
            raise RecordError("the record has no '%s'" % key, field=key, source=path)
    return data


def record_text(record):
    """A record as the JSON text of its file (indented, UTF-8, NaN refused)."""
    return json.dumps(record, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def write_text_atomic(path, text):
    """Write a text file through a temporary file and a rename: never half-written."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    handle, temp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".part")
    try:
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as out:
            out.write(text)
        os.replace(temp, path)
    except BaseException:
        Path(temp).unlink(missing_ok=True)
        raise


def write_record(record, out_dir, renderers=None):
    """Write a record's JSON (and its reports) without ever replacing different content.

    Parameters
    ----------
    record : dict
        A record from :func:`build_record`.
    out_dir : str or Path
        Folder to write into; created if absent.
    renderers : dict, optional
        Suffix → function(record) → text, e.g. ``{".html": render_html}``.

    Returns
    -------
    tuple
        ``(paths, status)``: the paths of the record's files, and ``"written"`` or
        ``"unchanged"`` (an existing record of the same content was kept as it was).

    Raises
    ------
    RecordConflictError
        If a record of the same id and revision with different content exists.
    """
    out_dir = Path(out_dir)
    stem = record_stem(record)
    json_path = out_dir / f"{stem}.json"
    paths = [json_path] + [out_dir / f"{stem}{suffix}" for suffix in (renderers or {})]
    if json_path.exists():
        try:
            existing = load_record(json_path)
        except RecordError:
            raise RecordConflictError(
                "a file of this name exists and is not a readable record", source=json_path,
                fix="move it away, or raise the revision in the case file") from None
        if existing.get("content_digest") == record["content_digest"]:
            for suffix, render in (renderers or {}).items():
                report = out_dir / f"{stem}{suffix}"
                if not report.exists():
                    write_text_atomic(report, render(existing))
            return paths, "unchanged"
        raise RecordConflictError(
            f"record {record['id']} revision {record['revision']} already exists with different content",
            source=json_path,
            fix="raise the revision in the case file ([case] revision) to issue a new record; "
                "the existing record is kept as it is")
    for report in paths[1:]:
        if report.exists():
            raise RecordConflictError("a report of this name exists without its record", source=report,
                                      fix="move it away, or raise the revision")
    # Render everything before writing anything, and write the JSON last, so that a
    # failure leaves no half-issued record behind.
    texts = [(out_dir / f"{stem}{suffix}", render(record)) for suffix, render in (renderers or {}).items()]
    texts.append((json_path, record_text(record)))
    for path, text in texts:
        write_text_atomic(path, text)
    return paths, "written"


def strip_for_recompute(record):
    """A deep copy of the record's parts that a recomputation needs."""
    return copy.deepcopy({k: record[k] for k in ("kind", "site", "inputs")})
