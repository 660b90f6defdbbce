"""A record a checker reads at a glance: its first page, `verify` with the verdict first, and the words views use.

The first page of the HTML and Markdown record holds what a checker signs against - identity, status, the
governing results (each kind's ``SUMMARY_RESULTS``), every failing or warning check and the notices to act
on, the signatures - then a page break (CSS, for print) and the detail by numbered section. ``verify``
prints its verdict and every difference first, the governing results after, and every compared value only
with ``--all``. Reports an earlier release drew (the layout before the first page) still verify, as drawn by
an earlier release; an edit to one is still caught. Also: no result twice under two keys (the let-down's
valve travel), two temperatures never read as a difference, the heater's sketch named for its arrangement,
and the diff's colours neutral. The checks here are of layout and words (common practice for calculation
records: a cover sheet that carries the status and the sign-offs); the values come from the calculations'
own reference tests.
"""

import json
import re
import shutil
from pathlib import Path

import pytest

from steamcalc.calcs import get_calculation
from steamcalc.cli import main
from steamcalc.records.record import compute_content_digest, compute_digest, load_record, record_text
from steamcalc.render.report import render_earlier, render_html, render_markdown
from steamcalc.render.sketch import sketch_svg

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
ARCHIVE = Path(__file__).resolve().parent / "archive"


@pytest.fixture(autouse=True)
def _no_user_settings(tmp_path, monkeypatch):
    # Trust comes from the site above the records here, never from a settings file of whoever runs the tests.
    monkeypatch.delenv("STEAMCALC_SETTINGS", raising=False)
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "no-config"))


@pytest.fixture(scope="module")
def records(tmp_path_factory):
    site = tmp_path_factory.mktemp("first_page") / "site"
    shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases"), "--quiet"]) in (0, 1)
    return site / "records"


def _first_page(page):
    return page[page.index('<section class="first-page"'):page.index("</section>")]


def _copy(records, stem, tmp_path):
    for path in records.glob(f"{stem}.*"):
        shutil.copy(path, tmp_path / path.name)
    return tmp_path / f"{stem}.json"


# -- the first page ---------------------------------------------------------------------------------------------

def test_every_kind_names_its_governing_results_and_each_is_a_result_it_makes(records):
    for kind in ("letdown", "flash", "exchanger"):
        calc = get_calculation(kind)
        assert 5 <= len(calc.SUMMARY_RESULTS) <= 12, kind
        made = set()
        for path in records.glob("*.json"):
            record = json.loads(path.read_text())
            if record["kind"] == kind:
                made |= set(record["results"])
        source = "".join(p.read_text() for p in Path(calc.__file__).parent.glob("*.py"))
        for key in calc.SUMMARY_RESULTS:   # made by a demo case, or by the calculation under other inputs
            assert key in made or f'"{key}"' in source, (kind, key)


def test_the_ld01_first_page_holds_identity_status_governing_results_every_warning_and_the_signatures(records):
    record = load_record(records / "LD-01_revB.json")
    page = (records / "LD-01_revB.html").read_text()
    first = _first_page(page)
    for text in ("LD-01, revision B", "Pressure let-down station", "A. Engineer", "Kestrel Valley Dairy",
                 record["digest"], "not yet checked", "Governing results", "Signatures", "Not signed yet"):
        assert text in first, text
    assert f'<span class="status {record["status"]}">{record["status"]}</span>' in first
    # The governing results, in the calculation's order, with their values as the detail shows them.
    keys = re.findall(r'<td class="key"><code>([^<]+)</code></td>', first)
    calc = get_calculation("letdown")
    assert keys == [k for k in calc.SUMMARY_RESULTS if k in record["results"]]
    assert re.search(r"<td>Outlet temperature</td><td class=\"num\">148\.8</td><td>°C</td>", first)
    # Every failing or warning check, and only those; the notice to act on (the relief load) with them.
    flagged = [c["name"] for c in record["checks"] if c["status"] in ("fail", "warn") and c.get("kind") != "notice"]
    assert len(flagged) == 10
    rows = re.findall(r"<tr><td>([^<]+)</td><td class=\"status (\w+)\">", first)
    assert [name for name, status in rows if status in ("fail", "warn")] == flagged
    assert ("Relief design flow for the relief designer", "notice") in rows
    assert "Outlet pressure below inlet" not in first and "Inlet steam state" not in first
    assert "0 failing, 10 warning and 31 passing checks; 5 notices" in first


