"""A record file read by orjson when it is exactly the text steamcalc writes, by the standard library otherwise:
both give the same record, and no text that the standard library's reader refuses gets past the faster one."""

import json
from pathlib import Path

import pytest

from steamcalc.errors import RecordError
from steamcalc.records.record import _canonical_data, _record_from_text, record_text

ARCHIVE = Path(__file__).resolve().parent / "archive"
RECORDS = sorted(ARCHIVE.rglob("*.json"))


@pytest.mark.parametrize("path", RECORDS, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_the_text_steamcalc_writes_reads_as_the_same_record_both_ways(path):
    record = json.loads(path.read_text(encoding="utf-8"))
    text = record_text(record)
    fast = _canonical_data(text)
    assert fast is not None and fast == record
    assert json.dumps(fast) == json.dumps(record)   # the same types and numbers, the same key order
    assert _record_from_text(text, path) == record


@pytest.mark.parametrize("text", [
    '{\n  "id": "LD-01",\n  "id": "LD-02"\n}\n',         # a key twice, laid out as steamcalc lays out a record
    '{\n  "value": NaN\n}\n',
    '{\n  "value": 1e400\n}\n',
    '{\n  "value": 123456789012345678901234567890\n}\n',   # an integer beyond 64 bits
    '{\n  "value": 5e-05\n}\n',                             # a number written as orjson does not write it
    '{"id": "LD-01"}\n',                                    # not indented as steamcalc writes
    '[\n  1\n]\n',
    '{\n  "id": "LD-01"\n}',                                # no final newline
])
def test_any_other_text_goes_to_the_standard_library(text):
    assert _canonical_data(text) is None


def test_a_key_given_twice_is_refused_whatever_the_layout(tmp_path):
    text = '{\n  "schema": "steamcalc.record/3",\n  "id": "LD-01",\n  "id": "LD-02"\n}\n'
    with pytest.raises(RecordError, match="appears twice"):
        _record_from_text(text, tmp_path / "LD-01_revA.json")
