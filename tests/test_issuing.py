"""Issuing is crash-safe and concurrency-safe: the set invariant under kills, races and a full disk.

The set invariant: a record's JSON is the truth, and its reports never claim more than it. After
a kill at any instant, what is on disk is the old set or (once the next writer has finished the
interrupted commit) the new set; nothing left behind blocks the next run.
"""

import errno
import multiprocessing
import os
import random
import re
import shutil
import signal
import sys
import time
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.errors import RecordConflictError, RecordError
from steamcalc.records.issuing import WORK_FOLDER, record_lock, recover
from steamcalc.records.record import load_record, write_record
from steamcalc.render.report import RENDERERS
from steamcalc.review.verify import verify_record
from steamcalc.review.sign import sign_with_key

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
FORK = multiprocessing.get_context("fork")
SIGNED_MARK = "Signed as checked"


@pytest.fixture
def site(tmp_path):
    shutil.copytree(DEMO, tmp_path / "site", ignore=shutil.ignore_patterns("records"))
    return tmp_path / "site"


def _run(*args):
    return main([str(a) for a in args])


def _visible(out, stem):
    return {p.suffix: p for p in out.glob(f"{stem}.*")} if out.exists() else {}


def assert_set_invariant(out, stem):
    """What a reader sees now: no report without its JSON, no report claiming more than the JSON."""
    files = _visible(out, stem)
    if ".json" not in files:
        assert not files, f"reports without their JSON: {sorted(files)}"
        return None
    record = load_record(files[".json"])
    outcome = verify_record(record)
    assert outcome.digest_ok and outcome.content_digest_ok
    for suffix, render in RENDERERS.items():
        if suffix in files:
            text = files[suffix].read_text(encoding="utf-8")
            if not record.get("signatures"):
                assert SIGNED_MARK not in text, f"{suffix} says signed beside an unsigned JSON"
    return record


def assert_complete_set(out, stem):
    """After the next writer: the whole set, reports matching the JSON, nothing left over."""
    files = _visible(out, stem)
    assert set(files) == {".json", *RENDERERS}, sorted(files)
    record = load_record(files[".json"])
    for suffix, render in RENDERERS.items():
        assert files[suffix].read_text(encoding="utf-8") == render(record), f"{suffix} is stale"
    assert not list((out / WORK_FOLDER).glob("*.staged")) and not list(out.glob(".*.part"))
    return record


def _child(env, argv):
    os.environ.update(env)
    sys.stdout = sys.stderr = open(os.devnull, "w")
    os._exit(main([str(a) for a in argv]))


def _key(folder, name="C. Checker"):
    """A signing key pair made in ``folder``; the private key file's path."""
    assert main(["keys", "new", "--name", name, "--out", str(folder)]) == 0
    return Path(folder) / (re.sub(r"[^A-Za-z0-9]+", "-", name).strip("-").lower() + ".key")


def _signers_of(record):
    return [s["name"] for s in record.get("signatures") or []]


def _forked(argv, env=None):
    process = FORK.Process(target=_child, args=(env or {}, argv))
    process.start()
    return process


KILL_POINTS = ["staged:0", "staged:1", "staged:2", "listed", "moved:0", "moved:1", "moved:2"]


@pytest.mark.parametrize("point", KILL_POINTS)
def test_kill_during_run_leaves_old_or_new_set(site, tmp_path, point):
    case, out = site / "cases" / "LD-02.toml", tmp_path / "out"
    process = _forked(["run", case, "--out", out], {"STEAMCALC_TEST_KILL_AT": point})
    process.join(30)
    assert process.exitcode == -signal.SIGKILL
    assert_set_invariant(out, "LD-02_revB")
    assert _run("run", case, "--out", out) == 0   # never a blocker; the interrupted issue is finished or undone
    assert_complete_set(out, "LD-02_revB")


@pytest.mark.parametrize("point", KILL_POINTS)
def test_kill_during_sign_never_shows_a_signature_the_json_lacks(site, tmp_path, point):
    case, out = site / "cases" / "LD-02.toml", tmp_path / "out"
    assert _run("run", case, "--out", out) == 0
    path = out / "LD-02_revB.json"
    key = _key(tmp_path / "keys")
    process = _forked(["sign", path, "--key", key], {"STEAMCALC_TEST_KILL_AT": point})
    process.join(30)
    assert process.exitcode == -signal.SIGKILL
    before = assert_set_invariant(out, "LD-02_revB")
    with record_lock(out, "LD-02_revB"):
        recover(out, "LD-02_revB")   # what the next run, save or sign-off does first
    after = assert_complete_set(out, "LD-02_revB")
    assert _signers_of(after) == ([] if point.startswith("staged") else ["C. Checker"])
    assert _signers_of(before) == _signers_of(after) or point == "listed"
    if _signers_of(after):
        assert SIGNED_MARK in (out / "LD-02_revB.html").read_text()
    else:
        assert _run("sign", path, "--key", key) == 0


