"""What a workbook shows while it computes, and that what it keeps between changes changes no number.

Consistency tests: after inputs change, the workbook's record (computed with the states it remembers) and its
charts (a chart whose data did not change is not drawn again) are those of a fresh computation of the same
inputs; the results are shown before the charts; Run All in a live notebook shows a progress line and a
headless run shows nothing. Tests never assert timings.
"""

import pytest

from steamcalc.records.build import record_for_case
from steamcalc.ui import charts as charts_module
from steamcalc.ui.charts import record_chart_json
from steamcalc.ui.workbook import Workbook

FLOWS = {"LD-01": "mass_flow", "FL-01": "condensate_flow", "HX-01": "process_flow"}


@pytest.fixture
def displayed(monkeypatch):
    """What IPython would show in the running cell: (kind, html) of each display and update."""
    import IPython.display

    shown = []

    class Handle:
        def update(self, obj):
            shown.append(("update", obj.data))

    def display(obj, display_id=None):
        shown.append(("display", obj.data))
        return Handle()

    monkeypatch.setattr(IPython.display, "display", display)
    return shown


def _changed(workbook, case_id, factor):
    box = workbook.form.boxes[FLOWS[case_id]]
    number, unit = box.value.split(" ", 1)
    box.value = f"{float(number) * factor:.5g} {unit}"
    assert workbook.error is None


def _numbers(record):
    return {k: v["value"] for k, v in record["results"].items()}


@pytest.mark.parametrize("case_id", ["LD-01", "FL-01", "HX-01"])
def test_after_changes_the_record_and_charts_are_those_of_a_fresh_computation(case_id, demo_site_dir, tmp_path):
    workbook = Workbook(demo_site_dir / "cases" / f"{case_id}.toml", tmp_path)
    for factor in (1.05, 0.97, 1.05):   # the last: inputs seen before, every state and chart remembered
        _changed(workbook, case_id, factor)
        fresh, _ = record_for_case(workbook.case, workbook.site, inputs=workbook.inputs, given=workbook._given,
                                   with_uncertainty=False)
        assert _numbers(workbook.record) == _numbers(fresh)
        assert workbook.record["steps"] == fresh["steps"] and workbook.record["checks"] == fresh["checks"]
        assert workbook.record["figures"] == fresh["figures"]
        shown = [o["data"]["application/vnd.plotly.v1+json"] for o in workbook._chart.outputs
                 if "application/vnd.plotly.v1+json" in o["data"]]
        assert shown == record_chart_json(fresh, {})[0]


def test_a_chart_whose_data_did_not_change_is_not_drawn_again(demo_site_dir, tmp_path, monkeypatch):
    workbook = Workbook(demo_site_dir / "cases" / "LD-01.toml", tmp_path)
    drawn = []
    real = charts_module.record_charts
    monkeypatch.setattr(charts_module, "record_charts", lambda record: drawn.append(record["figures"][0]["name"])
                        or real(record))
    _changed(workbook, "LD-01", 1.05)
    figures = [f["name"] for f in workbook.record["figures"]]
    # A flow changed: the h-s chart's states are as they were; the valve's and the noise's curves move with the flow.
    assert 0 < len(drawn) < len(figures)
    drawn.clear()
    _changed(workbook, "LD-01", 1 / 1.05)    # back to the inputs drawn before: nothing drawn again
    assert drawn == []


def test_results_are_shown_before_the_charts(demo_site_dir, tmp_path):
    workbook = Workbook(demo_site_dir / "cases" / "HX-01.toml", tmp_path)
    order = []
    workbook._results_html.observe(lambda change: order.append("results"), "value")
    workbook._summary.observe(lambda change: order.append("summary"), "value")
    workbook._chart.observe(lambda change: order.append("charts"), "outputs")
    workbook._preview.observe(lambda change: order.append("preview"), "outputs")
    _changed(workbook, "HX-01", 1.05)
    assert order.index("results") < order.index("charts") and order.index("summary") < order.index("charts")
    assert order[-1] == "preview"


def test_run_all_in_a_live_notebook_says_what_it_computes(demo_site_dir, tmp_path, monkeypatch, displayed):
    monkeypatch.setenv("JPY_SESSION_NAME", "letdown.ipynb")
    Workbook.open(demo_site_dir / "cases" / "LD-01.toml", tmp_path)
    texts = [html for _, html in displayed]
    assert [kind for kind, _ in displayed] == ["display"] + ["update"] * (len(displayed) - 1)   # one line, updated
    assert "reading the case file LD-01.toml" in texts[0]
    assert any("computing LD-01 (pressure let-down station) on IF97" in t for t in texts)
    assert any("drawing the charts" in t for t in texts)
    assert "LD-01 computed in " in texts[-1] and "steamcalc-progress" in texts[-1]


def test_a_case_file_that_cannot_be_opened_ends_its_progress_line(tmp_path, monkeypatch, displayed):
    monkeypatch.setenv("JPY_SESSION_NAME", "letdown.ipynb")
    workbook = Workbook.open(tmp_path / "missing.toml", tmp_path)
    assert "case file not found" in workbook.summary()
    assert "missing.toml not opened" in displayed[-1][1]


def test_headless_runs_show_no_progress_line(demo_site_dir, tmp_path, monkeypatch, displayed):
    monkeypatch.delenv("JPY_SESSION_NAME", raising=False)
    Workbook.open(demo_site_dir / "cases" / "FL-01.toml", tmp_path)
    assert displayed == []