def test_the_first_page_breaks_before_the_detail_which_follows_by_numbered_section(records):
    page = (records / "LD-01_revB.html").read_text()
    assert re.search(r"\.first-page \{[^}]*break-after: page; page-break-after: always;", page)
    detail = page[page.index("</section>"):]
    headings = re.findall(r'<h2 id="(\w+)"[^>]*>(\d+)\. ([^<]+)</h2>', detail)
    assert [(anchor, int(number)) for anchor, number, _ in headings] == [
        ("checks", 1), ("results", 2), ("figures", 3), ("uncertainty", 4), ("inputs", 5), ("assumptions", 6),
        ("steps", 7), ("cautions", 8), ("references", 9), ("software", 10)]
    # The contents on the first page link each section by its number; every check and result is in the detail.
    first = _first_page(page)
    assert all(f'<a href="#{anchor}">{number}. {heading}</a>' in first for anchor, number, heading in headings)
    record = json.loads((records / "LD-01_revB.json").read_text())
    results = detail[detail.index('id="results"'):detail.index('id="figures"')]
    assert results.count('<td class="key"><code>') == len(record["results"])


def test_the_markdown_record_has_the_same_first_page_then_a_rule(records):
    text = (records / "HX-01_revB.md").read_text()
    first, _, detail = text.partition("\n---\n")
    assert "### Governing results" in first and "### Checks that fail or warn" in first and "### Signatures" in first
    record = json.loads((records / "HX-01_revB.json").read_text())
    for check in record["checks"]:
        flagged = check["status"] in ("warn", "fail") and check.get("kind") != "notice"
        assert (f"| {check['name']} | {check['status']} |" in first) == flagged, check["name"]
    assert "| Process duty |" in first and "`duty`" in first
    headings = re.findall(r"^## (\d+)\. (.+)$", detail, re.M)
    assert [int(n) for n, _ in headings] == list(range(1, len(headings) + 1)) and headings[0][1] == "Checks"
    assert [h for _, h in headings][-5:] == ["Calculation steps", "Figures", "Cautions", "References",
                                             "Software and integrity"]


def test_a_failing_record_says_so_on_its_first_page_with_the_failing_check_first(records, tmp_path):
    # A valve too small for the flow: the rated Kv fails (the demo valve is Kvs 63; 20 is far below the 30.8 needed).
    case = (DEMO / "cases" / "LD-01.toml").read_text().replace('rated_kv = "63 m^3/h"', 'rated_kv = "20 m^3/h"')
    (tmp_path / "cases").mkdir()
    shutil.copy(DEMO / "site.toml", tmp_path / "site.toml")
    (tmp_path / "cases" / "LD-01.toml").write_text(case)
    assert main(["run", str(tmp_path / "cases" / "LD-01.toml"), "--quiet"]) == 1
    record = load_record(tmp_path / "records" / "LD-01_revB.json")
    first = _first_page(render_html(record))
    assert "FAILED CHECKS — this record must not be issued for construction" in first
    assert '<span class="status fail">fail</span>' in first
    rows = re.findall(r"<tr><td>([^<]+)</td><td class=\"status (\w+)\">", first)
    failing = [c["name"] for c in record["checks"] if c["status"] == "fail" and c.get("kind") != "notice"]
    assert "Rated Kv sufficient" in failing
    assert [name for name, _ in rows[:len(failing)]] == failing and {s for _, s in rows[:len(failing)]} == {"fail"}
    markdown = render_markdown(record).partition("\n---\n")[0]
    assert "> FAILED CHECKS" in markdown and "| Rated Kv sufficient | fail |" in markdown


def test_two_temperatures_are_never_written_as_a_difference(records):
    record = json.loads((records / "LD-01_revB.json").read_text())
    check = next(c for c in record["checks"] if c["name"] == "Spray water colder than target")
    assert check["detail"] == "water at 105.00 °C, below the target 148.78 °C"


