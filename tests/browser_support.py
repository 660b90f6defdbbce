"""Shared set-up of the browser tests: JupyterLab on 127.0.0.1 over a copy of workbooks/, Chromium via Playwright.

Import the fixtures into a test module (``from tests.browser_support import lab, browser``) so that
module gets its own JupyterLab server.

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


#: Each running lab's folder by its address, so that a failure's message can quote the lab's log.
LAB_ROOTS = {}

#: Run in the page before JupyterLab starts: keeps what the kernel's connection went through (connecting,
#: connected, disconnected; busy, idle, restarting) and counts the widget messages it carried, so that a widget
#: that never displays can be told from a connection that dropped under it. It also marks when the notebook's
#: widget manager has asked the kernel for the widgets it already holds (its first restore: a comm_info reply, or
#: the widget states, for a kernel that has imported ipywidgets): Run All waits for that, so that the cells' new
#: widgets never arrive while the manager is still taking in that answer.
KERNEL_WATCH = """
window.steamcalcKernel = {events: [], comm_open: 0, comm_close: 0, display: 0, widgets_restored: false};
(function hook() {
  try {
    const app = window.jupyterapp; const w = app && app.shell.currentWidget;
    const k = w && w.sessionContext && w.sessionContext.session && w.sessionContext.session.kernel;
    if (k && k.steamcalcWatched) return;
    if (k) {
      k.steamcalcWatched = true;
      const seen = window.steamcalcKernel; const at = () => Math.round(performance.now());
      k.connectionStatusChanged.connect((_, s) => seen.events.push(`${at()} ms connection ${s}`));
      k.statusChanged.connect((_, s) => {
        if (s !== 'busy' && s !== 'idle') seen.events.push(`${at()} ms kernel ${s}`); });
      k.anyMessage.connect((_, a) => { const t = a.msg.header.msg_type;
        if (a.direction === 'recv' && t === 'comm_open') seen.comm_open++;
        if (t === 'comm_close') { seen.comm_close++; seen.events.push(`${at()} ms comm_close ${a.direction}`); }
        if (a.direction === 'recv' && t === 'display_data') seen.display++;
        if (t === 'comm_info_request' || t === 'comm_info_reply') seen.events.push(`${at()} ms ${t}`);
        const method = a.msg.content && a.msg.content.data && a.msg.content.data.method;
        if (a.direction === 'recv' && (t === 'comm_info_reply' || (t === 'comm_msg' && method === 'update_states'))) {
          seen.widgets_restored = true; } });
    }
  } catch (e) {}
  setTimeout(hook, 5);
})();
"""


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
    LAB_ROOTS[url] = root
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
#: How long any one wait of a browser page may take (a bound on a hang, never a measure of speed).
PAGE_TIMEOUT_MS = 180_000


def _open_and_run_all(browser, url, notebook):
    """Open a workbook in a fresh workspace, wait for its kernel, and run all cells."""
    page = browser.new_page(viewport={"width": 1400, "height": 1000})
    # Every wait of the page as long as the longest a loaded 2-core CI machine needs: playwright's own 30 s
    # for a locator ran out once while the kernel computed the bands and the suite ran beside it.
    page.set_default_timeout(PAGE_TIMEOUT_MS)
    watch_console(page)
    page.add_init_script(KERNEL_WATCH)
    page.goto(f"{url}/lab/tree/workbooks/{notebook}?reset", timeout=90_000)
    page.wait_for_selector(".jp-NotebookPanel", timeout=90_000)
    page.wait_for_function(
        "() => { const w = window.jupyterapp && window.jupyterapp.shell.currentWidget;"
        " const k = w && w.sessionContext && w.sessionContext.session && w.sessionContext.session.kernel;"
        " return k && k.status === 'idle'; }", timeout=90_000)
    # The widget manager's first restore answered (KERNEL_WATCH), then Run All: an event, not a pause.
    try:
        page.wait_for_function("() => window.steamcalcKernel && window.steamcalcKernel.widgets_restored",
                               timeout=90_000)
    except Exception as error:
        raise AssertionError(f"the notebook's widget manager never asked the kernel for its widgets "
                             f"({type(error).__name__}); " + page_state(page)) from None
    page.evaluate("window.jupyterapp.commands.execute('notebook:run-all-cells')")
    return page


def watch_console(page):
    """Keep the page's console errors and warnings (and uncaught errors) for a failure's message: a widget that
    does not display says why only there."""
    seen = []
    page.on("console", lambda m: seen.append(f"{m.type}: {m.text[:600]}") if m.type in ("error", "warning") else None)
    page.on("pageerror", lambda e: seen.append(f"uncaught: {str(e)[:600]}"))
    page.steamcalc_console = seen
    return seen


def console_text(page):
    """The last console errors and warnings of a page watched by :func:`watch_console`."""
    seen = getattr(page, "steamcalc_console", None)
    if seen is None:
        return "console: not watched"
    if not seen:
        return "console: nothing"
    # The first messages say what went wrong first; the last what the page ended with.
    shown = seen if len(seen) <= 12 else seen[:6] + [f"... {len(seen) - 12} more ..."] + seen[-6:]
    return "console: " + " | ".join(shown)


def no_widget_failures(page, root=None):
    """Assert the page shows no traceback and no widget that failed to display; the message says what the page
    and its console showed."""
    body = page.locator("body").inner_text()
    assert "Traceback" not in body and "Error displaying widget" not in body, page_state(page, root)


def _results_text(page):
    return page.locator(f"{PANEL} .steamcalc-results").first.inner_text()


def page_state(page, root=None):
    """What the page shows when a wait ran out, for the failure message: JupyterLab's open tabs and which is in
    front, the kernel's status, how many steamcalc boxes are in the whole page and in the notebook in front,
    any widget that failed to display, and the end of the JupyterLab server's log."""
    try:
        state = page.evaluate(
            "() => { const app = window.jupyterapp; const shell = app && app.shell;"
            " const current = shell && shell.currentWidget;"
            " const kernel = current && current.sessionContext && current.sessionContext.session"
            "   && current.sessionContext.session.kernel;"
            " const tabs = shell ? Array.from(shell.widgets('main')).map(w => w.title.label) : [];"
            " return {tabs, current: current ? current.title.label : null,"
            "  kernel: kernel ? kernel.status : 'none',"
            "  boxes_in_page: document.querySelectorAll('.steamcalc-input').length,"
            f"  boxes_in_front: document.querySelectorAll('{PANEL} .steamcalc-input').length,"
            "  widget_errors: Array.from(document.querySelectorAll('.jp-OutputArea-output'))"
            "    .filter(o => o.innerText.includes('Error displaying widget')).length,"
            "  widgets_loading: Array.from(document.querySelectorAll('.jp-OutputArea-output'))"
            "    .filter(o => o.innerText.trim() === 'Loading widget...').length,"
            "  kernel_watch: window.steamcalcKernel || null}; }")
    except Exception as error:   # the page itself may be gone: say so rather than hide the first failure
        state = {"page": f"could not be read ({type(error).__name__}: {error})"}
    log = ""
    if root is None:
        root = next((folder for address, folder in LAB_ROOTS.items() if page.url.startswith(address)), None)
    if root is not None and (Path(root) / "lab.log").exists():
        log = (Path(root) / "lab.log").read_text(errors="replace")[-1500:]
    return f"page state: {state}; {console_text(page)}; end of the JupyterLab log:\n{log}"


