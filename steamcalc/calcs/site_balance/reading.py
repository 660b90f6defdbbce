"""Reading a balance's ``[inputs]`` from a case file: tables and arrays of tables, refused by field.

The case file holds::

    [inputs.boiler]        header, pressure, temperature, flow ("balances the site" or a flow), capacity,
                           efficiency, blowdown_fraction or feedwater_tds with boiler_water_tds,
                           blowdown_flash_header, blowdown_cooler_approach or blowdown_cooler_effectiveness
    [inputs.deaerator]     pressure, steam_header, vent_fraction (of the heating steam) or vent_of_feedwater,
                           makeup_temperature
    [[inputs.load_case]]   name, hours
    [[inputs.letdown]]     name, from, to, target_superheat or target_temperature, water_temperature,
                           water_pressure, max_flow, min_flow, record
    [[inputs.user]]        name, header, load (a flow or a duty, or a table of them by load case),
                           condensate_return, return_temperature, condensate_to ("vented receiver", the
                           default, "cooled" or "deaerator"), record
    [[inputs.flash]]       name, condensate_of, to, record
    [[inputs.turbine]]     name, from, to, flow ("balances the exhaust header" or a flow), max_flow,
                           isentropic_efficiency, generator_efficiency (:mod:`.turbine_reading`)
                           (a let-down, user or flash vessel with a record may give its own revision of it)
    [inputs.what_if]       without = [names of items taken out of service in the comparison: let-downs, users,
                           flash vessels, turbines, and "blowdown recovery" for the boiler's blowdown flash and
                           cooler]
    [inputs.links]         folder, revision (of the records the items name)

Every error names the case-file address of the value (``user[2].header``), the value and the fix.
"""

from __future__ import annotations

import math

from ...errors import CaseFileError, InputError, UnitError
from ...units.quantities import parse_amount, parse_pressure, parse_quantity
from .blowdown import RECOVERY
from .items import NAME_PATTERN, RETURN_ROUTES, Boiler, Deaerator, Flash, Letdown, LoadCase, User
from .links import FLASH_COPIED, LETDOWN_COPIED

SECTIONS = ("boiler", "deaerator", "load_case", "letdown", "user", "flash", "turbine", "what_if", "links")
KEYS = {
    "boiler": ("header", "pressure", "temperature", "flow", "capacity", "efficiency", "blowdown_fraction",
               "feedwater_tds", "boiler_water_tds", "blowdown_flash_header", "blowdown_cooler_approach",
               "blowdown_cooler_effectiveness"),
    "deaerator": ("pressure", "steam_header", "vent_fraction", "vent_of_feedwater", "makeup_temperature"),
    "load_case": ("name", "hours"),
    "letdown": ("name", "from", "to", "target_superheat", "target_temperature", "water_temperature",
                "water_pressure", "max_flow", "min_flow", "record", "revision"),
    "user": ("name", "header", "load", "condensate_return", "return_temperature", "condensate_to", "record",
             "revision"),
    "flash": ("name", "condensate_of", "to", "record", "revision"),
    "turbine": ("name", "from", "to", "flow", "max_flow", "isentropic_efficiency", "generator_efficiency"),
    "what_if": ("without",),
    "links": ("folder", "revision"),
}
LISTS = ("load_case", "letdown", "user", "flash", "turbine")
#: Words that say the boiler makes whatever steam the site needs.
BALANCING = "balances the site"
MAX_ITEMS = 50


