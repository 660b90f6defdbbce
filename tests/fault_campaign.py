"""Fault and bad-input campaign against the command line: prints a table of attempts per category.

Not collected by pytest (its name does not start with test_). Run it from the repository root:

    python tests/fault_campaign.py

Each attempt runs the CLI in a forked child (stdout and stderr captured), so the kills are real
SIGKILLs of a process in the middle of its work. An attempt is acceptable when the outcome is
what a careful engineer expects: the set invariant holds and the next run is not blocked; a bad
input is refused with exit 2 naming the file (and the field), without "internal error" or a
traceback, within 10 s; nothing foreign is overwritten; output carries no injected markup,
formulas or terminal escapes.
"""

import errno
import json
import os
import random
import re
import shutil
import signal
import stat
import sys
import tempfile
import time
from collections import OrderedDict
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from steamcalc.cli import main  # noqa: E402
from steamcalc.records.record import load_record  # noqa: E402
from steamcalc.render.report import RENDERERS  # noqa: E402
from steamcalc.signing.signatures import RULES  # noqa: E402

DEMO = ROOT / "workbooks" / "demo_site"
RESULTS = OrderedDict()


def tally(category, ok, note=""):
    row = RESULTS.setdefault(category, [0, 0, []])
    row[0 if ok else 1] += 1
    if not ok:
        row[2].append(note)


def cli(args, env=None, timeout=60, kill_after=None, umask=None):
    """Run main(args) in a forked child; return (exit code or -signal, stdout, stderr, seconds)."""
    out, err = tempfile.TemporaryFile(), tempfile.TemporaryFile()
    started = time.monotonic()
    pid = os.fork()
    if pid == 0:
        os.dup2(out.fileno(), 1)
        os.dup2(err.fileno(), 2)
        os.environ.update(env or {})
        if umask is not None:
            os.umask(umask)
        try:
            code = main([str(a) for a in args])
        except BaseException:
            code = 99
        sys.stdout.flush()
        sys.stderr.flush()
        os._exit(code)
    if kill_after is not None:
        time.sleep(kill_after)
        os.kill(pid, signal.SIGKILL)
    deadline = started + timeout
    while True:
        done, status = os.waitpid(pid, os.WNOHANG)
        if done:
            break
        if time.monotonic() > deadline:
            os.kill(pid, signal.SIGKILL)
            os.waitpid(pid, 0)
            status = -1
            break
        time.sleep(0.01)
    code = os.waitstatus_to_exitcode(status) if status != -1 else "timeout"
    out.seek(0), err.seek(0)
    return code, out.read().decode("utf-8", "replace"), err.read().decode("utf-8", "replace"), \
        time.monotonic() - started


def fresh_site(base):
    site = Path(tempfile.mkdtemp(dir=base)) / "site"
    shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records"))
    return site


def set_ok(out, stem):
    """The set invariant as a reader sees it."""
    files = {p.suffix: p for p in out.glob(f"{stem}.*")} if out.exists() else {}
    if ".json" not in files:
        return not files
    record = load_record(files[".json"])
    if not record.get("signatures"):
        return all("Signed as checked" not in files[s].read_text() for s in files if s != ".json")
    return True


def signing_keys(base):
    """Key pairs made once per campaign (a record is signed with a key; a name alone is refused), and a
    trusted signers folder holding their public keys."""
    folder, trusted = base / "keys", base / "trusted"
    if not trusted.is_dir():
        for name in ("C. Checker", "D. Approver", "A. Engineer", "A. One", "B. Two"):
            code, _, err, _ = cli(["keys", "new", "--name", name, "--out", folder])
            assert code == 0, err
        trusted.mkdir()
        for pub in folder.glob("*.pub"):
            shutil.copy(pub, trusted)
    return {p.stem: p for p in folder.glob("*.key")}, trusted


def complete(out, stem):
    files = {p.suffix: p for p in out.glob(f"{stem}.*")}
    if set(files) != {".json", *RENDERERS}:
        return False
    record = load_record(files[".json"])
    return all(files[s].read_text() == r(record) for s, r in RENDERERS.items()) and \
        not list(out.glob(".*.part")) and not list((out / ".steamcalc").glob("*.staged"))


def clean_refusal(code, err, *names):
    return code == 2 and "internal error" not in err and "unexpected error" not in err and "Traceback" not in err \
        and all(n in err for n in names)


POINTS = ["staged:0", "staged:1", "staged:2", "listed", "moved:0", "moved:1", "moved:2"]


def kills(base, rng):
    site = fresh_site(base)
    case = site / "cases" / "LD-02.toml"
    probe = base / "probe"
    _, _, _, seconds = cli(["run", case, "--out", probe])
    for n in range(32):
        out = base / f"kill-run-{n}"
        env = {"STEAMCALC_TEST_KILL_AT": POINTS[n % len(POINTS)]} if n < 14 else {}
        code, _, _, _ = cli(["run", case, "--out", out], env=env,
                            kill_after=None if env else rng.uniform(0, 1.3 * seconds))
        ok = set_ok(out, "LD-02_revB")
        code2, _, _, _ = cli(["run", case, "--out", out])
        tally("kill -9 of run", ok and code2 == 0 and complete(out, "LD-02_revB"), f"attempt {n}")
    keys, _ = signing_keys(base)
    for n in range(20):
        out = base / f"kill-sign-{n}"
        cli(["run", case, "--out", out])
        env = {"STEAMCALC_TEST_KILL_AT": POINTS[n % len(POINTS)]} if n < 14 else {}
        cli(["sign", out / "LD-02_revB.json", "--key", keys["c-checker"]], env=env,
            kill_after=None if env else rng.uniform(0, 1.5 * seconds))
        ok = set_ok(out, "LD-02_revB")
        code2, _, _, _ = cli(["run", case, "--out", out])   # the next writer finishes or undoes it
        record = load_record(out / "LD-02_revB.json")
        signed_right = not record.get("signatures") or "Signed as checked" in (out / "LD-02_revB.html").read_text()
        tally("kill -9 of sign", ok and code2 == 0 and complete(out, "LD-02_revB") and signed_right, f"attempt {n}")


