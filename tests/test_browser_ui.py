"""What a user sees of the workbooks' feedback, in a real browser (JupyterLab in Chromium, driven by Playwright).

Each test asserts what is on the screen — the message beside the refused box, the stale banner, the
help line and tooltip, the compare list, the computing note, the unchanged-kept text, the failed
verdict's style — and saves a screenshot under tests/_artifacts/browser/ui/ named for the point it shows.
Needs the system Chromium and playwright, as tests/browser_support.py says (skipped without them, except
under CI).
"""

import json
import shutil
import urllib.request

from tests.browser_support import (  # noqa: F401 (browser and lab are fixtures)
    ARTIFACTS, PANEL, _open_and_run_all, browser, lab, no_widget_failures)

SHOTS = ARTIFACTS / "ui"


def _shots():
    SHOTS.mkdir(parents=True, exist_ok=True)
    return SHOTS


def _records(root):
    return root / "workbooks" / "demo_site" / "records"


def _fresh_records(root):
    shutil.rmtree(_records(root), ignore_errors=True)


def _text(page, selector):
    return page.locator(f"{PANEL} {selector}").first.inner_text()


def _wait_text(page, selector, words, timeout=90_000):
    page.wait_for_function(
        "([sel, words]) => { const e = document.querySelector(sel); return e && e.innerText.includes(words); }",
        arg=[f"{PANEL} {selector}", words], timeout=timeout)


def _type(page, field, text):
    box = page.locator(f"{PANEL} .steamcalc-input-{field} input").first
    box.scroll_into_view_if_needed()
    box.fill(text)
    box.press("Enter")


def test_flash_refused_input_beside_its_box_stale_views_and_the_cascade_example(lab, browser):
    """#15 items 3 (refused input, stale marking, live summary) and 2 (the cascade example runs as shown)."""
    url, root = lab
    shots = _shots()
    _fresh_records(root)
    page = _open_and_run_all(browser, url, "flash_recovery.ipynb")
    _wait_text(page, ".steamcalc-results", "Overall")
    _wait_text(page, ".steamcalc-summary", "FL-01 rev B")
    page.wait_for_selector(f"{PANEL} .steamcalc-save", timeout=90_000)

    # 3: a refused input — its message beside its box, the box highlighted, every view marked stale.
    _type(page, "condensate_flow", "3.2 t")
    _wait_text(page, ".steamcalc-field-message-condensate_flow", "Not accepted")
    message = page.locator(f"{PANEL} .steamcalc-field-message-condensate_flow").first
    box = page.locator(f"{PANEL} .steamcalc-input-condensate_flow input").first
    assert "Condensate flow" in message.inner_text()
    assert "steamcalc-input-refused" in page.locator(f"{PANEL} .steamcalc-input-condensate_flow").first.get_attribute("class")
    mb, bb = message.bounding_box(), box.bounding_box()
    assert mb["x"] >= bb["x"] + bb["width"] - 1, "the message is not beside its box"
    assert mb["y"] < bb["y"] + bb["height"] and bb["y"] < mb["y"] + mb["height"], "the message is not level with its box"
    border = page.evaluate("e => getComputedStyle(e).borderTopColor", box.element_handle())
    assert border == "rgb(163, 32, 27)"
    # The stale marks reach the page one widget message at a time: wait for all of them (a loaded machine
    # once showed one banner of four at the first look), then check.
    page.wait_for_function(
        "([panel, views]) => views.every(v => { const e = document.querySelector(panel + ' .' + v);"
        " return e && e.classList.contains('steamcalc-stale'); })"
        " && [...document.querySelectorAll(panel + ' .steamcalc-stale-banner')]"
        ".filter(e => e.getClientRects().length > 0).length >= 4",
        arg=[PANEL, ["steamcalc-results", "steamcalc-chart", "steamcalc-table"]])
    for view in ("steamcalc-results", "steamcalc-chart", "steamcalc-table"):
        assert "steamcalc-stale" in page.locator(f"{PANEL} .{view}").first.get_attribute("class"), view
    visible_banners = page.locator(f"{PANEL} .steamcalc-stale-banner:visible")
    assert visible_banners.count() >= 4
    assert "Stale: an input above is not accepted" in visible_banners.first.inner_text()
    assert "INPUT NOT ACCEPTED" in _text(page, ".steamcalc-summary")
    assert page.locator(f"{PANEL} .steamcalc-save").first.is_disabled()
    page.locator(f"{PANEL} .steamcalc-summary").first.scroll_into_view_if_needed()
    page.screenshot(path=str(shots / "15-3-summary-refused.png"))
    box.scroll_into_view_if_needed()
    page.screenshot(path=str(shots / "15-3-refused.png"))
    page.locator(f"{PANEL} .steamcalc-results").first.evaluate("e => e.scrollIntoView({block: 'start'})")
    page.screenshot(path=str(shots / "15-3-stale.png"))

    # Fixed: the message goes, the views are current again and the summary at the top follows.
    _type(page, "condensate_flow", "3.5 t/h")
    _wait_text(page, ".steamcalc-summary", "3,500")
    assert "INPUT NOT ACCEPTED" not in _text(page, ".steamcalc-summary")
    assert _text(page, ".steamcalc-field-message-condensate_flow").strip() == ""
    page.wait_for_function(
        "panel => [...document.querySelectorAll(panel + ' .steamcalc-stale-banner')]"
        ".filter(e => e.getClientRects().length > 0).length === 0", arg=PANEL)
    assert page.locator(f"{PANEL} .steamcalc-stale-banner:visible").count() == 0
    assert "steamcalc-stale" not in page.locator(f"{PANEL} .steamcalc-results").first.get_attribute("class")
    page.locator(f"{PANEL} .steamcalc-summary").first.scroll_into_view_if_needed()
    page.screenshot(path=str(shots / "15-3-fixed-summary.png"))

    # 2: the workbook's cascade example typed as its text shows it, on the demo case.
    _type(page, "stages", "5 bar(g), 2.5 bar(g)")
    _wait_text(page, ".steamcalc-results", "Stage 2 pressure")
    assert page.locator(f"{PANEL} .steamcalc-input-flash_pressure input").first.input_value() == ""
    assert "Flash pressure (it was header:LP) emptied" in _text(page, ".steamcalc-field-message-stages")
    assert page.locator(f"{PANEL} .steamcalc-refused:visible").count() == 0
    assert "INPUT NOT ACCEPTED" not in _text(page, ".steamcalc-summary")
    page.locator(f"{PANEL} .steamcalc-input-stages").first.scroll_into_view_if_needed()
    page.screenshot(path=str(shots / "15-2-cascade.png"))
    stages = page.locator(f"{PANEL} .steamcalc-table").first
    stages.scroll_into_view_if_needed()
    stages.screenshot(path=str(shots / "15-2-cascade-stage-table.png"))
    no_widget_failures(page)
    page.close()


