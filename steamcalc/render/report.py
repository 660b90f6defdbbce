"""Render a record as a self-contained, printable HTML page and as Markdown.

The HTML needs no network: styles are inline and there are no scripts. Every
piece of user text is escaped (jinja2 autoescape), so a title with markup shows
as text.
"""

from __future__ import annotations

import re
from functools import lru_cache
from importlib import resources

import jinja2

from ..records.record import record_stem

def format_number(value, unit=""):
    """A value as a report shows it (the rules are :func:`steamcalc.render.display.format_number`).

    Examples
    --------
    >>> format_number(196.23456, "degC"), format_number(4500.0), format_number(0.987654)
    ('196.2', '4,500', '0.9877')
    """
    from .display import format_number as rule

    return rule(value, unit)


def format_unit(unit, basis="absolute"):
    """A unit string for people (the rules are :func:`steamcalc.render.display.unit_label`).

    Examples
    --------
    >>> format_unit("bar"), format_unit("bar", "difference"), format_unit("m**3/h"), format_unit("percent")
    ('bar(a)', 'bar difference', 'm³/h', '%')
    """
    from .display import unit_label

    return unit_label(unit, basis)


# Characters Markdown gives a meaning inline (emphasis, code, links, images, raw HTML, tables,
# strike-through, maths in some viewers); user text in the Markdown record has them escaped.
_MD_SPECIAL = re.compile(r"([\\`*_{}\[\]<>|~#!$&])")
_CONTROL = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")


def _md(text):
    """Text for the Markdown record: one line, every Markdown character escaped.

    Examples
    --------
    >>> _md("<b>x</b> [link](javascript:y) *a*|b")
    '\\\\<b\\\\>x\\\\</b\\\\> \\\\[link\\\\](javascript:y) \\\\*a\\\\*\\\\|b'
    """
    text = _CONTROL.sub("", re.sub(r"[\r\n]+", " ", str(text).replace("\t", " ")))
    return _MD_SPECIAL.sub(r"\\\1", text)


def _code(text):
    """Text as a Markdown code span: fenced with more backticks than it holds, on one line."""
    text = _CONTROL.sub("", re.sub(r"[\r\n]+", " ", str(text).replace("\t", " ")))
    longest = max((len(run) for run in re.findall(r"`+", text)), default=0)
    fence = "`" * (longest + 1)
    pad = " " if text.startswith("`") or text.endswith("`") else ""
    return f"{fence}{pad}{text}{pad}{fence}"


@lru_cache(maxsize=2)
def _environment(autoescape):
    env = jinja2.Environment(
        loader=jinja2.FunctionLoader(
            lambda name: resources.files("steamcalc.render").joinpath("templates", name).read_text("utf-8")),
        autoescape=autoescape, undefined=jinja2.StrictUndefined, keep_trailing_newline=True,
    )
    env.filters["num"] = format_number
    env.filters["unit"] = format_unit
    env.filters["md"] = _md
    env.filters["code"] = _code
    return env


def _context(record):
    from ..calcs import get_calculation
    from .display import display_record, pressure_basis

    calc = get_calculation(record["kind"])

    def basis(section, key):
        return pressure_basis(record, section, key)

    from .figures_svg import record_figures  # the sketch and charts block (HTML only; drawn when the template asks)

    shown = display_record(record)
    return {"r": shown, "stem": record_stem(record), "kind_title": calc.TITLE, "basis": basis,
            "record_figures": lambda: record_figures(record, shown)}


def render_html(record):
    """The record as one self-contained HTML page (no scripts, no network)."""
    return _environment(True).get_template("record.html.j2").render(**_context(record))


def render_markdown(record):
    """The record as Markdown."""
    return _environment(False).get_template("record.md.j2").render(**_context(record))


def render_diff_html(old, new, rows):
    """The changes between two records as one self-contained HTML page."""
    return _environment(True).get_template("diff.html.j2").render(old=old, new=new, rows=rows)


RENDERERS = {".html": render_html, ".md": render_markdown}
