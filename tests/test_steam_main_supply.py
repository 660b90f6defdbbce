"""A steam main fed from an issued let-down record's outlet ([inputs.supply_link]): the supply state is the
record's outlet, the link is kept by id, revision, kind and content digest, verify and register check it, and a
bad link is refused by name with a fix."""

import json
import shutil
from pathlib import Path

import pytest
from iapws import IAPWS97

from steamcalc.cli import main
from steamcalc.records.record import compute_content_digest, compute_digest
from steamcalc.review.register import build_register

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"


def _main_case(link):
    """SM-01's main fed from a let-down record instead of the MP header; its return to a vented receiver."""
    text = (DEMO / "cases" / "SM-01.toml").read_text(encoding="utf-8")
    text = text.replace('id = "SM-01"', 'id = "SM-L"')
    text = "".join(line for line in text.splitlines(keepends=True)
                   if not line.startswith(("supply_pressure = ", "supply_superheat = ")))
    text = text.replace('receiver_pressure = "header:LP"', 'receiver_pressure = "0.3 bar(g)"')
    text = text.replace('heater_trap_pressure = "4 bar(g)"', 'heater_trap_pressure = "1.5 bar(g)"')
    assert 'supply_pressure' not in text and 'supply_superheat' not in text and 'receiver_pressure = "0.3 bar(g)"' in text
    return text.replace("[inputs.insulation]\n", f"[inputs.supply_link]\n{link}\n\n[inputs.insulation]\n", 1)


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    """The demo site in a folder of its own, LD-01 (revision B), FL-01 and HX-01 (whose steam flow SM-01 takes)
    issued into its records folder."""
    folder = tmp_path_factory.mktemp("supply") / "demo_site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    assert main(["run", *(str(folder / "cases" / f"{name}.toml") for name in ("LD-01", "FL-01", "HX-01")),
                 "--quiet"]) in (0, 1)
    return folder


def _run(site, text, capsys, name="SM-L"):
    case = site / "cases" / f"{name}.toml"
    case.write_text(text, encoding="utf-8")
    code = main(["run", str(case), "--quiet"])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def _refused(site, capsys, link, field, words):
    code, _, err = _run(site, _main_case(link), capsys, name="SM-BAD")
    assert code == 2, err
    assert "SM-BAD.toml" in err and field in err and "Fix:" in err and "Traceback" not in err, err
    assert all(w in err for w in words), err
    assert not (site / "records" / "SM-BAD_revA.json").exists()


@pytest.fixture(scope="module")
def issued(site):
    """The main fed from LD-01 rev B, issued beside it: (record path, main record, LD-01 record)."""
    case = site / "cases" / "SM-L.toml"
    case.write_text(_main_case('record = "LD-01"\nrevision = "B"'), encoding="utf-8")
    assert main(["run", str(case), "--quiet"]) in (0, 1)
    path = site / "records" / "SM-L_revA.json"
    letdown = json.loads((site / "records" / "LD-01_revB.json").read_text(encoding="utf-8"))
    return path, json.loads(path.read_text(encoding="utf-8")), letdown


def test_the_supply_is_the_let_down_records_outlet(issued):
    _, record, letdown = issued
    inputs, results = record["inputs"], record["results"]
    assert inputs["supply_pressure"]["value"] == pytest.approx(letdown["inputs"]["outlet_pressure"]["value"], rel=1e-12)
    assert inputs["supply_temperature"]["value"] == pytest.approx(letdown["results"]["outlet_temperature"]["value"],
                                                                  rel=1e-12)
    assert results["supply_pressure"]["value"] == pytest.approx(letdown["inputs"]["outlet_pressure"]["value"], rel=1e-12)
    assert results["supply_temperature"]["value"] == pytest.approx(letdown["results"]["outlet_temperature"]["value"],
                                                                   rel=1e-12)
    # The link, as the site balance keeps its links: id, revision, kind and content digest.
    assert {k: inputs[f"supply_link_{k}"]["value"] for k in ("record_id", "revision", "kind", "content_digest")} == {
        "record_id": "LD-01", "revision": "B", "kind": "letdown", "content_digest": letdown["content_digest"]}
    assert any("let-down record LD-01 revision B" in a for a in record["assumptions"])


def test_the_outlet_temperature_by_hand_on_if97(issued):
    """Source: IAPWS R7-97(2012) through the iapws package called directly: the desuperheater's target is the
    saturation temperature at the outlet pressure plus LD-01's 10 K target superheat; the enthalpy at the main's
    supply (p, T) is the let-down's outlet enthalpy."""
    _, record, letdown = issued
    p_mpa = letdown["inputs"]["outlet_pressure"]["value"] / 10.0
    t_sat = IAPWS97(P=p_mpa, x=1.0).T - 273.15
    assert record["inputs"]["supply_temperature"]["value"] == pytest.approx(t_sat + 10.0, abs=1e-6)
    h = IAPWS97(P=p_mpa, T=record["inputs"]["supply_temperature"]["value"] + 273.15).h
    assert h == pytest.approx(letdown["results"]["outlet_enthalpy"]["value"], rel=1e-9)


