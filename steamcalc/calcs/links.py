"""Links from one record to another issued record: found once, when the case is read, and held by digest.

A kind may take part of its inputs from an issued record (the site balance's let-downs, users and flash
vessels; a steam main's supply from a let-down's outlet). The linked record is read from a links folder
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
from pathlib import Path

from ..errors import InputError, SteamcalcError

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
        raise InputError(f"linked record {record_id} is a {record.get('kind')} record, not a {kind} record",
                         field=f"{where}.record", value=record_id, fix=f"link a {kind} record here")
    if record.get("id") != record_id or str(record.get("revision")) != revision:
        raise InputError(f"the file {relative} holds record {record.get('id')} revision {record.get('revision')}",
                         field=f"{where}.record", value=record_id, fix="link the file that holds this record")
    return record


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
            states.append(("changed", f"{what}: {file_name} is now a {linked.get('kind')} record, {holder} linked a "
                                      f"{link.get('kind')} record"))
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


__all__ = ["DEFAULT_FOLDER", "LINK_NAMES", "find_linked_record", "record_links", "link_states", "stale_links",
           "link_problems"]
