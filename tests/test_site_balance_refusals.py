"""Site steam balance: bad input refused by name (file, field, value, fix), never a traceback or a record."""

import json

import pytest

from steamcalc.cli import main
from tests.case_helpers import assert_refused, run_case_text
from tests.site_balance_cases import BOILER, CASE, HEAD, NETWORK, write_site


@pytest.fixture
def site(tmp_path):
    return write_site(tmp_path)


REFUSALS = [
    # (what, edit of the good case, field named, words in the message)
    ("user on a header the site does not have", ('header = "MP"\nload = "1.5 t/h"', 'header = "XP"\nload = "1.5 t/h"'),
     "user[0].header", "is not in the site file"),
    ("negative flow", ('load = "2.5 t/h"', 'load = "-2.5 t/h"'), "user[2].load", "cannot be negative"),
    ("negative duty in one load case", ('summer = "100 kW"', 'summer = "-100 kW"'), "user[3].load.summer",
     "cannot be negative"),
    ("deaerator below atmospheric", ('pressure = "0.2 bar(g)"', 'pressure = "0.8 bar(a)"'), "deaerator.pressure",
     "below the site atmosphere"),
    ("unknown key in a user", ('condensate_return = 0.9\nreturn_temperature = "95 degC"',
                               'condensate_return = 0.9\nreturn_temp = "95 degC"'), "user[2].return_temp", "unknown key"),
    ("load case missing from a per-case load", ('{ winter = "700 kW", summer = "100 kW" }', '{ winter = "700 kW" }'),
     "user[3].load", "no load given for load case 'summer'"),
    ("a load in a load case the balance has not", ('summer = "100 kW" }', 'summer = "100 kW", night = "5 kW" }'),
     "user[3].load.night", "not one of the balance's load cases"),
    ("a load that is neither flow nor duty", ('load = "2.5 t/h"', 'load = "2.5 m"'), "user[2].load",
     "a steam flow or a duty"),
    ("return fraction above one", ('condensate_return = 0.9\nreturn_temperature = "95 degC"',
                                   'condensate_return = 1.9\nreturn_temperature = "95 degC"'),
     "user[2].condensate_return", "from 0 to 1"),
    ("flash on a user that does not exist", ('condensate_of = "Preheater"', 'condensate_of = "Nobody"'),
     "flash[0].condensate_of", "is not a user"),
    ("what-if naming no item", ('without = ["Flash"]', 'without = ["FL-99"]'), "what_if.without", "FL-99"),
    ("both blowdown statements", ('feedwater_tds = 150', 'feedwater_tds = 150\nblowdown_fraction = 0.05'),
     "boiler.blowdown_fraction", "not both"),
    ("feedwater dissolved solids above the boiler-water limit", ('feedwater_tds = 150', 'feedwater_tds = 3500'),
     "boiler.feedwater_tds", "not below the boiler-water limit"),
    ("boiler below its header", ('pressure = "16.5 bar(g)"', 'pressure = "10 bar(g)"'), "boiler.pressure",
     "below the header it feeds"),
    ("two items of one name", ('name = "Heater"', 'name = "Preheater"'), "user[1].name", "two user entries"),
]


@pytest.mark.parametrize("what,edit,field,words", REFUSALS, ids=[r[0] for r in REFUSALS])
def test_bad_input_is_refused_by_name(tmp_path, capsys, site, what, edit, field, words):
    old, new = edit
    assert old in CASE, what
    code, _, err = run_case_text(tmp_path, capsys, CASE.replace(old, new, 1))
    assert code == 2, err
    assert field in err and words in err and str(tmp_path / "case.toml") in err, err
    assert "Fix:" in err or "Valid range" in err, err
    assert "Traceback" not in err and not (tmp_path / "out").exists()


def test_a_cycle_of_letdowns_is_refused(tmp_path, capsys, site):
    cycle = NETWORK + '\n[[inputs.letdown]]\nname = "MP-HP"\nfrom = "MP"\nto = "HP"\n'
    code, _, err = run_case_text(tmp_path, capsys, HEAD + BOILER + cycle)
    assert code == 2 and "cycle: HP -> MP -> HP" in err and "letdown" in err and "Fix:" in err, err


