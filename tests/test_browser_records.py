"""The issued records as a reader sees them: each demo record's HTML, a diff and the register in Chromium.

No JupyterLab here: the pages are plain files opened in the browser. The screenshots under
tests/_artifacts/browser/records/ show the units, numbers, charts and sketch a checker reads; the
assertions are on what the page shows (no traceback, no script, the figures present).
"""

import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main
from tests.browser_support import ARTIFACTS, browser  # noqa: F401

ROOT = Path(__file__).resolve().parent.parent
SHOTS = ARTIFACTS / "records"


@pytest.fixture(scope="module")
def issued(tmp_path_factory):
    """The demo site copied and every case run, plus LD-01 rev C with a larger normal flow (5.0 t/h) and its diff."""
    site = tmp_path_factory.mktemp("records") / "site"
    shutil.copytree(ROOT / "workbooks" / "demo_site", site, ignore=shutil.ignore_patterns("records"))
    assert main(["run", str(site / "cases")]) in (0, 1)
    case = (site / "cases" / "LD-01.toml").read_text()
    (site / "revisions").mkdir()
    revised = site / "revisions" / "LD-01.toml"
    revised.write_text(case.replace('revision = "B"', 'revision = "C"', 1).replace("4.5 t/h", "5.0 t/h", 1))
    assert main(["run", str(revised)]) in (0, 1)
    records = site / "records"
    assert main(["diff", str(records / "LD-01_revB.json"), str(records / "LD-01_revC.json"),
                 "--html", str(records / "LD-01_A-to-B.html")]) in (0, 1)
    assert main(["register", str(site), "--html", str(records / "register.html")]) in (0, 1)
    return records


@pytest.mark.parametrize("page_name", ["LD-01_revB.html", "FL-01_revB.html", "HX-01_revB.html",
                                       "LD-01_A-to-B.html", "register.html"])
def test_record_page_in_browser(issued, browser, page_name):  # noqa: F811
    path = issued / page_name
    assert path.exists(), f"{page_name} was not written"
    html = path.read_text()
    assert "<script" not in html.lower(), f"{page_name} carries a script; records stay script-free"
    SHOTS.mkdir(parents=True, exist_ok=True)
    page = browser.new_page(viewport={"width": 1200, "height": 1000})
    page.goto(path.as_uri())
    text = page.locator("body").inner_text()
    assert "Traceback" not in text and "internal error" not in text.lower()
    page.screenshot(path=str(SHOTS / page_name.replace(".html", ".png")), full_page=True)
    page.close()


def test_us_display_record_in_browser(tmp_path, browser):  # noqa: F811
    """The same let-down record with the site's display units set to US: °F, psi, lb/h, Cv, NPS."""
    site = tmp_path / "site"
    shutil.copytree(ROOT / "workbooks" / "demo_site", site, ignore=shutil.ignore_patterns("records"))
    site_file = site / "site.toml"
    site_file.write_text(site_file.read_text().replace('display_units = "SI"', 'display_units = "US"'))
    assert main(["run", str(site / "cases" / "LD-01.toml")]) in (0, 1)
    path = site / "records" / "LD-01_revB.html"
    SHOTS.mkdir(parents=True, exist_ok=True)
    page = browser.new_page(viewport={"width": 1200, "height": 1000})
    page.goto(path.as_uri())
    text = page.locator("body").inner_text()
    assert "°F" in text and "lb/h" in text
    page.screenshot(path=str(SHOTS / "LD-01_revB_US.png"), full_page=True)
    page.close()


def test_command_line_text_a_checker_reads(issued, capsys):
    """The verify table (with its unit column) and each sub-command's help, kept as text beside the screenshots."""
    out = ARTIFACTS.parent / "cli"
    out.mkdir(parents=True, exist_ok=True)
    capsys.readouterr()
    assert main(["verify", str(issued / "LD-01_revB.json")]) == 0
    verified = capsys.readouterr().out
    assert "unit" in verified.splitlines()[next(i for i, line in enumerate(verified.splitlines())
                                                if line.strip().startswith("result"))]
    (out / "verify-LD-01.txt").write_text(verified)
    helps = []
    for command in (["run"], ["verify"], ["diff"], ["sign"], ["keys", "new"], ["register"], ["new-site"]):
        with pytest.raises(SystemExit):
            main([*command, "--help"])
        text = capsys.readouterr().out
        assert "Exit codes" in text and "Example" in text, command
        helps.append(f"$ steamcalc {' '.join(command)} --help\n{text}")
    (out / "help.txt").write_text("\n".join(helps))
