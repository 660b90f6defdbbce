"""Charts in the HTML record: the workbook's plotly charts drawn as static SVG, no scripts, the same
bytes on every rendering (``verify`` re-renders the HTML and compares it)."""

import copy
import json
import re
import subprocess
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from steamcalc.properties.engines import using_engine
from steamcalc.render.figures_svg import figure_svg, nice_ticks, record_figures
from steamcalc.records.record import write_record
from steamcalc.render.report import RENDERERS, render_html
from steamcalc.review.verify import check_companions
from steamcalc.records.build import record_for_case
from steamcalc.cases.site import case_site, load_case

ROOT = Path(__file__).resolve().parent.parent
CASES = ROOT / "workbooks" / "demo_site" / "cases"

#: The charts each demo case's record must carry, by title (the workbook's chart definitions).
EXPECTED_CHARTS = {
    "LD-01": ["Let-down on the enthalpy–entropy chart", "Control valve: required Kv and travel against flow",
              "Control valve noise at 1 m from the pipe (IEC 60534-8-3)"],
    "LD-02": ["Let-down on the enthalpy–entropy chart", "Control valve: required Kv and travel against flow",
              "Control valve noise at 1 m from the pipe (IEC 60534-8-3)"],
    "FL-01": ["Flash fraction against flash pressure"],
    "FL-02": ["Flash fraction against flash pressure"],
    "HX-01": ["Turndown: steam-side pressure needed against load"],
}


def _record(case_id):
    case = load_case(CASES / f"{case_id}.toml")
    record, _ = record_for_case(case, case_site(case), with_uncertainty=False, created="2026-01-01T00:00:00Z")
    return record


@pytest.fixture(scope="module")
def pages():
    records = {case_id: _record(case_id) for case_id in EXPECTED_CHARTS}
    return records, {case_id: render_html(record) for case_id, record in records.items()}


def _svgs(page):
    return re.findall(r"<svg\b.*?</svg>", page, flags=re.S)


@pytest.mark.parametrize("case_id", sorted(EXPECTED_CHARTS))
def test_record_html_carries_one_svg_per_chart_and_the_sketch(pages, case_id):
    _, html_pages = pages
    page = html_pages[case_id]
    svgs = _svgs(page)
    assert len(svgs) == 1 + len(EXPECTED_CHARTS[case_id])          # the process sketch, then each chart
    assert 'class="steamcalc-sketch"' in svgs[0]
    for svg, title in zip(svgs[1:], EXPECTED_CHARTS[case_id]):
        assert f"<title>{title}</title>" in svg
    for svg in svgs:
        ET.fromstring(svg)                                          # well-formed XML, on its own


@pytest.mark.parametrize("case_id", sorted(EXPECTED_CHARTS))
def test_record_html_has_no_script_and_fetches_nothing(pages, case_id):
    page = pages[1][case_id].lower()
    assert "<script" not in page and "javascript:" not in page
    assert not re.search(r"\b(href|src)\s*=\s*[\"']?(https?:|//)", page)
    assert not re.search(r"<[^>]+\son[a-z]+\s*=", page)             # no event-handler attributes


@pytest.mark.parametrize("case_id", sorted(EXPECTED_CHARTS))
def test_render_is_byte_identical(pages, case_id):
    records, html_pages = pages
    assert render_html(copy.deepcopy(records[case_id])) == html_pages[case_id]


def test_render_does_not_depend_on_the_callers_engine(pages):
    records, html_pages = pages
    with using_engine("fast"):
        assert render_html(records["LD-01"]) == html_pages["LD-01"]


def test_render_is_the_same_in_a_fresh_process(pages, tmp_path):
    records, html_pages = pages
    path = tmp_path / "FL-01.json"
    path.write_text(json.dumps(records["FL-01"]), encoding="utf-8")
    code = ("import json, sys; from steamcalc.render.report import render_html; "
            "sys.stdout.buffer.write(render_html(json.load(open(sys.argv[1], encoding='utf-8'))).encode())")
    out = subprocess.run([sys.executable, "-c", code, str(path)], capture_output=True, check=True,
                         env={"PYTHONPATH": str(ROOT), "PYTHONHASHSEED": "12345", "PATH": "/usr/bin:/bin"})
    assert out.stdout.decode() == html_pages["FL-01"]


