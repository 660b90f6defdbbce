"""Review: verify a record (digest integrity, then reproduction by re-computation).

Integrity and reproduction are reported apart: an intact record whose numbers a
newer library no longer reproduces is a different finding from an edited file.

Reproduction runs on the engine of issued records (iapws) by default. With
``engine="fast"`` the record is recomputed on the second, independent IF97
implementation (seuif97) instead: a cross-check that no bug of one implementation can
pass. Its uncertainty bands are then not recomputed (their samples run on the fast
engine already); the ordinary verification reproduces them.
"""

from __future__ import annotations

import ast
import functools
import hashlib
import json
import re
from dataclasses import dataclass, field
from pathlib import Path

from ..properties.engines import REFERENCE_ENGINE, check_engine
from ..calcs import get_calculation
from ..calcs.base import ADDS_ONLY
from ..errors import SteamcalcError
from ..records.record import canonical_json, digests_hold as both_digests_hold, provenance
from ..runs.runner import recompute, recompute_uncertainty
from ..runs.uncertainty import add_sample_check
from ..units.amounts import Amount, Limit, text_of, verdict
from .rewordings import as_worded_now, rewording_note

#: Relative tolerance on recomputed numbers; IF97 evaluations are deterministic, so
#: this only absorbs floating-point differences between platforms and library builds.
RELATIVE_TOLERANCE = 1e-6
#: Absolute tolerance, in the result's own unit, for values that are zero or near it.
ABSOLUTE_TOLERANCE = 1e-9


@dataclass
class Comparison:
    """One result, as recorded and as recomputed."""

    key: str
    recorded: object
    recomputed: object
    unit: str
    abs_diff: float | None
    rel_diff: float | None
    verdict: str  # "same", "differs", "missing", "new", "changed" (by a later release's basis, listed)


@dataclass
class Verification:
    """Outcome of verifying one record."""

    digest_ok: bool
    content_digest_ok: bool
    comparisons: list = field(default_factory=list)
    check_changes: list = field(default_factory=list)
    version_changes: dict = field(default_factory=dict)
    error: str | None = None
    #: The overall status and failing checks as recomputed (never the record's own claim).
    recomputed_status: str | None = None
    recomputed_failing: list = field(default_factory=list)
    #: What the record states that the calculation does not issue today: status, cautions,
    #: references, the calculation's assumptions, its steps.
    statement_changes: list = field(default_factory=list)
    engine: str = REFERENCE_ENGINE
    notes: list = field(default_factory=list)

    @property
    def largest_difference(self):
        """The compared result with the largest relative difference, or None."""
        numeric = [c for c in self.comparisons if c.rel_diff is not None]
        return max(numeric, key=lambda c: c.rel_diff, default=None)

    @property
    def reproduced(self):
        return self.error is None and not self.check_changes and not self.statement_changes and all(
            c.verdict in ("same", "changed") for c in self.comparisons)

    def differences(self):
        """Every way the record differs from its recomputation, one line each."""
        lines = [f"{c.key}: recorded {c.recorded}, recomputed {c.recomputed}" for c in self.comparisons
                 if c.verdict not in ("same", "changed")]
        return lines + [f"check changed: {c}" for c in self.check_changes] + list(self.statement_changes)

    @property
    def ok(self):
        return self.digest_ok and self.content_digest_ok and self.reproduced


def _agrees(recorded, recomputed):
    """A recomputed number agrees with the recorded one: within the relative tolerance, or the absolute one near zero."""
    return abs(recorded - recomputed) <= max(RELATIVE_TOLERANCE * abs(recorded), ABSOLUTE_TOLERANCE)


def _compare(key, recorded, recomputed):
    unit = recorded.get("unit", "") if recorded else recomputed.get("unit", "")
    if recorded is None:
        return Comparison(key, None, recomputed["value"], unit, None, None, "new")
    if recomputed is None:
        return Comparison(key, recorded["value"], None, unit, None, None, "missing")
    a, b = recorded["value"], recomputed["value"]
    if isinstance(a, (int, float)) and isinstance(b, (int, float)) and not isinstance(a, bool):
        diff = abs(a - b)
        rel = diff / abs(a) if a else (0.0 if diff == 0 else float("inf"))
        same = _agrees(a, b) and recorded.get("unit", "") == recomputed.get("unit", "")
        return Comparison(key, a, b, unit, diff, rel if rel != float("inf") else None,
                          "same" if same else "differs")
    # A text result holding numbers ("2.337 bar(a) → 1.05 bar(a)") is held to what its numbers can show: a
    # recomputation from the record's rounded-trip inputs may print a last digit apart (2.3375000000000004).
    return Comparison(key, a, b, unit, None, None, "same" if a == b or same_text(a, b) else "differs")


def _points(figure):
    return sum(len(s.get("x", ())) for s in figure.get("series", ())) if isinstance(figure, dict) else 0


def _walk(old, new, path, found):
    """Collect (path, abs_diff, rel_diff) for numbers and (path, None, None) for anything else that differs."""
    if old == new:   # equal throughout (the usual case), so nothing differs: compared once, in C
        return
    if isinstance(old, bool) or isinstance(new, bool) or not (
            isinstance(old, (int, float)) and isinstance(new, (int, float))):
        if isinstance(old, dict) and isinstance(new, dict):
            for key in sorted(set(old) | set(new)):
                _walk(old.get(key), new.get(key), f"{path}.{key}", found)
        elif isinstance(old, list) and isinstance(new, list) and len(old) == len(new):
            for index, (a, b) in enumerate(zip(old, new)):
                _walk(a, b, f"{path}[{index}]", found)
        elif old != new:
            found.append((path, None, None))
        return
    if not _agrees(old, new):
        diff = abs(old - new)
        found.append((path, diff, diff / abs(old) if old else None))


def compare_figures(recorded, recomputed):
    """One comparison per figure: its data recomputed against the record's, point by point.

    Numbers agree within the tolerances results are held to; names, titles, units, styles and labels
    must be the same. The comparison lists the figure's number of points and, when it differs, the
    first place that does.
    """
    comparisons = []
    names = [f.get("name") if isinstance(f, dict) else None for f in recorded]
    fresh = {f["name"]: f for f in recomputed}
    for index, figure in enumerate(recorded):
        name = names[index] or f"#{index + 1}"
        new = fresh.get(name)
        key = f"figure {name}"
        if new is None:
            comparisons.append(Comparison(key, f"{_points(figure)} points", None, "", None, None, "missing"))
            continue
        if "missing" in figure or "missing" in new:
            said = {True: "missing: {}", False: "{} points"}
            recorded_text = said["missing" in figure].format(figure.get("missing") or _points(figure))
            fresh_text = said["missing" in new].format(new.get("missing") or _points(new))
            comparisons.append(Comparison(key, recorded_text, fresh_text, "", None, None,
                                          "same" if figure == new else "differs"))
            continue
        found = []
        _walk(figure, new, "", found)
        numeric = [(a, r) for _, a, r in found if a is not None]
        verdict = "same" if not found else "differs"
        shown = f"{_points(new)} points" + (f" (first difference at {found[0][0].lstrip('.')})" if found else "")
        comparisons.append(Comparison(key, f"{_points(figure)} points", shown, "",
                                      max((a for a, _ in numeric), default=None),
                                      max((r for _, r in numeric if r is not None), default=None), verdict))
    for name, figure in fresh.items():
        if name not in names:
            comparisons.append(Comparison(f"figure {name}", None, f"{_points(figure)} points", "", None, None, "new"))
    order = [name for name in names if name in fresh]
    if order != [name for name in fresh if name in names]:
        comparisons.append(Comparison("figure order", ", ".join(map(str, names)), ", ".join(fresh), "", None, None,
                                      "differs"))
    return comparisons


