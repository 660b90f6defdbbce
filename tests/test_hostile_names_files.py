"""Hostile names, special files and the texts verify reads again (issue 22, items 5, 9, 13, 14 and 17).

- Each input's text as given is read again on verify and must give the value the record holds; the
  uncertainty section's nominal, spread, method text and tolerance texts are recomputed too.
- A set caught between its JSON's move and its reports' moves is "issue in progress", never "edited".
- A FIFO, /dev/zero or /dev/urandom given as --key or --passphrase-file, or found among the trusted signers,
  is refused (or skipped) by its type without being opened; a FIFO never hangs a command.
- Control characters, bidirectional controls and line separators are refused in key and signer names; two
  trusted keys under one name are warned of; one key under two names is trusted under neither.
- A full disk for `keys new`, a read-only folder for `verify --repair`, crafted sign-off shapes and a record
  without a title each get a message naming the file and the fix, exit 2, never "internal error".
"""

import errno
import json
import os
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.records.record import compute_content_digest, compute_digest, load_record, record_text
from steamcalc.render.report import RENDERERS
from steamcalc.review.verify import check_companions, given_changes, verify_record
from steamcalc.signing.keys import MAX_KEY_FILE, SigningInputError, load_private_key, read_passphrase
from steamcalc.signing.names import name_problem
from steamcalc.signing.trust import read_trusted
from steamcalc.signing.signatures import add_signature, check_signatures, verification_summary

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "workbooks" / "demo_site"
#: Seconds a command is given before it counts as hung (a FIFO read blocks for ever): never asserted as a timing,
#: only as "it returned at all".
HANG = 120


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out + out.err


def _cli(argv, **env):
    """The command line in its own process, so a command that blocks is stopped by the timeout, not the suite."""
    return subprocess.run([sys.executable, "-m", "steamcalc", *map(str, argv)], capture_output=True, text=True,
                          timeout=HANG, env={**os.environ, "PYTHONPATH": str(ROOT), **env})


def _clean_refusal(code, text, *names):
    return code == 2 and "internal error" not in text and "Traceback" not in text and all(n in text for n in names)


@pytest.fixture(autouse=True)
def _no_user_settings(tmp_path, monkeypatch):
    monkeypatch.delenv("STEAMCALC_SETTINGS", raising=False)
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "no-config"))


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """A demo site with LD-01 (with uncertainty) and LD-02 issued once, and two key pairs."""
    base = tmp_path_factory.mktemp("hostile")
    site = base / "site"
    shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records", "trusted_signers"))
    saved = os.environ.get("XDG_CONFIG_HOME")
    os.environ["XDG_CONFIG_HOME"] = str(base / "no-config")
    try:
        main(["run", "--quiet", str(site / "cases" / "LD-01.toml"), str(site / "cases" / "LD-02.toml")])
        keys = base / "keys"
        for name in ("C. Checker", "D. Approver"):
            assert main(["keys", "new", "--name", name, "--out", str(keys)]) == 0
    finally:
        os.environ.pop("XDG_CONFIG_HOME")
        if saved is not None:
            os.environ["XDG_CONFIG_HOME"] = saved
    return site, keys


@pytest.fixture
def site(issued, tmp_path):
    """A fresh copy of the issued site, trusting C. Checker and D. Approver."""
    source, keys = issued
    folder = tmp_path / "site"
    shutil.copytree(source, folder)
    (folder / "trusted_signers").mkdir()
    for stem in ("c-checker", "d-approver"):
        shutil.copy(keys / f"{stem}.pub", folder / "trusted_signers")
    return folder


@pytest.fixture
def keys(issued):
    return issued[1]


def _forge(path, mutate):
    """Edit a record as a forger would: recompute both digests and re-render its reports."""
    record = json.loads(path.read_text())
    mutate(record)
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    path.write_text(record_text(record))
    for suffix, render in RENDERERS.items():
        path.with_suffix(suffix).write_text(render(record))
    return record


# -- item 5: texts verify reads again -------------------------------------------------------------------------