def test_issued_record_companions_match_on_verify(tmp_path):
    record = _record("FL-02")
    paths, status = write_record(record, tmp_path, RENDERERS)
    assert status == "written"
    assert [c.verdict for c in check_companions(paths[0], record)] == ["match", "match"]


def test_figures_are_drawn_from_the_record_data_not_from_its_inputs():
    # The views only draw: inputs that no longer compute change nothing in the drawing.
    record = _record("FL-01")
    before = record_figures(record)
    record["inputs"]["condensate_pressure"]["value"] = 5000.0     # bar(a): beyond IF97
    assert record_figures(record)["charts"] == before["charts"] and before["charts"]


def test_a_figure_marked_missing_says_why_and_the_record_still_renders():
    record = _record("FL-01")
    record["figures"][0] = {"name": "flash_fraction", "title": "Flash fraction against flash pressure",
                            "missing": "not drawn: flash pressure 5000 bar(a) above the IF97 range"}
    figures = record_figures(record)
    assert figures["charts"][0]["missing"].startswith("not drawn: flash pressure 5000")
    assert "not drawn: flash pressure 5000 bar(a) above the IF97 range" in render_html(record)


def test_a_record_of_the_earlier_schema_says_it_has_no_figure_data():
    record = _record("FL-01")
    del record["figures"]
    figures = record_figures(record)
    assert figures["charts"] == [] and "earlier release" in figures["note"]
    assert "earlier release" in render_html(record)


def test_markdown_record_omits_the_figures(pages):
    # The Markdown record (preview in the workbook) has no figures: they are in the HTML and PDF.
    from steamcalc.render.report import render_markdown
    assert "<svg" not in render_markdown(pages[0]["FL-01"])


@pytest.mark.parametrize("low, high, dtick, expected", [
    (0.0, 102.0, None, [0, 20, 40, 60, 80, 100]),
    (0.0, 100.0, 20, [0, 20, 40, 60, 80, 100]),
    (0.61, 7.6, None, [1, 2, 3, 4, 5, 6, 7]),
    (-3.2, 3.2, None, [-3, -2, -1, 0, 1, 2, 3]),
    (5.0, 5.0, None, []),
])
def test_nice_ticks(low, high, dtick, expected):
    assert nice_ticks(low, high, dtick=dtick) == pytest.approx(expected)


def test_figure_svg_draws_a_log_axis_a_secondary_axis_bands_and_notes():
    import plotly.graph_objects as go
    from plotly.subplots import make_subplots

    fig = make_subplots(specs=[[{"secondary_y": True}]])
    fig.add_trace(go.Scatter(x=[0.2, 1.0, 10.0], y=[20.0, 10.0, 0.0], mode="lines", name="fraction <a&b>"))
    fig.add_trace(go.Scatter(x=[1.0], y=[50.0], mode="markers+text", text=["marked"], name="point"),
                  secondary_y=True)
    fig.add_vrect(x0=0.0, x1=0.5, fillcolor="#b5442c", opacity=0.1, line_width=0,
                  annotation_text="band note", annotation_position="top right")
    fig.update_xaxes(type="log", title_text="pressure, bar(a)")
    fig.update_yaxes(title_text="travel, %", range=[0, 100], secondary_y=True)
    fig.update_layout(title="Test chart", height=400)
    svg = figure_svg(fig, "t")
    root = ET.fromstring(svg)
    texts = [t.text for t in root.iter("{http://www.w3.org/2000/svg}text")]
    assert {"0.2", "1", "10", "pressure, bar(a)", "travel, %", "marked", "band note", "Test chart",
            "fraction <a&b>", "100"} <= set(texts)
    assert "<a&b>" not in svg                                        # user text is escaped
    assert svg.count('clip-path="url(#t-plot)"') >= 2


def test_figure_svg_refuses_a_trace_it_cannot_draw():
    import plotly.graph_objects as go

    with pytest.raises(ValueError, match="scatter traces only"):
        figure_svg(go.Figure(go.Bar(x=[1], y=[2])))
