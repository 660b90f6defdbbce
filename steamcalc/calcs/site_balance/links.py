"""Links from a balance to issued records: read once, when the case is read, and held by digest.

An item of a balance may name an issued record (``record = "LD-01"``) instead of stating its data: the
record's inputs define the station (a let-down's desuperheater, valve and pressures, a heater's steam flow)
and the balance sets its flow. A record's pressures are copied, not matched here: the balance's checks hold
them against its headers and flag a record issued for another header pressure. The record is read from the links folder (``[inputs.links] folder``,
relative to the case file; the site's ``records`` folder by default) at the revision the item or
``[inputs.links] revision`` names, as ``<id>_rev<revision>.json`` (or, when it is not there, from the folder
the run writes its records to, so that a whole site run into another folder finds what it has just issued). An
item's own ``revision`` wins over ``[inputs.links] revision``; a revision with no record there is refused naming
the item and where its revision came from. Its kind is checked, its digests
recomputed, and the balance's record keeps its id, revision, kind and content digest, so that
``verify`` can check the file still holds the record the balance used, and that every value the balance holds as
copied from it is the one it states (:func:`balance_link_problems`). Finding and
reading a linked record, and checking a record's links, are shared with the other kinds that link records
(:mod:`steamcalc.calcs.links`). The calculation itself never reads a file: everything it uses is copied
into the balance's inputs.
"""

from __future__ import annotations

from ...errors import InputError
from ...units.quantities import from_record_unit
from ..links import (DEFAULT_FOLDER, find_linked_record, link_problems, link_states, record_links, stale_links,
                     taken_value_problems)
from .items import Link

#: What a balance copies from a linked let-down record, with each value's quantity kind: the desuperheater and
#: valve range the balance solves with, and the station's pressures, inlet steam, valve and inlet line that its
#: checks size the valve at the balance's flow with and hold against the headers (:mod:`.valve_checks`).
LETDOWN_COPIED = {"target_superheat": "temperature_difference", "target_temperature": "temperature",
                  "water_temperature": "temperature", "water_pressure": "pressure", "max_flow": "mass_flow",
                  "min_flow": "mass_flow", "inlet_pressure": "pressure", "outlet_pressure": "pressure",
                  "inlet_temperature": "temperature", "inlet_superheat": "temperature_difference",
                  "inlet_dryness": "fraction", "rated_kv": "flow_coefficient", "xt": "fraction",
                  "characteristic": "text", "rangeability": "number", "valve_size": "text", "inlet_size": "text",
                  "outlet_size": "text", "schedule": "text", "inlet_length": "length", "inlet_fittings_k": "number"}
#: The pressures a balance copies from a linked flash record and a linked heater record (held against the headers).
FLASH_COPIED = ("condensate_pressure", "flash_pressure")
USER_COPIED = ("steam_pressure",)


def _copied(record, key, kind):
    """A linked record's input in SI (text as it is), None when the record does not give it."""
    entry = record["inputs"].get(key)
    if entry is None:
        return None
    if kind == "text":
        return entry["value"]
    return from_record_unit(entry["value"], entry["unit"], "dimensionless" if kind in ("fraction", "number")
                            else kind)


#: A user's steam flow in each load case (its inputs ``user.<name>.load.<case>``) is this result of its heater record.
USER_FLOW_RESULT = "steam_flow"


#: How the refusals name an item of each section of the case file.
_ITEM_WORDS = {"letdown": "let-down", "user": "user", "flash": "flash vessel"}