def disk_full(base):
    """ENOSPC from os.write once an allowance is spent (run and sign), in the child only."""
    site = fresh_site(base)
    case = site / "cases" / "LD-02.toml"
    keys, _ = signing_keys(base)
    for n, allowance in enumerate([0, 2000, 8000, 20000, 40000, 0, 5000, 30000]):
        out = base / f"full-{n}"
        if n >= 5:
            cli(["run", case, "--out", out])
            before = {p.name: p.read_bytes() for p in out.glob("LD-02*")}
        pid_args = (["sign", out / "LD-02_revB.json", "--key", keys["c-checker"]] if n >= 5
                    else ["run", case, "--out", out])
        code, _, err = _with_full_disk(pid_args, allowance, base)
        ok = code in (1, 2) and "No space left on device" in err and "internal error" not in err
        ok = ok and set_ok(out, "LD-02_revB") and not list(out.glob(".*.part"))
        if n >= 5:
            ok = ok and before == {p.name: p.read_bytes() for p in out.glob("LD-02*")}
        code2, _, _, _ = cli(["run", case, "--out", out])
        tally("disk full", ok and code2 == 0 and complete(out, "LD-02_revB"), f"allowance {allowance}")
    _keys_on_a_full_disk(base)


def _with_full_disk(args, allowance, base):
    import steamcalc.records.issuing as issuing
    real = os.write
    state = {"left": allowance}

    def write(fd, data):
        try:
            target = os.readlink(f"/proc/self/fd/{fd}")
        except OSError:
            target = ""
        if target.startswith(str(base)):
            if state["left"] < len(data):
                raise OSError(errno.ENOSPC, "No space left on device")
            state["left"] -= len(data)
        return real(fd, data)

    issuing.os.write = write   # in this parent; the fork inherits it
    try:
        code, _, err, _ = cli(args)
    finally:
        issuing.os.write = real
    return code, None, err


def races(base):
    site = fresh_site(base)
    case = site / "cases" / "LD-02.toml"
    other = site / "cases" / "LD-02b.toml"
    other.write_text(case.read_text().replace('"2.0 t/h"', '"2.2 t/h"'))
    for n in range(28):
        out = base / f"race-{n}"
        results = _pair(["run", case, "--out", out], ["run", other, "--out", out])
        written = sum(1 for code, text in results if code in (0, 1) and "written" in text and "unchanged" not in text)
        refused = sum(1 for code, text in results if code == 2 and "already exists with different content" in text)
        tally("races: two runs, one id", written == 1 and refused == 1 and complete(out, "LD-02_revB"), f"pair {n}")
    keys, trusted = signing_keys(base)
    for n in range(6):
        out = base / f"signrace-{n}"
        cli(["run", case, "--out", out])
        path = out / "LD-02_revB.json"
        results = _pair(["sign", path, "--key", keys["a-one"], "--trusted", trusted],
                        ["sign", path, "--key", keys["b-two"], "--trusted", trusted])
        signed = [text for code, text in results if code == 0]
        record = load_record(path)
        ok = len(signed) == 1 and len(record["signatures"]) == 1 and record["signatures"][0]["name"] in signed[0] \
            and complete(out, "LD-02_revB")
        tally("races: two sign-offs", ok, f"pair {n}")


def _pair(a, b):
    """Start two CLI runs as close together as fork allows; both are in flight at once."""
    import multiprocessing
    ctx = multiprocessing.get_context("fork")
    queue, barrier = ctx.Queue(), ctx.Barrier(2)

    def child(args):
        import io
        import contextlib
        buffer = io.StringIO()
        barrier.wait()
        with contextlib.redirect_stdout(buffer), contextlib.redirect_stderr(buffer):
            code = main([str(x) for x in args])
        queue.put((code, buffer.getvalue()))

    procs = [ctx.Process(target=child, args=(args,)) for args in (a, b)]
    for p in procs:
        p.start()
    results = [queue.get(timeout=120) for _ in procs]
    for p in procs:
        p.join()
    return results


def overwrites(base):
    site = fresh_site(base)
    case = site / "cases" / "LD-02.toml"
    out = base / "ow"
    cli(["run", case, "--out", out])
    a = out / "LD-02_revB.json"
    before = a.read_bytes()
    for extra in ([], ["--force"]):
        code, _, err, _ = cli(["diff", a, a, "--html", a, *extra])
        tally("overwrites", code == 2 and a.read_bytes() == before, f"diff --html onto the record {extra}")
    foreign = base / "mine.html"
    foreign.write_text("<html>mine</html>")
    code, _, err, _ = cli(["diff", a, a, "--html", foreign])
    tally("overwrites", code == 2 and foreign.read_text() == "<html>mine</html>", "diff --html onto a foreign page")
    out2 = base / "ow2"
    out2.mkdir()
    (out2 / "LD-02_revB.md").write_text("my notes")
    code, _, err, _ = cli(["run", case, "--out", out2])
    tally("overwrites", code == 2 and (out2 / "LD-02_revB.md").read_text() == "my notes", "run onto a foreign .md")
    (out2 / "index.csv").write_text("my,spreadsheet\n")
    code, _, err, _ = cli(["run", case, site / "cases" / "FL-01.toml", "--out", out2, "--force"])
    tally("overwrites", code == 0 and (out2 / "LD-02_revB.md").read_text() != "my notes", "run --force replaces")
    out3 = base / "ow3"
    out3.mkdir()
    (out3 / "index.csv").write_text("my,spreadsheet\n")
    code, _, err, _ = cli(["run", case, site / "cases" / "FL-01.toml", "--out", out3])
    tally("overwrites", code == 2 and (out3 / "index.csv").read_text() == "my,spreadsheet\n", "foreign index.csv")
    afile = base / "afile"
    afile.write_text("x")
    code, _, err, _ = cli(["run", case, "--out", afile])
    tally("overwrites", clean_refusal(code, err, str(afile)) and afile.read_text() == "x", "--out is a file")
    _output_overwrites(base, site, case)


