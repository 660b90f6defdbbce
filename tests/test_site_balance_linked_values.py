"""Site steam balance: the values it holds as copied from its linked records are compared with those records.

Found by an independent attack on the links: a balance keeps each linked record's id, revision, kind and content
digest, and ``verify`` checked only that the file beside it still holds that digest. A balance issued on another
LD-01 revision B (its rated Kv 80 m³/h instead of 63 m³/h), made to name the genuine LD-01's content digest and its
digests written again (tests.case_helpers.forged_copy), reproduced from its own inputs beside the unchanged LD-01
and VERIFIED, and ``register`` listed it as verified. Expected now: ``verify`` fails it with a difference naming the
input, the value the balance holds, the value LD-01 states and the fix, and ``register`` marks it not valid; the
genuine demo balance still verifies; a linked record not beside the balance is only noted (the link's own check),
never failed by this comparison. Numbers are compared in SI within a relative 1e-9, texts exactly.
"""

import copy
import json
import shutil
from pathlib import Path

import pytest

from steamcalc.calcs.site_balance.links import balance_link_problems
from steamcalc.cli import main
from steamcalc.records.record import read_intact_record
from steamcalc.review.register import build_register
from tests.case_helpers import forged_copy

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
#: What the forged balance says of LD-01's valve, and what LD-01 revision B states.
FORGED_LINE = ("input letdown.LD-01.rated_kv: the balance holds 80 m**3/h (given as 'from linked record LD-01 rev B') "
               "as let-down record LD-01 revision B's rated_kv, which states 63 m**3/h; re-issue the balance from "
               "its case file")


@pytest.fixture(scope="module")
def genuine(tmp_path_factory):
    """The demo site in a folder of its own, every case issued into its records folder."""
    folder = tmp_path_factory.mktemp("linked_values") / "demo_site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(folder / "cases"), "--quiet"]) in (0, 1)   # warnings, not failures, in the demo
    return folder / "records"


@pytest.fixture(scope="module")
def forged(genuine, tmp_path_factory):
    """SB-01 issued on a variant LD-01 revision B (rated Kv 80 m³/h), made to name the genuine LD-01's content
    digest, digests recomputed: its path in a folder of its own with the genuine linked records."""
    base = tmp_path_factory.mktemp("forged")
    variant = base / "variant"
    shutil.copytree(genuine.parent, variant, ignore=shutil.ignore_patterns("records"))
    (variant / "records").mkdir()
    for name in ("LD-02", "FL-01", "HX-01"):
        shutil.copy(genuine / f"{name}_revB.json", variant / "records" / f"{name}_revB.json")
    case = variant / "cases" / "LD-01.toml"
    text = case.read_text(encoding="utf-8")
    assert 'rated_kv = "63 m^3/h"' in text
    case.write_text(text.replace('rated_kv = "63 m^3/h"', 'rated_kv = "80 m^3/h"'), encoding="utf-8")
    assert main(["run", str(case), str(variant / "cases" / "SB-01.toml"), "--quiet"]) in (0, 1)
    digest_of = {where: json.loads((where / "LD-01_revB.json").read_text(encoding="utf-8"))["content_digest"]
                 for where in (genuine, variant / "records")}

    def name_the_genuine_ld01(record):
        text = json.dumps(record).replace(digest_of[variant / "records"], digest_of[genuine])
        record.clear()
        record.update(json.loads(text))

    out = base / "records"
    out.mkdir()
    for path in genuine.glob("*_revB.json"):
        shutil.copy(path, out / path.name)
    shutil.copy(forged_copy(variant / "records" / "SB-01_revA.json", name_the_genuine_ld01, base),
                out / "SB-01_revA.json")
    return out / "SB-01_revA.json"


def test_the_genuine_demo_balance_verifies_beside_its_linked_records(genuine, capsys):
    assert main(["verify", str(genuine / "SB-01_revA.json")]) == 0
    said = capsys.readouterr().out
    assert "verdict: VERIFIED" in said and "the balance holds" not in said, said
    assert balance_link_problems(json.loads((genuine / "SB-01_revA.json").read_text(encoding="utf-8")),
                                 genuine / "SB-01_revA.json", read_intact_record) == ([], [])