class Links:
    """Resolves the ``record = ...`` of a balance's items against the links folder."""

    def __init__(self, table, case_path, site, read_record=None):
        self.table = table or {}
        self.read_record = read_record
        self.case_path = case_path
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

        def missing(path):
            if own:
                return InputError(f"linked record {record_id} revision {revision} is not at {path} (named by {item}, "
                                  "at the revision it gives)", field=f"{where}.revision", value=revision,
                                  fix=f"issue {record_id} revision {revision} first (steamcalc run on its case "
                                      f"file), or give {item} the revision of an issued {record_id}")
            return InputError(f"linked record {record_id} revision {revision} is not at {path} (named by {item}, at "
                              "[inputs.links] revision)", field=f"{where}.record", value=record_id,
                              fix=f"issue it first (steamcalc run on {record_id}'s case file puts it in the site's "
                                  "records folder), or set [inputs.links] folder and revision to where it is, or give "
                                  f"{item} a revision of its own")
        record = find_linked_record(record_id, revision, kind, folder=self.folder, case_path=self.case_path,
                                    read_record=self.read_record, where=where, missing=missing)
        link = Link(record_id=record_id, revision=revision, kind=kind, content_digest=record["content_digest"])
        return record, link

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
        values = dict(values, link=link)
        for key, kind in LETDOWN_COPIED.items():
            value = _copied(record, key, kind)
            if value is not None:
                values[key] = value
        return values

    def user(self, values, row, where, case_names):
        """A user's steam flow, in every load case, from its linked heater record."""
        self._refuse_both(row, where, ("load",), row["record"])
        record, link = self._resolve(row, where, "exchanger")
        entry = record["results"][USER_FLOW_RESULT]
        flow = from_record_unit(entry["value"], entry["unit"], "mass_flow")
        return dict(values, link=link, flows=tuple((case, flow) for case in case_names), duties=(),
                    steam_pressure=_copied(record, "steam_pressure", "pressure"))

    def flash(self, values, row, where, user):
        """A flash vessel's station from its linked flash record; the balance sets its flow."""
        record, link = self._resolve(row, where, "flash")
        return dict(values, link=link, **{key: _copied(record, key, "pressure") for key in FLASH_COPIED})


def _taken(record, item):
    """What a balance's linked ``item`` (``"letdown.LD-01"``) holds as copied from its record: ``(input, section,
    key, kind)`` for :func:`~steamcalc.calcs.links.taken_value_problems`, with the linked record in words."""
    section = item.partition(".")[0]
    if section == "letdown":
        return [(f"{item}.{key}", "inputs", key, kind) for key, kind in LETDOWN_COPIED.items()], "let-down record"
    if section == "flash":
        return [(f"{item}.{key}", "inputs", key, "pressure") for key in FLASH_COPIED], "flash record"
    if section == "user":
        loads = [(key, "results", USER_FLOW_RESULT, "mass_flow") for key in record.get("inputs", {})
                 if key.startswith(f"{item}.load.")]
        return [(f"{item}.{key}", "inputs", key, "pressure") for key in USER_COPIED] + loads, "heater record"
    return [], "record"


def balance_link_problems(record, record_path, read_record):
    """What no longer holds of a balance's links, for ``verify``: ``(problems, notes)``.

    Each linked file must still hold the record the balance used (:func:`~steamcalc.calcs.links.link_problems`),
    and every value the balance holds as copied from a linked record beside it must be the one that record states
    (:func:`~steamcalc.calcs.links.taken_value_problems`): a balance whose copied inputs were edited, its results
    recomputed from them and its digests written again, reproduces from its own inputs and its linked files are
    unchanged, so only this comparison shows it. A linked record not beside the balance is only noted.

    Parameters
    ----------
    record : dict
        The balance's record.
    record_path : str or Path or None
        Where it was read from; its linked records are looked for beside it.
    read_record : callable
        Reads a record file, refusing one whose digests do not match (from the records layer).

    Returns
    -------
    tuple of list of str
        The problems (each fails the verification) and the notes.
    """
    problems, notes = link_problems(record, record_path, read_record)
    if not isinstance(record.get("inputs"), dict):
        return problems, notes
    for item in record_links(record):
        taken, words = _taken(record, item)
        problems += taken_value_problems(record, record_path, read_record, item, taken, words, holder="the balance")
    return problems, notes


__all__ = ["DEFAULT_FOLDER", "LETDOWN_COPIED", "FLASH_COPIED", "USER_COPIED", "USER_FLOW_RESULT", "Links",
           "link_states", "stale_links", "link_problems", "balance_link_problems"]
