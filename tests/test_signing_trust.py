"""Trust you can stake a signature on: planted trust lists, name-only sign-offs, the rules verify keeps,
`run` against an edited record, duplicate JSON keys and a PDF beside a record.

Each attack is the one a hostile colleague tried: a forged signature must never come out "trusted,
VERIFIED", a typed name never shown as a signature, an edited record never kept as "unchanged".
"""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.records.record import compute_content_digest, compute_digest, load_record, record_text
from steamcalc.render.report import RENDERERS, render_html
from steamcalc.review.register import build_register
from steamcalc.review.sign import write_signed
from steamcalc.review.signoff import sign_record
from steamcalc.review.verify import verify_record
from steamcalc.signing.keys import SigningInputError, load_private_key
from steamcalc.signing.signatures import RULES, add_signature, verification_summary
from steamcalc.signing.trust import resolve_trust, site_of_records

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"


@pytest.fixture(autouse=True)
def no_user_settings(tmp_path, monkeypatch):
    """The developer's own settings file never takes part: an empty config folder, no named file."""
    monkeypatch.delenv("STEAMCALC_SETTINGS", raising=False)
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "no-config"))


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """A demo site with LD-02 (warn) and a failing copy LD-09 issued once; key pairs of five people."""
    base = tmp_path_factory.mktemp("trust")
    site = base / "site"
    shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records", "trusted_signers"))
    failing = site / "cases" / "LD-09.toml"
    failing.write_text((site / "cases" / "LD-02.toml").read_text().replace('id = "LD-02"', 'id = "LD-09"')
                       .replace('rated_kv = "32 m^3/h"', 'rated_kv = "5 m^3/h"'))
    assert main(["run", "--quiet", str(site / "cases" / "LD-02.toml"), str(failing)]) == 1
    keys = base / "keys"
    for name in ("C. Checker", "D. Approver", "A. Engineer"):
        assert main(["keys", "new", "--name", name, "--out", str(keys)]) == 0
    # The attacker's key pair, made under the checker's name: the "relabelled" key.
    assert main(["keys", "new", "--name", "C. Checker", "--out", str(base / "attacker")]) == 0
    # A second key of the checker's own name (a new laptop): both trusted.
    assert main(["keys", "new", "--name", "C. Checker", "--out", str(base / "second")]) == 0
    return site, base


@pytest.fixture
def site(issued, tmp_path):
    """A fresh copy of the site, trusting C. Checker, D. Approver and A. Engineer (the preparer)."""
    source, base = issued
    folder = tmp_path / "site"
    shutil.copytree(source, folder)
    (folder / "trusted_signers").mkdir()
    for stem in ("c-checker", "d-approver", "a-engineer"):
        shutil.copy(base / "keys" / f"{stem}.pub", folder / "trusted_signers")
    return folder


@pytest.fixture
def keys(issued):
    return issued[1] / "keys"


@pytest.fixture
def attacker(issued):
    return issued[1] / "attacker"


def _run(argv, capsys):
    code = main([str(a) for a in argv])
    out = capsys.readouterr()
    return code, out.out + out.err


def _snapshot(path):
    return {p.name: p.read_bytes() for p in path.parent.glob(path.stem + ".*")}


def _forge(path, mutate):
    """Edit a record as a forger would: recompute both public digests and re-render the reports."""
    record = json.loads(path.read_text())
    mutate(record)
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    path.write_text(record_text(record))
    for suffix, render in RENDERERS.items():
        path.with_suffix(suffix).write_text(render(record))


def _plant(folder, public_key):
    """What the attack puts beside the records: an empty site.toml and a trusted_signers/ with their key."""
    (folder / "site.toml").write_text("")
    (folder / "trusted_signers").mkdir(exist_ok=True)
    shutil.copy(public_key, folder / "trusted_signers" / "c-checker.pub")


# -- 1. a trust list planted beside the records ------------------------------------------------------

