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
_MD_SPECIAL = "\\`*_{}[]<>|~#!$&"
_CONTROL_CHARACTERS = [chr(c) for c in [*range(0x00, 0x09), *range(0x0b, 0x20), *range(0x7f, 0xa0),
                                        *range(0x202a, 0x202f), *range(0x2066, 0x206a)]]
_LINE_BREAKS = re.compile(r"[\r\n]+")
# One pass of str.translate (this runs for every cell of every Markdown record): a tab becomes a space, a control
# or direction-override character goes, a Markdown character gets its backslash.
_MD_TABLE = str.maketrans({"\t": " ", **{c: None for c in _CONTROL_CHARACTERS},
                           **{c: "\\" + c for c in _MD_SPECIAL}})
_CODE_TABLE = str.maketrans({"\t": " ", **{c: None for c in _CONTROL_CHARACTERS}})
# Most cells (numbers, units, labels) hold none of those characters: one search in C finds that, and the
# translation (a dictionary look-up per character) is left for the texts that need it.
_MD_ANY = re.compile("[" + "".join(re.escape(chr(c)) for c in _MD_TABLE) + "\r\n]")
_CODE_ANY = re.compile("[" + "".join(re.escape(chr(c)) for c in _CODE_TABLE) + "\r\n`]")


def _one_line(text):
    text = str(text)
    return _LINE_BREAKS.sub(" ", text) if "\n" in text or "\r" in text else text


def _md(text):
    """Text for the Markdown record: one line, every Markdown character escaped.

    Examples
    --------
    >>> _md("<b>x</b> [link](javascript:y) *a*|b")
    '\\\\<b\\\\>x\\\\</b\\\\> \\\\[link\\\\](javascript:y) \\\\*a\\\\*\\\\|b'
    >>> _md("two\\r\\n\\nlines\\tand a\\u202eturn")
    'two lines and aturn'
    """
    text = str(text)
    return _one_line(text).translate(_MD_TABLE) if _MD_ANY.search(text) else text


def _code(text):
    """Text as a Markdown code span: fenced with more backticks than it holds, on one line.

    Examples
    --------
    >>> _code("h2 = h1"), _code("a `b` c"), _code("`x")
    ('`h2 = h1`', '``a `b` c``', '`` `x ``')
    """
    text = str(text)
    if _CODE_ANY.search(text) is None:
        return f"`{text}`"
    text = _one_line(text).translate(_CODE_TABLE)
    if "`" not in text:
        return f"`{text}`"
    longest = max(len(run) for run in re.findall(r"`+", text))
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


def _context(record, earlier=False, shown=None):
    from ..calcs import get_calculation
    from .display import display_record, pressure_basis

    calc = get_calculation(record["kind"])

    def basis(section, key):
        return pressure_basis(record, section, key)

    from .figures_svg import record_figures  # the sketch and charts block (HTML only; drawn when the template asks)

    if shown is None:
        shown = display_record(record)

    def figures():
        drawn = record_figures(record, shown)
        if earlier:   # the sketch in the words the earlier layout drew it with
            from markupsafe import Markup

            from .sketch import sketch_svg
            drawn = {**drawn, "sketch": Markup(sketch_svg(record, shown, earlier=True))}
        return drawn

    return {"r": shown, "stem": record_stem(record), "kind_title": calc.TITLE, "basis": basis,
            "record_figures": figures, "first": first_page(record, shown, calc)}


#: The sections of the record after its first page, in order: (anchor, heading). Uncertainty only when it has one.
SECTIONS = (("checks", "Checks"), ("results", "Results"), ("figures", "Process sketch and charts"),
            ("uncertainty", "Uncertainty"), ("inputs", "Inputs"), ("assumptions", "Assumptions"),
            ("steps", "Calculation steps"), ("cautions", "Cautions"), ("references", "References"),
            ("software", "Software and integrity"))


