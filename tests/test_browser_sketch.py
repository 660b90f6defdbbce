"""In the browser: the record's charts (HTML opened in Chromium), the process sketch in the workbook
(its numbers are the saved record's), and the "Save case file" button (a new file; a second save of
other inputs under the same revision does not overwrite it). Screenshots: tests/_artifacts/browser/sketch/."""

import json
import tomllib


from steamcalc.render.display import display_record
from tests.browser_support import (  # noqa: F401 (browser and lab are fixtures)
    ARTIFACTS, PANEL, _open_and_run_all, browser, lab, no_widget_failures, wait_for_box, wait_in_front)

SHOTS = ARTIFACTS / "sketch"


def _wait_for_record(page, path):
    """Press Save record (Run All in an open session saves nothing by itself) and read the record it wrote."""
    page.wait_for_function(f"document.querySelector('{PANEL} .steamcalc-save') !== null", timeout=90_000)
    save = page.locator(f"{PANEL} .steamcalc-save").first
    save.scroll_into_view_if_needed()
    save.click()
    for _ in range(360):
        if path.exists():
            return json.loads(path.read_text(encoding="utf-8"))
        page.wait_for_timeout(500)
    raise AssertionError(f"Save record did not write {path}")


def _sketch_readings(page):
    texts = page.locator(f"{PANEL} .steamcalc-sketch-view text.reading")
    return {texts.nth(i).get_attribute("data-key"): texts.nth(i).text_content() for i in range(texts.count())}


def test_sketch_in_the_workbook_shows_the_records_numbers(lab, browser):
    url, root = lab
    SHOTS.mkdir(parents=True, exist_ok=True)
    page = _open_and_run_all(browser, url, "letdown.ipynb")
    # Run All in a kernel just started: on a busy machine this once took more than 120 s (a wait, not a measure).
    wait_in_front(page, f"{PANEL} .steamcalc-sketch-view svg", root, SHOTS / "15-10-no-sketch.png", timeout=300_000)
    record = _wait_for_record(page, root / "workbooks" / "demo_site" / "records" / "LD-01_revB.json")
    shown = display_record(record)
    sketch = page.locator(f"{PANEL} .steamcalc-sketch-view").first
    sketch.scroll_into_view_if_needed()
    readings = _sketch_readings(page)
    assert {"inputs.inlet_pressure", "results.throttled_temperature", "results.outlet_temperature",
            "results.spray_water_flow", "results.outlet_mass_flow"} <= set(readings)
    for key, text in readings.items():
        section, name = key.split(".", 1)
        assert text.split(" ")[0] == shown[section][name]["shown"], (key, text)
    assert readings["inputs.inlet_pressure"] == "16.99 bar(a) · 16 bar(g)"
    sketch.screenshot(path=str(SHOTS / "15-10-sketch.png"))

    # The sketch follows an input change, as the results do.
    box = wait_for_box(page, "mass_flow", root, shot=SHOTS / "15-10-no-mass-flow-box.png")
    box.fill("5.0 t/h")
    box.press("Enter")
    page.wait_for_function(
        f"() => [...document.querySelectorAll('{PANEL} .steamcalc-sketch-view text.reading')]"
        ".some(t => t.getAttribute('data-key') === 'results.inlet_mass_flow' && t.textContent === '5,000 kg/h')",
        timeout=30_000)
    sketch.screenshot(path=str(SHOTS / "15-10-sketch-after-change.png"))
    no_widget_failures(page, root)

    # Item 9: the record's HTML, as issued by the run, opened in the same browser (no server, no scripts).
    html_path = root / "workbooks" / "demo_site" / "records" / "LD-01_revB.html"
    report = browser.new_page(viewport={"width": 1100, "height": 1400})
    report.goto(html_path.as_uri())
    assert report.evaluate("document.scripts.length") == 0
    assert report.locator("svg").count() == 4                       # the sketch and three charts
    heading = report.locator("h2", has_text="Process sketch and charts")
    heading.scroll_into_view_if_needed()
    top = heading.bounding_box()["y"] + report.evaluate("window.scrollY")
    report.screenshot(path=str(SHOTS / "15-9-record-charts.png"), full_page=True,
                      clip={"x": 0, "y": top - 10, "width": 1100, "height": 2600})
    report.close()
    page.close()