def test_kills_at_random_instants(site, tmp_path):
    """The same invariant with kills at arbitrary moments rather than the named points."""
    case, out = site / "cases" / "LD-02.toml", tmp_path / "out"
    rng = random.Random(14)
    started = time.perf_counter()
    _run("run", case, "--out", tmp_path / "probe")
    duration = time.perf_counter() - started
    for attempt in range(8):
        shutil.rmtree(out, ignore_errors=True)
        process = _forked(["run", case, "--out", out])
        time.sleep(rng.uniform(0.0, 1.5 * duration))
        os.kill(process.pid, signal.SIGKILL)
        process.join(30)
        assert_set_invariant(out, "LD-02_revB")
        assert _run("run", case, "--out", out) == 0
        assert_complete_set(out, "LD-02_revB")


# -- two writers at once ---------------------------------------------------------------------------------
def _writer(barrier, results, case, out, flow):
    text = case.read_text().replace('"2.0 t/h"', f'"{flow} t/h"')
    own = case.with_name(f"race-{flow}.toml")
    own.write_text(text)
    from steamcalc.records.build import record_for_case_file
    record = record_for_case_file(own)
    barrier.wait()
    try:
        _, status = write_record(record, out, RENDERERS)
        results.put((flow, status))
    except RecordConflictError as exc:
        results.put((flow, f"refused: {exc}"))


def test_two_concurrent_runs_of_different_content(site, tmp_path):
    case = site / "cases" / "LD-02.toml"
    for attempt in range(4):
        out = tmp_path / f"out{attempt}"
        barrier, results = FORK.Barrier(2), FORK.Queue()
        writers = [FORK.Process(target=_writer, args=(barrier, results, case, out, flow)) for flow in ("2.0", "2.2")]
        for w in writers:
            w.start()
        outcomes = dict(results.get(timeout=60) for _ in writers)
        for w in writers:
            w.join(30)
        statuses = sorted(outcomes.values())
        assert statuses[0].startswith("refused: ") and "already exists with different content" in statuses[0]
        assert statuses[1] == "written", outcomes
        winner = next(flow for flow, s in outcomes.items() if s == "written")
        record = assert_complete_set(out, "LD-02_revB")
        assert record["inputs"]["mass_flow"]["given"] == f"{winner} t/h"


def _signer(barrier, results, path, name, key, trusted):
    barrier.wait()
    try:
        sign_with_key(path, key, trusted_dir=trusted)
        results.put((name, "signed"))
    except RecordError as exc:
        results.put((name, f"refused: {exc}"))


def test_two_concurrent_signoffs_one_wins_none_lost(site, tmp_path):
    case, out = site / "cases" / "LD-02.toml", tmp_path / "out"
    assert _run("run", case, "--out", out) == 0
    path = out / "LD-02_revB.json"
    barrier, results = FORK.Barrier(2), FORK.Queue()
    keys = {name: _key(tmp_path / "keys", name) for name in ("A. One", "B. Two")}
    trusted = tmp_path / "trusted"
    trusted.mkdir()
    for key in keys.values():
        shutil.copy(key.with_suffix(".pub"), trusted)
    signers = [FORK.Process(target=_signer, args=(barrier, results, path, name, keys[name], trusted)) for name in keys]
    for s in signers:
        s.start()
    outcomes = dict(results.get(timeout=60) for _ in signers)
    for s in signers:
        s.join(30)
    winners = [n for n, s in outcomes.items() if s == "signed"]
    assert len(winners) == 1, outcomes
    loser = next(s for s in outcomes.values() if s != "signed")
    assert "already signed as checked" in loser
    record = assert_complete_set(out, "LD-02_revB")
    assert _signers_of(record) == winners