def first_page(record, shown, calc):
    """What the first page of a record shows, from the record as shown (:func:`~steamcalc.render.display.display_record`).

    Returns
    -------
    dict
        ``governing``: (key, shown result) of the calculation's ``SUMMARY_RESULTS`` the record holds, in that
        order; ``attention``: every failing check, then every warning one; ``act_on``: the notices the record
        lists among its warnings (statements the engineer must act on); ``counts``: checks by shown status;
        ``sections``: anchor -> number of the sections that follow, with ``section_list`` in order (the
        Markdown record has a figures section only when the record keeps figure data).
    """
    results = shown.get("results") or {}
    governing = [(key, results[key]) for key in getattr(calc, "SUMMARY_RESULTS", ()) if isinstance(results.get(key), dict)]
    checks = [c for c in shown.get("checks") or [] if isinstance(c, dict)]
    attention = [c for c in checks if c.get("shown_status") == "fail"] + \
        [c for c in checks if c.get("shown_status") == "warn"]
    warnings = [str(w) for w in record.get("warnings") or []]
    act_on = [c for c in checks if c.get("shown_status") == "notice"
              and any(w.startswith(f"{c.get('name')}: ") for w in warnings)]
    counts = {status: sum(1 for c in checks if c.get("shown_status") == status)
              for status in ("fail", "warn", "pass", "notice")}
    html = _numbered([(a, h) for a, h in SECTIONS if a != "uncertainty" or shown.get("uncertainty")])
    # The Markdown record lists its figures (data, not drawings) after the steps, and only when it keeps figure data.
    markdown = _numbered([(a, h) for a, h in MARKDOWN_SECTIONS if (a != "uncertainty" or shown.get("uncertainty"))
                          and (a != "figures" or record.get("figures") is not None)])
    return {"governing": governing, "attention": attention, "act_on": act_on, "counts": counts,
            "section_list": html, "sections": {anchor: number for number, anchor, _ in html},
            "md_section_list": markdown, "md_sections": {anchor: number for number, anchor, _ in markdown}}


#: The Markdown record's sections, in its order.
MARKDOWN_SECTIONS = tuple(s for s in SECTIONS if s[0] not in ("figures", "cautions", "references", "software")) + (
    ("figures", "Figures"), ("cautions", "Cautions"), ("references", "References"), ("software", "Software and integrity"))


def _numbered(sections):
    return [(number, anchor, heading) for number, (anchor, heading) in enumerate(sections, start=1)]


def render_html(record, shown=None):
    """The record as one self-contained HTML page (no scripts, no network): a first page for the checker
    (identity, status, the governing results, every failing or warning check, the signatures), a page break
    when printed, then the detail by numbered section. ``shown`` is the record's
    :func:`~steamcalc.render.display.display_record` when the caller has it already (it is made otherwise)."""
    return _environment(True).get_template("record.html.j2").render(**_context(record, shown=shown))


def render_markdown(record, shown=None):
    """The record as Markdown: the same first page, a rule, then the detail by numbered section (``shown`` as for
    :func:`render_html`)."""
    return _environment(False).get_template("record.md.j2").render(**_context(record, shown=shown))


class Reports(dict):
    """Suffix -> function drawing a record's report (``record -> text``), that draws them all at once with one
    display of the record (:meth:`draw`), the part both reports share."""

    def draw(self, record):
        """``{suffix: text}`` of every report of a record."""
        from .display import display_record

        shown = display_record(record)
        return {suffix: render(record, shown=shown) for suffix, render in self.items()}


#: The layout releases 0.2 and 0.3 drew a record's reports in, before the first page for the checker.
EARLIER_LAYOUTS = {".html": "record_earlier.html.j2", ".md": "record_earlier.md.j2"}


def render_earlier(record, suffix):
    """A record's report (``.html`` or ``.md``) in the layout releases 0.2 and 0.3 drew it in, before the first
    page: what such a release drew from the same JSON, so that ``verify`` can tell a report an earlier release
    drew from one edited by hand. None for a suffix with no earlier layout."""
    template = EARLIER_LAYOUTS.get(suffix)
    if template is None:
        return None
    return _environment(suffix == ".html").get_template(template).render(**_context(record, earlier=True))


def render_diff_html(old, new, rows):
    """The changes between two records as one self-contained HTML page."""
    return _environment(True).get_template("diff.html.j2").render(old=old, new=new, rows=rows)


RENDERERS = Reports({".html": render_html, ".md": render_markdown})
