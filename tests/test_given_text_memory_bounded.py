"""The memory of texts as given holds each record's site by its SHA-256, not its text: a folder of records with very
large sites costs it a bounded amount, and a given text reads the same whether remembered or read afresh."""

import copy
import json
import sys
from pathlib import Path

from steamcalc.review import verify
from steamcalc.review.verify import MAX_GIVEN_READINGS, given_changes

ARCHIVE = Path(__file__).resolve().parent / "archive" / "v0_3"


def issued_record(case_id):
    """An archived record of a demo case, as issued by the release kept in the archive."""
    path = next(ARCHIVE.glob(f"{case_id}_rev*.json"))
    return json.loads(path.read_text(encoding="utf-8"))


def _held_bytes():
    total = 0
    for key, value in verify._GIVEN_READINGS.items():
        total += sum(sys.getsizeof(part) for part in key)
    return total


def test_a_large_site_section_is_not_kept_in_the_memory():
    record = issued_record("LD-01")
    large = copy.deepcopy(record)
    large["site"]["name"] = "x" * 2_000_000   # a hostile record: a site section of 2 MB
    verify._GIVEN_READINGS.clear()
    assert given_changes(large) == []
    assert len(verify._GIVEN_READINGS) > 0
    assert _held_bytes() < 200_000, "the memory holds the site's text"


def test_remembered_and_afresh_read_the_same():
    record = issued_record("LD-01")
    verify._GIVEN_READINGS.clear()
    first = given_changes(record)
    assert given_changes(record) == first == []
    edited = copy.deepcopy(record)
    name = next(k for k, e in edited["inputs"].items() if isinstance(e, dict) and e.get("given", "").endswith("t/h"))
    edited["inputs"][name]["given"] = "99 t/h"
    assert any(name in line for line in given_changes(edited))


def test_the_memory_is_capped():
    assert MAX_GIVEN_READINGS == 4096
