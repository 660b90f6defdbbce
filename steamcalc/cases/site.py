"""Site data and case files (TOML, read with tomllib and never executed).

A case file names its calculation kind, its identity (id, title, revision,
preparer), an optional site file, its inputs and the engineer's own
assumptions. :func:`load_case` reads and checks it; :func:`case_inputs` turns
its ``[inputs]`` into the frozen ``Inputs`` of its kind, resolving headers
(``"header:LP"``) and gauge pressures with the site's atmosphere.
"""

from __future__ import annotations

import math
import re
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from ..errors import CaseFileError, InputError, SteamcalcError, UnitError
from ..units.quantities import (
    STANDARD_ATMOSPHERE, parse_pressure, parse_quantity, standard_atmosphere_pressure,
)

ID_PATTERN = re.compile(r"^[A-Za-z0-9._-]+\Z")  # \Z: "$" would let a trailing newline through


def is_file_name_part(text):
    """True for an id or revision that can stand in a file name: letters, digits, '.', '_', '-',
    not starting with '.', at most MAX_ID characters."""
    return isinstance(text, str) and bool(ID_PATTERN.match(text)) and not text.startswith(".") and len(text) <= MAX_ID
CASE_KEYS = ("kind", "id", "title", "revision", "prepared_by", "site")
SITE_KEYS = ("name", "elevation", "atmospheric_pressure", "operating_hours", "fuel_price",
             "boiler_efficiency", "makeup_water_temperature", "power_price", "display_units",
             "fuel_emission_factor", "ambient_temperature", "fuel_basis", "water_cost")
#: Longest free text (title, names, notes) accepted from a case or site file.
MAX_TEXT = 2000
#: Longest id and revision: with "_rev", the suffixes and the lock's name they stay well inside the 255 bytes a
#: file name may have on common file systems.
MAX_ID, MAX_REVISION = 80, 20
#: Elevations of inhabited places, m (the Dead Sea shore to the highest towns, with a margin).
SITE_ELEVATIONS = (-500.0, 6000.0)
#: Site atmospheric pressure, Pa (absolute): the standard atmosphere over SITE_ELEVATIONS, with
#: 5 % for the weather.
SITE_ATMOSPHERE = (0.45e5, 1.13e5)
#: Make-up water temperature, K: liquid water at the atmosphere.
MAKEUP_WATER_TEMPERATURE = (273.15, 373.15)
#: Ambient (dead-state) temperature, K: the extremes measured on the earth's surface, rounded out.
AMBIENT_TEMPERATURE = (273.15 - 90.0, 273.15 + 60.0)
#: Energy price per MWh, in any currency (a label): not negative; the upper bound only catches a slip.
PRICE_PER_MWH = (0.0, 1.0e7)
#: CO2 per MWh of fuel, kg: pure carbon burnt gives about 400 (44/12 kg CO2 per kg at 32.8 MJ/kg
#: higher heating value, from memory); nothing burnt as fuel gives much more.
EMISSION_FACTOR = (0.0, 500.0)
_PRICE = re.compile(r"^\s*([0-9.]+(?:[eE][+-]?\d+)?)\s*([A-Za-z]{1,5})\s*/\s*(MWh|kWh)\s*$")
_WATER_COST = re.compile(r"^\s*([0-9.]+(?:[eE][+-]?\d+)?)\s*([A-Za-z]{1,5})\s*/\s*(m3|m\^3|m\*\*3|m³|L|l)\s*$")


@dataclass(frozen=True)
class Price:
    """An energy price: amount per MWh in a currency that is only a label."""

    per_mwh: float
    currency: str

    def __str__(self):
        return f"{self.per_mwh:g} {self.currency}/MWh"


@dataclass(frozen=True)
class WaterCost:
    """Cost of make-up water with its treatment: amount per m³ in a currency that is only a label."""

    per_m3: float
    currency: str

    def __str__(self):
        return f"{self.per_m3:g} {self.currency}/m³"


