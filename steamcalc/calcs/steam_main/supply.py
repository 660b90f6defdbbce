"""A main fed from an issued let-down record's outlet instead of a header.

``[inputs.supply_link] record = "LD-01", revision = "B"`` names the let-down record whose outlet (after its
desuperheater, if it has one) feeds the main. The record is found and checked as the site balance finds its
linked records (:func:`steamcalc.calcs.links.take_flat_link`, as the main's load link is); its outlet pressure (the let-down's
``outlet_pressure`` input) and outlet temperature (its ``outlet_temperature`` result, when superheated) are
copied into the main's ``supply_pressure`` and ``supply_temperature``, and the link is kept as four inputs
(``supply_link_record_id``, ``_revision``, ``_kind``, ``_content_digest``), so that ``verify`` and
``register`` check the file still holds the record the main used. The calculation never reads the file.
"""

from __future__ import annotations

from ...errors import InputError
from ...units.quantities import from_record_unit
from ..links import FlatLink, link_problems, stale_links, take_flat_link, taken_value_problems

#: The linked record's kind: a main is fed from a let-down's outlet.
SUPPLY_KIND = "letdown"
HOLDER = "the main"
#: The supply link: a let-down record whose outlet gives the main's supply state.
SUPPLY_LINK = FlatLink(item="supply", kind=SUPPLY_KIND, words="let-down record", example="LD-01",
                       replaces=("supply_pressure", "supply_temperature", "supply_superheat"),
                       instead="feed the main from a header", holder=HOLDER)
#: Outlet superheat below which the let-down's outlet is taken as saturated steam, K.
SATURATED_SUPERHEAT = 1e-6


def linked_supply(values, given, case_path, read_record):
    """The main's supply from its linked let-down record, when ``[inputs.supply_link]`` names one.

    Parameters
    ----------
    values, given : dict
        The main's parsed input values (SI) and their texts as given, by field name.
    case_path : str or Path or None
        The case file; the links folder is relative to it.
    read_record : callable or None
        Reads a record file, refusing one whose digests do not match (from the records layer).

    Returns
    -------
    tuple
        ``(values, given)`` with ``supply_pressure``, ``supply_temperature`` (absent for a saturated outlet)
        and the link's four inputs added.
    """
    record, values, given = take_flat_link(SUPPLY_LINK, values, given, case_path, read_record)
    if record is None:
        return values, given
    record_id, revision = values["supply_link_record_id"], values["supply_link_revision"]
    try:
        entry = record["inputs"]["outlet_pressure"]
        pressure = from_record_unit(entry["value"], entry["unit"], "pressure")
        results = record["results"]
        temperature = from_record_unit(results["outlet_temperature"]["value"], results["outlet_temperature"]["unit"],
                                       "temperature")
        dryness = results["outlet_dryness"]["value"]
        superheat = results["outlet_superheat"]["value"]
    except (KeyError, TypeError):
        raise InputError(f"linked record {record_id} revision {revision} has no outlet pressure, temperature and "
                         "dryness", field="supply_link.record", value=record_id,
                         fix=f"re-issue {record_id} with this release of steamcalc") from None
    if dryness is None or dryness < 1.0:
        raise InputError(f"the outlet of linked record {record_id} is wet steam (dryness fraction {dryness}): "
                         "the main is calculated from dry steam", field="supply_link.record", value=record_id,
                         fix="link a let-down whose outlet is saturated or superheated (its desuperheater's "
                             "target above saturation), or feed the main from a header")
    values = dict(values, supply_pressure=pressure)
    given = dict(given, supply_pressure=f"{pressure / 1e5:.12g} bar(a)")
    if superheat is not None and superheat > SATURATED_SUPERHEAT:
        values["supply_temperature"] = temperature
        given["supply_temperature"] = f"{temperature - 273.15:.12g} degC"
    return values, given


def linked_record_problems(record, record_path, read_record):
    """What no longer holds of a main's supply link, for ``verify``: ``(problems, notes)``; the supply pressure and
    temperature it took against the let-down record beside it too
    (:func:`steamcalc.calcs.links.taken_value_problems`)."""
    problems, notes = link_problems(record, record_path, read_record, HOLDER)
    taken = [("supply_pressure", "inputs", "outlet_pressure", "pressure"),
             ("supply_temperature", "results", "outlet_temperature", "temperature")]
    return problems + taken_value_problems(record, record_path, read_record, "supply", taken, "let-down record"), \
        notes


def main_stale_links(record, record_path, read_record):
    """What makes a main's record stale (its linked let-down changed, missing or superseded), for ``register``."""
    return stale_links(record, record_path, read_record, HOLDER)


def supply_source(inputs):
    """The main's supply in words, for the record's assumptions: a header pressure, or the linked let-down."""
    if inputs.supply_link_record_id is None:
        return None
    return (f"Supply: the outlet of let-down record {inputs.supply_link_record_id} revision "
            f"{inputs.supply_link_revision} (after its desuperheater, if it has one), content digest "
            f"{inputs.supply_link_content_digest}: its outlet pressure and temperature as that record states them")


__all__ = ["linked_supply", "linked_record_problems", "main_stale_links", "supply_source", "SUPPLY_KIND"]
