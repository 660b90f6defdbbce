"""The register of a site's records: what is issued, how it verifies, who signed it, and whether it is current.

A record is *current* when no later revision of the same id is issued, its case file still
gives the same case, the site file still gives the same site data, it was made by the
package version and property engine in use here, and its HTML and Markdown match its JSON.
It is *valid* when its digests hold, its results, checks and status are reproduced, and
every signature on it is valid and made with a trusted key.
"""

from __future__ import annotations

import copy
import csv
import html
import io
import os
from dataclasses import dataclass, field
from pathlib import Path
from urllib.parse import quote

from ..errors import SteamcalcError

#: Provenance entries that make a record out of date when they differ: the package itself and
#: the property engine of issued records. (A different Python or numpy alone does not.)
CURRENCY_PROVENANCE = ("steamcalc", "iapws", "engine")

COLUMNS = ("id", "revision", "kind", "title", "status", "verification", "signatures", "superseded",
           "case_file", "site_data", "software", "companions", "current", "json")


@dataclass
class RegisterRow:
    """One record in the register; every column is text a person reads."""

    json: str
    id: str = ""
    revision: str = ""
    kind: str = ""
    title: str = ""
    status: str = ""
    verification: str = ""
    signatures: str = "not signed"
    superseded: str = "no"
    case_file: str = "no case file found"
    site_data: str = "no site file found"
    software: str = "same"
    companions: str = ""
    valid: bool = True
    stale: list = field(default_factory=list)
    #: The JSON file's path (the column ``json`` is its name), for the links of a register written elsewhere.
    path: str = ""
    #: What the reader should know that does not make the record stale (two case files giving one id).
    warnings: list = field(default_factory=list)
    #: The inputs where the case file now differs from the record (empty: none), None with no case file.
    case_changes: list = field(default=None, repr=False, compare=False)

    @property
    def current(self):
        return not self.stale

    @property
    def ok(self):
        return self.valid and self.current

    def as_dict(self):
        values = {c: getattr(self, c) for c in COLUMNS if c != "current"}
        values["current"] = "yes" if self.current else "no: " + "; ".join(self.stale)
        return values


def revision_order(revision):
    """Sort key of a revision: numbers numerically, letters as A < B < ... < Z < AA.

    Examples
    --------
    >>> sorted(["B", "AA", "A", "C"], key=revision_order)
    ['A', 'B', 'C', 'AA']
    >>> sorted(["10", "2", "1"], key=revision_order)
    ['1', '2', '10']
    """
    text = str(revision)
    return (0, int(text), "") if text.isdigit() else (1, len(text), text.upper())


def _folders(folder):
    """``(site folder or None, records folder)`` of the folder named.

    A folder holding a site.toml is a site (its records in ``records/``) unless it lies inside another site's
    folder: a site.toml among a site's records is what a planted trust list looks like, and such a folder
    is read as a records folder. A records folder's site is the site folder directly above it.
    """
    from ..signing.trust import is_site_folder, site_of_records

    folder = Path(folder)
    if not folder.is_dir():
        raise SteamcalcError("the folder does not exist", source=folder,
                             fix="give a site folder (with site.toml) or a records folder")
    if is_site_folder(folder):
        return folder, folder / "records"
    return site_of_records(folder)[0], folder


def register_trust(folder, trusted_dir=None):
    """The trusted signers the register of a folder uses (:func:`steamcalc.signing.trust.resolve_trust`)."""
    from ..signing.trust import resolve_trust

    site_dir, records_dir = _folders(folder)
    return resolve_trust(records_dir, trusted_dir, site_dir)


def _cases_by_id(site_dir):
    """Every readable case file of a site, by the id it gives: id -> list of Case, by file name."""
    from ..cases.site import load_case

    cases = {}
    if site_dir is None:
        return cases
    for path in sorted((site_dir / "cases").glob("*.toml")):
        try:
            case = load_case(path)
        except SteamcalcError:
            continue  # a broken case file is reported by `run`, not here
        cases.setdefault(case.id, []).append(case)
    return cases