def test_the_planted_trust_list_attack_is_not_trusted(site, keys, attacker, capsys):
    """The attack as reported: the attacker signs with their own key under the checker's name, then plants
    records/site.toml and records/trusted_signers/ holding that key. Before: "trusted, VERIFIED"."""
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(attacker / "c-checker.key")]) == 0
    _plant(site / "records", attacker / "c-checker.pub")
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "verdict: FAILED" in text, text
    assert "UNKNOWN KEY" in text and "valid, trusted" not in text
    # Which list was used, and which were found and not used, is said.
    assert f"trusted signers: {site.resolve() / 'trusted_signers'} (3 keys; the trusted_signers/ of the site" in text
    assert f"not used: {(site / 'records' / 'site.toml').resolve()}" in text
    assert f"not used: {(site / 'records' / 'trusted_signers').resolve()}" in text
    # The register says the same, and so does sign (it will not countersign over the forged signature).
    row = {r.json: r for r in build_register(site / "records")}["LD-02_revB.json"]
    assert row.signatures.endswith("unknown key") and not row.valid
    code, text = _run(["sign", path, "--key", keys / "d-approver.key", "--role", "approved"], capsys)
    assert code == 1 and "does not hold" in text


@pytest.mark.parametrize("layout", ["records/sub", "records/a/records", "records/a/b"])
def test_planted_lists_deeper_in_the_records_folder_are_not_trusted(site, attacker, capsys, layout):
    # The forged record moved into a folder of the attacker's making, the site.toml planted above it.
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(attacker / "c-checker.key")]) == 0
    target = site / layout
    target.mkdir(parents=True)
    for file in path.parent.glob("LD-02_revB.*"):
        shutil.copy(file, target / file.name)
    _plant(target.parent, attacker / "c-checker.pub")
    _plant(target, attacker / "c-checker.pub")
    code, text = _run(["verify", target / "LD-02_revB.json"], capsys)
    assert code == 1 and "valid, trusted" not in text and "verdict: FAILED" in text, text
    # The folder above the forged record holds a site.toml, but inside the real site: no list at all.
    assert "trusted signers: none (" in text and "lies inside the site folder" in text


def test_register_of_a_records_folder_holding_a_planted_site(site, attacker, capsys):
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(attacker / "c-checker.key")]) == 0
    _plant(site / "records", attacker / "c-checker.pub")
    (site / "records" / "records").mkdir()
    for file in path.parent.glob("LD-02_revB.*"):
        shutil.copy(file, site / "records" / "records" / file.name)
    for folder in (site / "records", site / "records" / "records", site):
        code, text = _run(["register", folder], capsys)
        assert code == 1 and ", trusted" not in text and "C. Checker, key" in text and "unknown key" in text, text
        assert "trusted signers: " in text


def test_trust_comes_from_trusted_or_the_settings_file_and_is_named(site, keys, tmp_path, monkeypatch, capsys):
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(keys / "c-checker.key")]) == 0
    # --trusted names an empty list: the signature is not trusted, and the list is named.
    empty = tmp_path / "empty-list"
    empty.mkdir()
    code, text = _run(["verify", path, "--trusted", empty], capsys)
    assert code == 1 and f"trusted signers: {empty} (0 keys; named with --trusted)" in text
    # The user's settings file names the list: it is used before the site's, and named.
    team = tmp_path / "team-keys"
    team.mkdir()
    shutil.copy(keys / "c-checker.pub", team)
    settings = tmp_path / "settings.toml"
    settings.write_text('[signing]\ntrusted_signers = "team-keys"\n')
    monkeypatch.setenv("STEAMCALC_SETTINGS", str(settings))
    code, text = _run(["verify", path], capsys)
    assert code == 0 and f"(1 key; set in your settings file {settings})" in text and "valid, trusted" in text
    assert resolve_trust(path.parent).folder == team
    # A settings file naming a folder that is not there: exit 2, the settings file and the field named.
    settings.write_text('[signing]\ntrusted_signers = "nowhere"\n')
    code, text = _run(["verify", path], capsys)
    assert code == 2 and str(settings) in text and "signing.trusted_signers" in text and "Fix:" in text
    settings.write_text("[signing\n")
    code, text = _run(["verify", path], capsys)
    assert code == 2 and str(settings) in text and "not valid TOML" in text and "Traceback" not in text