def _output_overwrites(base, site, case):
    """register --html/--csv, diff --html and run --pdf onto files they did not make (one rule, with or
    without --force for a record's files, never for a FIFO or device)."""
    cli(["run", case, "--quiet"])
    records = site / "records"
    keys = base / "ow-keys"
    cli(["keys", "new", "--name", "C. Checker", "--out", keys])
    shutil.copy(keys / "c-checker.pub", site / "trusted_signers")
    victims = [(site / "cases" / "LD-02.toml", []), (site / "site.toml", []), (records / "LD-02_revB.json", []),
               (records / "LD-02_revB.json", ["--force"]), (records / "LD-02_revB.md", ["--force"]),
               (site / "trusted_signers" / "c-checker.pub", [])]
    for path, extra in victims:
        for option in ("--html", "--csv"):
            before = path.read_bytes()
            code, _, err, _ = cli(["register", site, option, path, *extra])
            tally("overwrites", clean_refusal(code, err, str(path)) and path.read_bytes() == before,
                  f"register {option} onto {path.name} {extra}")
    specials = [base / "ow-fifo.html"]
    os.mkfifo(specials[0])
    try:
        os.mknod(base / "ow-null.csv", 0o666 | stat.S_IFCHR, os.makedev(1, 3))
        specials.append(base / "ow-null.csv")
    except (OSError, AttributeError):
        pass   # not root: the device node attempt is the FIFO's
    for path in specials:
        kind = stat.S_IFMT(path.lstat().st_mode)
        code, _, err, seconds = cli(["register", site, "--html", path, "--force"], timeout=20)
        tally("overwrites", clean_refusal(code, err, str(path)) and stat.S_IFMT(path.lstat().st_mode) == kind
              and seconds < 10, f"register --html --force onto a {'FIFO' if stat.S_ISFIFO(kind) else 'device'}")
    a, companion = records / "LD-02_revB.json", records / "LD-02_revB.html"
    before = companion.read_bytes()
    for extra in ([], ["--force"]):
        code, _, err, _ = cli(["diff", a, a, "--html", companion, *extra])
        tally("overwrites", clean_refusal(code, err, str(companion)) and companion.read_bytes() == before,
              f"diff --html onto a record's companion {extra}")
    pdf = records / "LD-02_revB.pdf"
    pdf.write_bytes(b"%PDF-1.4 a scan of the signed sheet")
    code, _, err, _ = cli(["run", case, "--pdf"])
    tally("overwrites", clean_refusal(code, err, str(pdf)) and pdf.read_bytes() == b"%PDF-1.4 a scan of the signed sheet",
          "run --pdf onto a foreign PDF")


def batch(base):
    site = fresh_site(base)
    cases = site / "cases"
    (cases / "bad-site.toml").write_text((cases / "LD-02.toml").read_text().replace('site = "../site.toml"', "site = 123")
                                         .replace('id = "LD-02"', 'id = "B1"'))
    (cases / "dry0.toml").write_text((cases / "HX-01.toml").read_text().replace(
        'steam_pressure = "header:MP"', 'steam_pressure = "header:MP"\nsteam_dryness = 0').replace('id = "HX-01"', 'id = "B2"'))
    out = base / "batch"
    code, so, err, _ = cli(["run", cases, "--out", out, "--quiet"])
    index = (out / "index.html").read_text() if (out / "index.html").exists() else ""
    tally("batch", code == 2 and "bad-site.toml" in index and (out / "LD-01_revB.json").exists()
          and "field 'site'" in err, "site = 123 in a folder")
    tally("batch", code == 2 and "dry0.toml" in index and (out / "FL-01_revB.json").exists()
          and "internal error" not in err, "steam_dryness = 0 in a folder (a calculation fault, reported only there)")
    heavy = (cases / "LD-01.toml").read_text()
    folder = base / "heavy"
    folder.mkdir()
    (folder / "LD-02.toml").write_text((cases / "LD-02.toml").read_text().replace(
        'site = "../site.toml"', f'site = "{site / "site.toml"}"'))
    # 100,000 samples a case take about a second since the sample paths were vectorised: forty cases keep two
    # workers busy for half a minute, long past the moment the signal is sent.
    for n in range(40):
        (folder / f"H{n}.toml").write_text(re.sub(r"(?m)^samples = .*$", "samples = 100000",
                                                  heavy.replace('id = "LD-01"', f'id = "H{n}"'))
                                           .replace('site = "../site.toml"', f'site = "{site / "site.toml"}"'))
    out = base / "heavy-out"
    env = dict(os.environ)
    import subprocess
    process = subprocess.Popen([sys.executable, "-m", "steamcalc", "run", str(folder), "--out", str(out), "--quiet"],
                               stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                               env={**env, "PYTHONPATH": str(ROOT)})
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline and process.poll() is None and not list(out.glob("*_rev*.json")):
        time.sleep(0.2)   # until the first record is written: past the imports, the workers deep in their cases
    process.send_signal(signal.SIGINT)
    started = time.monotonic()
    _, err = process.communicate(timeout=60)
    stopped = time.monotonic() - started
    RESULTS.setdefault("_ctrl_c_seconds", stopped)
    tally("batch", process.returncode == 130 and (out / "index.html").exists() and "did not run" in err
          and stopped < 5, f"Ctrl-C: exit {process.returncode}, {stopped:.1f} s")


def hangs(base):
    site = fresh_site(base)
    case = site / "cases" / "LD-02.toml"
    out = base / "hang"
    text = case.read_text()
    attempts = [
        ("unit arithmetic", text.replace('"2.0 t/h"', '"4.5 t/h*9**9**9"'), ["case"], "mass_flow"),
        ("huge exponent", text.replace('"2.0 t/h"', '"4.5e999999999 t/h"'), ["case"], "mass_flow"),
    ]
    for name, body, _, field in attempts:
        path = site / "cases" / f"{name.replace(' ', '_')}.toml"
        path.write_text(body)
        code, _, err, seconds = cli(["run", path, "--out", out], timeout=20)
        tally("hangs and memory", clean_refusal(code, err, field) and seconds < 10, name)
    code, _, err, seconds = cli(["run", case, "--site", "/dev/zero", "--out", out], timeout=20)
    tally("hangs and memory", clean_refusal(code, err, "/dev/zero") and seconds < 10, "--site /dev/zero")
    fifo = base / "fifo.toml"
    os.mkfifo(fifo)
    code, _, err, seconds = cli(["run", fifo, "--out", out], timeout=20)
    tally("hangs and memory", clean_refusal(code, err, str(fifo)) and seconds < 10, "a FIFO")
    big = base / "big.toml"
    big.write_text("#" * (50 * 1024 * 1024))
    code, _, err, seconds = cli(["run", big, "--out", out], timeout=20)
    tally("hangs and memory", clean_refusal(code, err, str(big)) and seconds < 10, "50 MB case file")
    cli(["run", site / "cases" / "LD-01.toml", "--out", out])
    record = json.loads((out / "LD-01_revB.json").read_text())
    record["uncertainty"]["samples"] = 10_000_000
    edited = out / "edited.json"
    edited.write_text(json.dumps(record))
    code, _, err, seconds = cli(["verify", edited], timeout=30)
    tally("hangs and memory", code == 2 and "samples" in err and seconds < 10, "verify samples = 10000000")
    _special_files(base)


SILENT = [
    ('atmospheric_pressure = "1 bar(g)"', "atmospheric_pressure"),
    ('atmospheric_pressure = "50 bar(a)"', "atmospheric_pressure"),
    ('makeup_water_temperature = "15 K"', "makeup_water_temperature"),
    ('ambient_temperature = "5000 degC"', "ambient_temperature"),
    ('fuel_emission_factor = "-0.2 kg/kWh"', "fuel_emission_factor"),
    ('boiler_efficiency = 0', "boiler_efficiency"),
    ('operating_hours = "9000 h"', "operating_hours"),
    ('fuel_price = "-40 EUR/MWh"', "fuel_price"),
]


