"""What a user waits for, in a real browser: the progress line of Run All, results on Enter, the new kinds' workbooks.

Each workbook is opened in JupyterLab (Chromium, Playwright) and Run All pressed: while its first cell computes a
progress line says what is being done, and afterwards how long it took ("LD-01 computed in 1.2 s"). The time
is shown, never asserted (a busy CI machine). Screenshots go to tests/_artifacts/browser/waiting/.
"""

import pytest

from tests.browser_support import (  # noqa: F401 (browser and lab are fixtures)
    ARTIFACTS, PANEL, _open_and_run_all, _results_text, browser, lab, no_widget_failures)

SHOTS = ARTIFACTS / "waiting"
FORM_WORKBOOKS = {"letdown.ipynb": "LD-01", "flash_recovery.ipynb": "FL-01", "exchanger_duty.ipynb": "HX-01",
                  "steam_main.ipynb": "SM-01"}


@pytest.mark.parametrize("notebook", list(FORM_WORKBOOKS))
def test_run_all_shows_a_progress_line_then_what_it_took(lab, browser, notebook):
    url, _ = lab
    SHOTS.mkdir(parents=True, exist_ok=True)
    case = FORM_WORKBOOKS[notebook]
    page = _open_and_run_all(browser, url, notebook)
    page.wait_for_function(
        "([sel, words]) => { const e = document.querySelector(sel); return e && e.innerText.includes(words); }",
        arg=[f"{PANEL} .steamcalc-progress", f"{case} computed in"])
    line = page.locator(f"{PANEL} .steamcalc-progress").first
    line.scroll_into_view_if_needed()
    page.screenshot(path=str(SHOTS / f"{notebook[:-6]}-progress-done.png"))
    assert " s" in line.inner_text()
    page.wait_for_selector(f"{PANEL} .steamcalc-results")
    no_widget_failures(page)
    page.close()


def test_enter_updates_the_results(lab, browser):
    url, _ = lab
    SHOTS.mkdir(parents=True, exist_ok=True)
    page = _open_and_run_all(browser, url, "letdown.ipynb")
    page.wait_for_function(f"document.querySelector('{PANEL} .steamcalc-results') && "
                           f"document.querySelector('{PANEL} .steamcalc-results').innerText.includes('Overall')")
    before = _results_text(page)
    box = page.locator(f"{PANEL} .steamcalc-input-mass_flow input").first
    box.scroll_into_view_if_needed()
    box.fill("4.8 t/h")
    box.press("Enter")
    page.wait_for_function(
        f"(before) => document.querySelector('{PANEL} .steamcalc-results').innerText !== before", arg=before)
    assert "4,800" in _results_text(page)
    page.locator(f"{PANEL} .steamcalc-results").first.screenshot(path=str(SHOTS / "letdown-after-enter.png"))
    no_widget_failures(page)
    page.close()


def test_the_site_balance_workbook_opens_on_a_fresh_site(lab, browser):
    # No records yet (the lab copies the workbooks without them): the linked ones are issued first.
    url, root = lab
    SHOTS.mkdir(parents=True, exist_ok=True)
    page = _open_and_run_all(browser, url, "site_balance.ipynb")
    page.wait_for_function(
        "() => document.body.innerText.includes('SB-01 rev A: WARN')")
    page.wait_for_selector(f"{PANEL} .js-plotly-plot")
    page.locator(f"{PANEL} .js-plotly-plot").first.scroll_into_view_if_needed()
    page.screenshot(path=str(SHOTS / "site-balance-sankey.png"))
    assert (root / "workbooks" / "demo_site" / "records" / "LD-01_revB.json").exists()
    no_widget_failures(page)
    page.close()
