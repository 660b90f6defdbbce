"""the schema's yes-or-no now comes from jsonschema-rs, which reads some Python values that
fastjsonschema refuses (a ``decimal.Decimal`` as a whole number, an ``enum.Enum`` member as its value), so a
record in memory that ``validate_record`` refused at e47a188 now passes. The claim under test: nothing
fastjsonschema alone refused before is accepted now (``validate_record`` is called on records as built).
"""

import copy
import enum
import json
from decimal import Decimal
from pathlib import Path

import pytest

from steamcalc.errors import RecordError
from steamcalc.records.schema import validate_record

RECORD = Path(__file__).resolve().parent / "archive" / "v0_3" / "LD-01_revB.json"


class _Verdict(enum.Enum):
    """A status as a calculation might hold it, not a str: JSON has no word for it."""

    PASS = "pass"


def _record():
    return json.loads(RECORD.read_text(encoding="utf-8"))


def test_archived_record_passes():
    validate_record(_record())


@pytest.mark.parametrize("where, value", [
    (("uncertainty", "samples"), Decimal(2000)),       # fastjsonschema: "must be integer"
    (("status",), _Verdict.PASS),                       # fastjsonschema: "must be one of pass, warn, fail"
    (("title",), _Verdict.PASS),                        # fastjsonschema: "must be string"
])
def test_value_fastjsonschema_refuses_is_still_refused(where, value):
    record = copy.deepcopy(_record())
    node = record
    for key in where[:-1]:
        node = node[key]
    node[where[-1]] = value
    with pytest.raises(RecordError):
        validate_record(record)


def test_a_nan_is_refused_by_its_name_not_as_null():
    # jsonschema-rs reads a NaN as JSON's null, and the refusal (its words, _gate_problem) then names a value the
    # record does not hold: "null is not of types ... (given: None)". At e47a188 the NaN passed the schema
    # (fastjsonschema) and was refused by the writer; a refusal should name the value as it stands.
    record = copy.deepcopy(_record())
    key = next(iter(record["results"]))
    record["results"][key]["value"] = float("nan")
    with pytest.raises(RecordError) as refused:
        validate_record(record, source="LD-01_revB.json")
    assert "null" not in refused.value.message and "None" not in str(refused.value)


def test_a_numpy_float_in_a_record_being_built_passes_as_before():
    # fastjsonschema takes a float subclass as a number; the record's writer writes it as one.
    import numpy as np
    record = copy.deepcopy(_record())
    key = next(iter(record["results"]))
    record["results"][key]["value"] = np.float64(record["results"][key]["value"])
    validate_record(record)