def _named_as_steamcalc_names(case):
    """``<id>.toml``, or ``<id>_rev<R>.toml`` as the workbooks save a case."""
    stem = Path(case.path).stem
    return stem == case.id or stem.startswith(f"{case.id}_rev")


def case_for_record(record, cases):
    """The case file a record is compared with, and a warning when other files give the same id.

    The case is the file named as steamcalc names it (``<id>.toml``, or ``<id>_rev<R>.toml`` as the
    workbooks save each revision); a file of another name giving the same id (a backup ``LD-02 copy.toml``)
    is compared only when no file is so named. Of those, the one at the highest revision is compared when it
    is later than the record's (the case has moved on: the record is superseded or not current), else the one
    at the record's revision (``<id>_rev<R>.toml`` first), else the highest.

    Parameters
    ----------
    record : dict
    cases : list of steamcalc.cases.site.Case
        Every case file giving the record's id (:func:`_cases_by_id`).

    Returns
    -------
    tuple
        ``(case or None, warning text or None)``.
    """
    if not cases:
        return None, None
    revision = str(record.get("revision"))
    named = [c for c in cases if _named_as_steamcalc_names(c)]
    pool = named or cases
    at_revision = [c for c in pool if str(c.revision) == revision]

    def preference(case):
        stem = Path(case.path).stem
        return (stem != f"{case.id}_rev{case.revision}", stem != case.id, Path(case.path).name)

    top = max(revision_order(str(c.revision)) for c in pool)
    if at_revision and top <= revision_order(revision):
        case = sorted(at_revision, key=preference)[0]
    else:
        case = sorted((c for c in pool if revision_order(str(c.revision)) == top), key=preference)[0]
    # Two files of one id are expected when each holds its own revision under steamcalc's names; anything else
    # (a copy, two files at one revision) leaves the reader to guess which is the case.
    duplicates = len(cases) > 1 and (len(named) != len(cases) or len({str(c.revision) for c in cases}) < len(cases))
    if not duplicates:
        return case, None
    others = [f"{Path(c.path).name} (revision {c.revision})" for c in cases if c is not case]
    warning = (f"{len(cases)} case files give {record.get('id')}: {Path(case.path).name} (revision {case.revision}) "
               f"is compared, not {', '.join(others)}; keep one case file per revision, named "
               f"{record.get('id')}.toml or {record.get('id')}_rev<R>.toml")
    return case, warning


def _case_changes(record, case):
    """How a case file now differs from the case a record was issued from (empty: the same)."""
    from ..calcs import get_calculation
    from ..calcs.base import to_record_inputs
    from ..cases.site import Site, parse_inputs, flatten_inputs
    from ..records.record import read_intact_record

    changes = []
    if str(case.revision) != str(record.get("revision")):
        return [f"the case file {Path(case.path).name} is at revision {case.revision}"]
    for key, now in (("title", case.title), ("prepared_by", case.prepared_by)):
        if record.get(key) != now:
            changes.append(key)
    notes = [a for a in record.get("assumptions", []) if str(a).startswith("Engineer's note: ")]
    if notes != [f"Engineer's note: {n}" for n in case.notes]:
        changes.append("notes")
    calc = get_calculation(case.kind)
    try:
        # Against the site the record ran on, so that a site edit is not reported as a case edit.
        inputs, given = parse_inputs(calc.Inputs, flatten_inputs(calc.Inputs, case.inputs), Site.from_record(record["site"]),
                                     case.path, read_intact_record)   # a balance reads the records it links
        table = to_record_inputs(inputs, given)
    except SteamcalcError as exc:
        return [f"its inputs no longer read ({exc.message})"]
    keys = sorted(set(table) | set(record.get("inputs", {})))
    changed = [k for k in keys if not _same_input(table.get(k), record.get("inputs", {}).get(k))]
    if changed:
        changes.append("inputs " + ", ".join(changed))
    changes += _uncertainty_changes(record, case, calc, inputs)
    return changes


