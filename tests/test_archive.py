"""Records issued by earlier releases keep verifying on this one.

``tests/archive/v0_2/`` holds the demo site's records as steamcalc 0.2 issued them (schema
``steamcalc.record/1``, no figure data), with the HTML and Markdown that release drew;
``tests/archive/v0_3/`` those of release 0.3.0 (schema 3: steps and checks kept as amounts; release 0.3.1
rewords some of their statements, steamcalc.review.rewordings); ``tests/archive/v0_3_hot_liquid/`` two heater
records of release 0.3.0 whose tube-rupture valve release 0.3.1 sizes for a flashing liquid (the change of basis
listed with its release: tests/test_hot_liquid_relief.py), with the case files they were issued from; ``tests/archive/v0_3_1/`` those of
release 0.3.1; ``tests/archive/v0_3_1_bases/`` heater records of 0.3.1 whose basis release 0.3.2 changed, with their case files:
a discharge line carried as liquid to its exit and one whose liquid flashes on its isenthalp (both
tests/test_liquid_to_exit.py), a tube-rupture discharge pipe
narrower than the valve's outlet, now warned of (tests/test_tube_rupture_pipes.py); ``tests/archive/v0_3_2/`` those of
release 0.3.2; ``tests/archive/v0_3_3/`` those of this release, kept for the releases after it; ``tests/archive/v0_3_schema2/`` those of this release's intermediate layout (schema 2: figure
data, steps and checks as text), which this release still reads. Each must verify:
its digests intact, every result, check and statement reproduced, and its reports either matching what this
release draws or reported as drawn by the release that issued the record — never as edited.
"""

import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main

ARCHIVE = Path(__file__).resolve().parent / "archive"
RECORDS = sorted(ARCHIVE.glob("v*/*_rev*.json"))


def test_the_archive_holds_both_releases():
    assert {path.parent.name for path in RECORDS} >= {"v0_2", "v0_3_schema2", "v0_3"}
    assert len([p for p in RECORDS if p.parent.name == "v0_2"]) == 5


@pytest.mark.parametrize("record", RECORDS, ids=lambda p: f"{p.parent.name}/{p.stem}")
def test_an_archived_record_verifies(record, tmp_path, capsys):
    # A copy: verify takes the record's lock beside it, and nothing may be written into the repository.
    for companion in record.parent.glob(f"{record.stem}.*"):
        shutil.copy(companion, tmp_path / companion.name)
    assert main(["verify", str(tmp_path / record.name)]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said and "DIFFERS" not in said
    if record.parent.name == "v0_2":
        assert f"companion {record.stem}.html: as this release draws it but for the charts release 0.2 drew" in said


def test_repair_keeps_an_earlier_release_report_whose_charts_cannot_be_drawn_again(tmp_path, capsys):
    record = ARCHIVE / "v0_2" / "LD-01_revA.json"
    for companion in record.parent.glob("LD-01_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    before = (tmp_path / "LD-01_revA.html").read_bytes()
    assert main(["verify", str(tmp_path / record.name), "--repair"]) == 0
    assert (tmp_path / "LD-01_revA.html").read_bytes() == before and before.count(b"steamcalc-chart-") > 0


@pytest.mark.parametrize("edit", [
    lambda text: text.replace("warn</td>", "pass</td>", 1),                            # a verdict outside the charts
    lambda text: text.replace("sha256:", "sha256:0"),                                   # the digests shown
    lambda text: text[:text.index("<h2>")] + "<h2>all checks met</h2></body></html>",   # a page replaced
], ids=["verdict", "digest", "replaced"])
def test_an_edited_report_of_an_archived_record_is_still_caught(tmp_path, capsys, edit):
    # Only release 0.2's charts go unchecked: every other byte of its page must be as this release draws it.
    record = ARCHIVE / "v0_2" / "LD-02_revA.json"
    for companion in record.parent.glob("LD-02_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    html = tmp_path / "LD-02_revA.html"
    text = html.read_text(encoding="utf-8")
    assert edit(text) != text
    html.write_text(edit(text), encoding="utf-8")
    assert main(["verify", str(tmp_path / record.name)]) == 1
    assert "companion LD-02_revA.html: DIFFERS" in capsys.readouterr().out


def test_a_record_relabelled_as_the_earlier_schema_gets_no_pass_for_its_report(tmp_path, capsys):
    # A schema-2 record relabelled schema 1 (figures dropped, digests recomputed) with a forged page.
    import json

    from steamcalc.records.record import compute_content_digest, compute_digest

    assert main(["run", str(ARCHIVE.parent.parent / "workbooks" / "demo_site" / "cases" / "LD-02.toml"),
                 "--out", str(tmp_path), "--quiet"]) == 0
    path = tmp_path / "LD-02_revB.json"
    record = json.loads(path.read_text(encoding="utf-8"))
    record["schema"] = "steamcalc.record/1"
    del record["figures"]
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    path.write_text(json.dumps(record, indent=2), encoding="utf-8")
    html = tmp_path / "LD-02_revB.html"
    html.write_text(html.read_text(encoding="utf-8").replace("warn</td>", "pass</td>", 1), encoding="utf-8")
    capsys.readouterr()
    assert main(["verify", str(path)]) == 1
    assert "companion LD-02_revB.html: DIFFERS" in capsys.readouterr().out


def test_an_earlier_record_lists_what_a_later_basis_changed_and_still_catches_an_edit(tmp_path, capsys):
    # Release 0.3 takes the relief load on dry saturated steam at the highest upstream pressure: a 0.2 record's
    # relief figures differ by that change, which verify lists with the release; any other edit still fails.
    import json

    from steamcalc.records.record import compute_content_digest, compute_digest

    record = ARCHIVE / "v0_2" / "LD-02_revA.json"
    for companion in record.parent.glob("LD-02_revA.*"):
        shutil.copy(companion, tmp_path / companion.name)
    assert main(["verify", str(tmp_path / record.name)]) == 0
    said = capsys.readouterr().out
    assert "changed  fail_open_flow" in said and "changed by release 0.3 (relief load on the densest credible" in said
    data = json.loads((tmp_path / record.name).read_text(encoding="utf-8"))
    data["results"]["inlet_saturation_temperature"]["value"] += 1.0
    data["content_digest"] = compute_content_digest(data)
    data["digest"] = compute_digest(data)
    forged = tmp_path / "forged" / record.name
    forged.parent.mkdir()
    forged.write_text(json.dumps(data, indent=2), encoding="utf-8")
    assert main(["verify", str(forged)]) == 1
    assert "differs  inlet_saturation_temperature" in capsys.readouterr().out
