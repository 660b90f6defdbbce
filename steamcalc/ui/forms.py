"""An ipywidgets form built from a calculation's Inputs metadata.

Each input is a text box holding a quantity string exactly as a case file would
(``"16 bar(g)"``, ``"header:LP"``), so the form has no unit of its own to trap
anyone: what is typed is parsed by the same code as a case file.
"""

from __future__ import annotations

import ipywidgets as widgets

from ..calcs.base import input_fields

_LABEL_WIDTH = "15em"


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
    """

    def __init__(self, inputs_class, values, headers=(), tolerances=None):
        from ..uncertainty import _DIFFERENCE_KINDS

        tolerances = tolerances or {}
        self.boxes = {}
        self.tolerance_boxes = {}
        self.kinds = {f.name: f.metadata["kind"] for f in input_fields(inputs_class)}
        groups = {}
        header_note = f" Site headers: {', '.join('header:' + h for h in headers)}." if headers else ""
        for f in input_fields(inputs_class):
            meta = f.metadata
            raw = values.get(f.name, "")
            if isinstance(raw, (list, tuple)):
                raw = ", ".join(str(item) for item in raw)
            help_text = meta["help"] + (header_note if meta["kind"] == "pressure" else "")
            box = widgets.Text(
                value="" if raw is None else str(raw), placeholder=f"e.g. {meta['example']}",
                description=meta["label"], tooltip=help_text, continuous_update=False,
                style={"description_width": _LABEL_WIDTH}, layout=widgets.Layout(width="34em"),
            )
            box.add_class("steamcalc-input")
            box.add_class(f"steamcalc-input-{f.name}")
            self.boxes[f.name] = box
            row = box
            if meta["kind"] in _DIFFERENCE_KINDS:
                tol = tolerances.get(f.name, "")
                tolerance = widgets.Text(value="" if tol is None else str(tol), placeholder="± tolerance",
                                         continuous_update=False, layout=widgets.Layout(width="9em"),
                                         tooltip="± tolerance for the uncertainty bands: e.g. '0.3 bar', '5 K', '5 %'")
                tolerance.add_class(f"steamcalc-tol-{f.name}")
                self.tolerance_boxes[f.name] = tolerance
                row = widgets.HBox([box, tolerance])
            groups.setdefault(meta["section"], []).append(row)
        children = []
        for section, boxes in groups.items():
            if section is not None:
                children.append(widgets.HTML(f"<b>{section.replace('_', ' ').capitalize()}</b> <i>(leave empty if none)</i>"))
            children.extend(boxes)
        self.view = widgets.VBox(children)

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
        """Call ``callback()`` whenever a box's value changes."""
        for box in list(self.boxes.values()) + list(self.tolerance_boxes.values()):
            box.observe(lambda change: callback(), names="value")
