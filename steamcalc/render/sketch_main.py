"""The process sketch of a steam main: header → segments (a riser drawn as a step) → user, the drip legs
with their traps below the main, the heater's trap, and the return line to the receiver.

The drawing carries numbered tags only; each tag's name and readings (pressures, flows, velocities, the
traps' capacities and differentials) are listed below it, read from the record as the report shows them.
The segments' sizes, lengths and rises are read from the record's own ``segments`` input (its rows in record
units); where they cannot be read the segments are drawn alike. Nothing is computed here.
"""

from __future__ import annotations

import tomllib

from .display import record_system, us_text
from .sketch_parts import INK, STEAM, WATER, box, entry_of, header_name, label, pipe, point_of, pressure_of
from .sketch_parts import reading_of, suffixed, tag

#: The main's drawn span (after the supply box, before the user box), the base level, a riser's step (px).
MAIN_START, MAIN_END, LEVEL, STEP, MAX_STEPS = 110, 610, 130, 24, 2
TRAP_Y, RETURN_Y, LEGEND_Y, COLUMN = 198, 240, 300, 187


def _numbered(results, prefix, suffix):
    """The numbers n of results ``<prefix><n><suffix>``, in order (segment_1_velocity, drip_2_position)."""
    found = []
    for key in results:
        middle = key[len(prefix):-len(suffix)] if key.startswith(prefix) and key.endswith(suffix) else ""
        if middle.isdigit():
            found.append(int(middle))
    return sorted(found)


def _segment_rows(raw, count):
    """(size, length m, rise m) of each segment from the record's rows, or None for each when unreadable."""
    value = (raw.get("inputs", {}).get("segments") or {}).get("value")
    try:
        rows = tomllib.loads(f"rows = {value}")["rows"]
        out = []
        for row in rows:
            length = float(str(row["length"]).split()[0])
            rise = float(str(row.get("rise", "0 m")).split()[0])
            out.append((str(row.get("size", "")), length, rise))
        if len(out) == count and all(length > 0 for _, length, _ in out):
            return out
    except (tomllib.TOMLDecodeError, KeyError, TypeError, ValueError, IndexError):
        pass
    return [None] * count


def _metres(value):
    return f"{value:g} m"


def steam_main_points(shown, raw):
    """Numbered points of a steam main: supply, each segment, the user, each drip trap, the heater trap, the return."""
    results = raw.get("results", {})
    segments = _numbered(results, "segment_", "_velocity")
    rows = _segment_rows(raw, len(segments))
    in_units = us_text if record_system(raw) == "US" else str   # sizes and lengths in names: NPS and ft in US
    link = (raw.get("inputs", {}).get("supply_link_record_id") or {}).get("value")
    source = f"from {link} outlet" if link else f"from {header_name(raw, 'supply_pressure', 'the supply')}"
    points = [point_of("1", source, pressure_of(shown, raw, "results", "supply_pressure"),
                       reading_of(shown, "results", "supply_temperature"), reading_of(shown, "inputs", "steam_flow"))]
    for n, row in zip(segments, rows):
        name = f"segment {n}"
        if row is not None:   # its size, length and rise, as the case gave them
            size, length, rise = row
            name = in_units(f"{size}, {_metres(length)}" + (f", rises {_metres(rise)}" if rise > 0 else
                                                            f", falls {_metres(-rise)}" if rise < 0 else ""))
        points.append(point_of(f"S{n}", name, suffixed(reading_of(shown, "results", f"segment_{n}_velocity"), "steam"),
                               pressure_of(shown, raw, "results", f"segment_{n}_outlet_pressure"),
                               reading_of(shown, "results", f"segment_{n}_heat_loss")))
    points.append(point_of("2", "at the user", pressure_of(shown, raw, "results", "main_outlet_pressure"),
                           reading_of(shown, "results", "main_outlet_temperature"),
                           suffixed(reading_of(shown, "results", "main_outlet_dryness"), "dryness")))
    for n in _numbered(results, "drip_", "_position"):
        points.append(point_of(f"D{n}", f"drip leg {n} and its trap",
                               suffixed(reading_of(shown, "results", f"drip_{n}_position"), "from the header"),
                               suffixed(reading_of(shown, "results", f"drip_{n}_trap_capacity"), "trap capacity"),
                               reading_of(shown, "results", f"drip_{n}_trap_differential")))
    if entry_of(raw, "results", "heater_trap_capacity") is not None:
        points.append(point_of("H", "heater trap", reading_of(shown, "inputs", "heater_condensate_flow"),
                               suffixed(reading_of(shown, "results", "heater_trap_capacity"), "trap capacity"),
                               reading_of(shown, "results", "heater_trap_differential")))
    if entry_of(raw, "results", "return_flow") is not None:
        size = (raw.get("inputs", {}).get("return_size") or {}).get("value")
        points.append(point_of("R", in_units(f"return line{' ' + size if isinstance(size, str) else ''} to the receiver"),
                               pressure_of(shown, raw, "inputs", "receiver_pressure"),
                               reading_of(shown, "results", "return_flow"),
                               suffixed(reading_of(shown, "results", "return_flash_fraction"), "flashes"),
                               suffixed(reading_of(shown, "results", "return_velocity"), "two-phase")))
    return points