def check_table(table):
    """Refuse a key of ``[inputs]`` or of its tables the balance does not accept, naming it."""
    for key, value in table.items():
        if key not in SECTIONS:
            raise CaseFileError(f"unknown key '{key}' in [inputs]", field=key,
                                fix="a balance's [inputs] holds the tables " + ", ".join(
                                    f"[[inputs.{s}]]" if s in LISTS else f"[inputs.{s}]" for s in SECTIONS))
        rows = value if key in LISTS else [value]
        if key in LISTS and not isinstance(value, list):
            raise CaseFileError(f"'{key}' must be an array of tables, [[inputs.{key}]]", field=key,
                                fix=f"write each one as its own [[inputs.{key}]] block")
        if len(rows) > MAX_ITEMS:
            raise CaseFileError(f"{len(rows)} entries; at most {MAX_ITEMS}", field=key)
        for i, row in enumerate(rows):
            where = f"{key}[{i}]" if key in LISTS else key
            if not isinstance(row, dict):
                raise CaseFileError(f"'{where}' must be a table", field=where,
                                    fix=f"write it as [inputs.{key}] with its keys below it" if key not in LISTS
                                    else f"write each one as its own [[inputs.{key}]] block")
            for sub in row:
                if sub not in KEYS[key]:
                    raise CaseFileError(f"unknown key '{sub}' in {where}", field=f"{where}.{sub}",
                                        fix=f"the keys {key} accepts are: {', '.join(KEYS[key])}")
            if key in LISTS and "revision" in row and "record" not in row:
                raise CaseFileError("a revision is of a linked record, and this item links none",
                                    field=f"{where}.revision", value=row["revision"],
                                    fix='add record = "<id>" to link the issued record, or leave revision out')


def _required(row, key, where):
    if key not in row:
        raise CaseFileError("is required", field=f"{where}.{key}", fix=f"add {key} to {where}")
    return row[key]


def _name(row, where):
    name = _required(row, "name", where)
    if not isinstance(name, str) or not NAME_PATTERN.match(name):
        raise InputError("a name is 1 to 40 letters, digits, spaces and _()+/- (no dot), starting with a letter "
                         "or digit", field=f"{where}.name", value=name, fix='e.g. name = "Evaporator"')
    return name


def _header(row, key, where, site):
    name = _required(row, key, where)
    if not isinstance(name, str) or name not in site.headers:
        known = ", ".join(site.headers) or "none (the site file has no [headers])"
        raise InputError(f"header {name!r} is not in the site file", field=f"{where}.{key}", value=name,
                         fix=f"use one of the site's headers: {known}")
    return name


def _quantity(row, key, where, kind, required=False):
    if key not in row:
        if required:
            raise CaseFileError("is required", field=f"{where}.{key}", fix=f"add {key} to {where}")
        return None
    value = parse_quantity(row[key], f"{where}.{key}", kind)
    if kind in ("mass_flow", "power", "temperature_difference") and value < 0.0:
        raise InputError(f"a {kind.replace('_', ' ')} cannot be negative", field=f"{where}.{key}", value=row[key],
                         fix="give zero or a positive value")
    return value


def _pressure(row, key, where, site, required=True):
    if key not in row:
        if required:
            raise CaseFileError("is required", field=f"{where}.{key}", fix=f"add {key} to {where}")
        return None
    raw = row[key]
    if isinstance(raw, str) and raw.strip().startswith("header:"):
        return site.header_pressure(raw.split(":", 1)[1].strip(), f"{where}.{key}")
    return parse_pressure(raw, f"{where}.{key}", site.atmospheric_pressure)


def _fraction(row, key, where, default=None, below_one=False):
    if key not in row:
        return default
    value = row[key]
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError("must be a plain number from 0 to 1", field=f"{where}.{key}", value=value,
                         fix="write it without quotes or units, e.g. 0.05")
    if not 0.0 <= value <= 1.0 or (below_one and value >= 1.0):
        raise InputError("must lie from 0 to 1" + (" (below 1)" if below_one else ""), field=f"{where}.{key}",
                         value=value, limits=(0, 1, ""))
    return float(value)


def _positive(row, key, where):
    if key not in row:
        return None
    value = row[key]
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value) or value <= 0:
        raise InputError("must be a plain number above zero", field=f"{where}.{key}", value=value,
                         fix="write it without quotes or units, e.g. 150")
    return float(value)


def _given(given, address, row, key):
    if key in row:
        raw = row[key]
        given[address] = raw if isinstance(raw, str) else repr(raw)