def test_two_letdowns_into_one_header_are_refused(tmp_path, capsys, site):
    second = NETWORK + '\n[[inputs.letdown]]\nname = "HP-MP 2"\nfrom = "HP"\nto = "MP"\n'
    assert_refused(tmp_path, capsys, HEAD + BOILER + second, "letdown[2].to")


def test_a_letdown_up_the_pressures_is_refused(tmp_path, capsys, site):
    text = CASE.replace('name = "HP-MP"\nfrom = "HP"\nto = "MP"', 'name = "HP-MP"\nfrom = "LP"\nto = "MP"')
    code, _, err = run_case_text(tmp_path, capsys, text)
    assert code == 2 and "letdown.HP-MP.to" in err and "runs from LP" in err, err


def test_a_balance_with_no_load_case_is_refused(tmp_path, capsys, site):
    text = CASE.replace('[[inputs.load_case]]\nname = "winter"\nhours = "3500 h"\n\n', "").replace(
        '[[inputs.load_case]]\nname = "summer"\nhours = "2500 h"\n', "")
    assert_refused(tmp_path, capsys, text, "load_case")


def _issue(tmp_path, capsys, kind_case):
    """Issue one small linked record into tmp_path/records; return its path."""
    (tmp_path / "cases").mkdir(exist_ok=True)
    (tmp_path / "cases" / "FL-T.toml").write_text(kind_case)
    assert main(["run", str(tmp_path / "cases" / "FL-T.toml"), "--out", str(tmp_path / "records"), "--quiet"]) in (0, 1)
    capsys.readouterr()
    return tmp_path / "records" / "FL-T_revA.json"


FLASH_CASE = """
[case]
kind = "flash"
id = "FL-T"
revision = "A"
site = "../site.toml"

[inputs]
condensate_pressure = "header:MP"
condensate_flow = "1.5 t/h"
flash_pressure = "header:LP"
"""


def _linked_case(record_line):
    return CASE.replace('[[inputs.flash]]\nname = "Flash"\ncondensate_of = "Preheater"\nto = "LP"',
                        '[[inputs.flash]]\nname = "Flash"\ncondensate_of = "Preheater"\nto = "LP"\n' + record_line) + \
        '\n[inputs.links]\nfolder = "records"\nrevision = "A"\n'


def test_a_linked_record_of_the_wrong_kind_is_refused(tmp_path, capsys, site):
    _issue(tmp_path, capsys, FLASH_CASE)
    text = _linked_case('record = "FL-T"').replace('max_flow = "2.6 t/h"\nmin_flow = "0.5 t/h"', 'record = "FL-T"')
    code, _, err = run_case_text(tmp_path, capsys, text)
    assert code == 2 and "letdown[0].record" in err and "is a flash record, not a letdown record" in err, err


def test_a_linked_record_with_a_broken_digest_is_refused(tmp_path, capsys, site):
    path = _issue(tmp_path, capsys, FLASH_CASE)
    record = json.loads(path.read_text(encoding="utf-8"))
    record["results"]["flash_steam_flow"]["value"] *= 2   # edited after issue, digests left as they were
    path.write_text(json.dumps(record), encoding="utf-8")
    code, _, err = run_case_text(tmp_path, capsys, _linked_case('record = "FL-T"'))
    assert code == 2 and "flash[0].record" in err and "digest does not match" in err, err


def test_a_missing_linked_record_is_refused_with_how_to_issue_it(tmp_path, capsys, site):
    code, _, err = run_case_text(tmp_path, capsys, _linked_case('record = "FL-T"'))
    assert code == 2 and "flash[0].record" in err and "is not at" in err and "issue it first" in err, err


def test_a_linked_flash_record_is_used_and_named(tmp_path, capsys, site):
    path = _issue(tmp_path, capsys, FLASH_CASE)
    code, out, err = run_case_text(tmp_path, capsys, _linked_case('record = "FL-T"'))
    assert code == 0, err
    record = json.loads((tmp_path / "out" / "SB-T_revA.json").read_text(encoding="utf-8"))
    issued = json.loads(path.read_text(encoding="utf-8"))
    assert record["inputs"]["flash.Flash.link.content_digest"]["value"] == issued["content_digest"]
    assert record["inputs"]["flash.Flash.link.revision"]["value"] == "A"
