"""Every pressure a user reads carries its basis: bar(a), bar(g) or "bar difference" — in the
HTML and Markdown records of every demo case, in the diff and in the workbook summary."""

import html
import re
import shutil

import pytest

from steamcalc.cli import main
from steamcalc.render.display import unit_label
from steamcalc.records.record import load_record
from steamcalc.review.signoff import diff_records

#: A pressure unit not followed by its basis. 'bar(a)', 'bar(g)', 'barg', 'bara', 'psia', 'psig',
#: 'kPa(a)' and 'bar difference' pass; 'bar', 'kPa', 'psi' alone do not.
BARE_PRESSURE = re.compile(r"\b(bar|psi|kPa|MPa)\b(?!\s*\((a|g)\))(?!\s*difference)")


def _bare_pressures(text):
    return [text[max(0, m.start() - 60):m.end() + 10] for m in BARE_PRESSURE.finditer(text)]


def _visible_text(page):
    return html.unescape(re.sub(r"<[^>]+>", " ", page))


@pytest.fixture(scope="module")
def demo_records(tmp_path_factory, request):
    from pathlib import Path
    site = tmp_path_factory.mktemp("basis") / "site"
    demo = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
    shutil.copytree(demo, site, ignore=shutil.ignore_patterns("records"))
    main(["run", str(site / "cases"), "--quiet"])
    return site / "records"


def test_pattern_catches_a_bare_unit():
    assert _bare_pressures("drop 13.5 bar across") and _bare_pressures("at 350 kPa here")
    assert not _bare_pressures("3.5 bar(a), 2.5 bar(g), 0.3 bar difference, 50 psia, 1599 kPa(a)")


def test_unit_labels_carry_the_basis():
    assert unit_label("bar") == "bar(a)" and unit_label("bar", "difference") == "bar difference"


def test_reports_of_every_demo_case_show_the_basis(demo_records):
    reports = [p for p in sorted(demo_records.glob("*.md")) + sorted(demo_records.glob("*.html"))
               if p.with_suffix(".json").exists()]
    assert len(reports) >= 10
    index = _visible_text((demo_records / "index.html").read_text())
    assert not _bare_pressures(index), _bare_pressures(index)[:3]
    for path in reports:
        text = path.read_text()
        if path.suffix == ".html":
            text = _visible_text(text)
        # The engineer's own text ("as given", e.g. '0.1 bar' for a differential) is quoted as written.
        for entry in load_record(path.with_suffix(".json"))["inputs"].values():
            text = text.replace(f"| {entry['given']} |", "|").replace(f" {entry['given']} ", " ")
        assert not _bare_pressures(text), (path.name, _bare_pressures(text)[:3])


def test_diff_shows_the_basis(demo_records, capsys, tmp_path):
    old = load_record(demo_records / "LD-01_revB.json")
    new = dict(old, revision="C")
    new["inputs"] = dict(old["inputs"])
    new["inputs"]["inlet_pressure"] = dict(old["inputs"]["inlet_pressure"], value=17.5)
    rows = diff_records(old, new)
    assert any(r["key"] == "inlet_pressure" and r["unit_label"] == "bar(a)" for r in rows)
    html_out = tmp_path / "diff.html"
    import json
    (tmp_path / "new.json").write_text(json.dumps(new))
    main(["diff", str(demo_records / "LD-01_revB.json"), str(tmp_path / "new.json"), "--html", str(html_out)])
    printed = capsys.readouterr().out
    assert not _bare_pressures(printed), _bare_pressures(printed)[:3]
    page = _visible_text(html_out.read_text())
    # The engineer's own text (a tolerance typed as "0.3 bar") is quoted as written.
    for entry in list(old["inputs"].values()) + list(old.get("uncertainty", {}).get("tolerances", {}).values()):
        page = page.replace(f"as given: {entry['given']}", "")
    assert not _bare_pressures(page), _bare_pressures(page)[:3]
