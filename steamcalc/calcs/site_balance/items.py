"""The items of a site steam balance, in SI, and their record table.

A balance holds lists of items (load cases, let-downs, users, flash vessels, turbines) besides a boiler and a
deaerator. Each item is a frozen dataclass whose fields carry a quantity kind and a label in their
metadata (:func:`item_field`); the record's ``inputs`` table holds every field of every item as one
entry, addressed ``section.item.field`` (``user.Evaporator.return_fraction``), in record units with
its label and the text as given, so every view shows it like any other input. Names of items never
hold a dot, so the address splits back unambiguously (:func:`items_from_record`).
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass, field

from ...errors import InputError
from ...units.quantities import RECORD_UNITS, from_record_unit, to_record_unit

#: An item's name: it becomes part of record keys and result labels, so no dot, no braces.
NAME_PATTERN = re.compile(r"^[A-Za-z0-9][A-Za-z0-9 _()+/-]{0,39}\Z")
#: Kinds held as given (no unit).
_RAW = ("text", "names")
#: Where a user's returned condensate goes (the user's ``condensate_to``): the first is the default.
#: "vented receiver": a receiver open to the site atmosphere, where the condensate's flash from the header's
#: saturation is lost; "cooled": cooled below its atmospheric boiling point before a vented receiver, so none
#: flashes; "deaerator": returned under pressure straight into the deaerator, whose energy balance takes its flash.
RETURN_ROUTES = ("vented receiver", "cooled", "deaerator")
#: Record units where the record unit of the kind would be awkward (hours of a load case, not minutes).
_UNIT_OVERRIDES = {"hours": "h"}


def item_field(kind, label, default=None):
    """A field of a balance item: ``kind`` a quantity kind of :data:`~steamcalc.units.quantities.RECORD_UNITS`
    (or ``fraction``, ``number``, ``text``, ``names``, ``hours``), ``label`` the words a record shows."""
    return field(default=default, metadata={"kind": kind, "label": label})


def _record_unit(kind):
    if kind in _UNIT_OVERRIDES:
        return _UNIT_OVERRIDES[kind]
    if kind in ("fraction", "number") or kind in _RAW:
        return ""
    return RECORD_UNITS[kind]


def _si_kind(kind):
    return "time" if kind == "hours" else kind


@dataclass(frozen=True)
class Link:
    """An issued record the balance uses: its id, revision, kind and content digest (what verify re-checks)."""

    record_id: str = item_field("text", "linked record")
    revision: str = item_field("text", "linked record's revision")
    kind: str = item_field("text", "linked record's kind")
    content_digest: str = item_field("text", "linked record's content digest")


@dataclass(frozen=True)
class LoadCase:
    """A load case: its name and hours a year."""

    name: str = item_field("text", "name")
    hours: float = item_field("hours", "hours a year")


@dataclass(frozen=True)
class Boiler:
    """The boiler: the header it feeds, its steam (``flow`` None: it balances the site), efficiency, blowdown."""

    header: str = item_field("text", "header fed")
    pressure: float = item_field("pressure", "steam pressure")
    temperature: float | None = item_field("temperature", "steam temperature (saturated when not given)")
    flow: float | None = item_field("mass_flow", "steam flow (balances the site when not given)")
    capacity: float | None = item_field("mass_flow", "maximum continuous rating")
    efficiency: float | None = item_field("fraction", "efficiency (steam heat out / fuel in)")
    blowdown_fraction: float | None = item_field("fraction", "blowdown, fraction of the feedwater")
    feedwater_tds: float | None = item_field("number", "feedwater dissolved solids (TDS or conductivity)")
    boiler_water_tds: float | None = item_field("number", "boiler-water dissolved solids limit (same measure)")
    blowdown_flash_header: str | None = item_field("text", "blowdown flash vessel: flash steam to header")
    blowdown_cooler_approach: float | None = item_field("temperature_difference",
                                                        "blowdown cooler: approach temperature")
    blowdown_cooler_effectiveness: float | None = item_field("fraction", "blowdown cooler: effectiveness")

    @property
    def blowdown_cooled(self):
        """Whether the blowdown (or its flash residual) heats the make-up water in a cooler."""
        return self.blowdown_cooler_approach is not None or self.blowdown_cooler_effectiveness is not None

    @property
    def blowdown_of_steam(self):
        """Blowdown per kg of steam raised: TDS balance FW/(BW − FW), or f/(1 − f) from a feedwater fraction."""
        if self.blowdown_fraction is not None:
            return self.blowdown_fraction / (1.0 - self.blowdown_fraction)
        return self.feedwater_tds / (self.boiler_water_tds - self.feedwater_tds)


@dataclass(frozen=True)
class Deaerator:
    """The deaerator: its pressure, the header its steam comes from, its vent as a share of that steam
    (``vent_fraction``) or of the feedwater it delivers (``vent_of_feedwater``, which then replaces it)."""

    pressure: float = item_field("pressure", "pressure")
    steam_header: str = item_field("text", "heating-steam header")
    vent_fraction: float = item_field("fraction", "vent, fraction of the heating steam")
    makeup_temperature: float | None = item_field("temperature", "make-up water temperature")
    vent_of_feedwater: float | None = item_field("fraction", "vent, fraction of the feedwater")


@dataclass(frozen=True)
class Letdown:
    """A let-down station between two headers; the balance sets its flow. Optional desuperheater."""

    name: str = item_field("text", "name")
    source: str = item_field("text", "from header")
    target: str = item_field("text", "to header")
    target_superheat: float | None = item_field("temperature_difference", "desuperheated to superheat")
    target_temperature: float | None = item_field("temperature", "desuperheated to temperature")
    water_temperature: float | None = item_field("temperature", "spray water temperature")
    water_pressure: float | None = item_field("pressure", "spray water pressure")
    max_flow: float | None = item_field("mass_flow", "valve maximum flow")
    min_flow: float | None = item_field("mass_flow", "valve minimum flow")
    # The station as its linked let-down record states it: pressures, inlet steam, valve and inlet line, for the
    # valve's Kv and travel at the balance's flow and the header-pressure check (:mod:`.valve_checks`).
    inlet_pressure: float | None = item_field("pressure", "station inlet pressure (linked record)")
    outlet_pressure: float | None = item_field("pressure", "station outlet pressure (linked record)")
    inlet_temperature: float | None = item_field("temperature", "inlet steam temperature (linked record)")
    inlet_superheat: float | None = item_field("temperature_difference", "inlet steam superheat (linked record)")
    inlet_dryness: float | None = item_field("fraction", "inlet steam dryness fraction (linked record)")
    rated_kv: float | None = item_field("flow_coefficient", "valve rated Kv (Kvs)")
    xt: float | None = item_field("fraction", "valve pressure differential ratio factor xT")
    characteristic: str | None = item_field("text", "valve inherent characteristic")
    rangeability: float | None = item_field("number", "valve inherent rangeability")
    valve_size: str | None = item_field("text", "valve size")
    inlet_size: str | None = item_field("text", "inlet line size")
    outlet_size: str | None = item_field("text", "outlet line size")
    schedule: str | None = item_field("text", "pipe schedule")
    inlet_length: float | None = item_field("length", "inlet line length")
    inlet_fittings_k: float | None = item_field("number", "inlet line fittings K")
    link: Link | None = None

    @property
    def desuperheated(self):
        return self.target_superheat is not None or self.target_temperature is not None


@dataclass(frozen=True)
class User:
    """A steam user on a header: per load case a steam flow or a duty; the condensate it returns."""

    name: str = item_field("text", "name")
    header: str = item_field("text", "header")
    flows: tuple = ()     # ((load case, kg/s), ...)
    duties: tuple = ()    # ((load case, W), ...)
    return_fraction: float = item_field("fraction", "condensate returned, fraction", 0.0)
    return_temperature: float | None = item_field("temperature", "condensate return temperature")
    condensate_to: str = item_field("text", "condensate returned to (vented receiver, cooled, deaerator)",
                                    RETURN_ROUTES[0])
    steam_pressure: float | None = item_field("pressure", "heater's steam supply pressure (linked record)")
    link: Link | None = None

    @property
    def return_flashes_off(self):
        """Whether the returned condensate loses its flash at an atmospheric (vented) receiver."""
        return self.condensate_to == RETURN_ROUTES[0]

    def load(self, case):
        """``("flow", kg/s)`` or ``("duty", W)`` in a load case (zero when the case gives none)."""
        for name, value in self.flows:
            if name == case:
                return "flow", value
        for name, value in self.duties:
            if name == case:
                return "duty", value
        return "flow", 0.0


@dataclass(frozen=True)
class Flash:
    """A flash vessel on a user's returned condensate, flashing into a lower header."""

    name: str = item_field("text", "name")
    from_user: str = item_field("text", "condensate of user")
    target: str = item_field("text", "flash steam to header")
    condensate_pressure: float | None = item_field("pressure", "condensate pressure (linked record)")
    flash_pressure: float | None = item_field("pressure", "flash pressure (linked record)")
    link: Link | None = None


