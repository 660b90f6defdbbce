"""A small process sketch of each unit, as SVG, with the computed state at each point.

Let-down: header → control valve → desuperheater → header. Flash: condensate → vessel (or
vessels) → flash steam / residual condensate. Steam heater: steam → control valve → exchanger (named
for the arrangement given: a shell-and-tube exchanger only when the case says so) → trap. Steam main:
header → segments → user, drip legs and traps, return line to the receiver (:mod:`.sketch_main`). Every number written on the sketch is read from the record (its results, or its inputs
where the state is an input, such as the header pressure), in the record's display units and
formatted as the report formats it, so the sketch and the results table cannot disagree.
Pressures are absolute as the record holds them, with the gauge value beside them.
"""

from __future__ import annotations

from .display import convert, display_record, format_number
from ..units.formatting import unit_label as format_unit
from .sketch_parts import INK, WATER, WIDTH, Point, Reading
from .sketch_parts import box as _box
from .sketch_parts import entry_of as _entry
from .sketch_parts import escaped as _esc
from .sketch_parts import header_name as _header_name
from .sketch_parts import label as _label
from .sketch_parts import pipe as _pipe
from .sketch_parts import point_of as _point
from .sketch_parts import pressure_of as _pressure
from .sketch_parts import reading_of as _reading
from .sketch_parts import suffixed as _suffixed
from .sketch_parts import valve as _valve
from .sketch_main import draw_steam_main, steam_main_points


def letdown_points(shown, raw):
    """State points of a let-down: inlet, after the valve, (spray water,) outlet."""
    desuperheated = _entry(shown, "results", "spray_water_flow") is not None
    points = [
        _point("1", f"from {_header_name(raw, 'inlet_pressure', 'the inlet')}",
               _pressure(shown, raw, "inputs", "inlet_pressure"), _reading(shown, "results", "inlet_temperature"),
               _reading(shown, "results", "inlet_mass_flow")),
        _point("2", "after the valve", _pressure(shown, raw, "inputs", "outlet_pressure"),
               _reading(shown, "results", "throttled_temperature"),
               _reading(shown, "results", "inlet_mass_flow")),
    ]
    if desuperheated:
        points.append(_point("W", "spray water", _pressure(shown, raw, "inputs", "water_pressure"),
                             _reading(shown, "inputs", "water_temperature"),
                             _reading(shown, "results", "spray_water_flow")))
        points.append(_point("3", f"to {_header_name(raw, 'outlet_pressure', 'the outlet')}",
                             _pressure(shown, raw, "inputs", "outlet_pressure"),
                             _reading(shown, "results", "outlet_temperature"),
                             _reading(shown, "results", "outlet_mass_flow")))
    return points


def flash_points(shown, raw):
    """State points of a flash: condensate in, flash steam out, residual condensate out."""
    vented = raw.get("inputs", {}).get("vented", {}).get("value") is True
    stages = sorted(int(k.split("_")[1]) for k in shown.get("results", {})
                    if k.startswith("stage_") and k.endswith("_pressure") and k.split("_")[1].isdigit())
    inlet = _point("1", "condensate in", _pressure(shown, raw, "inputs", "condensate_pressure"),
                   _reading(shown, "results", "condensate_temperature"),
                   _reading(shown, "results", "condensate_flow"))
    if stages:
        # A cascade: each stage's steam at its own pressure; the residual leaves the last stage.
        steam = []
        for i in stages:
            steam += [_suffixed(_pressure(shown, raw, "results", f"stage_{i}_pressure"), f"stage {i}"),
                      _suffixed(_reading(shown, "results", f"stage_{i}_flash_steam_flow"), f"stage {i}")]
        last = _pressure(shown, raw, "results", f"stage_{stages[-1]}_pressure")
        return [inlet, _point("2", f"flash steam, {len(stages)} stages", *steam),
                _point("3", "residual condensate", last,
                       _reading(shown, "results", "residual_condensate_temperature"),
                       _reading(shown, "results", "residual_condensate_flow"))]
    steam_pressure = _pressure(shown, raw, "inputs", "flash_pressure")
    steam_name = "flash steam to vent (lost)" if vented else \
        f"flash steam to {_header_name(raw, 'flash_pressure', 'the flash-steam users')}"
    return [
        inlet,
        _point("2", steam_name, steam_pressure, _reading(shown, "results", "residual_condensate_temperature"),
               _reading(shown, "results", "flash_steam_flow")),
        _point("3", "residual condensate", steam_pressure,
               _reading(shown, "results", "residual_condensate_temperature"),
               _reading(shown, "results", "residual_condensate_flow")),
    ]


