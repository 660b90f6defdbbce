"""The record as shown (render.display.display_record) shares what it only reads and never changes the record.

The display writes labels, number texts and units into tables of its own and shares the rest (figure data,
operands, provenance) with the record, instead of copying the whole record. These tests hold it to that on every
record kept in the archive, in SI and in US display: the record's JSON text is the same before and after, and what
the display shows is the same as from a deep copy of the record.
"""

import copy
import json
from pathlib import Path

import pytest

from steamcalc.records.record import load_record
from steamcalc.render.display import display_record
from steamcalc.render.report import render_html, render_markdown

ARCHIVE = Path(__file__).parent / "archive"
RECORDS = sorted(ARCHIVE.glob("*/*.json"))


def _in(record, system):
    return dict(record, site=dict(record["site"], display_units=system))


@pytest.mark.parametrize("system", ["SI", "US"])
@pytest.mark.parametrize("path", RECORDS, ids=lambda p: f"{p.parent.name}/{p.stem}")
def test_showing_a_record_leaves_it_as_it_was(path, system):
    record = _in(load_record(path), system)
    before = json.dumps(record, sort_keys=True)
    shown = display_record(record)
    render_html(record, shown=shown)
    render_markdown(record, shown=shown)
    assert json.dumps(record, sort_keys=True) == before


@pytest.mark.parametrize("path", RECORDS[:4], ids=lambda p: f"{p.parent.name}/{p.stem}")
def test_shown_as_from_a_deep_copy(path):
    record = _in(load_record(path), "US")
    assert display_record(record) == display_record(copy.deepcopy(record))
