"""The workbook's "Save case file" button: the edited inputs as a case file, never over another one.

Kept apart from ``workbook.py``: the workbook makes one :class:`CaseSaver` and shows its view.
The writing itself (file name, refusal, round trip) is ``steamcalc.cases.casefile_writer``.
"""

from __future__ import annotations

import html

import ipywidgets as widgets

from ..cases.casefile_writer import free_revision, save_case
from ..errors import SteamcalcError


class CaseSaver:
    """A button and a status line that save a workbook's current inputs as a case file.

    Parameters
    ----------
    workbook : steamcalc.ui.workbook.Workbook
        Read when the button is pressed: its case (revision as in the Revision box), its form's
        values and tolerances, and whether the inputs are accepted.
    """

    def __init__(self, workbook):
        self.workbook = workbook
        self.button = widgets.Button(description="Save case file", icon="file", layout=widgets.Layout(width="12em", flex="0 0 auto"),
                                     tooltip="Write these inputs as a case file beside the one this workbook "
                                             "opened (a new file for a new revision; never over another file)")
        self.button.add_class("steamcalc-save-case")
        self.status = widgets.HTML()
        self.status.add_class("steamcalc-save-case-status")
        self.button.on_click(lambda _: self._on_click())
        # Offered when the revision is taken: raise the Revision box to the next free one and save.
        self.next_button = widgets.Button(description="", icon="arrow-up", layout=widgets.Layout(display="none", width="15em", flex="0 0 auto"))
        self.next_button.add_class("steamcalc-save-case-next")
        self.next_button.on_click(lambda _: self._save_as_next())
        self.view = widgets.HBox([self.button, self.next_button, self.status])
        self._next = None

    def save(self):
        """Save the inputs; return a one-line account (what a user reads under the button)."""
        wb = self.workbook
        if wb.error is not None or wb.record is None:
            return f"not saved: the inputs are not accepted ({wb.error})"
        try:
            saved = save_case(wb.case, wb.form.values(), wb.calc.Inputs)
        except SteamcalcError as exc:
            message = exc.message
            fix = (exc.fix or "").replace("raise the revision", "raise the Revision box above")
            return f"not saved: {message}. {fix[:1].upper()}{fix[1:]}." if fix else f"not saved: {message}"
        if saved.status == "unchanged":
            return (f"unchanged, kept: {saved.path} already holds these inputs as revision "
                    f"{wb.case.revision}")
        return f"case file saved: {saved.path} (new file, revision {wb.case.revision})"

    def _on_click(self):
        text = self.save()
        colour = "#a3201b" if text.startswith("not saved") else "#2f6b3a"
        wb = self.workbook
        self._next = None
        # The offer is set before the account under the button: the browser draws the widgets' changes in the
        # order they are sent, so by the time the account reads "not saved" its offer is already shown.
        if text.startswith("not saved") and wb.error is None:
            self._next = free_revision(wb.case.path.parent, wb.case.id, wb.case.revision)
            self.next_button.description = f"Save as revision {self._next}"
            self.next_button.layout.display = None
        else:
            self.next_button.layout.display = "none"
        self.status.value = f"<span style='color:{colour}'>{html.escape(text)}</span>"

    def _save_as_next(self):
        if self._next is None:
            return
        # The Revision box is the workbook's own: the record then follows the same revision.
        self.workbook._revision.value = self._next
        self._on_click()