def silent(base):
    for line, field in SILENT:
        site = fresh_site(base)
        text = (site / "site.toml").read_text()
        key = line.split(" = ")[0]
        text = re.sub(rf"(?m)^{key} = .*$", "", text)
        if key == "atmospheric_pressure":
            text = re.sub(r"(?m)^elevation = .*$", "", text)
        (site / "site.toml").write_text(text.replace("[site]\n", f"[site]\n{line}\n", 1))
        code, _, err, _ = cli(["run", site / "cases" / "FL-01.toml", "--out", base / "silent"])
        tally("silent wrong results", clean_refusal(code, err, field, "site.toml"), line)


PAYLOADS = ['=HYPERLINK("http://example.invalid","x")', "+cmd|' /C calc'!A0", "-2+3", "@SUM(A1)", "\tTAB",
            "<script>alert(1)</script>", "[click](javascript:alert(1))", "![i](http://example.invalid/p.png)",
            "\u001b[32mVERIFIED\u001b[0m", "| fake | row |", "line\n# heading", "\u202eevil"]


def injection(base):
    sys.path.insert(0, str(ROOT / "tests"))
    from test_hostile_input import toml_string
    site = fresh_site(base)
    source = (site / "cases" / "LD-02.toml").read_text()
    out = base / "inj"
    cases = []
    for n, payload in enumerate(PAYLOADS):
        text = source.replace('id = "LD-02"', f'id = "I{n:02d}"')
        text = re.sub(r"(?m)^title = .*$", lambda _: f"title = {toml_string(payload)}", text)
        text = re.sub(r"(?m)^prepared_by = .*$", lambda _: f"prepared_by = {toml_string(payload)}", text)
        text += f"\n[assumptions]\nnotes = [{toml_string(payload)}]\n"
        path = site / "cases" / f"I{n:02d}.toml"
        path.write_text(text)
        cases.append(path)
    code, run_out, run_err, _ = cli(["run", *cases, "--out", out, "--quiet"])
    import csv
    rows = {row[0]: row for row in csv.reader((out / "index.csv").read_text().splitlines()[1:])}
    index = (out / "index.html").read_text()
    for n, payload in enumerate(PAYLOADS):
        stem = out / f"I{n:02d}_revB"
        md = stem.with_suffix(".md").read_text()
        page = stem.with_suffix(".html").read_text()
        cell_ok = all(c[:1] not in ("=", "+", "-", "@", "\t", "\r") for c in rows[f"I{n:02d}"])
        tally("injection", cell_ok, f"CSV {payload!r}")
        md_ok = not re.search(r"(?<!\\)<script|(?<!\\)\]\(javascript:|!\[i\]\(|\u001b|\n# heading|\| fake \| row \|", md)
        tally("injection", md_ok, f"Markdown {payload!r}")
        tally("injection", "<script>" not in page and "href=\"javascript" not in page, f"HTML {payload!r}")
        cli(["run", cases[n], "--out", out])  # unchanged
        code, vout, verr, _ = cli(["verify", stem.with_suffix(".json")])
        code2, dout, derr, _ = cli(["diff", out / "I00_revB.json", stem.with_suffix(".json")])
        terminal = vout + verr + dout + derr
        tally("injection", not re.search("[\u001b\u202e]", terminal), f"terminal {payload!r}")
    hrefs = re.findall(r"href='([^']*)'", index)
    tally("injection", all(h.startswith("./") for h in hrefs), "index links")
    record = load_record(out / "I00_revB.json")
    (out / "javascript:alert(1).json").write_text(json.dumps(record))
    cli(["run", cases[0], cases[1], "--out", out])
    hrefs = re.findall(r"href='([^']*)'", (out / "index.html").read_text())
    tally("injection", all(h.startswith("./") and ":" not in h for h in hrefs), "crafted file name in the index")
    for page in (out / "register.html", base / "inj-register" / "register.html"):
        cli(["register", out, "--html", page])
        hrefs = re.findall(r"href='([^']*)'", page.read_text()) if page.is_file() else []
        tally("injection", bool(hrefs) and all(re.match(r"\.\.?/", h) and ":" not in h for h in hrefs),
              f"crafted file name in the register ({page.parent.name})")
    (out / "crafted.json").write_text(json.dumps(dict(record, id="javascript:alert(1)")))
    code, _, err, _ = cli(["verify", out / "crafted.json"])
    tally("injection", code == 2 and "plain name" in err, "crafted record id")


