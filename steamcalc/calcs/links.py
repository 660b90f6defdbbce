"""Links from one record to another issued record: found once, when the case is read, and held by digest.

A kind may take part of its inputs from an issued record (the site balance's let-downs, users and flash
vessels; a steam main's supply from a let-down's outlet and its steam flow from a heater's, each a
:class:`FlatLink` taken by :func:`take_flat_link`). The linked record is read from a links folder
(relative to the case file; the site's ``records`` folder by default) at a named revision, as
``<id>_rev<revision>.json`` (or, when it is not there, from the folder the run writes its records to, so that
a whole site run into another folder finds what it has just issued). Its kind is checked, its digests
recomputed by the reader (``read_record``, from the records layer), and the linking record keeps its id,
revision, kind and content digest as four inputs, ``<item>.link.<name>`` (a balance) or
``<item>_link_<name>`` (a kind of flat inputs), so that ``verify`` can check the file still holds the
record that was used (:func:`link_problems`) and ``register`` can mark the linking record stale
(:func:`stale_links`). A calculation itself never reads a file: what it uses is copied into its inputs.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError, SteamcalcError
from ..units.quantities import from_record_unit

#: The links folder when the case does not name one: where ``steamcalc run`` puts records by default.
DEFAULT_FOLDER = "../records"
#: The four inputs that keep a link in the linking record, in order.
LINK_NAMES = ("record_id", "revision", "kind", "content_digest")

#: An id or revision as it stands in a record's file name.
_FILE_NAME_PART = re.compile(r"^[A-Za-z0-9_-][A-Za-z0-9._-]{0,79}\Z")
#: A record input that keeps part of a link: ``letdown.LD-01.link.record_id`` or ``supply_link_record_id``.
_LINK_KEY = re.compile(r"^(?P<item>.+?)(?:\.link\.|_link_)(?P<name>" + "|".join(LINK_NAMES) + r")\Z")


def find_linked_record(record_id, revision, kind, *, folder, case_path, read_record, where, holder="the balance",
                       links_table="[inputs.links]", revision_fix='give [inputs.links] revision = "A" (or revision on '
                       'the item)', missing=None):
    """The issued record a case links, read from its links folder and checked to be of ``kind``.

    Parameters
    ----------
    record_id, revision : str
        The linked record's id and revision as the case gives them.
    kind : str
        The calculation kind the link must be (``"letdown"``).
    folder : str
        The links folder, relative to the case file.
    case_path : str or Path or None
        The case file (None: the case is not run from a file, and nothing can be linked).
    read_record : callable or None
        Reads a record file and refuses one whose digests do not match its content; its ``also_in``
        folders are looked in when the file is not in ``folder``.
    where : str
        The case-file address of the link, for refusals (``"letdown[0]"``, ``"supply_link"``).
    holder : str
        The linking calculation in words (``"the balance"``, ``"the main"``).
    links_table : str
        The case-file table that names the links folder and revision.
    revision_fix : str
        How to give the revision when it is missing.
    missing : callable, optional
        Makes the refusal of a record file that is not there, from its path (the caller names the item and
        where its revision came from); by default the refusal names the link and the links folder.

    Returns
    -------
    dict
        The linked record.

    Raises
    ------
    InputError
        An id or revision that is not a file-name part, a missing file, a file whose digests do not match,
        a record of another kind, or a file that holds another record: each naming the field and its fix.
    """
    if not isinstance(record_id, str) or not _FILE_NAME_PART.match(record_id):
        raise InputError("a record id holds only letters, digits, '.', '_' and '-'", field=f"{where}.record",
                         value=record_id, fix='e.g. record = "LD-01"')
    if revision is None:
        raise InputError(f"the revision of linked record {record_id} is not given", field=f"{where}.revision",
                         fix=revision_fix)
    if not isinstance(revision, str) or not _FILE_NAME_PART.match(revision):
        # (the record's id is left out of the message: its digits would hide a revision given as a number)
        raise InputError("a linked record's revision must be a name in quotes, of letters, digits, '.', '_' and "
                         "'-'", field=f"{where}.revision", value=revision,
                         fix='e.g. revision = "B"')
    if case_path is None or read_record is None:
        raise InputError(f"linked record {record_id} is read only when {holder} runs from its case file",
                         field=f"{where}.record", value=record_id,
                         fix=f"run {holder} with steamcalc run or its workbook")
    relative = Path(folder) / f"{record_id}_rev{revision}.json"
    path = Path(case_path).parent / relative
    if not path.is_file():
        for also in getattr(read_record, "also_in", ()):
            if (also / relative.name).is_file():
                path = also / relative.name
                break
    if not path.is_file() and missing is not None:
        raise missing(path)
    if not path.is_file():
        raise InputError(f"linked record {record_id} revision {revision} is not at {path}",
                         field=f"{where}.record", value=record_id,
                         fix=f"issue it first (steamcalc run on {record_id}'s case file puts it in the site's "
                             f"records folder), or set {links_table} folder and revision to where it is")
    try:
        record = read_record(path)
    except SteamcalcError as exc:
        raise InputError(f"linked record {record_id} revision {revision} cannot be used: {exc.explained()}",
                         field=f"{where}.record", value=record_id,
                         fix=exc.fix or "re-issue the linked record") from None
    if record.get("kind") != kind:
        raise InputError(f"linked record {record_id} is {_a(record.get('kind'))} record, not {_a(kind)} record",
                         field=f"{where}.record", value=record_id, fix=f"link {_a(kind)} record here")
    if record.get("id") != record_id or str(record.get("revision")) != revision:
        raise InputError(f"the file {relative} holds record {record.get('id')} revision {record.get('revision')}",
                         field=f"{where}.record", value=record_id, fix="link the file that holds this record")
    return record


def _a(kind):
    """A kind with its article: ``"a letdown"``, ``"an exchanger"``."""
    return f"{'an' if str(kind)[:1] in 'aeiou' else 'a'} {kind}"


def record_links(record):
    """The links a record keeps in its inputs: ``{item: {record_id, revision, kind, content_digest}}``.

    Examples
    --------
    >>> record_links({"inputs": {"supply_link_record_id": {"value": "LD-01"}, "supply_link_revision": {"value": "B"},
    ...                          "letdown.LD-02.link.kind": {"value": "letdown"}, "supply_link_folder": {"value": "x"}}})
    {'supply': {'record_id': 'LD-01', 'revision': 'B'}, 'letdown.LD-02': {'kind': 'letdown'}}
    """
    links = {}
    for key, entry in record.get("inputs", {}).items():
        match = _LINK_KEY.match(key)
        if match and isinstance(entry, dict):
            links.setdefault(match["item"], {})[match["name"]] = entry.get("value")
    return links


def link_states(record, record_path, read_record, holder="the balance"):
    """Each link of a record against the files beside it: ``(state, text)`` per linked record.

    ``state`` is ``"holds"`` (the file holds the record that was used), ``"changed"`` (another content digest,
    another kind, or a file that cannot be read), ``"missing"`` (no file beside the record) or ``"superseded"``
    (it holds, but another revision of the record lies beside it).

    Parameters
    ----------
    record : dict
        A record that links others.
    record_path : str or Path or None
        Where the record was read from (None: every link is missing).
    read_record : callable
        Reads a record file, refusing one whose digests do not match (from the records layer).
    holder : str
        The linking record in words ("the balance", "the main").
    """
    base = Path(record_path).parent if record_path is not None else None
    states = []
    for item, link in record_links(record).items():
        record_id, revision, digest = link.get("record_id"), link.get("revision"), link.get("content_digest")
        what = f"linked record {record_id} revision {revision} ({item})"
        file_name = f"{record_id}_rev{revision}.json"
        path = None if base is None else base / file_name
        if path is None or not path.is_file():
            states.append(("missing", f"{what}: no {file_name} beside this record"))
            continue
        try:
            linked = read_record(path)
        except SteamcalcError as exc:
            states.append(("changed", f"{what}: {file_name} cannot be used: {exc.message}"))
            continue
        if linked.get("kind") != link.get("kind"):
            states.append(("changed", f"{what}: {file_name} is now {_a(linked.get('kind'))} record, {holder} linked "
                                      f"{_a(link.get('kind'))} record"))
        elif linked.get("content_digest") != digest:
            states.append(("changed", f"{what}: {file_name} has changed since {holder} used it (content digest "
                                      f"now {linked.get('content_digest')}, {holder} used {digest}); re-issue "
                                      f"{holder}"))
        else:
            others = sorted(p.name[len(record_id) + 4:-5] for p in base.glob(f"{record_id}_rev*.json")
                            if p.name != file_name)
            if others:
                states.append(("superseded", f"{what}: revision {', '.join(others)} of {record_id} lies beside it; "
                                             f"re-issue {holder} on the current revision"))
            else:
                states.append(("holds", f"{what}: holds"))
    return states


def stale_links(record, record_path, read_record, holder="the balance"):
    """What makes a linking record stale: each linked record changed, missing or superseded, one line each."""
    return [text for state, text in link_states(record, record_path, read_record, holder) if state != "holds"]


def link_problems(record, record_path, read_record, holder="the balance"):
    """What no longer holds of a record's links, for ``verify``: ``(problems, notes)``.

    A linked file that holds another record (changed, another kind, unreadable) is a problem and fails the
    verification; one that is not beside the record is noted as not checked, and a later revision beside it
    is noted (``register`` marks the linking record stale for either).
    """
    problems, notes = [], []
    for state, text in link_states(record, record_path, read_record, holder):
        if state == "changed":
            problems.append(text)
        elif state == "missing":
            notes.append(text.replace(": no ", ": not checked - no ", 1))
        elif state == "superseded":
            notes.append(text)
    return problems, notes


@dataclass(frozen=True)
class FlatLink:
    """One link of a kind of flat inputs: ``[inputs.<item>_link]``, kept as the inputs ``<item>_link_<name>``.

    Parameters
    ----------
    item : str
        The link's name in the case file and the record (``"supply"``: ``[inputs.supply_link]``).
    kind : str
        The kind the linked record must be (``"letdown"``).
    words : str
        The linked record in words, for refusals (``"let-down record"``).
    example : str
        A record id for the fixes (``"LD-01"``).
    replaces : tuple of str
        The inputs the link gives: each refused when the case gives it too.
    instead : str
        What to do instead of linking, for the fix of an input given twice (``"feed the main from a header"``).
    holder : str
        The linking calculation in words.
    """

    item: str
    kind: str
    words: str
    example: str
    replaces: tuple
    instead: str
    holder: str = "the main"

    @property
    def table(self):
        """The case-file table of the link: ``[inputs.supply_link]``."""
        return f"[inputs.{self.item}_link]"

    def value(self, values, name):
        """The link's own input ``name`` (one of ``record_id``, ``revision``, ``folder``, ``kind``, ``content_digest``)."""
        return values.get(f"{self.item}_link_{name}")