def test_every_demo_records_texts_as_given_read_as_its_values(site):
    for path in sorted((site / "records").glob("*.json")):
        assert given_changes(load_record(path)) == [], path


def test_the_archived_records_texts_as_given_read_as_their_values():
    for path in sorted((ROOT / "tests" / "archive").glob("*/*.json")):
        assert given_changes(load_record(path)) == [], path


GIVEN_EDITS = [
    # (what, edit, words the difference must hold)
    ("a flow's text", lambda r: r["inputs"]["mass_flow"].update(given="9 t/h"), ["mass_flow", "'9 t/h'", "9000 kg/h"]),
    ("a header's text", lambda r: r["inputs"]["inlet_pressure"].update(given="header:HP = 30 bar(g)"),
     ["inlet_pressure", "30 bar(g)"]),
    ("a header moved in the site", lambda r: r["site"]["headers"]["HP"].update(value=30.0),
     ["inlet_pressure", "header HP"]),
    ("a text that does not read", lambda r: r["inputs"]["mass_flow"].update(given="lots"),
     ["mass_flow", "does not read"]),
    ("a number's text", lambda r: r["inputs"]["fl"].update(given="0.5"), ["fl", "'0.5'"]),
    ("a text kind", lambda r: r["inputs"]["valve_size"].update(given="DN150"), ["valve_size", "DN150"]),
    ("a gauge pressure", lambda r: r["inputs"]["set_pressure"].update(given="14.5 bar(g)"),
     ["set_pressure", "bar(a)"]),
]


@pytest.mark.parametrize("what, edit, words", GIVEN_EDITS, ids=[g[0] for g in GIVEN_EDITS])
def test_an_edited_text_as_given_is_a_difference_naming_the_input(site, capsys, what, edit, words):
    path = site / "records" / "LD-01_revB.json"
    record = _forge(path, edit)
    changes = given_changes(record)
    assert len(changes) == 1 and all(w in changes[0] for w in words), changes
    outcome = verify_record(record)
    assert not outcome.ok and changes[0] in outcome.differences()
    code, text = _run(["verify", path], capsys)
    assert code == 1 and words[0] in text and "FAILED" in text


def test_a_cascades_list_and_a_flag_are_read_again(site, capsys):
    case = site / "cases" / "FL-09.toml"
    case.write_text((site / "cases" / "FL-02.toml").read_text().replace('id = "FL-02"', 'id = "FL-09"').replace(
        'flash_pressure = "0.1 bar(g)"', 'stages = ["header:MP", "2.5 bar(g)", "0.1 bar(g)"]'))
    assert main(["run", str(case)]) in (0, 1)
    capsys.readouterr()
    record = load_record(site / "records" / "FL-09_revB.json")
    assert record["inputs"]["stages"]["given"] == "header:MP, 2.5 bar(g), 0.1 bar(g)"
    assert given_changes(record) == []
    record["inputs"]["stages"]["given"] = "header:MP, 2.5 bar(g), 0.2 bar(g)"
    record["inputs"]["vented"]["given"] = "False"
    changes = given_changes(record)
    assert [c.split(" ")[1] for c in changes] == ["stages", "vented"], changes


UNCERTAINTY_EDITS = [
    ("the nominal", lambda u: u["bands"]["outlet_temperature"].update(nominal=120.0),
     "uncertainty.outlet_temperature.nominal"),
    ("the mean", lambda u: u["bands"]["outlet_temperature"].update(mean=120.0), "uncertainty.outlet_temperature.mean"),
    ("the method text", lambda u: u.update(method="Exact bounds, no sampling"), "uncertainty.method"),
    ("the generator", lambda u: u.update(generator="dice"), "uncertainty.generator"),
    ("the valid samples", lambda u: u.update(valid_samples=u["valid_samples"] - 1), "uncertainty.valid_samples"),
    ("a statement added", lambda u: u.update(note="bands checked by hand"), "uncertainty.note"),
    ("a tolerance's text", lambda u: u["tolerances"]["mass_flow"].update(given="0.5 %"),
     "uncertainty.tolerances.mass_flow"),
    ("the sensitivity order", lambda u: u["sensitivity"]["outlet_temperature"].reverse(), "uncertainty.sensitivity"),
]