@dataclass(frozen=True)
class Site:
    """Site data shared by a plant's cases. Pressures Pa (absolute), temperatures K."""

    name: str = "unnamed site"
    atmospheric_pressure: float = STANDARD_ATMOSPHERE
    elevation: float | None = None
    operating_hours: float | None = None
    fuel_price: Price | None = None
    boiler_efficiency: float | None = None
    makeup_water_temperature: float | None = None
    power_price: Price | None = None
    display_units: str = "SI"
    headers: dict = field(default_factory=dict)
    header_texts: dict = field(default_factory=dict)
    fuel_emission_factor: float | None = None   # kg CO2 per MWh of fuel
    ambient_temperature: float | None = None    # K; the dead state for exergy
    fuel_basis: str | None = None               # "gross" | "net" calorific value; None: not stated
    water_cost: WaterCost | None = None         # make-up water and treatment, per m³

    def header_pressure(self, name, field_name):
        """Absolute pressure of a named header, Pa."""
        if name not in self.headers:
            known = ", ".join(sorted(self.headers)) or "none (no site file, or it has no [headers])"
            raise InputError(
                f"header '{name}' is not in the site file", field=field_name, value=f"header:{name}",
                fix=f"use one of the site's headers: {known}; or give a pressure such as '2.5 bar(g)'",
            )
        return self.headers[name]

    def to_record(self):
        """The record's ``site`` table, in record units."""
        table = {"name": self.name,
                 "atmospheric_pressure": {"value": self.atmospheric_pressure / 1e5, "unit": "bar"}}
        if self.elevation is not None:
            table["elevation"] = {"value": self.elevation, "unit": "m"}
        if self.operating_hours is not None:
            table["operating_hours"] = {"value": self.operating_hours, "unit": "h"}
        for key in ("fuel_price", "power_price"):
            price = getattr(self, key)
            if price is not None:
                table[key] = {"value": price.per_mwh, "unit": f"{price.currency}/MWh"}
        if self.boiler_efficiency is not None:
            table["boiler_efficiency"] = {"value": self.boiler_efficiency, "unit": ""}
        if self.makeup_water_temperature is not None:
            table["makeup_water_temperature"] = {"value": self.makeup_water_temperature - 273.15,
                                                 "unit": "degC"}
        if self.fuel_emission_factor is not None:
            table["fuel_emission_factor"] = {"value": self.fuel_emission_factor, "unit": "kg/MWh"}
        if self.ambient_temperature is not None:
            table["ambient_temperature"] = {"value": self.ambient_temperature - 273.15, "unit": "degC"}
        if self.fuel_basis is not None:
            table["fuel_basis"] = self.fuel_basis
        if self.water_cost is not None:
            table["water_cost"] = {"value": self.water_cost.per_m3, "unit": f"{self.water_cost.currency}/m**3"}
        table["display_units"] = self.display_units
        table["headers"] = {k: {"value": v / 1e5, "unit": "bar"} for k, v in self.headers.items()}
        return table

    @classmethod
    def from_record(cls, table):
        """Rebuild a Site from a record's ``site`` table."""
        def price(key):
            entry = table.get(key)
            return None if entry is None else Price(entry["value"], entry["unit"].split("/")[0])

        def plain(key):
            entry = table.get(key)
            return None if entry is None else entry["value"]

        makeup = plain("makeup_water_temperature")
        water = table.get("water_cost")
        ambient = plain("ambient_temperature")
        return cls(
            fuel_emission_factor=plain("fuel_emission_factor"),
            fuel_basis=table.get("fuel_basis"),
            water_cost=None if water is None else WaterCost(water["value"], water["unit"].split("/")[0]),
            ambient_temperature=None if ambient is None else ambient + 273.15,
            name=table.get("name", "unnamed site"),
            atmospheric_pressure=table["atmospheric_pressure"]["value"] * 1e5,
            elevation=plain("elevation"), operating_hours=plain("operating_hours"),
            fuel_price=price("fuel_price"), boiler_efficiency=plain("boiler_efficiency"),
            makeup_water_temperature=None if makeup is None else makeup + 273.15,
            power_price=price("power_price"), display_units=table.get("display_units", "SI"),
            headers={k: v["value"] * 1e5 for k, v in table.get("headers", {}).items()},
        )