def verify_record(record, engine=REFERENCE_ENGINE, path=None, digests_hold=False):
    """Verify a record: its digests, then its results recomputed from its inputs.

    Parameters
    ----------
    record : dict
        A record as read by :func:`steamcalc.records.record.load_record`.
    engine : str
        IF97 engine of the recomputation: "iapws" (the record's own) or "fast" (seuif97,
        the independent cross-check).
    path : str or Path, optional
        Where the record was read from: a kind that links other records (the site balance) checks
        the linked files beside it (``linked_record_problems``).
    digests_hold : bool
        The caller has just found both digests to hold on this very record (the register checks them
        when it reads each record): they are not computed again.

    Returns
    -------
    Verification
    """
    digest_ok, content_digest_ok = (True, True) if digests_hold else both_digests_hold(record)
    result = Verification(digest_ok=digest_ok, content_digest_ok=content_digest_ok, engine=check_engine(engine))
    now = provenance()
    then = record.get("provenance", {})
    result.version_changes = {k: (then.get(k), v) for k, v in now.items() if then.get(k) != v}
    # A statement a later release words otherwise (listed in .rewordings) is compared in today's words, and said.
    record, reworded = as_worded_now(record)
    result.notes.extend(rewording_note(r) for r in reworded)
    try:
        fresh = recompute(record, engine=engine)
    except (SteamcalcError, KeyError, TypeError, ValueError) as exc:
        result.error = f"the record's inputs could not be recomputed: {exc}"
        return result
    new_results = {k: v.to_record() for k, v in fresh.values.items()}
    old_results = record.get("results", {})
    for key in list(old_results) + [k for k in new_results if k not in old_results]:
        comparison = _compare(key, old_results.get(key), new_results.get(key))
        # From schema 3 a result's label is the calculation's too: a label edited in the file is caught.
        if comparison.verdict == "same" and not _earlier(record) and \
                old_results[key].get("label") != new_results[key].get("label"):
            comparison = Comparison(f"{key} (its label)", old_results[key].get("label"), new_results[key].get("label"),
                                    "", None, None, "differs")
        result.comparisons.append(comparison)
    if "figures" in record:   # schema 2 on: the figure data is recomputed like the results
        result.comparisons.extend(compare_figures(record["figures"], [f.to_record() for f in fresh.figures]))
    if "uncertainty" in record:
        if engine == REFERENCE_ENGINE:
            section = _compare_uncertainty(record, result, fresh)
        else:
            section = record["uncertainty"]
            result.notes.append("uncertainty bands not recomputed on this engine (their samples run on the fast "
                                "engine already); the ordinary verification reproduces them")
        if section is not None and "failed_sample_count" in section:
            add_sample_check(fresh, section)   # as run adds it: its check and, when it warns, its warning
    new_checks = [(c.name, c.status, text_of(c.detail)) for c in fresh.checks]
    old_checks = [(c.get("name"), c.get("status"), c.get("detail")) for c in record.get("checks", [])]
    if _earlier(record):
        notices = {c.name for c in fresh.checks if c.kind == "notice"}
        result.check_changes = _earlier_check_changes(old_checks, new_checks, result.notes, notices)
    else:
        if len(old_checks) == len(new_checks) and all(
                a[:2] == b[:2] and same_text(a[2], b[2]) for a, b in zip(old_checks, new_checks)):
            new_checks = old_checks  # the same checks, their numbers equal within the tolerance
        else:
            # Checks a later release's basis adds or drops change their count: each recomputed check is still taken
            # as recorded when a recorded one of its name and status says the same within the tolerance (a residual
            # of 1.9e-15 recomputed as 2.1e-15 is no difference).
            new_checks = [next((a for a in old_checks if a[:2] == b[:2] and same_text(a[2], b[2])), b)
                          for b in new_checks]
        if old_checks != new_checks:
            result.check_changes = [f"recorded: {n} = {s} ({d})" for n, s, d in old_checks
                                    if (n, s, d) not in new_checks] + \
                [f"recomputed: {n} = {s} ({d})" for n, s, d in new_checks if (n, s, d) not in old_checks]
        else:
            result.check_changes = _check_data_changes(record.get("checks", []), [c.to_record() for c in fresh.checks])
    result.check_changes += recorded_verdict_changes(record.get("checks", []))
    result.recomputed_status = fresh.status
    result.recomputed_failing = [c.name for c in fresh.checks if c.status == "fail"]
    # A later release's change of basis that this recomputation shows (a record of schema 3 of an earlier release):
    # its steps are matched by label, and what the change explains is listed as changed, naming the release.
    later = release_basis_changes(record, fresh)
    result.statement_changes = _statement_changes(record, fresh, result.notes, later)
    result.statement_changes += given_changes(record)
    if _earlier(record):
        _by_later_bases(record, result)
    elif later:
        _by_later_bases(record, result, later)
    _check_links(record, path, result)
    return result


def _check_links(record, path, result):
    """A record that links others (the site balance): each linked file must still hold what it used."""
    problems, notes = linked_record_findings(record, path)
    result.statement_changes += problems
    result.notes += notes


def linked_record_findings(record, path):
    """What no longer holds of a record's links (a kind with ``linked_record_problems``): ``(problems, notes)``.

    A problem fails the verification: a linked file that holds another record, or a value the record holds as
    taken from a linked record beside it that that record does not state. Where the record lies decides what is
    beside it, so ``register`` asks this of every record, remembered as verified or not. Empty for other kinds.
    """
    try:
        calc = get_calculation(record.get("kind"))
    except SteamcalcError:
        return [], []
    check = getattr(calc, "linked_record_problems", None)
    if check is None:
        return [], []
    from ..records.record import read_intact_record

    return check(record, path, read_intact_record)


