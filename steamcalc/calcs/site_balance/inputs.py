"""The frozen Inputs of a site steam balance, and how case files and records make them.

A balance's inputs are lists of items, not one value per field, so the Inputs class gives the generic
case and record machinery four hooks instead of per-field parsing: :meth:`Inputs.check_case_table`
(unknown keys), :meth:`Inputs.from_case_table` (a case's ``[inputs]`` to Inputs, with the texts as
given), :meth:`Inputs.to_record_table` and :meth:`Inputs.from_record_table` (the record's ``inputs``).
Its dataclass fields still carry the metadata every kind's fields carry, so forms, views and review
that list a kind's fields find labels for them.
"""

from __future__ import annotations

from dataclasses import dataclass

from ...errors import InputError
from ..base import input_field
from . import reading
from .blowdown import RECOVERY, has_recovery
from .items import RETURN_ROUTES, items_from_record, record_table
from .links import Links
from .turbine_reading import check_turbine_network, check_turbines_against_site, read_turbines


@dataclass(frozen=True)
class Inputs:
    """A site steam balance: the boiler, the deaerator, load cases, let-downs, users, flash vessels, turbines (SI).

    The headers are the site file's ``[headers]``; every item names its header by that name.
    """

    boiler: object = input_field("text", "Boiler", "The boiler: header fed, pressure, temperature, flow, "
                                 "efficiency and blowdown.", example="[inputs.boiler]", required=True)
    deaerator: object = input_field("text", "Deaerator", "Pressure, heating-steam header, vent fraction, make-up "
                                    "water temperature.", example="[inputs.deaerator]", required=True)
    load_cases: tuple = input_field("text", "Load cases", "Names and hours a year.", example="[[inputs.load_case]]",
                                    required=True)
    letdowns: tuple = input_field("text", "Let-down stations", "Between headers; the balance sets their flow.",
                                  example="[[inputs.letdown]]", default=())
    users: tuple = input_field("text", "Steam users", "Flow or duty per load case, condensate returned.",
                               example="[[inputs.user]]", default=())
    flashes: tuple = input_field("text", "Flash vessels", "On a user's returned condensate, into a lower header.",
                                 example="[[inputs.flash]]", default=())
    turbines: tuple = input_field("text", "Back-pressure turbines", "Between headers; a fixed flow or the flow that "
                                  "balances the exhaust header.", example="[[inputs.turbine]]", default=())
    without: tuple = input_field("text", "What-if: items out of service", "Items taken out of service in the "
                                 "comparison balance: let-downs, users and flash vessels by name, and "
                                 f'"{RECOVERY}" for the boiler\'s blowdown flash and cooler.',
                                 example='without = ["FL-01"]', default=())

    def __post_init__(self):
        if self.boiler is None or self.deaerator is None or not self.load_cases:
            raise InputError("a balance needs a boiler, a deaerator and at least one load case",
                             field="boiler" if self.boiler is None else "deaerator" if self.deaerator is None
                             else "load_case", fix="add [inputs.boiler], [inputs.deaerator] and [[inputs.load_case]]")
        _check_network(self)

    @property
    def case_names(self):
        return tuple(c.name for c in self.load_cases)

    @staticmethod
    def check_case_table(table):
        """Refuse unknown keys of a balance's ``[inputs]`` (called when the case file is read)."""
        reading.check_table(table)

    @classmethod
    def from_case_table(cls, table, site, case_path=None, read_record=None):
        """Inputs and texts as given from a case's ``[inputs]``; linked records are found relative to ``case_path``
        and read with ``read_record`` (a reader that refuses a record whose digests do not match)."""
        reading.check_table(table)
        given = {}
        for section in ("boiler", "deaerator"):
            if section not in table:
                raise InputError("is required", field=section, fix=f"add [inputs.{section}]")
        links = Links(table.get("links"), case_path, site, read_record)
        boiler = reading.read_boiler(table["boiler"], site, given)
        deaerator = reading.read_deaerator(table["deaerator"], site, given)
        cases = reading.read_load_cases(table.get("load_case", []), given)
        names = tuple(c.name for c in cases)
        letdowns = reading.read_letdowns(table.get("letdown", []), site, given, links)
        users = reading.read_users(table.get("user", []), site, given, names, links)
        flashes = reading.read_flashes(table.get("flash", []), site, given, users, links)
        turbines = read_turbines(table.get("turbine", []), site, given)
        items = {i.name for i in (*letdowns, *users, *flashes, *turbines)}
        without = reading.read_without(table.get("what_if", {}), items, recovery=has_recovery(boiler))
        if without:
            given["what_if.without"] = ", ".join(without)
        return cls(boiler=boiler, deaerator=deaerator, load_cases=cases, letdowns=letdowns, users=users,
                   flashes=flashes, turbines=turbines, without=without), given

    def to_record_table(self, given):
        """The record's ``inputs`` table (:func:`~steamcalc.calcs.site_balance.items.record_table`)."""
        return record_table(self, given)

    @classmethod
    def from_record_table(cls, table):
        """Inputs rebuilt from a record's ``inputs`` table."""
        try:
            built = items_from_record(table)
        except (KeyError, TypeError) as exc:
            raise InputError(f"the record's balance inputs are incomplete ({exc})", field="inputs") from None
        return cls(boiler=built["boiler"], deaerator=built["deaerator"], load_cases=built["load_case"],
                   letdowns=built["letdown"], users=built["user"], flashes=built["flash"], turbines=built["turbine"],
                   without=built["without"])