def test_verify_passes_and_a_changed_linked_record_is_reported(issued, site, tmp_path, capsys):
    path, _, _ = issued
    out = tmp_path / "records"
    out.mkdir()
    for name in ("SM-L_revA.json", "LD-01_revB.json"):
        shutil.copy(site / "records" / name, out)
    capsys.readouterr()
    assert main(["verify", str(out / "SM-L_revA.json")]) == 0, capsys.readouterr().out
    linked = out / "LD-01_revB.json"
    letdown = json.loads(linked.read_text(encoding="utf-8"))
    letdown["title"] = "edited and re-digested"
    letdown["content_digest"] = compute_content_digest(letdown)
    letdown["digest"] = compute_digest(letdown)
    linked.write_text(json.dumps(letdown), encoding="utf-8")
    capsys.readouterr()
    assert main(["verify", str(out / "SM-L_revA.json")]) == 1
    assert "LD-01_revB.json has changed since the main used it" in capsys.readouterr().out
    rows = {row.id: row for row in build_register(out, recompute=False)}
    assert rows["SM-L"].verification.startswith("STALE: linked record LD-01 revision B (supply)"), rows["SM-L"]
    assert "changed since the main used it" in rows["SM-L"].verification


def test_a_linked_record_of_the_wrong_kind_is_refused(site, capsys):
    _refused(site, capsys, 'record = "FL-01"\nrevision = "B"', "supply_link.record",
             ["is a flash record, not a letdown record", "link a letdown record here"])


def test_a_missing_linked_record_is_refused_with_how_to_issue_it(site, capsys):
    _refused(site, capsys, 'record = "LD-01"\nrevision = "Z"', "supply_link.record",
             ["LD-01 revision Z is not at", "issue it first"])


def test_a_linked_record_with_a_broken_digest_is_refused(site, tmp_path, capsys):
    folder = tmp_path / "broken"
    folder.mkdir()
    letdown = json.loads((site / "records" / "LD-01_revB.json").read_text(encoding="utf-8"))
    letdown["results"]["outlet_temperature"]["value"] += 5.0   # edited after issue, digests left as they were
    (folder / "LD-01_revB.json").write_text(json.dumps(letdown), encoding="utf-8")
    _refused(site, capsys, f'record = "LD-01"\nrevision = "B"\nfolder = "{folder.as_posix()}"', "supply_link.record",
             ["digest does not match"])


def test_a_supply_pressure_given_beside_the_link_is_refused(site, capsys):
    text = _main_case('record = "LD-01"\nrevision = "B"').replace("[inputs]\n", '[inputs]\nsupply_pressure = "header:LP"\n', 1)
    code, _, err = _run(site, text, capsys, name="SM-BAD")
    assert code == 2 and "supply_pressure" in err and "not given twice" in err and "Fix:" in err, err


def test_a_pinned_digest_the_file_no_longer_holds_is_refused(site, capsys):
    _refused(site, capsys, 'record = "LD-01"\nrevision = "B"\ncontent_digest = "sha256:0000"',
             "supply_link.content_digest", ["not the sha256:0000 the case file pins"])


def test_a_main_that_says_its_supply_is_the_let_downs_when_it_is_not_fails_verify(site, issued, tmp_path, capsys):
    """Found by an independent attack on the heater link, tried here on the supply link: a main issued from a supply
    of its own (7 bar(g), 20 K superheat) made to say it is fed from LD-01 revision B (the link's inputs and its
    sentence planted, digests recomputed) reproduces from its own inputs, and LD-01's file beside it is the one
    named; but LD-01 states another outlet. Expected: a difference naming the input (before, VERIFIED)."""
    from tests.case_helpers import forged_copy

    _, linked, _ = issued
    text = _main_case('record = "LD-01"\nrevision = "B"').replace('id = "SM-L"', 'id = "SM-OWN"')
    text = text.split("[inputs.supply_link]")[0] + "[inputs.insulation]" + text.split("[inputs.insulation]", 1)[1]
    text = text.replace("[inputs]\n", '[inputs]\nsupply_pressure = "7 bar(g)"\nsupply_superheat = "20 K"\n', 1)
    code, _, err = _run(site, text, capsys, name="SM-OWN")
    assert code in (0, 1), err

    def claim(record):
        for key, entry in linked["inputs"].items():
            if key.startswith("supply_link_"):
                record["inputs"][key] = entry
        record["assumptions"] = [a for a in linked["assumptions"] if a.startswith("Supply: ")] + record["assumptions"]
    out = tmp_path / "records"
    out.mkdir()
    shutil.copy(site / "records" / "LD-01_revB.json", out / "LD-01_revB.json")
    shutil.copy(forged_copy(site / "records" / "SM-OWN_revA.json", claim, tmp_path), out / "SM-OWN_revA.json")
    assert main(["verify", str(out / "SM-OWN_revA.json")]) == 1
    said = capsys.readouterr().out
    assert "input supply_pressure: the record holds 7.99181 bar (given as '7 bar(g)') as let-down record LD-01 " \
        "revision B's outlet_pressure" \
        in said, said
