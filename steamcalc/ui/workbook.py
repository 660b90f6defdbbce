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
import os
from pathlib import Path

import ipywidgets as widgets

from ..calcs import get_calculation
from ..properties.engines import remembering_states
from ..render.display import display_record, pressure_basis
from ..errors import RecordConflictError, SteamcalcError
from ..records.record import IssuedRecords, write_record
from ..render.report import RENDERERS, format_number, format_unit, render_markdown
from ..records.build import record_for_case
from ..cases.site import case_site, flatten_inputs, is_file_name_part, load_case, parse_inputs
from ..runs.uncertainty import SETTINGS
from .charts import figure_json, record_chart_json, table_for, tornado_chart
from .feedback import STALE_CLASS, STALE_STYLE, STALE_TEXT, SummaryView, file_link
from .forms import CaseForm, alternatives_for
from .linked_cases import issue_linked_records
from .progress import ProgressLine
from .save_case import CaseSaver
from .sketch_view import SketchView

def _shown(entry):
    """A result's number as the report shows it (display_record's figures, % for fractions)."""
    return entry.get("shown") or format_number(entry["value"])


def _shown_unit(record, key, entry):
    return entry.get("shown_unit") or format_unit(entry.get("unit", ""), pressure_basis(record, "results", key))


_STATUS_COLOURS = {"pass": "#2f6b3a", "warn": "#8a5a00", "fail": "#a3201b", "notice": "#4a4f55"}

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
        # Run All shows what is being computed while it runs (in a notebook someone has open; headless, nothing).
        self._progress = ProgressLine(live=interactive_session())
        try:
            self._open(case_file, record_folder, site_file)
        except SteamcalcError:
            self._progress.done(f"{Path(case_file).name} not opened (the reason is below)")
            raise
        self._progress.done(f"{self.case.id} computed" if self.error is None else f"{self.case.id} not computed")
        self._progress = None

    def _open(self, case_file, record_folder, site_file):
        self._progress.step(f"reading the case file {Path(case_file).name}")
        self.case = load_case(case_file)
        self.site = case_site(self.case, site_file)
        self.calc = get_calculation(self.case.kind)
        self.record_folder = Path(record_folder)
        flat = flatten_inputs(self.calc.Inputs, self.case.inputs)
        #: Records the case links that were not issued yet, issued first into the record folder (as a site run would).
        self.issued = []
        if hasattr(self.calc, "linked_record_problems"):
            self._progress.step("issuing the records the case links that are not issued yet")
            self.issued = issue_linked_records(
                lambda: parse_inputs(self.calc.Inputs, flat, self.site, self.case.path, IssuedRecords(self.record_folder)),
                Path(self.case.path).parent, self.record_folder)
        self._progress.step(f"building the form ({len(flat)} inputs given)")
        self._settings = {k: v for k, v in self.case.uncertainty.items() if k in SETTINGS}
        self.form = CaseForm(self.calc.Inputs, flat, headers=tuple(self.site.headers),
                             tolerances={k: v for k, v in self.case.uncertainty.items() if k not in self._settings},
                             alternatives=alternatives_for(self.calc), system=self.site.display_units)
        self._banners = []
        self._summary = SummaryView(self._summary_text)
        self._summary.add_class("steamcalc-summary")
        self.uncertainty = None
        self._bands = widgets.HTML()
        self._bands.add_class("steamcalc-bands")
        self._tornado = widgets.Output()
        self._bands_button = widgets.Button(description="Compute bands", icon="random",
                                            tooltip="Run the Monte Carlo bands and the sensitivity for these inputs")
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
        self._preview.add_class("steamcalc-preview")
        self._table = widgets.HTML()
        self._table.add_class("steamcalc-table")
        # The button keeps its size whatever the message beside it says (a long refusal once squeezed it to
        # "Sav…"); the message takes the rest of the line and wraps.
        self._save_button = widgets.Button(description="Save record", icon="save", button_style="primary",
                                           layout=widgets.Layout(width="12em", min_width="12em", flex="0 0 auto"))
        self._save_button.add_class("steamcalc-save")
        self._save_status = widgets.HTML(layout=widgets.Layout(flex="1 1 auto", min_width="0", width="auto"))
        self._save_status.add_class("steamcalc-save-status")
        self._save_status.value = "".join(f"<div>{html.escape(line)}</div>" for line in self.issued)
        self._save_button.on_click(lambda _: self._on_save())
        # Offered when the revision already holds another record: raise the Revision box to the next free one and
        # save (as the case-file save offers).
        self._save_next = widgets.Button(description="", icon="arrow-up",
                                         layout=widgets.Layout(display="none", width="16em", min_width="16em",
                                                               flex="0 0 auto"))
        self._save_next.add_class("steamcalc-save-next")
        self._save_next.on_click(lambda _: self._save_as_next())
        self._next_revision = None
        self._revision = widgets.Text(value=self.case.revision, description="Revision",
                                      continuous_update=False, style={"description_width": "15em"},
                                      tooltip="Raise the revision to issue changed inputs as a new record")
        self._revision.add_class("steamcalc-revision")
        self._revision.observe(lambda change: self._set_revision(), names="value")
        self._sketch, self._case_saver = SketchView(), CaseSaver(self)  # process sketch; "Save case file"
        self._revision_message = widgets.HTML()
        self._revision_message.add_class("steamcalc-field-message-revision")
        #: The states this workbook's engine has evaluated: an input changed leaves most of them as they were.
        self._states = {}
        self._shown = (None, None)
        #: The charts drawn, by their figure data: a chart whose data did not change is not drawn again.
        self._drawn = {}
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
        """Recompute from the form; show the result, or the error beside the form.

        The results and checks (and the summary) are shown first, then the charts, the table, the sketch and
        the record preview: after Enter the numbers change before the drawings are made.
        """
        progress = self._progress
        if progress is not None:
            progress.step(f"computing {self.case.id} ({self.calc.TITLE.lower()}) on IF97")
        try:
            # A linked record (a main's supply let-down) is read from the case's links folder or the record folder.
            inputs, given = parse_inputs(self.calc.Inputs, self.form.values(), self.site, self.case.path,
                                         IssuedRecords(self.record_folder))
            self.case = dataclasses.replace(self.case, uncertainty={**self.form.tolerances(), **self._settings})
            with remembering_states(self._states):
                record, result = record_for_case(self.case, self.site, inputs=inputs, given=given,
                                                 with_uncertainty=False)
            if self.case.uncertainty:
                from ..runs.uncertainty import parse_tolerances
                parse_tolerances(self.calc.Inputs, self.case.uncertainty, inputs)
        except SteamcalcError as exc:
            self._refused(exc)
            return
        self.error = None
        self.form.clear_errors()
        self._mark_stale(False)
        self.inputs, self.record, self.result = inputs, record, result
        self._given = given
        self.uncertainty = None
        self._bands.value = ("<i>Inputs changed: press <b>Compute bands</b> for the uncertainty bands.</i>"
                             if self.case.uncertainty else "<i>No ± tolerances given.</i>")
        self._tornado.outputs = ()
        self._message.value = ""
        self._results_body = self._results_table()
        self._results_html.value = self._results_body
        self._summary.refresh()
        if progress is not None:
            progress.step("drawing the charts, the table, the process sketch and the record preview")
        self._draw_chart()
        self._draw_table()
        self._sketch.draw(self.record)
        self._draw_preview()

    def _display(self):
        """The record as shown (:func:`display_record`), made once per record."""
        record, shown = self._shown
        if record is not self.record:
            shown = display_record(self.record)
            self._shown = (self.record, shown)
        return shown

    def _refused(self, exc):
        """Show a refused input beside its box (or under the form) and mark every result view stale."""
        shown_at = self.form.show_error(exc)
        if shown_at is not None:
            label = self.form.labels[shown_at]
            self.error = self.form.refusal(exc)
            where = f"the <b>{html.escape(label)}</b> box (marked in red)"
        else:
            self.error = self.form.words.text(str(exc).replace(f"{self.case.path}: ", ""))
            where = "the inputs"
        self._message.value = (f"<div class='steamcalc-refused' style='color:#a3201b'><b>Input not accepted:</b> "
                               f"{html.escape(self.error)}</div><div>Correct {where}; the results, charts and "
                               "preview below are for the last accepted inputs until then.</div>")
        self._mark_stale(True)
        self._sketch.mark_stale()
        self._summary.refresh()

    @staticmethod
    def _banner_html():
        return (f"<div style='color:#a3201b;font-weight:bold;border-left:4px solid #a3201b;padding:2px 8px'>"
                f"{html.escape(STALE_TEXT)}</div>")

    def _stale_banner(self):
        banner = widgets.HTML(self._banner_html(), layout=widgets.Layout(display="none"))
        banner.add_class("steamcalc-stale-banner")
        self._banners.append(banner)
        if self.error is not None:
            self._mark_stale(True)
        return banner

    def _mark_stale(self, stale):
        body = getattr(self, "_results_body", "")
        self._results_html.value = (f"<div class='steamcalc-stale-banner'>{self._banner_html()}</div>"
                                    f"<div class='steamcalc-stale-content'>{body}</div>") if stale else body
        for view in (self._results_html, self._chart, self._table, self._preview, self._bands, self._tornado):
            (view.add_class if stale else view.remove_class)(STALE_CLASS)
        for banner in self._banners:
            banner.layout.display = None if stale else "none"
            (banner.add_class if stale else banner.remove_class)(STALE_CLASS)
        self._save_button.disabled = stale
        self._bands_button.disabled = stale

    def _set_revision(self):
        revision = self._revision.value.strip()
        if not is_file_name_part(revision):
            self._revision.add_class("steamcalc-input-refused")
            self._revision_message.value = (
                "<div class='steamcalc-refused' style='color:#a3201b'><b>Revision not accepted:</b> letters, digits, "
                "'.', '_' and '-' only (e.g. B or 2). Fix: type a revision such as B in the Revision box.</div>")
            self._save_button.disabled = True
            return
        self._revision.remove_class("steamcalc-input-refused")
        self._revision_message.value = ""
        self._save_next.layout.display = "none"   # an offered revision is for the revision it was offered after
        self._save_button.disabled = self.error is not None
        self.case = dataclasses.replace(self.case, revision=revision)
        self._save_status.value = ""
        self.update()

    def compute_uncertainty(self):
        """Run the Monte Carlo bands and the sensitivity for the current inputs and tolerances.

        The button is disabled and says "computing…" while it runs, so a second press cannot
        queue a second run.
        """
        if self.error is not None or not self.case.uncertainty:
            return None
        button = self._bands_button
        description, before = button.description, self._bands.value
        # The note first, then the button: the browser applies the updates in order, so a disabled
        # "computing…" button never stands beside the previous bands.
        self._tornado.outputs = ()
        self._bands.value = ("<div class='steamcalc-computing-note'><i>computing… the Monte Carlo bands "
                             f"({self._settings.get('samples', 'the default number of')} samples) and the "
                             "sensitivity; this takes a few seconds.</i></div>")
        button.disabled, button.description = True, "computing…"
        button.add_class("steamcalc-computing")
        try:
            return self._compute_uncertainty(before)
        finally:
            button.description = description
            button.remove_class("steamcalc-computing")
            button.disabled = self.error is not None

    def _compute_uncertainty(self, before):
        try:
            # The record runs the Monte Carlo once; its section is what the workbook shows.
            with remembering_states(self._states):
                self.record, self.result = record_for_case(self.case, self.site, inputs=self.inputs, given=self._given)
        except SteamcalcError as exc:
            self._bands.value = f"<div style='color:#a3201b'>{html.escape(str(exc).replace(f'{self.case.path}: ', ''))}</div>"
            return None
        u = self.uncertainty = self.record.get("uncertainty")
        if u is None:
            self._bands.value = before
            return None
        shown = self._display()["uncertainty"]
        rows = "".join(
            f"<tr><td>{html.escape(b['label'])}</td><td style='text-align:right'>{html.escape(b['shown']['nominal'])}</td>"
            f"<td style='text-align:right'>{html.escape(b['shown']['low'])}</td>"
            f"<td style='text-align:right'>{html.escape(b['shown']['high'])}</td>"
            f"<td>{html.escape(b['shown_unit'])}</td></tr>" for b in shown["bands"].values())
        lines = "".join(f"<li>{html.escape(line)}</li>" for line in shown.get("shown_summary", u["summary"]))
        coverage = f"{100 * u.get('coverage', 0.9):g} % coverage"
        self._bands.value = (f"<ul>{lines}</ul><table><tr><th>result</th><th>nominal</th><th>low end, {coverage}</th>"
                             f"<th>high end, {coverage}</th><th>unit</th></tr>{rows}</table>"
                             f"<div><small>{u['samples']} samples, seed {u['seed']}, {u['valid_samples']} valid</small></div>")
        figure = tornado_chart(u, self.calc, self.site.display_units)
        self._tornado.outputs = ({"output_type": "display_data", "metadata": {},
                                  "data": {"application/vnd.plotly.v1+json": figure_json(figure),
                                           "text/plain": "tornado chart"}},)
        self._draw_preview()
        self._summary.refresh()
        return u

    def _results_table(self):
        r = self._display()
        colour = _STATUS_COLOURS[r["status"]]
        rows = "".join(
            f"<tr><td>{html.escape(v.get('label', k))}</td><td style='text-align:right'>"
            f"<b>{html.escape(_shown(v))}</b></td><td>"
            f"{html.escape(_shown_unit(r, k, v))}"
            f"</td></tr>" for k, v in r["results"].items())
        checks = "".join(
            f"<tr><td style='color:{_STATUS_COLOURS[c['shown_status']]};font-weight:bold'>{c['shown_status'].upper()}</td>"
            f"<td>{html.escape(c['name'])}</td><td>{html.escape(c['detail'])}</td></tr>" for c in r["checks"])
        return (f"<div style='font-weight:bold;color:{colour}'>Overall: {r['status'].upper()}</div>"
                f"<table style='border-collapse:collapse'>{rows}</table>"
                f"<h4>Checks</h4><table>{checks}</table>")

    def _draw_chart(self):
        # Output widgets are filled through their state, not by capturing display calls,
        # so that headless runs (papermill, nbval) see no stray outputs in the cell.
        charts, missing = record_chart_json(self.record, self._drawn)
        self._chart.outputs = tuple(
            {"output_type": "display_data", "metadata": {},
             "data": {"application/vnd.plotly.v1+json": chart, "text/plain": "chart"}}
            for chart in charts) + tuple(
            {"output_type": "display_data", "metadata": {},
             "data": {"text/html": f"<p><small>{html.escape(reason)}</small></p>", "text/plain": reason}}
            for reason in missing)

    def _draw_table(self):
        tables = table_for(self.case.kind, self.inputs, self.result, self.site.display_units)
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
        return widgets.VBox([widgets.HTML(STALE_STYLE + f"<b>{html.escape(self.case.id)}</b> "
                                          f"{html.escape(self.case.title)}"),
                             widgets.HBox([self._revision, self._revision_message]), self.form.view, self._message])

    def summary_view(self):
        """The summary as live text: it follows every change of the form (and says when an input is refused).

        Run headless, it shows as the plain text of :meth:`summary` (what nbval compares).
        """
        return self._summary

    def results_view(self):
        """Results and checks; they update when an input changes."""
        return self._results_html

    def chart_view(self):
        return widgets.VBox([self._stale_banner(), self._chart])

    def preview_view(self):
        return widgets.VBox([self._stale_banner(), self._preview])

    def table_view(self):
        """The kind's table (the flash stages), updating with the inputs."""
        return widgets.VBox([self._stale_banner(), self._table])

    def uncertainty_view(self):
        """Bands and the tornado chart; computed on the button (a Monte Carlo run takes about a second)."""
        return widgets.VBox([self._stale_banner(), self._bands_button, self._bands, self._tornado])

    def save_view(self):
        """The Save record button, the revision it offers after a refusal, and what happened."""
        return widgets.HBox([self._save_button, self._save_next, self._save_status],
                            layout=widgets.Layout(width="100%", align_items="flex-start"))

    def sketch_view(self):
        """The process sketch with the computed state at each point (follows the inputs)."""
        return self._sketch.view

    def save_case_view(self):
        """The "Save case file" button: the edited inputs as a new case file or revision."""
        return self._case_saver.view

    def _summary_text(self):
        text = self.summary(compute_bands=False)
        if self.error is not None and self.record is not None:
            text = (f"INPUT NOT ACCEPTED - {self.error}\n"
                    "The summary below is for the last accepted inputs.\n\n" + text)
        return text

    def summary(self, compute_bands=True):
        """Plain-text results and checks (what headless runs print and nbval compares)."""
        if self.record is None:
            return f"no result: {self.error}"
        r = self._display()
        lines = [f"{r['id']} rev {r['revision']} - {r['title']}", f"overall status: {r['status'].upper()}", ""]
        width = max(len(v.get("label", k)) for k, v in r["results"].items())
        for key, v in r["results"].items():
            lines.append(f"  {v.get('label', key):<{width}}  {_shown(v):>10} {_shown_unit(r, key, v)}".rstrip())
        lines.append("")
        for c in r["checks"]:
            lines.append(f"  [{c['shown_status'].upper()}] {c['name']}: {c['detail']}")
        if self.case.uncertainty:
            if self.uncertainty is None and compute_bands:
                self.compute_uncertainty()
            if self.uncertainty is None and not compute_bands:
                lines.extend(["", "  uncertainty: press Compute bands for the bands of these inputs"])
            if self.uncertainty is not None:
                lines.append("")
                lines.append("  uncertainty:")
                lines.extend(f"    {line}" for line in self.uncertainty["summary"])
        return "\n".join(lines)

    # -- saving ----------------------------------------------------------------------
    def save(self):
        """Write the record of the current inputs; return a one-line account of it.

        Never replaces a different record of the same id and revision: that is refused with the next free
        revision offered. What the notebook's save cell calls when the workbook runs headless (papermill,
        nbval, ``steamcalc run --notebook``). In a notebook someone has open in JupyterLab, Run All never
        saves a record by itself: the record is saved when *Save record* is pressed, so nothing is written
        that the engineer has not looked at; this then says so and saves nothing.
        """
        if interactive_session():
            return (f"not saved by Run All: press Save record below to issue {self.case.id} rev "
                    f"{self.case.revision} once you have checked the results (a notebook open in JupyterLab never "
                    "saves a record by itself)")
        saved = self._save()
        return saved[0]

    def next_free_revision(self):
        """The first revision after the one in the Revision box that no record of this id in the record folder
        and no case file beside the case holds (A → B, Z → AA, 1 → 2)."""
        from ..cases.casefile_writer import case_file_name, next_revision

        case_folder = Path(self.case.path).parent if getattr(self.case, "path", None) else None
        candidate = next_revision(self.case.revision)
        for _ in range(1000):
            taken = (self.record_folder / f"{self.case.id}_rev{candidate}.json").exists() or (
                case_folder is not None and (case_folder / case_file_name(self.case.id, candidate)).exists())
            if not taken:
                return candidate
            candidate = next_revision(candidate)
        return candidate

    def _save(self):
        """(text, paths, status): status is "written", "unchanged" or "refused"."""
        if self.record is None or self.error is not None:
            return (f"not saved: the inputs are not accepted ({self.error}); fix the input marked in the form",
                    [], "refused")
        if self.case.uncertainty and self.uncertainty is None and self.compute_uncertainty() is None:
            return "not saved: the uncertainty bands could not be computed", [], "refused"
        name = f"record {self.record['id']} rev {self.record['revision']}"
        try:
            paths, status = write_record(self.record, self.record_folder, RENDERERS)
        except RecordConflictError as exc:
            if "already exists with different content" not in exc.message:
                return f"not saved: {exc}", [], "refused"
            self._next_revision = self.next_free_revision()
            return (f"not saved: {name} already exists with different inputs or results ({exc.source}). "
                    f"Fix: save them as revision {self._next_revision} (the next free one; the button beside offers "
                    "it), or raise the Revision box above the form to another, to issue the changed inputs as a "
                    "new record; the existing record is kept as it is.", [], "refused")
        except SteamcalcError as exc:
            return f"not saved: {exc}", [], "refused"
        if status == "written":
            return f"saved: {name}, new file {paths[0]}", paths, status
        return (f"unchanged, kept: {name} is already saved with these same inputs and results; the file "
                f"was left as it is: {paths[0]}", paths, status)

    def _on_save(self):
        self._next_revision = None
        text, paths, status = self._save()
        self._save_status.remove_class("steamcalc-save-refused")
        self._save_status.remove_class("steamcalc-save-unchanged")
        self._save_status.remove_class("steamcalc-save-written")
        self._save_status.add_class(f"steamcalc-save-{status}")
        if status == "refused" and self._next_revision is not None:
            self._save_next.description = f"Save as revision {self._next_revision}"
            self._save_next.layout.display = None
        else:
            self._save_next.layout.display = "none"
        if status == "refused":
            self._save_status.value = (f"<span style='color:#a3201b;white-space:normal'><b>{html.escape(text)}</b>"
                                       "</span>")
            return
        name = f"{html.escape(self.record['id'])} rev {html.escape(self.record['revision'])}"
        if status == "written":
            head = f"<b style='color:#2f6b3a'>&#10004; New record saved</b>: {name}"
        else:
            head = (f"<b style='color:#1d4f91'>&#8635; Unchanged, kept</b>: {name} is already saved with these same "
                    "inputs and results; its files are left as they are")
        links = ", ".join(file_link(p) for p in paths)
        self._save_status.value = (f"<div style='border-left:4px solid {'#2f6b3a' if status == 'written' else '#1d4f91'};"
                                   f"padding:2px 8px'>{head}<br>{links}</div>")

    def _save_as_next(self):
        """Raise the Revision box to the revision the refusal offered, and save under it."""
        if self._next_revision is None:
            return
        self._revision.value = self._next_revision   # the record follows the box (and recomputes)
        self._on_save()


def interactive_session():
    """True in a kernel that a Jupyter server started for a notebook someone has open (JupyterLab, Notebook):
    the server names the notebook in the kernel's ``JPY_SESSION_NAME``. Headless runs (papermill, nbval,
    ``steamcalc run --notebook``) start their kernels themselves, without it.

    Examples
    --------
    >>> import os
    >>> interactive_session() == bool(os.environ.get("JPY_SESSION_NAME"))
    True
    """
    return bool(os.environ.get("JPY_SESSION_NAME"))


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

    def summary_view(self):
        view = SummaryView(self.summary)
        view.refresh()
        return view

    def summary(self):
        return f"Input not accepted: {self.message}"

    def save(self):
        return f"not saved: {self.message}"