@pytest.mark.parametrize("what, edit, key", UNCERTAINTY_EDITS, ids=[u[0] for u in UNCERTAINTY_EDITS])
def test_what_the_uncertainty_section_states_is_recomputed(site, what, edit, key):
    path = site / "records" / "LD-01_revB.json"
    record = _forge(path, lambda r: edit(r["uncertainty"]))
    outcome = verify_record(record)
    assert not outcome.ok
    assert any(line.startswith(key) for line in outcome.differences()), outcome.differences()


def test_verify_says_which_texts_are_the_engineers_words(site, capsys):
    code, text = _run(["verify", site / "records" / "LD-02_revB.json"], capsys)
    assert code == 0 and "the engineer's own words: title, preparer, site name, engineer's notes" in text


# -- item 9: an issue in progress ----------------------------------------------------------------------------

def test_a_signed_json_beside_its_older_report_is_an_issue_in_progress(site, keys):
    path = site / "records" / "LD-02_revB.json"
    stopped = _cli(["sign", path, "--key", keys / "c-checker.key"], STEAMCALC_TEST_KILL_AT="moved:0")
    assert stopped.returncode < 0   # killed after the JSON moved, before its reports did
    assert load_record(path)["signatures"] and "Signed as checked" not in path.with_suffix(".html").read_text()
    done = _cli(["verify", path])
    assert done.returncode == 1 and "ISSUE IN PROGRESS" in done.stdout and "DIFFERS" not in done.stdout, done.stdout
    assert "edited by hand" not in done.stdout
    assert _cli(["run", site / "cases" / "LD-02.toml"]).returncode in (0, 1)   # the next writer completes it
    done = _cli(["verify", path])
    assert done.returncode == 0 and "VERIFIED (signed: checked by C. Checker" in done.stdout, done.stdout


def test_a_planted_staging_folder_does_not_excuse_an_edited_report(site):
    path = site / "records" / "LD-02_revB.json"
    record = load_record(path)
    html = path.with_suffix(".html")
    html.write_text(html.read_text().replace("</body>", "<p>Checked and approved.</p></body>"))
    staging = site / "records" / ".steamcalc" / "LD-02_revB.staged"
    staging.mkdir(parents=True)
    (staging / "COMMIT").write_text(json.dumps(["LD-02_revB.html"]))
    (staging / "LD-02_revB.html").write_text(html.read_text())   # the edited page, not the JSON's rendering
    verdicts = {c.path.suffix: c.verdict for c in check_companions(path, record)}
    assert verdicts[".html"] == "differs"
    (staging / "LD-02_revB.html").unlink()
    os.mkfifo(staging / "LD-02_revB.html")   # a FIFO in its place is never opened
    verdicts = {c.path.suffix: c.verdict for c in check_companions(path, record)}
    assert verdicts[".html"] == "differs"


def test_a_report_that_is_a_fifo_is_not_opened(site):
    path = site / "records" / "LD-02_revB.json"
    path.with_suffix(".md").unlink()
    os.mkfifo(path.with_suffix(".md"))
    done = _cli(["verify", path])
    assert done.returncode == 1 and "FIFO" in done.stdout and "LD-02_revB.md" in done.stdout, done.stdout


# -- item 13: special files ----------------------------------------------------------------------------------

@pytest.fixture
def fifo(tmp_path):
    path = tmp_path / "jam"
    os.mkfifo(path)
    return path


SPECIAL = ["fifo", "/dev/zero", "/dev/urandom"]


def _special(which, fifo):
    return fifo if which == "fifo" else Path(which)


@pytest.mark.parametrize("which", SPECIAL)
def test_a_special_file_as_the_key_is_refused_unopened(site, fifo, which):
    special = _special(which, fifo)
    done = _cli(["sign", site / "records" / "LD-02_revB.json", "--key", special])
    text = done.stdout + done.stderr
    assert _clean_refusal(done.returncode, text, str(special), "--key", "not a regular file", "it was not opened")


