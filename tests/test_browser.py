"""The workbooks in a real browser: JupyterLab on 127.0.0.1, driven by Playwright in Chromium.

Needs the system Chromium (/usr/bin/chromium; on Debian ``apt-get install -y chromium``) and the
Python package playwright (in the test extra). Without them these tests skip with that message,
except under CI (CI=true), where they must run. Screenshots go to tests/_artifacts/browser/.
"""

import os
import shutil
import socket
import subprocess
import sys
import time
import urllib.request
from pathlib import Path

import pytest

CHROMIUM = os.environ.get("STEAMCALC_CHROMIUM", "/usr/bin/chromium")
ROOT = Path(__file__).resolve().parent.parent
ARTIFACTS = ROOT / "tests" / "_artifacts" / "browser"
WORKBOOKS = {"letdown.ipynb": ("mass_flow", "5.5 t/h", "LD-01_revB.json"),
             "flash_recovery.ipynb": ("condensate_flow", "4.0 t/h", "FL-01_revB.json"),
             "exchanger_duty.ipynb": ("process_flow", "10 t/h", "HX-01_revB.json")}


def _missing():
    try:
        import playwright.sync_api  # noqa: F401
    except ImportError:
        return "the Python package playwright is not installed (pip install '.[test]')"
    if not Path(CHROMIUM).exists():
        return f"no Chromium at {CHROMIUM} (apt-get install -y chromium, or set STEAMCALC_CHROMIUM)"
    return None


def _free_port():
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return s.getsockname()[1]


@pytest.fixture(scope="module")
def lab(tmp_path_factory):
    reason = _missing()
    if reason:
        if os.environ.get("CI") == "true":
            pytest.fail(f"browser tests must run under CI: {reason}")
        pytest.skip(f"browser tests skipped: {reason}")
    root = tmp_path_factory.mktemp("lab")
    shutil.copytree(ROOT / "workbooks", root / "workbooks", ignore=shutil.ignore_patterns("records", ".ipynb_*"))
    # Render every cell (no virtual scrolling) so widgets are in the page; no news pop-up.
    settings = root / "settings" / "@jupyterlab"
    (settings / "notebook-extension").mkdir(parents=True)
    (settings / "notebook-extension" / "tracker.jupyterlab-settings").write_text('{"windowingMode": "none"}')
    (settings / "apputils-extension").mkdir(parents=True)
    (settings / "apputils-extension" / "notification.jupyterlab-settings").write_text(
        '{"fetchNews": "false", "checkForUpdates": false}')
    port = _free_port()
    log = (root / "lab.log").open("w")
    server = subprocess.Popen(
        [sys.executable, "-m", "jupyter", "lab", "--no-browser", "--allow-root", f"--port={port}", "--ip=127.0.0.1",
         "--IdentityProvider.token=", "--ServerApp.password=", "--ServerApp.disable_check_xsrf=True",
         f"--ServerApp.root_dir={root}", "--LabApp.news_url=", "--LabApp.expose_app_in_browser=True"],
        stdout=log, stderr=subprocess.STDOUT, cwd=root, env={**os.environ, "JUPYTER_CONFIG_DIR": str(root / "cfg"),
             "JUPYTERLAB_SETTINGS_DIR": str(root / "settings")},
    )
    url = f"http://127.0.0.1:{port}"
    deadline = time.monotonic() + 90
    while time.monotonic() < deadline and server.poll() is None:
        try:
            urllib.request.urlopen(f"{url}/api/status", timeout=2)
            break
        except OSError:
            time.sleep(0.5)
    else:
        server.terminate()
        pytest.fail("JupyterLab did not start: " + (root / "lab.log").read_text()[-2000:])
    yield url, root
    server.terminate()
    try:
        server.wait(timeout=20)
    except subprocess.TimeoutExpired:
        server.kill()


@pytest.fixture(scope="module")
def browser():
    from playwright.sync_api import sync_playwright

    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=CHROMIUM, headless=True, args=[
            "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
            "--disable-background-networking", "--disable-component-update", "--disable-sync"])
        yield b
        b.close()


PANEL = ".jp-NotebookPanel:not(.lm-mod-hidden)"


def _open_and_run_all(browser, url, notebook):
    """Open a workbook in a fresh workspace, wait for its kernel, and run all cells."""
    page = browser.new_page(viewport={"width": 1400, "height": 1000})
    page.goto(f"{url}/lab/tree/workbooks/{notebook}?reset", timeout=90_000)
    page.wait_for_selector(".jp-NotebookPanel", timeout=90_000)
    page.wait_for_function(
        "() => { const w = window.jupyterapp && window.jupyterapp.shell.currentWidget;"
        " const k = w && w.sessionContext && w.sessionContext.session && w.sessionContext.session.kernel;"
        " return k && k.status === 'idle'; }", timeout=90_000)
    page.evaluate("window.jupyterapp.commands.execute('notebook:run-all-cells')")
    return page


def _results_text(page):
    return page.locator(f"{PANEL} .steamcalc-results").first.inner_text()


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
    revision.fill("B")
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
    body = page.locator("body").inner_text()
    assert "Error displaying widget" not in body
    assert "Traceback" not in body
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
    name = page.locator(f"{PANEL} .widget-text input").last
    name.fill("C. Checker")
    name.press("Enter")
    page.get_by_role("button", name="Sign as checked").click()
    page.wait_for_function(
        f"document.querySelector('{PANEL} .steamcalc-sign-status').innerText.includes('signed by C. Checker')",
        timeout=60_000)
    page.screenshot(path=str(shots / "2-after-sign.png"), full_page=True)
    body = page.locator("body").inner_text()
    assert "Error displaying widget" not in body and "Traceback" not in body
    import json
    record = json.loads((root / "workbooks" / "demo_site" / "records" / "LD-01_revA.json").read_text())
    assert record["checked_by"] == "C. Checker"
    page.close()
