"""The process sketch in the workbook: the SVG of ``steamcalc.sketch`` for the current record."""

from __future__ import annotations

import ipywidgets as widgets

from ..sketch import sketch_svg


class SketchView:
    """An HTML widget showing the sketch of the workbook's current record; redrawn on each result."""

    def __init__(self):
        self.view = widgets.HTML()
        self.view.add_class("steamcalc-sketch-view")

    def draw(self, record):
        self.view.value = "" if record is None else sketch_svg(record)
