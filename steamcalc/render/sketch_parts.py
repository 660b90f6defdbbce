"""The parts every process sketch is drawn with: a reading of the record, a numbered point, pipes, boxes,
valves, tags and labels (SVG text, escaped). Every number is read from the record as the report shows it."""

from __future__ import annotations

from dataclasses import dataclass, field

from .display import convert, format_number, pressure_basis
from .svg_text import _esc
from ..units.formatting import unit_label as format_unit

INK = "#1d2327"
STEAM = "#2b6a99"
WATER = "#2f6b3a"
WIDTH = 760


@dataclass(frozen=True)
class Reading:
    """One number on the sketch: where it comes from in the record and how it reads."""

    section: str          # "results" or "inputs"
    key: str
    text: str             # e.g. "16.992 bar(a) · 16 bar(g)", "230 °C", "4500 kg/h"


@dataclass(frozen=True)
class Point:
    """A numbered state point: its name and readings (pressure, temperature, flow as known)."""

    number: str
    name: str
    readings: tuple = field(default_factory=tuple)


def entry_of(record, section, key):
    entry = record.get(section, {}).get(key)
    if not isinstance(entry, dict) or not isinstance(entry.get("value"), (int, float)) \
            or isinstance(entry.get("value"), bool):
        return None
    return entry


def _number(entry):
    """The number as the report shows it (display_record's figures), else formatted for its unit."""
    return entry.get("shown") or format_number(entry["value"], entry.get("unit", ""))


def _unit(shown, section, key, entry):
    return entry.get("shown_unit") or format_unit(entry.get("unit", ""), pressure_basis(shown, section, key))


def reading_of(shown, section, key):
    """A non-pressure reading, or None when the record does not hold it."""
    entry = entry_of(shown, section, key)
    if entry is None:
        return None
    return Reading(section, key, f"{_number(entry)} {_unit(shown, section, key, entry)}".strip())


def pressure_of(shown, raw, section, key):
    """An absolute pressure with its gauge value beside it: '16.992 bar(a) · 16 bar(g)'."""
    entry = entry_of(shown, section, key)
    raw_entry = entry_of(raw, section, key)
    if entry is None or raw_entry is None:
        return None
    absolute = f"{_number(entry)} {_unit(shown, section, key, entry)}"
    atmosphere = raw.get("site", {}).get("atmospheric_pressure", {}).get("value")
    if raw_entry.get("unit") != "bar" or not isinstance(atmosphere, (int, float)):
        return Reading(section, key, absolute)
    system = raw.get("site", {}).get("display_units", "SI")
    gauge, unit = convert(raw_entry["value"] - atmosphere, "bar", system)
    gauge_unit = "psig" if unit == "psi" else f"{unit}(g)"
    return Reading(section, key, f"{absolute} · {format_number(round(gauge, 6), unit, trim=True)} {gauge_unit}")


def suffixed(reading, note):
    return None if reading is None else Reading(reading.section, reading.key, f"{reading.text} ({note})")


def point_of(number, name, *readings):
    return Point(number, name, tuple(r for r in readings if r is not None))


def header_name(raw, key, fallback):
    given = raw.get("inputs", {}).get(key, {}).get("given", "")
    if isinstance(given, str) and given.startswith("header:"):
        return f"{given.split(':', 1)[1].split('=')[0].strip()} header"
    return fallback


def escaped(text):
    return _esc(text)   # html.escape(str(text), quote=True), sparing the texts with nothing to escape


def pipe(points, colour=STEAM, width=3):
    """A pipe along the given points, with an arrowhead at its end."""
    path = " ".join(f"{x},{y}" for x, y in points)
    (x0, y0), (x1, y1) = points[-2], points[-1]
    if x1 != x0:
        s = 1 if x1 > x0 else -1
        head = f"{x1},{y1} {x1 - 9 * s},{y1 - 5} {x1 - 9 * s},{y1 + 5}"
    else:
        s = 1 if y1 > y0 else -1
        head = f"{x1},{y1} {x1 - 5},{y1 - 9 * s} {x1 + 5},{y1 - 9 * s}"
    return [f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="{width}"/>',
            f'<polygon points="{head}" fill="{colour}"/>']


def box(x, y, w, h, label, sub=""):
    out = [f'<rect x="{x}" y="{y}" width="{w}" height="{h}" rx="6" fill="#f4f6f7" stroke="{INK}" stroke-width="1.5"/>',
           f'<text x="{x + w / 2:g}" y="{y + h / 2 + (0 if sub else 4):g}" text-anchor="middle" font-weight="bold">'
           f"{escaped(label)}</text>"]
    if sub:
        out.append(f'<text x="{x + w / 2:g}" y="{y + h / 2 + 15:g}" text-anchor="middle" font-size="10">{escaped(sub)}</text>')
    return out


def valve(x, y, label):
    """A control valve: two triangles point to point, an actuator stem and its name below."""
    return [f'<polygon points="{x - 16},{y - 11} {x + 16},{y + 11} {x + 16},{y - 11} {x - 16},{y + 11}" '
            f'fill="#ffffff" stroke="{INK}" stroke-width="1.5"/>',
            f'<line x1="{x}" y1="{y}" x2="{x}" y2="{y - 22}" stroke="{INK}" stroke-width="1.5"/>',
            f'<rect x="{x - 10}" y="{y - 32}" width="20" height="10" fill="#ffffff" stroke="{INK}" stroke-width="1.5"/>',
            f'<text x="{x}" y="{y + 27}" text-anchor="middle" font-size="10">{escaped(label)}</text>']


def tag(x, y, number):
    return [f'<circle cx="{x}" cy="{y}" r="9" fill="{INK}"/>',
            f'<text x="{x}" y="{y + 4}" text-anchor="middle" fill="#ffffff" font-size="10" font-weight="bold">'
            f"{escaped(number)}</text>"]


def label(x, y, point, anchor="start"):
    """A point's tag, name and readings, one per line, from (x, y) downwards."""
    tag_x = x + 9 if anchor == "start" else x - 9
    text_x = x + 23 if anchor == "start" else x - 23
    out = tag(tag_x, y - 4, point.number)
    out.append(f'<text x="{text_x}" y="{y}" text-anchor="{anchor}" font-weight="bold">{escaped(point.name)}</text>')
    for line, reading in enumerate(point.readings, start=1):
        out.append(f'<text x="{text_x}" y="{y + 15 * line}" text-anchor="{anchor}" class="reading" '
                   f'data-key="{escaped(reading.section)}.{escaped(reading.key)}">{escaped(reading.text)}</text>')
    return out


__all__ = ["INK", "STEAM", "WATER", "WIDTH", "Reading", "Point", "reading_of", "pressure_of", "point_of",
           "header_name", "escaped", "pipe", "box", "valve", "tag", "label", "entry_of", "suffixed"]
