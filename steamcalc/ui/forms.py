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
import math
import re

import ipywidgets as widgets
from ipywidgets.widgets.widget_string import HTMLStyle, TextStyle

from ..calcs.base import input_fields
from ..units.formatting import US_UNITS, format_number, unit_label
from ..units.quantities import Q_, RECORD_UNITS, SI_UNITS, unit_spelling
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
#: The box a refusal concerns when it is not the box just edited (the other side of a cross-field refusal).
CONFLICT_CLASS = "steamcalc-input-conflict"
_CONFLICT_STYLE = ("<style>.steamcalc-input-conflict input{border:2px dashed #a3201b !important}</style>")


def alternatives_for(calc):
    """The alternative-input groups of a calculation module (its own, else :data:`ALTERNATIVES`)."""
    return tuple(getattr(calc, "ALTERNATIVE_INPUTS", ALTERNATIVES.get(getattr(calc, "KIND", None), ())))


def _one_of(labels):
    return labels[0] if len(labels) == 1 else ", ".join(labels[:-1]) + " or " + labels[-1]


_TYPED = re.compile(r"^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(.*?)\s*$")
_TYPED_PRESSURE = re.compile(r"^(mbar|bar|kPa|MPa|Pa|psi)\s*(?:\(([aAgG])\)|([aAgG]))?$")
_PRESSURE_SIZES = {"bar": 1e5, "mbar": 100.0, "Pa": 1.0, "kPa": 1e3, "MPa": 1e6, "psi": 6894.757293168361}
#: Atmospheric pressures of inhabited places, Pa (standard atmosphere from about -400 m to 9 000 m, ISO 2533):
#: an absolute value that stands this far above a gauge reading typed in its box is that reading.
_ATMOSPHERES = (30e3, 106e3)


def _number(value, unit=""):
    return format_number(value, unit, trim=True)


def given_in_box_units(value, kind, typed, system="SI"):
    """A value an error holds in SI, written in the units typed in its box (or the field's record unit).

    The value of a refused input is what its box holds: a gauge pressure typed as ``14 bar(g)`` is
    given back as typed (its absolute value stands an atmosphere above it); another value is converted
    to the unit typed (``"20 t/h"``) or, for an empty box or a header, to the field's record unit
    (pressures absolute; on a US site, ``system="US"``, that unit's US counterpart: psia, °F, lb/h).
    Returns None for what is not a finite number (the error writes it itself).

    Examples
    --------
    >>> given_in_box_units(1499181.23, "pressure", "14 bar(g)"), given_in_box_units(1499181.23, "pressure", "header:HP")
    ('14 bar(g)', 'header:HP, 14.99 bar(a)')
    >>> given_in_box_units(5.5555556, "mass_flow", "20 t/h"), given_in_box_units(0.3, "fraction", "30 %")
    ('20 t/h', '30 %')
    >>> given_in_box_units(422.0388889, "temperature", "300 degF"), given_in_box_units(5.0, "number", "5")
    ('300 degF', '5')
    >>> given_in_box_units(1499181.23, "pressure", "header:HP", "US")
    'header:HP, 217.4 psia'
    """
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        return None
    typed = str(typed or "").strip()
    match = _TYPED.match(typed)
    number, unit = (float(match.group(1)), match.group(2)) if match else (None, "")
    if kind in ("pressure", "pressure_difference", "pressure_list"):
        written = _TYPED_PRESSURE.match(unit) if match else None
        name = written.group(1) if written else ("psi" if system == "US" else "bar")
        size = _PRESSURE_SIZES[name]
        if kind == "pressure_difference":
            return f"{_number(value / size)} {name}"
        basis = (written.group(2) or written.group(3) or "").lower() if written else ""
        if basis == "g" and _ATMOSPHERES[0] <= value - number * size <= _ATMOSPHERES[1]:
            return typed
        if basis == "a" and math.isclose(value, number * size, rel_tol=1e-9):
            return typed
        shown = f"{_number(value / size)} {unit_label(name)}"
        return f"{typed}, {shown}" if typed and not match else shown
    if unit == "%":
        if math.isclose(value * 100.0, number, rel_tol=1e-9, abs_tol=1e-12):
            return typed
        return f"{_number(value * 100.0, 'percent')} %"
    if match and not unit and math.isclose(value, number, rel_tol=1e-9, abs_tol=1e-12):
        return typed
    si_unit = SI_UNITS.get(kind)
    if si_unit and kind != "dimensionless":
        if match and unit:
            try:
                converted = Q_(value, si_unit).to(unit_spelling(unit)).magnitude
                if math.isclose(converted, number, rel_tol=1e-9, abs_tol=1e-12):
                    return typed
                return f"{_number(converted, unit_spelling(unit))} {unit}"
            except Exception:   # a unit this kind is not in: the record unit below
                pass
        record_unit = RECORD_UNITS[kind]
        record_unit = US_UNITS.get(record_unit, record_unit) if system == "US" else record_unit
        shown = Q_(value, si_unit).to(record_unit).magnitude
        return f"{_number(shown, record_unit)} {unit_label(record_unit)}".strip()
    return _number(value)


