"""The calculation record: model, canonical JSON, digests, provenance and safe writing.

A record (schema ``steamcalc.record/2``) states every input, assumption, step,
result, check, figure (as data) and caution of one calculation, and the software that made it.

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

import contextvars
import copy
import hashlib
import json
import math
import platform
import sys
from datetime import datetime, timezone
from functools import lru_cache
from importlib import metadata
from pathlib import Path

import orjson

from ..errors import RecordConflictError, RecordError
from .schema import validate_record
from .issuing import write_text_atomic  # noqa: F401  (one atomic writer, re-exported)

SCHEMA = "steamcalc.record/3"
#: Schemas a record may carry and still be read and verified: schema 1 (no
#: figure data) was issued by steamcalc 0.2; schema 2 adds the figures as data.
READABLE_SCHEMAS = ("steamcalc.record/1", "steamcalc.record/2", SCHEMA)
_PROVENANCE_PACKAGES = ("steamcalc", "iapws", "seuif97", "pint", "numpy", "jinja2")
# The checker's sign-off is not content: signing must leave the content digest as it was.
_NOT_CONTENT = ("created", "provenance", "digest", "content_digest", "checked_by", "signoff", "signatures")


@lru_cache(maxsize=1)
def _versions():
    from .. import __version__

    # steamcalc's own version is the code's that runs (a checkout on the path may differ from the installed
    # package's metadata: the record must name the release that computed it); the libraries' are their metadata.
    versions = {"steamcalc": __version__}
    for name in _PROVENANCE_PACKAGES[1:]:
        try:
            versions[name] = metadata.version(name)
        except metadata.PackageNotFoundError:
            pass
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


def digests_hold(record):
    """``(digest holds, content digest holds)`` for a record as it stands: :func:`compute_digest` and
    :func:`compute_content_digest` compared with what it states, each section's canonical text written once for both.

    Examples
    --------
    >>> record = {"kind": "letdown", "created": "2026-01-01T00:00:00Z", "results": {"b": 1.5}}
    >>> record["content_digest"] = compute_content_digest(record)
    >>> record["digest"] = compute_digest(record)
    >>> digests_hold(record), digests_hold(dict(record, created="2026-01-02T00:00:00Z"))
    ((True, True), (False, True))
    """
    parts = _section_texts(record, ("digest",))
    content = _digest_of(parts, [key for key in parts if key not in _NOT_CONTENT])
    return _digest_of(parts, parts) == record.get("digest"), content == record.get("content_digest")


def _section_texts(record, leave_out):
    """Each section's canonical JSON as ``"key":value``: canonical JSON of a table is its sorted keys' parts."""
    return {key: f"{canonical_json(key)}:{canonical_json(value)}" for key, value in record.items()
            if key not in leave_out}


def _digest_of(parts, keys):
    return _sha256("{" + ",".join(parts[key] for key in sorted(keys)) + "}")


def build_record(*, kind, case_id, revision, title, prepared_by, site, inputs_table, result,
                 notes=(), created=None, uncertainty=None):
    """Assemble a record dictionary from a calculation's result.

    Parameters
    ----------
    kind, case_id, revision, title, prepared_by : str
        The case's identity.
    site : steamcalc.cases.site.Site
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
        The uncertainty section (:func:`steamcalc.runs.uncertainty.run_uncertainty`).
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
        "figures": [f.to_record() for f in result.figures],
        "status": result.status,
        "warnings": list(result.warnings),
        "cautions": list(result.cautions),
        "provenance": provenance(),
    }
    if uncertainty is not None:
        record["uncertainty"] = uncertainty
    record["content_digest"], record["digest"] = _both_digests(record)
    validate_record(record)
    return record


def _both_digests(record):
    """:func:`compute_content_digest` and then :func:`compute_digest` of a record being built, each section's
    canonical text written once for both (the same text: canonical JSON of a table is its sorted keys' parts).

    Examples
    --------
    >>> record = {"kind": "letdown", "created": "2026-01-01T00:00:00Z", "results": {"b": 1.5, "a": [1, "é"]}}
    >>> content, whole = _both_digests(record)
    >>> content == compute_content_digest(record), whole == compute_digest(dict(record, content_digest=content))
    (True, True)
    """
    parts = _section_texts(record, ("digest", "content_digest"))
    content = _digest_of(parts, [key for key in parts if key not in _NOT_CONTENT])
    parts["content_digest"] = f"{canonical_json('content_digest')}:{canonical_json(content)}"
    return content, _digest_of(parts, parts)


def record_stem(record):
    """File name without suffix: ``<id>_rev<revision>``."""
    return f"{record['id']}_rev{record['revision']}"