def read_boiler(row, site, given):
    where = "boiler"
    flow_text = row.get("flow", BALANCING)
    if isinstance(flow_text, str) and flow_text.strip().lower() == BALANCING:
        flow = None
    else:
        flow = _quantity(row, "flow", where, "mass_flow")
    if "blowdown_fraction" in row and ("feedwater_tds" in row or "boiler_water_tds" in row):
        raise InputError("give blowdown_fraction or feedwater_tds with boiler_water_tds, not both",
                         field="boiler.blowdown_fraction", fix="keep one way of stating the blowdown")
    fw, bw = _positive(row, "feedwater_tds", where), _positive(row, "boiler_water_tds", where)
    if (fw is None) != (bw is None):
        raise InputError("the TDS balance needs both feedwater_tds and boiler_water_tds", field="boiler.feedwater_tds",
                         fix="give both, in the same measure (ppm or µS/cm)")
    if fw is not None and fw >= bw:
        raise InputError(f"feedwater dissolved solids {fw:g} are not below the boiler-water limit {bw:g}: no "
                         "blowdown could hold it", field="boiler.feedwater_tds", value=fw,
                         fix="check both figures are in the same measure, feedwater below the boiler-water limit")
    blowdown = _fraction(row, "blowdown_fraction", where, below_one=True)
    if blowdown is None and fw is None:
        raise CaseFileError("the blowdown is required", field="boiler.blowdown_fraction",
                            fix="give blowdown_fraction (of the feedwater) or feedwater_tds and boiler_water_tds")
    if "blowdown_cooler_approach" in row and "blowdown_cooler_effectiveness" in row:
        raise InputError("give blowdown_cooler_approach or blowdown_cooler_effectiveness, not both",
                         field="boiler.blowdown_cooler_effectiveness", fix="keep one way of stating the cooler")
    flash_header = _header(row, "blowdown_flash_header", where, site) if "blowdown_flash_header" in row else None
    for key in KEYS["boiler"]:
        _given(given, f"boiler.{key}", row, key)
    return Boiler(header=_header(row, "header", where, site), pressure=_pressure(row, "pressure", where, site),
                  temperature=_quantity(row, "temperature", where, "temperature"), flow=flow,
                  capacity=_quantity(row, "capacity", where, "mass_flow"),
                  efficiency=_fraction(row, "efficiency", where), blowdown_fraction=blowdown,
                  feedwater_tds=fw, boiler_water_tds=bw, blowdown_flash_header=flash_header,
                  blowdown_cooler_approach=_quantity(row, "blowdown_cooler_approach", where, "temperature_difference"),
                  blowdown_cooler_effectiveness=_fraction(row, "blowdown_cooler_effectiveness", where))


def read_deaerator(row, site, given):
    where = "deaerator"
    pressure = _pressure(row, "pressure", where, site)
    if pressure < site.atmospheric_pressure:
        raise InputError(f"a deaerator at {pressure / 1e5:.4g} bar(a) is below the site atmosphere "
                         f"({site.atmospheric_pressure / 1e5:.4g} bar(a)): air would leak in, not be vented",
                         field="deaerator.pressure", value=row.get("pressure"),
                         fix='give its working pressure, above atmospheric, e.g. "0.2 bar(g)"')
    if "vent_fraction" in row and "vent_of_feedwater" in row:
        raise InputError("give vent_fraction (of the heating steam) or vent_of_feedwater, not both",
                         field="deaerator.vent_of_feedwater", fix="keep one basis for the vent")
    for key in KEYS["deaerator"]:
        _given(given, f"deaerator.{key}", row, key)
    return Deaerator(pressure=pressure, steam_header=_header(row, "steam_header", where, site),
                     vent_fraction=_fraction(row, "vent_fraction", where, 0.0, below_one=True),
                     vent_of_feedwater=_fraction(row, "vent_of_feedwater", where, below_one=True),
                     makeup_temperature=_quantity(row, "makeup_temperature", where, "temperature"))


def _unique(items, section):
    seen = set()
    for i, item in enumerate(items):
        if item.name in seen:
            raise InputError(f"two {section} entries are named {item.name!r}", field=f"{section}[{i}].name",
                             value=item.name, fix="give each its own name")
        seen.add(item.name)


