"""Command line: run and verify, exit codes, bad input named and nothing written."""

import json
import shutil
import subprocess
import sys

import pytest

from steamcalc.cli import main

GOOD_CASE = """
[case]
kind = "letdown"
id = "T-01"
title = "test let-down"
revision = "A"
prepared_by = "tester"
site = "site.toml"

[inputs]
inlet_pressure = "16 bar(g)"
inlet_temperature = "230 degC"
outlet_pressure = "header:LP"
mass_flow = "4.5 t/h"

[inputs.desuperheater]
target_superheat = "10 K"
water_temperature = "105 degC"
water_pressure = "20 bar(g)"
"""

SITE = """
[site]
name = "test site"
elevation = "180 m"
[headers]
LP = "2.5 bar(g)"
"""


@pytest.fixture
def workdir(tmp_path):
    (tmp_path / "site.toml").write_text(SITE)
    return tmp_path


def write_case(workdir, text, name="case.toml"):
    path = workdir / name
    path.write_text(text)
    return path


def run(*args):
    return main([str(a) for a in args])


def test_run_then_verify(workdir, capsys):
    case = write_case(workdir, GOOD_CASE)
    out = workdir / "out"
    assert run("run", case, "--out", out) == 0
    files = sorted(p.name for p in out.iterdir() if not p.name.startswith("."))
    assert files == ["T-01_revA.html", "T-01_revA.json", "T-01_revA.md"]
    assert sorted(p.name for p in (out / ".steamcalc").iterdir()) == ["T-01_revA.lock"]  # no staging left
    assert run("verify", out / "T-01_revA.json") == 0
    assert "VERIFIED" in capsys.readouterr().out


def test_default_out_is_records_beside_the_site(workdir):
    case = write_case(workdir, GOOD_CASE)
    assert run("run", case) == 0
    assert (workdir / "records" / "T-01_revA.json").exists()


def test_rerun_same_content_keeps_the_existing_record(workdir, capsys):
    case = write_case(workdir, GOOD_CASE)
    out = workdir / "out"
    run("run", case, "--out", out)
    first = (out / "T-01_revA.json").read_text()
    assert run("run", case, "--out", out) == 0
    assert (out / "T-01_revA.json").read_text() == first
    assert "unchanged" in capsys.readouterr().out


def test_changed_content_same_revision_is_refused(workdir, capsys):
    case = write_case(workdir, GOOD_CASE)
    out = workdir / "out"
    run("run", case, "--out", out)
    first = (out / "T-01_revA.json").read_text()
    write_case(workdir, GOOD_CASE.replace('"4.5 t/h"', '"5.0 t/h"'))
    assert run("run", case, "--out", out) == 2
    assert "raise the revision" in capsys.readouterr().err
    assert (out / "T-01_revA.json").read_text() == first
    write_case(workdir, GOOD_CASE.replace('"4.5 t/h"', '"5.0 t/h"').replace('revision = "A"', 'revision = "B"'))
    assert run("run", case, "--out", out) == 0
    assert (out / "T-01_revB.json").exists() and (out / "T-01_revA.json").read_text() == first


def test_edited_record_fails_verification(workdir, capsys):
    case = write_case(workdir, GOOD_CASE)
    out = workdir / "out"
    run("run", case, "--out", out)
    path = out / "T-01_revA.json"
    record = json.loads(path.read_text())
    record["results"]["spray_water_flow"]["value"] *= 0.9
    path.write_text(json.dumps(record))
    assert run("verify", path) == 1
    text = capsys.readouterr().out
    assert "EDITED" in text and "differs" in text


def test_failing_check_writes_record_and_exits_1(workdir):
    case = write_case(workdir, GOOD_CASE.replace('target_superheat = "10 K"', 'target_temperature = "230 degC"'))
    out = workdir / "out"
    assert run("run", case, "--out", out) == 1
    record = json.loads((out / "T-01_revA.json").read_text())
    assert record["status"] == "fail"


def _inputs_replaced(old, new):
    return GOOD_CASE.replace(old, new)