def _uncertainty_changes(record, case, calc, inputs):
    """How a case's ``[uncertainty]`` table now differs from the settings its record was computed with:
    a tolerance added, removed or changed, the samples, seed or coverage."""
    from ..calcs.base import input_fields
    from ..runs.uncertainty import DEFAULT_COVERAGE, parse_coverage, parse_tolerances

    then = record.get("uncertainty")
    if not case.uncertainty:
        return ["uncertainty (the case has no [uncertainty] table now)"] if then else []
    if not isinstance(then, dict):
        return ["uncertainty (the case has an [uncertainty] table now)"]
    try:
        tolerances, samples, seed = parse_tolerances(calc.Inputs, case.uncertainty, inputs)
        coverage = parse_coverage(case.uncertainty)
    except SteamcalcError as exc:
        return [f"its [uncertainty] table no longer reads ({exc.message})"]
    kinds = {f.name: f.metadata["kind"] for f in input_fields(calc.Inputs)}
    now = {t.field: t.to_record(kinds[t.field]) for t in tolerances}
    was = then.get("tolerances") if isinstance(then.get("tolerances"), dict) else {}
    changed = [f"tolerance {k}" for k in sorted(set(now) | set(was)) if not _same_input(now.get(k), was.get(k))]
    for name, value, default in (("samples", samples, None), ("seed", seed, None),
                                 ("coverage", coverage, DEFAULT_COVERAGE)):
        stored = then.get(name, default)
        if not _same_input({"value": float(value)}, {"value": stored}):
            changed.append(name)
    return [f"uncertainty {', '.join(changed)}"] if changed else []


def _same_input(a, b):
    """The same given text and unit, and values equal but for the round trip through record units."""
    from .verify import ABSOLUTE_TOLERANCE, RELATIVE_TOLERANCE

    if a is None or b is None:
        return a == b
    # A header's text ("header:HP = 16 bar(g)") comes from the site file: a site edit, not a case edit.
    given = [str(e.get("given")).partition(" = ")[0] if str(e.get("given")).startswith("header:") else e.get("given")
             for e in (a, b)]
    if given[0] != given[1] or a.get("unit") != b.get("unit"):
        return False
    x, y = a.get("value"), b.get("value")
    if isinstance(x, list) and isinstance(y, list) and len(x) == len(y):
        return all(_same_input({"value": p}, {"value": q}) for p, q in zip(x, y))
    if isinstance(x, float) and isinstance(y, (int, float)) and not isinstance(y, bool):
        return abs(x - y) <= max(RELATIVE_TOLERANCE * 1e-3 * abs(x), ABSOLUTE_TOLERANCE)
    return x == y


def _site_changes(record, site_path, site_record=None):
    """The site data keys where the site file now differs from the record's; ``site_record`` (path -> the site
    file's data as a record holds it) when the caller reads each site file once for many records."""
    from ..cases.site import load_site

    now = site_record(site_path) if site_record is not None else load_site(site_path).to_record()
    then = record.get("site", {})
    return [k for k in sorted(set(now) | set(then)) if now.get(k) != then.get(k)]