#: Kinds whose example a US form shows in US units (each typeable as shown); the others keep the SI example
#: (a Kv, a volume flow and a temperature difference are typed in SI units on either form).
_US_EXAMPLE_KINDS = {"pressure", "pressure_difference", "temperature", "mass_flow", "length", "velocity", "area",
                     "density", "specific_heat", "heat_transfer_coefficient", "fouling_resistance",
                     "thermal_conductivity"}
#: Written units (as examples write them) and their US counterparts as the form reads them back.
_US_EXAMPLE_UNITS = {"°C": "°F", "t/h": "lb/h", "kg/h": "lb/h", "m": "ft", "mm": "in", "m/s": "ft/s", "m²": "ft²",
                     "kg/m³": "lb/ft³", "kJ/(kg·K)": "Btu/(lb·°F)", "kW/(m²·K)": "Btu/(h·ft²·°F)",
                     "m²·K/kW": "h·ft²·°F/Btu", "W/(m·K)": "Btu/(h·ft·°F)"}


def _example_number(value):
    """Three significant figures, written as a user types a number (no thousands separator, no exponent)."""
    if value == 0:
        return "0"
    rounded = float(f"{value:.3g}")
    return f"{rounded:.0f}" if abs(rounded) >= 100 else f"{rounded:g}"


def example_in(example, kind, system="SI"):
    """A box's example in the form's units: on a US form a pressure, temperature, flow, length... is shown as
    a US user would type it; what is not a single quantity (a header, a list, a table) is left as it is.

    Examples
    --------
    >>> example_in("8 bar(g)", "pressure", "US"), example_in("0.3 bar", "pressure_difference", "US")
    ('116 psig', '4.35 psi')
    >>> example_in("150 °C", "temperature", "US"), example_in("4.5 t/h", "mass_flow", "US")
    ('302 °F', '9920 lb/h')
    >>> example_in("header:MP", "pressure", "US"), example_in("8 bar(g)", "pressure", "SI")
    ('header:MP', '8 bar(g)')
    """
    text = str(example)
    if system != "US" or kind not in _US_EXAMPLE_KINDS:
        return text
    match = _TYPED.match(text)
    if not match or not match.group(2):
        return text
    number, unit = float(match.group(1)), match.group(2)
    if kind in ("pressure", "pressure_difference"):
        written = _TYPED_PRESSURE.match(unit)
        if not written:
            return text
        basis = (written.group(2) or written.group(3) or "").lower()
        psi = number * _PRESSURE_SIZES[written.group(1)] / _PRESSURE_SIZES["psi"]
        return f"{_example_number(psi)} psi{basis}"
    us_unit = _US_EXAMPLE_UNITS.get(unit)
    if us_unit is None:
        return text
    try:
        value = Q_(number, unit_spelling(unit)).to(unit_spelling(us_unit)).magnitude
    except Exception:   # an example in a unit pint does not read: shown as written
        return text
    return f"{_example_number(value)} {us_unit}"