def _pinned(link, values, name, found, record_id):
    """A kind or content digest given in the case file pins the link: the file must still hold it."""
    pinned = link.value(values, name)
    if pinned is not None and pinned != found:
        raise InputError(f"linked record {record_id} has {name.replace('_', ' ')} {found}, not the {pinned} the case "
                         "file pins", field=f"{link.item}_link.{name}", value=pinned,
                         fix=f"re-check {link.holder} against the re-issued {record_id} and give {name} = \"{found}\", "
                             f"or leave {name} out")


def take_flat_link(link, values, given, case_path, read_record):
    """The record a kind of flat inputs links (``[inputs.<item>_link]``), found, checked and kept in its inputs.

    Refuses a link's revision, folder, kind or digest given without its record, an input the link gives given
    too (``link.replaces``), and a kind or content digest pinned in the case file that the record no longer has;
    finds the record with :func:`find_linked_record`. The caller copies what it uses from the record.

    Parameters
    ----------
    link : FlatLink
        The link.
    values, given : dict
        The parsed input values (SI) and their texts as given, by field name.
    case_path : str or Path or None
        The case file; the links folder is relative to it.
    read_record : callable or None
        Reads a record file, refusing one whose digests do not match (from the records layer).

    Returns
    -------
    tuple
        ``(record, values, given)``: the linked record (None when the case links none) and the inputs with the
        link's revision, kind and content digest kept.
    """
    record_id = link.value(values, "record_id")
    if record_id is None:
        for name in ("revision", "folder", "kind", "content_digest"):
            if link.value(values, name) is not None:
                raise InputError(f"a linked {link.words}'s {name.replace('_', ' ')} is given without the record",
                                 field=f"{link.item}_link.record", fix=f'give record = "{link.example}" in '
                                                                       f"{link.table}, or remove {link.table}")
        return None, values, given
    for name in link.replaces:
        if values.get(name) is not None:
            raise InputError(f"{name} comes from the linked {link.words} {record_id}; it is not given twice",
                             field=name, fix=f"leave {name} out, or drop {link.table} and {link.instead}")
    revision = link.value(values, "revision")
    record = find_linked_record(record_id, revision, link.kind, folder=link.value(values, "folder") or DEFAULT_FOLDER,
                                case_path=case_path, read_record=read_record, where=f"{link.item}_link",
                                holder=link.holder, links_table=link.table,
                                revision_fix=f'give revision = "B" in {link.table}')
    _pinned(link, values, "kind", record["kind"], record_id)
    _pinned(link, values, "content_digest", record["content_digest"], record_id)
    kept = {f"{link.item}_link_kind": record["kind"], f"{link.item}_link_content_digest": record["content_digest"]}
    return record, dict(values, **{f"{link.item}_link_revision": revision}, **kept), dict(given, **kept)