def test_the_units_note_wraps_between_words_and_only_digests_break_anywhere(records):
    page = (records / "LD-01_revB.html").read_text()
    style = page[page.index("<style>"):page.index("</style>")]
    small = re.search(r"\.small \{([^}]*)\}", style).group(1)
    assert "break-all" not in small
    assert "break-all" in re.search(r"\.digest \{([^}]*)\}", style).group(1)
    body = page[page.index("<body>"):]
    for cell in re.findall(r'class="([^"]*)"[^>]*>sha256:', body):
        assert "digest" in cell


def test_a_signature_shows_on_the_first_page(records, tmp_path):
    (tmp_path / "records").mkdir()
    path = _copy(records, "LD-02_revB", tmp_path / "records")
    shutil.copy(DEMO / "site.toml", tmp_path / "site.toml")
    assert main(["keys", "new", "--name", "C. Checker", "--out", str(tmp_path / "keys")]) == 0
    (tmp_path / "trusted_signers").mkdir()
    shutil.copy(tmp_path / "keys" / "c-checker.pub", tmp_path / "trusted_signers")
    assert main(["sign", str(path), "--key", str(tmp_path / "keys" / "c-checker.key")]) == 0
    first = _first_page(path.with_suffix(".html").read_text())
    assert re.search(r"<b>Signed as checked</b></td><td[^>]*>C\. Checker</td>", first) and "Not signed yet" not in first
    record = load_record(path)
    # The key in full, with the verification it was signed after, in the detail (section 10).
    detail = path.with_suffix(".html").read_text().partition("</section>")[2]
    assert record["signatures"][0]["fingerprint"] in detail and 'class="signoff"' in detail
    assert "**Signed as checked** by C. Checker" in path.with_suffix(".md").read_text().partition("\n---\n")[0]


# -- no result twice ------------------------------------------------------------------------------------------

def test_the_valve_travel_at_the_normal_flow_is_one_result(records):
    record = json.loads((records / "LD-01_revB.json").read_text())
    assert "valve_travel_normal" in record["results"] and "valve_travel" not in record["results"]
    labels = [v["label"] for v in record["results"].values()]
    assert [label for label in labels if label.startswith("Valve travel") and "normal" in label] == [
        "Valve travel, normal flow"]


def test_an_earlier_record_with_the_second_key_verifies_with_a_note(tmp_path, capsys):
    path = _copy(ARCHIVE / "v0_3_schema2", "LD-01_revA", tmp_path)
    assert "valve_travel" in json.loads(path.read_text())["results"]
    assert main(["verify", str(path)]) == 0
    said = capsys.readouterr().out
    assert "valve_travel: recorded" in said and "no result twice under two keys" in said


# -- verify: the verdict and the differences first --------------------------------------------------------------

def test_verify_prints_the_verdict_first_and_every_value_only_with_all(records, tmp_path, capsys):
    path = _copy(records, "LD-01_revB", tmp_path)
    capsys.readouterr()
    assert main(["verify", str(path)]) == 0
    lines = capsys.readouterr().out.splitlines()
    assert lines[1].startswith("  verdict: VERIFIED") and lines[2] == "  integrity: intact"
    assert lines[3].startswith("  reproduction: reproduced - ") and lines[4] == "  differences: none"
    assert len(lines) < 45   # was ~195, the verdict last
    record = json.loads(path.read_text())
    governing = [k for k in get_calculation("letdown").SUMMARY_RESULTS if k in record["results"]]
    listed = [line.split()[-1] for line in lines if line.rstrip().endswith(tuple(record["results"]))]
    assert listed == governing
    assert "steamcalc verify --all lists every one" in lines[-1]
    assert main(["verify", "--all", str(path)]) == 0
    every = capsys.readouterr().out
    assert all(re.search(rf"\s{re.escape(key)}$", every, re.M) for key in record["results"])
    assert every.index("verdict: VERIFIED") < every.index("every compared value")


def test_verify_lists_an_edited_result_among_the_differences_right_after_the_verdict(records, tmp_path, capsys):
    path = _copy(records, "FL-01_revB", tmp_path)
    record = json.loads(path.read_text())
    record["results"]["flash_steam_flow"]["value"] *= 1.01
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    path.write_text(record_text(record))
    capsys.readouterr()
    assert main(["verify", str(path)]) == 1
    lines = capsys.readouterr().out.splitlines()
    assert lines[1].startswith("  verdict: FAILED")
    start = next(i for i, line in enumerate(lines) if line.startswith("  differences ("))
    difference = next(i for i, line in enumerate(lines) if line.rstrip().endswith("differs  flash_steam_flow"))
    assert start < difference < next(i for i, line in enumerate(lines) if line.startswith("  companion "))