def test_save_case_button_writes_a_new_file_and_never_overwrites(lab, browser):
    url, root = lab
    SHOTS.mkdir(parents=True, exist_ok=True)
    cases = root / "workbooks" / "demo_site" / "cases"
    original = (cases / "FL-01.toml").read_bytes()
    page = _open_and_run_all(browser, url, "flash_recovery.ipynb")
    page.wait_for_selector(f"{PANEL} .steamcalc-save-case", timeout=120_000)
    status = f"{PANEL} .steamcalc-save-case-status"

    def save_case_and_wait(previous):
        button = page.locator(f"{PANEL} .steamcalc-save-case").first
        button.scroll_into_view_if_needed()
        button.click()
        page.wait_for_function(f"(p) => document.querySelector('{status}').innerText.trim() !== p",
                               arg=previous, timeout=30_000)
        return page.locator(status).first.inner_text()

    # Raise the revision and change an input: the case is saved as a new file, FL-01_revC.toml.
    revision = page.locator(f"{PANEL} .steamcalc-revision input").first
    revision.fill("C")
    revision.press("Enter")
    box = page.locator(f"{PANEL} .steamcalc-input-condensate_flow input").first
    box.fill("3.6 t/h")
    box.press("Enter")
    page.wait_for_timeout(1500)
    first = save_case_and_wait("")
    assert "case file saved" in first and "FL-01_revC.toml" in first and "new file" in first
    cell = page.locator(f"{PANEL} .jp-Cell", has=page.locator(".steamcalc-save-case")).first
    cell.screenshot(path=str(SHOTS / "15-11-save-case-new-file.png"))
    written = cases / "FL-01_revC.toml"
    saved_text = written.read_text(encoding="utf-8")
    assert tomllib.loads(saved_text)["inputs"]["condensate_flow"] == "3.6 t/h"
    assert tomllib.loads(saved_text)["case"]["revision"] == "C"

    # Other inputs under the same revision: refused, nothing overwritten, the next revision offered.
    box.fill("3.9 t/h")
    box.press("Enter")
    page.wait_for_timeout(1500)
    second = save_case_and_wait(first)
    assert second.startswith("not saved") and "not overwritten" in second and "FL-01_revD.toml" in second
    assert written.read_text(encoding="utf-8") == saved_text
    assert (cases / "FL-01.toml").read_bytes() == original
    offer = page.locator(f"{PANEL} .steamcalc-save-case-next").first
    # The offer is sent before the account above (steamcalc/ui/save_case.py); waited for all the same, as a
    # browser may draw two changes in one frame or the next.
    offer.wait_for(state="visible", timeout=30_000)
    assert "revision D" in offer.inner_text()
    cell.screenshot(path=str(SHOTS / "15-11-save-case.png"))

    # Taking the offer raises the Revision box to D and saves FL-01_revD.toml.
    offer.click()
    page.wait_for_function(f"() => document.querySelector('{status}').innerText.includes('case file saved')",
                           timeout=30_000)
    assert "FL-01_revD.toml" in page.locator(status).first.inner_text()
    assert tomllib.loads((cases / "FL-01_revD.toml").read_text(encoding="utf-8"))["inputs"]["condensate_flow"] == "3.9 t/h"
    assert page.locator(f"{PANEL} .steamcalc-revision input").first.input_value() == "D"
    cell.screenshot(path=str(SHOTS / "15-11-save-case-next-revision.png"))
    no_widget_failures(page, root)
    page.close()