def test_second_writer_waits_then_fails_clearly(site, tmp_path, capsys, monkeypatch):
    case, out = site / "cases" / "LD-02.toml", tmp_path / "out"
    monkeypatch.setenv("STEAMCALC_LOCK_TIMEOUT", "0.3")
    holder = FORK.Process(target=_hold_lock, args=(out, "LD-02_revB", 300.0))  # until terminated below
    holder.start()
    deadline = time.monotonic() + 20
    while not (out / WORK_FOLDER / "held").exists() and time.monotonic() < deadline:
        time.sleep(0.05)
    try:
        assert _run("run", case, "--out", out) == 2
        assert "another steamcalc is writing record LD-02_revB" in capsys.readouterr().err
        from steamcalc.ui.workbook import Workbook
        saved = Workbook(case, out).save()
        assert saved.startswith("not saved") and "another steamcalc is writing" in saved
    finally:
        holder.terminate()
        holder.join(10)
    assert _run("run", case, "--out", out) == 0


def _hold_lock(out, stem, seconds):
    with record_lock(out, stem):
        (Path(out) / WORK_FOLDER / "held").write_text("")
        time.sleep(seconds)


# -- a full disk -----------------------------------------------------------------------------------------
@pytest.fixture
def full_disk(monkeypatch, tmp_path):
    """os.write into files under tmp_path fails with ENOSPC once `allowance` bytes are written."""
    real_write = os.write
    state = {"allowance": None}

    def write(fd, data):
        if state["allowance"] is not None:
            try:
                target = os.readlink(f"/proc/self/fd/{fd}")
            except OSError:
                target = ""
            if target.startswith(str(tmp_path)):
                if state["allowance"] < len(data):
                    raise OSError(errno.ENOSPC, "No space left on device")
                state["allowance"] -= len(data)
        return real_write(fd, data)

    monkeypatch.setattr(os, "write", write)
    return state


def _snapshot(folder):
    return {p.relative_to(folder): p.read_bytes() for p in folder.rglob("*") if p.is_file()
            and not p.name.endswith(".lock")}


@pytest.mark.parametrize("allowance", [0, 5000, 30000])
def test_disk_full_during_run_leaves_nothing_half_issued(site, tmp_path, capsys, full_disk, allowance):
    case, out = site / "cases" / "LD-02.toml", tmp_path / "out"
    full_disk["allowance"] = allowance
    assert _run("run", case, "--out", out) == 2
    err = capsys.readouterr().err
    assert "No space left on device" in err and "free some disk space" in err and "internal error" not in err
    assert_set_invariant(out, "LD-02_revB")
    assert not _visible(out, "LD-02_revB") and not list((out / WORK_FOLDER).glob("*.staged"))
    full_disk["allowance"] = None
    assert _run("run", case, "--out", out) == 0
    assert_complete_set(out, "LD-02_revB")


def test_disk_full_during_sign_and_index_keeps_the_old_files(site, tmp_path, capsys, full_disk):
    out = tmp_path / "out"
    cases = [site / "cases" / "LD-02.toml", site / "cases" / "FL-01.toml"]
    assert _run("run", *cases, "--out", out) == 0
    key = _key(tmp_path / "keys")
    before = _snapshot(out)
    full_disk["allowance"] = 20000
    assert _run("sign", out / "LD-02_revB.json", "--key", key) == 1
    assert "No space left on device" in capsys.readouterr().err
    full_disk["allowance"] = 0
    assert _run("run", *cases, "--out", out) == 2   # records unchanged; the index cannot be rewritten
    assert "No space left on device" in capsys.readouterr().err
    assert _snapshot(out) == before
    assert not list(out.glob(".*.part"))


# -- never overwrite what steamcalc did not write ---------------------------------------------------
def test_diff_html_never_replaces_a_record(site, tmp_path, capsys):
    out = tmp_path / "out"
    case = site / "cases" / "LD-02.toml"
    assert _run("run", case, "--out", out) == 0
    a = out / "LD-02_revB.json"
    before = a.read_bytes()
    for extra in ([], ["--force"]):
        assert _run("diff", a, a, "--html", a, *extra) == 2
        assert a.read_bytes() == before
    foreign = tmp_path / "notes.html"
    foreign.write_text("<html>my own notes</html>")
    assert _run("diff", a, a, "--html", foreign) == 2
    assert foreign.read_text() == "<html>my own notes</html>"
    assert "--force" in capsys.readouterr().err
    assert _run("diff", a, a, "--html", foreign, "--force") == 0
    assert _run("diff", a, a, "--html", foreign) == 0   # now its own output: replaced freely