def register_row(path, record, *, trusted, case=None, site_path=None, later_revision=None, recompute=True,
                 case_warning=None, memory=None, intact=None, site_record=None):
    """The register's row for one record.

    Parameters
    ----------
    path : Path
        The record's JSON file.
    record : dict
    trusted : dict
        The site's trusted keys (:func:`steamcalc.signing.signatures.load_trusted`).
    case : steamcalc.cases.site.Case, optional
        The case file of the same id, if the site has one.
    site_path : Path, optional
        The site file the case runs against now.
    later_revision : str, optional
        A later revision of the same id in the register.
    recompute : bool
        Re-run the record to verify it (False: its digests only, as the index of a run that has
        just computed the records does).
    case_warning : str, optional
        Said beside the case file column (other case files give the same id: :func:`case_for_record`).
    memory : steamcalc.review.memory.RegisterMemory, optional
        What this software has verified and drawn before (:mod:`steamcalc.review.memory`): a record it verified
        is not recomputed again, a report whose digest it knows is not drawn again.
    intact : bool, optional
        Both the record's digests hold, when the caller has checked them already.
    site_record : callable, optional
        Path -> the site file's data as a record holds it, when the caller reads each site file once.
    """
    from ..records.record import provenance
    from .verify import check_companions, linked_record_findings, verify_record
    from ..signing.keys import short_fingerprint
    from ..signing.signatures import NAME_TYPED, check_signatures, name_only_signoff

    row = RegisterRow(json=Path(path).name, id=record["id"], revision=str(record["revision"]), kind=record["kind"],
                      title=record.get("title", ""), path=str(path))
    if intact is None:
        intact = _intact(record)
    if not recompute:
        row.status, row.verification, row.valid = record.get("status", ""), "intact" if intact else "EDITED", intact
        outcome = None
    else:
        outcome = _verification(record, intact, memory)
        row.status = outcome.recomputed_status or record.get("status", "")
    if outcome is None:
        pass
    elif not (outcome.digest_ok and outcome.content_digest_ok):
        row.verification = "EDITED (digest does not match)"
    elif outcome.error:
        row.verification = "not reproducible"
    elif not outcome.reproduced:
        row.verification = f"NOT REPRODUCED ({len(outcome.differences())} differences)"
    else:
        row.verification = "verified"
    if outcome is not None:
        row.valid = outcome.ok
    stale = _stale_links(record, path)
    if stale:   # a balance whose linked records changed, went missing or were superseded
        row.verification = f"STALE: {'; '.join(stale)}"
        row.valid = False
    # Values it holds as taken from a linked record beside it that that record does not state (a changed linked
    # file is already stale): asked here, where the record lies, whether or not the memory knows the record.
    wrong = [p for p in linked_record_findings(record, path)[0] if p not in stale]
    if wrong:
        row.verification = "; ".join(([row.verification] if stale else []) + [f"NOT AS LINKED: {'; '.join(wrong)}"])
        row.valid = False
    texts = []
    status = (outcome.recomputed_status if outcome is not None else None) or record.get("status")
    for check in check_signatures(record, trusted, status):
        state = "trusted" if check.trusted else "unknown key"
        if not check.valid:
            state = "invalid"
        elif check.problem and check.problem.startswith("rule broken"):
            state = check.problem.split(";")[0]
        elif check.problem:
            state = "invalid"
        texts.append(f"{check.role}: {check.name}, key {short_fingerprint(check.fingerprint)}, {state}")
        row.valid = row.valid and check.ok
    # A typed name is not a signature: the record counts as not signed, the name shown as what it is.
    legacy = name_only_signoff(record, outcome)
    if legacy:
        row.valid = row.valid and not legacy[1]
        if not texts:
            texts.append("not signed")
        texts.append(f"{NAME_TYPED}: {record.get('checked_by') or '?'}"
                     + (" (its claims do not hold)" if legacy[1] else ""))
    row.signatures = "; ".join(texts) or "not signed"

    row.case_changes = _case_changes(record, case) if case is not None else None
    if case_warning:
        row.warnings.append(case_warning)
    revision_columns(row, later_revision)
    if site_path is not None:
        try:
            changes = _site_changes(record, site_path, site_record)
        except SteamcalcError as exc:
            changes = [f"unreadable ({exc.message})"]
        row.site_data = "same" if not changes else "differs: " + ", ".join(changes)
        if changes:
            row.stale.append("site data changed")
    now, then = provenance(), record.get("provenance", {})
    versions = [f"{k} {then.get(k)} -> {now.get(k)}" for k in CURRENCY_PROVENANCE
                if (k in now or k in then) and then.get(k) != now.get(k)]
    if versions:
        row.software = ", ".join(versions)
        row.stale.append("software differs")
    companions = check_companions(path, record, memory=memory, intact=intact)
    differ = [c.path.suffix.lstrip(".") for c in companions if c.differs]
    absent = [c.path.suffix.lstrip(".") for c in companions if c.verdict == "absent"]
    older = [c.path.suffix.lstrip(".") for c in companions if c.verdict == "older"]
    row.companions = ("DIFFER: " + ", ".join(differ)) if differ else ("absent: " + ", ".join(absent)) if absent else \
        ("match but for the charts release 0.2 drew: " + ", ".join(older)) if older else "match"
    unchecked = [c.path.suffix.lstrip(".") for c in companions if c.verdict == "not checked"]
    if unchecked:   # a PDF or executed workbook beside the record cannot be compared with it: said, not passed
        row.companions += "; not checked: " + ", ".join(unchecked)
    if differ:
        row.stale.append("companions do not match")
    return row


