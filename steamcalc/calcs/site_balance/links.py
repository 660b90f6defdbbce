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
``verify`` can check the file still holds the record the balance used (:func:`link_problems`). Finding and
reading a linked record, and checking a record's links, are shared with the other kinds that link records
(:mod:`steamcalc.calcs.links`). The calculation itself never reads a file: everything it uses is copied
into the balance's inputs.
"""

from __future__ import annotations

from ...errors import InputError
from ...units.quantities import from_record_unit
from ..links import DEFAULT_FOLDER, find_linked_record, link_problems, link_states, stale_links
from .items import Link

#: Relative difference between a linked record's pressure and the balance's header above which they are
#: not the same header.
PRESSURE_MATCH = 0.005


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


__all__ = ["DEFAULT_FOLDER", "PRESSURE_MATCH", "Links", "link_states", "stale_links", "link_problems"]