def _read_toml(path, what):
    from .inputfiles import read_text_file

    path = Path(path)
    text = read_text_file(path, what)
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise CaseFileError(f"not valid TOML: {exc}", source=path,
                            fix="correct the TOML syntax at the line named") from None
    except RecursionError:
        raise CaseFileError("not valid TOML: nested too deeply", source=path) from None


def _table(value, where):
    # A TOML key where a table belongs ("site = 3" instead of "[site]") is named, not a crash.
    if not isinstance(value, dict):
        raise CaseFileError(f"[{where}] must be a table", field=where, value=_shown(value),
                            fix=f"write it as a [{where}] section with its keys below it")
    return value


def _text(value, field_name, example):
    if not isinstance(value, str):
        raise CaseFileError("must be text in quotes", field=field_name, value=_shown(value),
                            fix=f"e.g. {field_name} = {example}")
    if len(value) > MAX_TEXT:
        raise CaseFileError(f"is {len(value)} characters long; at most {MAX_TEXT}", field=field_name,
                            value=value[:40] + "...")
    return value


def _shown(value):
    # The value as the message shows it: tables and long lists cut short.
    text = repr(value)
    return value if len(text) <= 60 else text[:57] + "..."


def _unknown_keys(table, allowed, where, source):
    for key in table:
        if key not in allowed:
            raise CaseFileError(
                f"unknown key '{key}' in [{where}]", field=key, source=source,
                fix=f"the keys [{where}] accepts are: {', '.join(allowed)}",
            )


def load_site(path):
    """Read a site file.

    Parameters
    ----------
    path : str or Path
        The site TOML file (design §3.3).

    Returns
    -------
    Site
    """
    data = _read_toml(path, "site file")
    try:
        _unknown_keys(data, ("site", "headers"), "top level", path)
        table = _table(data.get("site", {}), "site")
        _unknown_keys(table, SITE_KEYS, "site", path)
        if "elevation" in table and "atmospheric_pressure" in table:
            raise CaseFileError("give elevation or atmospheric_pressure, not both", field="elevation")
        for key in ("name", "display_units"):
            if key in table:
                _text(table[key], key, '"SI"' if key == "display_units" else '"North Plant"')
        elevation = None
        atmosphere = STANDARD_ATMOSPHERE
        if "elevation" in table:
            elevation = _within(parse_quantity(table["elevation"], "elevation", "length"), "elevation",
                                table["elevation"], SITE_ELEVATIONS, "m", "elevations of inhabited places")
            atmosphere = standard_atmosphere_pressure(elevation)
        if "atmospheric_pressure" in table:
            atmosphere = _site_atmosphere(table["atmospheric_pressure"])
        hours = None
        if "operating_hours" in table:
            hours = _parse_hours(table["operating_hours"])
        efficiency = table.get("boiler_efficiency")
        if efficiency is not None:
            _fraction(efficiency, "boiler_efficiency", exclusive_zero=True)
        makeup = table.get("makeup_water_temperature")
        if makeup is not None:
            makeup = _site_temperature(makeup, "makeup_water_temperature", MAKEUP_WATER_TEMPERATURE,
                                       "liquid water at the atmosphere")
        ambient = table.get("ambient_temperature")
        if ambient is not None:
            ambient = _site_temperature(ambient, "ambient_temperature", AMBIENT_TEMPERATURE,
                                        "temperatures measured outdoors on earth")
        units = table.get("display_units", "SI")
        if units not in ("SI", "US"):
            raise CaseFileError("display_units must be 'SI' or 'US'", field="display_units", value=units)
        headers, header_texts = {}, {}
        for name, text in _table(data.get("headers", {}), "headers").items():
            if not ID_PATTERN.match(name):
                raise CaseFileError("a header name may hold only letters, digits, '.', '_' and '-'",
                                    field=f"headers.{name}", fix='e.g. LP = "2.5 bar(g)"')
            headers[name] = parse_pressure(text, f"headers.{name}", atmosphere)
            header_texts[name] = text
        return Site(
            name=str(table.get("name", Path(path).parent.name)), atmospheric_pressure=atmosphere,
            elevation=elevation, operating_hours=hours,
            fuel_price=_parse_price(table["fuel_price"], "fuel_price") if "fuel_price" in table else None,
            boiler_efficiency=efficiency,
            makeup_water_temperature=makeup,
            power_price=_parse_price(table["power_price"], "power_price") if "power_price" in table else None,
            display_units=units, headers=headers, header_texts=header_texts,
            fuel_emission_factor=_parse_emission(table["fuel_emission_factor"])
            if "fuel_emission_factor" in table else None,
            ambient_temperature=ambient,
            fuel_basis=_parse_fuel_basis(table["fuel_basis"]) if "fuel_basis" in table else None,
            water_cost=_parse_water_cost(table["water_cost"]) if "water_cost" in table else None,
        )
    except SteamcalcError as exc:
        raise exc.with_source(path)


