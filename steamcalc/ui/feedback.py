"""What the workbooks show of their own state: the stale marking, the live summary, links to saved files."""

from __future__ import annotations

import html
import os
from pathlib import Path

import ipywidgets as widgets

#: Class of every view that shows results while an input is refused (they are for the last accepted inputs).
STALE_CLASS = "steamcalc-stale"
STALE_TEXT = ("Stale: an input above is not accepted. Fix the input marked in the form; until then "
               "what is shown here is for the last accepted inputs.")
STALE_STYLE = ("<style>.steamcalc-stale:not(.steamcalc-stale-banner):not(.steamcalc-results),"
                ".steamcalc-stale .steamcalc-stale-content{opacity:0.45;outline:2px dashed #a3201b;"
                "outline-offset:2px}.steamcalc-input-refused input{border:2px solid #a3201b !important;"
                "background:#fdecea !important}</style>")


def file_link(path):
    """A link to a saved file, relative to the notebook's folder (JupyterLab opens it in a tab)."""
    path = Path(path)
    try:
        href = Path(os.path.relpath(path.resolve(), Path.cwd())).as_posix()
    except ValueError:  # another drive: no relative link
        href = path.resolve().as_uri()
    return (f"<a class='steamcalc-file-link' href='{html.escape(href, quote=True)}' target='_blank' "
            f"style='text-decoration:underline;color:#1d4f91'>{html.escape(str(path))}</a>")


class SummaryView(widgets.HTML):
    """The summary as text in a widget: live in the browser, plain text when run headless."""

    def __init__(self, text, to_html=None):
        super().__init__()
        self._text = text
        self._to_html = to_html

    def refresh(self):
        text = self._text()
        if self._to_html is not None:
            self.value = self._to_html(text)
            return
        head = ""
        if text.startswith("INPUT NOT ACCEPTED"):
            refusal, _, text = text.partition("\n\n")
            head = (f"<div class='steamcalc-refused' style='color:#a3201b;font-weight:bold;border-left:4px solid "
                    f"#a3201b;padding:2px 8px;white-space:pre-wrap'>{html.escape(refusal)}</div>")
        style = "color:#888;" if head else ""
        self.value = (STALE_STYLE + head +
                      f"<pre style='{style}white-space:pre-wrap;margin:0'>{html.escape(text)}</pre>")

    def _repr_mimebundle_(self, **kwargs):
        bundle = super()._repr_mimebundle_(**kwargs)
        if bundle is not None:
            bundle["text/plain"] = self._text()
        return bundle