def _spans(rows):
    """Each segment's drawn (x start, x end, level before, level after): lengths shared out over a floor width."""
    count = len(rows)
    lengths = [row[1] if row else 1.0 for row in rows]
    width = MAIN_END - MAIN_START
    floor = min(70.0, width / count)
    total = sum(lengths)
    spans, x, steps = [], float(MAIN_START), 0
    for row, length in zip(rows, lengths):
        w = floor + (width - floor * count) * length / total
        before = LEVEL - STEP * steps
        rise = row[2] if row else 0.0
        if rise > 0 and steps < MAX_STEPS:
            steps += 1
        elif rise < 0 and steps > -MAX_STEPS:
            steps -= 1
        spans.append((x, x + w, before, LEVEL - STEP * steps))
        x += w
    return spans


def _drip_x(position, rows, spans):
    """Where a drip at ``position`` m from the header sits on the drawing, and the main's level there."""
    start = 0.0
    for row, (x0, x1, before, after) in zip(rows, spans):
        length = row[1] if row else None
        if length is None:
            break
        if position <= start + 1e-9:
            return max(x0, MAIN_START + 14), before
        if position <= start + length + 1e-9:
            return min(x0 + (x1 - x0) * (position - start) / length, MAIN_END - 14), after
        start += length
    return MAIN_END - 14, spans[-1][3] if spans else LEVEL


def _trap(x, y):
    return [f'<circle cx="{x:g}" cy="{y}" r="11" fill="#ffffff" stroke="{INK}" stroke-width="1.5"/>',
            f'<text x="{x:g}" y="{y + 4}" text-anchor="middle" font-weight="bold" font-size="10">T</text>']


def draw_steam_main(points, raw):
    """The SVG elements of a steam main's sketch and its height."""
    by = {p.number: p for p in points}
    results = raw.get("results", {})
    segments = _numbered(results, "segment_", "_velocity")
    rows = _segment_rows(raw, len(segments))
    spans = _spans(rows) if segments else []
    returned = "R" in by
    out = box(10, LEVEL - 25, MAIN_START - 10, 50, by["1"].name.replace("from ", ""))
    out += tag(20, LEVEL - 38, "1")
    for n, (x0, x1, before, after) in zip(segments, spans):
        if after != before:   # a riser (or a fall) drawn as a step at the segment's start
            out += [f'<line x1="{x0:g}" y1="{before}" x2="{x0:g}" y2="{after}" stroke="{STEAM}" stroke-width="3"/>']
        out += [f'<line x1="{x0:g}" y1="{after}" x2="{x1:g}" y2="{after}" stroke="{STEAM}" stroke-width="3"/>',
                f'<line x1="{x1:g}" y1="{after - 5}" x2="{x1:g}" y2="{after + 5}" stroke="{INK}" stroke-width="1"/>']
        out += tag((x0 + x1) / 2, after - 16, f"S{n}")
    end_level = spans[-1][3] if spans else LEVEL
    out += pipe([(MAIN_END - 12, end_level), (MAIN_END, end_level)])
    heater = "H" in by
    out += box(MAIN_END, end_level - 25, 140, 50, "user", "heater" if heater else "")
    out += tag(MAIN_END + 128, end_level - 38, "2")
    for n in _numbered(results, "drip_", "_position"):
        position = (results.get(f"drip_{n}_position") or {}).get("value")
        x, level = _drip_x(position if isinstance(position, (int, float)) else 0.0, rows, spans)
        out += [f'<rect x="{x - 5:g}" y="{level}" width="10" height="{TRAP_Y - 30 - level}" fill="#dfe9f1" '
                f'stroke="{INK}" stroke-width="1"/>',
                f'<line x1="{x:g}" y1="{TRAP_Y - 30}" x2="{x:g}" y2="{TRAP_Y - 11}" stroke="{WATER}" stroke-width="2"/>']
        out += _trap(x, TRAP_Y) + tag(x - 22, TRAP_Y, f"D{n}")
        out += pipe([(x, TRAP_Y + 11), (x, RETURN_Y if returned else TRAP_Y + 34)], WATER, 2)
    if heater:
        x = MAIN_END + 70
        out += pipe([(x, end_level + 25), (x, TRAP_Y - 11)], WATER, 2) + _trap(x, TRAP_Y) + tag(x + 22, TRAP_Y, "H")
        out += [f'<line x1="{x}" y1="{TRAP_Y + 11}" x2="{x}" y2="{RETURN_Y}" stroke="{WATER}" stroke-width="2"/>']
    if returned:
        start = MAIN_END + 70 if heater else MAIN_END - 14
        out += pipe([(start, RETURN_Y), (MAIN_START, RETURN_Y)], WATER, 3)
        out += box(10, RETURN_Y - 22, MAIN_START - 10, 44, "receiver",
                   header_name(raw, "receiver_pressure", "").replace(" header", " pressure"))
        out += tag((MAIN_START + start) / 2, RETURN_Y + 16, "R")
    else:
        out.append(f'<text x="{MAIN_START}" y="{TRAP_Y + 50}" font-size="10">traps discharge to a safe drain</text>')
    legend, height = _legend(points)
    return out + legend, height


def _legend(points):
    """Each point's tag, name and readings in columns below the drawing; returns the elements and the height."""
    out, y, column, tallest = [], LEGEND_Y, 0, 0
    for point in points:
        if column == 4:
            y += 30 + 15 * tallest
            column, tallest = 0, 0
        out += label(10 + COLUMN * column, y, point)
        tallest = max(tallest, len(point.readings))
        column += 1
    return out, y + 30 + 15 * tallest


__all__ = ["steam_main_points", "draw_steam_main"]
