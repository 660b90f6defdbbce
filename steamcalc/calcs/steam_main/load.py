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
from ..links import FlatLink, take_flat_link, taken_value_problems

#: The linked record's kind: the steam heater the main feeds.
LOAD_KIND = "exchanger"
#: The heater's result the main takes: its steam flow at the design duty.
HEATER_STEAM_FLOW = "steam_flow"
#: The heater's result the return line takes, when the case gives the heater's trap but not its condensate flow.
HEATER_CONDENSATE_FLOW = "condensate_flow"
#: What the link's condensate entry says when the heater record's condensate flow was taken (the record's words).
CONDENSATE_TAKEN = "the heater record's condensate flow at design duty"
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
        link's four inputs added; with ``heater_condensate_flow`` too (the heater's ``condensate_flow`` result) when
        the case gives the heater's trap in its return line but not that flow (one given is kept: release 0.3.2).
    """
    record, values, given = take_flat_link(LOAD_LINK, values, given, case_path, read_record)
    if record is None:
        return values, given
    record_id = values["load_link_record_id"]
    flow, text = _heater_flow(record, HEATER_STEAM_FLOW, "steam flow", "load_link.record",
                              f"re-issue {record_id} with this release of steamcalc")
    values, given = dict(values, steam_flow=flow), dict(given, steam_flow=text)
    # Filled in here only, so that the record says where the condensate came from only when it came from the link.
    values.pop("load_link_condensate", None)
    given.pop("load_link_condensate", None)
    if values.get("heater_trap_pressure") is not None and values.get("heater_condensate_flow") is None:
        # The heater's trap drains into the main's return line: its condensate is the same record's, not a copy.
        values["heater_condensate_flow"], given["heater_condensate_flow"] = _heater_flow(
            record, HEATER_CONDENSATE_FLOW, "condensate flow", "return_line.heater_condensate_flow",
            f"give heater_condensate_flow in [inputs.return_line], or re-issue {record_id} with this release of "
            "steamcalc")
        values["load_link_condensate"] = given["load_link_condensate"] = CONDENSATE_TAKEN
    return values, given


def _heater_flow(record, key, words, field, fix):
    """A flow the linked heater record states: ``(kg/s, the text as given: the record's number in its unit)``;
    refused, naming ``field``, when the record does not state it."""
    try:
        entry = record["results"][key]
        return from_record_unit(entry["value"], entry["unit"], "mass_flow"), f"{entry['value']:.12g} {entry['unit']}"
    except (KeyError, TypeError, UnitError):
        raise InputError(f"linked heater record {record.get('id')} revision {record.get('revision')} states no "
                         f"{words}", field=field, value=record.get("id"), fix=fix) from None


def load_link_value_problems(record, record_path, read_record):
    """What a main says it took from its linked heater record that the record beside it does not state: its
    ``steam_flow``, and its ``heater_condensate_flow`` when ``load_link_condensate`` says it is the heater record's
    (:func:`steamcalc.calcs.links.taken_value_problems`); and a ``load_link_condensate`` the main does not write.

    Parameters
    ----------
    record : dict
        The main's record.
    record_path : str or Path or None
        Where it was read from.
    read_record : callable
        Reads a record file, refusing one whose digests do not match (from the records layer).

    Returns
    -------
    list of str
    """
    inputs = record.get("inputs", {}) if isinstance(record.get("inputs"), dict) else {}

    def value(name):
        entry = inputs.get(name)
        return entry.get("value") if isinstance(entry, dict) else None

    claim, linked = value("load_link_condensate"), value("load_link_record_id")
    problems = []
    if claim is not None and not linked:
        problems.append(f"input load_link_condensate says {claim!r}, but the main links no heater record")
    elif claim is not None and claim != CONDENSATE_TAKEN:
        problems.append(f"input load_link_condensate says {claim!r}; the main writes only {CONDENSATE_TAKEN!r}")
    taken = [("steam_flow", "results", HEATER_STEAM_FLOW, "mass_flow")]
    if claim is not None:
        taken.append(("heater_condensate_flow", "results", HEATER_CONDENSATE_FLOW, "mass_flow"))
    return problems + taken_value_problems(record, record_path, read_record, "load", taken, "heater record")


def load_source(inputs):
    """The main's steam flow in words, for the record's assumptions, when a heater record gives it."""
    if inputs.load_link_record_id is None:
        return None
    return (f"Steam flow: the steam flow at design duty of heater record {inputs.load_link_record_id} revision "
            f"{inputs.load_link_revision}, content digest {inputs.load_link_content_digest} (its design process flow "
            "and temperatures, heat-loss allowance included), as that record states it; not the larger flow at "
            "the largest process flow the heater's installed area takes"
            + ("; the heater's condensate into the return line: the same record's condensate flow at design duty"
               if inputs.load_link_condensate else ""))


__all__ = ["linked_load", "load_link_value_problems", "load_source", "LOAD_KIND", "LOAD_LINK"]
