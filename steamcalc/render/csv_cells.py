"""Text cells of the CSV tables (records index, register) as a spreadsheet must show them."""

from __future__ import annotations


def csv_safe(text):
    """A text cell as a spreadsheet should show it: never read as a formula.

    Text starting with ``=``, ``+``, ``-``, ``@``, a tab or a carriage return gets a leading
    quote, the usual defence against spreadsheet formula injection (OWASP, "CSV Injection").

    Examples
    --------
    >>> csv_safe("=SUM(A1:A9)"), csv_safe("@cmd"), csv_safe("LD-01")
    ("'=SUM(A1:A9)", "'@cmd", 'LD-01')
    """
    text = str(text)
    return "'" + text if text[:1] in ("=", "+", "-", "@", "\t", "\r") else text
