"""The process sketch in the workbook: the SVG of ``steamcalc.render.sketch`` for the current record."""

from __future__ import annotations

import ipywidgets as widgets

from ..render.sketch import sketch_svg


class SketchView:
    """An HTML widget showing the sketch of the workbook's current record; redrawn on each result,
    greyed out with a note while an input is refused (it then shows the last accepted inputs)."""

    def __init__(self):
        self.view = widgets.HTML()
        self.view.add_class("steamcalc-sketch-view")
        self._svg = ""

    def draw(self, record):
        self._svg = "" if record is None else sketch_svg(record)
        self.view.value = self._svg
        self.view.remove_class("steamcalc-stale")

    def mark_stale(self):
        if not self._svg:
            return
        self.view.value = ("<div style='color:#a3201b'><b>Out of date:</b> an input is not accepted; the sketch "
                           f"shows the last accepted inputs.</div><div style='opacity:.4'>{self._svg}</div>")
        self.view.add_class("steamcalc-stale")