#: What :func:`revision_columns` puts at the head of a row's reasons for not being current.
_SUPERSEDED, _CASE_EDITED = "superseded by revision ", "case edited after issue"


def revision_columns(row, later_revision):
    """Set the columns a later revision of the same id decides: ``superseded``, and ``case_file`` (a case file
    edited after issue makes only the latest revision stale; an earlier one reads "later revision"). Setting them
    again with another answer replaces the first, so a register may find the later revisions after its rows."""
    row.stale = [t for t in row.stale if not (t.startswith(_SUPERSEDED) or t == _CASE_EDITED)]
    front = []
    row.superseded = "no" if later_revision is None else f"by revision {later_revision}"
    if later_revision is not None:
        front.append(f"{_SUPERSEDED}{later_revision}")
    changes = row.case_changes
    if changes is None:
        row.case_file = "no case file found"
    elif not changes:
        row.case_file = "same"
    elif later_revision is None:
        row.case_file = "edited after issue: " + ", ".join(changes)
        front.append(_CASE_EDITED)
    else:
        row.case_file = "later revision"
    for warning in row.warnings:
        row.case_file += f"; warning: {warning}"
    row.stale[:0] = front


def _site_records():
    """Path -> the site file's data as a record holds it, each file read once (its refusal too), for one register."""
    from ..cases.site import load_site

    read = {}

    def site_record(path):
        key = str(path)
        if key not in read:
            try:
                read[key] = (load_site(path).to_record(), None)
            except SteamcalcError as exc:
                read[key] = (None, exc.with_traceback(None))
        data, refusal = read[key]
        if refusal is not None:
            # A copy each time: an exception raised again keeps every frame it passed through, each record's.
            raise copy.copy(refusal)
        return data
    return site_record


def _intact(record):
    """Both the record's digests hold (its every byte and its engineering content are as issued)."""
    from ..records.record import digests_hold

    return all(digests_hold(record))


def _verification(record, intact, memory):
    """The record's verification: recomputed, or — for an intact record this software verified before, and
    with no typed sign-off (whose claims are compared with the full comparison) — as it was then."""
    from .verify import Verification, provenance, verify_record

    known = None
    if memory is not None and not record.get("signoff") and not record.get("checked_by"):
        known = memory.verified(record, intact)
    if known is None:
        outcome = verify_record(record, digests_hold=intact is True)
        if memory is not None:
            memory.remember_verified(record, intact, outcome)
        return outcome
    now, then = provenance(), record.get("provenance", {})
    return Verification(digest_ok=True, content_digest_ok=True, recomputed_status=known[0], recomputed_failing=known[1],
                        version_changes={k: (then.get(k), v) for k, v in now.items() if then.get(k) != v},
                        notes=["verified before by this same software (the register's memory); not recomputed"])