#: The exchanger as the sketch names it, by the case's arrangement: (name in the box, line under it, the steam
#: side's name). A counterflow case says nothing of the exchanger's make (plate, tube-in-tube or shell-and-tube),
#: so it is a heat exchanger with a steam side; only a shell-and-tube arrangement (1-2, 2-4) has a shell.
EXCHANGER_WORDS = {"counterflow": ("heat exchanger", "counterflow", "steam side"),
                   "1-2": ("shell-and-tube", "1 shell pass, 2 tube passes", "steam side"),
                   "2-4": ("shell-and-tube", "2 shell passes, 4 tube passes", "steam side")}
#: How releases before the arrangement was named drew it (the earlier layout of a record's page draws it so).
_EARLIER_EXCHANGER_WORDS = ("shell", "", "shell")


def exchanger_words(raw, earlier=False):
    """(name, line under it, steam side) of the exchanger of a heater record, from its arrangement input.

    Examples
    --------
    >>> exchanger_words({"inputs": {}})
    ('heat exchanger', 'counterflow', 'steam side')
    >>> exchanger_words({"inputs": {"arrangement": {"value": "1-2"}}})[:2]
    ('shell-and-tube', '1 shell pass, 2 tube passes')
    """
    if earlier:
        return _EARLIER_EXCHANGER_WORDS
    entry = (raw.get("inputs") or {}).get("arrangement")
    arrangement = entry.get("value") if isinstance(entry, dict) else None
    return EXCHANGER_WORDS.get(arrangement or "counterflow", ("heat exchanger", str(arrangement), "steam side"))


def exchanger_points(shown, raw, earlier=False):
    """State points of a steam heater: steam supply, its steam side at design load, after the trap, process."""
    steam_temperature = _reading(shown, "inputs", "steam_temperature") or \
        _reading(shown, "results", "steam_saturation_temperature")
    shell = _pressure(shown, raw, "results", "required_steam_pressure_100")
    return [
        _point("1", "steam supply", _pressure(shown, raw, "inputs", "steam_pressure"), steam_temperature,
               _reading(shown, "results", "steam_flow")),
        _point("2", f"{exchanger_words(raw, earlier)[2]}, design load" + (" (pressure needed)" if shell else ""), shell,
               _reading(shown, "results", "duty")),
        _point("3", "after the trap", _pressure(shown, raw, "inputs", "condensate_back_pressure"),
               _reading(shown, "results", "condensate_flow")),
        _point("P", "process in → out", _reading(shown, "inputs", "process_inlet_temperature"),
               _reading(shown, "inputs", "process_outlet_temperature"),
               _reading(shown, "results", "process_flow")),
    ]


POINTS = {"letdown": letdown_points, "flash": flash_points, "exchanger": exchanger_points,
          "steam_main": steam_main_points}


def sketch_points(record, shown=None, earlier=False):
    """The numbered state points the sketch of a record shows, with their readings.

    ``shown`` is the record as :func:`steamcalc.render.display.display_record` shows it, when the caller has it;
    ``earlier`` names them as releases before 0.3's first page did (a heater's steam side a "shell").
    """
    maker = POINTS.get(record.get("kind"))
    if maker is None:
        return []
    shown = shown if shown is not None else display_record(record)
    return exchanger_points(shown, record, earlier) if maker is exchanger_points else maker(shown, record)