@pytest.mark.parametrize("which", SPECIAL)
def test_a_special_file_as_the_passphrase_file_is_refused_unopened(site, keys, tmp_path, fifo, which):
    special = _special(which, fifo)
    for argv in (["keys", "new", "--name", "P. Phrase", "--out", tmp_path / "k", "--passphrase-file", special],
                 ["sign", site / "records" / "LD-02_revB.json", "--key", keys / "c-checker.key",
                  "--passphrase-file", special]):
        done = _cli(argv)
        text = done.stdout + done.stderr
        assert _clean_refusal(done.returncode, text, str(special), "--passphrase-file", "not a regular file"), text
    assert not (tmp_path / "k").exists()


def test_a_key_file_too_large_to_be_a_key_is_refused_by_its_size(tmp_path):
    big = tmp_path / "big.key"
    big.write_bytes(b"x" * (MAX_KEY_FILE + 1))
    big.chmod(0o600)
    with pytest.raises(SigningInputError, match="bytes"):
        load_private_key(big)
    with pytest.raises(SigningInputError, match="bytes"):
        read_passphrase(big)


@pytest.mark.parametrize("which", SPECIAL)
def test_a_special_file_among_the_trusted_signers_is_skipped_and_reported(site, keys, fifo, which):
    path = site / "records" / "LD-02_revB.json"
    assert _cli(["sign", path, "--key", keys / "c-checker.key"]).returncode == 0
    jam = site / "trusted_signers" / "jam.pub"
    if which == "fifo":
        os.mkfifo(jam)
    else:
        jam.symlink_to(which)
    for argv in (["verify", path], ["register", site]):
        done = _cli(argv)   # returns at all: a FIFO among the keys never hangs it
        assert "jam.pub" in done.stdout and "it was not opened" in done.stdout, done.stdout + done.stderr
        assert "internal error" not in done.stderr
    done = _cli(["verify", path])
    assert done.returncode == 0 and "valid, trusted" in done.stdout
    # The workbook and the library read the same list the same way.
    assert len(read_trusted(site / "trusted_signers").keys) == 2


def test_a_folder_named_as_a_public_key_is_skipped(site):
    (site / "trusted_signers" / "odd.pub").mkdir()
    read = read_trusted(site / "trusted_signers")
    assert len(read.keys) == 2 and "odd.pub" in read.problems[0] and "a folder" in read.problems[0]


# -- item 14: names --------------------------------------------------------------------------------------------

BAD_NAMES = [("a control character", "C. Checker\x07"), ("an escape sequence", "\x1b[32mC. Checker\x1b[0m"),
             ("a tab", "C.\tChecker"), ("a right-to-left override", "C. Checker\u202e"),
             ("a left-to-right embedding", "\u202aC. Checker"), ("an isolate", "C. \u2067Checker\u2069"),
             ("a line separator", "C. Checker\u2028D. Approver"), ("a paragraph separator", "C. Checker\u2029"),
             ("a line end", "C. Checker\nD. Approver"), ("a zero-width space", "C. Chec\u200bker"),
             ("an over-long name", "C" * 201)]


@pytest.mark.parametrize("what, name", BAD_NAMES, ids=[b[0] for b in BAD_NAMES])
def test_a_key_name_that_cannot_stand_on_a_record_is_refused(tmp_path, capsys, what, name):
    assert name_problem(name) is not None
    code, text = _run(["keys", "new", "--name", name, "--out", tmp_path / "k"], capsys)
    assert _clean_refusal(code, text, "--name", "cannot stand on a record") and not (tmp_path / "k").exists()


def test_plain_names_of_many_scripts_are_accepted():
    for name in ("C. Checker", "Zoë Ångström", "Đorđe Šantić", "李小龍", "مريم الحسن", "अनिल कुमार", "O'Brien-Smith"):
        assert name_problem(name) is None, name