def _within(value, field_name, given, limits, unit, what, to_unit=lambda v: v):
    low, high = limits
    if not low <= value <= high:
        raise InputError(f"is outside the range of {what}", field=field_name, value=_shown(given),
                         limits=(to_unit(low), to_unit(high), unit))
    return value


def _site_atmosphere(text):
    if isinstance(text, str) and re.search(r"(\(\s*[gG]\s*\)|[0-9\s](bar|psi|mbar)[gG])\s*$", text.strip()):
        raise UnitError("the atmospheric pressure is absolute by definition; a gauge value would shift "
                        "every gauge pressure of the site", field="atmospheric_pressure", value=text,
                        fix="write it as an absolute pressure, e.g. '0.992 bar(a)'")
    atmosphere = parse_pressure(text, "atmospheric_pressure")
    return _within(atmosphere, "atmospheric_pressure", text, SITE_ATMOSPHERE, "bar(a)",
                   "the standard atmosphere from -500 m to 6000 m (with 5 % for the weather)",
                   to_unit=lambda v: v / 1e5)


def _site_temperature(text, field_name, limits, what):
    value = parse_quantity(text, field_name, "temperature")
    return _within(value, field_name, text, limits, "degC", what, to_unit=lambda v: v - 273.15)


def _parse_hours(text):
    from ..units.quantities import parse_amount
    hours = parse_amount(text, "operating_hours", "h", "'6000 h'")
    if not 0 < hours <= 8784:
        raise InputError("operating hours per year must be above 0 and at most 8784",
                         field="operating_hours", value=text, limits=(0, 8784, "h"))
    return float(hours)


def _parse_emission(text):
    from ..units.quantities import parse_amount
    factor = parse_amount(text, "fuel_emission_factor", "kg/MWh", "'0.202 kg/kWh'")
    return _within(factor, "fuel_emission_factor", text, EMISSION_FACTOR, "kg/MWh",
                   "CO2 emission factors of fuels")


def _parse_price(text, field_name):
    match = _PRICE.match(text) if isinstance(text, str) and len(text) <= 100 else None
    if match is None:
        raise UnitError("a price is an amount, a currency and an energy unit", field=field_name,
                        value=_shown(text), fix="e.g. '40 EUR/MWh' or '0.04 EUR/kWh'")
    amount = float(match.group(1)) * (1000.0 if match.group(3) == "kWh" else 1.0)
    _within(amount, field_name, text, PRICE_PER_MWH, "per MWh", "energy prices")
    return Price(amount, match.group(2))


def _parse_fuel_basis(value):
    if value not in ("gross", "net"):
        raise InputError("the calorific-value basis of the fuel price, boiler efficiency and emission factor "
                         "must be \"gross\" or \"net\"", field="fuel_basis", value=value,
                         fix='write fuel_basis = "gross" (GCV, higher heating value) or "net" (NCV, lower '
                             'heating value), the basis all three figures are quoted on')
    return value


def _parse_water_cost(text):
    match = _WATER_COST.match(text) if isinstance(text, str) else None
    if match is None:
        raise UnitError("a water cost is an amount and a currency per volume of make-up water",
                        field="water_cost", value=text, fix="e.g. '2.5 EUR/m3' (make-up water and its treatment)")
    amount = float(match.group(1)) * (1000.0 if match.group(3) in ("L", "l") else 1.0)
    return WaterCost(amount, match.group(2))


