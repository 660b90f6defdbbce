"""Sign-offs with keys: round trip, every forgery a hostile colleague tried on the name-only
sign-off, untrusted keys, companions, migration of name-only sign-offs, and bad input."""

import json
import os
import shutil
import stat
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.records.record import compute_content_digest, compute_digest, load_record, record_text
from steamcalc.render.report import RENDERERS
from steamcalc.review.verify import verify_record


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out + out.err


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """A demo site with LD-02 (warn) and a failing copy of it issued once, and three key pairs."""
    demo_site_dir = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
    base = tmp_path_factory.mktemp("signing")
    site = base / "site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records", "trusted_signers"))
    failing = site / "cases" / "LD-09.toml"
    failing.write_text((site / "cases" / "LD-02.toml").read_text().replace('id = "LD-02"', 'id = "LD-09"')
                       .replace('rated_kv = "32 m^3/h"', 'rated_kv = "5 m^3/h"'))
    assert main(["run", "--quiet", str(site / "cases" / "LD-02.toml"), str(failing)]) == 1
    keys = base / "keys"
    for name in ("C. Checker", "D. Approver", "Chief Engineer"):
        assert main(["keys", "new", "--name", name, "--out", str(keys)]) == 0
    return site, keys


@pytest.fixture
def site(issued, tmp_path):
    """A fresh copy of the issued site, trusting C. Checker and D. Approver (not 'Chief Engineer')."""
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
    """Edit a record as a forger would: recompute both digests and re-render its companions."""
    record = json.loads(path.read_text())
    mutate(record)
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    path.write_text(record_text(record))
    for suffix, render in RENDERERS.items():
        path.with_suffix(suffix).write_text(render(record))


def _snapshot(path):
    return {p.name: p.read_bytes() for p in path.parent.glob(path.stem + ".*")}


def test_keys_new_writes_a_private_key_only_its_owner_reads(keys, capsys):
    assert stat.S_IMODE(os.stat(keys / "c-checker.key").st_mode) == 0o600
    public = (keys / "c-checker.pub").read_text()
    assert "name: C. Checker" in public and "fingerprint: sha256:" in public and "PRIVATE" not in public
    code, text = _run(["keys", "new", "--name", "C. Checker", "--out", keys], capsys)
    assert code == 2 and "never overwritten" in text


def test_sign_and_verify_round_trip_checked_then_approved(site, keys, capsys):
    path = site / "records" / "LD-02_revB.json"
    content = load_record(path)["content_digest"]
    code, text = _run(["sign", path, "--key", keys / "c-checker.key"], capsys)
    assert code == 0, text
    code, text = _run(["sign", path, "--key", keys / "d-approver.key", "--role", "approved", "--by", "D. Approver"],
                      capsys)
    assert code == 0, text
    signed = load_record(path)
    assert [s["role"] for s in signed["signatures"]] == ["checked", "approved"]
    assert signed["content_digest"] == content  # signing is not content
    code, text = _run(["verify", path], capsys)
    assert code == 0, text
    assert "checked: signed by C. Checker" in text and "approved: signed by D. Approver" in text
    assert text.count("valid, trusted") == 2 and "verdict: VERIFIED" in text
    page = path.with_suffix(".html").read_text()
    for entry in signed["signatures"]:
        assert entry["fingerprint"] in page
    # Re-running the unchanged case keeps the signed record as it is.
    code, text = _run(["run", site / "cases" / "LD-02.toml"], capsys)
    assert code == 0 and "unchanged" in text and load_record(path)["signatures"] == signed["signatures"]


def test_unsigned_record_says_not_signed(site, capsys):
    code, text = _run(["verify", site / "records" / "LD-02_revB.json"], capsys)
    assert code == 0 and "signatures: not signed" in text


