"""The review workbook: pick a record, re-run it (and cross-check it on the fast IF97 engine), compare it
with an earlier revision, sign it; the register of its folder."""

from __future__ import annotations

import html
from pathlib import Path

import ipywidgets as widgets

from ..errors import SteamcalcError
from ..record import load_record, write_record
from ..report import RENDERERS, format_number, format_unit
from ..review import verify_record
from ..runner import record_for_case_file
from ..signoff import diff_records, sign_record
from .workbook import _install_error_display  # noqa: F401  (bad input shows as a message in any workbook)


class ReviewBook:
    """Review of one record, with the other records of its folder to choose from.

    Parameters
    ----------
    record_file : str or Path
        The record to review.
    case_file : str or Path, optional
        For the demo: the case that issues the record when the record file is missing.
    """

    def __init__(self, record_file, case_file=None):
        self.path = Path(record_file)
        if not self.path.exists() and case_file is not None:
            write_record(record_for_case_file(case_file), self.path.parent, RENDERERS)
        self.folder = self.path.parent
        self.record = load_record(self.path)
        self.outcome = verify_record(self.record)
        self._picker = widgets.Dropdown(options=self._records(), value=self.path.name, description="Record",
                                        layout=widgets.Layout(width="30em"))
        self._picker.observe(lambda change: self._pick(change["new"]), names="value")
        self._table = widgets.HTML()
        self._table.add_class("steamcalc-review-table")
        earlier = [n for n in self._records() if n != self.path.name]
        self._earlier = widgets.Dropdown(options=["(none)"] + earlier, value="(none)", description="Compare with",
                                         layout=widgets.Layout(width="30em"))
        self._earlier.observe(lambda change: self._compare(), names="value")
        self._diff = widgets.HTML()
        self._checker = widgets.Text(description="Checker", placeholder="your name")
        self._key_file = widgets.Text(description="Key file", placeholder="path to your .key (recommended)")
        self._sign_button = widgets.Button(description="Sign as checked", icon="check", button_style="success")
        self._sign_button.on_click(lambda _: self._on_sign())
        self._sign_status = widgets.HTML()
        self._sign_status.add_class("steamcalc-sign-status")
        self._cross_button = widgets.Button(description="Cross-check on the fast engine", icon="exchange",
                                            layout=widgets.Layout(width="18em"),
                                            tooltip="Recompute on seuif97, a second, independent IAPWS-IF97 "
                                                    "implementation, and show the largest difference")
        self._cross_button.on_click(lambda _: self._on_cross_check())
        self._cross_status = widgets.HTML()
        self._cross_status.add_class("steamcalc-cross-check")
        self._show()

    @classmethod
    def open(cls, record_file, case_file=None):
        """A ReviewBook, or a stand-in that shows why the record cannot be reviewed."""
        try:
            return cls(record_file, case_file)
        except SteamcalcError as exc:
            from .workbook import UnavailableWorkbook
            return UnavailableWorkbook(str(exc))

    def _records(self):
        return sorted(p.name for p in self.folder.glob("*.json"))

    def _pick(self, name):
        self.path = self.folder / name
        self.record = load_record(self.path)
        self.outcome = verify_record(self.record)
        self._cross_status.value = ""
        self._show()
        self._compare()

    def _show(self):
        o = self.outcome
        rows = "".join(
            f"<tr><td>{html.escape(c.key)}</td><td style='text-align:right'>{html.escape(format_number(c.recorded))}</td>"
            f"<td style='text-align:right'>{html.escape(format_number(c.recomputed))}</td>"
            f"<td>{html.escape(format_unit(c.unit))}</td>"
            f"<td>{'' if c.rel_diff is None else f'{c.rel_diff:.1e}'}</td>"
            f"<td style='color:{'#2f6b3a' if c.verdict == 'same' else '#a3201b'}'><b>{c.verdict}</b></td></tr>"
            for c in o.comparisons)
        checks = "".join(f"<li><b>{c['status'].upper()}</b> {html.escape(c['name'])}: {html.escape(c['detail'])}</li>"
                         for c in self.record.get("checks", []))
        self._table.value = (f"<p>{html.escape(self.summary()).replace(chr(10), '<br>')}</p>"
                             f"<table><tr><th>result</th><th>recorded</th><th>recomputed</th><th>unit</th>"
                             f"<th>rel. diff</th><th>verdict</th></tr>{rows}</table><h4>Checks</h4><ul>{checks}</ul>")

    def summary(self):
        """Plain-text verification summary (what headless runs print)."""
        o, r = self.outcome, self.record
        same = sum(1 for c in o.comparisons if c.verdict == "same")
        lines = [f"{r['id']} rev {r['revision']} - {r.get('title', '')}",
                 f"integrity: {'intact' if o.digest_ok and o.content_digest_ok else 'EDITED - digest does not match'}",
                 f"reproduction: {same} of {len(o.comparisons)} results reproduced"
                 + ("" if not o.check_changes else f"; {len(o.check_changes)} check changes"),
                 f"record status: {r.get('status', '').upper()}; checked by: {_signers(r)}",
                 f"verdict: {'VERIFIED' if o.ok else 'FAILED'}"]
        if o.error:
            lines.insert(2, f"reproduction not possible: {o.error}")
        for name, (then, now) in o.version_changes.items():
            lines.append(f"version: {name} {then} in the record, {now} here")
        return "\n".join(lines)

    # -- the register of the folder -------------------------------------------------------
    #: Filter name -> which register rows it keeps.
    REGISTER_FILTERS = {
        "all records": lambda row: True,
        "not current or not valid": lambda row: not row.ok,
        "current and valid": lambda row: row.ok,
        "not signed": lambda row: row.signatures == "not signed",
    }

    def register(self, show="all records"):
        """The register of this record's folder (every record recomputed), filtered; a list of rows."""
        from ..register import build_register

        self._register_rows = build_register(self.folder)
        return [row for row in self._register_rows if self.REGISTER_FILTERS[show](row)]

    def register_view(self):
        """The register as a table with a filter; built when asked (it recomputes every record)."""
        from ..register import register_table_html

        table = widgets.HTML()
        table.add_class("steamcalc-register")
        show = widgets.Dropdown(options=list(self.REGISTER_FILTERS), value="all records", description="Show")
        build = widgets.Button(description="Build the register", icon="list")

        def redraw(_=None):
            rows = getattr(self, "_register_rows", None)
            if rows is None:
                table.value = "<p>Build the register to see every record of this folder.</p>"
                return
            kept = [row for row in rows if self.REGISTER_FILTERS[show.value](row)]
            table.value = (f"<p>{len(kept)} of {len(rows)} records shown; {sum(r.current for r in rows)} current, "
                           f"{sum(r.valid for r in rows)} valid.</p>" + register_table_html(kept))

        def rebuild(_):
            try:
                self.register()
            except SteamcalcError as exc:
                table.value = f"<p>{html.escape(str(exc))}</p>"
                return
            redraw()

        build.on_click(rebuild)
        show.observe(redraw, names="value")
        redraw()
        return widgets.VBox([widgets.HBox([build, show]), table])

    def cross_check(self):
        """Recompute the record on the fast engine (seuif97); return the outcome in words."""
        o = verify_record(self.record, engine="fast")
        if o.error:
            return f"cross-check on the fast engine not possible: {o.error}"
        same = sum(1 for c in o.comparisons if c.verdict == "same")
        largest = o.largest_difference
        lines = [f"cross-check on the fast engine (seuif97): {same} of {len(o.comparisons)} results agree "
                 "within the verification tolerance"
                 + ("" if not o.check_changes else f"; {len(o.check_changes)} check changes")]
        if largest is not None:
            lines.append(f"largest relative difference: {largest.rel_diff:.1e} ({largest.key})")
        lines.extend(o.notes)
        lines.append(f"cross-check: {'AGREES' if o.reproduced else 'DISAGREES'}")
        return "\n".join(lines)

    def _on_cross_check(self):
        self._cross_status.value = f"<p>{html.escape(self.cross_check()).replace(chr(10), '<br>')}</p>"

    def _compare(self):
        if self._earlier.value in (None, "(none)"):
            self._diff.value = ""
            return
        earlier = load_record(self.folder / self._earlier.value)
        rows = diff_records(earlier, self.record)
        body = "".join(f"<tr><td>{html.escape(r['section'])}</td><td>{html.escape(str(r['key']))}</td>"
                       f"<td>{html.escape(format_number(r['old']))}</td><td>{html.escape(format_number(r['new']))}</td>"
                       f"<td>{html.escape(r['unit_label'])}</td><td>{html.escape(format_number(r['change']))}</td></tr>"
                       for r in rows)
        self._diff.value = ("<p>No differences.</p>" if not rows else
                            f"<table><tr><th>section</th><th>item</th><th>{html.escape(self._earlier.value)}</th>"
                            f"<th>{html.escape(self.path.name)}</th><th>unit</th><th>change</th></tr>{body}</table>")

    def _on_sign(self):
        self._sign_status.value = html.escape(self.sign(self._checker.value, self._key_file.value.strip() or None))

    def sign(self, checker, key_file=None, role="checked", passphrase_file=None):
        """Sign the record (after a passing verification); return what happened.

        With ``key_file`` it is signed with the signer's key (:func:`steamcalc.signing.sign_with_key`);
        without, it is the sign-off by name only, which proves nothing about who signed.
        """
        try:
            if key_file:
                from ..signing import sign_with_key
                signed = sign_with_key(self.path, key_file, role, checker or None, passphrase_file)
            else:
                from ..signing import name_only_refusal
                if name_only_refusal(self.record):
                    return f"not signed: {name_only_refusal(self.record)}"
                signed = sign_record(self.path, self.record, checker)
        except SteamcalcError as exc:
            return f"not signed: {exc}"
        self.record = signed
        self.outcome = verify_record(signed)
        self._show()
        if key_file:
            entry = signed["signatures"][-1]
            return f"{entry['role']}, signed by {entry['name']} with key {entry['fingerprint'][7:19]}… on {entry['date']}: {self.path}"
        return f"signed by {signed['checked_by']} on {signed['signoff']['date']}: {self.path}"

    # -- views -------------------------------------------------------------------------
    def verification_view(self):
        return widgets.VBox([self._picker, self._table, self._cross_button, self._cross_status])

    def comparison_view(self):
        return widgets.VBox([self._earlier, self._diff])

    def sign_view(self):
        return widgets.VBox([self._key_file, widgets.HBox([self._checker, self._sign_button]), self._sign_status])


def _signers(record):
    """Who signed, as the summary says it: keyed signatures with their key, else the name-only sign-off."""
    signatures = record.get("signatures") or []
    if signatures:
        return "; ".join(f"{s.get('name')} ({s.get('role')}, key {str(s.get('fingerprint'))[7:19]}…)" for s in signatures)
    if record.get("checked_by"):
        return f"{record['checked_by']} (name only, no key)"
    return "not yet checked"