def _fraction(value, field_name, exclusive_zero=False):
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError("must be a plain number from 0 to 1", field=field_name, value=_shown(value),
                         fix="write it without quotes or units, e.g. 0.98")
    if not (0.0 <= value <= 1.0) or (exclusive_zero and value == 0.0):
        raise InputError("must lie from 0 to 1", field=field_name, value=value, limits=(0, 1, ""))
    return float(value)


@dataclass(frozen=True)
class Case:
    """A case file as read: identity, the raw ``[inputs]`` table and the engineer's notes."""

    path: Path
    kind: str
    id: str
    title: str
    revision: str
    prepared_by: str
    site_path: Path | None
    inputs: dict
    notes: tuple = ()
    uncertainty: dict = field(default_factory=dict)


def load_case(path):
    """Read and check a case file's structure (not yet its values).

    Parameters
    ----------
    path : str or Path
        The case TOML file (design §3.2).

    Returns
    -------
    Case
    """
    from ..calcs import get_calculation, kinds

    path = Path(path)
    data = _read_toml(path, "case file")
    try:
        _unknown_keys(data, ("case", "inputs", "assumptions", "uncertainty"), "top level", path)
        meta = data.get("case")
        if meta is None:
            raise CaseFileError("the file has no [case] table", fix="add [case] with kind and id")
        _table(meta, "case")
        _unknown_keys(meta, CASE_KEYS, "case", path)
        kind = meta.get("kind")
        if not isinstance(kind, str) or kind not in kinds():
            raise CaseFileError(f"kind {_shown(kind)!r} is not a calculation steamcalc knows", field="kind",
                                fix=f"use one of: {', '.join(kinds())}")
        case_id = meta.get("id")
        if isinstance(case_id, str) and len(case_id) > MAX_ID:
            # The id names the record's files and its lock: past this it would fail at the file system instead.
            raise CaseFileError(f"the id is {len(case_id)} characters long; at most {MAX_ID}", field="id",
                                value=case_id[:40] + "...", fix="e.g. id = \"LD-01\"")
        if not is_file_name_part(case_id):
            raise CaseFileError(
                "the id becomes a file name, so it may hold only letters, digits, '.', '_' and '-', and may "
                "not start with '.'", field="id", value=case_id, fix="e.g. id = \"LD-01\"")
        revision = meta.get("revision", "A")
        if isinstance(revision, int) and not isinstance(revision, bool):
            revision = str(revision)  # revision = 2 is as clear as revision = "2"
        if isinstance(revision, str) and len(revision) > MAX_REVISION:
            raise CaseFileError(f"the revision is {len(revision)} characters long; at most {MAX_REVISION}",
                                field="revision", value=revision[:40] + "...", fix='e.g. revision = "B"')
        if not is_file_name_part(revision):
            raise CaseFileError("the revision is text of letters, digits, '.', '_' and '-'",
                                field="revision", value=_shown(revision), fix='e.g. revision = "B"')
        for key, example in (("title", '"HP to LP let-down"'), ("prepared_by", '"A. Engineer"'),
                             ("site", '"../site.toml"')):
            if key in meta:
                _text(meta[key], key, example)
        if "prepared_by" in meta and not meta["prepared_by"].strip():
            # A record is issued under its preparer's name: a blank one is no name.
            raise CaseFileError("the preparer's name is empty", field="prepared_by", value=meta["prepared_by"],
                                fix='give who prepared the calculation, e.g. prepared_by = "A. Engineer"')
        assumptions = _table(data.get("assumptions", {}), "assumptions")
        _unknown_keys(assumptions, ("notes",), "assumptions", path)
        notes = assumptions.get("notes", [])
        if not isinstance(notes, list) or not all(isinstance(n, str) for n in notes):
            raise CaseFileError("notes must be a list of strings", field="assumptions.notes")
        for number, note in enumerate(notes):
            _text(note, f"assumptions.notes[{number}]", '["Valve body by others."]')
        inputs = data.get("inputs")
        if not isinstance(inputs, dict) or not inputs:
            raise CaseFileError("the file has no [inputs] table", fix="add [inputs] with the case's inputs")
        calc = get_calculation(kind)
        check_input_keys(calc.Inputs, inputs)
        site_path = meta.get("site")
        return Case(
            path=path, kind=kind, id=case_id, title=str(meta.get("title", case_id)), revision=revision,
            prepared_by=str(meta.get("prepared_by", "")),
            site_path=(path.parent / site_path) if site_path else None,
            inputs=inputs, notes=tuple(notes), uncertainty=_uncertainty_table(data),
        )
    except SteamcalcError as exc:
        raise exc.with_source(path)