def test_a_key_not_in_the_trusted_list_fails_verify(site, keys, capsys):
    path = site / "records" / "LD-02_revB.json"
    code, text = _run(["sign", path, "--key", keys / "chief-engineer.key"], capsys)
    assert code == 0 and "not in" in text
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "UNKNOWN KEY" in text and "verdict: FAILED" in text
    # Nor does a trusted checker countersign over it.
    code, text = _run(["sign", path, "--key", keys / "d-approver.key", "--role", "approved"], capsys)
    assert code == 1 and "does not hold" in text


def test_a_record_edited_after_signing_fails_its_signature(site, keys, capsys):
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(keys / "c-checker.key")]) == 0
    _forge(path, lambda r: r.update(title=r["title"] + " (as built)"))
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "INVALID" in text and "not over this record's content" in text


# -- the forgeries: each caught by verify and refused by sign -------------------------------------

def _edited_status(record):
    record["status"] = "pass"
    for check in record["checks"]:
        check["status"] = "pass"


def _removed_cautions(record):
    record["cautions"] = record["cautions"][1:]


def _rewritten_step(record):
    record["steps"][0]["substituted"] = "whatever the forger wants"


FORGERIES = [
    # (what, record, how, what verify says)
    ("overall status only, failing record", "LD-09_revB.json", lambda r: r.update(status="pass"),
     "status: recorded 'pass', recomputed 'fail'"),
    ("edited status, failing record", "LD-09_revB.json", _edited_status, "status: recorded 'pass', recomputed 'fail'"),
    ("edited status, warning record", "LD-02_revB.json", _edited_status, "status: recorded 'pass', recomputed 'warn'"),
    ("removed cautions", "LD-02_revB.json", _removed_cautions, "cautions: missing"),
    ("rewritten step", "LD-02_revB.json", _rewritten_step, "step 1"),
]


@pytest.mark.parametrize("what, name, mutate, said", FORGERIES, ids=[f[0] for f in FORGERIES])
def test_forged_content_with_recomputed_digests(site, keys, capsys, what, name, mutate, said):
    path = site / "records" / name
    _forge(path, mutate)
    code, text = _run(["verify", path], capsys)
    assert code == 1 and said in text and "integrity: intact" in text, text
    before = _snapshot(path)
    code, text = _run(["sign", path, "--key", keys / "c-checker.key"], capsys)
    assert code == 1 and "refused" in text, text
    assert _snapshot(path) == before
    # A name alone is refused before the record is even read (exit 2: not a way of signing).
    assert main(["sign", str(path), "--by", "C. Checker"]) == 2
    assert _snapshot(path) == before


def test_a_failing_record_is_never_signed(site, keys, capsys):
    path = site / "records" / "LD-09_revB.json"
    before = _snapshot(path)
    code, text = _run(["sign", path, "--key", keys / "c-checker.key"], capsys)
    assert code == 1 and "recomputed status is FAIL" in text
    assert _snapshot(path) == before


def test_a_signature_copied_from_another_record(site, keys, capsys):
    signed = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(signed), "--key", str(keys / "c-checker.key")]) == 0
    entries = load_record(signed)["signatures"]
    target = site / "records" / "LD-09_revB.json"
    _forge(target, lambda r: r.update(signatures=entries))
    code, text = _run(["verify", target], capsys)
    assert code == 1 and "INVALID" in text and "not over this record's content" in text
    code, text = _run(["sign", target, "--key", keys / "d-approver.key", "--role", "approved"], capsys)
    assert code == 1


def test_a_forged_signature_in_a_trusted_name(site, keys, capsys):
    """The trusted checker's name, fingerprint and public key, and a signature the forger made up."""
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(keys / "c-checker.key")]) == 0
    genuine = load_record(path)["signatures"][0]
    forged = dict(genuine, role="approved", name="C. Checker", date="2026-12-31T00:00:00Z")
    _forge(path, lambda r: r["signatures"].append(forged))
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "approved: signed by C. Checker" in text and "INVALID" in text