def test_a_balance_made_to_say_a_let_down_value_is_the_linked_record_s_fails_verify(forged, capsys):
    assert main(["verify", str(forged)]) == 1
    said = capsys.readouterr().out
    # The recomputation reproduces from the forged inputs: this comparison is the one difference.
    assert "verdict: FAILED" in said and "differences (1):" in said, said
    assert f"statement changed: {FORGED_LINE}" in said, said


def test_the_register_marks_the_forged_balance_not_valid(forged, capsys):
    rows = {row.id: row for row in build_register(forged.parent)}
    assert rows["SB-01"].verification == f"NOT AS LINKED: {FORGED_LINE}" and not rows["SB-01"].valid
    assert all(row.valid for key, row in rows.items() if key != "SB-01")


def test_a_linked_record_not_beside_the_balance_is_noted_not_failed_by_this_check(forged, tmp_path, capsys):
    for path in forged.parent.glob("*.json"):
        if path.name != "LD-01_revB.json":
            shutil.copy(path, tmp_path / path.name)
    record = json.loads((tmp_path / forged.name).read_text(encoding="utf-8"))
    problems, notes = balance_link_problems(record, tmp_path / forged.name, read_intact_record)
    assert problems == []
    assert notes == ["linked record LD-01 revision B (letdown.LD-01): not checked - no LD-01_revB.json beside this "
                     "record"]
    assert main(["verify", str(tmp_path / forged.name)]) == 0
    said = capsys.readouterr().out
    assert "not checked - no LD-01_revB.json beside this record" in said and "the balance holds" not in said, said


def _set(key, **entry):
    def edit(inputs):
        inputs[key] = dict(inputs.get(key, {"label": key, "given": "planted"}), **entry)
    return edit


@pytest.mark.parametrize("edit, fails, stated", [
    # Within the relative 1e-9 after unit conversion: the same value (the copy is read and written back).
    (_set("letdown.LD-01.inlet_length", value=2500.0, unit="cm"), None, None),
    (_set("letdown.LD-01.inlet_length", value=25.0 * (1 + 5e-10)), None, None),
    (_set("letdown.LD-01.inlet_length", value=25.0 * (1 + 5e-9)), "letdown.LD-01.inlet_length", "25 m"),
    (_set("letdown.LD-01.outlet_pressure", value=3.6), "letdown.LD-01.outlet_pressure", "3.49181 bar"),
    (_set("letdown.LD-01.outlet_pressure", unit="kg/h"), "letdown.LD-01.outlet_pressure", "3.49181 bar"),
    # Texts exactly.
    (_set("letdown.LD-01.characteristic", value="linear"), "letdown.LD-01.characteristic", "'equal-percentage'"),
    (_set("letdown.LD-01.valve_size", value="DN80 "), "letdown.LD-01.valve_size", "'DN80'"),
    # A value the linked record does not state at all (LD-02 has no desuperheater).
    (_set("letdown.LD-02.target_superheat", value=10.0, unit="K"), "letdown.LD-02.target_superheat", "nothing"),
    # A user's steam flow (its heater record's steam_flow result) and its steam pressure; a flash vessel's pressures.
    (_set("user.CIP water heater.load.summer", value=800.0), "user.CIP water heater.load.summer", "710.309 kg/h"),
    (_set("user.CIP water heater.steam_pressure", value=10.0), "user.CIP water heater.steam_pressure", "8.99181 bar"),
    (_set("flash.FL-01.flash_pressure", value=3.0), "flash.FL-01.flash_pressure", "3.49181 bar"),
], ids=["other-unit", "within-1e-9", "beyond-1e-9", "pressure", "unit-of-another-kind", "text", "text-space",
        "not-stated", "user-flow", "user-pressure", "flash-pressure"])
def test_each_copied_value_is_compared_with_its_linked_record(genuine, edit, fails, stated):
    record = copy.deepcopy(json.loads((genuine / "SB-01_revA.json").read_text(encoding="utf-8")))
    edit(record["inputs"])
    problems, _ = balance_link_problems(record, genuine / "SB-01_revA.json", read_intact_record)
    if fails is None:
        assert problems == []
    else:
        assert len(problems) == 1 and problems[0].startswith(f"input {fails}: the balance holds "), problems
        assert f"which states {stated}; re-issue the balance from its case file" in problems[0], problems