#: What ``verify`` shows as the engineer's own words: stored text that no calculation makes, so nothing to
#: recompute. The texts as given are not among them: each is read again and must give the value stored.
ENGINEERS_WORDS = ("title", "preparer", "site name", "engineer's notes")


def _same_value(a, b):
    """A value read again from its text against the stored one: numbers within the tolerance, lists item by item."""
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(_same_value(x, y) for x, y in zip(a, b))
    numbers = all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in (a, b))
    return _agrees(a, b) if numbers else a == b


def _shown_value(entry, absolute=False):
    value, unit = entry.get("value"), entry.get("unit") or ""
    unit = "bar(a)" if absolute and unit == "bar" else unit
    if isinstance(value, list):
        value = ", ".join(f"{v:.6g}" if isinstance(v, float) else str(v) for v in value)
    elif isinstance(value, float):
        value = f"{value:.6g}"
    return f"{value} {unit}".strip()


def _given_raw(given, kind, site_table, name):
    """The value a case file held, from its text as given (what :func:`steamcalc.cases.site.parse_inputs` wrote).

    Returns ``(raw, header)``: ``header`` is ``(name, text)`` for a pressure given as a site header with its text.
    """
    text = given.strip()
    if kind == "pressure" and text.startswith("header:") and " = " in text:
        header, _, stated = text.partition(" = ")
        return stated, (header.split(":", 1)[1].strip(), stated)
    if kind == "pressure_list":
        return [item.strip() for item in text.split(", ")], None
    if kind in ("number", "fraction"):
        try:
            return float(text), None
        except ValueError:
            return text, None
    return given, None


@functools.lru_cache(maxsize=None)
def _probe(kind, name):
    """A one-field Inputs class holding input ``name`` of a kind, with its metadata: what a text as given is read
    into. Made once per input (the classes are the same whichever record asks)."""
    import dataclasses

    from ..calcs.base import input_fields

    metadata = next(f for f in input_fields(get_calculation(kind).Inputs) if f.name == name).metadata
    return dataclasses.make_dataclass("Given", [(name, object, dataclasses.field(default=None, metadata=metadata))])


def given_changes(record):
    """Each input whose text as given does not read as the value the record holds, one line each.

    The as-given text (``inputs.<key>.given``) is what the engineer typed; the record shows it beside the
    value it stores. Each is read again as a case file's value is read - gauge pressures with the record's
    own site atmosphere, headers from the record's site - and must give the stored value (within the
    tolerance results are held to). ``(default)`` must be the input's default. An edited text that no longer
    reads as the stored value is a difference naming the input.

    Parameters
    ----------
    record : dict

    Returns
    -------
    list of str
    """
    import dataclasses

    from ..calcs.base import input_fields
    from ..cases.site import Site

    try:
        calc = get_calculation(record.get("kind"))
        Site.from_record(record["site"])   # a site that does not read: the recomputation says why
    except (SteamcalcError, KeyError, TypeError, ValueError):
        return []   # the recomputation says why it cannot run
    fields = {f.name: f for f in input_fields(calc.Inputs)}
    headers = record["site"].get("headers", {}) if isinstance(record["site"].get("headers"), dict) else {}
    changes = []
    site_text = None
    for name, entry in record.get("inputs", {}).items():
        f = fields.get(name)
        if f is None or not isinstance(entry, dict) or "given" not in entry:
            continue
        given, kind, label = entry["given"], f.metadata["kind"], f.metadata["label"]
        where, absolute = f"input {name} ({label})", kind in ("pressure", "pressure_list")
        if not isinstance(given, str):
            changes.append(f"{where}: its text as given is not text ({given!r})")
            continue
        if given == "(default)" and (f.default is None or f.default is dataclasses.MISSING):
            changes.append(f"{where}: given as '(default)', but the input has no default; the record "
                           f"holds {_shown_value(entry, absolute)}")
            continue
        if site_text is None:
            site_text = canonical_json(record["site"])
            site_key = hashlib.sha256(site_text.encode("utf-8")).digest()
        read, header, reason = _read_given(calc.KIND, name, given, site_text, site_key)
        if reason is not None:
            changes.append(f"{where}: its text as given, {given!r}, does not read as a value ({reason}); the record "
                           f"holds {_shown_value(entry, absolute)}")
            continue
        if not _same_value(read["value"], entry.get("value")) or read["unit"] != entry.get("unit"):
            changes.append(f"{where}: its text as given, {given!r}, reads {_shown_value(read, absolute)}; the record "
                           f"holds {_shown_value(entry, absolute)}")
        elif header is not None and header[0] in headers and isinstance(headers[header[0]], dict) and \
                not _same_value(headers[header[0]].get("value"), read["value"]):
            changes.append(f"{where}: its text as given says header {header[0]} is {header[1]}, but the record's "
                           f"site has header {header[0]} at {_shown_value(headers[header[0]], True)}")
    return changes


#: Most readings of texts as given :func:`_read_given` keeps; beyond it the oldest are forgotten.
MAX_GIVEN_READINGS = 4096
#: Texts as given longer than this are kept in that memory by their SHA-256, not in full.
_LONGEST_KEPT_TEXT = 256
_GIVEN_READINGS = {}


def _read_given(kind, name, given, site_text, site_key):
    """``(read, header, reason)``: what an input's text as given reads as on a record's site (``site_text``, its
    canonical JSON, whose SHA-256 is ``site_key``), as a record entry; the header it names; or why it does not
    read. The same text on the same site reads the same: a site's records share most of theirs, so each is read
    once per process. The memory holds each site by its digest and a long text by its digest, so a folder of
    records with very large sites or texts costs it no more than ordinary ones."""
    text_key = given if len(given) <= _LONGEST_KEPT_TEXT else hashlib.sha256(given.encode("utf-8")).digest()
    key = (kind, name, text_key, site_key)
    try:
        return _GIVEN_READINGS[key]
    except KeyError:
        pass
    found = _read_given_afresh(kind, name, given, site_text)
    if len(_GIVEN_READINGS) >= MAX_GIVEN_READINGS:
        del _GIVEN_READINGS[next(iter(_GIVEN_READINGS))]
    _GIVEN_READINGS[key] = found
    return found


def _read_given_afresh(kind, name, given, site_text):
    from ..calcs.base import input_fields, to_record_inputs
    from ..cases.site import Site, parse_inputs

    site_record = json.loads(site_text)
    probe = _probe(kind, name)
    field = next(f for f in input_fields(get_calculation(kind).Inputs) if f.name == name)
    header = None
    try:
        if given == "(default)":
            value = field.default
        else:
            raw, header = _given_raw(given, field.metadata["kind"], site_record, name)
            value = getattr(parse_inputs(probe, {name: raw}, Site.from_record(site_record))[0], name)
        read = to_record_inputs(probe(**{name: value}), {})[name]
    except (SteamcalcError, TypeError, ValueError, ArithmeticError) as exc:
        return None, None, exc.message if isinstance(exc, SteamcalcError) else str(exc)
    return read, header, None




