"""What a user reads is in the trade's words and units: every rendered report of every demo case (SI
and US display) and the command line's run, verify, diff and register output are scanned for the
unit library's spellings (``**``, ``degC``, ``percent``, ``delta_degC``, ``dimensionless``, "°F
(difference)"), Python literals (True, False, None) and code keys in sentences.

Keys are allowed where a case-file author needs them and nowhere else (the allow-list):

* the small key column of the tables (``<td class="key"><code>…</code>`` in HTML, a code span in
  Markdown);
* equations and substituted numbers of the steps (``x_siz``, ``T_sat`` are symbols, not keys);
* the "as given" column, which quotes the user's own text;
* a key written as a line the author can paste into a TOML file (``fuel_basis = "gross"``);
* the verify table's key column (the last one) and the file names the CLI prints.
"""

import contextlib
import html
import io
import json
import re
import shutil
from pathlib import Path

import pytest

from steamcalc.cli import main

DEMO = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"

#: The unit library's spellings and Python literals that must never reach a reader.
FORBIDDEN = re.compile(r"\*\*|\bdeg[CF]\b|\bpercent\b|delta_deg|\bdimensionless\b|°F \(difference\)|"
                       r"\b(?:True|False|None)\b")
#: A code key: lower-case words joined by underscores (``outlet_temperature``), not followed by " = "
#: (a TOML line the author can paste is allowed).
KEY = re.compile(r"(?<![\w\\.\[])[a-z][a-z0-9]*(?:_[a-z0-9]+)+\b(?!\s*=)")


def _html_text(page):
    page = re.sub(r"<style>.*?</style>", " ", page, flags=re.S)
    page = re.sub(r'<td class="key"><code>.*?</code></td>', " ", page, flags=re.S)
    page = re.sub(r'<div class="eq">.*?</div>', " ", page, flags=re.S)
    page = re.sub(r"<code>steamcalc verify [^<]*</code>", " ", page)   # the command line to re-check
    return html.unescape(re.sub(r"<[^>]+>", " ", page))


def _markdown_text(text):
    text = re.sub(r"(`+) ?.*? ?\1", " ", text)                 # code spans: keys, equations, digests
    text = re.sub(r"\*\*(.+?)\*\*", r"\1", text)               # bold
    return text.replace("\\_", "_").replace("\\*", "*")


def _problems(text):
    found = [m for m in FORBIDDEN.finditer(text)] + [m for m in KEY.finditer(text)]
    return [text[max(0, m.start() - 50):m.end() + 15].replace("\n", " ") for m in found]


def _without_given(raw, record, suffix):
    # The engineer's own text (the "as given" cell) is quoted as written.
    from steamcalc.render.report import _md

    for entry in record.get("inputs", {}).values():
        given = str(entry.get("given"))
        cell = f"<td>{html.escape(given, quote=True).replace('&#x27;', '&#39;')}</td>" if suffix == ".html" \
            else f"| {_md(given)} |"
        raw = raw.replace(cell, "<td></td>" if suffix == ".html" else "| |")
    return raw


def test_the_scan_catches_what_it_should():
    assert _problems("outlet temperature 148.8 degC") and _problems("12 m**3/h") and _problems("5 percent")
    assert _problems("see valve_travel_normal for the travel") and _problems("choked: True")
    assert _problems("a °F (difference) of 18") and _problems("10 delta_degC")
    assert not _problems('write fuel_basis = "gross" in the site file; 148.8 °C, 12 m³/h, 5 %, yes')


@pytest.fixture(scope="module", params=["SI", "US"])
def demo(request, tmp_path_factory):
    """The demo site run in one display system: (records folder, what `run` printed)."""
    site = tmp_path_factory.mktemp(f"words_{request.param}") / "site"
    shutil.copytree(DEMO, site, ignore=shutil.ignore_patterns("records"))
    if request.param == "US":
        text = (site / "site.toml").read_text().replace('display_units = "SI"', 'display_units = "US"')
        (site / "site.toml").write_text(text)
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        main(["run", str(site / "cases"), "--quiet"])
    return site / "records", out.getvalue(), request.param