def build_register(folder, trusted_dir=None, recompute=True, remember=False, workers=1):
    """Every record of a site folder (its ``records/``) or of a records folder.

    Parameters
    ----------
    folder : str or Path
        A site folder (holding site.toml) or a records folder.
    trusted_dir : str or Path, optional
        The trusted signers (default: the user's settings, else ``trusted_signers/`` of the site; never a
        list in the records folder, :func:`steamcalc.signing.trust.resolve_trust`).
    recompute : bool
        Re-run every record to verify it (see :func:`register_row`).
    remember : bool
        Use and keep this machine's memory of what the same software verified and drew before
        (:mod:`steamcalc.review.memory`); off by default: every record is recomputed and drawn (a register
        someone signs against must not rest on a cache); ``register --remember`` turns it on.
    workers : int
        Processes that may recompute records at once (forked copies of this one, :mod:`.forked`; fewer where
        the platform cannot fork or this process has threads). 1 (the default, as in a workbook's kernel)
        keeps to this process; the command line gives the machine's cores.

    Returns
    -------
    list of RegisterRow
        Sorted by id, then revision.
    """
    from ..properties.engines import remembering_states
    from ..records.record import load_record
    from ..signing.trust import resolve_trust
    from .forked import map_forked, usable_workers
    from .memory import RegisterMemory

    site_dir, records_dir = _folders(folder)
    files = sorted(records_dir.glob("*.json")) if records_dir.is_dir() else []
    if not files:
        # An empty register would read as "nothing wrong here": a folder without records is a wrong path.
        raise SteamcalcError("no records (*.json) in this folder" if records_dir.is_dir() else
                             "no records folder here", source=str(records_dir),
                             fix="name a site folder whose records/ holds records, or a records folder; "
                                 "issue the records first with steamcalc run")
    trusted = resolve_trust(records_dir, trusted_dir, site_dir).keys
    memory = RegisterMemory.open() if recompute and remember else None
    cases = _cases_by_id(site_dir)
    site_file = site_dir / "site.toml" if site_dir else None
    site_record = _site_records()

    def read(path):
        """``(record, both digests hold)``, or ``(the unreadable file's row, None)``."""
        whole = []

        def known_valid(data):
            # Digests checked once here. A record this software verified before, byte for byte (its digest
            # intact), followed the schema then.
            whole.append(_intact(data))
            return memory is not None and whole[0] and memory.verified(data, True) is not None
        try:
            record = load_record(path, known_valid=known_valid)
        except SteamcalcError as exc:
            return RegisterRow(json=path.name, verification=f"not a readable record ({exc.message})", valid=False,
                               stale=["not a readable record"], path=str(path)), None
        return record, whole[0]

    # Each record is read, recomputed and drawn where its row is made, as if it were the latest revision of its
    # id; which revision is the latest is known once every file is read, and the rows it supersedes are then
    # marked (revision_columns). A site's records share its headers' states: each is evaluated once in each
    # process, and every record is still recomputed in full (remembering changes no value, only how often).
    def row(i):
        record, whole = read(files[i])
        if whole is None:
            return record, None, None
        case, case_warning = case_for_record(record, cases.get(record["id"], []))
        if case is not None and case.site_path is not None:
            site_path = case.site_path
        else:
            site_path = site_file
        answer = register_row(files[i], record, trusted=trusted, case=case, site_path=site_path,
                              later_revision=None, recompute=recompute, case_warning=case_warning, memory=memory,
                              intact=whole, site_record=site_record)
        # What a forked copy's memory learnt of this record goes back with the row; the parent keeps it.
        return answer, whole, None if memory is None else memory.learnt(record, whole)

    with remembering_states():
        # Records are read and recomputed in forked copies of this process when it may; each copy starts with the
        # memory as it was read, and what it learns comes back with its rows. The first is done here first, so
        # that the copies start with what it imported (the property engine, the reports' templates) instead of
        # each importing its own.
        shared = workers > 1 and recompute and len(files) > 1
        answers = [row(0)] if shared else []
        done = len(answers)
        count = usable_workers(len(files) - done, workers) if shared else 1
        answers += map_forked(lambda k: row(done + k), len(files) - done, count)
    if memory is not None:
        for _, _, learnt in answers:
            memory.absorb(learnt)
    readable = [(answer, whole) for answer, whole, _ in answers if whole is not None]
    unreadable = [answer for answer, whole, _ in answers if whole is None]
    # An edited file (its digest broken) supersedes no intact revision; an id with none intact keeps its
    # highest revision as the latest. (Either digest broken: the record is edited.)
    with_intact = {answer.id for answer, whole in readable if whole}
    latest = {}
    for answer, whole in readable:
        if not whole and answer.id in with_intact:
            continue
        if answer.id not in latest or revision_order(answer.revision) > revision_order(latest[answer.id]):
            latest[answer.id] = answer.revision
    rows = []
    for answer, _ in readable:
        top = latest[answer.id]
        if revision_order(answer.revision) < revision_order(top):
            revision_columns(answer, top)
        rows.append(answer)
    if memory is not None:
        memory.save()
    rows.sort(key=lambda r: (r.id, revision_order(r.revision)))
    return rows + unreadable


