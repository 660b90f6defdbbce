"""A steam main whose steam flow is an issued heater record's ([inputs.load_link]), as the demo SM-01 takes HX-01
revision B's: the flow is the record's design-duty steam flow to the last digit, the link is kept by id, revision,
kind and content digest, verify and register check it, and a bad link is refused by name with a fix."""

import json
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from steamcalc.review.register import build_register
from tests.case_helpers import forged_copy

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
LINK = '[inputs.load_link]\nrecord = "HX-01"\nrevision = "B"\n'


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    """The demo site in a folder of its own, HX-01 and FL-01 (revision B) issued into its records folder."""
    folder = tmp_path_factory.mktemp("load") / "demo_site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(folder / "cases" / "HX-01.toml"), str(folder / "cases" / "FL-01.toml"), "--quiet"]) in (0, 1)
    return folder


@pytest.fixture(scope="module")
def issued(site):
    """The demo main SM-01 as it stands, issued beside HX-01: (record path, main record, HX-01 record)."""
    assert main(["run", str(site / "cases" / "SM-01.toml"), "--quiet"]) in (0, 1)
    path = site / "records" / "SM-01_revA.json"
    heater = json.loads((site / "records" / "HX-01_revB.json").read_text(encoding="utf-8"))
    return path, json.loads(path.read_text(encoding="utf-8")), heater


def _case(link):
    """SM-01 with its load link replaced by ``link`` (the text of [inputs.load_link], or nothing)."""
    text = (DEMO / "cases" / "SM-01.toml").read_text(encoding="utf-8").replace('id = "SM-01"', 'id = "SM-BAD"')
    assert LINK in text, "the demo SM-01 links HX-01 revision B"
    return text.replace(LINK, link)


def _refused(site, capsys, text, field, words):
    case = site / "cases" / "SM-BAD.toml"
    case.write_text(text, encoding="utf-8")
    code = main(["run", str(case), "--quiet"])
    err = capsys.readouterr().err
    assert code == 2, err
    assert "SM-BAD.toml" in err and field in err and "Fix:" in err and "Traceback" not in err, err
    assert all(w in err for w in words), err
    assert not (site / "records" / "SM-BAD_revA.json").exists()


def test_the_steam_flow_is_the_heater_records_design_flow(issued):
    """Source: HX-01 revision B's own record (its "Steam flow" result, at design duty): the main's steam flow is
    that value to the last digit, and not the heater's larger flow at its largest process flow."""
    _, record, heater = issued
    inputs = record["inputs"]
    assert inputs["steam_flow"]["value"] == heater["results"]["steam_flow"]["value"]
    assert inputs["steam_flow"]["unit"] == heater["results"]["steam_flow"]["unit"] == "kg/h"
    assert heater["results"]["capacity_steam_flow"]["value"] > inputs["steam_flow"]["value"]
    # No running load on the superheated demo main: the user receives the heater's flow.
    assert record["results"]["steam_delivered"]["value"] == pytest.approx(heater["results"]["steam_flow"]["value"],
                                                                          rel=1e-12)
    assert {k: inputs[f"load_link_{k}"]["value"] for k in ("record_id", "revision", "kind", "content_digest")} == {
        "record_id": "HX-01", "revision": "B", "kind": "exchanger", "content_digest": heater["content_digest"]}
    note = next(a for a in record["assumptions"] if a.startswith("Steam flow: "))
    assert "design duty of heater record HX-01 revision B" in note and heater["content_digest"] in note
    assert "not the larger flow at the largest process flow" in note


def test_verify_reproduces_the_issued_main(issued, capsys):
    path, _, _ = issued
    capsys.readouterr()
    assert main(["verify", str(path)]) == 0
    out = capsys.readouterr().out
    assert "verdict: VERIFIED" in out and "reproduced" in out, out


def _beside(site, folder, *names):
    folder.mkdir()
    for name in names:
        shutil.copy(site / "records" / name, folder)
    return folder


def test_an_edited_heater_record_fails_verify_and_marks_the_main_stale(issued, site, tmp_path, capsys):
    out = _beside(site, tmp_path / "records", "SM-01_revA.json", "HX-01_revB.json")
    edited = forged_copy(out / "HX-01_revB.json", lambda r: r["results"]["steam_flow"].update(value=750.0), tmp_path)
    shutil.copy(edited, out / "HX-01_revB.json")
    capsys.readouterr()
    assert main(["verify", str(out / "SM-01_revA.json")]) == 1
    assert "HX-01_revB.json has changed since the main used it" in capsys.readouterr().out
    rows = {row.id: row for row in build_register(out, recompute=False)}
    assert rows["SM-01"].verification.startswith("STALE: linked record HX-01 revision B (load)"), rows["SM-01"]
    assert "changed since the main used it" in rows["SM-01"].verification


