"""The record schema read by two validators agrees: the compiled one (jsonschema-rs) that answers yes or no for
every record read, and the Python one (fastjsonschema) that names the field of a refusal.

Every archived record, and some thousands of copies edited at random (a value replaced by one of another type,
a key taken out or added), must be passed or refused by both alike; a record that either refuses is refused by
``validate_record``. The one known difference, a NaN (JSON has none; only the Python validator passes it), is
refused too.
"""

import copy
import json
import math
import random
from pathlib import Path

import fastjsonschema
import pytest

from steamcalc.errors import RecordError
from steamcalc.records.schema import _follows_schema, _validator, validate_record

ARCHIVE = Path(__file__).resolve().parent / "archive"
RECORDS = sorted(ARCHIVE.rglob("*.json"))
#: Values put in place of another (each of a type the schema may or may not allow there).
REPLACEMENTS = (None, True, 0, -1, 1.5, 1e300, "", "x", "sha256:00", [], [1], {}, {"value": 1.0})


def _python_passes(record):
    try:
        _validator()(record)
    except fastjsonschema.JsonSchemaValueException:
        return False
    return True


def _places(node, path=()):
    """Every (path, value) in a record: the places an edit can touch."""
    yield path, node
    if isinstance(node, dict):
        for key, value in node.items():
            yield from _places(value, path + (key,))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            yield from _places(value, path + (index,))


def _edited(record, path, edit):
    copied = copy.deepcopy(record)
    parent = copied
    for part in path[:-1]:
        parent = parent[part]
    edit(parent, path[-1])
    return copied


@pytest.mark.parametrize("path", RECORDS, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_both_validators_pass_every_archived_record(path):
    record = json.loads(path.read_text(encoding="utf-8"))
    assert _follows_schema(record) and _python_passes(record)


@pytest.mark.parametrize("path", RECORDS, ids=lambda p: f"{p.parent.name}/{p.name}")
def test_both_validators_agree_on_edited_records(path):
    record = json.loads(path.read_text(encoding="utf-8"))
    places = [p for p, _ in _places(record) if p]
    rng = random.Random(f"schema-gate-{path.parent.name}-{path.name}")   # a fixed seed per record
    refused = 0
    for place in rng.sample(places, min(len(places), 150)):
        def replace(parent, key):
            parent[key] = copy.deepcopy(rng.choice(REPLACEMENTS))

        def remove(parent, key):
            if isinstance(parent, dict):
                del parent[key]
            else:
                parent.pop(key)

        def add(parent, key):
            if isinstance(parent, dict):
                parent["an_added_key"] = 1.0

        for edit in (replace, remove, add):
            edited = _edited(record, place, edit)
            fast, python = _follows_schema(edited), _python_passes(edited)
            assert fast == python, (place, edit.__name__)
            refused += not fast
    assert refused > 0   # the edits do reach the schema's rules


def test_a_nan_is_refused_though_the_python_validator_passes_it():
    record = json.loads((ARCHIVE / "v0_3" / "LD-02_revB.json").read_text(encoding="utf-8"))
    record["results"][next(iter(record["results"]))]["value"] = math.nan
    assert _python_passes(record) and not _follows_schema(record)
    with pytest.raises(RecordError, match="does not follow the steamcalc record schema"):
        validate_record(record)