def _basis_change(calc, text, changes=None, added=True):
    """(release, why) of the basis change that ``text`` (a key, label or statement) falls under: among ``changes``
    (entries of the kind's ``BASIS_CHANGES``), or all of them. ``added`` is False for what the record holds and
    the recomputation does not give: no change that only adds (:data:`ADDS_ONLY`) explains it."""
    from fnmatch import fnmatchcase

    for change in (getattr(calc, "BASIS_CHANGES", ()) if changes is None else changes):
        if not added and len(change) > 4 and change[4] == ADDS_ONLY:
            continue
        release, why, patterns = change[:3]
        if any(fnmatchcase(str(text), pattern) for pattern in patterns):
            return release, why
    return None


def release_basis_changes(record, fresh):
    """The basis changes of releases after the one that issued a record of schema 3 that its recomputation shows.

    An entry of a kind's ``BASIS_CHANGES`` may name, as a fourth item, a pattern over the recomputed steps' labels
    and checks' names (each also as "name: detail"): the change applies to a record of an earlier release only when
    the recomputation takes the changed path (a step or a check of that name, or of those words), so a record the
    change does not touch is held to every word as before. A fifth item :data:`ADDS_ONLY` marks a change that only
    adds: it explains nothing the record holds that the recomputation does not issue. A sixth, a pattern (or a tuple
    of them) over the record's own checks as "name: detail" and steps as "label: equation", asks for what the
    earlier release wrote on the changed path (its symptom): a record that holds none gets no allowance of it. A
    record whose release does not read gets none (:func:`steamcalc.review.rewordings.release`).
    """
    from fnmatch import fnmatchcase

    from .rewordings import release

    if _earlier(record) or not isinstance(record.get("provenance"), dict):
        return []
    issued_by = release(record["provenance"].get("steamcalc"))
    try:
        calc = get_calculation(record.get("kind"))
    except SteamcalcError:
        return []
    if issued_by is None:
        return []
    # A check is met by its name, and by its name and words ("NAME: detail"), for a path only its words tell apart.
    labels = [step.label for step in fresh.steps] + [check.name for check in fresh.checks] + [
        f"{check.name}: {text_of(check.detail)}" for check in fresh.checks]
    # The record's own checks as "name: detail", for an entry that also asks what the earlier release wrote.
    held = [f"{c.get('name')}: {c.get('detail')}" for c in record.get("checks", []) if isinstance(c, dict)
            and isinstance(c.get("detail"), str)] + [
        f"{s.get('label')}: {s.get('equation')}" for s in record.get("steps", []) if isinstance(s, dict)]

    def symptom(change):
        if len(change) < 6 or change[5] is None:
            return True
        patterns = (change[5],) if isinstance(change[5], str) else change[5]
        return any(fnmatchcase(text, pattern) for text in held for pattern in patterns)
    return [change for change in getattr(calc, "BASIS_CHANGES", ())
            if len(change) > 3 and release(change[0]) is not None and issued_by < release(change[0])
            and any(fnmatchcase(label, change[3]) for label in labels) and symptom(change)]


def _by_later_bases(record, result, changes=None):
    """Differences of an earlier release's record that a later release's change of basis explains.

    Each stays listed, as a note naming the release and the change; what no declared change explains
    stays a difference. Records of the schemas before the change (1 and 2) are read this way against every
    change; a record of schema 3 against ``changes``, those of :func:`release_basis_changes`.
    """
    try:
        calc = get_calculation(record.get("kind"))
    except SteamcalcError:
        return

    def basis(calc, text, added=True):
        return _basis_change(calc, text, changes, added)

    for c in result.comparisons:
        change = c.verdict in ("differs", "new", "missing") and basis(calc, c.key, c.verdict == "new")
        if change:
            c.verdict = "changed"
            result.notes.append(f"{c.key}: recorded {c.recorded}, recomputed {c.recomputed}: changed by release "
                                f"{change[0]} ({change[1]})")

    def explained(line):
        # "recorded: NAME = ..." / "step 'LABEL': ..." / "warnings: not issued 'TEXT'"
        name = re.sub(r"^(?:recorded|recomputed): ", "", line).split(" = ")[0]
        label = re.match(r"step '([^']*)'", line)
        # What the recomputation adds ("recomputed: ...", a step the record does not have), or what the record holds.
        added = line.startswith("recomputed: ") or line.endswith("a step of this release the record does not have")
        return basis(calc, label.group(1) if label else name, added)
    # The release named when a line is explained by the change of its checks (the status) or a statement.
    note = BASIS_NOTE if changes is None else f"{changes[0][0]} (its basis changed; see the results' notes)"
    kept = []
    for line in result.check_changes:
        change = explained(line)
        (result.notes.append(f"check {line}: changed by release {change[0]} ({change[1]})") if change
         else kept.append(line))
    explained_checks = len(result.check_changes) - len(kept)
    result.check_changes = kept
    kept = []
    for line in result.statement_changes:
        section, _, rest = line.partition(": ")
        if section == "status" and explained_checks and not result.check_changes and \
                record.get("status") == _worst_status(record.get("checks", [])):
            # The status follows the checks: when every check that changed is a declared change of basis, so is it.
            result.notes.append(f"{line}: changed by release {note}")
            continue
        parts = _QUOTED.findall(rest) if section in (
            "warnings", "assumptions") else []
        if parts and all(basis(calc, ast.literal_eval(text), how == "missing") or basis(
                calc, ast.literal_eval(text).split(":")[0], how == "missing") for how, text in parts):
            result.notes.append(f"{line}: changed by release {note}")
        elif line.startswith("step ") and explained(line):
            change = explained(line)
            result.notes.append(f"{line}: changed by release {change[0]} ({change[1]})")
        else:
            kept.append(line)
    result.statement_changes = kept


def _worst_status(checks):
    """The status a record's own checks give (``fail`` over ``warn`` over ``pass``): a record's status that a later
    release's change of basis explains must still be the one its checks state."""
    statuses = {c.get("status") for c in checks if isinstance(c, dict)}
    return "fail" if "fail" in statuses else "warn" if "warn" in statuses else "pass"


#: A statement as _statement_changes quotes it: "missing 'text'" or 'not issued "text"'.
_QUOTED = re.compile(r"""(missing|not issued) ('(?:[^'\\]|\\.)*'|"(?:[^"\\]|\\.)*")""")
#: How a statement explained by a change of basis is noted.
BASIS_NOTE = "0.3 (its basis changed; see the results' notes)"
#: Schemas whose steps and checks are text only (no expression, operands, quantity or limits).
_TEXT_SCHEMAS = ("steamcalc.record/1", "steamcalc.record/2")