def test_a_superseded_heater_record_is_noted_by_verify_and_marks_the_main_stale(issued, site, tmp_path, capsys):
    out = _beside(site, tmp_path / "records", "SM-01_revA.json", "HX-01_revB.json")
    text = (site / "cases" / "HX-01.toml").read_text(encoding="utf-8").replace('revision = "B"', 'revision = "C"', 1)
    text = text.replace('site = "../site.toml"', f'site = "{(site / "site.toml").as_posix()}"')
    (tmp_path / "HX-01_revC.toml").write_text(text.replace('"12 t/h"', '"13 t/h"'), encoding="utf-8")
    assert main(["run", str(tmp_path / "HX-01_revC.toml"), "--out", str(out), "--quiet"]) in (0, 1)
    assert (out / "HX-01_revC.json").is_file()
    capsys.readouterr()
    assert main(["verify", str(out / "SM-01_revA.json")]) == 0   # what it used still holds
    assert "revision C of HX-01 lies beside it" in capsys.readouterr().out
    rows = {row.id: row for row in build_register(out, recompute=False)}
    assert rows["SM-01"].verification.startswith("STALE: linked record HX-01 revision B (load)"), rows["SM-01"]
    assert "re-issue the main on the current revision" in rows["SM-01"].verification


def test_a_steam_flow_given_beside_the_link_is_refused(site, capsys):
    text = _case(LINK).replace("[inputs]\n", '[inputs]\nsteam_flow = "710 kg/h"\n', 1)
    _refused(site, capsys, text, "steam_flow", ["comes from the linked heater record HX-01", "not given twice",
                                                "drop [inputs.load_link]"])


@pytest.mark.parametrize("link, field, words", [
    ('[inputs.load_link]\nrecord = "FL-01"\nrevision = "B"\n', "load_link.record",
     ["is a flash record, not an exchanger record", "link an exchanger record here"]),
    ('[inputs.load_link]\nrecord = "HX-01"\nrevision = "Z"\n', "load_link.record",
     ["HX-01 revision Z is not at", "issue it first"]),
    ('[inputs.load_link]\nrecord = "HX-01"\n', "load_link.revision",
     ["revision of linked record HX-01 is not given", 'give revision = "B" in [inputs.load_link]']),
    ('[inputs.load_link]\nrevision = "B"\n', "load_link.record",
     ["heater record's revision is given without the record", 'give record = "HX-01" in [inputs.load_link]']),
    ('[inputs.load_link]\nrecord = "HX-01"\nrevision = "B"\ncontent_digest = "sha256:0000"\n',
     "load_link.content_digest", ["not the sha256:0000 the case file pins"]),
    ('[inputs.load_link]\nrecord = "HX-01"\nrevision = "B"\nkind = "letdown"\n', "load_link.kind",
     ["has kind exchanger, not the letdown the case file pins"]),
])
def test_a_bad_link_is_refused_by_field_with_a_fix(site, capsys, link, field, words):
    _refused(site, capsys, _case(link), field, words)


def test_no_link_and_no_steam_flow_asks_for_the_steam_flow(site, capsys):
    _refused(site, capsys, _case(""), "steam_flow", ["is required"])


def test_a_heater_record_edited_after_issue_is_refused(site, tmp_path, capsys):
    folder = tmp_path / "edited"
    folder.mkdir()
    heater = json.loads((site / "records" / "HX-01_revB.json").read_text(encoding="utf-8"))
    heater["results"]["steam_flow"]["value"] = 750.0   # edited after issue, digests left as they were
    (folder / "HX-01_revB.json").write_text(json.dumps(heater), encoding="utf-8")
    _refused(site, capsys, _case(LINK + f'folder = "{folder.as_posix()}"\n'), "load_link.record",
             ["digest does not match"])


def test_a_heater_record_that_states_no_steam_flow_is_refused(site, tmp_path, capsys):
    """A record of the right kind and intact digests, but no steam flow (as a record of an older release might be)."""
    forged = forged_copy(site / "records" / "HX-01_revB.json", lambda r: r["results"].pop("steam_flow"), tmp_path)
    _refused(site, capsys, _case(LINK + f'folder = "{forged.parent.as_posix()}"\n'), "load_link.record",
             ["linked heater record HX-01 revision B states no steam flow", "re-issue HX-01"])