def load_record(path, known_valid=None):
    """Read a record file and check it is a steamcalc record (not yet its digest).

    ``known_valid``, when given, is asked of the record as read: True when this very record (its digest
    intact) is known to follow the schema already (the register's memory of it), so the schema is not checked
    a second time; its shape always is.

    The file is read within a size limit (:data:`steamcalc.cases.inputfiles.MAX_RECORD_FILE`), and
    the parts that later steps rely on are type-checked, so an edited or crafted record is
    refused by name instead of failing somewhere later.
    """
    return _record_from_text(_record_file_text(path), Path(path), known_valid)


def _record_file_text(path):
    from ..cases.inputfiles import MAX_RECORD_FILE, read_text_file

    return read_text_file(path, "record file", MAX_RECORD_FILE, RecordError)


def _record_from_text(text, path, known_valid=None):
    def refuse(number):   # steamcalc never writes one; later arithmetic and the digest would fail on it
        raise RecordError(f"not a record steamcalc issued: it holds the number {number[:20]}, which is not "
                          "finite or lies beyond a double", source=path, fix="re-issue the record from its case file")

    def finite_float(word):
        number = float(word)
        return number if math.isfinite(number) else refuse(word)

    def bounded_int(word):
        if len(word) > 309:   # more digits than any double (and than int() reads by default)
            refuse(word)
        number = int(word)
        return number if abs(number) <= sys.float_info.max else refuse(word)

    def one_value_per_key(pairs):   # a reader keeps one of two values and others the other: refuse both
        table = {}
        for key, value in pairs:
            if key in table:
                raise RecordError(f"not a record steamcalc issued: the key {key!r} appears twice in one table "
                                  f"({_short(table[key])} and {_short(value)}), so what it holds depends on the "
                                  "program reading it", source=path, field=key,
                                  fix="re-issue the record from its case file; do not use this copy")
            table[key] = value
        return table

    data = _canonical_data(text)
    if data is None:
        try:
            data = json.loads(text, parse_constant=refuse, parse_float=finite_float, parse_int=bounded_int,
                              object_pairs_hook=one_value_per_key)
        except (json.JSONDecodeError, RecursionError) as exc:
            raise RecordError(f"not a JSON file: {exc}", source=path) from None
    if not isinstance(data, dict) or data.get("schema") not in READABLE_SCHEMAS:
        raise RecordError(f"not a steamcalc record (schema is not one of {', '.join(READABLE_SCHEMAS)})",
                          source=path, field="schema")
    for key in ("kind", "id", "revision", "inputs", "results", "checks", "site", "digest"):
        if key not in data:
            raise RecordError("the record has no '%s'" % key, field=key, source=path)
    _check_record_shape(data, path)
    if known_valid is None or not known_valid(data):
        validate_record(data, source=path, from_text=True)
    return data


def _canonical_data(text):
    """The data of a record text exactly as :func:`record_text` writes it, read by orjson; None for any other text.

    A text that orjson reads and writes back to the very same characters holds no key twice (the second would be
    lost in the writing), no NaN or infinity (orjson refuses both when reading) and no integer beyond a double
    (read as a float, it is written differently). Any other text (hand-edited, written by an earlier release,
    or not JSON at all) is read by the standard library, which names what is wrong.

    Examples
    --------
    >>> _canonical_data(record_text({"id": "LD-01", "value": 5e-05}))
    {'id': 'LD-01', 'value': 5e-05}
    >>> _canonical_data('{"id": "LD-01", "id": "LD-02"}') is None
    True
    """
    try:
        data = orjson.loads(text)
        same = isinstance(data, dict) and orjson.dumps(data, option=orjson.OPT_INDENT_2).decode("utf-8") + "\n" == text
    except (orjson.JSONDecodeError, RecursionError, TypeError):
        return None
    return data if same else None


def read_intact_record(path):
    """Read a record file and refuse it unless both its digests match its content (a record another links to).

    Raises
    ------
    RecordError
        The file is not a record, or it was edited after it was issued.
    """
    text = _record_file_text(path)
    known = _INTACT_TEXTS.get()
    key = hashlib.sha256(text.encode("utf-8")).digest() if known is not None else None
    if key is not None and key in known:
        # The very text read before, whole and intact: the same record (its checks passed on this text).
        return json.loads(text)
    record = _record_from_text(text, Path(path))
    if not all(digests_hold(record)):
        raise RecordError("its digest does not match its content: the file was edited after it was issued",
                          source=path, fix="re-issue the record from its case file, or link the copy that was issued")
    if key is not None:
        known.add(key)
    return record


#: In a context that remembers them (a batch's worker), the SHA-256 of each record text read whole and intact.
_INTACT_TEXTS = contextvars.ContextVar("steamcalc_intact_records", default=None)


