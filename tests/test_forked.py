"""The register's forked workers: the same answers in the same order as one process, errors raised by name
in the parent, and Ctrl-C stopping every worker without a traceback."""

import os
import signal
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

from steamcalc.errors import SteamcalcError
from steamcalc.review import forked
from steamcalc.review.forked import map_forked, usable_workers

ROOT = Path(__file__).resolve().parents[1]
pytestmark = pytest.mark.skipif(sys.platform == "win32", reason="forked workers are a POSIX facility")


def test_forked_answers_equal_one_process_in_order():
    def work(i):
        return {"index": i, "square": i * i, "pid": os.getpid()}

    shared = map_forked(work, 40, 3)
    alone = map_forked(work, 40, 1)
    assert [a["square"] for a in shared] == [a["square"] for a in alone] == [i * i for i in range(40)]
    assert len({a["pid"] for a in shared}) == 3   # the work really was shared


def test_a_workers_error_is_raised_in_the_parent_with_its_field_and_fix():
    def work(i):
        if i == 7:
            raise SteamcalcError("bad record", field="flow", value="-1 kg/h", fix="give a positive flow",
                                 source="records/X.json")
        return i

    with pytest.raises(SteamcalcError) as caught:
        map_forked(work, 20, 2)
    assert caught.value.message == "bad record"
    assert (caught.value.field, caught.value.fix) == ("flow", "give a positive flow")
    assert "records/X.json" in str(caught.value)


def test_small_work_and_threaded_processes_keep_to_one_process(monkeypatch):
    assert usable_workers(3) == 1
    monkeypatch.setattr(forked.threading, "active_count", lambda: 2)
    assert usable_workers(1000) == 1


def test_register_rows_are_the_same_shared_or_not(tmp_path, monkeypatch):
    from steamcalc.cli import main
    from steamcalc.review.register import build_register

    import shutil
    site = tmp_path / "site"
    shutil.copytree(ROOT / "workbooks" / "demo_site", site, ignore=shutil.ignore_patterns("records"))
    for case in (site / "cases").glob("*.toml"):
        if case.stem[:2] not in ("LD", "FL", "HX"):
            case.unlink()   # the linking kinds need every record they link; these five stand alone
    assert main(["run", str(site / "cases")]) in (0, 1)
    monkeypatch.setattr(forked, "SMALLEST_SHARE", 1)
    alone = build_register(site, workers=1)
    shared = build_register(site, workers=2)
    assert len(alone) == len(list((site / "records").glob("*.json"))) >= 5
    assert [vars(r) for r in shared] == [vars(r) for r in alone]


SCRIPT = textwrap.dedent("""
    import sys, time
    from steamcalc.review.forked import map_forked
    def work(i):
        if i == 0:
            print("started", flush=True)
        time.sleep(0.2)
        return i
    try:
        map_forked(work, 200, 2)
    except KeyboardInterrupt:
        print("interrupted", flush=True)
        sys.exit(130)
""")


def test_ctrl_c_stops_every_worker_without_a_traceback():
    process = subprocess.Popen([sys.executable, "-c", SCRIPT], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                               text=True, cwd=ROOT, start_new_session=True)
    assert process.stdout.readline().strip() == "started"
    os.killpg(process.pid, signal.SIGINT)   # as a terminal does: to the parent and its workers
    out, err = process.communicate(timeout=120)
    assert process.returncode == 130, err
    assert "interrupted" in out
    assert "Traceback" not in err, err
    with pytest.raises(ProcessLookupError):   # no worker left behind in the group
        os.killpg(process.pid, 0)


AT_THE_FORK = textwrap.dedent("""
    import multiprocessing.process, os, signal, sys
    from steamcalc.review.forked import map_forked
    start = multiprocessing.process.BaseProcess.start
    def start_then_ctrl_c(self):
        start(self)
        os.killpg(0, signal.SIGINT)   # the worst instant: the worker is still in Python's start-up after the fork
    multiprocessing.process.BaseProcess.start = start_then_ctrl_c
    try:
        map_forked(lambda i: i, 200, 2)
        print("finished", flush=True)
    except KeyboardInterrupt:
        print("interrupted", flush=True)
        sys.exit(130)
""")


def test_ctrl_c_the_instant_a_worker_is_forked_interrupts_the_parent_and_no_worker_prints_a_traceback():
    # Ctrl-C is held while the parent forks; the worker lets it through only once it ignores it.
    done = subprocess.run([sys.executable, "-c", AT_THE_FORK], capture_output=True, text=True, cwd=ROOT,
                          start_new_session=True, timeout=120)
    assert (done.returncode, done.stdout.strip()) == (130, "interrupted"), done.stderr
    assert "Traceback" not in done.stderr, done.stderr


BATCH_AT_THE_FORK = textwrap.dedent("""
    import multiprocessing.process, os, signal, sys
    from pathlib import Path
    from steamcalc.batch.batch import run_cases
    start = multiprocessing.process.BaseProcess.start
    def start_then_ctrl_c(self):
        start(self)
        os.killpg(0, signal.SIGINT)
    multiprocessing.process.BaseProcess.start = start_then_ctrl_c
    cases = sorted(Path(sys.argv[1]).glob("*.toml"))
    outcomes = run_cases(cases, out_override=sys.argv[2], progress=False)
    print("not run:", sum(o.interrupted for o in outcomes), "of", len(outcomes), flush=True)
""")


def test_ctrl_c_the_instant_a_batch_worker_starts_stops_the_batch_without_a_traceback(tmp_path):
    cases = ROOT / "workbooks" / "demo_site" / "cases"
    done = subprocess.run([sys.executable, "-c", BATCH_AT_THE_FORK, str(cases), str(tmp_path / "records")],
                          capture_output=True, text=True, cwd=ROOT, start_new_session=True, timeout=300)
    assert "Traceback" not in done.stderr, done.stderr
    count = len(list(cases.glob("*.toml")))
    assert done.stdout.strip() == f"not run: {count} of {count}", (done.stdout, done.stderr)