def unclear(base):
    site = fresh_site(base)
    case = site / "cases" / "LD-02.toml"
    hx = site / "cases" / "HX-01.toml"
    text, hx_text = case.read_text(), hx.read_text()
    out = base / "unclear"
    variants = [
        ("inf flow", text.replace('"2.0 t/h"', '"inf t/h"'), "mass_flow"),
        ("1e400 flow", text.replace('"2.0 t/h"', '"1e400 t/h"'), "mass_flow"),
        ("nan pressure", text.replace('"header:HP"', '"nan bar(a)"'), "inlet_pressure"),
        ("1e400 pressure", text.replace('"header:HP"', '"1e400 bar(a)"'), "inlet_pressure"),
        ("inf dryness", text.replace('inlet_temperature = "230 degC"', "inlet_dryness = inf"), "inlet_dryness"),
        ("table for a string", text.replace('"2.0 t/h"', "{value = 2}"), "mass_flow"),
        ("list for a string", text.replace('"2.0 t/h"', '["2 t/h"]'), "mass_flow"),
        ("date for a string", text.replace('"2.0 t/h"', "2024-01-01"), "mass_flow"),
        ("bool for a string", text.replace('"2.0 t/h"', "true"), "mass_flow"),
        ("revision true", text.replace('revision = "B"', "revision = true"), "revision"),
        ("revision a table", text.replace('revision = "B"', "revision = {a = 1}"), "revision"),
        ("title a table", re.sub(r'(?m)^title = .*$', "title = {a = 1}", text), "title"),
        ("prepared_by a list", re.sub(r'(?m)^prepared_by = .*$', "prepared_by = [1]", text), "prepared_by"),
        ("site a number", text.replace('site = "../site.toml"', "site = 123"), "site"),
        ("kind a number", text.replace('kind = "letdown"', "kind = 3"), "kind"),
        ("case a string", "case = 'x'\n" + text.split("[inputs]", 1)[1].join(["[inputs]", ""]), "case"),
        ("inputs a string", text.split("[inputs]")[0] + 'inputs = "x"\n', "inputs"),
        ("notes a string", text + '\n[assumptions]\nnotes = "x"\n' if "[assumptions]" not in text else text, "notes"),
        ("desuperheater a string", text.replace("[inputs]", '[inputs]\ndesuperheater = "x"'), "desuperheater"),
        ("zero flow", text.replace('"2.0 t/h"', '"0 t/h"'), "mass_flow"),
        ("negative temperature K", text.replace('"230 degC"', '"-5 K"'), "inlet_temperature"),
        ("unit arithmetic", text.replace('"2.0 t/h"', '"2 t/h/0"'), "mass_flow"),
        ("tiny flow", text.replace('"2.0 t/h"', '"1e-300 t/h"'), "mass_flow"),
        ("huge U", hx_text.replace('"1.8 kW/(m^2 K)"', '"1e300 kW/(m^2 K)"'), "overall_u"),
        ("tiny U", hx_text.replace('"1.8 kW/(m^2 K)"', '"1e-300 kW/(m^2 K)"'), "overall_u"),
        ("zero steam dryness", hx_text.replace('steam_pressure = "header:MP"',
                                               'steam_pressure = "header:MP"\nsteam_dryness = 0'), "steam_dryness"),
        ("near-zero xT", re.sub(r"(?m)^xt = .*$", "xt = 1e-300", text), "xt"),
    ]
    for name, body, field in variants:
        path = site / "cases" / f"u_{re.sub('[^a-z0-9]', '_', name)}.toml"
        path.write_text(body)
        code, _, err, _ = cli(["run", path, "--out", out])
        tally("unclear errors", clean_refusal(code, err, str(path), field), f"{name}: {err.strip()[-160:]}")
    bom = site / "cases" / "bom.toml"
    bom.write_bytes(b"\xef\xbb\xbf" + text.replace('id = "LD-02"', 'id = "BOM"').encode())
    code, _, err, _ = cli(["run", bom, "--out", out])
    tally("unclear errors", code == 0, "a UTF-8 BOM")
    loop = base / "loop.toml"
    loop.symlink_to(loop)
    code, _, err, _ = cli(["run", loop, "--out", out])
    tally("unclear errors", clean_refusal(code, err, str(loop)), "a symlink loop")
    folder_as_site = base / "adir"
    folder_as_site.mkdir()
    code, _, err, _ = cli(["run", case, "--site", folder_as_site, "--out", out])
    tally("unclear errors", clean_refusal(code, err, str(folder_as_site)), "--site a folder")
    cli(["run", case, "--out", out])
    empty = base / "no-records"
    (empty / "records").mkdir(parents=True)
    for command, folder in (("verify", empty / "records"), ("register", empty / "records"), ("register", empty)):
        code, _, err, _ = cli([command, folder])
        tally("unclear errors", clean_refusal(code, err, str(folder)) and "no records" in err,
              f"{command} of a folder without records")
    bad = base / "bad.json"
    bad.write_text("{")
    code, vout, verr, _ = cli(["verify", bad, out / "LD-02_revB.json"])
    tally("unclear errors", code == 2 and "VERIFIED" in vout and str(bad) in verr, "verify BAD GOOD")
    import subprocess
    done = subprocess.run(f"{sys.executable} -m steamcalc diff {out / 'LD-02_revB.json'} {out / 'BOM_revB.json'} | head -c 5",
                          shell=True, capture_output=True, text=True, env={**os.environ, "PYTHONPATH": str(ROOT)})
    tally("unclear errors", "Error" not in done.stderr and "internal" not in done.stderr, "diff ... | head")
    _crafted_shapes_and_names(base)


def register_folders(base):
    """What the register compares a record with, and the index after one case: every way a record could be
    called current while its case says otherwise."""
    def not_current(site, reason):
        code, out, err, _ = cli(["register", site])
        return code == 1 and "not current" in out and reason in out and "internal error" not in err

    edits = [("tolerance", 'mass_flow = "5 %"', 'mass_flow = "7 %"'), ("samples", "samples = 40", "samples = 60"),
             ("seed", "seed = 3", "seed = 9"), ("coverage", "seed = 3", "seed = 3\ncoverage = 0.95")]
    for name, old, new in edits:
        site = fresh_site(base)
        case = site / "cases" / "LD-02.toml"
        case.write_text(case.read_text() + '\n[uncertainty]\nmass_flow = "5 %"\nsamples = 40\nseed = 3\n')
        cli(["run", case, "--quiet"])
        case.write_text(case.read_text().replace(old, new))
        tally("register and folders", not_current(site, "uncertainty"), f"[uncertainty] {name} changed after issue")
    site = fresh_site(base)
    cases = site / "cases"
    cli(["run", cases / "LD-02.toml", cases / "FL-01.toml", "--quiet"])
    shutil.copy(cases / "LD-02.toml", cases / "LD-02 copy.toml")
    (cases / "LD-02.toml").write_text((cases / "LD-02.toml").read_text().replace('"2.0 t/h"', '"2.4 t/h"'))
    code, out, err, _ = cli(["register", site])
    tally("register and folders", code == 1 and "inputs mass_flow" in out and "2 case files give LD-02" in out
          and "internal error" not in err, "a backup copy as issued beside the edited case")
    shutil.copy(cases / "LD-02 copy.toml", cases / "LD-02.toml")
    rev_b = cases / "LD-02_revC.toml"
    rev_b.write_text((cases / "LD-02.toml").read_text().replace('revision = "B"', 'revision = "C"')
                     .replace('"2.0 t/h"', '"2.2 t/h"'))
    (cases / "LD-02 copy.toml").unlink()
    code, out, _, _ = cli(["run", rev_b])
    index = (site / "records" / "index.csv").read_text()
    tally("register and folders", code == 0 and "LD-02_revC.json" in index, "one case run refreshes the index")
    code, out, _, _ = cli(["register", site])
    newest = [line for line in out.splitlines() if line.startswith("LD-02 rev C")]
    tally("register and folders", code == 1 and newest and " yes " in newest[0] and "superseded by revision C" in out,
          "the newest revision saved as LD-02_revC.toml is current")


def permissions(base):
    site = fresh_site(base)
    out = base / "perm"
    cli(["run", site / "cases" / "LD-02.toml", site / "cases" / "FL-01.toml", "--out", out], umask=0o022)
    for name in ("LD-02_revB.json", "LD-02_revB.html", "LD-02_revB.md", "index.html", "index.csv"):
        tally("permissions", (out / name).stat().st_mode & 0o777 == 0o644, name)
    tally("permissions", out.stat().st_mode & 0o777 == 0o755, "records folder")
    cli(["sign", out / "LD-02_revB.json", "--key", signing_keys(base)[0]["c-checker"]], umask=0o022)
    tally("permissions", (out / "LD-02_revB.json").stat().st_mode & 0o777 == 0o644, "signed record")
    cli(["new-site", base / "plant2", "--from", site], umask=0o022)
    tally("permissions", (base / "plant2").stat().st_mode & 0o777 == 0o755, "new site folder")
    tally("permissions", (base / "plant2" / "site.toml").stat().st_mode & 0o777 == 0o644, "new site file")