def test_a_forged_name_only_signoff(site, keys, capsys):
    """The v0.1 forgery: a name-only sign-off with invented claims and recomputed digests."""
    path = site / "records" / "LD-02_revB.json"
    _forge(path, lambda r: r.update(checked_by="Chief Engineer", signoff={
        "by": "Chief Engineer", "date": "2026-12-31T00:00:00Z",
        "verification": {"integrity": "intact", "results_reproduced": "999 of 999", "checks_reproduced": True,
                         "version_changes": {}}}))
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "claims 999 of 999" in text and "name typed, not a signature: Chief Engineer" in text
    code, text = _run(["sign", path, "--key", keys / "c-checker.key"], capsys)
    assert code == 1 and "raised revision" in text


def test_an_edited_html_is_caught_and_repaired(site, keys, capsys):
    path = site / "records" / "LD-09_revB.json"
    page = path.with_suffix(".html")
    page.write_text(page.read_text().replace('class="status fail">fail', 'class="status pass">pass'))
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "companion LD-09_revB.html: DIFFERS" in text
    ld02 = site / "records" / "LD-02_revB.json"
    ld02.with_suffix(".md").write_text("# nothing to see\n")
    code, text = _run(["sign", ld02, "--key", keys / "c-checker.key"], capsys)
    assert code == 1 and "LD-02_revB.md" in text and "--repair" in text
    code, text = _run(["verify", ld02, "--repair"], capsys)
    assert code == 0 and "repaired" in text
    assert _run(["verify", ld02], capsys)[0] == 0


def test_repair_refused_for_a_record_that_does_not_verify(site, capsys):
    path = site / "records" / "LD-02_revB.json"
    _forge(path, _removed_cautions)
    path.with_suffix(".md").write_text("edited\n")
    code, text = _run(["verify", path, "--repair"], capsys)
    assert code == 1 and "repair: not done" in text and path.with_suffix(".md").read_text() == "edited\n"


# -- migration ------------------------------------------------------------------------------------

def _typed_name(record, name="C. Checker", results="7 of 7"):
    """A sign-off by name as release 0.1 wrote it: checked_by and a signoff block (no key)."""
    record.update(checked_by=name, signoff={
        "by": name, "date": "2099-01-01T00:00:00Z",
        "verification": {"integrity": "intact", "results_reproduced": results, "checks_reproduced": True,
                         "version_changes": {}}})


def test_a_typed_name_verifies_as_not_signed_and_is_never_shown_as_signed(site, keys, capsys):
    path = site / "records" / "LD-02_revB.json"
    comparisons = len(verify_record(load_record(path)).comparisons)
    _forge(path, lambda r: _typed_name(r, results=f"{comparisons} of {comparisons}"))
    code, text = _run(["verify", path], capsys)
    assert "signature: none - name typed, not a signature: C. Checker" in text, text
    assert "signatures: not signed" in text and "verdict: VERIFIED (not signed; name typed, not a signature)" in text
    page = path.with_suffix(".html").read_text()
    assert "Checked and signed" not in page and 'class="nametyped"' in page and "Name typed, not a signature" in page
    assert "not signed (C. Checker: a name typed, not a signature)" in page
    code, text = _run(["sign", path, "--key", keys / "c-checker.key"], capsys)
    assert code == 1 and "raised revision" in text
    case = site / "cases" / "LD-02.toml"
    case.write_text(case.read_text().replace('revision = "B"', 'revision = "C"'))
    assert main(["run", str(case)]) == 0
    code, text = _run(["sign", site / "records" / "LD-02_revC.json", "--key", keys / "c-checker.key"], capsys)
    assert code == 0, text


# -- bad input: exit 2, a fix, nothing written ---------------------------------------------------

def _rsa_key_file(path, header):
    from cryptography.hazmat.primitives import serialization
    from cryptography.hazmat.primitives.asymmetric import rsa

    pem = rsa.generate_private_key(public_exponent=65537, key_size=2048).private_bytes(
        serialization.Encoding.PEM, serialization.PrivateFormat.PKCS8, serialization.NoEncryption()).decode()
    path.write_text(("steamcalc private signing key (Ed25519) - keep this file to yourself\nname: R. Sa\n"
                     if header else "") + pem)
    path.chmod(0o600)
    return path