def test_every_report_is_in_the_trade_s_words(demo):
    records, _, system = demo
    reports = sorted(records.glob("*.html")) + sorted(records.glob("*.md"))
    reports = [p for p in reports if p.with_suffix(".json").exists()]
    assert len(reports) == 2 * len(list((DEMO / "cases").glob("*.toml")))
    for path in reports:
        record = json.loads(path.with_suffix(".json").read_text())
        raw = _without_given(path.read_text(), record, path.suffix)
        text = _html_text(raw) if path.suffix == ".html" else _markdown_text(raw)
        problems = _problems(text)
        assert not problems, (system, path.name, problems[:5])


def test_reports_name_each_input_and_result_in_words_with_the_key_beside_it(demo):
    records, _, _ = demo
    page = (records / "LD-01_revB.html").read_text()
    assert '<td>Inlet pressure</td>' in page and '<td class="key"><code>inlet_pressure</code></td>' in page
    assert '<td class="key"><code>valve_travel_normal</code></td>' in page
    markdown = (records / "FL-01_revB.md").read_text()
    assert "| Flash fraction (of the condensate) | 7.4 | % | `flash_fraction` |" in markdown


def test_the_run_output_is_in_words(demo):
    records, printed, system = demo
    lines = [line for line in printed.splitlines() if not line.strip().startswith(str(records.parent))]
    problems = _problems("\n".join(lines).replace(str(records.parent), " "))
    assert not problems, (system, problems[:5])


def test_verify_output_has_words_and_a_unit_column(demo, capsys):
    records, _, system = demo
    capsys.readouterr()
    assert main(["verify", "--all", str(records / "LD-01_revB.json"), str(records / "HX-01_revB.json")]) == 0
    printed = capsys.readouterr().out
    header = next(line for line in printed.splitlines() if line.strip().startswith("result"))
    assert re.search(r"\brecomputed\s+unit\b", header) and header.rstrip().endswith("key")
    row = next(line for line in printed.splitlines() if line.strip().startswith("Outlet temperature "))
    assert (" °F " if system == "US" else " °C ") in row and row.rstrip().endswith("outlet_temperature")
    # The key column (the last) is the allow-listed place for keys: cut it off, then scan.
    kept, key_at = [], None
    for line in printed.splitlines():
        if line.strip().startswith("result ") and line.rstrip().endswith("key"):
            key_at = line.rindex("key")
        if line.strip().startswith("(tolerance:"):
            key_at = None   # the table ends here
        if str(records) in line:
            continue
        kept.append(line[:key_at] if key_at is not None else line)
    body = "\n".join(kept)
    problems = _problems(body)
    assert not problems, (system, problems[:5])


def test_diff_and_register_output_are_in_words(demo, capsys, tmp_path):
    records, _, system = demo
    old = json.loads((records / "LD-01_revB.json").read_text())
    new = dict(old, revision="C", inputs=dict(old["inputs"]))
    new["inputs"]["mass_flow"] = dict(old["inputs"]["mass_flow"], value=5000.0, given="5 t/h")
    (tmp_path / "LD-01_revC.json").write_text(json.dumps(new))
    capsys.readouterr()
    main(["diff", str(records / "LD-01_revB.json"), str(tmp_path / "LD-01_revC.json")])
    printed = capsys.readouterr().out
    # The diff names each row by its section and key (the author's place); its units must be words.
    assert not FORBIDDEN.findall(printed), printed[:500]
    main(["register", str(records)])
    # The trust list used is named by its folder, whose name (trusted_signers/) is the site folder's own.
    printed = capsys.readouterr().out.replace("trusted_signers", "trusted-signers")
    problems = [p for p in _problems(printed) if str(records) not in p]
    assert not FORBIDDEN.findall(printed), printed[:500]
    assert not problems, (system, problems[:5])
