"""The register's memory (steamcalc.review.memory) and the states remembered within a run.

Consistency tests: a register run that takes what the same software verified before gives the same
register, row for row, as one that recomputes every record; anything edited since — a record, a report,
the software — is worked out again; a record that did not verify is never remembered. Source of every
check: the register itself run without --remember (build_register(remember=False), the default).
"""

import json
import shutil

import pytest

from steamcalc.calcs import get_calculation
from steamcalc.cases.site import case_inputs, case_site, load_case
from steamcalc.cli import main
from steamcalc.properties.engines import remembering_states
from steamcalc.review import memory as register_memory
from steamcalc.review import register as register_module
from steamcalc.review import verify as verify_module
from steamcalc.review.register import build_register


@pytest.fixture(scope="module")
def issued_site(tmp_path_factory, request):
    """The demo site with its records issued (once for the module; each test copies it)."""
    from pathlib import Path

    demo = Path(request.config.rootpath) / "workbooks" / "demo_site"
    site = tmp_path_factory.mktemp("memory") / "site"
    shutil.copytree(demo, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases")]) in (0, 1)
    return site


def _demo_count(site):
    """How many records the demo site issues (one per case file)."""
    return len(list((site / "cases").glob("*.toml")))


@pytest.fixture
def site(issued_site, tmp_path):
    copy = tmp_path / "site"
    shutil.copytree(issued_site, copy)
    return copy


@pytest.fixture
def verifications(monkeypatch):
    """Counts the records recomputed (verify_record calls)."""
    calls = []
    real = verify_module.verify_record
    monkeypatch.setattr(verify_module, "verify_record", lambda record, *a, **k: calls.append(record["id"]) or
                        real(record, *a, **k))
    return calls


def _rows(rows):
    return [row.as_dict() for row in rows]


def test_second_run_takes_what_was_verified_and_gives_the_same_register(site, verifications):
    n = _demo_count(site)
    fresh = _rows(build_register(site, remember=False))
    assert len(verifications) == n
    first = _rows(build_register(site, remember=True))
    assert len(verifications) == 2 * n
    second = _rows(build_register(site, remember=True))
    assert len(verifications) == 2 * n            # nothing recomputed: every record verified before, unchanged
    assert fresh == first == second


def test_fresh_neither_reads_nor_writes_the_memory(site, verifications):
    n = _demo_count(site)
    build_register(site, remember=False)
    assert not (register_memory.cache_folder() / register_memory.FILE_NAME).exists()
    build_register(site, remember=True)
    build_register(site, remember=False)
    assert len(verifications) == 3 * n


def test_an_edited_record_is_worked_out_again(site, verifications):
    n = _demo_count(site)
    build_register(site, remember=True)
    path = site / "records" / "FL-01_revB.json"
    record = json.loads(path.read_text("utf-8"))
    record["title"] = "edited after issue"
    path.write_text(json.dumps(record, indent=2), "utf-8")
    rows = {row.id: row for row in build_register(site, remember=True)}
    assert verifications.count("FL-01") == 2 and len(verifications) == n + 1
    assert rows["FL-01"].verification.startswith("EDITED") and not rows["FL-01"].valid


def test_an_edited_report_differs_though_its_record_was_remembered(site):
    build_register(site, remember=True)
    report = site / "records" / "HX-01_revB.md"
    report.write_text(report.read_text("utf-8").replace("Steam flow", "Steam flows"), "utf-8")
    rows = {row.id: row for row in build_register(site, remember=True)}
    assert rows["HX-01"].companions == "DIFFER: md" and "companions do not match" in rows["HX-01"].stale


def test_a_record_that_did_not_verify_is_never_remembered(site, monkeypatch, verifications):
    calc = get_calculation("flash")
    real = calc.calculate

    def off(inputs, site_data):
        result = real(inputs, site_data)
        result.values["flash_fraction"] = type(result.values["flash_fraction"])(
            result.values["flash_fraction"].label, result.values["flash_fraction"].value * 1.01, "")
        return result

    monkeypatch.setattr(calc, "calculate", off)
    for _ in range(2):
        rows = {row.id: row for row in build_register(site, remember=True)}
        assert rows["FL-01"].verification.startswith("NOT REPRODUCED")
    assert verifications.count("FL-01") == 2


def test_other_software_is_another_memory(site, monkeypatch, verifications):
    n = _demo_count(site)
    build_register(site, remember=True)
    monkeypatch.setattr(register_memory, "software_fingerprint", lambda: "sha256:another build")
    build_register(site, remember=True)
    assert len(verifications) == 2 * n


@pytest.mark.parametrize("content", ["not json {", '{"software": 1, "records": []}', '["a list"]'])
def test_an_unreadable_memory_is_not_used(site, verifications, content):
    n = _demo_count(site)
    folder = register_memory.cache_folder()
    folder.mkdir(parents=True, exist_ok=True)
    (folder / register_memory.FILE_NAME).write_text(content, "utf-8")
    rows = build_register(site, remember=True)
    assert len(verifications) == n and all(row.verification == "verified" for row in rows)


def test_register_row_without_a_memory_is_as_before(site):
    from steamcalc.records.record import load_record

    path = site / "records" / "LD-02_revB.json"
    row = register_module.register_row(path, load_record(path), trusted={})
    assert row.verification == "verified" and row.companions == "match"


@pytest.mark.parametrize("case_id", ["LD-01", "LD-02", "FL-01", "HX-01"])
def test_remembered_states_give_the_very_same_results(case_id, demo_site_dir):
    case = load_case(demo_site_dir / "cases" / f"{case_id}.toml")
    site_data = case_site(case)
    inputs, _ = case_inputs(case, site_data)
    calc = get_calculation(case.kind)
    plain = calc.calculate(inputs, site_data)
    with remembering_states():
        once, twice = calc.calculate(inputs, site_data), calc.calculate(inputs, site_data)
    for remembered in (once, twice):
        assert {k: v.value for k, v in remembered.values.items()} == {k: v.value for k, v in plain.values.items()}
        assert [s.to_record() for s in remembered.steps] == [s.to_record() for s in plain.steps]


def test_a_record_not_remembered_is_still_checked_against_the_schema(site):
    from steamcalc.records.record import compute_content_digest, compute_digest

    build_register(site, remember=True)
    path = site / "records" / "LD-02_revB.json"
    record = json.loads(path.read_text("utf-8"))
    record["status"] = "fine"          # no status the schema knows
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)   # its digests made to hold: only the schema can refuse it
    path.write_text(json.dumps(record, indent=2), "utf-8")
    rows = {row.json: row for row in build_register(site, remember=True)}
    row = rows["LD-02_revB.json"]
    assert row.verification.startswith("not a readable record") and not row.valid


