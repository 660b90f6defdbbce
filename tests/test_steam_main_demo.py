"""The demo main SM-01 says what the issue's demo is (the return from HX-01's trap and the drip traps to FL-01's
vessel), and the figures it takes from common practice are marked so in its record."""

from pathlib import Path

import pytest

from steamcalc.cases.site import case_site, load_case
from steamcalc.records.build import record_for_case

CASES = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site" / "cases"


@pytest.fixture(scope="module")
def record(demo_linked_records):
    case = load_case(CASES / "SM-01.toml")
    return record_for_case(case, case_site(case), with_uncertainty=False, record_folder=demo_linked_records)[0]


def test_the_demo_return_runs_from_the_heaters_and_drip_traps_to_the_flash_vessel(record):
    note = next(a for a in record["assumptions"] if a.startswith("Engineer's note: ") and "return line" in a)
    assert "HX-01's trap" in note and "drip traps" in note
    # The heater's condensate into that line is HX-01's own record's, not a copied figure (release 0.3.2).
    assert record["inputs"]["load_link_condensate"]["value"] == "the heater record's condensate flow at design duty"
    linked = next(a for a in record["assumptions"] if a.startswith("Steam flow: "))
    assert linked.endswith("the heater's condensate into the return line: the same record's condensate flow at "
                           "design duty")
    assert "FL-01's flash vessel" in note
    assert "CIP water heater" in record["title"] and "flash vessel" in record["title"]


def test_limits_left_at_their_defaults_are_marked_common_practice(record, demo_linked_records):
    """SM-01 gives no velocity limit and no return-line drop limit: the checks against them say common practice."""
    assert record["inputs"]["velocity_limit"]["given"] == "(default)"
    assert record["inputs"]["return_drop_limit"]["given"] == "(default)"
    sources = {c["name"]: c.get("source", "") for c in record["checks"]}
    for name in ("Segment 1: steam velocity", "Segment 3: steam velocity", "Return line friction drop"):
        assert sources[name].startswith("common practice"), (name, sources[name])
    for name in ("Segment 1: jacket touch temperature", "Main pressure gradient",
                 "Return line homogeneous velocity"):
        assert sources[name] == "common practice", name
    labels = [r["label"] for r in record["results"].values()]
    assert "Drip leg 1: pocket size and depth (common practice)" in labels
    assert "Drip trap types to consider (common practice)" in labels
    # A limit the case gives is the input's, not common practice.
    case = load_case(CASES / "SM-01.toml")
    case.inputs["velocity_limit"] = "30 m/s"
    given = record_for_case(case, case_site(case), with_uncertainty=False, record_folder=demo_linked_records)[0]
    assert {c["name"]: c.get("source") for c in given["checks"]}["Segment 1: steam velocity"] == \
        "the input velocity limit"