def _earlier(record):
    """True for a record of schema 1 or 2 that looks it: steps and checks as text only.

    A record that says schema 1 or 2 but carries what only schema 3 writes (a step's expression, a check's
    kind) was relabelled: it gets none of the allowances an earlier release's record gets.
    """
    if record.get("schema") not in _TEXT_SCHEMAS:
        return False
    steps, checks = record.get("steps", []), record.get("checks", [])
    return not any(isinstance(s, dict) and ("expression" in s or "operands" in s) for s in steps) and not any(
        isinstance(c, dict) and ("kind" in c or "phrase" in c or "limits" in c) for c in checks)
#: The parts of a step kept as data, compared with the numeric tolerance.
_STEP_DATA = ("expression", "operands", "units_fixed")
#: The parts of a check kept as data.
_CHECK_DATA = ("kind", "phrase", "quantity", "limits", "source")


def _check_data_changes(recorded, recomputed):
    """Each check whose data (kind, phrase, quantity, limits, source) is not what the calculation gives."""
    changes = []
    for a, b in zip(recorded, recomputed):
        found = []
        _walk({k: a.get(k) for k in _CHECK_DATA}, {k: b.get(k) for k in _CHECK_DATA}, "", found)
        if found:
            changes.append(f"recorded: {a.get('name')}: its {found[0][0].lstrip('.')} is not the calculation's")
    return changes


def recorded_verdict_changes(checks):
    """Each check of a quantity against limits whose recorded status is not what they give.

    Read from the record alone: an edited status (or quantity, or limit) shows here even when the
    digests were recomputed after the edit.
    """
    changes = []
    for check in checks:
        if not isinstance(check, dict) or "limits" not in check or "quantity" not in check:
            continue
        try:
            given = verdict(Amount.from_record(check["quantity"]), [Limit.from_record(l) for l in check["limits"]])
        except (KeyError, TypeError, ValueError, ArithmeticError) as exc:
            changes.append(f"recorded: {check.get('name')}: its quantity and limits cannot be compared ({exc})")
            continue
        if given != check.get("status"):
            changes.append(f"recorded: {check.get('name')} = {check.get('status')}, but its quantity against its "
                           f"limits gives {given}")
    return changes


_NUMBER = re.compile(r"[-+]?(?:\d{1,3}(?:,\d{3})+|\d+)(?:\.\d*)?(?:[eE][-+]?\d+)?")


def _last_place(text):
    """One unit in the last printed digit of a number as written."""
    mantissa, _, exponent = text.lower().partition("e")
    decimals = len(mantissa.partition(".")[2])
    return 10.0 ** (int(exponent or 0) - decimals)


def same_text(a, b):
    """Two texts alike but for their numbers, which agree within the tolerance or one unit in the last digit.

    A record's details and substituted equations print numbers that a recomputation from the
    record's own (rounded-trip) inputs may print a last digit apart.

    Examples
    --------
    >>> same_text("residual 0.0e+00 (tolerance 1e-09)", "residual 1.8e-16 (tolerance 1e-09)")
    True
    >>> same_text("passes 5,694 kg/h", "passes 5,695 kg/h"), same_text("margin 12 %", "margin 31 %")
    (True, False)
    >>> same_text("pass", "fail")
    False
    """
    if a == b:
        return True
    if not isinstance(a, str) or not isinstance(b, str):
        return False
    if _NUMBER.split(a) != _NUMBER.split(b):
        return False
    for x, y in zip(_NUMBER.findall(a), _NUMBER.findall(b)):
        u, v = float(x.replace(",", "")), float(y.replace(",", ""))
        slack = max(RELATIVE_TOLERANCE * abs(u), ABSOLUTE_TOLERANCE, 1.000001 * max(_last_place(x), _last_place(y)))
        if abs(u - v) > slack:
            return False
    return True


def _labelled(steps):
    """Steps by (label, occurrence): the n-th step of a label is matched with the n-th."""
    seen, keyed = {}, {}
    for step in steps:
        label = step.get("label") if isinstance(step, dict) else None
        seen[label] = seen.get(label, 0) + 1
        keyed[(label, seen[label])] = step
    return keyed


def _earlier_step_changes(old_steps, new_steps, notes):
    """An earlier release's worked steps (text only) against this release's, matched by label.

    Release 0.3 writes the steps from amounts, with equations that state the step's value on their
    left and some steps split or added: those are listed as notes naming the release that changed
    them. A step in both whose value differs is a difference.
    """
    old, new = _labelled(old_steps), _labelled(new_steps)
    changes = []
    for key, a in old.items():
        b = new.get(key)
        if b is None:
            notes is not None and notes.append(f"step {key[0]!r}: recorded by the earlier release, no longer a "
                                               "worked step since steamcalc 0.3")
            continue
        if a.get("equation") != b.get("equation") and notes is not None:
            notes.append(f"step {key[0]!r}: its equation is written otherwise since steamcalc 0.3 "
                         f"(recorded {a.get('equation')!r}, now {b.get('equation')!r}); its value is compared")
        if (a.get("value") is None) != (b.get("value") is None) or (
                a.get("value") is not None and _compare("", _step_value(a["value"]), b["value"]).verdict != "same"):
            changes.append(f"step {key[0]!r}: the record's value is not the calculation's")
    added = [key[0] for key in new if key not in old]
    if added and notes is not None:
        notes.append(f"steps worked since steamcalc 0.3 that the record does not have: {', '.join(map(repr, added))}")
    return changes


def _same_step(a, b):
    """A recorded step and a recomputed one alike: their data within the tolerance, their texts alike."""
    found = []
    _walk({k: a.get(k) for k in _STEP_DATA}, {k: b.get(k) for k in _STEP_DATA}, "", found)
    texts_differ = bool(found) or any(not same_text(a.get(k), b.get(k)) for k in ("label", "equation", "substituted"))
    value_differs = (a.get("value") is None) != (b.get("value") is None) or (
        a.get("value") is not None and _compare("", a["value"], b["value"]).verdict != "same")
    return not (texts_differ or value_differs)


def _steps_under_later_basis(old_steps, new_steps, later, notes):
    """A schema-3 record's steps against today's when a later release changed a basis it shows, matched by label.

    A step under the change (its label in the change's patterns) is a note when it differs, was added or is gone;
    every other step must be as the calculation writes it, word for word, as for any record.
    """
    from fnmatch import fnmatchcase

    def under(label, added=False):
        # A step the record holds that differs or is gone is under no change that only adds (ADDS_ONLY).
        return any(fnmatchcase(str(label), pattern) for change in later for pattern in change[2]
                   if added or not (len(change) > 4 and change[4] == ADDS_ONLY))

    old, new = _labelled(old_steps), _labelled(new_steps)
    release = later[0][0]
    changes, changed = [], []
    for key, a in old.items():
        b = new.get(key)
        if b is not None and _same_step(a, b):
            continue
        if under(key[0]):
            changed.append(key[0])
        else:
            changes.append(f"step {key[0]!r}: " + ("not a step of this release" if b is None else
                                                    "the record's text or value is not the calculation's"))
    added = [key[0] for key in new if key not in old]
    changes += [f"step {label!r}: a step of this release the record does not have" for label in added
                if not under(label, True)]
    changed += [label for label in added if under(label, True)]
    if changed and notes is not None:
        notes.append(f"steps changed, added or gone by the change of basis of release {release}: "
                     + ", ".join(map(repr, changed)))
    return changes