# -- forgery: trust lists, typed names, the signing rules, edited records, duplicate keys, PDFs -----------

def _forge(path, mutate):
    """Edit a record as a forger would: recompute both public digests and re-render its reports."""
    from steamcalc.records.record import compute_content_digest, compute_digest, record_text
    record = json.loads(path.read_text())
    mutate(record)
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    path.write_text(record_text(record))
    for suffix, render in RENDERERS.items():
        path.with_suffix(suffix).write_text(render(record))


def _plant(folder, public_key):
    (folder / "site.toml").write_text("")
    (folder / "trusted_signers").mkdir(exist_ok=True)
    shutil.copy(public_key, folder / "trusted_signers" / "c-checker.pub")


def _library_sign(path, key_file, role, now):
    """A signature made through the library, skipping every refusal of `sign`."""
    from steamcalc.review.sign import write_signed
    from steamcalc.review.verify import verify_record
    from steamcalc.signing.keys import load_private_key
    from steamcalc.signing.signatures import add_signature, verification_summary
    record = load_record(path)
    key, name = load_private_key(key_file)
    write_signed(path, add_signature(record, key, name, role, verification_summary(verify_record(record)), now))


def _signed_site(base, keys, failing=False):
    """A site with LD-02 issued (or a failing copy) and the campaign's keys trusted by it."""
    site = fresh_site(base)
    case = site / "cases" / "LD-02.toml"
    if failing:
        case.write_text(case.read_text().replace('rated_kv = "32 m^3/h"', 'rated_kv = "5 m^3/h"'))
    cli(["run", case])
    for stem in ("c-checker", "d-approver", "a-engineer"):
        shutil.copy(keys[stem].with_suffix(".pub"), site / "trusted_signers")
    return site / "records" / "LD-02_revB.json"


def forgery(base):
    keys, _ = signing_keys(base)
    attacker_dir = base / "attacker"
    if not attacker_dir.exists():   # the attacker's own key pair, made under the checker's name
        cli(["keys", "new", "--name", "C. Checker", "--out", attacker_dir])
        cli(["keys", "new", "--name", "C. Checker", "--out", attacker_dir / "second"])
    attacker = attacker_dir / "c-checker.key"
    saved = {k: os.environ.pop(k, None) for k in ("STEAMCALC_SETTINGS", "XDG_CONFIG_HOME")}
    os.environ["XDG_CONFIG_HOME"] = str(base / "no-config")   # no user settings take part
    try:
        _forgery_attempts(base, keys, attacker)
    finally:
        for k, v in saved.items():
            os.environ.pop(k, None)
            if v is not None:
                os.environ[k] = v


def _not_trusted(code, out):
    return code == 1 and "valid, trusted" not in out and "verdict: FAILED" in out


def _forgery_attempts(base, keys, attacker):
    # 1. A trust list planted beside the records, and deeper in them.
    for layout in ("", "sub", "a/records", "a/b"):
        path = _signed_site(base, keys)
        cli(["sign", path, "--key", attacker])
        target = path.parent / layout
        if layout:
            target.mkdir(parents=True)
            for file in path.parent.glob("LD-02_revB.*"):
                shutil.copy(file, target / file.name)
            _plant(target.parent, attacker.with_suffix(".pub"))
        _plant(target, attacker.with_suffix(".pub"))
        code, out, err, _ = cli(["verify", target / "LD-02_revB.json"])
        tally("forgery", _not_trusted(code, out) and "trusted signers: " in out,
              f"planted trust list, records/{layout}: exit {code}")
        code, out, err, _ = cli(["register", target])
        tally("forgery", code == 1 and "unknown key" in out and "trusted signers: " in out,
              f"register with a planted trust list, records/{layout}: exit {code}")
    # 2. Name-only sign-offs: refused; an existing one is a typed name, never green, not signed.
    path = _signed_site(base, keys)
    before = {p.name: p.read_bytes() for p in path.parent.glob("LD-02_revB.*")}
    code, out, err, _ = cli(["sign", path, "--by", "C. Checker"])
    tally("forgery", clean_refusal(code, err, str(path), "--by", "--key") and
          before == {p.name: p.read_bytes() for p in path.parent.glob("LD-02_revB.*")}, "sign --by NAME, no key")
    _forge(path, lambda r: r.update(checked_by="Chief Engineer", signoff={
        "by": "Chief Engineer", "date": "2099-01-01T00:00:00Z", "verification": {"integrity": "intact",
                                                                                  "results_reproduced": "999 of 999",
                                                                                  "version_changes": {}}}))
    code, out, err, _ = cli(["verify", path])
    page = path.with_suffix(".html").read_text()
    tally("forgery", code == 1 and "name typed, not a signature" in out and "Checked and signed" not in page
          and "not signed" in out, "a typed name with recomputed digests")
    code, out, err, _ = cli(["register", path.parent])
    tally("forgery", "not signed; name typed" in out, "a typed name in the register")
    # 3. The rules sign keeps, broken through the library: verify fails and names the rule.
    chains = [
        ("approved without checked", False, [("d-approver", "approved", "2026-01-02")], "order"),
        ("approved before checked", False, [("d-approver", "approved", "2026-01-01"),
                                            ("c-checker", "checked", "2026-01-02")], "order"),
        ("one key for both roles", False, [("c-checker", "checked", "2026-01-01"),
                                           ("c-checker", "approved", "2026-01-02")], "keys"),
        ("one person, two keys", False, [("c-checker", "checked", "2026-01-01"), ("second", "approved", "2026-01-02")],
         "people"),
        ("the preparer checks", False, [("a-engineer", "checked", "2026-01-01")], "preparer"),
        ("a failing record signed", True, [("c-checker", "checked", "2026-01-01")], "failing"),
    ]
    for what, failing, chain, rule in chains:
        path = _signed_site(base, keys, failing)
        shutil.copy(attacker.parent / "second" / "c-checker.pub", path.parent.parent / "trusted_signers" / "second.pub")
        for stem, role, day in chain:
            key_file = attacker.parent / "second" / "c-checker.key" if stem == "second" else keys[stem]
            _library_sign(path, key_file, role, f"{day}T00:00:00Z")
        code, out, err, _ = cli(["verify", path])
        tally("forgery", code == 1 and f"rule broken: {RULES[rule]}" in out, f"rule: {what}")
    # 4. run against an edited record: refused, the file named, nothing drawn again from it.
    for how in ("both digests", "public digest", "created, no digest"):
        path = _signed_site(base, keys)
        record = json.loads(path.read_text())
        if how == "created, no digest":
            record["created"] = "2020-01-01T00:00:00Z"
        else:
            record["status"] = "pass"
            record["results"][next(iter(record["results"]))]["value"] = 13910.0
            if how == "both digests":
                from steamcalc.records.record import compute_content_digest
                record["content_digest"] = compute_content_digest(record)
            from steamcalc.records.record import compute_digest
            record["digest"] = compute_digest(record)
        path.write_text(json.dumps(record, indent=2))
        path.with_suffix(".html").unlink()
        code, out, err, _ = cli(["run", path.parent.parent / "cases" / "LD-02.toml"])
        tally("forgery", clean_refusal(code, err, str(path)) and "unchanged" not in out
              and not path.with_suffix(".html").exists(), f"run over an edited record ({how})")
    # 6. Duplicate keys; a PDF beside the record.
    for key, old, new in (("status", '"status": "warn",', '"status": "warn",\n  "status": "pass",'),
                          ("unit", '"unit": ', '"unit": "kg/h",\n      "unit": ')):
        path = _signed_site(base, keys)
        path.write_text(path.read_text().replace(old, new, 1))
        code, out, err, _ = cli(["verify", path])
        tally("forgery", clean_refusal(code, err, str(path), f"'{key}' appears twice"), f"duplicate key {key!r}")
    path = _signed_site(base, keys)
    path.with_suffix(".pdf").write_bytes(b"%PDF-1.4 edited\n")
    code, out, err, _ = cli(["verify", path])
    tally("forgery", code == 0 and "LD-02_revB.pdf: NOT CHECKED" in out, "a PDF beside the record")
    _texts_read_again(base, keys)