def remember_intact_records_from_now():
    """From now on, in this context, a record text read before whole and intact (:func:`read_intact_record`) is
    not checked again: for a batch's worker process, whose site balances read the same linked records case after
    case. The text is read and compared by its SHA-256 every time, so an edited file is read and checked afresh."""
    _INTACT_TEXTS.set(set())


class IssuedRecords:
    """Reads the issued records a case links (:func:`read_intact_record`): from the folder the case names, and,
    when a record is not there, from ``also_in`` (the folder this run writes its records to).

    Examples
    --------
    >>> IssuedRecords("records").also_in
    (PosixPath('records'),)
    """

    def __init__(self, *also_in):
        self.also_in = tuple(Path(folder) for folder in also_in if folder)

    def __call__(self, path):
        return read_intact_record(path)


def _short(value):
    text = json.dumps(value, ensure_ascii=False)
    return text if len(text) <= 40 else text[:37] + "..."


def _check_record_shape(data, path):
    from ..cases.site import is_file_name_part

    for key in ("id", "revision"):
        if not is_file_name_part(data[key]):
            raise RecordError("not a record steamcalc issued: its %s is not a plain name "
                              "(letters, digits, '.', '_', '-')" % key, field=key, value=data[key], source=path)
    for key in ("kind", "digest"):
        if not isinstance(data[key], str):
            raise RecordError(f"'{key}' must be text", field=key, value=data[key], source=path)
    for key in ("inputs", "results", "site"):
        if not isinstance(data[key], dict):
            raise RecordError(f"'{key}' must be a table", field=key, source=path)
    if not isinstance(data["checks"], list) or not all(isinstance(c, dict) for c in data["checks"]):
        raise RecordError("'checks' must be a list of tables", field="checks", source=path)
    for section in ("inputs", "results"):
        for key, entry in data[section].items():
            if not isinstance(entry, dict):
                raise RecordError("each entry must be a table with value and unit", field=f"{section}.{key}",
                                  source=path)
            unit = entry.get("unit", "")
            if not isinstance(unit, str) or not _plain_unit(unit):
                raise RecordError("the unit is not a plain unit name", field=f"{section}.{key}.unit",
                                  value=unit, source=path)
    section = data.get("uncertainty")
    if section is not None:
        from ..runs.uncertainty import MAX_SAMPLES
        samples = section.get("samples") if isinstance(section, dict) else None
        # The same cap as a case file's [uncertainty] samples, so an edited record cannot
        # make verify run for hours.
        if isinstance(samples, bool) or not isinstance(samples, int) or not 10 <= samples <= MAX_SAMPLES:
            raise RecordError(f"samples must be a whole number from 10 to {MAX_SAMPLES}",
                              field="uncertainty.samples", value=samples, limits=(10, MAX_SAMPLES, ""),
                              source=path)


def _plain_unit(unit):
    from ..units.quantities import is_plain_unit
    return is_plain_unit(unit)