# -- reports drawn by an earlier release ------------------------------------------------------------------------

def test_reports_in_the_earlier_layout_verify_and_repair_draws_them_anew(records, tmp_path, capsys):
    path = _copy(records, "HX-01_revB", tmp_path)
    record = load_record(path)
    for suffix in (".html", ".md"):
        path.with_suffix(suffix).write_text(render_earlier(record, suffix))
    assert 'font-weight="bold">shell</text>' in path.with_suffix(".html").read_text()   # the earlier sketch words
    capsys.readouterr()
    assert main(["verify", str(path)]) == 0
    said = capsys.readouterr().out
    assert said.count("shows the JSON as releases 0.2 and 0.3 laid reports out") == 2 and "DIFFERS" not in said
    assert main(["verify", str(path), "--repair"]) == 0
    assert path.with_suffix(".html").read_text() == render_html(record)
    assert path.with_suffix(".md").read_text() == render_markdown(record)


def test_an_edit_to_a_report_in_the_earlier_layout_is_still_caught(records, tmp_path, capsys):
    path = _copy(records, "LD-02_revB", tmp_path)
    record = load_record(path)
    path.with_suffix(".html").write_text(render_earlier(record, ".html").replace("warn</td>", "pass</td>", 1))
    capsys.readouterr()
    assert main(["verify", str(path)]) == 1
    assert "companion LD-02_revB.html: DIFFERS" in capsys.readouterr().out


@pytest.mark.parametrize("release", ["v0_2", "v0_3_schema2"])
def test_records_of_earlier_releases_keep_verifying_with_their_reports(release, tmp_path, capsys):
    for stem in ("LD-01_revA", "HX-01_revA"):
        path = _copy(ARCHIVE / release, stem, tmp_path)
        capsys.readouterr()
        assert main(["verify", str(path)]) == 0, (release, stem)
        said = capsys.readouterr().out
        assert "verdict: VERIFIED" in said and "DIFFERS" not in said


# -- words that fit: the heater's sketch, the diff's colours ------------------------------------------------------

@pytest.mark.parametrize("arrangement, name, line", [
    (None, "heat exchanger", "counterflow"), ("counterflow", "heat exchanger", "counterflow"),
    ("1-2", "shell-and-tube", "1 shell pass, 2 tube passes"), ("2-4", "shell-and-tube", "2 shell passes, 4 tube passes")])
def test_the_heater_sketch_names_the_exchanger_for_its_arrangement(records, arrangement, name, line):
    record = json.loads((records / "HX-01_revB.json").read_text())
    if arrangement is None:
        record["inputs"].pop("arrangement", None)
    else:
        record["inputs"]["arrangement"] = {"value": arrangement, "unit": "", "given": arrangement}
    svg = sketch_svg(record)
    assert f'font-weight="bold">{name}</text>' in svg and f">{line}</text>" in svg
    assert "steam side, design load" in svg
    assert (">shell<" in svg or "shell," in svg) is False


def test_the_diff_page_colours_old_and_new_neutrally_with_a_legend(records, tmp_path):
    old = json.loads((records / "LD-02_revB.json").read_text())
    new = dict(old, revision="C", inputs=dict(old["inputs"]))
    new["inputs"]["mass_flow"] = dict(old["inputs"]["mass_flow"], value=2200.0, given="2.2 t/h")
    (tmp_path / "old.json").write_text(json.dumps(old))
    (tmp_path / "new.json").write_text(json.dumps(new))
    page_path = tmp_path / "changes.html"
    assert main(["diff", str(tmp_path / "old.json"), str(tmp_path / "new.json"), "--html", str(page_path)]) == 0
    page = page_path.read_text()
    style = page[page.index("<style>"):page.index("</style>")]
    assert "#2f6b3a" not in style and "#7a2a25" not in style and "#e6f4e8" not in style and "#fbeaea" not in style
    assert re.search(r"tr\.changed td\.old[^{]*\{[^}]*line-through", style)
    assert re.search(r"tr\.changed td\.new[^{]*\{[^}]*#1d4f91[^}]*bold", style)
    assert "struck through in grey" in page and "in bold blue" in page and "not whether the change is" in page
