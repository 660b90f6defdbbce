"""An ipywidgets form built from a calculation's Inputs metadata.

Each input is a text box holding a quantity string exactly as a case file would
(``"16 bar(g)"``, ``"header:LP"``), so the form has no unit of its own to trap
anyone: what is typed is parsed by the same code as a case file.

Each box carries its help sentence twice: as the tooltip and as a short line under the box.
A refused input is shown beside its own box, the box highlighted. Inputs that are
alternatives of one another (the inlet state by temperature, superheat or dryness) say so, and
filling one empties the others, with a note saying what was emptied.
"""

from __future__ import annotations

import html
import re

import ipywidgets as widgets

from ..calcs.base import input_fields
from .wording import FormWords

_LABEL_WIDTH = "15em"

#: Kind -> groups of inputs of which at most one is given (the calculation refuses two of a group).
#: A calculation module may declare its own ``ALTERNATIVE_INPUTS`` instead.
ALTERNATIVES = {
    "letdown": (("inlet_temperature", "inlet_superheat", "inlet_dryness"),
                ("target_superheat", "target_temperature")),
    "flash": (("flash_pressure", "stages"), ("k_factor", "vapour_velocity")),
    "exchanger": (("process_flow", "process_volume_flow"), ("process_fluid", "process_cp"),
                  ("steam_temperature", "steam_dryness")),
}

#: CSS classes the browser tests and the notebook's look rely on.
ERROR_CLASS = "steamcalc-input-refused"
MESSAGE_CLASS = "steamcalc-field-message"
HELP_CLASS = "steamcalc-help"


def alternatives_for(calc):
    """The alternative-input groups of a calculation module (its own, else :data:`ALTERNATIVES`)."""
    return tuple(getattr(calc, "ALTERNATIVE_INPUTS", ALTERNATIVES.get(getattr(calc, "KIND", None), ())))


def _one_of(labels):
    return labels[0] if len(labels) == 1 else ", ".join(labels[:-1]) + " or " + labels[-1]