def _earlier_check_changes(recorded, recomputed, notes, notices=()):
    """An earlier release's checks (name, status, detail) against this release's, matched by name.

    Each recorded check must be recomputed with the same verdict, its detail the same or stating the same
    numbers in other words (a note). A check this release adds is a note naming the release (the overall
    status, compared apart, still catches one that changes the record's verdict); a recorded check this
    release does not make is a difference.
    """
    changes, fresh = [], _labelled([{"label": n, "status": s, "detail": d} for n, s, d in recomputed])
    kept = _labelled([{"label": n, "status": s, "detail": d} for n, s, d in recorded])
    for key, old in kept.items():
        new = fresh.get(key)
        if new is None:
            changes.append(f"recorded: {key[0]} = {old['status']} ({old['detail']}): not a check of this release")
        elif key[0] in notices and (same_text(old["detail"], new["detail"]) or _same_numbers(old["detail"],
                                                                                              new["detail"])):
            notes.append(f"check {key[0]!r}: recorded as {old['status']}, a notice since steamcalc 0.3 (a statement "
                         "that cannot warn or fail), its numbers the same")
        elif old["status"] != new["status"] or not (same_text(old["detail"], new["detail"])
                                                    or _same_numbers(old["detail"], new["detail"])):
            changes.append(f"recorded: {key[0]} = {old['status']} ({old['detail']})")
            changes.append(f"recomputed: {key[0]} = {new['status']} ({new['detail']})")
        elif not same_text(old["detail"], new["detail"]):
            notes.append(f"check {key[0]!r}: worded otherwise since steamcalc 0.3, its numbers and verdict the same")
    notes.extend(f"check {key[0]!r} = {new['status']}: checked since steamcalc 0.3" for key, new in fresh.items()
                 if key not in kept)
    return changes


def _same_numbers(a, b):
    """Two texts that state the same numbers in the same order, within the tolerance (their words may differ)."""
    if not isinstance(a, str) or not isinstance(b, str):
        return False
    x, y = _NUMBER.findall(a), _NUMBER.findall(b)
    return len(x) == len(y) and same_text(" ".join(x), " ".join(y))


def _reworded(section, recorded, issued, notes):
    """An earlier release's statements against today's: the same numbers in other words are a note, not a change.

    A statement this release adds is a note too; one the record has that this release does not issue stays a
    difference (an earlier release's record cannot gain a statement).
    """
    matched_recorded, matched_issued = [], []
    for text in recorded:
        twin = next((t for t in issued if t not in matched_issued and (same_text(text, t) or _same_numbers(text, t)
                                                                       and _NUMBER.findall(text))), None)
        if twin is not None:
            matched_recorded.append(text)
            matched_issued.append(twin)
            if not same_text(text, twin) and notes is not None:
                notes.append(f"{section}: worded otherwise since steamcalc 0.3, the same numbers: {twin!r}")
    added = [t for t in issued if t not in matched_issued]
    if notes is not None:
        notes.extend(f"{section}: stated since steamcalc 0.3: {t!r}" for t in added)
    # What is left: the record's statements this release does not issue, against nothing missing.
    return [t for t in recorded if t not in matched_recorded], []


def _step_value(value):
    """A step value of an earlier release in this release's unit spelling: its "bar difference" is "bar"."""
    if isinstance(value, dict) and value.get("unit") == "bar difference":
        return {**value, "unit": "bar"}
    return value


def _statement_changes(record, fresh, notes=None, later=()):
    """The record's status and statements against what the calculation issues today (``later``: the basis changes
    of :func:`release_basis_changes`, under which the steps are matched by label)."""
    changes = []
    if record.get("status") != fresh.status:
        changes.append(f"status: recorded {record.get('status')!r}, recomputed {fresh.status!r}")
    own_assumptions = [a for a in record.get("assumptions", []) if not str(a).startswith("Engineer's note: ")]
    for key, recorded, issued in (("cautions", record.get("cautions", []), list(fresh.cautions)),
                                  ("references", record.get("references", []), list(fresh.references)),
                                  ("warnings", record.get("warnings", []), list(fresh.warnings)),
                                  ("assumptions", own_assumptions, list(fresh.assumptions))):
        if len(recorded) == len(issued) and all(same_text(a, b) for a, b in zip(recorded, issued)):
            continue
        if _earlier(record):
            recorded, issued = _reworded(key, recorded, issued, notes)
        if recorded != issued:
            missing = [t for t in issued if t not in recorded]
            extra = [t for t in recorded if t not in issued]
            what = "; ".join([f"missing {t!r}" for t in missing] + [f"not issued {t!r}" for t in extra]) or "reordered"
            changes.append(f"{key}: {what}")
    old_steps = record.get("steps", [])
    new_steps = [s.to_record() for s in fresh.steps]
    if _earlier(record):
        changes.extend(_earlier_step_changes(old_steps, new_steps, notes))
        return changes
    if later:
        changes.extend(_steps_under_later_basis(old_steps, new_steps, later, notes))
        return changes
    if len(old_steps) != len(new_steps):
        changes.append(f"steps: {len(old_steps)} recorded, {len(new_steps)} recomputed")
    for i, (a, b) in enumerate(zip(old_steps, new_steps), 1):
        if not _same_step(a, b):
            changes.append(f"step {i} ({b.get('label')}): the record's text or value is not the calculation's")
    return changes


@dataclass
class CompanionCheck:
    """A report beside a record, against the same report rendered afresh from the JSON."""

    path: object
    #: "match", "differs", "absent", "repaired", "older" (drawn by an earlier release), "typed-as-signed" (drawn
    #: by an earlier release that showed a typed name as a sign-off: it differs, and --repair draws it again),
    #: "not checked" (a PDF or executed workbook beside the record, which cannot be drawn again and compared),
    #: "in progress" (an issue of the set is under way: its new report, staged, is the JSON's rendering),
    #: "earlier layout" (this JSON as releases 0.2 and 0.3 laid the report out, before its first page; --repair
    #: draws it in this release's layout) or
    #: "not repaired" (--repair could not write it: ``problem`` says why and what to do)
    verdict: str
    #: Why the report could not be read or written, with the fix, when that is so.
    problem: str | None = None

    @property
    def differs(self):
        """The report does not show what the JSON holds."""
        return self.verdict in ("differs", "typed-as-signed", "not repaired")