def format_register(rows):
    """The register as text: one line per record, then why any record is not current or valid."""
    if not rows:
        return "no records found"
    lines = [f"{'record':<16} {'kind':<10} {'status':<6} {'verification':<14} {'current':<8} signatures"]
    for r in rows:
        kind = r.kind.replace("_", " ")   # the kind in words ("steam main"), not its case-file key
        lines.append(f"{(r.id + ' rev ' + r.revision) if r.id else r.json:<16} {kind:<10} {r.status.upper():<6} "
                     f"{r.verification.split(' (')[0]:<14} {'yes' if r.current else 'NO':<8} {r.signatures}")
        for reason in r.stale:
            detail = {"case edited after issue": r.case_file, "site data changed": r.site_data,
                      "software differs": r.software, "companions do not match": r.companions}.get(reason, "")
            lines.append(f"{'':<18}not current: {reason}" + (f" ({detail})" if detail and detail != reason else ""))
        if not r.valid:
            lines.append(f"{'':<18}not valid: {r.verification}; signatures: {r.signatures}")
        for warning in r.warnings:
            lines.append(f"{'':<18}warning: {warning}")
    current = sum(r.current for r in rows)
    valid = sum(r.valid for r in rows)
    lines.append(f"{len(rows)} record{'s' if len(rows) != 1 else ''}: {current} current, {valid} valid")
    return "\n".join(lines)


def register_csv(rows):
    """The register as CSV text."""
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=COLUMNS, lineterminator="\n")
    from ..render.csv_cells import csv_safe   # a crafted title must not run as a spreadsheet formula

    writer.writeheader()
    writer.writerows({k: csv_safe(v) for k, v in r.as_dict().items()} for r in rows)
    return buffer.getvalue()


def file_link(target, base=None):
    """A link to a file as a relative URL, and nothing else: ``./`` or ``../`` then percent-encoded names.

    A file name is text anyone can choose: ``javascript:alert(1).json`` written into a link as it is would be a
    live script, ``//host/x.json`` a link to another machine. Encoded, every ``:``, ``?``, ``#`` and ``/`` of a
    name is part of the name, and the leading ``./`` keeps the whole a path relative to the page.

    Parameters
    ----------
    target : str or Path
        The file linked to.
    base : str or Path, optional
        The folder of the page holding the link (None: the file lies beside the page, linked by name).

    Returns
    -------
    str or None
        The link; None when no relative path leads there (another drive).

    Examples
    --------
    >>> file_link("javascript:alert(1).json")
    './javascript%3Aalert%281%29.json'
    >>> file_link("/site/records/LD-01_revA.json", "/site")
    './records/LD-01_revA.json'
    >>> file_link("/site/records/LD-01 rev A.json", "/site/registers")
    '../records/LD-01%20rev%20A.json'
    """
    if base is None:
        parts = [Path(target).name]
    else:
        try:
            parts = Path(os.path.relpath(os.path.abspath(target), os.path.abspath(base))).parts
        except ValueError:   # another drive: no relative link exists
            return None
    href = "/".join(quote(part, safe="") for part in parts)
    return href if href.startswith("../") else "./" + href


