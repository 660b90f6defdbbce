"""The workbooks in a real browser: JupyterLab on 127.0.0.1, driven by Playwright in Chromium.

Needs the system Chromium (/usr/bin/chromium; on Debian ``apt-get install -y chromium``) and the
Python package playwright (in the test extra). Without them these tests skip with that message,
except under CI (CI=true), where they must run. Screenshots go to tests/_artifacts/browser/.
"""

import pytest

from tests.browser_support import (  # noqa: F401 (browser and lab are fixtures)
    ARTIFACTS, PANEL, _open_and_run_all, _results_text, browser, lab, no_widget_failures)

WORKBOOKS = {"letdown.ipynb": ("mass_flow", "5.5 t/h", "LD-01_revC.json"),
             "flash_recovery.ipynb": ("condensate_flow", "4.0 t/h", "FL-01_revC.json"),
             "exchanger_duty.ipynb": ("process_flow", "10 t/h", "HX-01_revC.json")}


@pytest.mark.parametrize("notebook", list(WORKBOOKS))
def test_workbook_in_browser(lab, browser, notebook):
    url, root = lab
    field, new_value, record_name = WORKBOOKS[notebook]
    shots = ARTIFACTS / notebook.replace(".ipynb", "")
    shots.mkdir(parents=True, exist_ok=True)
    page = _open_and_run_all(browser, url, notebook)
    try:
        page.wait_for_selector(f"{PANEL} .steamcalc-results", timeout=90_000)
    except Exception:
        page.screenshot(path=str(shots / "0-no-results.png"), full_page=True)
        raise
    page.wait_for_function(f"document.querySelector('{PANEL} .steamcalc-results').innerText.includes('Overall')",
                           timeout=60_000)
    page.wait_for_selector(f"{PANEL} .steamcalc-save", timeout=60_000)
    before = _results_text(page)
    page.screenshot(path=str(shots / "1-after-run-all.png"), full_page=True)
    chart = page.locator(f"{PANEL} .steamcalc-chart").first
    chart.scroll_into_view_if_needed()
    page.wait_for_selector(f"{PANEL} .steamcalc-chart .js-plotly-plot", timeout=30_000)
    chart.screenshot(path=str(shots / "1-chart.png"))

    # Raise the revision first, so the changed inputs are a new record rather than a conflict.
    revision = page.locator(f"{PANEL} .steamcalc-revision input").first
    revision.fill("C")
    revision.press("Enter")
    box = page.locator(f"{PANEL} .steamcalc-input-{field} input").first
    box.fill(new_value)
    box.press("Enter")
    page.wait_for_function(
        f"(before) => document.querySelector('{PANEL} .steamcalc-results').innerText !== before", arg=before,
        timeout=30_000)
    assert _results_text(page) != before
    page.screenshot(path=str(shots / "2-after-input-change.png"), full_page=True)

    if notebook == "letdown.ipynb":
        bands = page.locator(f"{PANEL} .steamcalc-bands-button").first
        bands.scroll_into_view_if_needed()
        bands.click()
        page.wait_for_function(
            f"document.querySelector('{PANEL} .steamcalc-bands').innerText.includes('coverage interval')",
            timeout=60_000)
        page.wait_for_selector(f"{PANEL} .steamcalc-bands ~ * .js-plotly-plot, {PANEL} .js-plotly-plot", timeout=30_000)
        page.locator(f"{PANEL} .steamcalc-bands").first.screenshot(path=str(shots / "2b-bands.png"))
    save = page.locator(f"{PANEL} .steamcalc-save").first
    save.scroll_into_view_if_needed()
    save.click()
    page.wait_for_function(
        f"document.querySelector('{PANEL} .steamcalc-save-status') && "
        f"document.querySelector('{PANEL} .steamcalc-save-status').innerText.includes('saved')", timeout=30_000)
    page.screenshot(path=str(shots / "3-after-save.png"), full_page=True)
    no_widget_failures(page, root)
    record = root / "workbooks" / "demo_site" / "records" / record_name
    assert record.exists(), f"save did not write {record}"
    page.close()


def test_review_workbook_in_browser(lab, browser):
    url, root = lab
    shots = ARTIFACTS / "review"
    shots.mkdir(parents=True, exist_ok=True)
    page = _open_and_run_all(browser, url, "review.ipynb")
    page.wait_for_function(
        f"document.querySelector('{PANEL} .steamcalc-review-table') && "
        f"document.querySelector('{PANEL} .steamcalc-review-table').innerText.includes('VERIFIED')", timeout=120_000)
    page.screenshot(path=str(shots / "1-after-run-all.png"), full_page=True)
    # A record is signed with a key (a name alone is not offered): a key pair made for the test.
    import tempfile
    from pathlib import Path
    from steamcalc.cli import main
    keys = Path(tempfile.mkdtemp(prefix="steamcalc-browser-keys-"))
    assert main(["keys", "new", "--name", "C. Checker", "--out", str(keys)]) == 0
    key_file = page.get_by_placeholder("path to your private key file (.key)").last
    key_file.fill(str(keys / "c-checker.key"))
    key_file.press("Enter")
    page.get_by_role("button", name="Sign as checked").click()
    page.wait_for_function(
        f"document.querySelector('{PANEL} .steamcalc-sign-status').innerText.includes('signed by C. Checker')",
        timeout=60_000)
    page.screenshot(path=str(shots / "2-after-sign.png"), full_page=True)
    no_widget_failures(page, root)
    import json
    record = json.loads((root / "workbooks" / "demo_site" / "records" / "LD-01_revB.json").read_text())
    assert [s["name"] for s in record["signatures"]] == ["C. Checker"]
    page.close()