def wait_in_front(page, selector, root=None, shot=None, timeout=None):
    """Wait for ``selector`` to be in the page; when the wait runs out, an AssertionError that says what the page
    showed instead (and a screenshot at ``shot``), not playwright's bare timeout."""
    try:
        page.wait_for_selector(selector, state="attached", **({"timeout": timeout} if timeout else {}))
    except Exception as error:
        if shot is not None:
            try:
                page.screenshot(path=str(shot), full_page=True)
            except Exception:
                pass
        raise AssertionError(f"{selector} did not appear ({type(error).__name__}); "
                             + page_state(page, root)) from None


def scroll_to_cell(page, source):
    """Bring the first cell of the notebook in front whose source holds ``source`` into view. JupyterLab may keep a
    cell far out of view out of the page (its windowed notebook), whatever the setting says: a run here found the
    form's boxes gone from the page, none in it at all, after the sketch below them was scrolled into view."""
    page.evaluate(
        "async (text) => { const panel = window.jupyterapp.shell.currentWidget; const nb = panel && panel.content;"
        " if (!nb) return; const i = nb.widgets.findIndex(c => c.model.sharedModel.getSource().includes(text));"
        " if (i >= 0 && nb.scrollToItem) { await nb.scrollToItem(i, 'start'); } }", source)


def wait_for_box(page, name, root=None, shot=None):
    """The input box ``name`` of the notebook in front, once it is in the page (see :func:`wait_in_front`); its
    form's cell is brought into view first (:func:`scroll_to_cell`)."""
    selector = f"{PANEL} .steamcalc-input-{name} input"
    scroll_to_cell(page, "form_view()")
    wait_in_front(page, selector, root, shot)
    box = page.locator(selector).first
    box.scroll_into_view_if_needed()
    return box