def _check_network(inputs):
    """Refuse a network the balance cannot solve: let-down cycles, a let-down up the pressures, two
    let-downs into one header, a flash not below its condensate, a deaerator above its steam."""
    feeds = {}
    for i, ld in enumerate(inputs.letdowns):
        if ld.source == ld.target:
            raise InputError(f"let-down {ld.name} goes from header {ld.source} to itself", field=f"letdown[{i}].to",
                             value=ld.target, fix="let it down to a lower-pressure header")
        if ld.target in feeds:
            raise InputError(f"header {ld.target} is fed by two let-downs, {feeds[ld.target]} and {ld.name}; the "
                             "balance cannot say which makes up the header", field=f"letdown[{i}].to", value=ld.target,
                             fix="model the parallel stations as one let-down (their flows add), or feed another header")
        feeds[ld.target] = ld.name
    # A cycle of let-downs (HP -> MP -> HP) is named before the pressures are compared: it is the plainer fault.
    graph = {}
    for ld in inputs.letdowns:
        graph.setdefault(ld.source, []).append(ld.target)
    for start in graph:
        path, stack = [], [(start, iter(graph.get(start, ())))]
        seen = {start}
        path.append(start)
        while stack:
            node, children = stack[-1]
            child = next(children, None)
            if child is None:
                stack.pop()
                path.pop()
                continue
            if child == start:
                cycle = " -> ".join(path + [start])
                raise InputError(f"the let-downs make a cycle: {cycle}", field="letdown", value=cycle,
                                 fix="let-downs run from higher to lower pressure only; remove the one that closes the cycle")
            if child not in seen:
                seen.add(child)
                path.append(child)
                stack.append((child, iter(graph.get(child, ()))))
    names = {u.name for u in inputs.users}
    for u in inputs.users:
        if u.condensate_to not in RETURN_ROUTES:
            raise InputError(f"user {u.name}'s condensate cannot go to {u.condensate_to!r}",
                             field=f"user.{u.name}.condensate_to", value=u.condensate_to,
                             fix="write one of: " + ", ".join(f'"{r}"' for r in RETURN_ROUTES))
    owner = {}
    for section, items in (("letdown", inputs.letdowns), ("user", inputs.users), ("flash", inputs.flashes),
                           ("turbine", inputs.turbines)):
        for item in items:
            if item.name in owner and owner[item.name] != section:
                raise InputError(f"the name {item.name!r} is used by a {owner[item.name]} and a {section}",
                                 field=f"{section}.name", value=item.name,
                                 fix="give every let-down, user, flash vessel and turbine its own name")
            owner[item.name] = section
    for flash in inputs.flashes:
        if flash.from_user not in names:
            raise InputError(f"flash vessel {flash.name} takes the condensate of {flash.from_user!r}, not a user",
                             field="flash.condensate_of", value=flash.from_user, fix="name one of the users")
    for without in inputs.without:
        if without == RECOVERY and has_recovery(inputs.boiler):
            continue
        if without not in {i.name for i in (*inputs.letdowns, *inputs.users, *inputs.flashes, *inputs.turbines)}:
            raise InputError(f"{without!r} is not an item of this balance", field="what_if.without", value=without,
                             fix="name a let-down, user, flash vessel or turbine of the balance, or "
                                 f'"{RECOVERY}" when the boiler has a blowdown flash or cooler')
    check_turbine_network(inputs)