#: Largest report read for the comparison, bytes (a record's HTML with its charts is well below it).
MAX_REPORT_FILE = 64 * 1024 * 1024


def _read_report(path):
    """A report's text: ``(text, verdict, problem)``; a FIFO, device or folder is never opened (it would block
    or never end), an unreadable or oversized file differs."""
    from ..signing.keys import read_small_file

    if not (path.exists() or path.is_symlink()):
        return None, "absent", None
    try:
        data, _ = read_small_file(path, "report", limit=MAX_REPORT_FILE,
                                  fix="move it away; steamcalc verify --repair draws the report again")
        return data.decode("utf-8"), None, None
    except UnicodeDecodeError:
        return None, "differs", "it is not UTF-8 text"
    except SteamcalcError as exc:
        return None, "differs", exc.explained()


def issue_in_progress(json_path):
    """The staging folder of an issue of this record's set that has been committed (its commit list written) and
    not yet moved into place, or None.

    Between the JSON's move and its reports' moves a signed JSON sits beside a report that does not yet show the
    signature; the next writer of the record (or the writer itself) completes the set
    (:func:`steamcalc.records.issuing.recover`).
    """
    from ..records.issuing import WORK_FOLDER, _COMMIT_LIST   # the layout issuing writes

    json_path = Path(json_path)
    staging = json_path.parent / WORK_FOLDER / f"{json_path.stem}.staged"
    try:
        return staging if staging.is_dir() and (staging / _COMMIT_LIST).is_file() else None
    except OSError:
        return None


def _staged_is(staging, name, fresh):
    """The staged report of an issue in progress is the rendering of the JSON now in place."""
    from ..signing.keys import read_small_file

    try:
        data, _ = read_small_file(staging / name, "staged report", limit=MAX_REPORT_FILE)
        return data.decode("utf-8") == fresh
    except (SteamcalcError, UnicodeDecodeError):
        return False


#: Companions a record may have that are not drawn from the JSON alone: reported as not checked, never as matching.
UNCHECKED_COMPANIONS = (".pdf", ".ipynb")


#: A chart of the HTML record as release 0.2 drew it: one <figure> holding an SVG whose ids start so.
_EARLIER_CHART = re.compile(r'<figure style="margin:\.5em 0 1em;break-inside:avoid"><svg [^>]*>(?:(?!</figure>).)*?'
                            r'id="steamcalc-chart-\d+(?:(?!</figure>).)*</figure>\n', re.S)
_SCHEMA_1_NOTE = re.compile(r'<p class="small">This record was issued by an earlier release \(schema 1\)[^<]*</p>')


def _drawn_by_earlier_release(text, fresh, record):
    """A report of a schema-1 record (release 0.2) as that release drew it: all but its charts as this release draws them.

    Release 0.2 kept no figure data and drew its charts by re-running the calculation, so those charts
    cannot be drawn again from the record; everything else on the page must be as this release draws it,
    byte for byte. The schema, not the stated software version, decides (a version is one field anyone
    can edit), and a schema-1 record never has figure data.
    """
    if record.get("schema") != "steamcalc.record/1" or "figures" in record:
        return False
    return _EARLIER_CHART.sub("", text) == _SCHEMA_1_NOTE.sub("", fresh)


def _typed_name_shown_as_signed(text, record):
    """A report of a record with a typed name only, drawn by an earlier release as a green "Checked and signed" box."""
    return bool(text) and not record.get("signatures") and bool(record.get("signoff") or record.get("checked_by")) \
        and ("Checked and signed" in text or "(name only, no key)" in text)


def check_companions(json_path, record, repair=False, memory=None, intact=False):
    """Re-render a record's HTML and Markdown and compare them with the files beside it.

    A report of a schema-1 record that is as this release draws it but for the charts release 0.2 drew
    is ``older``: its charts are not checked, and ``repair`` keeps it (they cannot be drawn again). A PDF
    (printed by a browser) or executed workbook beside the record is listed as ``not checked``: it cannot
    be drawn again byte for byte, so it is never said to match, and ``repair`` leaves it alone. A report
    that differs while an issue of the set is in progress (:func:`issue_in_progress`), and whose staged
    replacement is the JSON's rendering, is ``in progress``, not edited; ``repair`` leaves it to the issue.
    A report ``repair`` cannot write (a read-only drive, a full disk) is ``not repaired``, with the reason.
    A report that is a FIFO or device is never opened: it differs.

    Parameters
    ----------
    json_path : str or Path
        The record's JSON file; the reports are beside it with the same stem.
    record : dict
        The record as read from it.
    repair : bool
        Re-write the reports that differ or are absent (only do this for a record that verifies).
    memory : steamcalc.review.memory.RegisterMemory, optional
        The digests of the reports this software draws from records it has drawn before: a report whose
        digest is the remembered one matches without being drawn again.
    intact : bool
        The record's digest holds (a memory is consulted only for such a record).

    Returns
    -------
    list of CompanionCheck
    """
    from ..records.record import write_text_atomic
    from ..render.report import RENDERERS, render_earlier

    from ..render.display import display_record

    from .memory import text_digest

    checks = []
    staging = issue_in_progress(json_path)
    drawn = {}

    def draw(suffix):
        # Each report drawn at most once, the record's display made once for both.
        if suffix not in drawn:
            if "shown" not in drawn:
                drawn["shown"] = display_record(record)
            drawn[suffix] = RENDERERS[suffix](record, shown=drawn["shown"])
            if memory is not None:
                memory.remember_report(record, intact, suffix, drawn[suffix])
        return drawn[suffix]

    for suffix in RENDERERS:
        path = Path(json_path).with_suffix(suffix)
        text, verdict, problem = _read_report(path)
        known = memory.report_digest(record, intact, suffix) if memory is not None else None
        if verdict is None and known is not None and text_digest(text) == known:
            verdict = "match"   # the very text this software draws from this record
        elif verdict is None:
            verdict = "match" if text == draw(suffix) else "differs"
        fresh = draw(suffix) if verdict != "match" else None
        # A report in the layout earlier releases drew (before the first page), showing this very JSON, is not edited.
        earlier = render_earlier(record, suffix) if verdict == "differs" and text is not None else None
        if verdict == "differs" and earlier is not None and text == earlier:
            verdict = "earlier layout"
        elif verdict == "differs" and text is not None and (_drawn_by_earlier_release(text, fresh, record)
                                                            or _drawn_by_earlier_release(text, earlier, record)):
            verdict = "older"
        elif verdict == "differs" and _typed_name_shown_as_signed(text, record):
            verdict = "typed-as-signed"
        if verdict in ("differs", "absent", "typed-as-signed") and staging is not None and \
                _staged_is(staging, path.name, fresh):
            # Not edited: the writer moves the report into place next (or the next writer of the record does).
            checks.append(CompanionCheck(path, "in progress", f"the report that shows this JSON is staged in "
                                         f"{staging} and moves into place when the issue completes"))
            continue
        if repair and verdict == "older":
            pass   # the earlier release's charts cannot be drawn again: the report is kept as it is
        elif repair and verdict != "match":
            try:
                write_text_atomic(path, fresh)
                verdict, problem = "repaired", None
            except SteamcalcError as exc:
                verdict, problem = "not repaired", exc.explained()
            except OSError as exc:   # the temporary file beside it cannot be made (a read-only drive)
                from ..records.issuing import os_error
                verdict, problem = "not repaired", os_error(exc, path, "write the report").explained()
        checks.append(CompanionCheck(path, verdict, problem))
    for suffix in UNCHECKED_COMPANIONS:
        path = Path(json_path).with_suffix(suffix)
        if path.exists() or path.is_symlink():
            checks.append(CompanionCheck(path, "not checked"))
    return checks


