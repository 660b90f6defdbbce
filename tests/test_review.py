"""Review and reuse: diff, sign-off, batch with a broken case, new-site, headers, US units,
the notebook companion, PDF, and escaping of user text in the HTML record."""

import csv
import json
import shutil

import pytest

from steamcalc.cli import main
from steamcalc.records.companions import find_chromium
from steamcalc.render.display import convert
from steamcalc.records.record import load_record
from steamcalc.render.report import render_html
from steamcalc.cases.site import case_inputs, load_case, load_site


@pytest.fixture
def site(tmp_path, demo_site_dir):
    folder = tmp_path / "demo_site"
    shutil.copytree(demo_site_dir, folder, ignore=shutil.ignore_patterns("records"))
    for notebook in demo_site_dir.parent.glob("*.ipynb"):
        shutil.copy(notebook, tmp_path / notebook.name)
    return folder


def _bump(case, old, new, revision):
    text = case.read_text().replace(old, new).replace('revision = "B"', f'revision = "{revision}"')
    case.write_text(text)


def test_diff_of_two_revisions(site, capsys, tmp_path):
    case = site / "cases" / "LD-02.toml"
    assert main(["run", str(case)]) == 0
    _bump(case, '"2.0 t/h"', '"2.3 t/h"', "C")
    assert main(["run", str(case)]) == 0
    capsys.readouterr()
    page = tmp_path / "diff.html"
    assert main(["diff", str(site / "records" / "LD-02_revB.json"), str(site / "records" / "LD-02_revC.json"),
                 "--html", str(page)]) == 0
    out = capsys.readouterr().out
    assert "  * Steam flow [mass_flow]: 2,000 kg/h (as given: 2.0 t/h) -> 2,300 kg/h (as given: 2.3 t/h); change +300 kg/h" \
        in out
    assert "  * Required Kv, normal flow: " in out
    assert "  * Revision: B -> C" in out
    assert "mass_flow" in page.read_text()


def _key(tmp_path, name="C. Checker"):
    """A private key file (a record is signed with a key; a name alone is refused)."""
    assert main(["keys", "new", "--name", name, "--out", str(tmp_path / "keys")]) == 0
    return str(tmp_path / "keys" / (name.replace(". ", "-").replace(" ", "-").lower() + ".key"))


def test_sign_then_refuse_reissue(site, capsys, tmp_path):
    case = site / "cases" / "LD-02.toml"
    main(["run", str(case)])
    record_path = site / "records" / "LD-02_revB.json"
    key = _key(tmp_path)
    shutil.copy(key.replace(".key", ".pub"), site / "trusted_signers")
    assert main(["sign", str(record_path), "--key", key]) == 0
    signed = load_record(record_path)
    assert signed["signatures"][0]["name"] == "C. Checker"
    assert signed["signatures"][0]["verification"]["integrity"] == "intact"
    assert "Signed as checked" in (site / "records" / "LD-02_revB.html").read_text()
    assert main(["verify", str(record_path)]) == 0
    # Same content again: the signed record is kept as it is.
    assert main(["run", str(case)]) == 0
    assert load_record(record_path)["signatures"] == signed["signatures"]
    # Different content under the same revision: refused, the signed record untouched.
    case.write_text(case.read_text().replace('"2.0 t/h"', '"2.2 t/h"'))
    assert main(["run", str(case)]) == 2
    assert load_record(record_path)["digest"] == signed["digest"]
    assert main(["sign", str(record_path), "--key", _key(tmp_path, "Someone Else")]) == 1
    assert "already signed" in capsys.readouterr().err


def test_sign_refused_on_an_edited_record(site, capsys, tmp_path):
    main(["run", str(site / "cases" / "LD-02.toml")])
    path = site / "records" / "LD-02_revB.json"
    record = json.loads(path.read_text())
    record["results"]["outlet_temperature"]["value"] += 5.0
    path.write_text(json.dumps(record))
    assert main(["sign", str(path), "--key", _key(tmp_path)]) == 1
    assert "digest does not match" in capsys.readouterr().err
    assert not json.loads(path.read_text()).get("signatures")


def test_sign_refused_on_a_failing_record(site, capsys, tmp_path):
    case = site / "cases" / "LD-02.toml"
    case.write_text(case.read_text().replace('rated_kv = "32 m^3/h"', 'rated_kv = "5 m^3/h"'))
    assert main(["run", str(case)]) == 1
    assert main(["sign", str(site / "records" / "LD-02_revB.json"), "--key", _key(tmp_path)]) == 1
    assert "recomputed status is FAIL" in capsys.readouterr().err


def test_batch_keeps_going_past_a_broken_case(site, capsys):
    broken = site / "cases" / "BAD-01.toml"
    broken.write_text('[case]\nkind = "letdown"\nid = "BAD-01"\n[inputs]\ninlet_pressure = "16 bar"\n')
    code = main(["run", str(site / "cases"), "--quiet"])
    assert code == 2
    err = capsys.readouterr().err
    cases = len(list(site.glob("cases/*.toml")))   # the demo cases and the broken one
    assert f"1 of {cases} case(s) not run" in err and "BAD-01.toml" in err and "inlet_pressure" in err
    records = site / "records"
    demo = sorted(path.stem for path in site.glob("cases/*.toml") if path.stem != "BAD-01")
    for case in demo:
        assert next(records.glob(f"{case}_rev*.json"), None) is not None, case
    rows = list(csv.DictReader((records / "index.csv").open()))
    assert sorted(r["id"] for r in rows) == demo
    index = (records / "index.html").read_text()
    assert "LD-01_revB.html" in index and "BAD-01.toml" in index