def checked_against_site(inputs, site):
    """Refuse what needs the site's header pressures: let-downs and flashes up the pressures, the deaerator
    above its steam header, the boiler below its header. Called at the start of ``calculate``."""
    headers = site.headers

    def pressure(name, address):
        if name not in headers:
            raise InputError(f"header {name!r} is not in the site's headers", field=address, value=name,
                             fix=f"use one of: {', '.join(headers) or 'none'}")
        return headers[name]

    for ld in inputs.letdowns:
        p_from, p_to = pressure(ld.source, f"letdown.{ld.name}.from"), pressure(ld.target, f"letdown.{ld.name}.to")
        if p_to >= p_from:
            raise InputError(f"let-down {ld.name} runs from {ld.source} ({p_from / 1e5:.4g} bar(a)) up to {ld.target} "
                             f"({p_to / 1e5:.4g} bar(a))", field=f"letdown.{ld.name}.to", value=ld.target,
                             fix="a let-down runs from a higher to a lower pressure header")
    users = {u.name: u for u in inputs.users}
    for u in inputs.users:
        pressure(u.header, f"user.{u.name}.header")
    for fl in inputs.flashes:
        p_c = pressure(users[fl.from_user].header, f"flash.{fl.name}.condensate_of")
        p_f = pressure(fl.target, f"flash.{fl.name}.to")
        if p_f >= p_c:
            raise InputError(f"flash vessel {fl.name} flashes {fl.from_user}'s condensate at {p_c / 1e5:.4g} bar(a) into "
                             f"{fl.target} at {p_f / 1e5:.4g} bar(a), which is not lower", field=f"flash.{fl.name}.to",
                             value=fl.target, fix="flash into a lower-pressure header")
    p_steam = pressure(inputs.deaerator.steam_header, "deaerator.steam_header")
    if inputs.deaerator.pressure >= p_steam:
        raise InputError(f"the deaerator at {inputs.deaerator.pressure / 1e5:.4g} bar(a) is not below its heating-steam "
                         f"header {inputs.deaerator.steam_header} ({p_steam / 1e5:.4g} bar(a)): steam cannot flow in",
                         field="deaerator.pressure", fix="lower the deaerator pressure or take its steam from a higher header")
    p_boiler_header = pressure(inputs.boiler.header, "boiler.header")
    if inputs.boiler.pressure < p_boiler_header:
        raise InputError(f"the boiler at {inputs.boiler.pressure / 1e5:.4g} bar(a) is below the header it feeds, "
                         f"{inputs.boiler.header} at {p_boiler_header / 1e5:.4g} bar(a)", field="boiler.pressure",
                         fix="give the boiler's working pressure, at or above its header's")
    check_turbines_against_site(inputs, headers)
    if inputs.deaerator.vent_of_feedwater is not None and inputs.deaerator.vent_fraction:
        raise InputError("the deaerator's vent is given both of its heating steam and of its feedwater",
                         field="deaerator.vent_of_feedwater", fix="keep one basis for the vent")
    boiler = inputs.boiler
    if boiler.blowdown_fraction is None and (boiler.feedwater_tds is None or boiler.boiler_water_tds is None or
                                             boiler.feedwater_tds >= boiler.boiler_water_tds):
        raise InputError(f"feedwater dissolved solids {boiler.feedwater_tds} are not below the boiler-water limit "
                         f"{boiler.boiler_water_tds}: no blowdown could hold it", field="boiler.feedwater_tds",
                         value=boiler.feedwater_tds,
                         fix="give both in the same measure, feedwater below the boiler-water limit, or a "
                             "blowdown_fraction")
    if boiler.blowdown_cooler_approach is not None and boiler.blowdown_cooler_effectiveness is not None:
        raise InputError("the blowdown cooler is given both an approach temperature and an effectiveness",
                         field="boiler.blowdown_cooler_effectiveness", fix="keep one way of stating the cooler")
    if boiler.blowdown_flash_header is not None:
        p_flash = pressure(boiler.blowdown_flash_header, "boiler.blowdown_flash_header")
        if p_flash >= boiler.pressure:
            raise InputError(f"the blowdown flash vessel at header {boiler.blowdown_flash_header} "
                             f"({p_flash / 1e5:.4g} bar(a)) is not below the boiler ({boiler.pressure / 1e5:.4g} "
                             "bar(a)): no blowdown would flash", field="boiler.blowdown_flash_header",
                             value=boiler.blowdown_flash_header,
                             fix="flash the blowdown into a header below the boiler's pressure, or leave it out")
    if inputs.letdowns and any(ld.target == inputs.boiler.header for ld in inputs.letdowns):
        raise InputError(f"a let-down feeds the boiler's header {inputs.boiler.header}", field="letdown.to",
                         value=inputs.boiler.header, fix="the boiler makes up its own header; feed lower headers only")
