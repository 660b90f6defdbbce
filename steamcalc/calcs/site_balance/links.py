"""Links from a balance to issued records: read once, when the case is read, and held by digest.

An item of a balance may name an issued record (``record = "LD-01"``) instead of stating its data: the
record's inputs define the station (a let-down's desuperheater and valve range, a heater's steam flow)
and the balance sets its flow. The record is read from the links folder (``[inputs.links] folder``,
relative to the case file; the site's ``records`` folder by default) at the revision the item or
``[inputs.links] revision`` names, as ``<id>_rev<revision>.json`` (or, when it is not there, from the folder
the run writes its records to, so that a whole site run into another folder finds what it has just issued). An
item's own ``revision`` wins over ``[inputs.links] revision``; a revision with no record there is refused naming
the item and where its revision came from. Its kind is checked, its digests
recomputed, and the balance's record keeps its id, revision, kind and content digest, so that
``verify`` can check the file still holds the record the balance used (:func:`link_problems`). The
calculation itself never reads a file: everything it uses is copied into the balance's inputs.
"""

from __future__ import annotations

import re
from pathlib import Path

from ...errors import InputError, SteamcalcError
from ...units.quantities import from_record_unit
from .items import Link

#: The links folder when the case does not name one: where ``steamcalc run`` puts records by default.
DEFAULT_FOLDER = "../records"
#: Relative difference between a linked record's pressure and the balance's header above which they are
#: not the same header.
PRESSURE_MATCH = 0.005


#: How the refusals name an item of each section of the case file.
_ITEM_WORDS = {"letdown": "let-down", "user": "user", "flash": "flash vessel"}

#: An id or revision as it stands in a record's file name.
_FILE_NAME_PART = re.compile(r"^[A-Za-z0-9_-][A-Za-z0-9._-]{0,79}\Z")


class Links:
    """Resolves the ``record = ...`` of a balance's items against the links folder."""

    def __init__(self, table, case_path, site, read_record=None):
        self.table = table or {}
        self.read_record = read_record
        self.case_dir = None if case_path is None else Path(case_path).parent
        self.site = site
        folder = self.table.get("folder", DEFAULT_FOLDER)
        if not isinstance(folder, str):
            raise InputError("must be a folder path in quotes", field="links.folder", value=folder,
                             fix=f'e.g. folder = "{DEFAULT_FOLDER}"')
        self.folder = folder
        revision = self.table.get("revision")
        if revision is not None and not isinstance(revision, str):
            raise InputError("must be a revision in quotes", field="links.revision", value=revision,
                             fix='e.g. revision = "B"')
        self.revision = revision

    def _resolve(self, row, where, kind):
        record_id, revision = row["record"], row.get("revision", self.revision)
        own = "revision" in row             # the item names its own revision, over [inputs.links] revision
        item = f"{_ITEM_WORDS.get(where.partition('[')[0], 'item')} {row.get('name')!r}"
        if not isinstance(record_id, str) or not _FILE_NAME_PART.match(record_id):
            raise InputError("a record id holds only letters, digits, '.', '_' and '-'", field=f"{where}.record",
                             value=record_id, fix='e.g. record = "LD-01"')
        if not isinstance(revision, str) or not _FILE_NAME_PART.match(revision):
            raise InputError(f"the revision of linked record {record_id} is not given", field=f"{where}.revision",
                             value=revision, fix='give [inputs.links] revision = "A" (or revision on the item)')
        if self.case_dir is None or self.read_record is None:
            raise InputError(f"linked record {record_id} is read only when the balance runs from its case file",
                             field=f"{where}.record", value=record_id,
                             fix="run the balance with steamcalc run or its workbook")
        relative = Path(self.folder) / f"{record_id}_rev{revision}.json"
        path = self.case_dir / relative
        if not path.is_file():
            for folder in getattr(self.read_record, "also_in", ()):
                if (folder / relative.name).is_file():
                    path = folder / relative.name
                    break
        if not path.is_file():
            if own:
                raise InputError(f"linked record {record_id} revision {revision} is not at {path} (named by {item}, "
                                 "at the revision it gives)", field=f"{where}.revision", value=revision,
                                 fix=f"issue {record_id} revision {revision} first (steamcalc run on its case file), "
                                     f"or give {item} the revision of an issued {record_id}")
            raise InputError(f"linked record {record_id} revision {revision} is not at {path} (named by {item}, at "
                             "[inputs.links] revision)", field=f"{where}.record", value=record_id,
                             fix=f"issue it first (steamcalc run on {record_id}'s case file puts it in the site's "
                                 "records folder), or set [inputs.links] folder and revision to where it is, or give "
                                 f"{item} a revision of its own")
        try:
            record = self.read_record(path)
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
        link = Link(record_id=record_id, revision=revision, kind=kind, content_digest=record["content_digest"])
        return record, link

    def _same_header(self, record, key, header, where, what):
        entry = record["inputs"].get(key)
        if entry is None:
            return
        pressure = from_record_unit(entry["value"], entry["unit"], "pressure")
        header_pressure = self.site.headers[header]
        if abs(pressure - header_pressure) > PRESSURE_MATCH * header_pressure:
            raise InputError(f"linked record {record['id']} has its {what} at {pressure / 1e5:.4g} bar(a), but the "
                             f"balance's {header} header is at {header_pressure / 1e5:.4g} bar(a)",
                             field=f"{where}.record", value=record["id"],
                             fix="link the record made for this header, or re-issue it at the site's header pressure")

    @staticmethod
    def _refuse_both(row, where, keys, record_id):
        for key in keys:
            if key in row:
                raise InputError(f"{key} comes from the linked record {record_id}; it is not given twice",
                                 field=f"{where}.{key}", value=row[key],
                                 fix=f"leave {key} out, or drop the record link and state the item inline")

    def letdown(self, values, row, where):
        """A let-down's desuperheater and valve range from its linked let-down record."""
        self._refuse_both(row, where, ("target_superheat", "target_temperature", "water_temperature",
                                       "water_pressure", "max_flow", "min_flow"), row["record"])
        record, link = self._resolve(row, where, "letdown")
        self._same_header(record, "inlet_pressure", values["source"], where, "inlet")
        self._same_header(record, "outlet_pressure", values["target"], where, "outlet")
        kinds = {"target_superheat": "temperature_difference", "target_temperature": "temperature",
                 "water_temperature": "temperature", "water_pressure": "pressure", "max_flow": "mass_flow",
                 "min_flow": "mass_flow"}
        values = dict(values, link=link)
        for key, kind in kinds.items():
            entry = record["inputs"].get(key)
            if entry is not None:
                values[key] = from_record_unit(entry["value"], entry["unit"], kind)
        return values

    def user(self, values, row, where, case_names):
        """A user's steam flow, in every load case, from its linked heater record."""
        self._refuse_both(row, where, ("load",), row["record"])
        record, link = self._resolve(row, where, "exchanger")
        self._same_header(record, "steam_pressure", values["header"], where, "steam supply")
        entry = record["results"]["steam_flow"]
        flow = from_record_unit(entry["value"], entry["unit"], "mass_flow")
        return dict(values, link=link, flows=tuple((case, flow) for case in case_names), duties=())

    def flash(self, values, row, where, user):
        """A flash vessel's station from its linked flash record; the balance sets its flow."""
        record, link = self._resolve(row, where, "flash")
        self._same_header(record, "condensate_pressure", user.header, where, "condensate")
        self._same_header(record, "flash_pressure", values["target"], where, "flash vessel")
        return dict(values, link=link)