def _uncertainty_table(data):
    table = data.get("uncertainty", {})
    if not isinstance(table, dict):
        raise CaseFileError("[uncertainty] must be a table of input = tolerance", field="uncertainty")
    return table


def _sections(inputs_class):
    """Case-file keys by section (a field's key may differ from its name: ``field_key``)."""
    from ..calcs.base import field_key, input_fields
    sections = {}
    for f in input_fields(inputs_class):
        sections.setdefault(f.metadata["section"], []).append(field_key(f))
    return sections


def _field_names(inputs_class):
    """(section, case-file key) -> field name."""
    from ..calcs.base import field_key, input_fields
    return {(f.metadata["section"], field_key(f)): f.name for f in input_fields(inputs_class)}


def check_input_keys(inputs_class, table):
    """Refuse any key of ``[inputs]`` (or its sub-tables) that the kind does not accept."""
    if hasattr(inputs_class, "check_case_table"):   # a kind of item lists checks its own tables
        return inputs_class.check_case_table(table)
    sections = _sections(inputs_class)
    top = sections.get(None, [])
    subtables = [s for s in sections if s is not None]
    for key, value in table.items():
        if key in subtables:
            if not isinstance(value, dict):
                raise CaseFileError(f"'{key}' must be a table [inputs.{key}]", field=key)
            for sub in value:
                if sub not in sections[key]:
                    raise CaseFileError(
                        f"unknown key '{sub}' in [inputs.{key}]", field=f"{key}.{sub}",
                        fix=f"the keys [inputs.{key}] accepts are: {', '.join(sections[key])}")
        elif key not in top:
            raise CaseFileError(
                f"unknown key '{key}' in [inputs]", field=key,
                fix=f"the keys [inputs] accepts are: {', '.join(top + [f'[{s}]' for s in subtables])}")


def flatten_inputs(inputs_class, table):
    """The raw ``[inputs]`` table as one flat mapping of field name to the user's value."""
    check_input_keys(inputs_class, table)
    if hasattr(inputs_class, "from_case_table"):   # a kind of item lists keeps its tables as they are
        return dict(table)
    sections = _sections(inputs_class)
    names = _field_names(inputs_class)
    flat = {}
    for key, value in table.items():
        if key in sections and key is not None and isinstance(value, dict):
            flat.update({names[(key, sub)]: v for sub, v in value.items()})
        else:
            flat[key] = value
    return flat