def test_a_key_file_with_a_hostile_name_is_refused(site, keys, tmp_path):
    hostile = tmp_path / "hostile.key"
    hostile.write_text((keys / "c-checker.key").read_text().replace("name: C. Checker", "name: C. Checker\u202e"))
    hostile.chmod(0o600)
    with pytest.raises(SigningInputError, match="bidirectional"):
        load_private_key(hostile)
    pub = site / "trusted_signers" / "hostile.pub"
    pub.write_text((keys / "c-checker.pub").read_text().replace("name: C. Checker", "name: C. Checker\u2028"))
    done = _cli(["verify", site / "records" / "LD-02_revB.json"])
    assert _clean_refusal(done.returncode, done.stdout + done.stderr, "hostile.pub", "separator")


def test_a_signature_under_a_hostile_name_does_not_hold(site, keys):
    path = site / "records" / "LD-02_revB.json"
    record = load_record(path)
    key, _ = load_private_key(keys / "c-checker.key")
    signed = add_signature(record, key, "C. Checker\u202e", "checked", verification_summary(verify_record(record)))
    trusted = read_trusted(site / "trusted_signers").keys
    (check,) = check_signatures(signed, trusted)
    assert not check.ok and "cannot stand on a record" in check.problem and "\u202e" not in check.name


def test_two_trusted_keys_under_one_name_are_warned_of(site, tmp_path):
    assert main(["keys", "new", "--name", "c.  CHECKER", "--out", str(tmp_path / "second")]) == 0
    shutil.copy(tmp_path / "second" / "c-checker.pub", site / "trusted_signers" / "second.pub")
    read = read_trusted(site / "trusted_signers")
    assert len(read.keys) == 3 and len(read.warnings) == 1 and "two trusted keys carry the name" in read.warnings[0]
    done = _cli(["verify", site / "records" / "LD-02_revB.json"])
    assert done.returncode == 0 and "warning: two trusted keys carry the name" in done.stdout


def test_one_key_under_two_names_is_trusted_under_neither(site, keys, capsys):
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(keys / "c-checker.key")]) == 0
    (site / "trusted_signers" / "relabelled.pub").write_text(
        (keys / "c-checker.pub").read_text().replace("name: C. Checker", "name: D. Approver"))
    capsys.readouterr()
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "one key has one owner" in text and "UNKNOWN KEY" in text


@pytest.mark.parametrize("name", ["c-checker.key", "backup.txt", "c-checker.pub.bak"])
def test_a_private_key_in_the_trusted_folder_under_any_name_is_refused(site, keys, capsys, name):
    shutil.copy(keys / "c-checker.key", site / "trusted_signers" / name)
    code, text = _run(["verify", site / "records" / "LD-02_revB.json"], capsys)
    assert _clean_refusal(code, text, name, "private key file is in the trusted signers folder", "new key pair")


def test_a_private_key_named_as_a_public_one_is_refused(site, keys, capsys):
    shutil.copy(keys / "c-checker.key", site / "trusted_signers" / "c-checker-2.pub")
    code, text = _run(["verify", site / "records" / "LD-02_revB.json"], capsys)
    assert _clean_refusal(code, text, "c-checker-2.pub", "private key")


# -- item 17: no internal errors -------------------------------------------------------------------------------

@pytest.mark.parametrize("number, words", [(errno.ENOSPC, "No space left on device"),
                                           (errno.EROFS, "Read-only file system")])
def test_keys_new_on_a_full_or_read_only_disk(tmp_path, capsys, monkeypatch, number, words):
    real = os.write
    out = tmp_path / "k"

    def write(fd, data):
        if os.readlink(f"/proc/self/fd/{fd}").startswith(str(out)):
            raise OSError(number, os.strerror(number))
        return real(fd, data)
    monkeypatch.setattr(os, "write", write)
    code, text = _run(["keys", "new", "--name", "C. Checker", "--out", out], capsys)
    assert _clean_refusal(code, text, str(out / "c-checker.key"), os.strerror(number), "Fix:")
    assert list(out.iterdir()) == []   # no key, no half key, no temporary file


def test_keys_new_when_the_public_key_cannot_be_written_leaves_no_private_key(tmp_path, capsys, monkeypatch):
    real = os.link

    def link(source, target, *args, **kwargs):
        if str(target).endswith(".pub"):
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        return real(source, target, *args, **kwargs)
    monkeypatch.setattr(os, "link", link)
    code, text = _run(["keys", "new", "--name", "C. Checker", "--out", tmp_path / "k"], capsys)
    assert _clean_refusal(code, text, "c-checker.pub", "free some disk space")
    assert list((tmp_path / "k").iterdir()) == []