def test_a_site_inside_another_site_is_not_trusted(tmp_path):
    outer = tmp_path / "plant"
    (outer / "inner" / "records").mkdir(parents=True)
    (outer / "site.toml").write_text("")
    (outer / "inner" / "site.toml").write_text("")
    site, why = site_of_records(outer / "inner" / "records")
    assert site is None and "inside the site folder" in why
    assert site_of_records(outer / "records")[0] == outer.resolve()
    # The records folder itself is never its own site.
    (tmp_path / "flat").mkdir()
    (tmp_path / "flat" / "site.toml").write_text("")
    assert site_of_records(tmp_path / "flat")[0] is None


# -- 2. name-only sign-offs -------------------------------------------------------------------------

def test_sign_by_name_alone_is_refused_with_the_fix(site, capsys):
    path = site / "records" / "LD-02_revB.json"
    before = _snapshot(path)
    code, text = _run(["sign", path, "--by", "C. Checker"], capsys)
    assert code == 2 and str(path) in text and "field '--by'" in text and "'C. Checker'" in text
    assert "Fix: sign with your key" in text and "steamcalc keys new" in text and "Traceback" not in text
    assert _snapshot(path) == before
    with pytest.raises(SigningInputError, match="by name alone is not issued"):
        sign_record(path, load_record(path), "C. Checker")
    assert _snapshot(path) == before


def _typed_name(record, name="Chief Engineer"):
    record.update(checked_by=name, signoff={"by": name, "date": "2099-01-01T00:00:00Z", "verification": {
        "integrity": "intact", "results_reproduced": "999 of 999", "checks_reproduced": True, "version_changes": {}}})


def test_a_typed_name_is_shown_as_a_name_typed_never_green(site, capsys):
    path = site / "records" / "LD-02_revB.json"
    _forge(path, _typed_name)
    page, md = path.with_suffix(".html").read_text(), path.with_suffix(".md").read_text()
    for text in (page, md):
        assert "Checked and signed" not in text and "Name typed, not a signature" in text
    # Amber and dashed, not the pass colour of a signature's box; no signature box at all.
    assert '<div class="nametyped" style="border: 2px dashed var(--warn);' in page
    assert 'class="signoff"' not in page.split("<h2>Checks</h2>")[0] and "var(--pass)" not in page.split("nametyped")[1]
    rows = {r.json: r for r in build_register(site)}
    assert rows["LD-02_revB.json"].signatures.startswith("not signed; name typed, not a signature: Chief Engineer")


def test_the_review_workbook_asks_for_the_key(site, keys):
    from steamcalc.ui.review import ReviewBook

    path = site / "records" / "LD-02_revB.json"
    before = _snapshot(path)
    book = ReviewBook(path)
    said = book.sign("C. Checker")
    assert said.startswith("not signed: give your private key file") and "never by a name alone" in said
    assert _snapshot(path) == before
    book._checker.value = "C. Checker"
    book._on_sign()
    assert "Key file box" in book._sign_status.value
    said = book.sign("", key_file=keys / "c-checker.key")
    assert said.startswith("checked, signed by C. Checker"), said
    assert "C. Checker (checked, key" in book.summary() and "trusted)" in book.summary()
    assert "trusted signers: " in book.summary() and "verdict: VERIFIED" in book.summary()


def test_the_workbook_shows_a_typed_name_as_not_signed(site):
    from steamcalc.ui.review import ReviewBook

    path = site / "records" / "LD-02_revB.json"
    _forge(path, lambda r: _typed_name(r, "C. Checker"))
    summary = ReviewBook(path).summary()
    assert "checked by: not signed (C. Checker: a name typed, not a signature)" in summary
    filtered = [r.json for r in ReviewBook(path).register("not signed")]
    assert "LD-02_revB.json" in filtered