def test_letdown_help_alternatives_bands_computing_and_save_feedback(lab, browser):
    """#15 items 4 (help as tooltip and line; alternatives say so) and 14 (computing…, unchanged-kept, links)."""
    url, root = lab
    shots = _shots()
    _fresh_records(root)
    case = root / "workbooks" / "demo_site" / "cases" / "LD-01.toml"
    # More samples than the demo's, so that the "computing…" state lasts long enough to be seen.
    case.write_text(case.read_text().replace("samples = 2000", "samples = 8000"))
    page = _open_and_run_all(browser, url, "letdown.ipynb")
    _wait_text(page, ".steamcalc-results", "Overall", timeout=180_000)
    page.wait_for_selector(f"{PANEL} .steamcalc-save", timeout=180_000)

    # 4: the help sentence is the box's tooltip and its description line; alternatives say so.
    from steamcalc.calcs import get_calculation
    from steamcalc.calcs.base import input_fields

    helps = {f.name: f.metadata["help"] for f in input_fields(get_calculation("letdown").Inputs)}
    for field in ("inlet_temperature", "inlet_superheat", "inlet_dryness", "mass_flow"):
        box = page.locator(f"{PANEL} .steamcalc-input-{field} input").first
        label = page.locator(f"{PANEL} .steamcalc-label-{field} label.steamcalc-label").first
        assert box.get_attribute("title").startswith(helps[field]), field
        assert label.get_attribute("title") == box.get_attribute("title"), field
        assert helps[field] in _text(page, f".steamcalc-help-{field}"), field
    line = _text(page, ".steamcalc-help-inlet_superheat")
    assert "Alternatives: give one of Inlet temperature, Inlet superheat or Inlet dryness fraction" in line
    assert "filling one empties the others" in \
        page.locator(f"{PANEL} .steamcalc-input-inlet_superheat input").first.get_attribute("title")
    page.locator(f"{PANEL} .steamcalc-input-inlet_superheat input").first.hover()
    page.locator(f"{PANEL} .steamcalc-input-inlet_temperature").first.scroll_into_view_if_needed()
    page.screenshot(path=str(shots / "15-4-help-and-alternatives.png"))

    # 14: the bands button is disabled and says computing… while it runs.
    button = page.locator(f"{PANEL} .steamcalc-bands-button").first
    button.scroll_into_view_if_needed()
    # Watched from before the click: on a fast machine the bands can finish before a poll would see
    # "computing…" (a failure seen once); a mutation observer misses no state the page passed through.
    page.evaluate(
        """([buttonSel, noteSel]) => {
             window.__steamcalcSeen = {button: false, note: false};
             const look = () => {
               const b = document.querySelector(buttonSel), n = document.querySelector(noteSel);
               if (b && b.disabled && b.innerText.includes('computing')) window.__steamcalcSeen.button = true;
               if (n && n.innerText.includes('computing…')) window.__steamcalcSeen.note = true;
             };
             new MutationObserver(look).observe(document.body,
               {subtree: true, childList: true, attributes: true, characterData: true});
           }""", [f"{PANEL} .steamcalc-bands-button", f"{PANEL} .steamcalc-bands"])
    button.click()
    page.wait_for_function("() => window.__steamcalcSeen.button && window.__steamcalcSeen.note", timeout=180_000)
    page.screenshot(path=str(shots / "15-14-bands-computing.png"))
    _wait_text(page, ".steamcalc-bands", "coverage interval", timeout=180_000)
    page.wait_for_function("sel => { const b = document.querySelector(sel); return b && !b.disabled; }",
                           arg=f"{PANEL} .steamcalc-bands-button", timeout=30_000)
    assert "Compute bands" in button.inner_text()

    # 14: Run All saved nothing; the first press saves the record, the second finds it "unchanged, kept".
    save = page.locator(f"{PANEL} .steamcalc-save").first
    save.scroll_into_view_if_needed()
    save.click()
    # (an earlier test may have saved this revision already: either account is right, a refusal is not)
    page.wait_for_function(
        "sel => { const e = document.querySelector(sel);"
        " return e && (e.innerText.includes('New record saved') || e.innerText.includes('Unchanged, kept')); }",
        arg=f"{PANEL} .steamcalc-save-status", timeout=180_000)
    page.screenshot(path=str(shots / "15-14-save-first-press.png"))
    save.click()
    _wait_text(page, ".steamcalc-save-status", "Unchanged, kept")
    status = page.locator(f"{PANEL} .steamcalc-save-status").first
    assert "steamcalc-save-unchanged" in status.get_attribute("class")
    page.screenshot(path=str(shots / "15-14-save-unchanged.png"))

    # A new revision saves as new; its paths are links; the second press says unchanged, kept.
    revision = page.locator(f"{PANEL} .steamcalc-revision input").first
    revision.fill("C")
    revision.press("Enter")
    _type(page, "mass_flow", "5.0 t/h")
    _wait_text(page, ".steamcalc-results", "5,000")
    save.scroll_into_view_if_needed()
    save.click()
    _wait_text(page, ".steamcalc-save-status", "New record saved", timeout=180_000)
    assert "steamcalc-save-written" in status.get_attribute("class")
    links = page.locator(f"{PANEL} .steamcalc-save-status a.steamcalc-file-link")
    assert links.count() == 3
    href = links.nth(1).evaluate("a => a.href")
    assert href == f"{url}/lab/tree/workbooks/demo_site/records/LD-01_revC.html"
    assert (_records(root) / "LD-01_revC.html").exists()
    assert urllib.request.urlopen(href, timeout=30).status == 200
    written = status.inner_text()
    page.screenshot(path=str(shots / "15-14-save-new-with-links.png"))
    save.click()
    _wait_text(page, ".steamcalc-save-status", "Unchanged, kept")
    assert status.inner_text() != written and "steamcalc-save-unchanged" in status.get_attribute("class")
    page.screenshot(path=str(shots / "15-14-save-second-press.png"))
    no_widget_failures(page)
    page.close()