def test_the_heaters_condensate_into_the_return_line_is_the_same_records(issued):
    """Source: HX-01 revision B's own record (its "Condensate flow" result): the demo main's return line gives the
    heater's trap but not its flow, which is taken from the record the link names, and the record says so."""
    _, record, heater = issued
    assert record["inputs"]["heater_condensate_flow"]["value"] == heater["results"]["condensate_flow"]["value"]
    assert record["inputs"]["load_link_condensate"]["value"] == "the heater record's condensate flow at design duty"
    assert any("the heater's condensate into the return line: the same record's condensate flow" in a
               for a in record["assumptions"])


def test_a_condensate_flow_given_beside_the_link_is_kept_and_not_said_to_be_the_records(site, capsys):
    """A return line sized for another flow (the engineer's own figure) keeps it: the link gives the steam flow only."""
    text = _case(LINK).replace('id = "SM-BAD"', 'id = "SM-OWN"').replace(
        'heater_trap_pressure = "4 bar(g)"', 'heater_trap_pressure = "4 bar(g)"\nheater_condensate_flow = "900 kg/h"')
    case = site / "cases" / "SM-OWN.toml"
    case.write_text(text, encoding="utf-8")
    assert main(["run", str(case), "--quiet"]) in (0, 1), capsys.readouterr().err
    record = json.loads((site / "records" / "SM-OWN_revA.json").read_text(encoding="utf-8"))
    assert record["inputs"]["heater_condensate_flow"]["given"] == "900 kg/h"
    assert (record["inputs"].get("load_link_condensate") or {}).get("value") is None
    assert not any("condensate into the return line" in a for a in record["assumptions"])
    assert main(["verify", str(site / "records" / "SM-OWN_revA.json")]) == 0


def test_a_load_link_condensate_typed_into_the_case_is_not_believed(site, capsys):
    """The link's condensate entry is filled in when the main runs: typed beside a flow of the engineer's own, it
    does not make the record say the flow is the heater record's."""
    typed = 'revision = "B"\ncondensate = "the heater record\'s condensate flow at design duty"\n'
    text = _case(LINK.replace('revision = "B"\n', typed)).replace(
        'id = "SM-BAD"', 'id = "SM-TYPED"').replace(
        'heater_trap_pressure = "4 bar(g)"', 'heater_trap_pressure = "4 bar(g)"\nheater_condensate_flow = "900 kg/h"')
    case = site / "cases" / "SM-TYPED.toml"
    case.write_text(text, encoding="utf-8")
    assert main(["run", str(case), "--quiet"]) in (0, 1), capsys.readouterr().err
    record = json.loads((site / "records" / "SM-TYPED_revA.json").read_text(encoding="utf-8"))
    assert record["inputs"]["heater_condensate_flow"]["value"] == pytest.approx(900.0)   # kg/h, as records keep it
    assert (record["inputs"].get("load_link_condensate") or {}).get("value") is None
    assert not any("condensate into the return line" in a for a in record["assumptions"])


def test_a_main_that_says_its_condensate_is_the_heater_records_when_it_is_not_fails_verify(site, tmp_path, capsys):
    """SM-OWN sizes its return for 900 kg/h of its own; made to say that flow is HX-01's (its link's condensate entry
    and assumption planted, digests recomputed), it reproduces from its own inputs, but HX-01 revision B beside it
    states 710.3 kg/h: a difference naming the input (before, VERIFIED)."""
    from steamcalc.calcs.steam_main.load import CONDENSATE_TAKEN

    if not (site / "records" / "SM-OWN_revA.json").exists():
        test_a_condensate_flow_given_beside_the_link_is_kept_and_not_said_to_be_the_records(site, capsys)
    out = _beside(site, tmp_path / "records", "SM-OWN_revA.json", "HX-01_revB.json")

    def claim(record):
        record["inputs"]["load_link_condensate"] = {"value": CONDENSATE_TAKEN, "unit": "", "given": CONDENSATE_TAKEN}
        record["assumptions"] = [a + "; the heater's condensate into the return line: the same record's condensate "
                                 "flow at design duty" if a.startswith("Steam flow:") else a
                                 for a in record["assumptions"]]
    shutil.copy(forged_copy(out / "SM-OWN_revA.json", claim, tmp_path), out / "SM-OWN_revA.json")
    capsys.readouterr()
    assert main(["verify", str(out / "SM-OWN_revA.json")]) == 1
    said = capsys.readouterr().out
    assert "input heater_condensate_flow: the record holds 900 kg/h as heater record HX-01 revision B's " \
           "condensate_flow, which states 710.309 kg/h" in said, said