#: Relative difference within which a value a record took from a linked record is the one that record states (the
#: value is read in the linked record's unit and written back: only the last bits may differ).
TAKEN_TOLERANCE = 1e-9


def taken_value_problems(record, record_path, read_record, link, taken, words, holder="the record"):
    """What a record says it took from a linked record beside it that that record does not state.

    The link's digest check (:func:`link_problems`) shows the linked file is the record used; this shows each value
    taken is that record's. A record whose inputs were edited, its results recomputed from them and its digests
    written again, would otherwise keep saying they are the linked record's. Numbers are compared in SI within
    :data:`TAKEN_TOLERANCE` (relative), texts exactly.

    Parameters
    ----------
    record : dict
        The linking record.
    record_path : str or Path or None
        Where it was read from; the linked record is looked for beside it (None: nothing is checked).
    read_record : callable
        Reads a record file, refusing one whose digests do not match (from the records layer).
    link : str
        The link as :func:`record_links` names it: ``"load"`` (the inputs ``load_link_record_id``, ``_revision``,
        ``_content_digest``) or ``"letdown.LD-01"`` (``letdown.LD-01.link.record_id``, ...).
    taken : sequence of tuple
        ``(input name, section, key, quantity kind)``: the record's input and where the linked record states it
        (``"inputs"`` or ``"results"``); the kind is a kind of
        :data:`~steamcalc.units.quantities.SI_UNITS`, or ``"fraction"`` or ``"number"`` (no unit), or ``"text"``
        (compared exactly). An input the record does not hold is skipped.
    words : str
        The linked record in words (``"heater record"``).
    holder : str
        The linking record in words, for the line and its fix (``"the balance"``).

    Returns
    -------
    list of str
        One line per value that is not what the linked record states, naming the input, the value held (and its
        text as given), the value stated and the fix; nothing when the linked record is not beside the record or
        is another record (the link's own check says so).
    """
    inputs = record.get("inputs", {}) if isinstance(record.get("inputs"), dict) else {}
    kept_link = record_links(record).get(link, {})
    record_id, revision = kept_link.get("record_id"), kept_link.get("revision")
    if record_id is None or record_path is None:
        return []
    path = Path(record_path).parent / f"{record_id}_rev{revision}.json"
    try:
        linked = read_record(path) if path.is_file() else None
    except SteamcalcError:
        linked = None
    if not isinstance(linked, dict) or linked.get("content_digest") != kept_link.get("content_digest"):
        return []
    problems = []
    for name, section, key, kind in taken:
        entry = inputs.get(name)
        if entry is None:
            continue
        source = (linked.get(section) or {}).get(key) if isinstance(linked.get(section), dict) else None
        if _same_taken(entry, source, kind):
            continue
        stated = "nothing" if not isinstance(source, dict) or "value" not in source else _shown(source)
        held = _shown(entry) if isinstance(entry, dict) else repr(entry)
        given = entry.get("given") if isinstance(entry, dict) else None
        if isinstance(given, str) and given != held:
            held += f" (given as {given!r})"
        problems.append(f"input {name}: {holder} holds {held} as {words} {record_id} revision {revision}'s "
                        f"{key}, which states {stated}; re-issue {holder} from its case file")
    return problems