def read_load_cases(rows, given):
    cases = []
    for i, row in enumerate(rows):
        where = f"load_case[{i}]"
        name = _name(row, where)
        text = _required(row, "hours", where)
        hours = parse_amount(text, f"{where}.hours", "h", "'4000 h'") * 3600.0
        if not 0.0 < hours <= 8784 * 3600.0:
            raise InputError("hours a year must be above 0 and at most 8784", field=f"{where}.hours", value=text,
                             limits=(0, 8784, "h"))
        given[f"load_case.{name}.hours"] = text
        cases.append(LoadCase(name=name, hours=hours))
    if not cases:
        raise CaseFileError("a balance needs at least one load case", field="load_case",
                            fix='add [[inputs.load_case]] with name = "winter" and hours = "4000 h"')
    _unique(cases, "load_case")
    total = sum(c.hours for c in cases) / 3600.0
    if total > 8784:
        raise InputError(f"the load cases add up to {total:g} h, more than a year", field="load_case",
                         value=f"{total:g} h", fix="give each load case its share of the year's hours")
    return tuple(cases)


def read_letdowns(rows, site, given, links):
    letdowns = []
    for i, row in enumerate(rows):
        where = f"letdown[{i}]"
        name = _name(row, where)
        if "target_superheat" in row and "target_temperature" in row:
            raise InputError("give target_superheat or target_temperature, not both",
                             field=f"{where}.target_temperature", fix="keep one")
        values = dict(name=name, source=_header(row, "from", where, site), target=_header(row, "to", where, site),
                      target_superheat=_quantity(row, "target_superheat", where, "temperature_difference"),
                      target_temperature=_quantity(row, "target_temperature", where, "temperature"),
                      water_temperature=_quantity(row, "water_temperature", where, "temperature"),
                      water_pressure=_pressure(row, "water_pressure", where, site, required=False),
                      max_flow=_quantity(row, "max_flow", where, "mass_flow"),
                      min_flow=_quantity(row, "min_flow", where, "mass_flow"))
        for key in KEYS["letdown"]:
            _given(given, f"letdown.{name}.{ {'from': 'source', 'to': 'target'}.get(key, key)}", row, key)
        if "record" in row:
            values = links.letdown(values, row, where)
            for key in LETDOWN_COPIED:
                if values.get(key) is not None:
                    given[f"letdown.{name}.{key}"] = f"from linked record {values['link'].record_id} rev " \
                                                     f"{values['link'].revision}"
        letdowns.append(Letdown(**values))
    _unique(letdowns, "letdown")
    return tuple(letdowns)


def _loads(row, where, case_names):
    raw = _required(row, "load", where)
    per_case = raw if isinstance(raw, dict) else {case: raw for case in case_names}
    for case in per_case:
        if case not in case_names:
            raise InputError(f"load case {case!r} is not one of the balance's load cases", field=f"{where}.load.{case}",
                             value=case, fix=f"use one of: {', '.join(case_names)}")
    flows, duties = [], []
    for case in case_names:
        if case not in per_case:
            raise InputError(f"no load given for load case {case!r}", field=f"{where}.load",
                             fix=f'give one, e.g. load = {{ {case} = "1 t/h" }} (or "0 t/h" when idle)')
        text = per_case[case]
        address = f"{where}.load.{case}" if isinstance(raw, dict) else f"{where}.load"
        try:
            value = parse_quantity(text, address, "mass_flow")
            target = flows
        except UnitError:
            try:
                value = parse_quantity(text, address, "power")
            except UnitError:
                raise UnitError("a load is a steam flow or a duty", field=address, value=text,
                                fix='e.g. "2.5 t/h" or "1200 kW"') from None
            target = duties
        if value < 0.0:
            raise InputError("a load cannot be negative", field=address, value=text,
                             fix="give zero or a positive flow or duty")
        target.append((case, value))
    return tuple(flows), tuple(duties)


def _route(row, where):
    """Where the user's condensate goes: one of :data:`~.items.RETURN_ROUTES` (default the vented receiver)."""
    route = row.get("condensate_to", RETURN_ROUTES[0])
    if not isinstance(route, str) or route.strip().lower() not in RETURN_ROUTES:
        raise InputError("is not a place the condensate can go", field=f"{where}.condensate_to", value=route,
                         fix="write one of: " + ", ".join(f'"{r}"' for r in RETURN_ROUTES) + ' ("vented receiver": '
                             'its flash is lost at the site atmosphere; "cooled": cooled below boiling before the '
                             'receiver; "deaerator": returned under pressure into the deaerator)')
    return route.strip().lower()


