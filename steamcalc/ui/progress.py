"""A progress line: what a workbook is computing, shown while the cell runs, and what it took.

Run All of a workbook opens the case, builds the form and computes the record before anything else
shows; without a word the page looks stuck. In a notebook someone has open (JupyterLab), the first
cell that computes shows one line that says what is being done now ("computing LD-01 on IF97 …") and,
once done, how long it took. Run headless (papermill, nbval) it shows nothing, so a notebook's stored
outputs never hold a time.
"""

from __future__ import annotations

import html
import time

_STYLE = "font:9.5pt/1.4 monospace;color:#4a4f55;border-left:3px solid #1d4f91;padding:1px 8px"


class ProgressLine:
    """One line in the running cell's output, updated in place.

    Parameters
    ----------
    live : bool
        Show the line (a notebook someone has open); False shows nothing and only keeps the steps.

    Examples
    --------
    >>> line = ProgressLine(live=False)
    >>> line.step("computing LD-01"); line.step("drawing the charts"); line.done("LD-01 computed")
    >>> line.steps
    ['computing LD-01', 'drawing the charts']
    >>> line.text.startswith("LD-01 computed in ")
    True
    """

    def __init__(self, live):
        self.live = live
        self.steps = []
        self.text = ""
        self._start = time.perf_counter()
        self._handle = None

    def step(self, what):
        """Say what is being computed now."""
        self.steps.append(what)
        self._show(f"⏳ {what} …", what)

    def done(self, what):
        """Say what was computed and in how long (the line stays, so the time can be read afterwards)."""
        seconds = time.perf_counter() - self._start
        self._show(f"✔ {what} in {seconds:.1f} s", f"{what} in {seconds:.1f} s")

    def _show(self, line, text):
        self.text = text
        if not self.live:
            return
        from IPython.display import HTML, display

        shown = HTML(f"<div class='steamcalc-progress' style='{_STYLE}'>{html.escape(line)}</div>")
        if self._handle is None:
            self._handle = display(shown, display_id=True)
        else:
            self._handle.update(shown)
