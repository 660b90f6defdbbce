"""What a workbook sends the browser when it opens: widget models and their updates, a few hundred.

Opening the let-down workbook sent about 1,350 widget models and 560 updates at once: every widget brought a layout
and a style model of its own, and each class added after it was made was one more message. On CI, and once here
on a loaded machine, a widget now and then never displayed ("Error displaying widget: model not found", or
"Loading widget..." for good), with no other error in the page's console. That burst is not shown to be the cause
(the server held up for 12 s during Run All lost nothing here), but it is the front end's and the server's load
at its worst; each form's widgets now share their layout and style models and are made with their classes.
The bound is measured against the 1,000 messages a kernel's output socket and the server's each hold before
they drop (ZMQ_SNDHWM and ZMQ_RCVHWM, read from pyzmq below).
"""

import shutil
from pathlib import Path

import pytest
import zmq
from comm.base_comm import BaseComm
from ipywidgets import Widget

from steamcalc.ui.workbook import Workbook

DEMO = Path(__file__).resolve().parents[1] / "workbooks" / "demo_site"
#: Widget messages one workbook may send as it opens: well under one socket's high-water mark (1,000).
MOST_MESSAGES = 700


def test_the_high_water_mark_is_what_the_bound_is_measured_against():
    context = zmq.Context()
    try:
        publisher, subscriber = context.socket(zmq.PUB), context.socket(zmq.SUB)
        assert publisher.getsockopt(zmq.SNDHWM) == 1000 and subscriber.getsockopt(zmq.RCVHWM) == 1000
        publisher.close()
        subscriber.close()
    finally:
        context.term()


@pytest.fixture(scope="module")
def site(tmp_path_factory):
    folder = tmp_path_factory.mktemp("burst") / "demo_site"
    shutil.copytree(DEMO, folder, ignore=shutil.ignore_patterns("records"))
    return folder


@pytest.mark.parametrize("case", ["LD-01", "FL-01", "HX-01", "SM-01"])
def test_opening_a_workbook_sends_a_few_hundred_widget_messages(site, monkeypatch, case):
    sent = {"models": 0, "updates": 0}
    real_open, real_send = BaseComm.open, BaseComm.send

    def counted_open(self, *args, **kwargs):
        sent["models"] += 1
        return real_open(self, *args, **kwargs)

    def counted_send(self, *args, **kwargs):
        sent["updates"] += 1
        return real_send(self, *args, **kwargs)

    monkeypatch.setattr(BaseComm, "open", counted_open)
    monkeypatch.setattr(BaseComm, "send", counted_send)
    workbook = Workbook.open(site / "cases" / f"{case}.toml", site / "records")
    views = [workbook.summary_view(), workbook.form_view(), workbook.results_view(), workbook.sketch_view(),
             workbook.chart_view(), workbook.preview_view(), workbook.save_view(), workbook.save_case_view()]
    assert all(isinstance(view, Widget) for view in views)
    assert sent["models"] + sent["updates"] <= MOST_MESSAGES, sent
    # Every input box of the form in one layout and one style model.
    boxes = list(workbook.form.boxes.values())
    assert len({id(box.layout) for box in boxes}) == 1 and len({id(box.style) for box in boxes}) == 1
    assert all("steamcalc-input" in box._dom_classes for box in boxes)