# -- hostile files and names; texts read again; an issue in progress (issue 22, items 5, 9, 13, 14, 17) -------

def _keys_on_a_full_disk(base):
    """`keys new` on a full disk: refused by name, and no key, half key or temporary file left."""
    for n, allowance in enumerate([0, 150, 400]):
        out = base / f"keys-full-{n}"
        code, _, err = _with_full_disk(["keys", "new", "--name", "C. Checker", "--out", out], allowance, base)
        left = list(out.iterdir()) if out.exists() else []
        tally("disk full", clean_refusal(code, err, str(out)) and "No space left on device" in err and not left,
              f"keys new, allowance {allowance}: exit {code}, left {[p.name for p in left]}")


def _special_files(base):
    """A FIFO, /dev/zero or /dev/urandom as --key, --passphrase-file or a trusted signer: refused or skipped
    without being opened; nothing hangs."""
    keys, trusted = signing_keys(base)
    site = fresh_site(base)
    cli(["run", site / "cases" / "LD-02.toml"])
    record = site / "records" / "LD-02_revB.json"
    fifo = base / "special.fifo"
    if not fifo.exists():
        os.mkfifo(fifo)
    for special in (fifo, Path("/dev/zero"), Path("/dev/urandom")):
        for args, field in ((["sign", record, "--key", special], "--key"),
                            (["sign", record, "--key", keys["c-checker"], "--passphrase-file", special],
                             "--passphrase-file"),
                            (["keys", "new", "--name", "P. Phrase", "--out", base / "pp", "--passphrase-file",
                              special], "--passphrase-file")):
            code, _, err, seconds = cli(args, timeout=20)
            tally("hangs and memory", clean_refusal(code, err, str(special), field) and seconds < 10,
                  f"{args[0]} {field} {special}: exit {code}")
    shutil.copy(keys["c-checker"].with_suffix(".pub"), site / "trusted_signers")
    cli(["sign", record, "--key", keys["c-checker"]])
    os.mkfifo(site / "trusted_signers" / "jam.pub")
    (site / "trusted_signers" / "zero.pub").symlink_to("/dev/zero")
    for args in (["verify", record], ["register", site]):
        code, out, err, seconds = cli(args, timeout=30)
        tally("hangs and memory", code != "timeout" and "jam.pub" in out + err and "zero.pub" in out + err
              and "internal error" not in err and seconds < 20, f"a FIFO and /dev/zero among the trusted: {args[0]}")
    code, out, err, seconds = cli(["sign", record, "--key", keys["d-approver"], "--role", "approved"], timeout=30)
    tally("hangs and memory", code == 0 and "internal error" not in err and seconds < 20,
          f"a FIFO and /dev/zero among the trusted: sign (exit {code})")


def _crafted_shapes_and_names(base):
    """Crafted sign-off shapes and a record without a title: refused by field, exit 2; hostile key names refused;
    verify --repair on a read-only folder names the file and the fix."""
    site = fresh_site(base)
    cli(["run", site / "cases" / "LD-02.toml"])
    good = site / "records" / "LD-02_revB.json"
    shapes = [("signatures as text", lambda r: r.update(signatures="C. Checker"), "signatures"),
              ("a signature a number", lambda r: r.update(signatures=[1]), "signatures.0"),
              ("a signature's role a number", lambda r: r.update(signatures=[{
                  "role": 1, "name": "x", "date": "d", "fingerprint": "f", "public_key": "p", "signature": "s"}]),
               "signatures.0.role"),
              ("a sign-off as text", lambda r: r.update(signoff="C. Checker"), "signoff"),
              ("a sign-off's verification a list", lambda r: r.update(signoff={"by": "C", "date": "x",
                                                                               "verification": [1]}),
               "signoff.verification"),
              ("no title", lambda r: r.pop("title"), "title"),
              ("a title of null", lambda r: r.update(title=None), "title")]
    keys, _ = signing_keys(base)
    for n, (what, edit, field) in enumerate(shapes):
        path = site / "records" / f"shape-{n}.json"
        record = json.loads(good.read_text())
        edit(record)
        from steamcalc.records.record import compute_content_digest, compute_digest
        record["content_digest"] = compute_content_digest(record)
        record["digest"] = compute_digest(record)
        path.write_text(json.dumps(record, indent=2))
        for args in (["verify", path], ["sign", path, "--key", keys["c-checker"]], ["diff", good, path]):
            code, _, err, _ = cli(args)
            tally("unclear errors", clean_refusal(code, err, str(path), f"field '{field}'"), f"{what}: {args[0]}")
    for what, name in (("a right-to-left override", "C. Checker\u202e"), ("an isolate", "\u2067C. Checker"),
                       ("a line separator", "C. Checker\u2028D. Approver"), ("an escape", "\x1b[2JC. Checker"),
                       ("a zero-width space", "C. Chec\u200bker")):
        code, _, err, _ = cli(["keys", "new", "--name", name, "--out", base / "hostile-names"])
        tally("unclear errors", clean_refusal(code, err, "--name", "cannot stand on a record")
              and not (base / "hostile-names").exists(), f"keys new --name with {what}")
    good.with_suffix(".md").write_text("edited")
    import steamcalc.records.issuing as issuing
    real = issuing.tempfile.mkstemp

    def read_only(*args, **kwargs):
        raise OSError(errno.EROFS, "Read-only file system")
    issuing.tempfile.mkstemp = read_only   # in this parent; the fork inherits it
    try:
        code, out, err, _ = cli(["verify", good, "--repair"])
    finally:
        issuing.tempfile.mkstemp = real
    tally("unclear errors", clean_refusal(code, err, str(good.with_suffix(".md")), "Read-only", "Fix:")
          and good.with_suffix(".md").read_text() == "edited", "verify --repair on a read-only folder")


