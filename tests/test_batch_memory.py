"""A batch's worker remembers the states its cases evaluate: the records it writes are the very same.

Remembering changes how often a state is evaluated, never a value (each engine function is pure). These tests
issue every demo case twice in one context that remembers (the second time every state comes from memory) and
once without, and compare the records' content digests; and check that a case's own block keeps to the memory
of the worker it runs in.
"""

import contextvars
from pathlib import Path

import pytest

from steamcalc.cases.site import case_site, load_case
from steamcalc.properties.engines import engine_module, remember_states_from_now, remembering_states
from steamcalc.records.build import record_for_case

DEMO = Path(__file__).resolve().parents[1] / "workbooks" / "demo_site"
CASES = sorted(p for p in (DEMO / "cases").glob("*.toml"))


def _digest(path, records):
    case = load_case(path)
    record, _ = record_for_case(case, case_site(case, None), created="2026-01-01T00:00:00Z",
                                with_uncertainty=False, record_folder=records)
    return record["content_digest"]


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """The demo records, issued without remembering, so that linking cases find the records they link."""
    from steamcalc.records.record import write_record

    folder = tmp_path_factory.mktemp("records")
    digests = {}
    for path in sorted(CASES, key=lambda p: p.stem.startswith(("SB", "SM"))):
        case = load_case(path)
        record, _ = record_for_case(case, case_site(case, None), created="2026-01-01T00:00:00Z",
                                    with_uncertainty=False, record_folder=folder)
        write_record(record, folder)
        digests[path.stem] = record["content_digest"]
    return folder, digests


def test_every_demo_record_is_the_same_when_its_states_come_from_a_workers_memory(issued):
    folder, without = issued

    def in_a_worker():
        remember_states_from_now()
        first = {p.stem: _digest(p, folder) for p in CASES}
        again = {p.stem: _digest(p, folder) for p in CASES}   # every state from memory now
        return first, again

    first, again = contextvars.copy_context().run(in_a_worker)
    assert first == without and again == without
    assert len(without) == len(CASES) >= 5


def test_a_cases_block_keeps_to_the_memory_of_the_worker_it_runs_in():
    def in_a_worker():
        remember_states_from_now()
        with remembering_states():
            engine_module().saturation_temperature(3.5e5)
        with remembering_states():
            return engine_module()._remembered

    memory = contextvars.copy_context().run(in_a_worker)
    assert any(key[1] == "saturation_temperature" and key[2] == (3.5e5,) for key in memory)


def test_outside_a_worker_nothing_is_remembered_after_a_block_ends():
    with remembering_states():
        engine_module().saturation_temperature(4.5e5)
    assert not hasattr(engine_module(), "_remembered")
