"""A main whose steam flow is an issued heater record's, instead of a figure copied from it.

``[inputs.load_link] record = "HX-01", revision = "B"`` names the steam heater (kind ``exchanger``) the main
feeds. Its record is found and checked as the main's supply record is (:func:`steamcalc.calcs.links.take_flat_link`);
its steam flow at the design duty (the heater's ``steam_flow`` result, worked from its design process flow and
temperatures, heat-loss allowance included) becomes the main's ``steam_flow``. A heater's record states other
steam flows too: the flow at the largest process flow its installed area takes (``capacity_steam_flow``) is a
limit of the heater, not its design load, and is not taken. The link is kept as four inputs
(``load_link_record_id``, ``_revision``, ``_kind``, ``_content_digest``), so that ``verify`` and ``register``
check the file still holds the heater record the main used. The calculation never reads the file.
"""

from __future__ import annotations

from ...errors import InputError, UnitError
from ...units.quantities import from_record_unit
from ..links import FlatLink, take_flat_link

#: The linked record's kind: the steam heater the main feeds.
LOAD_KIND = "exchanger"
#: The heater's result the main takes: its steam flow at the design duty.
HEATER_STEAM_FLOW = "steam_flow"
#: The load link: a heater record whose design steam flow is the main's.
LOAD_LINK = FlatLink(item="load", kind=LOAD_KIND, words="heater record", example="HX-01", replaces=("steam_flow",),
                     instead="give the main's steam_flow", holder="the main")


def linked_load(values, given, case_path, read_record):
    """The main's steam flow from its linked heater record, when ``[inputs.load_link]`` names one.

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
        ``(values, given)`` with ``steam_flow`` (kg/s; given as the heater record states it, in its unit) and the
        link's four inputs added.
    """
    record, values, given = take_flat_link(LOAD_LINK, values, given, case_path, read_record)
    if record is None:
        return values, given
    record_id, revision = values["load_link_record_id"], values["load_link_revision"]
    try:
        entry = record["results"][HEATER_STEAM_FLOW]
        flow = from_record_unit(entry["value"], entry["unit"], "mass_flow")
    except (KeyError, TypeError, UnitError):
        raise InputError(f"linked heater record {record_id} revision {revision} states no steam flow",
                         field="load_link.record", value=record_id,
                         fix=f"re-issue {record_id} with this release of steamcalc") from None
    return (dict(values, steam_flow=flow),
            dict(given, steam_flow=f"{entry['value']:.12g} {entry['unit']}"))


def load_source(inputs):
    """The main's steam flow in words, for the record's assumptions, when a heater record gives it."""
    if inputs.load_link_record_id is None:
        return None
    return (f"Steam flow: the steam flow at design duty of heater record {inputs.load_link_record_id} revision "
            f"{inputs.load_link_revision}, content digest {inputs.load_link_content_digest} (its design process flow "
            "and temperatures, heat-loss allowance included), as that record states it; not the larger flow at "
            "the largest process flow the heater's installed area takes")


__all__ = ["linked_load", "load_source", "LOAD_KIND", "LOAD_LINK"]