def test_a_report_that_shows_a_typed_name_as_signed_is_redrawn_by_repair(site, capsys):
    path = site / "records" / "LD-02_revB.json"
    comparisons = len(verify_record(load_record(path)).comparisons)
    _forge(path, lambda r: _typed_name(r, "C. Checker") or r["signoff"]["verification"].update(
        results_reproduced=f"{comparisons} of {comparisons}"))
    page = path.with_suffix(".html")
    # As an earlier release drew it: a green "Checked and signed" box.
    text = page.read_text()
    start = text.index('<div class="nametyped"')
    page.write_text(text[:start] + '<div class="signoff"><b>Checked and signed</b> by'
                    + text[text.index("</b>", start) + len("</b>"):])
    code, text = _run(["verify", path], capsys)
    assert code == 1 and "shows the typed name as a sign-off" in text and "--repair" in text
    code, text = _run(["verify", path, "--repair"], capsys)
    assert code == 0 and "verdict: VERIFIED (not signed; name typed, not a signature)" in text, text
    assert "Checked and signed" not in page.read_text()


# -- 3. verify keeps the rules sign keeps -----------------------------------------------------------

def _library_sign(path, key_file, role, now, name=None):
    """Sign through the library, skipping every refusal of `sign`: as a script or another tool could."""
    record = load_record(path)
    key, key_name = load_private_key(key_file)
    signed = add_signature(record, key, name or key_name, role, verification_summary(verify_record(record)), now)
    write_signed(path, signed)


@pytest.mark.parametrize("what, record, chain, rule", [
    ("approved without checked", "LD-02_revB.json", [("d-approver", "approved", "2026-01-02T00:00:00Z")], "order"),
    ("approved before checked", "LD-02_revB.json", [("d-approver", "approved", "2026-01-01T00:00:00Z"),
                                                    ("c-checker", "checked", "2026-01-02T00:00:00Z")], "order"),
    ("approval dated before the check", "LD-02_revB.json", [("c-checker", "checked", "2026-01-03T00:00:00Z"),
                                                            ("d-approver", "approved", "2026-01-02T00:00:00Z")], "order"),
    ("one key for both", "LD-02_revB.json", [("c-checker", "checked", "2026-01-01T00:00:00Z"),
                                             ("c-checker", "approved", "2026-01-02T00:00:00Z")], "keys"),
    ("one person, two keys", "LD-02_revB.json", [("c-checker", "checked", "2026-01-01T00:00:00Z"),
                                                 ("second", "approved", "2026-01-02T00:00:00Z")], "people"),
    ("the preparer checks", "LD-02_revB.json", [("a-engineer", "checked", "2026-01-01T00:00:00Z")], "preparer"),
    ("a failing record signed", "LD-09_revB.json", [("c-checker", "checked", "2026-01-01T00:00:00Z")], "failing"),
])
def test_a_library_signature_that_breaks_a_rule_fails_verify_naming_it(site, issued, capsys, what, record, chain, rule):
    base = issued[1]
    path = site / "records" / record
    shutil.copy(base / "second" / "c-checker.pub", site / "trusted_signers" / "c-checker-2.pub")
    for key, role, now in chain:
        key_file = base / "second" / "c-checker.key" if key == "second" else base / "keys" / f"{key}.key"
        _library_sign(path, key_file, role, now)
    code, text = _run(["verify", path], capsys)
    assert code == 1 and f"rule broken: {RULES[rule]}" in text and "verdict: FAILED" in text, text
    row = {r.json: r for r in build_register(site)}[record]
    assert not row.valid and f"rule broken: {RULES[rule]}" in row.signatures


def test_a_library_chain_that_keeps_the_rules_verifies(site, keys, capsys):
    path = site / "records" / "LD-02_revB.json"
    _library_sign(path, keys / "c-checker.key", "checked", "2026-01-01T00:00:00Z")
    _library_sign(path, keys / "d-approver.key", "approved", "2026-01-02T00:00:00Z")
    code, text = _run(["verify", path], capsys)
    assert code == 0 and "rule broken" not in text, text
    assert "verdict: VERIFIED (signed: checked by C. Checker, approved by D. Approver, trusted keys)" in text


