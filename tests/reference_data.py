"""Load the check-value tables in tests/reference/ (each row carries its source)."""

import csv
from pathlib import Path

REFERENCE = Path(__file__).parent / "reference"


def rows(name):
    """Rows of tests/reference/<name>.csv as dicts; numbers stay strings until the test reads them."""
    with (REFERENCE / f"{name}.csv").open(newline="", encoding="utf-8") as handle:
        return list(csv.DictReader(handle))


def ids(table):
    """Readable test ids: the first two columns of each row."""
    return ["-".join(list(r.values())[:2]) for r in table]


def significant(value, digits=9):
    """A value rounded to the digits a table publishes (9 significant for IAPWS R7-97)."""
    return float(f"{value:.{digits - 1}e}")