@dataclass(frozen=True)
class Turbine:
    """A back-pressure turbine from an inlet header to a lower exhaust header (``flow`` None: it balances the
    exhaust header, up to ``max_flow``, ahead of the let-down into it)."""

    name: str = item_field("text", "name")
    source: str = item_field("text", "inlet header")
    target: str = item_field("text", "exhaust header")
    isentropic_efficiency: float = item_field("fraction", "isentropic efficiency")
    flow: float | None = item_field("mass_flow", "steam flow (balances the exhaust header when not given)")
    max_flow: float | None = item_field("mass_flow", "maximum steam flow (swallowing capacity)")
    generator_efficiency: float | None = item_field("fraction", "mechanical and generator efficiency "
                                                    "(electric power / shaft power)")


#: Section of the case file and record -> item class, for the lists.
LISTS = {"load_case": LoadCase, "letdown": Letdown, "user": User, "flash": Flash, "turbine": Turbine}


def _entry(value, kind, label, given):
    if kind in _RAW:
        stored = ", ".join(value) if kind == "names" else value
    else:
        stored = value if kind in ("fraction", "number") else to_record_unit(value, _si_kind(kind)) \
            if kind not in _UNIT_OVERRIDES else value / 3600.0
    return {"value": stored, "unit": _record_unit(kind), "label": label, "given": given}