def test_run_refuses_a_foreign_report_file_unless_forced(site, tmp_path, capsys):
    case, out = site / "cases" / "LD-02.toml", tmp_path / "out"
    out.mkdir()
    (out / "LD-02_revB.html").write_text("<html>someone's page</html>")
    assert _run("run", case, "--out", out) == 2
    assert "was not written by steamcalc" in capsys.readouterr().err
    assert (out / "LD-02_revB.html").read_text() == "<html>someone's page</html>"
    assert not (out / "LD-02_revB.json").exists()
    assert _run("run", case, "--out", out, "--force") == 0
    assert_complete_set(out, "LD-02_revB")


def test_leftovers_of_an_older_interrupted_run_are_cleaned_not_blockers(site, tmp_path):
    case, out = site / "cases" / "LD-02.toml", tmp_path / "out"
    assert _run("run", case, "--out", out) == 0
    html = (out / "LD-02_revB.html").read_text()
    shutil.rmtree(out)
    out.mkdir()
    (out / "LD-02_revB.html").write_text(html)            # a report without its JSON
    (out / ".LD-02_revB.json.x1y2.part").write_text("{")   # a stray temporary file
    assert _run("run", case, "--out", out) == 0
    assert_complete_set(out, "LD-02_revB")


def test_foreign_index_and_companions_are_refused(site, tmp_path, capsys):
    from steamcalc.records.companions import write_pdf
    out = tmp_path / "out"
    out.mkdir()
    (out / "index.html").write_text("<html>team wiki page</html>")
    cases = [site / "cases" / "LD-02.toml", site / "cases" / "FL-01.toml"]
    assert _run("run", *cases, "--out", out) == 2
    assert "index.html" in capsys.readouterr().err and (out / "index.html").read_text() == "<html>team wiki page</html>"
    (out / "LD-02_revB.pdf").write_bytes(b"%PDF-1.4 someone else's drawing")
    with pytest.raises(Exception, match="not written by steamcalc"):
        write_pdf(out / "LD-02_revB.html")


def test_out_that_is_a_file_is_refused(site, tmp_path, capsys):
    target = tmp_path / "afile"
    target.write_text("x")
    assert _run("run", site / "cases" / "LD-02.toml", "--out", target) == 2
    err = capsys.readouterr().err
    assert "not a folder" in err and "internal error" not in err


# -- batch: error boundaries, the index always, Ctrl-C -------------------------------------------------
def test_unexpected_error_fails_only_its_case(site, tmp_path, capsys, monkeypatch):
    import steamcalc.calcs.flash.calculation as flash

    def broken(inputs, site):
        raise RuntimeError("simulated fault")

    monkeypatch.setattr(flash, "calculate", broken)
    bad_site = site / "cases" / "bad-site.toml"
    bad_site.write_text((site / "cases" / "LD-02.toml").read_text().replace('site = "../site.toml"', "site = 123")
                        .replace('id = "LD-02"', 'id = "BAD"'))
    out = tmp_path / "out"
    code = _run("run", site / "cases" / "LD-02.toml", bad_site, site / "cases" / "FL-01.toml", "--out", out)
    assert code == 2
    err = capsys.readouterr().err
    assert "2 of 3 case(s) not run" in err
    assert "field 'site'" in err and "FL-01.toml: unexpected error RuntimeError: simulated fault" in err
    assert err.count("please report") == 1
    assert (out / "LD-02_revB.json").exists()
    index = (out / "index.html").read_text()
    assert "LD-02" in index and "bad-site.toml" in index and "FL-01.toml" in index


def _batch_child(argv, stderr_path):
    fd = os.open(stderr_path, os.O_WRONLY | os.O_CREAT)
    os.dup2(fd, 2)
    sys.stdout = open(os.devnull, "w")
    sys.stderr = os.fdopen(2, "w", buffering=1)
    signal.signal(signal.SIGINT, signal.default_int_handler)
    os._exit(main([str(a) for a in argv]))


