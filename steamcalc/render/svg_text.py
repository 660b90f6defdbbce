"""What every static SVG drawing of a record shares: the page width, the font, and how numbers and text are written."""

from __future__ import annotations

import html

#: Width of a chart drawing, px.
WIDTH = 720.0
#: The charts' font stack.
FONT = "DejaVu Sans, Arial, sans-serif"


def _f(value):
    """A coordinate as written: one decimal, no negative zero.

    >>> _f(-0.04), _f(12.345)
    ('0.0', '12.3')
    """
    text = f"{value:.1f}"
    return "0.0" if text == "-0.0" else text


def _esc(text):
    """Text escaped for SVG markup and attributes."""
    return html.escape(str(text), quote=True)
