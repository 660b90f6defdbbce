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


def test_a_worker_reads_a_linked_record_again_from_its_memory_and_an_edited_copy_is_still_refused(issued, tmp_path):
    from steamcalc.errors import RecordError
    from steamcalc.records import record as records
    from steamcalc.records.record import read_intact_record, remember_intact_records_from_now

    folder, _ = issued
    source = folder / "LD-01_revB.json"
    copy = tmp_path / source.name
    copy.write_text(source.read_text(encoding="utf-8"), encoding="utf-8")

    def in_a_worker():
        remember_intact_records_from_now()
        first = read_intact_record(copy)
        checked = []
        real = records._record_from_text
        records._record_from_text = lambda *a, **k: checked.append(1) or real(*a, **k)
        try:
            again = read_intact_record(copy)
            # The title edited: the text is new, so it is read and checked afresh, and its digest refuses it.
            copy.write_text(copy.read_text(encoding="utf-8").replace('"title": "', '"title": "Edited ', 1),
                            encoding="utf-8")
            with pytest.raises(RecordError, match="digest does not match"):
                read_intact_record(copy)
        finally:
            records._record_from_text = real
        return first, again, checked

    first, again, checked = contextvars.copy_context().run(in_a_worker)
    assert again == first and checked == [1]