def test_new_site_copies_and_refuses_an_existing_folder(site, tmp_path, capsys):
    target = tmp_path / "plant2"
    assert main(["new-site", str(target), "--from", str(site)]) == 0
    assert (target / "site.toml").exists() and (target / "cases" / "LD-01.toml").exists()
    notebook = json.loads((target / "letdown.ipynb").read_text())
    params = next(c for c in notebook["cells"] if "parameters" in c["metadata"].get("tags", []))
    assert 'case_file = "cases/LD-01.toml"' in "".join(params["source"])
    assert not (target / "records").exists()
    assert main(["new-site", str(target), "--from", str(site)]) == 2
    assert "already exists" in capsys.readouterr().err
    empty = tmp_path / "empty"
    empty.mkdir()
    assert main(["new-site", str(empty), "--from", str(site)]) == 2


def test_headers_resolved_from_the_site(site):
    case = load_case(site / "cases" / "LD-01.toml")
    inputs, given = case_inputs(case, load_site(site / "site.toml"))
    atmosphere = load_site(site / "site.toml").atmospheric_pressure
    assert inputs.outlet_pressure == pytest.approx(2.5e5 + atmosphere)
    assert given["outlet_pressure"] == "header:LP = 2.5 bar(g)"


def test_us_display_units(site):
    text = (site / "site.toml").read_text().replace('display_units = "SI"', 'display_units = "US"')
    (site / "site.toml").write_text(text)
    assert main(["run", str(site / "cases" / "LD-02.toml")]) == 0
    record = load_record(site / "records" / "LD-02_revB.json")
    assert record["results"]["outlet_temperature"]["unit"] == "degC"        # the JSON stays SI
    page = (site / "records" / "LD-02_revB.html").read_text()
    fahrenheit, _ = convert(record["results"]["outlet_temperature"]["value"], "degC", "US")
    assert f"{fahrenheit:.1f}" in page and "°F" in page and "lb/h" in page and "psia" in page


def test_us_display_units_in_the_workbook(site, tmp_path):
    from steamcalc.ui.workbook import Workbook

    text = (site / "site.toml").read_text().replace('display_units = "SI"', 'display_units = "US"')
    (site / "site.toml").write_text(text)
    workbook = Workbook(site / "cases" / "LD-02.toml", tmp_path / "records")
    shown = workbook.results_view().value
    assert "°F" in shown and "lb/h" in shown
    assert workbook.record["results"]["outlet_temperature"]["unit"] == "degC"   # the record stays SI
    assert "°F" in workbook.summary()


def test_notebook_companion(site):
    assert main(["run", str(site / "cases" / "LD-02.toml"), "--notebook"]) == 0
    executed = site / "records" / "LD-02_revB.ipynb"
    assert executed.exists()
    cells = json.loads(executed.read_text())["cells"]
    printed = "".join("".join(o.get("text", "")) + "".join(o.get("data", {}).get("text/plain", ""))
                      for c in cells for o in c.get("outputs", []))
    assert "LD-02 rev B" in printed


@pytest.mark.skipif(find_chromium() is None, reason="no Chromium: apt-get install chromium to test --pdf")
def test_pdf(site):
    assert main(["run", str(site / "cases" / "LD-02.toml"), "--pdf"]) == 0
    pdf = site / "records" / "LD-02_revB.pdf"
    assert pdf.read_bytes().startswith(b"%PDF")


def test_pdf_without_chromium_says_how(site, monkeypatch, capsys):
    monkeypatch.setattr("steamcalc.records.companions.find_chromium", lambda: None)
    assert main(["run", str(site / "cases" / "LD-02.toml"), "--pdf"]) == 2
    assert "no Chromium was found" in capsys.readouterr().err
    assert (site / "records" / "LD-02_revB.json").exists()


def test_html_record_escapes_user_text(site):
    case = site / "cases" / "LD-02.toml"
    case.write_text(case.read_text().replace('title = "HP to MP let-down, no desuperheating"',
                                             'title = "<script>alert(1)</script> & <b>bold</b>"'))
    assert main(["run", str(case)]) in (0, 1)
    page = (site / "records" / "LD-02_revB.html").read_text()
    assert "<script>alert(1)</script>" not in page and "&lt;script&gt;" in page
    assert render_html(load_record(site / "records" / "LD-02_revB.json")).count("<script") == 0


def test_a_text_result_a_last_digit_apart_is_the_same_but_another_value_is_not():
    # "2.337 bar(a) → 1.05 bar(a)" recomputed as "2.338 …" (2.3375000000000004 bar) failed its own verify.
    from steamcalc.review.verify import _compare

    pressures = "2.337 bar(a) → 1.05 bar(a)"
    assert _compare("valve_pressures_normal", {"value": pressures}, {"value": "2.338 bar(a) → 1.05 bar(a)"}).verdict \
        == "same"
    assert _compare("valve_pressures_normal", {"value": pressures}, {"value": "2.437 bar(a) → 1.05 bar(a)"}).verdict \
        == "differs"
    assert _compare("relief_orifice", {"value": "J"}, {"value": "K"}).verdict == "differs"
    assert _compare("inlet_phase", {"value": "superheated"}, {"value": "wet"}).verdict == "differs"