def test_ctrl_c_stops_the_batch_writes_the_index_and_lists_what_did_not_run(site, tmp_path):
    cases = site / "cases"
    heavy = (cases / "LD-01.toml").read_text()
    assert "[uncertainty]" in heavy
    for n in range(6):
        (cases / f"HEAVY-{n}.toml").write_text(
            re.sub(r"(?m)^samples = .*$", "samples = 100000", heavy.replace('id = "LD-01"', f'id = "HEAVY-{n}"')))
    out = tmp_path / "out"
    names = ["LD-02.toml", "FL-01.toml"] + [f"HEAVY-{n}.toml" for n in range(6)]
    stderr_path = tmp_path / "stderr.txt"
    process = FORK.Process(target=_batch_child, args=(["run", *[cases / n for n in names], "--out", out, "--quiet"],
                                                      stderr_path))
    process.start()
    deadline = time.monotonic() + 120
    while not (out / "FL-01_revB.json").exists() and time.monotonic() < deadline and process.is_alive():
        time.sleep(0.05)
    assert process.is_alive(), stderr_path.read_text()
    time.sleep(0.3)
    os.kill(process.pid, signal.SIGINT)
    started = time.monotonic()
    process.join(60)
    stopped_after = time.monotonic() - started
    stderr = stderr_path.read_text()
    assert process.exitcode == 130, stderr
    assert stopped_after < 10, stopped_after   # the promise is about two seconds; slack for a loaded machine
    assert "did not run" in stderr and "HEAVY-5.toml" in stderr
    assert (out / "index.html").exists() and "LD-02" in (out / "index.html").read_text()
    assert "Traceback" not in stderr
    for n in range(6):
        assert_set_invariant(out, f"HEAVY-{n}_revB")


# -- permissions follow the umask -----------------------------------------------------------------------
@pytest.mark.parametrize("umask, file_mode, dir_mode", [(0o022, 0o644, 0o755), (0o027, 0o640, 0o750)])
def test_permissions_follow_the_umask(site, tmp_path, umask, file_mode, dir_mode):
    old = os.umask(umask)
    try:
        out = tmp_path / "out"
        assert _run("run", site / "cases" / "LD-02.toml", site / "cases" / "FL-01.toml", "--out", out) == 0
        assert _run("sign", out / "LD-02_revB.json", "--key", _key(tmp_path / "keys")) == 0
        for name in ("LD-02_revB.json", "LD-02_revB.html", "LD-02_revB.md", "index.html", "index.csv"):
            assert (out / name).stat().st_mode & 0o777 == file_mode, name
        assert out.stat().st_mode & 0o777 == dir_mode
        assert _run("new-site", tmp_path / "plant2", "--from", site) == 0
        assert (tmp_path / "plant2").stat().st_mode & 0o777 == dir_mode
        assert (tmp_path / "plant2" / "site.toml").stat().st_mode & 0o777 == file_mode
    finally:
        os.umask(old)


def _piped_child(argv, read_end, write_end, stderr_path):
    os.close(read_end)   # only the test holds the reading end, so closing it breaks the pipe
    os.dup2(write_end, 1)
    fd = os.open(stderr_path, os.O_WRONLY | os.O_CREAT)
    os.dup2(fd, 2)
    sys.stdout = os.fdopen(1, "w", buffering=1)
    sys.stderr = os.fdopen(2, "w", buffering=1)
    os._exit(main([str(a) for a in argv]))


def test_closed_pipe_ends_quietly(site, tmp_path):
    """`steamcalc verify ... | head`: the reader goes away, steamcalc stops without a traceback."""
    out = tmp_path / "out"
    assert _run("run", site / "cases" / "LD-02.toml", "--out", out) == 0
    record = out / "LD-02_revB.json"
    read_end, write_end = os.pipe()
    stderr_path = tmp_path / "stderr.txt"
    process = FORK.Process(target=_piped_child, args=(["verify"] + [record] * 40, read_end, write_end, stderr_path))
    process.start()
    os.close(write_end)
    os.read(read_end, 10)
    os.close(read_end)   # as head does after its first bytes
    process.join(60)
    assert process.exitcode is not None, "still writing into a closed pipe"
    stderr = stderr_path.read_text()
    assert "BrokenPipe" not in stderr and "internal error" not in stderr and "Traceback" not in stderr, stderr


def test_verify_reports_every_file(site, tmp_path, capsys):
    out = tmp_path / "out"
    assert _run("run", site / "cases" / "LD-02.toml", "--out", out) == 0
    bad = tmp_path / "bad.json"
    bad.write_text("{not json")
    good = out / "LD-02_revB.json"
    assert _run("verify", bad, good, tmp_path / "missing.json") == 2
    captured = capsys.readouterr()
    assert "verdict: VERIFIED" in captured.out
    assert str(bad) in captured.err and "missing.json" in captured.err