def _letdown(points, raw):
    by = {p.number: p for p in points}
    y = 150
    out = _box(10, y - 25, 90, 50, by["1"].name.replace("from ", ""))
    if "3" in by:
        out += _pipe([(100, y), (255, y)]) + _valve(270, y, "control valve")
        out += _pipe([(286, y), (460, y)]) + _box(462, y - 22, 104, 44, "desuperheater")
        out += _pipe([(514, 242), (514, y + 22)], WATER, 2)
        out += _pipe([(566, y), (648, y)]) + _box(650, y - 25, 100, 50, by["3"].name.replace("to ", ""))
        out += _label(108, 52, by["1"]) + _label(300, 52, by["2"]) + _label(576, 52, by["3"])
        out += _label(300, 205, by["W"])
    else:
        out += _pipe([(100, y), (355, y)]) + _valve(370, y, "control valve")
        out += _pipe([(386, y), (648, y)]) + _box(650, y - 25, 100, 50,
                                                  _header_name(raw, "outlet_pressure", "outlet"))
        out += _label(108, 52, by["1"]) + _label(420, 52, by["2"])
    return out, 260


def _flash(points, raw):
    by = {p.number: p for p in points}
    results = raw.get("results", {})
    diameter = results.get("vessel_diameter", {}).get("value")
    fraction = results.get("flash_fraction", {}).get("value")
    vented = raw.get("inputs", {}).get("vented", {}).get("value") is True
    cascade = "stage_1_pressure" in results
    steam_to = "vent" if vented else _header_name(raw, "flash_pressure", "steam users")
    out = _pipe([(20, 150), (328, 150)], WATER)
    out += [f'<rect x="330" y="50" width="80" height="190" rx="30" fill="#f4f6f7" stroke="{INK}" stroke-width="1.5"/>',
            f'<line x1="332" y1="185" x2="408" y2="185" stroke="{WATER}" stroke-dasharray="4,3"/>',
            '<text x="370" y="100" text-anchor="middle" font-weight="bold">flash</text>',
            f'<text x="370" y="114" text-anchor="middle" font-weight="bold">{"vessels" if cascade else "vessel"}</text>']
    if isinstance(fraction, (int, float)):
        out += ['<text x="370" y="140" text-anchor="middle" font-size="10">flashes</text>',
                f'<text x="370" y="153" text-anchor="middle" font-size="10">{_esc(format_number(fraction * 100))} %</text>']
    if isinstance(diameter, (int, float)):
        # in the record's display units, as its results table shows the diameter (pint: m to ft in US)
        value, unit = convert(diameter, results["vessel_diameter"].get("unit", "m"),
                              raw.get("site", {}).get("display_units", "SI"))
        out.append(f'<text x="370" y="212" text-anchor="middle" font-size="10">Ø {_esc(format_number(value, unit))} '
                   f'{_esc(format_unit(unit))}</text>')
    out += _pipe([(370, 50), (370, 30), (638, 30)]) + _box(640, 8, 110, 44, steam_to)
    out += _pipe([(370, 240), (370, 250), (430, 250), (430, 222), (638, 222)], WATER)
    out += _box(640, 200, 110, 44, "condensate", "return")
    # the residual condensate's label goes below the flash steam's (a cascade lists every stage)
    below = max(150, 70 + 15 * (len(by["2"].readings) + 1) + 10)
    out += _label(30, 76, by["1"]) + _label(450, 70, by["2"]) + _label(450, below, by["3"])
    return out, max(275, below + 15 * len(by["3"].readings) + 30)