def link_states(record, record_path, read_record):
    """Each link of a balance record against the files beside it: ``(state, text)`` per linked record.

    ``state`` is ``"holds"`` (the file holds the record the balance used), ``"changed"`` (another content digest,
    another kind, or a file that cannot be read), ``"missing"`` (no file beside the record) or ``"superseded"``
    (it holds, but another revision of the record lies beside it).

    Parameters
    ----------
    record : dict
        A balance record.
    record_path : str or Path or None
        Where the record was read from (None: every link is missing).
    read_record : callable
        Reads a record file, refusing one whose digests do not match (from the records layer).
    """
    links = {}
    for key, entry in record.get("inputs", {}).items():
        head, dot, name = key.rpartition(".link.")
        if dot and isinstance(entry, dict):
            links.setdefault(head, {})[name] = entry.get("value")
    base = Path(record_path).parent if record_path is not None else None
    states = []
    for item, link in links.items():
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
            states.append(("changed", f"{what}: {file_name} is now a {linked.get('kind')} record, the balance linked a "
                                      f"{link.get('kind')} record"))
        elif linked.get("content_digest") != digest:
            states.append(("changed", f"{what}: {file_name} has changed since the balance used it (content digest "
                                      f"now {linked.get('content_digest')}, the balance used {digest}); re-issue the "
                                      "balance"))
        else:
            others = sorted(p.name[len(record_id) + 4:-5] for p in base.glob(f"{record_id}_rev*.json")
                            if p.name != file_name)
            if others:
                states.append(("superseded", f"{what}: revision {', '.join(others)} of {record_id} lies beside it; "
                                             "re-issue the balance on the current revision"))
            else:
                states.append(("holds", f"{what}: holds"))
    return states


def stale_links(record, record_path, read_record):
    """What makes a balance record stale: each linked record changed, missing or superseded, one line each."""
    return [text for state, text in link_states(record, record_path, read_record) if state != "holds"]


def link_problems(record, record_path, read_record):
    """What no longer holds of a balance record's links, for ``verify``: ``(problems, notes)``.

    A linked file that holds another record (changed, another kind, unreadable) is a problem and fails the
    verification; one that is not beside the record is noted as not checked, and a later revision beside it
    is noted (``register`` marks the balance stale for either).
    """
    problems, notes = [], []
    for state, text in link_states(record, record_path, read_record):
        if state == "changed":
            problems.append(text)
        elif state == "missing":
            notes.append(text.replace(": no ", ": not checked - no ", 1))
        elif state == "superseded":
            notes.append(text)
    return problems, notes