class CaseForm:
    """Text boxes for every input of a kind, grouped by case-file section.

    Parameters
    ----------
    inputs_class : type
        The kind's Inputs dataclass.
    values : dict
        Field name → text to pre-fill (the case file's own values).
    headers : dict
        Site header names, shown in the pressure boxes' help.
    tolerances : dict, optional
        Field name → ± tolerance text to pre-fill.
    alternatives : sequence of tuples, optional
        Groups of field names of which only one may be given.
    """

    def __init__(self, inputs_class, values, headers=(), tolerances=None, alternatives=()):
        from ..runs.uncertainty import _DIFFERENCE_KINDS

        tolerances = tolerances or {}
        self.words = FormWords(inputs_class)
        self.boxes = {}
        self.tolerance_boxes = {}
        self.messages = {}
        self.help = {}
        self.kinds = {f.name: f.metadata["kind"] for f in input_fields(inputs_class)}
        self.labels = {f.name: f.metadata["label"] for f in input_fields(inputs_class)}
        self.alternatives = {}
        for group in alternatives:
            group = tuple(name for name in group if name in self.kinds)
            for name in group:
                self.alternatives[name] = group
        self._holding = False
        self.notes = {}
        groups = {}
        header_note = f" Site headers: {', '.join('header:' + h for h in headers)}." if headers else ""
        for f in input_fields(inputs_class):
            meta = f.metadata
            raw = values.get(f.name, "")
            if isinstance(raw, (list, tuple)):
                raw = ", ".join(str(item) for item in raw)
            help_text = self.words.text(meta["help"]) + (header_note if meta["kind"] == "pressure" else "")
            alternative = self.alternative_note(f.name)
            tooltip = help_text + (f" {alternative}" if alternative else "")
            # The label is a widget of its own so that the box too carries the tooltip (a Text with a
            # description puts it on the label only).
            label = widgets.HTML(f"<label class='steamcalc-label' title='{html.escape(tooltip, quote=True)}' "
                                 f"style='display:block;text-align:right;padding-right:8px'>"
                                 f"{html.escape(meta['label'])}</label>", layout=widgets.Layout(width=_LABEL_WIDTH))
            label.add_class(f"steamcalc-label-{f.name}")
            box = widgets.Text(
                value="" if raw is None else str(raw), placeholder=f"e.g. {meta['example']}",
                tooltip=tooltip, continuous_update=False, layout=widgets.Layout(width="19em"),
            )
            box.add_class("steamcalc-input")
            box.add_class(f"steamcalc-input-{f.name}")
            self.boxes[f.name] = box
            message = widgets.HTML(layout=widgets.Layout(max_width="36em"))
            message.add_class(MESSAGE_CLASS)
            message.add_class(f"{MESSAGE_CLASS}-{f.name}")
            self.messages[f.name] = message
            line = (f"<span class='{HELP_CLASS}-text'>{html.escape(help_text)}</span>"
                    + (f" <b class='steamcalc-alternative'>{html.escape(alternative)}</b>" if alternative else ""))
            described = widgets.HTML(f"<div style='margin:-4px 0 6px {_LABEL_WIDTH};font-size:85%;"
                                     f"color:#555;line-height:1.25'>{line}</div>")
            described.add_class(HELP_CLASS)
            described.add_class(f"{HELP_CLASS}-{f.name}")
            self.help[f.name] = described
            row = [label, box]
            if meta["kind"] in _DIFFERENCE_KINDS:
                tol = tolerances.get(f.name, "")
                tolerance = widgets.Text(value="" if tol is None else str(tol), placeholder="± tolerance",
                                         continuous_update=False, layout=widgets.Layout(width="9em"),
                                         tooltip="± tolerance for the uncertainty bands: e.g. '0.3 bar', '5 K', '5 %'")
                tolerance.add_class(f"steamcalc-tol-{f.name}")
                self.tolerance_boxes[f.name] = tolerance
                row.append(tolerance)
            row.append(message)
            groups.setdefault(meta["section"], []).append(widgets.VBox([widgets.HBox(row), described]))
        for name, box in self.boxes.items():
            if name in self.alternatives:
                box.observe(lambda change, name=name: self._alternative_given(name, change), names="value")
        children = []
        for section, boxes in groups.items():
            if section is not None:
                children.append(widgets.HTML(f"<b>{section.replace('_', ' ').capitalize()}</b> <i>(leave empty if none)</i>"))
            children.extend(boxes)
        self.view = widgets.VBox(children)

    # -- alternatives ----------------------------------------------------------------
    def alternative_note(self, name):
        """What the form says of an input that has alternatives ('' when it has none)."""
        group = self.alternatives.get(name)
        if not group or len(group) < 2:
            return ""
        return f"Alternatives: give one of {_one_of([self.labels[n] for n in group])}; filling one empties the others."

    def _alternative_given(self, name, change):
        if self._holding or not str(change["new"]).strip():
            return
        emptied = []
        self._holding = True
        try:
            for other in self.alternatives[name]:
                if other != name and self.boxes[other].value.strip():
                    emptied.append(f"{self.labels[other]} (it was {self.boxes[other].value.strip()})")
                    self.boxes[other].value = ""
        finally:
            self._holding = False
        self.notes = {name: f"{' and '.join(emptied)} emptied: {self.alternative_note(name)}"} if emptied else {}
        self._fresh_note = bool(emptied)

    # -- refused inputs --------------------------------------------------------------
    def show_error(self, exc):
        """Show a refused input's message beside its box and highlight the box.

        Returns the field name it was shown beside, or None when the error names no box of
        this form (the workbook then shows it under the form).
        """
        self.clear_errors()
        address = getattr(exc, "field", None)
        name = self.words.field_name(address)
        if name is None:
            return None
        self.boxes[name].add_class(ERROR_CLASS)
        self.messages[name].value = (f"<div class='steamcalc-refused' style='color:#a3201b;padding-left:8px'>"
                                     f"<b>Not accepted:</b> {html.escape(self.refusal(exc))}</div>"
                                     + self.messages[name].value)
        return name

    def refusal(self, exc):
        """The message of a refused input in the form's words, starting with its box's label."""
        address = str(getattr(exc, "field", "") or "")
        name = self.words.field_name(address)
        label = self.labels.get(name, address)
        item = re.search(r"\[(\d+)\]$", address)
        where = f"{label}, item {int(item.group(1)) + 1}" if item else label
        text = self.words.error(exc)
        if re.match(r"(is|are|must|cannot|should|has|needs) ", text):
            return f"{where} {text}"
        return f"{where}: {text}"

    def clear_errors(self):
        """Remove every box's highlight and message; show the notes of emptied alternatives."""
        notes = self.notes
        for name, box in self.boxes.items():
            box.remove_class(ERROR_CLASS)
            note = notes.get(name)
            self.messages[name].value = ("" if not note else
                                         f"<div class='steamcalc-note' style='color:#555;padding-left:8px'>"
                                         f"{html.escape(note)}</div>")

    # -- values ----------------------------------------------------------------------
    def values(self):
        """Field name → text, for the boxes that are not empty; fractions as numbers."""
        out = {}
        for name, box in self.boxes.items():
            text = box.value.strip()
            if not text:
                continue
            if self.kinds[name] == "pressure_list":
                # Typed as "8 bar(g), 2.5 bar(g)" (brackets and quotes as in TOML also accepted).
                items = [item.strip().strip("'\"") for item in text.strip("[]").split(",")]
                out[name] = [item for item in items if item]
                continue
            if self.kinds[name] in ("nominal_size", "flag", "text"):
                out[name] = text
                continue
            try:
                out[name] = float(text)
            except ValueError:
                out[name] = text
        return out

    def tolerances(self):
        """Field name → tolerance text, for the ± boxes that are not empty."""
        out = {}
        for name, box in self.tolerance_boxes.items():
            text = box.value.strip()
            if text:
                try:
                    out[name] = float(text)
                except ValueError:
                    out[name] = text
        return out

    def observe(self, callback):
        """Call ``callback()`` whenever a box's value changes (once for a change that empties alternatives)."""
        def changed(change):
            if self._holding:
                return
            if not getattr(self, "_fresh_note", False):
                self.notes = {}  # a note on emptied alternatives lasts until the next change
            self._fresh_note = False
            callback()
        for box in list(self.boxes.values()) + list(self.tolerance_boxes.values()):
            box.observe(changed, names="value")