class _SharedLooks:
    """The layout and style models the widgets of one form share.

    Each widget otherwise brings a layout and a style model of its own: a let-down form was some 1,350 widget
    models, and Run All sent them with about 560 updates at once, all of which the server and the browser carry
    before the page settles. Shared, it is about a third of that. None of these is changed
    after it is made (a widget whose layout changes, such as a button shown only after a refusal, has its own).
    """

    def __init__(self):
        self.label = widgets.Layout(width=_LABEL_WIDTH)
        self.box = widgets.Layout(width="19em")
        self.tolerance = widgets.Layout(width="9em")
        self.message = widgets.Layout(max_width="36em")
        self.plain = widgets.Layout()
        self.html = HTMLStyle()
        self.text = TextStyle()


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
    system : {"SI", "US"}, optional
        The site's display system: the messages' own quantities, and a header box's value, in it.
    """

    def __init__(self, inputs_class, values, headers=(), tolerances=None, alternatives=(), system="SI"):
        from ..runs.uncertainty import _DIFFERENCE_KINDS

        tolerances = tolerances or {}
        self.system = system
        self.words = FormWords(inputs_class, system)
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
        # The box last edited, and the one a standing refusal is blamed on (with that refusal's field and message).
        self._edited = self._blamed = self._refusal_key = None
        groups = {}
        looks = _SharedLooks()
        header_note = f" Site headers: {', '.join('header:' + h for h in headers)}." if headers else ""
        for f in input_fields(inputs_class):
            meta = f.metadata
            raw = values.get(f.name, "")
            if meta["kind"] == "rows" and isinstance(raw, (list, tuple)):
                from ..units.rows import rows_given
                raw = rows_given(raw)   # the rows as inline TOML, read back by the case file's parser
            elif isinstance(raw, (list, tuple)):
                raw = ", ".join(str(item) for item in raw)
            help_text = self.words.text(meta["help"]) + (header_note if meta["kind"] == "pressure" else "")
            alternative = self.alternative_note(f.name)
            tooltip = help_text + (f" {alternative}" if alternative else "")
            # The label is a widget of its own so that the box too carries the tooltip (a Text with a
            # description puts it on the label only).
            label = widgets.HTML(f"<label class='steamcalc-label' title='{html.escape(tooltip, quote=True)}' "
                                 f"style='display:block;text-align:right;padding-right:8px'>"
                                 f"{html.escape(meta['label'])}</label>", layout=looks.label, style=looks.html,
                                 _dom_classes=(f"steamcalc-label-{f.name}",))
            box = widgets.Text(
                value="" if raw is None else str(raw), placeholder=f"e.g. {example_in(meta['example'], meta['kind'], system)}",
                tooltip=tooltip, continuous_update=False, layout=looks.box, style=looks.text,
                _dom_classes=("steamcalc-input", f"steamcalc-input-{f.name}"),
            )
            self.boxes[f.name] = box
            message = widgets.HTML(layout=looks.message, style=looks.html,
                                   _dom_classes=(MESSAGE_CLASS, f"{MESSAGE_CLASS}-{f.name}"))
            self.messages[f.name] = message
            line = (f"<span class='{HELP_CLASS}-text'>{html.escape(help_text)}</span>"
                    + (f" <b class='steamcalc-alternative'>{html.escape(alternative)}</b>" if alternative else ""))
            described = widgets.HTML(f"<div style='margin:-4px 0 6px {_LABEL_WIDTH};font-size:85%;"
                                     f"color:#555;line-height:1.25'>{line}</div>", layout=looks.plain,
                                     style=looks.html, _dom_classes=(HELP_CLASS, f"{HELP_CLASS}-{f.name}"))
            self.help[f.name] = described
            row = [label, box]
            if meta["kind"] in _DIFFERENCE_KINDS:
                tol = tolerances.get(f.name, "")
                tolerance = widgets.Text(value="" if tol is None else str(tol), placeholder="± tolerance",
                                         continuous_update=False, layout=looks.tolerance, style=looks.text,
                                         tooltip="± tolerance for the uncertainty bands: e.g. '0.3 bar', '5 K', '5 %'",
                                         _dom_classes=(f"steamcalc-tol-{f.name}",))
                self.tolerance_boxes[f.name] = tolerance
                row.append(tolerance)
            row.append(message)
            groups.setdefault(meta["section"], []).append(
                widgets.VBox([widgets.HBox(row, layout=looks.plain), described], layout=looks.plain))
        for name, box in self.boxes.items():
            if name in self.alternatives:
                box.observe(lambda change, name=name: self._alternative_given(name, change), names="value")
        children = []
        for section, boxes in groups.items():
            if section is not None:
                heading = f"<b>{section.replace('_', ' ').capitalize()}</b> <i>(leave empty if none)</i>"
                children.append(widgets.HTML(heading, layout=looks.plain, style=looks.html))
            children.extend(boxes)
        self.view = widgets.VBox(children, layout=looks.plain)

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

        A refusal that follows an edit is the edit refused: its message stands beside the box just
        edited. When the error names another box (a cross-field refusal: a steam flow typed above the
        maximum flow further down), that box is marked too, dashed, with a line saying what it conflicts
        with; an error that names no box of the form is shown beside the box just edited. The box
        blamed stays the same while the same refusal stands (editing an unrelated box moves nothing).

        Returns the field name the message is shown beside, or None when there is no box to show it
        beside (the workbook then shows it under the form).
        """
        self._unmark()
        named = self.words.field_name(getattr(exc, "field", None))
        key = (str(getattr(exc, "field", "")), str(getattr(exc, "message", exc)))
        if key != self._refusal_key:
            self._blamed = self._edited if self._edited in self.boxes else None
            self._refusal_key = key
        where = self._blamed or named
        if where is None:
            return None
        self.boxes[where].add_class(ERROR_CLASS)
        self.messages[where].value = (f"<div class='steamcalc-refused' style='color:#a3201b;padding-left:8px'>"
                                      f"<b>Not accepted:</b> {html.escape(self.refusal(exc))}</div>"
                                      + self.messages[where].value)
        if named is not None and named != where:
            self.boxes[named].add_class(CONFLICT_CLASS)
            self.messages[named].value = (
                f"{_CONFLICT_STYLE}<div class='steamcalc-conflict' style='color:#a3201b;padding-left:8px'>"
                f"In conflict with {html.escape(self._typed_label(where))}, just changed: "
                f"{html.escape(self.words.quantities(self.words.text(exc.message)))}</div>"
                + self.messages[named].value)
        return where

    def _typed(self, name, address=""):
        """What is typed in a box (the item of a list that an address ``stages[1]`` names)."""
        text = self.boxes[name].value.strip()
        item = re.search(r"\[(\d+)\]$", str(address or ""))
        if item and self.kinds.get(name) == "pressure_list":
            items = [part.strip().strip("'\"") for part in text.strip("[]").split(",")]
            index = int(item.group(1))
            text = items[index] if index < len(items) else ""
        return text

    def _typed_label(self, name):
        typed = self._typed(name)
        return f"{self.labels[name]} ({typed})" if typed else self.labels[name]

    def given(self, exc, name):
        """The value of a refusal as the form writes it: in the units typed in its box, or None."""
        if name is None:
            return None
        return given_in_box_units(getattr(exc, "value", None), self.kinds.get(name),
                                  self._typed(name, getattr(exc, "field", "")), self.system)

    def refusal(self, exc):
        """The message of a refused input in the form's words, starting with its box's label.

        A cross-field refusal starts with the box just edited and names the box it conflicts with,
        each with what is typed in it.
        """
        address = str(getattr(exc, "field", "") or "")
        name = self.words.field_name(address)
        blamed = self._blamed if self._blamed in self.boxes and self._refusal_key is not None else None
        if blamed is not None and blamed != name:
            if name is not None:
                other = self.labels[name]
                given = self.given(exc, name) or self._typed(name, address)
                other += f" ({given})" if given else ""
                return f"{self._typed_label(blamed)} conflicts with {other}: {self.words.error(exc, given='')}"
            where = f"{self.words.text(address).replace('_', ' ')}: " if address else ""
            return f"{self._typed_label(blamed)} is not accepted with the other inputs: {where}{self.words.error(exc)}"
        label = self.labels.get(name, address)
        item = re.search(r"\[(\d+)\]$", address)
        where = f"{label}, item {int(item.group(1)) + 1}" if item else label
        text = self.words.error(exc, given=self.given(exc, name))
        if re.match(r"(is|are|must|cannot|should|has|needs) ", text):
            return f"{where} {text}"
        return f"{where}: {text}"

    def _unmark(self):
        notes = self.notes
        for name, box in self.boxes.items():
            box.remove_class(ERROR_CLASS)
            box.remove_class(CONFLICT_CLASS)
            note = notes.get(name)
            self.messages[name].value = ("" if not note else
                                         f"<div class='steamcalc-note' style='color:#555;padding-left:8px'>"
                                         f"{html.escape(note)}</div>")

    def clear_errors(self):
        """Remove every box's highlight and message; show the notes of emptied alternatives.

        The inputs are accepted again: the next refusal is blamed on the box edited then.
        """
        self._blamed = self._refusal_key = None
        self._unmark()

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
            if self.kinds[name] in ("nominal_size", "flag", "text", "rows"):
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
        names = {id(box): name for name, box in self.boxes.items()}

        def changed(change):
            if self._holding:
                return
            self._edited = names.get(id(change.get("owner")))   # None for a ± tolerance box
            if not getattr(self, "_fresh_note", False):
                self.notes = {}  # a note on emptied alternatives lasts until the next change
            self._fresh_note = False
            callback()
        for box in list(self.boxes.values()) + list(self.tolerance_boxes.values()):
            box.observe(changed, names="value")