def test_verify_repair_on_a_read_only_folder(site, capsys, monkeypatch):
    path = site / "records" / "LD-02_revB.json"
    path.with_suffix(".md").write_text("edited")

    def mkstemp(*args, **kwargs):
        raise OSError(errno.EROFS, os.strerror(errno.EROFS))
    monkeypatch.setattr(tempfile, "mkstemp", mkstemp)
    code, text = _run(["verify", path, "--repair"], capsys)
    assert _clean_refusal(code, text, str(path.with_suffix(".md")), "Read-only file system", "writable drive")
    assert "could NOT be re-rendered" in text and path.with_suffix(".md").read_text() == "edited"


def test_sign_on_a_read_only_folder_names_the_file_and_the_fix(site, keys, capsys, monkeypatch):
    path = site / "records" / "LD-02_revB.json"
    before = path.read_bytes()
    real = os.mkdir

    def mkdir(target, *args, **kwargs):
        if str(target).startswith(str(site / "records")):
            raise OSError(errno.EROFS, os.strerror(errno.EROFS))
        return real(target, *args, **kwargs)
    monkeypatch.setattr(os, "mkdir", mkdir)
    code, text = _run(["sign", path, "--key", keys / "c-checker.key"], capsys)
    # Exit 1, as a full disk during a sign-off (tests/test_issuing.py): the record is not signed, and says why.
    assert code == 1 and "internal error" not in text and "Traceback" not in text
    assert all(w in text for w in (str(path), "Read-only file system", "writable drive"))
    assert path.read_bytes() == before


SHAPES = [
    ("signatures as text", lambda r: r.update(signatures="C. Checker"), "signatures"),
    ("a signature a number", lambda r: r.update(signatures=[1]), "signatures.0"),
    ("a signature without its role", lambda r: r.update(signatures=[{}]), "signatures.0.role"),
    ("a signature's fields of the wrong type", lambda r: r.update(signatures=[{
        "role": 1, "name": ["x"], "date": 3, "fingerprint": None, "public_key": 5, "signature": {}}]),
     "signatures.0.role"),
    ("a signature's verification as text", lambda r: r.update(signatures=[{
        "role": "checked", "name": "x", "date": "d", "fingerprint": "f", "public_key": "p", "signature": "s",
        "verification": "all fine"}]), "signatures.0.verification"),
    ("a sign-off as text", lambda r: r.update(signoff="C. Checker"), "signoff"),
    ("a sign-off as a list", lambda r: r.update(signoff=["C. Checker"]), "signoff"),
    ("a sign-off's name a number", lambda r: r.update(signoff={"by": 1, "date": "x"}), "signoff.by"),
    ("a sign-off's verification a list", lambda r: r.update(signoff={"by": "C", "date": "x", "verification": [1]}),
     "signoff.verification"),
    ("checked_by a table", lambda r: r.update(checked_by={"name": "C"}), "checked_by"),
    ("no title", lambda r: r.pop("title"), "title"),
    ("a title of null", lambda r: r.update(title=None), "title"),
    ("a title a number", lambda r: r.update(title=5), "title"),
]


@pytest.mark.parametrize("what, edit, field", SHAPES, ids=[s[0] for s in SHAPES])
def test_a_crafted_shape_is_refused_by_its_field(site, keys, capsys, what, edit, field):
    path = site / "records" / "LD-02_revB.json"
    _forge_json_only(path, edit)
    for argv in (["verify", path], ["sign", path, "--key", keys / "c-checker.key"], ["diff", path, path]):
        code, text = _run(argv, capsys)
        assert _clean_refusal(code, text, str(path), f"field '{field}'", "Fix:"), (argv, text)


def _forge_json_only(path, edit):
    record = json.loads(path.read_text())
    edit(record)
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    path.write_text(json.dumps(record, indent=2))