def test_bad_keys_and_trusted_lists(site, keys, tmp_path, capsys):
    path = site / "records" / "LD-02_revB.json"
    before = _snapshot(path)
    secret = tmp_path / "secret.txt"
    secret.write_text("correct horse\n")
    wrong = tmp_path / "wrong.txt"
    wrong.write_text("battery staple\n")
    assert main(["keys", "new", "--name", "P. Protected", "--out", str(tmp_path / "k"),
                 "--passphrase-file", str(secret)]) == 0
    protected = tmp_path / "k" / "p-protected.key"
    cases = [
        (["--key", protected, "--passphrase-file", wrong], "passphrase is wrong"),
        (["--key", protected], "protected by a passphrase"),
        (["--key", _rsa_key_file(tmp_path / "rsa.key", header=True)], "wrong type"),
        (["--key", _rsa_key_file(tmp_path / "plain.key", header=False)], "not a steamcalc private key"),
        (["--key", keys / "c-checker.pub"], "a public key file"),
        (["--key", keys / "c-checker.key", "--by", "Someone Else"], "belongs to C. Checker"),
        (["--key", keys / "c-checker.key", "--trusted", tmp_path / "nowhere"], "does not exist"),
    ]
    for extra, said in cases:
        code, text = _run(["sign", path] + extra, capsys)
        assert code == 2 and said in text and "Fix:" in text and "Traceback" not in text, (extra, text)
        assert _snapshot(path) == before
    (site / "trusted_signers" / "junk.pub").write_text("hello\n")
    for argv in (["sign", path, "--key", keys / "c-checker.key"], ["verify", path]):
        code, text = _run(argv, capsys)
        assert code == 2 and "junk.pub" in text and "not a steamcalc public key" in text, text
    (site / "trusted_signers" / "junk.pub").unlink()
    (site / "trusted_signers" / "gone.pub").symlink_to(tmp_path / "missing.pub")
    code, text = _run(["verify", path], capsys)
    assert code == 2 and "gone.pub" in text and "missing" in text
    assert _snapshot(path) == before
    code, text = _run(["sign", path], capsys)
    assert code == 2 and "keys new" in text


def test_the_passphrase_protected_key_signs(site, tmp_path, capsys):
    secret = tmp_path / "secret.txt"
    secret.write_text("correct horse\n")
    assert main(["keys", "new", "--name", "P. Protected", "--out", str(tmp_path), "--passphrase-file", str(secret)]) == 0
    assert "ENCRYPTED" in (tmp_path / "p-protected.key").read_text()
    shutil.copy(tmp_path / "p-protected.pub", site / "trusted_signers")
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(tmp_path / "p-protected.key"), "--passphrase-file", str(secret)]) == 0
    assert _run(["verify", path], capsys)[0] == 0


def test_document_control_order(site, keys, capsys):
    path = site / "records" / "LD-02_revB.json"
    code, text = _run(["sign", path, "--key", keys / "d-approver.key", "--role", "approved"], capsys)
    assert code == 1 and "checked before it is approved" in text
    assert main(["sign", str(path), "--key", str(keys / "c-checker.key")]) == 0
    code, text = _run(["sign", path, "--key", keys / "c-checker.key", "--role", "approved"], capsys)
    assert code == 1 and "different people" in text


def test_new_site_copies_the_trusted_signers(site, tmp_path, capsys):
    target = tmp_path / "new_plant"
    assert main(["new-site", str(target), "--from", str(site)]) == 0
    assert sorted(p.name for p in (target / "trusted_signers").iterdir()) == ["c-checker.pub", "d-approver.pub"]


_SIGNED = {"role": "checked", "name": "X", "date": "2026-01-01T00:00:00Z", "fingerprint": "sha256:00"}