def verify_file(path, engine=REFERENCE_ENGINE):
    """Load and verify one record file: ``(path, record, verification, error)``. A file that cannot
    be read gives its error text instead of raising (one bad file never stops a batch)."""
    from ..records.record import load_record

    try:
        record = load_record(path)
    except SteamcalcError as exc:
        return path, None, None, str(exc)
    return path, record, verify_record(record, engine=engine, path=path), None


def _compare_uncertainty(record, outcome, nominal_result):
    try:
        fresh = recompute_uncertainty(record, nominal_result)
    except (SteamcalcError, KeyError, TypeError, ValueError) as exc:
        outcome.error = f"the record's uncertainty section could not be recomputed: {exc}"
        return None
    old_bands = record["uncertainty"].get("bands", {})
    for key in list(old_bands) + [k for k in fresh["bands"] if k not in old_bands]:
        old = old_bands.get(key)
        new = fresh["bands"].get(key)
        # Records made before the coverage interval was kept carry only the percentiles. The nominal, mean,
        # spread and count the record states are compared too (the report prints the nominal beside each band).
        stats = ("p05", "p50", "p95") + (("low", "high") if old is None or "low" in old else ())
        stats += tuple(k for k in ("nominal", "mean", "std", "samples") if old is None or k in old)
        stats += tuple(k for k in (old or {}) if k not in stats and k != "unit")   # anything else it states
        for stat in stats:
            outcome.comparisons.append(_compare(
                f"uncertainty.{key}.{stat}",
                None if old is None else {"value": old[stat], "unit": old["unit"]},
                None if new is None else {"value": new[stat], "unit": new["unit"]}))
    # What the section says besides its bands is recomputed too: the sensitivity (its order names the
    # input that matters most) and the summary sentences the record prints.
    found = []
    _walk(record["uncertainty"].get("sensitivity"), fresh.get("sensitivity"), "", found)
    if found:
        outcome.comparisons.append(Comparison("uncertainty.sensitivity", "as recorded",
                                              f"differs at {found[0][0].lstrip('.') or 'its layout'}", "", None, None,
                                              "differs"))
    outcome.comparisons.extend(_uncertainty_statements(record, fresh))
    old_summary, new_summary = record["uncertainty"].get("summary"), fresh.get("summary")
    if old_summary is not None and not (
            isinstance(old_summary, list) and isinstance(new_summary, list) and len(old_summary) == len(new_summary)
            and all(same_text(a, b) for a, b in zip(old_summary, new_summary))):
        outcome.comparisons.append(Comparison("uncertainty.summary", "; ".join(map(str, old_summary)) if isinstance(
            old_summary, list) else old_summary, "; ".join(new_summary or []), "", None, None, "differs"))
    return fresh


#: The uncertainty section's settings (read by the recomputation, so the same by construction) and the parts
#: compared on their own (bands, sensitivity, summary, tolerances).
_UNCERTAINTY_READ = ("samples", "seed", "coverage", "bands", "sensitivity", "summary", "tolerances")


def _uncertainty_statements(record, fresh):
    """What the uncertainty section states besides its bands, against its recomputation: the method text,
    the generator, the samples that gave a result and the reasons of those that did not, the engine the samples
    ran on (its version is the software's, listed with the versions), and each tolerance's text as given, read
    again; anything else the section states that the recomputation does not is a difference too."""
    section, comparisons = record["uncertainty"], []
    for key in [k for k in section if k not in _UNCERTAINTY_READ] + \
            [k for k in fresh if k not in section and k not in _UNCERTAINTY_READ]:
        old, new = section.get(key), fresh.get(key)
        if key == "property_engine" and isinstance(old, dict) and isinstance(new, dict):
            old, new = ({k: v for k, v in e.items() if k != "version"} for e in (old, new))
        found = []
        _walk(old, new, "", found)
        if found:
            comparisons.append(Comparison(f"uncertainty.{key}", _said(old), _said(new), "", None, None,
                                          "missing" if new is None else "new" if old is None else "differs"))
    comparisons.extend(_tolerance_texts(record))
    return comparisons


def _said(value):
    text = value if isinstance(value, str) else repr(value)
    return text if len(text) <= 120 else text[:117] + "..."


def _tolerance_texts(record):
    """Each tolerance whose text as given does not read as the tolerance the section holds."""
    from ..calcs.base import from_record_inputs, input_fields
    from ..runs.uncertainty import parse_tolerances

    try:
        calc = get_calculation(record.get("kind"))
        inputs = from_record_inputs(calc.Inputs, record["inputs"])
    except (SteamcalcError, KeyError, TypeError, ValueError):
        return []
    kinds = {f.name: f.metadata["kind"] for f in input_fields(calc.Inputs)}
    comparisons = []
    for key, entry in (record["uncertainty"].get("tolerances") or {}).items():
        if not isinstance(entry, dict) or key not in kinds or "given" not in entry:
            continue
        given = entry["given"]
        raw = given
        if isinstance(given, str) and kinds[key] in ("number", "fraction") and "%" not in given:
            try:
                raw = float(given)
            except ValueError:
                pass
        try:
            (tolerance,), _, _ = parse_tolerances(calc.Inputs, {key: raw}, inputs)
            read = tolerance.to_record(kinds[key])
            same = _same_value(read["value"], entry.get("value")) and read["unit"] == entry.get("unit")
            said = _shown_value(read)
        except (SteamcalcError, TypeError, ValueError, ArithmeticError) as exc:
            same, said = False, f"does not read ({exc.message if isinstance(exc, SteamcalcError) else exc})"
        if not same:
            comparisons.append(Comparison(f"uncertainty.tolerances.{key} (its text as given, {given!r})",
                                          _shown_value(entry), said, "", None, None, "differs"))
    return comparisons