def test_sign_refuses_a_second_signature_with_the_same_key(site, keys, tmp_path, capsys):
    # The key file's name line edited: the same key presented as another person's.
    relabelled = tmp_path / "relabelled.key"
    relabelled.write_text((keys / "c-checker.key").read_text().replace("name: C. Checker", "name: D. Approver"))
    relabelled.chmod(0o600)
    path = site / "records" / "LD-02_revB.json"
    assert main(["sign", str(path), "--key", str(keys / "c-checker.key")]) == 0
    code, text = _run(["sign", path, "--key", relabelled, "--role", "approved"], capsys)
    assert code == 1 and "two different keys" in text


# -- 4. run never trusts a stored digest ------------------------------------------------------------

def _tampered_results(record):
    record["status"] = "pass"
    for check in record["checks"]:
        check["status"] = "pass"
    first = next(iter(record["results"]))
    record["results"][first]["value"] = 13910.0


@pytest.mark.parametrize("how", ["both digests recomputed", "public digest only", "created only, no digest"])
def test_run_refuses_an_edited_record_and_never_redraws_from_it(site, capsys, how):
    path = site / "records" / "LD-02_revB.json"
    record = json.loads(path.read_text())
    if how == "created only, no digest":
        record["created"] = "2020-01-01T00:00:00Z"
    else:
        _tampered_results(record)
        if how == "both digests recomputed":
            record["content_digest"] = compute_content_digest(record)
        record["digest"] = compute_digest(record)
    path.write_text(record_text(record))
    path.with_suffix(".html").unlink()   # a missing report was re-rendered from the tampered content
    before = _snapshot(path)
    code, text = _run(["run", site / "cases" / "LD-02.toml"], capsys)
    assert code == 2 and str(path) in text and "unchanged" not in text and "Traceback" not in text, text
    assert "edited after it was issued" in text or "already exists with different content" in text
    assert _snapshot(path) == before and not path.with_suffix(".html").exists()


def test_run_keeps_an_intact_record_as_unchanged(site, capsys):
    code, text = _run(["run", site / "cases" / "LD-02.toml"], capsys)
    assert code == 0 and "unchanged" in text


# -- 6. duplicate keys; a PDF beside a record ---------------------------------------------------------

@pytest.mark.parametrize("where", ["top level", "in a result"])
def test_a_record_with_a_duplicate_key_is_refused_by_name(site, capsys, where):
    path = site / "records" / "LD-02_revB.json"
    text = path.read_text()
    if where == "top level":
        text = text.replace('"status": "warn",', '"status": "warn",\n  "status": "pass",', 1)
        key = "status"
    else:
        text = text.replace('"unit": ', '"unit": "kg/h",\n      "unit": ', 1)
        key = "unit"
    assert text != path.read_text()
    path.write_text(text)
    code, out = _run(["verify", path], capsys)
    assert code == 2 and str(path) in out and f"the key '{key}' appears twice" in out and "Fix:" in out, out
    assert "Traceback" not in out
    row = {r.json: r for r in build_register(site)}["LD-02_revB.json"]
    assert not row.valid and "appears twice" in row.verification
    code, out = _run(["run", site / "cases" / "LD-02.toml"], capsys)
    assert code == 2 and "not a readable record" in out


def test_a_pdf_beside_a_record_is_reported_as_not_checked(site, capsys):
    path = site / "records" / "LD-02_revB.json"
    path.with_suffix(".pdf").write_bytes(b"%PDF-1.4 anything at all\n")
    code, text = _run(["verify", path], capsys)
    assert code == 0 and "companion LD-02_revB.pdf: NOT CHECKED" in text, text
    row = {r.json: r for r in build_register(site)}["LD-02_revB.json"]
    assert row.companions == "match; not checked: pdf"
    assert render_html(load_record(path)) == path.with_suffix(".html").read_text()