def test_forked_workers_remember_what_they_verified(site, monkeypatch, verifications):
    """Workers forked by the register send what their copy of the memory learnt back with their rows: the memory
    the parent writes holds every record, and a later run in one process recomputes none of them."""
    import sys

    from steamcalc.review import forked

    if sys.platform == "win32":
        pytest.skip("forked workers are a POSIX facility")
    monkeypatch.setattr(forked, "SMALLEST_SHARE", 1)   # the demo site's few records shared over two workers
    alone = _rows(build_register(site, remember=False))
    n = len(verifications)
    # The issuing fixture's progress bar leaves a monitor thread behind, which would keep the register in one process.
    monkeypatch.setattr(forked.threading, "active_count", lambda: 1)
    assert forked.usable_workers(n - 1, 2) == 2
    shared = _rows(build_register(site, remember=True, workers=2))
    memory = json.loads((register_memory.cache_folder() / register_memory.FILE_NAME).read_text("utf-8"))
    assert len(memory["records"]) == n == len(alone)
    assert all(entry.get("status") and set(entry.get("reports", {})) == {".html", ".md"}
               for entry in memory["records"].values())
    assert n < len(verifications) < 2 * n   # the parent made its share; the workers made theirs out of its sight
    before = len(verifications)
    again = _rows(build_register(site, remember=True))
    assert len(verifications) == before   # nothing recomputed: every record remembered, by parent and workers
    assert alone == shared == again


def test_two_runs_remembering_at_once_keep_each_others_entries(tmp_path):
    """Each save reads the file again under its lock and adds its own entries: the last writer no longer wins."""
    from steamcalc.review.memory import RegisterMemory

    first, second = RegisterMemory.open(tmp_path), RegisterMemory.open(tmp_path)   # both read an empty memory
    first.absorb(("sha256:a", {"status": "pass", "failing": []}))
    second.absorb(("sha256:b", {"status": "warn", "failing": []}))
    first.save()
    second.save()
    again = RegisterMemory.open(tmp_path)
    assert again.verified({"digest": "sha256:a"}, True) == ("pass", [])
    assert again.verified({"digest": "sha256:b"}, True) == ("warn", [])


def test_a_temporary_file_a_killed_run_left_is_swept_and_a_fresh_one_kept(tmp_path):
    import os
    import time

    from steamcalc.review.memory import FILE_NAME, LEFT_BEHIND_SECONDS, RegisterMemory

    old, fresh = tmp_path / f".{FILE_NAME}.killed.part", tmp_path / f".{FILE_NAME}.running.part"
    old.write_text("{half", "utf-8")
    fresh.write_text("{half", "utf-8")
    then = time.time() - LEFT_BEHIND_SECONDS - 60
    os.utime(old, (then, then))
    memory = RegisterMemory.open(tmp_path)
    memory.absorb(("sha256:a", {"status": "pass", "failing": []}))
    memory.save()
    assert not old.exists() and fresh.exists()
    assert RegisterMemory.open(tmp_path).verified({"digest": "sha256:a"}, True) == ("pass", [])