def record_text(record):
    """A record as the JSON text of its file (indented by two spaces, UTF-8, NaN refused).

    Written by ``orjson``, thirty times faster than the standard library's indented writer, which a record's
    figure data made the largest cost of issuing it. Both write the same structure and the same numbers: a float
    is written in the shortest form that reads back as the same double (orjson writes 0.00005 where the standard
    library writes 5e-05). The text is read back and must equal the record: orjson writes NaN as null without a
    word, and a record that does not come back the same (NaN or an infinity in it, a tuple, a value orjson does
    not take) goes through the standard library, which refuses NaN.

    Examples
    --------
    >>> print(record_text({"id": "LD-01", "value": 5e-05, "rows": [1, 2]}), end="")
    {
      "id": "LD-01",
      "value": 0.00005,
      "rows": [
        1,
        2
      ]
    }
    >>> record_text({"value": float("nan")})
    Traceback (most recent call last):
    ...
    ValueError: Out of range float values are not JSON compliant: nan
    """
    try:
        text = orjson.dumps(record, option=orjson.OPT_INDENT_2)
        if orjson.loads(text) == record:
            return text.decode("utf-8") + "\n"
    except TypeError:   # orjson.JSONEncodeError: a value it does not take; the standard library decides
        pass
    return json.dumps(record, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def write_record(record, out_dir, renderers=None, force=False):
    """Issue a record's JSON and its reports as one set, never replacing different content.

    The set is written under the record's lock and staged before it is moved into place
    (:mod:`steamcalc.records.issuing`), so two writers never interleave and a kill at any instant
    leaves the old set or the new one. Reports left without their JSON by an interrupted
    older writer are replaced; a file of a report's name that steamcalc did not write is
    refused unless ``force``.

    Parameters
    ----------
    record : dict
        A record from :func:`build_record`.
    out_dir : str or Path
        Folder to write into; created if absent.
    renderers : dict, optional
        Suffix → function(record) → text, e.g. ``{".html": render_html}``.
    force : bool
        Replace report files of these names even when steamcalc did not write them.

    Returns
    -------
    tuple
        ``(paths, status)``: the paths of the record's files, and ``"written"`` or
        ``"unchanged"`` (an existing record of the same content was kept as it was; missing or
        out-of-date reports of it are re-rendered).

    Raises
    ------
    RecordConflictError
        If a record of the same id and revision with different content exists.
    RecordBusyError
        If another writer holds the record's lock for too long.
    """
    from .issuing import ensure_folder, is_own_output, issue_set, record_lock, recover

    out_dir = ensure_folder(out_dir)
    stem = record_stem(record)
    renderers = renderers or {}
    json_path = out_dir / f"{stem}.json"
    paths = [json_path] + [out_dir / f"{stem}{suffix}" for suffix in renderers]
    with record_lock(out_dir, stem):
        recover(out_dir, stem)
        if json_path.exists():
            try:
                existing = load_record(json_path)
            except RecordError:
                raise RecordConflictError(
                    "a file of this name exists and is not a readable record", source=json_path,
                    fix="move it away, or raise the revision in the case file") from None
            # The stored digests are claims anyone can write: both are recomputed from what the file holds, and
            # a file that is not what its digests say is refused, never kept as "unchanged" nor drawn again.
            if compute_content_digest(existing) != existing.get("content_digest") or \
                    compute_digest(existing) != existing.get("digest"):
                raise RecordConflictError(
                    "the record there does not match its own digest: it was edited after it was issued",
                    source=json_path, field="content_digest",
                    fix="run steamcalc verify on it to see what changed; move it away (keep it as evidence) and "
                        "run the case again, or raise the revision - its reports are not drawn again from it")
            if existing.get("content_digest") != record["content_digest"] and _same_case(existing, record):
                raise RecordConflictError(
                    f"record {record['id']} revision {record['revision']} already exists with different content, "
                    "although from the same inputs: it was edited after it was issued (its digests recomputed), or "
                    "issued by a release that computes otherwise", source=json_path, field="content_digest",
                    fix="run steamcalc verify on it to see what differs; keep it as it is (it is not drawn again) "
                        "and raise the revision in the case file to issue a new record")
            if existing.get("content_digest") != record["content_digest"]:
                raise RecordConflictError(
                    f"record {record['id']} revision {record['revision']} already exists with different content",
                    source=json_path,
                    fix="raise the revision in the case file ([case] revision) to issue a new record; "
                        "the existing record is kept as it is")
            stale = []
            for suffix, text in _drawn_reports(renderers, existing).items():
                report = out_dir / f"{stem}{suffix}"
                if report.exists() and _same_text(report, text):
                    continue
                _refuse_foreign(report, force, is_own_output)
                stale.append((report.name, text))
            if stale:
                issue_set(out_dir, stem, stale)
            return paths, "unchanged"
        for report in paths[1:]:
            _refuse_foreign(report, force, is_own_output)
        # Render everything before writing anything; the JSON moves into place first.
        files = [(json_path.name, record_text(record))]
        files += [(f"{stem}{suffix}", text) for suffix, text in _drawn_reports(renderers, record).items()]
        issue_set(out_dir, stem, files)
    return paths, "written"


def _drawn_reports(renderers, record):
    """``{suffix: text}`` of a record's reports: drawn together when the renderers can share their work."""
    if hasattr(renderers, "draw"):
        return renderers.draw(record)
    return {suffix: render(record) for suffix, render in renderers.items()}


def _same_case(a, b):
    """Two records made from the same case: kind, title, preparer, inputs, site, notes and uncertainty settings."""
    def case_of(record):
        settings = record.get("uncertainty")
        settings = {k: v for k, v in settings.items() if k in _UNCERTAINTY_SETTINGS} if isinstance(settings, dict) \
            else settings
        notes = [n for n in record.get("assumptions") or [] if str(n).startswith("Engineer's note: ")]
        return [record.get(k) for k in ("kind", "title", "prepared_by", "inputs", "site")] + [notes, settings]
    return case_of(a) == case_of(b)


#: What a case file sets in a record's uncertainty section (the rest is computed).
_UNCERTAINTY_SETTINGS = ("method", "samples", "seed", "generator", "coverage", "property_engine", "tolerances")


def _same_text(path, text):
    try:
        return path.read_text(encoding="utf-8") == text
    except (OSError, UnicodeDecodeError):
        return False


def _refuse_foreign(path, force, is_own_output):
    if path.exists() and not force and not is_own_output(path):
        raise RecordConflictError(
            "a file of this name exists and was not written by steamcalc", source=path,
            fix="move it away (or give --force to replace it)")


def strip_for_recompute(record):
    """A deep copy of the record's parts that a recomputation needs."""
    return copy.deepcopy({k: record[k] for k in ("kind", "site", "inputs")})