def _exchanger(points, raw, earlier=False):
    by = {p.number: p for p in points}
    name, line, _ = exchanger_words(raw, earlier)
    y = 150
    out = _pipe([(20, y), (175, y)]) + _valve(190, y, "control valve")
    out += _pipe([(206, y), (345, y)])
    out += [f'<rect x="345" y="{y - 40}" width="150" height="80" rx="30" fill="#f4f6f7" stroke="{INK}" stroke-width="1.5"/>',
            f'<text x="420" y="{y + 4 - (12 if line else 0)}" text-anchor="middle" font-weight="bold">{_esc(name)}</text>']
    if line:
        out.append(f'<text x="420" y="{y + 12}" text-anchor="middle" font-size="9">{_esc(line)}</text>')
    # the process fluid through the exchanger: in from below, out at the top
    out += _pipe([(440, 255), (440, y + 42)], "#8a5a00", 2) + _pipe([(440, y - 40), (440, 66)], "#8a5a00", 2)
    out += ['<text x="448" y="250" font-size="10">process in</text>',
            '<text x="448" y="76" font-size="10">process out</text>']
    out += _pipe([(495, y), (575, y)], WATER)
    out += [f'<circle cx="590" cy="{y}" r="14" fill="#ffffff" stroke="{INK}" stroke-width="1.5"/>',
            f'<text x="590" y="{y + 4}" text-anchor="middle" font-weight="bold">T</text>',
            f'<text x="590" y="{y + 30}" text-anchor="middle" font-size="10">trap</text>']
    out += _pipe([(604, y), (745, y)], WATER)
    out += _label(18, 52, by["1"]) + _label(150, 205, by["2"]) + _label(750, 52, by["3"], anchor="end")
    out += _label(560, 205, by["P"])
    return out, 275


DRAWINGS = {"letdown": _letdown, "flash": _flash, "exchanger": _exchanger, "steam_main": draw_steam_main}
TITLES = {"letdown": "Let-down station", "flash": "Flash-steam recovery", "exchanger": "Steam heater",
          "steam_main": "Steam main and condensate return"}


def sketch_svg(record, shown=None, earlier=False):
    """The process sketch of a record as one SVG element (no scripts, no external references).

    Parameters
    ----------
    record : dict
        A record (or the workbook's current record), as :func:`steamcalc.records.record.build_record` makes it.
    shown : dict, optional
        The record as :func:`steamcalc.render.display.display_record` shows it, when the caller has it.
    earlier : bool
        Draw it in the words of releases before 0.3's first page (a heater's exchanger a "shell", whatever its
        arrangement), as the earlier layout of a record's page did: only to recognise a page such a release drew.

    Returns
    -------
    str
        ``<svg ...>...</svg>``; empty for a kind without a sketch.

    Examples
    --------
    >>> record = {"kind": "flash", "site": {"atmospheric_pressure": {"value": 1.0, "unit": "bar"}},
    ...           "inputs": {"condensate_pressure": {"value": 9.0, "unit": "bar", "given": "8 bar(g)"},
    ...                      "flash_pressure": {"value": 3.0, "unit": "bar", "given": "2 bar(g)"}},
    ...           "results": {"flash_steam_flow": {"value": 236.3, "unit": "kg/h"}}}
    >>> svg = sketch_svg(record)
    >>> "9 bar(a) · 8 bar(g)" in svg and "236.3 kg/h" in svg and "<script" not in svg
    True
    """
    kind = record.get("kind")
    if kind not in DRAWINGS:
        return ""
    points = sketch_points(record, shown, earlier)
    body, height = _exchanger(points, record, earlier) if kind == "exchanger" else DRAWINGS[kind](points, record)
    title = f"Process sketch: {TITLES[kind]} {record.get('id', '')} rev {record.get('revision', '')}".strip()
    return "\n".join([
        f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {WIDTH} {height}" width="{WIDTH}" height="{height}" '
        f'style="max-width:100%;height:auto" role="img" aria-label="{_esc(title)}" class="steamcalc-sketch" '
        f'font-family="DejaVu Sans, Arial, sans-serif" font-size="11" fill="{INK}">',
        f"<title>{_esc(title)}</title>",
        f'<rect x="0" y="0" width="{WIDTH}" height="{height}" fill="#ffffff"/>',
        *body,
        f'<text x="{WIDTH - 8}" y="{height - 6}" text-anchor="end" font-size="9" fill="#5b6770">'
        "schematic, not to scale; pressures absolute with gauge beside</text>",
        "</svg>"])


__all__ = ["sketch_svg", "sketch_points", "Point", "Reading"]
