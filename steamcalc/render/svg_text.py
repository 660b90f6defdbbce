"""What every static SVG drawing of a record shares: the page width, the font, and how numbers and text are written."""

from __future__ import annotations

import html
import re

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


#: What html.escape (quote=True) replaces; most texts of a drawing (numbers, colours, ids) hold none of them.
_SPECIAL = re.compile("[&<>\"']")


def _esc(text):
    """Text escaped for SVG markup and attributes (as ``html.escape(text, quote=True)``).

    >>> _esc("Flash steam, kg/h"), _esc("<a & 'b'>")
    ('Flash steam, kg/h', '&lt;a &amp; &#x27;b&#x27;&gt;')
    """
    text = str(text)
    return text if _SPECIAL.search(text) is None else html.escape(text, quote=True)
