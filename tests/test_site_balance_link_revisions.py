"""Site steam balance: each linked item may name its own revision over ``[inputs.links] revision``; a revision
with no record is refused naming the item and where the revision came from."""

import json

import pytest

from steamcalc.cli import main
from steamcalc.ui.linked_cases import _MISSING_LINK
from tests.case_helpers import run_case_text
from tests.site_balance_cases import CASE, write_site

FLASH_CASE = """
[case]
kind = "flash"
id = "FL-T"
revision = "{revision}"
site = "../site.toml"

[inputs]
condensate_pressure = "header:MP"
condensate_flow = "1.5 t/h"
flash_pressure = "header:LP"
"""


@pytest.fixture
def site(tmp_path):
    return write_site(tmp_path)


def _issue(tmp_path, capsys, revision):
    """Issue the flash record FL-T at ``revision`` into tmp_path/records."""
    (tmp_path / "cases").mkdir(exist_ok=True)
    case = tmp_path / "cases" / f"FL-T_rev{revision}.toml"
    case.write_text(FLASH_CASE.format(revision=revision))
    assert main(["run", str(case), "--out", str(tmp_path / "records"), "--quiet"]) in (0, 1)
    capsys.readouterr()
    return tmp_path / "records" / f"FL-T_rev{revision}.json"


def _balance(item_lines, links_revision="A"):
    """The test balance with its flash vessel linked to FL-T; ``item_lines`` added to the flash item."""
    flash = '[[inputs.flash]]\nname = "Flash"\ncondensate_of = "Preheater"\nto = "LP"'
    return CASE.replace(flash, flash + '\nrecord = "FL-T"\n' + item_lines) + \
        f'\n[inputs.links]\nfolder = "records"\nrevision = "{links_revision}"\n'


def test_an_item_s_own_revision_wins_over_the_links_revision(tmp_path, capsys, site):
    _issue(tmp_path, capsys, "A")
    issued_b = _issue(tmp_path, capsys, "B")
    code, _, err = run_case_text(tmp_path, capsys, _balance('revision = "B"'))
    assert code == 0, err
    record = json.loads((tmp_path / "out" / "SB-T_revA.json").read_text(encoding="utf-8"))
    assert record["inputs"]["flash.Flash.link.revision"]["value"] == "B"
    assert record["inputs"]["flash.Flash.link.content_digest"]["value"] == \
        json.loads(issued_b.read_text(encoding="utf-8"))["content_digest"]


def test_without_its_own_revision_an_item_takes_the_links_revision(tmp_path, capsys, site):
    _issue(tmp_path, capsys, "A")
    _issue(tmp_path, capsys, "B")
    code, _, err = run_case_text(tmp_path, capsys, _balance("", links_revision="A"))
    assert code == 0, err
    record = json.loads((tmp_path / "out" / "SB-T_revA.json").read_text(encoding="utf-8"))
    assert record["inputs"]["flash.Flash.link.revision"]["value"] == "A"


def test_an_item_s_revision_with_no_record_is_refused_naming_the_item(tmp_path, capsys, site):
    _issue(tmp_path, capsys, "A")
    code, _, err = run_case_text(tmp_path, capsys, _balance('revision = "C"'))
    assert code == 2 and "flash[0].revision" in err, err
    assert "linked record FL-T revision C is not at" in err and "named by flash vessel 'Flash'" in err, err
    assert "Fix:" in err and "Traceback" not in err and not (tmp_path / "out").exists()


def test_the_links_revision_with_no_record_is_refused_naming_the_item(tmp_path, capsys, site):
    code, _, err = run_case_text(tmp_path, capsys, _balance("", links_revision="D"))
    assert code == 2 and "flash[0].record" in err and "named by flash vessel 'Flash', at [inputs.links] revision" in err
    assert "a revision of its own" in err, err


@pytest.mark.parametrize("message,path", [
    ("linked record LD-01 revision B is not at /site/records/LD-01_revB.json", "/site/records/LD-01_revB.json"),
    ("linked record LD-01 revision C is not at /site/records/LD-01_revC.json (named by let-down 'LD-01', at the "
     "revision it gives)", "/site/records/LD-01_revC.json"),
])
def test_the_workbook_still_finds_the_missing_record_s_path(message, path):
    # The workbook issues a missing linked record from its case file beside the balance's, reading the refusal.
    found = _MISSING_LINK.match(message)
    assert found and found["path"] == path and found["id"] == "LD-01"


def test_a_revision_on_an_item_that_links_no_record_is_refused(tmp_path, capsys, site):
    flash = '[[inputs.flash]]\nname = "Flash"\ncondensate_of = "Preheater"\nto = "LP"'
    code, _, err = run_case_text(tmp_path, capsys, CASE.replace(flash, flash + '\nrevision = "B"'))
    assert code == 2 and "flash[0].revision" in err and "links none" in err and "Fix:" in err, err