def _issue_review_records(root):
    """LD-01 rev B and rev C (flow raised 4.5 → 5.0 t/h), LD-02 rev B, an edited copy and a non-record file."""
    from steamcalc.cli import main

    _fresh_records(root)
    cases = root / "workbooks" / "demo_site" / "cases"
    text = (cases / "LD-01.toml").read_text()
    (cases / "LD-01C.toml").write_text(text.replace('revision = "B"', 'revision = "C"')
                                       .replace('mass_flow = "4.5 t/h"', 'mass_flow = "5.0 t/h"'))
    records = _records(root)
    assert main(["run", str(cases / "LD-01.toml"), str(cases / "LD-01C.toml"), str(cases / "LD-02.toml"),
                 "--out", str(records)]) in (0, 1)
    edited = json.loads((records / "LD-01_revB.json").read_text())
    edited["results"]["outlet_temperature"]["value"] += 1.0
    (records / "LD-01_revB_edited.json").write_text(json.dumps(edited))
    (records / "notes.json").write_text('{"note": "meeting notes, not a record"}')


def _pick(page, name):
    picker = page.locator(f"{PANEL} .steamcalc-record-picker select").first
    picker.scroll_into_view_if_needed()
    picker.select_option(label=name)


def test_review_compare_non_record_file_and_failed_verdict(lab, browser):
    """#15 items 1 (compare with earlier revisions only, old → picked) and 14 (non-record file, FAILED style)."""
    url, root = lab
    shots = _shots()
    _issue_review_records(root)
    page = _open_and_run_all(browser, url, "review.ipynb")
    _wait_text(page, ".steamcalc-review-table", "VERIFIED", timeout=180_000)
    compare = page.locator(f"{PANEL} .steamcalc-compare-with select").first
    page.wait_for_selector(f"{PANEL} .steamcalc-compare-with select", timeout=60_000)
    # rev B: nothing earlier, and never itself.
    _wait_text(page, ".steamcalc-comparison", "No earlier revision of LD-01")
    assert "No differences" not in _text(page, ".steamcalc-comparison")

    # 1: pick rev C — the list is rebuilt: the earlier rev B files only; the comparison runs B → C.
    _pick(page, "LD-01_revC.json")
    _wait_text(page, ".steamcalc-review-table", "LD-01 rev C")
    _wait_text(page, ".steamcalc-comparison", "rev B → rev C")
    options = [o.replace("\xa0", " ") for o in compare.locator("option").all_inner_texts()]  # a Dropdown writes nbsp
    assert [o.split("(")[0].strip() for o in options if o.startswith("LD-01")] == ["LD-01 rev B", "LD-01 rev B"]
    assert not any("rev C" in o or "LD-02" in o for o in options), options
    assert "LD-01_revB.json" in compare.evaluate("s => s.options[s.selectedIndex].text").replace("\xa0", " ")
    row = page.locator(f"{PANEL} .steamcalc-comparison tr", has_text="Steam flow").first
    cells = [c.split("\n")[0].strip() for c in row.locator("td").all_inner_texts()]
    assert cells[1:6] == ["Steam flow", "4,500", "5,000", "kg/h", "+500"], cells   # an increase shows as positive
    compare.evaluate("e => e.scrollIntoView({block: 'start'})")
    page.screenshot(path=str(shots / "15-1-compare.png"))
    _pick(page, "LD-02_revB.json")
    _wait_text(page, ".steamcalc-comparison", "No earlier revision of LD-02")
    assert not any("LD-01" in o for o in compare.locator("option").all_inner_texts())

    # 14: a file that is no record says why it cannot be read; the shown record stays.
    _pick(page, "notes.json")
    _wait_text(page, ".steamcalc-pick-status", "cannot be reviewed")
    said = _text(page, ".steamcalc-pick-status")
    assert "notes.json cannot be reviewed" in said and "not a steamcalc record" in said
    assert "still showing LD-02_revB.json" in said
    page.screenshot(path=str(shots / "15-14-non-record-file.png"))

    # 14: an edited record — its verdict FAILED is styled as a failure.
    _pick(page, "LD-01_revB_edited.json")
    _wait_text(page, ".steamcalc-review-table", "verdict: FAILED")
    verdict = page.locator(f"{PANEL} .steamcalc-verdict-failed").first
    assert "FAILED" in verdict.inner_text()
    assert page.evaluate("e => getComputedStyle(e).backgroundColor", verdict.element_handle()) == "rgb(163, 32, 27)"
    assert page.locator(f"{PANEL} .steamcalc-verdict-verified").count() == 0
    assert "verdict: FAILED" in _text(page, ".steamcalc-review-summary")    # the summary at the top follows
    verdict.scroll_into_view_if_needed()
    page.screenshot(path=str(shots / "15-14-verdict-failed.png"))
    no_widget_failures(page)
    page.close()