def read_users(rows, site, given, case_names, links):
    users = []
    for i, row in enumerate(rows):
        where = f"user[{i}]"
        name = _name(row, where)
        values = dict(name=name, header=_header(row, "header", where, site),
                      return_fraction=_fraction(row, "condensate_return", where, 0.0),
                      return_temperature=_quantity(row, "return_temperature", where, "temperature"),
                      condensate_to=_route(row, where))
        if "record" in row:
            values = links.user(values, row, where, case_names)
            for case in case_names:
                given[f"user.{name}.load.{case}"] = f"steam flow of linked record {values['link'].record_id} rev " \
                                                    f"{values['link'].revision}"
            if values.get("steam_pressure") is not None:
                given[f"user.{name}.steam_pressure"] = f"from linked record {values['link'].record_id} rev " \
                                                       f"{values['link'].revision}"
        else:
            values["flows"], values["duties"] = _loads(row, where, case_names)
        raw = row.get("load")
        for case in case_names:
            text = raw.get(case) if isinstance(raw, dict) else raw
            if text is not None:
                given[f"user.{name}.load.{case}"] = str(text)
        _given(given, f"user.{name}.return_fraction", row, "condensate_return")
        _given(given, f"user.{name}.return_temperature", row, "return_temperature")
        _given(given, f"user.{name}.header", row, "header")
        _given(given, f"user.{name}.condensate_to", row, "condensate_to")
        users.append(User(**values))
    _unique(users, "user")
    return tuple(users)


def read_flashes(rows, site, given, users, links):
    flashes = []
    names = {u.name: u for u in users}
    for i, row in enumerate(rows):
        where = f"flash[{i}]"
        name = _name(row, where)
        source = _required(row, "condensate_of", where)
        if source not in names:
            raise InputError(f"user {source!r} is not a user of this balance", field=f"{where}.condensate_of",
                             value=source, fix=f"name one of the users: {', '.join(names) or 'none given'}")
        values = dict(name=name, from_user=source, target=_header(row, "to", where, site))
        if "record" in row:
            values = links.flash(values, row, where, names[source])
            for key in FLASH_COPIED:
                if values.get(key) is not None:
                    given[f"flash.{name}.{key}"] = f"from linked record {values['link'].record_id} rev " \
                                                   f"{values['link'].revision}"
        given[f"flash.{name}.from_user"] = source
        given[f"flash.{name}.target"] = row["to"]
        flashes.append(Flash(**values))
    _unique(flashes, "flash")
    return tuple(flashes)


def read_without(row, names, recovery=False):
    """The names taken out of service in the what-if: items of the balance (``names``), and :data:`RECOVERY`
    (the boiler's blowdown flash and cooler) when the boiler has a blowdown ``recovery``."""
    without = row.get("without", [])
    if isinstance(without, str) or not isinstance(without, list) or not all(isinstance(n, str) for n in without):
        raise InputError("must be a list of item names", field="what_if.without", value=without,
                         fix='e.g. without = ["FL-01"]')
    valid = sorted(names) + ([f'"{RECOVERY}" (the boiler\'s blowdown flash and cooler)'] if recovery else [])
    for name in without:
        if name == RECOVERY and name in names:
            raise InputError(f'"{RECOVERY}" names both an item of this balance and the boiler\'s blowdown recovery',
                             field="what_if.without", value=name,
                             fix=f'rename the item called "{RECOVERY}": the what-if keeps that name for the '
                                 "boiler's blowdown flash and cooler")
        if name == RECOVERY and not recovery:
            raise InputError("the boiler has no blowdown recovery to take out of service", field="what_if.without",
                             value=name, fix="give blowdown_flash_header or a blowdown cooler in [inputs.boiler], or "
                                             f"take \"{RECOVERY}\" out of the list")
        if name not in names and name != RECOVERY:
            raise InputError(f"{name!r} is not a let-down, user, flash vessel or turbine of this balance, nor the "
                             "boiler's blowdown recovery", field="what_if.without", value=name,
                             fix=f"name one of: {', '.join(valid)}")
    if len(set(without)) != len(without):
        raise InputError("names an item twice", field="what_if.without", value=without,
                         fix="give each item once")
    return tuple(without)