def register_table_html(rows, base=None):
    """The register as an HTML table (escaped; no scripts); each record's name links to its JSON.

    ``base`` is the folder of the page the table goes into; None links each record by its name alone.
    """
    head = "".join(f"<th>{html.escape(c.replace('_', ' '))}</th>" for c in COLUMNS)
    body = []

    def json_cell(r, name):
        href = file_link(r.path or name, base if r.path else None)
        return f"<td><a href='{html.escape(href)}'>{html.escape(name)}</a></td>" if href else \
            f"<td>{html.escape(name)}</td>"

    for r in rows:
        values = r.as_dict()
        cells = "".join(f"<td>{html.escape(str(values[c]))}</td>" if c != "json" else json_cell(r, values[c])
                        for c in COLUMNS)
        colour = "" if r.ok else " style='background:#fbeeee'"
        body.append(f"<tr{colour}>{cells}</tr>")
    return f"<table class='steamcalc-register'><tr>{head}</tr>{''.join(body)}</table>"


def write_register_csv(path, rows, force=False):
    """Write the register as CSV; an existing file that is not a register steamcalc wrote is refused unless
    ``force`` (:func:`steamcalc.records.issuing.refuse_foreign_file`)."""
    from ..records.issuing import refuse_foreign_file
    from ..records.record import write_text_atomic

    refuse_foreign_file(path, force, "register")
    write_text_atomic(path, register_csv(rows))


def write_register_html(path, rows, force=False):
    """Write the register as an HTML page, its links relative to the page's folder; an existing file that
    is not a register steamcalc wrote is refused unless ``force``."""
    from ..records.issuing import refuse_foreign_file
    from ..records.record import write_text_atomic

    refuse_foreign_file(path, force, "register")
    current = sum(r.current for r in rows)
    page = f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><meta name="generator" content="steamcalc register">
<title>steamcalc register of records</title>
<style>body{{font:10pt/1.4 "DejaVu Sans",Arial,sans-serif;margin:2em auto;max-width:90em;padding:0 1.5em}}
table{{border-collapse:collapse;width:100%}}th,td{{text-align:left;vertical-align:top;padding:.25em .5em;
border-bottom:1px solid #b9c2c9}}th{{background:#eef1f3}}</style></head><body>
<h1>Register of calculation records</h1>
<p>{len(rows)} records; {current} current; {sum(r.valid for r in rows)} valid (digest intact, results, checks and
status reproduced, every signature valid and trusted). Rows not current or not valid are shaded.</p>
{register_table_html(rows, Path(path).parent)}
</body></html>
"""
    write_text_atomic(path, page)


#: The register's columns that the records index of ``steamcalc run DIR`` adds to its own.
INDEX_COLUMNS = ("signatures", "superseded", "case_file", "site_data", "software", "companions", "current")


def index_columns(folder):
    """The register's currency columns for a records index: JSON file name -> columns.

    The index is written just after a run computed the records, so they are not re-run here;
    a bad trusted signers list shows in the signatures column instead of stopping the run.
    """
    try:
        rows = build_register(folder, recompute=False)
    except SteamcalcError as exc:
        return {"*": {"signatures": f"cannot be checked: {exc}"}}
    return {row.json: {c: row.as_dict()[c] for c in INDEX_COLUMNS} for row in rows}


def _stale_links(record, path):
    """Why a record that links others (a site balance) is stale, one text per link; empty for other kinds."""
    from ..calcs import get_calculation
    from ..records.record import read_intact_record

    try:
        check = getattr(get_calculation(record.get("kind")), "stale_links", None)
    except SteamcalcError:
        return []
    return [] if check is None else check(record, path, read_intact_record)
