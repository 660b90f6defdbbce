"""The live workbook behind every calculation notebook, generic over calculation kinds.

A notebook makes one :class:`Workbook` from its parameters and shows its parts:
the form, the results and checks, the chart, the record preview and the save
button. Every change in the form recomputes through the same path as
``steamcalc run``; a bad input shows as a message beside the form, never a
traceback. Run headless, :meth:`Workbook.summary` and :meth:`Workbook.save`
work from the parameters alone.
"""

from __future__ import annotations

import dataclasses
import html
from pathlib import Path

import ipywidgets as widgets

from ..calcs import get_calculation
from ..display import display_record, pressure_basis
from ..errors import SteamcalcError
from ..record import write_record
from ..report import RENDERERS, format_number, format_unit, render_markdown
from ..runner import record_for_case
from ..site import case_site, flatten_inputs, is_file_name_part, load_case, parse_inputs
from ..uncertainty import SETTINGS
from .charts import chart_for, figure_json, table_for, tornado_chart
from .forms import CaseForm
from .save_case import CaseSaver
from .sketch_view import SketchView

_STATUS_COLOURS = {"pass": "#2f6b3a", "warn": "#8a5a00", "fail": "#a3201b"}


def _show_input_error(shell, etype, value, tb, tb_offset=None):
    # A user's bad input (a wrong case-file path, a misspelt key) is a message, not a traceback.
    print(f"Input not accepted: {value}")
    return None


def _install_error_display():
    try:
        from IPython import get_ipython
    except ImportError:
        return
    shell = get_ipython()
    if shell is not None:
        shell.set_custom_exc((SteamcalcError,), _show_input_error)


_install_error_display()