def parse_inputs(inputs_class, flat, site, case_path=None, read_record=None):
    """Parse a flat mapping of the user's values into an Inputs object.

    A kind whose inputs are lists of items (the site balance) parses its own tables
    (``from_case_table``); ``case_path`` is the case file, where it finds the records it links, and
    ``read_record`` reads one (:func:`steamcalc.records.record.read_intact_record`, from the layer above).

    Returns
    -------
    tuple
        ``(inputs, given)``: the frozen Inputs and the user's text for each field.
    """
    from ..calcs.base import field_path, input_fields

    if hasattr(inputs_class, "from_case_table"):
        return inputs_class.from_case_table(flat, site, case_path, read_record)
    values, given = {}, {}
    for f in input_fields(inputs_class):
        if f.name not in flat:
            continue
        raw = flat[f.name]
        # Errors name the field by its case-file address ("valve.fl", "relief.inlet_size").
        where = field_path(f)
        kind = f.metadata["kind"]
        given[f.name] = raw if isinstance(raw, str) else _number_text(raw)
        if kind == "pressure":
            values[f.name] = _pressure_or_header(raw, where, site)
            if isinstance(raw, str) and raw.strip().startswith("header:"):
                name = raw.split(":", 1)[1].strip()
                if name in site.header_texts:
                    given[f.name] = f"header:{name} = {site.header_texts[name]}"
        elif kind == "fraction":
            values[f.name] = _fraction(raw, where)
        elif kind == "number":
            # A sum of loss coefficients may be 0 (no fittings), as the Inputs' own checks and their range say.
            values[f.name] = _positive_number(raw, where, zero=f.name.endswith("fittings_k"))
        elif kind == "flag":
            values[f.name] = _flag(raw, where)
        elif kind in ("nominal_size", "text"):
            if isinstance(raw, (int, float)) and not isinstance(raw, bool) and kind == "text":
                raw = f"{raw:g}"
            if not isinstance(raw, str):
                raise InputError("must be text" + (", such as 'DN80' or '3 in'" if kind == "nominal_size" else ""),
                                 field=where, value=raw,
                                 fix=(f'write it in quotes, e.g. {where.rsplit(".", 1)[-1]} = '
                                      f'"{f.metadata.get("example") or ("DN80" if kind == "nominal_size" else "...")}"'))
            values[f.name] = raw.strip()
        elif kind == "rows":
            from ..units.rows import parse_rows, rows_given
            values[f.name] = parse_rows(raw, where, f.metadata["columns"])
            given[f.name] = rows_given(raw)
        elif kind == "pressure_list":
            if isinstance(raw, str) or not isinstance(raw, (list, tuple)) or not raw:
                raise InputError("must be a list of pressures", field=where, value=raw,
                                 fix='e.g. ["8 bar(g)", "2.5 bar(g)"]')
            values[f.name] = tuple(_pressure_or_header(item, f"{where}[{i}]", site)
                                   for i, item in enumerate(raw))
            given[f.name] = ", ".join(str(item) for item in raw)
        else:
            values[f.name] = parse_quantity(raw, where, kind)
    if hasattr(inputs_class, "linked_values"):   # inputs taken from a linked issued record (a main's supply)
        values, given = inputs_class.linked_values(values, given, site, case_path, read_record)
    return inputs_class(**values), given


def _number_text(raw):
    # The same text whether a number came from TOML (50) or a form box ("50" read as 50.0).
    if isinstance(raw, float) and raw.is_integer():
        return str(int(raw))
    return repr(raw)


def _pressure_or_header(raw, field_name, site):
    if isinstance(raw, str) and raw.strip().startswith("header:"):
        return site.header_pressure(raw.split(":", 1)[1].strip(), field_name)
    return parse_pressure(raw, field_name, site.atmospheric_pressure)


def _positive_number(value, field_name, zero=False):
    """A plain finite number above zero (``zero``: 0 or more)."""
    wanted = "0 or more" if zero else "above zero"
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(f"must be a plain, finite number {wanted}", field=field_name, value=_shown(value),
                         fix="write it without quotes or units")
    if value < 0 or (value == 0 and not zero):   # a number, but not one this input takes: another number, or none
        raise InputError(f"must be a plain, finite number {wanted}", field=field_name, value=_shown(value),
                         fix=f"give a number {wanted}, or leave the key out where the input is optional")
    return float(value)


def _flag(value, field_name):
    if isinstance(value, bool):
        return value
    if isinstance(value, str) and value.strip().lower() in ("true", "false", "yes", "no"):
        return value.strip().lower() in ("true", "yes")
    raise InputError("must be true or false", field=field_name, value=value, fix="write true or false")


def case_inputs(case, site, read_record=None):
    """Inputs object and given texts of a loaded case, with its site (``read_record``: see :func:`parse_inputs`)."""
    from ..calcs import get_calculation

    calc = get_calculation(case.kind)
    try:
        return parse_inputs(calc.Inputs, flatten_inputs(calc.Inputs, case.inputs), site, case.path, read_record)
    except SteamcalcError as exc:
        raise exc.with_source(case.path)


def case_site(case, override=None):
    """The Site a case runs against: the override, else the case's own site file, else defaults."""
    if override is not None:
        return load_site(override)
    if case.site_path is not None:
        return load_site(case.site_path)
    return Site()