def _item_entries(table, prefix, heading, item, given):
    for f in dataclasses.fields(item):
        value = getattr(item, f.name)
        if value is None or f.name in ("flows", "duties") or f.name == "name":
            continue
        if isinstance(value, Link):
            for lf in dataclasses.fields(Link):
                key = f"{prefix}.link.{lf.name}"
                table[key] = _entry(getattr(value, lf.name), "text", f"{heading}: {lf.metadata['label']}",
                                    given.get(key, getattr(value, lf.name)))
            continue
        key = f"{prefix}.{f.name}"
        table[key] = _entry(value, f.metadata["kind"], f"{heading}: {f.metadata['label']}",
                            given.get(key, "(default)"))
    if isinstance(item, User):
        for case, value in item.flows:
            key = f"{prefix}.load.{case}"
            table[key] = _entry(value, "mass_flow", f"{heading}: steam flow, {case}", given.get(key, "(default)"))
        for case, value in item.duties:
            key = f"{prefix}.load.{case}"
            table[key] = _entry(value, "power", f"{heading}: duty, {case}", given.get(key, "(default)"))


def record_table(inputs, given):
    """The record's ``inputs`` table of a balance: one entry per field of every item."""
    table = {}
    _item_entries(table, "boiler", "Boiler", inputs.boiler, given)
    _item_entries(table, "deaerator", "Deaerator", inputs.deaerator, given)
    for section, items in (("load_case", inputs.load_cases), ("letdown", inputs.letdowns),
                           ("user", inputs.users), ("flash", inputs.flashes), ("turbine", inputs.turbines)):
        for item in items:
            prefix = f"{section}.{item.name}"
            heading = {"load_case": "Load case", "letdown": "Let-down", "user": "User", "flash": "Flash vessel",
                       "turbine": "Turbine"}[section]
            table[f"{prefix}.name"] = _entry(item.name, "text", f"{heading} {item.name}", item.name)
            _item_entries(table, prefix, f"{heading} {item.name}", item, given)
    if inputs.without:
        table["what_if.without"] = _entry(inputs.without, "names", "What-if: items taken out of service",
                                          given.get("what_if.without", ", ".join(inputs.without)))
    return table


def _value(entry, kind, key):
    if kind in _RAW:
        value = entry["value"]
        if not isinstance(value, str):
            raise InputError("a record text input must be text", field=key, value=value)
        return tuple(v.strip() for v in value.split(",") if v.strip()) if kind == "names" else value
    if kind in _UNIT_OVERRIDES:
        return from_record_unit(entry["value"], entry.get("unit", ""), "time")
    if kind in ("fraction", "number"):
        return from_record_unit(entry["value"], "", "dimensionless")
    return from_record_unit(entry["value"], entry.get("unit", ""), kind)


def _build(cls, fields_in, key_prefix):
    values, link = {}, {}
    flows, duties = [], []
    kinds = {f.name: f.metadata.get("kind") for f in dataclasses.fields(cls)}
    for name, entry in fields_in.items():
        key = f"{key_prefix}.{name}"
        if name.startswith("link."):
            link[name[5:]] = _value(entry, "text", key)
        elif name.startswith("load.") and cls is User:
            case = name[5:]
            if entry.get("unit") == "kW":
                duties.append((case, _value(entry, "power", key)))
            else:
                flows.append((case, _value(entry, "mass_flow", key)))
        elif name in kinds and kinds[name]:
            values[name] = _value(entry, kinds[name], key)
        else:
            raise InputError(f"record input '{key}' is not an input of a balance", field=key)
    if link:
        values["link"] = Link(**link)
    if cls is User:
        values["flows"], values["duties"] = tuple(flows), tuple(duties)
    return cls(**values)


def items_from_record(table):
    """Rebuild the items of a balance from its record ``inputs`` table: ``{section: item or [items]}``."""
    grouped = {"boiler": {}, "deaerator": {}, "what_if": {}}
    lists = {section: {} for section in LISTS}
    for key, entry in table.items():
        section, _, rest = key.partition(".")
        if section in grouped:
            grouped[section][rest] = entry
        elif section in lists:
            name, _, name_field = rest.partition(".")
            lists[section].setdefault(name, {})[name_field] = entry
        else:
            raise InputError(f"record input '{key}' is not an input of a balance", field=key)
    built = {"boiler": _build(Boiler, grouped["boiler"], "boiler"),
             "deaerator": _build(Deaerator, grouped["deaerator"], "deaerator"),
             "without": _value(grouped["what_if"]["without"], "names", "what_if.without")
             if "without" in grouped["what_if"] else ()}
    for section, cls in LISTS.items():
        built[section] = tuple(_build(cls, fields_in, f"{section}.{name}") for name, fields_in in lists[section].items())
    return built