def _same_taken(entry, source, kind):
    """Whether a value a record holds as taken is the one the linked record states (:func:`taken_value_problems`)."""
    if not isinstance(entry, dict) or not isinstance(source, dict):
        return False
    if kind == "text":
        return isinstance(entry.get("value"), str) and entry.get("value") == source.get("value")
    kind = "dimensionless" if kind in ("fraction", "number") else kind
    try:
        kept = from_record_unit(entry["value"], entry.get("unit", ""), kind)
        stated = from_record_unit(source["value"], source.get("unit", ""), kind)
    except (KeyError, TypeError, ValueError, SteamcalcError):
        return False
    return abs(kept - stated) <= TAKEN_TOLERANCE * abs(stated)


def _shown(entry):
    """A record entry's value and unit in words: ``"3.49181 bar"``, ``"'DN80'"``."""
    value, unit = entry.get("value"), entry.get("unit") or ""
    text = f"{value:.6g}" if isinstance(value, (int, float)) and not isinstance(value, bool) else repr(value)
    return f"{text} {unit}".rstrip()


__all__ = ["DEFAULT_FOLDER", "LINK_NAMES", "find_linked_record", "record_links", "link_states", "stale_links",
           "link_problems", "FlatLink", "take_flat_link", "taken_value_problems", "TAKEN_TOLERANCE"]