def _texts_read_again(base, keys):
    """Texts a record shows beside its numbers, edited with the digests recomputed: each is a difference; a set
    caught between its JSON's move and its reports' is an issue in progress; hostile and doubled trusted names."""
    site = fresh_site(base)
    cli(["run", site / "cases" / "LD-01.toml"])
    path = site / "records" / "LD-01_revB.json"
    edits = [
        ("a flow's text as given", lambda r: r["inputs"]["mass_flow"].update(given="9 t/h"), "mass_flow"),
        ("a header's text as given", lambda r: r["inputs"]["inlet_pressure"].update(given="header:HP = 30 bar(g)"),
         "inlet_pressure"),
        ("a header in the site", lambda r: r["site"]["headers"]["HP"].update(value=30.0), "header HP"),
        ("the uncertainty nominal", lambda r: r["uncertainty"]["bands"]["outlet_temperature"].update(nominal=120.0),
         "uncertainty.outlet_temperature.nominal"),
        ("the uncertainty method text", lambda r: r["uncertainty"].update(method="Exact bounds"), "uncertainty.method"),
        ("a tolerance's text as given", lambda r: r["uncertainty"]["tolerances"]["mass_flow"].update(given="0.5 %"),
         "uncertainty.tolerances.mass_flow"),
        ("the sensitivity order", lambda r: r["uncertainty"]["sensitivity"]["outlet_temperature"].reverse(),
         "uncertainty.sensitivity"),
        ("a result's label", lambda r: r["results"]["relief_load"].update(label="Relief not required")
         if "relief_load" in r["results"] else r["results"][next(iter(r["results"]))].update(
             label="Relief not required"), "its label"),
    ]
    original = path.read_text()
    for what, edit, words in edits:
        path.write_text(original)
        _forge(path, edit)
        code, out, err, _ = cli(["verify", path, "--all"])
        tally("forgery", code == 1 and words in out and "verdict: FAILED" in out, f"edited text: {what}")
    # An issue caught between its JSON's move and its reports': in progress, never "edited"; the next writer completes it.
    site = fresh_site(base)
    cli(["run", site / "cases" / "LD-02.toml"])
    shutil.copy(keys["c-checker"].with_suffix(".pub"), site / "trusted_signers")
    path = site / "records" / "LD-02_revB.json"
    cli(["sign", path, "--key", keys["c-checker"]], env={"STEAMCALC_TEST_KILL_AT": "moved:0"})
    code, out, err, _ = cli(["verify", path])
    tally("forgery", code == 1 and "ISSUE IN PROGRESS" in out and "DIFFERS" not in out, "verify of an issue in progress")
    cli(["run", site / "cases" / "LD-02.toml"])
    code, out, err, _ = cli(["verify", path])
    tally("forgery", code == 0 and "VERIFIED (signed" in out, "verify once the next writer completed the issue")
    # Names: one key under two names, a private key under another name among the trusted.
    (site / "trusted_signers" / "relabelled.pub").write_text(
        keys["c-checker"].with_suffix(".pub").read_text().replace("name: C. Checker", "name: D. Approver"))
    code, out, err, _ = cli(["verify", path])
    tally("forgery", code == 1 and "one key has one owner" in out, "one trusted key under two names")
    (site / "trusted_signers" / "relabelled.pub").unlink()
    shutil.copy(keys["c-checker"], site / "trusted_signers" / "backup.txt")
    code, out, err, _ = cli(["verify", path])
    tally("forgery", clean_refusal(code, err, "backup.txt", "private key"), "a private key among the trusted, renamed")


def _warm_up(base):
    # Import and run once in this process, so each forked attempt starts warm, as a user's
    # second command would not, but the attempt measures steamcalc's work rather than imports.
    import io
    import contextlib
    import steamcalc.batch.batch, steamcalc.review.verify, steamcalc.runs.runner, steamcalc.review.signoff, steamcalc.ui.workbook  # noqa: F401
    site = fresh_site(base)
    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(io.StringIO()):
        for name in ("LD-01", "LD-02", "FL-01", "HX-01"):
            main(["run", str(site / "cases" / f"{name}.toml"), "--out", str(base / "warm")])
        main(["verify", str(base / "warm" / "LD-02_revB.json")])


def main_campaign():
    rng = random.Random(405)
    base = Path(tempfile.mkdtemp(prefix="steamcalc-campaign-"))
    _warm_up(base)
    started = time.monotonic()
    for step in (kills, disk_full, races, overwrites, batch, hangs, silent, injection, unclear, register_folders,
                 permissions, forgery):
        t = time.monotonic()
        (step(base, rng) if step is kills else step(base))
        print(f"# {step.__name__}: {time.monotonic() - t:.0f} s", file=sys.stderr)
    ctrl_c = RESULTS.pop("_ctrl_c_seconds", None)
    print("| category | attempts | acceptable | not acceptable |")
    print("|---|---:|---:|---:|")
    total = [0, 0]
    for category, (good, bad, notes) in RESULTS.items():
        print(f"| {category} | {good + bad} | {good} | {bad} |")
        total[0] += good
        total[1] += bad
    print(f"| **all** | {sum(total)} | {total[0]} | {total[1]} |")
    for category, (_, _, notes) in RESULTS.items():
        for note in notes:
            print(f"not acceptable - {category}: {note}")
    print(f"Ctrl-C stop time: {ctrl_c:.1f} s; campaign took {time.monotonic() - started:.0f} s")
    shutil.rmtree(base, ignore_errors=True)


if __name__ == "__main__":
    main_campaign()