BAD = {
    "bare bar": (_inputs_replaced('"16 bar(g)"', '"16 bar"'), "inlet_pressure"),
    "wrong dimension": (_inputs_replaced('"4.5 t/h"', '"5 m"'), "mass_flow"),
    "negative flow": (_inputs_replaced('"4.5 t/h"', '"-4.5 t/h"'), "mass_flow"),
    "outlet above inlet": (_inputs_replaced('"header:LP"', '"20 bar(g)"'), "outlet_pressure"),
    "outlet equal inlet": (_inputs_replaced('"header:LP"', '"16 bar(g)"'), "outlet_pressure"),
    "outside IF97": (_inputs_replaced('"230 degC"', '"1200 degC"'), "inlet_temperature"),
    "unknown key": (_inputs_replaced("mass_flow =", "mass_flwo ="), "mass_flwo"),
    "unknown desuperheater key": (_inputs_replaced("water_pressure =", "water_presure ="), "water_presure"),
    "over-specified inlet": (_inputs_replaced('inlet_temperature = "230 degC"',
                                              'inlet_temperature = "230 degC"\ninlet_superheat = "25 K"'),
                             "inlet_superheat"),
    "target below saturation": (_inputs_replaced('target_temperature' if False else 'target_superheat = "10 K"',
                                                 'target_temperature = "120 degC"'), "target_temperature"),
    "spray hotter than target": (_inputs_replaced('"105 degC"', '"160 degC"'), "water_temperature"),
    "case id is a path": (_inputs_replaced('id = "T-01"', 'id = "../../etc/T-01"'), "id"),
    "unknown header": (_inputs_replaced('"header:LP"', '"header:XP"'), "outlet_pressure"),
    "superheat given as a temperature": (_inputs_replaced('"10 K"', '"10 degC"'), "target_superheat"),
    "unknown kind": (_inputs_replaced('kind = "letdown"', 'kind = "letdwon"'), "kind"),
    "inlet below saturation": (_inputs_replaced('"230 degC"', '"150 degC"'), "inlet_temperature"),
    "dryness out of range": (_inputs_replaced('inlet_temperature = "230 degC"', "inlet_dryness = 1.2"),
                             "inlet_dryness"),
    "pressure as number": (_inputs_replaced('"16 bar(g)"', "16"), "inlet_pressure"),
    "spray water pressure below steam": (_inputs_replaced('"20 bar(g)"', '"1 bar(g)"'), "water_pressure"),
    "not TOML": ("this is [not toml", None),
    "no inputs": ('[case]\nkind = "letdown"\nid = "X"\n', None),
}


@pytest.mark.parametrize("name", list(BAD))
def test_bad_input_exits_2_names_field_and_writes_nothing(name, workdir, capsys):
    text, field = BAD[name]
    case = write_case(workdir, text)
    out = workdir / "out"
    assert run("run", case, "--out", out) == 2
    err = capsys.readouterr().err
    assert str(case) in err
    if field:
        assert field in err
    assert "Traceback" not in err
    assert not out.exists() or not any(out.iterdir())


def test_missing_file_and_folder_without_cases(workdir, capsys):
    assert run("run", workdir / "nope.toml") == 2
    empty = workdir / "empty"
    empty.mkdir()
    assert run("run", empty) == 2
    assert "no case files" in capsys.readouterr().err


def test_verify_refuses_non_record(workdir, capsys):
    path = workdir / "x.json"
    path.write_text('{"a": 1}')
    assert run("verify", path) == 2
    assert "not a steamcalc record" in capsys.readouterr().err


def test_usage_error_exits_2(capsys):
    assert pytest.raises(SystemExit, main, ["frobnicate"]).value.code == 2


def test_console_script_on_the_demo_case(tmp_path, demo_site_dir):
    site = tmp_path / "demo_site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    exe = shutil.which("steamcalc")
    command = [exe] if exe else [sys.executable, "-m", "steamcalc"]
    done = subprocess.run(command + ["run", str(site / "cases" / "LD-01.toml")], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    record = site / "records" / "LD-01_revB.json"
    assert record.exists() and (site / "records" / "LD-01_revB.html").exists()
    done = subprocess.run(command + ["verify", str(record)], capture_output=True, text=True)
    assert done.returncode == 0, done.stdout + done.stderr