@pytest.mark.parametrize("junk", [
    [dict(_SIGNED, public_key="!!", signature="??")],
    [dict(_SIGNED, public_key="AAAA", signature="AAAA", verification={})],
], ids=["bad base64", "short key"])
def test_junk_signatures_fail_verify_without_a_traceback(site, capsys, junk):
    path = site / "records" / "LD-02_revB.json"
    _forge(path, lambda r: r.update(signatures=junk))
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "verdict: FAILED" in text and "internal error" not in text, text


@pytest.mark.parametrize("junk, field", [
    ("not a list", "'signatures'"), (["not a table"], "'signatures.0'"), ([{}], "'signatures.0.role'"),
    ([dict(_SIGNED, public_key="AAAA", signature="AAAA", verification="nothing")], "'signatures.0.verification'"),
], ids=["string", "list of strings", "empty entry", "verification not a table"])
def test_signatures_out_of_the_record_schema_are_refused_by_name(site, capsys, junk, field):
    # Not a signature that fails: not a record steamcalc writes. The file and the field are named, exit 2.
    path = site / "records" / "LD-02_revB.json"
    _forge(path, lambda r: r.update(signatures=junk))
    code, text = _run(["verify", path], capsys)
    assert code == 2 and "NOT VERIFIED" in text and f"field {field}" in text and "LD-02_revB.json" in text, text
    assert "Traceback" not in text and "internal error" not in text


def test_keys_new_into_a_file_is_refused(tmp_path, capsys):
    target = tmp_path / "a-file"
    target.write_text("x")
    code, text = _run(["keys", "new", "--name", "C. Checker", "--out", target], capsys)
    assert code == 2 and "not a folder" in text
    code, text = _run(["keys", "new", "--name", "  ", "--out", tmp_path / "k"], capsys)
    assert code == 2 and "name is empty" in text and not (tmp_path / "k").exists()


def test_a_name_only_signoff_never_goes_over_keyed_signatures(site, keys, capsys):
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(keys / "c-checker.key")]) == 0
    before = _snapshot(path)
    code, text = _run(["sign", path, "--by", "D. Approver"], capsys)
    assert code == 2 and "by name alone is not issued" in text and "--key" in text and _snapshot(path) == before
    assert _run(["verify", path], capsys)[0] == 0


def test_a_private_key_readable_by_others_or_left_in_the_trusted_folder(site, keys, tmp_path, capsys):
    path = site / "records" / "LD-02_revB.json"
    loose = tmp_path / "loose.key"
    shutil.copy(keys / "c-checker.key", loose)
    loose.chmod(0o644)
    code, text = _run(["sign", path, "--key", loose], capsys)
    assert code == 2 and "can be read by others" in text and "chmod 600" in text
    shutil.copy(keys / "d-approver.key", site / "trusted_signers")
    code, text = _run(["verify", path], capsys)
    assert code == 2 and "d-approver.key" in text and "private key file is in the trusted signers folder" in text


def test_two_signers_at_once_one_signs_and_the_other_is_told_why(site, keys):
    # Two processes sign the same record as "checked" at the same moment: the record's lock is held
    # from reading through verifying to writing, so the second sees the first one's signature.
    import subprocess
    import sys
    path = site / "records" / "LD-02_revB.json"
    runs = [subprocess.Popen([sys.executable, "-m", "steamcalc", "sign", str(path), "--key", str(keys / key)],
                             stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                             env={**os.environ, "PYTHONPATH": str(Path(__file__).resolve().parent.parent)})
            for key in ("c-checker.key", "d-approver.key")]
    outcomes = [(run.wait(timeout=120), run.stdout.read() + run.stderr.read()) for run in runs]
    assert sorted(code for code, _ in outcomes) == [0, 1], outcomes
    refused = next(text for code, text in outcomes if code == 1)
    assert "already signed as checked" in refused, refused
    signed = load_record(path)
    assert len(signed["signatures"]) == 1
    assert all(RENDERERS[s](signed) == path.with_suffix(s).read_text(encoding="utf-8") for s in RENDERERS)