class Workbook:
    """One calculation case, live.

    Parameters
    ----------
    case_file : str or Path
        The case file the workbook starts from.
    record_folder : str or Path
        Where the save button writes records.
    site_file : str or Path, optional
        Site file to use instead of the case's own.
    """

    def __init__(self, case_file, record_folder, site_file=None):
        self.case = load_case(case_file)
        self.site = case_site(self.case, site_file)
        self.calc = get_calculation(self.case.kind)
        self.record_folder = Path(record_folder)
        flat = flatten_inputs(self.calc.Inputs, self.case.inputs)
        self._settings = {k: v for k, v in self.case.uncertainty.items() if k in SETTINGS}
        self.form = CaseForm(self.calc.Inputs, flat, headers=tuple(self.site.headers),
                             tolerances={k: v for k, v in self.case.uncertainty.items() if k not in self._settings})
        self.uncertainty = None
        self._bands = widgets.HTML()
        self._bands.add_class("steamcalc-bands")
        self._tornado = widgets.Output()
        self._bands_button = widgets.Button(description="Compute bands", icon="random")
        self._bands_button.add_class("steamcalc-bands-button")
        self._bands_button.on_click(lambda _: self.compute_uncertainty())
        self.record = None
        self.result = None
        self.inputs = None
        self.error = None
        self._results_html = widgets.HTML()
        self._results_html.add_class("steamcalc-results")
        self._message = widgets.HTML()
        self._message.add_class("steamcalc-message")
        self._chart = widgets.Output()
        self._chart.add_class("steamcalc-chart")
        self._preview = widgets.Output()
        self._table = widgets.HTML()
        self._table.add_class("steamcalc-table")
        self._save_button = widgets.Button(description="Save record", icon="save", button_style="primary")
        self._save_button.add_class("steamcalc-save")
        self._save_status = widgets.HTML()
        self._save_status.add_class("steamcalc-save-status")
        self._save_button.on_click(lambda _: self._on_save())
        self._revision = widgets.Text(value=self.case.revision, description="Revision",
                                      continuous_update=False, style={"description_width": "15em"},
                                      tooltip="Raise the revision to issue changed inputs as a new record")
        self._revision.add_class("steamcalc-revision")
        self._revision.observe(lambda change: self._set_revision(), names="value")
        self._sketch, self._case_saver = SketchView(), CaseSaver(self)  # process sketch; "Save case file"
        self.form.observe(self.update)
        self.update()

    @classmethod
    def open(cls, case_file, record_folder, site_file=None):
        """A Workbook for a case file; when the file cannot be used, a stand-in whose every view
        shows why (so the notebook's later cells show the message too, not a traceback)."""
        try:
            return cls(case_file, record_folder, site_file)
        except SteamcalcError as exc:
            return UnavailableWorkbook(str(exc))

    # -- computing -------------------------------------------------------------------
    def update(self):
        """Recompute from the form; show the result, or the error beside the form."""
        try:
            inputs, given = parse_inputs(self.calc.Inputs, self.form.values(), self.site)
            self.case = dataclasses.replace(self.case, uncertainty={**self.form.tolerances(), **self._settings})
            record, result = record_for_case(self.case, self.site, inputs=inputs, given=given, with_uncertainty=False)
            if self.case.uncertainty:
                from ..uncertainty import parse_tolerances
                parse_tolerances(self.calc.Inputs, self.case.uncertainty, inputs)
        except SteamcalcError as exc:
            self.error = str(exc).replace(f"{self.case.path}: ", "")
            self._message.value = (f"<div style='color:#a3201b'><b>Input not accepted:</b> "
                                   f"{html.escape(self.error)}</div><div>Results below are for the last "
                                   "accepted inputs.</div>")
            self._sketch.mark_stale()
            return
        self.error = None
        self.inputs, self.record, self.result = inputs, record, result
        self._given = given
        self.uncertainty = None
        self._bands.value = ("<i>Inputs changed: press <b>Compute bands</b> for the uncertainty bands.</i>"
                             if self.case.uncertainty else "<i>No ± tolerances given.</i>")
        self._tornado.outputs = ()
        self._message.value = ""
        self._results_html.value = self._results_table()
        self._draw_chart()
        self._draw_table()
        self._draw_preview()
        self._sketch.draw(self.record)

    def _set_revision(self):
        revision = self._revision.value.strip()
        if not is_file_name_part(revision):
            self._message.value = ("<div style='color:#a3201b'><b>Revision not accepted:</b> letters, digits, "
                                   "'.', '_' and '-' only</div>")
            return
        self.case = dataclasses.replace(self.case, revision=revision)
        self.update()

    def compute_uncertainty(self):
        """Run the Monte Carlo bands and the sensitivity for the current inputs and tolerances."""
        if self.error is not None or not self.case.uncertainty:
            return None
        try:
            # The record runs the Monte Carlo once; its section is what the workbook shows.
            self.record, self.result = record_for_case(self.case, self.site, inputs=self.inputs, given=self._given)
        except SteamcalcError as exc:
            self._bands.value = f"<div style='color:#a3201b'>{html.escape(str(exc).replace(f'{self.case.path}: ', ''))}</div>"
            return None
        u = self.uncertainty = self.record.get("uncertainty")
        if u is None:
            return None
        rows = "".join(
            f"<tr><td>{html.escape(k)}</td><td style='text-align:right'>{html.escape(format_number(b['nominal']))}</td>"
            f"<td style='text-align:right'>{html.escape(format_number(b.get('low', b['p05'])))}</td>"
            f"<td style='text-align:right'>{html.escape(format_number(b.get('high', b['p95'])))}</td>"
            f"<td>{html.escape(format_unit(b['unit'], pressure_basis(self.record, 'results', k)))}</td></tr>" for k, b in u["bands"].items())
        lines = "".join(f"<li>{html.escape(line)}</li>" for line in u["summary"])
        coverage = f"{100 * u.get('coverage', 0.9):g} % coverage"
        self._bands.value = (f"<ul>{lines}</ul><table><tr><th>result</th><th>nominal</th><th>low end, {coverage}</th>"
                             f"<th>high end, {coverage}</th><th>unit</th></tr>{rows}</table>"
                             f"<div><small>{u['samples']} samples, seed {u['seed']}, {u['valid_samples']} valid</small></div>")
        figure = tornado_chart(u, self.calc)
        self._tornado.outputs = ({"output_type": "display_data", "metadata": {},
                                  "data": {"application/vnd.plotly.v1+json": figure_json(figure),
                                           "text/plain": "tornado chart"}},)
        self._draw_preview()
        return u

    def _results_table(self):
        r = display_record(self.record)
        colour = _STATUS_COLOURS[r["status"]]
        rows = "".join(
            f"<tr><td>{html.escape(v.get('label', k))}</td><td style='text-align:right'>"
            f"<b>{html.escape(format_number(v['value']))}</b></td><td>"
            f"{html.escape(format_unit(v.get('unit', ''), pressure_basis(r, 'results', k)))}"
            f"</td></tr>" for k, v in r["results"].items())
        checks = "".join(
            f"<tr><td style='color:{_STATUS_COLOURS[c['status']]};font-weight:bold'>{c['status'].upper()}</td>"
            f"<td>{html.escape(c['name'])}</td><td>{html.escape(c['detail'])}</td></tr>" for c in r["checks"])
        return (f"<div style='font-weight:bold;color:{colour}'>Overall: {r['status'].upper()}</div>"
                f"<table style='border-collapse:collapse'>{rows}</table>"
                f"<h4>Checks</h4><table>{checks}</table>")

    def _draw_chart(self):
        # Output widgets are filled through their state, not by capturing display calls,
        # so that headless runs (papermill, nbval) see no stray outputs in the cell.
        figures = chart_for(self.case.kind, self.inputs, self.result)
        self._chart.outputs = tuple(
            {"output_type": "display_data", "metadata": {},
             "data": {"application/vnd.plotly.v1+json": figure_json(figure), "text/plain": "chart"}}
            for figure in figures)

    def _draw_table(self):
        tables = table_for(self.case.kind, self.inputs, self.result)
        if not tables:
            self._table.value = ""
            return
        if not isinstance(tables, dict):
            self._table.value = _html_table(tables)
            return
        self._table.value = "".join(f"<h4>{html.escape(heading)}</h4>{_html_table(rows)}"
                                    for heading, rows in tables.items() if rows)

    def _draw_preview(self):
        self._preview.outputs = ({"output_type": "display_data", "metadata": {},
                                  "data": {"text/markdown": render_markdown(self.record),
                                           "text/plain": "record preview"}},)

    # -- views for the notebook's cells ---------------------------------------------
    def form_view(self):
        """The input form with its message line."""
        return widgets.VBox([widgets.HTML(f"<b>{html.escape(self.case.id)}</b> {html.escape(self.case.title)}"),
                             self._revision, self.form.view, self._message])

    def results_view(self):
        """Results and checks; they update when an input changes."""
        return self._results_html

    def chart_view(self):
        return self._chart

    def preview_view(self):
        return self._preview

    def table_view(self):
        """The kind's table (the flash stages), updating with the inputs."""
        return self._table

    def uncertainty_view(self):
        """Bands and the tornado chart; computed on the button (a Monte Carlo run takes about a second)."""
        return widgets.VBox([self._bands_button, self._bands, self._tornado])

    def save_view(self):
        return widgets.HBox([self._save_button, self._save_status])

    def sketch_view(self):
        """The process sketch with the computed state at each point (follows the inputs)."""
        return self._sketch.view

    def save_case_view(self):
        """The "Save case file" button: the edited inputs as a new case file or revision."""
        return self._case_saver.view

    def summary(self):
        """Plain-text results and checks (what headless runs print and nbval compares)."""
        if self.record is None:
            return f"no result: {self.error}"
        r = display_record(self.record)
        lines = [f"{r['id']} rev {r['revision']} - {r['title']}", f"overall status: {r['status'].upper()}", ""]
        width = max(len(v.get("label", k)) for k, v in r["results"].items())
        for key, v in r["results"].items():
            unit = format_unit(v.get("unit", ""), pressure_basis(r, "results", key))
            lines.append(f"  {v.get('label', key):<{width}}  {format_number(v['value']):>10} {unit}")
        lines.append("")
        for c in r["checks"]:
            lines.append(f"  [{c['status'].upper()}] {c['name']}: {c['detail']}")
        if self.case.uncertainty:
            if self.uncertainty is None:
                self.compute_uncertainty()
            if self.uncertainty is not None:
                lines.append("")
                lines.append("  uncertainty:")
                lines.extend(f"    {line}" for line in self.uncertainty["summary"])
        return "\n".join(lines)

    # -- saving ----------------------------------------------------------------------
    def save(self):
        """Write the record of the current inputs; return a one-line account of it.

        Never replaces a different record of the same id and revision: that is
        refused with the message to raise the revision.
        """
        if self.record is None or self.error is not None:
            return f"not saved: the inputs are not accepted ({self.error})"
        if self.case.uncertainty and self.uncertainty is None and self.compute_uncertainty() is None:
            return "not saved: the uncertainty bands could not be computed"
        try:
            paths, status = write_record(self.record, self.record_folder, RENDERERS)
        except SteamcalcError as exc:
            return f"not saved: {exc}"
        note = "new file" if status == "written" else "same content as the existing record, kept"
        return f"record {self.record['id']} rev {self.record['revision']} saved: {paths[0]} ({note})"

    def _on_save(self):
        text = self.save()
        colour = "#a3201b" if text.startswith("not saved") else "#2f6b3a"
        self._save_status.value = f"<span style='color:{colour}'>{html.escape(text)}</span>"


def _html_table(rows):
    head = "".join(f"<th style='padding:2px 10px'>{html.escape(str(k))}</th>" for k in rows[0])
    body = "".join("<tr>" + "".join(
        f"<td style='text-align:right;padding:2px 10px'>{html.escape(format_number(v))}</td>" for v in row.values())
        + "</tr>" for row in rows)
    return f"<table><tr>{head}</tr>{body}</table>"


class UnavailableWorkbook:
    """Stands in for a Workbook whose case file could not be used; every view shows why."""

    def __init__(self, message):
        self.message = message

    def _view(self):
        return widgets.HTML(f"<div style='color:#a3201b'><b>Input not accepted:</b> {html.escape(self.message)}"
                            "</div><div>Correct the parameters cell and run all cells again.</div>")

    form_view = results_view = chart_view = preview_view = save_view = table_view = uncertainty_view = _view
    sketch_view = save_case_view = _view

    def summary(self):
        return f"Input not accepted: {self.message}"

    def save(self):
        return f"not saved: {self.message}"
