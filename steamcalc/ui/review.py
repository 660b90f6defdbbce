"""The review workbook: pick a record, re-run it (and cross-check it on the fast IF97 engine), compare it
with an earlier revision, sign it; the register of its folder."""

from __future__ import annotations

import html
import re
from pathlib import Path

import ipywidgets as widgets

from ..errors import SteamcalcError
from ..records.record import load_record, write_record
from ..render.report import RENDERERS, format_number, format_unit
from ..review.verify import verify_record
from ..records.build import record_for_case_file
from ..review.diff import diff_records, diff_summary
from .feedback import SummaryView, file_link
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
        names = self._records()
        if self.path.name not in names:
            names = sorted(names + [self.path.name])
        self._picker = widgets.Dropdown(options=names, value=self.path.name, description="Record",
                                        layout=widgets.Layout(width="36em"), style={"description_width": "7em"})
        self._picker.add_class("steamcalc-record-picker")
        self._picker.observe(lambda change: self._pick(change["new"]), names="value")
        self._pick_status = widgets.HTML()
        self._pick_status.add_class("steamcalc-pick-status")
        self._reverting = False
        self._table = widgets.HTML()
        self._table.add_class("steamcalc-review-table")
        self._earlier = widgets.Dropdown(description="Compare with", layout=widgets.Layout(width="36em"),
                                         style={"description_width": "7em"},
                                         tooltip="Earlier revisions of the record picked above; the comparison "
                                                 "runs from the earlier revision to the picked one")
        self._earlier.add_class("steamcalc-compare-with")
        self._earlier.observe(lambda change: self._compare(), names="value")
        self._diff = widgets.HTML()
        self._diff.add_class("steamcalc-comparison")
        self._offer_earlier()
        self._checker = widgets.Text(description="Checker", placeholder="your name (optional: the key's)")
        self._key_file = widgets.Text(description="Key file", placeholder="path to your private key file (.key)")
        self._passphrase_file = widgets.Text(description="Passphrase", placeholder="file with its passphrase, if any")
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
        self._summary = SummaryView(self.summary, lambda text: f"<p>{_summary_html(text)}</p>")
        self._summary.add_class("steamcalc-review-summary")
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
        if self._reverting or name is None:
            return
        path = self.folder / name
        try:
            record = load_record(path)
            outcome = verify_record(record)
        except SteamcalcError as exc:
            self._refuse_pick(name, exc.message + (f" ({exc.fix})" if exc.fix and "--" not in exc.fix else ""))
            return
        except (OSError, ValueError) as exc:
            self._refuse_pick(name, str(exc))
            return
        self._pick_status.value = ""
        self.path, self.record, self.outcome = path, record, outcome
        self._cross_status.value = ""
        self._sign_status.value = ""
        self._show()
        self._offer_earlier()

    def _refuse_pick(self, name, reason):
        """Say why a picked file cannot be reviewed, and go back to the record that was shown."""
        self._pick_status.value = (
            f"<div class='steamcalc-pick-refused' style='color:#a3201b'><b>{html.escape(name)} cannot be "
            f"reviewed:</b> {html.escape(reason)}. It is not a calculation record steamcalc issued (records are "
            f"the <i>ID_revX.json</i> files that Save record or a batch run writes). Pick a record file; still "
            f"showing {html.escape(self.path.name)}.</div>")
        self._reverting = True
        try:
            self._picker.value = self.path.name
        finally:
            self._reverting = False

    # -- earlier revisions -------------------------------------------------------------
    def earlier_revisions(self):
        """File names of the earlier revisions of the picked record's id in its folder, latest first.

        A file counts when it is a readable record of the same id whose revision sorts before the
        picked one (A < B < ... < Z < AA; 1 < 2 < 10); the picked file itself and its copies never do.
        """
        mine = _revision_key(self.record.get("revision", ""))
        found = []
        for name in self._records():
            if name == self.path.name:
                continue
            try:
                other = load_record(self.folder / name)
            except (SteamcalcError, OSError, ValueError):
                continue
            if other.get("id") != self.record.get("id") or other.get("kind") != self.record.get("kind"):
                continue
            if _revision_key(other.get("revision", "")) < mine:
                # Of two files of one revision, the one under the record's own name comes first.
                own_name = name == f"{other.get('id')}_rev{other.get('revision')}.json"
                found.append((_revision_key(other.get("revision", "")), own_name, other.get("created", ""), name,
                              other.get("revision", "")))
        found.sort(reverse=True)
        return [(name, revision) for *_, name, revision in found]

    def _offer_earlier(self):
        """Rebuild the Compare-with list for the picked record; select its latest earlier revision."""
        earlier = self.earlier_revisions()
        self._earlier_revisions = dict(earlier)
        rid = self.record.get("id", "")
        if earlier:
            options = [(f"{rid} rev {revision}  ({name})", name) for name, revision in earlier]
            options.append(("(no comparison)", ""))
            value = earlier[0][0]
        else:
            options = [(f"(no earlier revision of {rid} in this folder)", "")]
            value = ""
        self._holding_compare = True
        try:
            self._earlier.options = options
            self._earlier.value = value
        finally:
            self._holding_compare = False
        self._compare()

    def _show(self):
        o = self.outcome
        labels = _input_labels(self.record)

        def rows(comparisons):
            return "".join(
                f"<tr><td>{html.escape(_result_label(self.record, c.key, labels))}</td>"
                f"<td style='text-align:right'>{html.escape(format_number(c.recorded))}</td>"
                f"<td style='text-align:right'>{html.escape(format_number(c.recomputed))}</td>"
                f"<td>{html.escape(format_unit(c.unit))}</td>"
                f"<td>{'' if c.rel_diff is None else f'{c.rel_diff:.1e}'}</td>"
                f"<td style='color:{'#2f6b3a' if c.verdict == 'same' else '#a3201b'}'><b>{c.verdict}</b></td></tr>"
                for c in comparisons)
        # As `steamcalc verify` prints it: what differs first, then the governing results; the rest folded away.
        differing = [c for c in o.comparisons if c.verdict != "same"]
        wanted = _summary_results(self.record)
        governing = [c for key in wanted for c in o.comparisons if c.key == key and c.verdict == "same"]
        others = [c for c in o.comparisons if c.verdict == "same" and c not in governing]
        head = ("<tr><th>result</th><th>recorded</th><th>recomputed</th><th>unit</th><th>rel. diff</th>"
                "<th>verdict</th></tr>")
        table = (f"<h4>Differences</h4><table>{head}{rows(differing)}</table>" if differing else
                 "<p><b>Differences: none</b> - every value recomputed from the record's own inputs is as recorded.</p>")
        if governing:
            table += f"<h4>Governing results</h4><table>{head}{rows(governing)}</table>"
        if others:
            table += (f"<details><summary>{len(others)} other values, as recorded</summary>"
                      f"<table>{head}{rows(others)}</table></details>")
        checks = "".join(f"<li><b>{'NOTICE' if c.get('kind') == 'notice' else c['status'].upper()}</b> "
                         f"{html.escape(c['name'])}: {html.escape(c['detail'])}</li>" for c in self.record.get("checks", []))
        self._summary.refresh()
        self._table.value = f"<p>{_summary_html(self.summary())}</p>{table}<h4>Checks</h4><ul>{checks}</ul>"

    def summary(self):
        """Plain-text verification summary (what headless runs print)."""
        o, r = self.outcome, self.record
        same = sum(1 for c in o.comparisons if c.verdict == "same")
        signers, signed_ok, trust = _signers(r, self.path.parent, o.recomputed_status)
        # The verdict first, as `steamcalc verify` prints it.
        lines = [f"{r['id']} rev {r['revision']} - {r.get('title', '')}",
                 f"verdict: {'VERIFIED' if o.ok and signed_ok else 'FAILED'}",
                 f"integrity: {'intact' if o.digest_ok and o.content_digest_ok else 'EDITED - digest does not match'}",
                 f"reproduction: {same} of {len(o.comparisons)} results reproduced"
                 + ("" if not o.check_changes else f"; {len(o.check_changes)} check changes"),
                 f"record status: {r.get('status', '').upper()}; checked by: {signers}"]
        if trust:
            lines.append(f"trusted signers: {trust}")
        if o.error:
            lines.insert(3, f"reproduction not possible: {o.error}")
        for name, (then, now) in o.version_changes.items():
            lines.append(f"version: {name} {then} in the record, {now} here")
        return "\n".join(lines)

    # -- the register of the folder -------------------------------------------------------
    #: Filter name -> which register rows it keeps.
    REGISTER_FILTERS = {
        "all records": lambda row: True,
        "not current or not valid": lambda row: not row.ok,
        "current and valid": lambda row: row.ok,
        "not signed": lambda row: row.signatures.startswith("not signed"),
    }

    def register(self, show="all records"):
        """The register of this record's folder (every record recomputed), filtered; a list of rows."""
        from ..review.register import build_register

        self._register_rows = build_register(self.folder)
        return [row for row in self._register_rows if self.REGISTER_FILTERS[show](row)]

    def register_view(self):
        """The register of the picked record's folder as a table with a filter, as ``steamcalc register`` lists
        it: each record re-verified, its signatures, and whether it is current (not superseded; its case file,
        the site data and the software unchanged; its companions matching). Built when the button is pressed
        (it recomputes every record), so opening the workbook never waits on it."""
        from ..review.register import register_table_html, register_trust

        table = widgets.HTML()
        table.add_class("steamcalc-register")
        show = widgets.Dropdown(options=list(self.REGISTER_FILTERS), value="all records", description="Show")
        show.add_class("steamcalc-register-filter")
        build = widgets.Button(description="Build the register", icon="list", tooltip="Re-verify every record of "
                               "the folder and list them (what steamcalc register prints)",
                               layout=widgets.Layout(width="14em", min_width="14em", flex="0 0 auto"))
        build.add_class("steamcalc-register-build")

        def redraw(_=None):
            rows = getattr(self, "_register_rows", None)
            if rows is None:
                table.value = (f"<p>Press <b>Build the register</b> to list every record of "
                               f"{html.escape(str(self.folder))}, each one re-verified.</p>")
                return
            kept = [row for row in rows if self.REGISTER_FILTERS[show.value](row)]
            try:
                trust = f"<br><small>trusted signers: {html.escape(register_trust(self.folder).describe())}</small>"
            except SteamcalcError as exc:
                trust = f"<br><small>trusted signers: cannot be read ({html.escape(str(exc))})</small>"
            # Links are relative to the notebook's folder, where the kernel runs, so they open from the workbook.
            table.value = (f"<p>{len(kept)} of {len(rows)} records shown; {sum(r.current for r in rows)} current, "
                           f"{sum(r.valid for r in rows)} valid (folder {html.escape(str(self.folder))}).{trust}</p>"
                           + register_table_html(kept, base=Path.cwd()))

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
        """Compare the chosen earlier revision → the picked record (an increase shows as a positive change)."""
        if getattr(self, "_holding_compare", False):
            return
        name = self._earlier.value
        rid = html.escape(self.record.get("id", ""))
        if not name:
            self._diff.value = ("<p>Pick an earlier revision above to see what changed.</p>"
                                if getattr(self, "_earlier_revisions", None) else
                                f"<p>No earlier revision of {rid} in this folder: there is nothing to compare "
                                f"{rid} rev {html.escape(self.record.get('revision', ''))} with.</p>")
            return
        try:
            earlier = load_record(self.folder / name)
        except SteamcalcError as exc:
            self._diff.value = f"<p style='color:#a3201b'>{html.escape(name)} cannot be read: {html.escape(exc.message)}</p>"
            return
        rows = diff_records(earlier, self.record, unchanged=True)
        old_rev, new_rev = html.escape(earlier.get("revision", "")), html.escape(self.record.get("revision", ""))
        title = (f"<p class='steamcalc-comparison-title'><b>{rid} rev {old_rev} → rev {new_rev}</b> "
                 f"(earlier → picked: an increase shows as a positive change; in the rows that differ the earlier "
                 f"value is <span style='{_OLD_STYLE}'>struck through in grey</span> and the picked one "
                 f"<span style='{_NEW_STYLE}'>in bold blue</span>, neither better nor worse)</p>"
                 f"<p class='steamcalc-comparison-summary'>{html.escape(diff_summary(rows))}</p>")
        differing = [r for r in rows if r["status"] != "same"]
        if not differing:
            self._diff.value = title + f"<p>No differences between rev {old_rev} and rev {new_rev}.</p>"
            return
        head = (f"<tr><th></th><th>item</th><th>rev {old_rev} (earlier)</th><th>rev {new_rev} (picked)</th>"
                f"<th>unit</th><th>change (rev {new_rev} − rev {old_rev})</th><th>key</th></tr>")
        same = [r for r in rows if r["status"] == "same"]
        self._diff.value = (title + f"<table class='steamcalc-comparison'>{head}{_comparison_rows(differing)}</table>"
                            + (f"<details><summary>{len(same)} rows the same in both</summary>"
                               f"<table>{head}{_comparison_rows(same)}</table></details>" if same else ""))

    def _on_sign(self):
        text = self.sign(self._checker.value, self._key_file.value.strip() or None,
                         passphrase_file=self._passphrase_file.value.strip() or None)
        if text.startswith("not signed"):
            self._sign_status.value = f"<span style='color:#a3201b'><b>{html.escape(_workbook_fix(text))}</b></span>"
            return
        head, _, path = text.rpartition(": ")
        self._sign_status.value = (f"<span style='color:#2f6b3a'><b>{html.escape(head)}</b></span>: "
                                   f"{file_link(path)}")

    def sign(self, checker, key_file=None, role="checked", passphrase_file=None):
        """Sign the record with the signer's key (after a passing verification); return what happened.

        The key is required (:func:`steamcalc.review.sign.sign_with_key`): a name alone proves nothing
        about who signed, so signing by name is not offered. ``checker``, when given, must be the key's name.
        """
        if not key_file:
            return ("not signed: give your private key file (the .key that `steamcalc keys new` made) in the Key "
                    "file box; a record is signed with a key, never by a name alone")
        from ..review.sign import sign_with_key
        try:
            signed = sign_with_key(self.path, key_file, role, (checker or "").strip() or None, passphrase_file)
        except SteamcalcError as exc:
            return f"not signed: {exc}"
        self.record = signed
        self.outcome = verify_record(signed)
        self._show()
        from ..batch.batch import refresh_index
        index = refresh_index(self.path.parent)   # the folder's index shows the signature too
        index = f"; {index}" if index else ""
        entry = signed["signatures"][-1]
        return (f"{entry['role']}, signed by {entry['name']} with key {entry['fingerprint'][7:19]}… on "
                f"{entry['date']}: {self.path}{index}")

    # -- views -------------------------------------------------------------------------
    def summary_view(self):
        """The verification summary of the picked record, following every pick and sign-off (plain text headless)."""
        return self._summary

    def verification_view(self):
        return widgets.VBox([widgets.HBox([self._picker, self._pick_status]), self._table, self._cross_button,
                             self._cross_status])

    def comparison_view(self):
        return widgets.VBox([self._earlier, self._diff])

    def sign_view(self):
        return widgets.VBox([self._key_file, self._passphrase_file, widgets.HBox([self._checker, self._sign_button]),
                             self._sign_status])


def _signers(record, folder, status=None):
    """Who signed, as the summary says it: ``(text, every signature holds, the trusted signers list used)``.

    Keyed signatures are checked as ``steamcalc verify`` checks them (trusted keys, the document-control
    rules); a name typed into the record is shown as what it is, and counts as not signed.
    """
    from ..signing.signatures import NAME_TYPED, check_signatures
    from ..signing.trust import resolve_trust

    if record.get("signatures"):
        try:
            trust = resolve_trust(folder)
        except SteamcalcError as exc:
            return f"cannot be checked ({exc})", False, None
        checks = check_signatures(record, trust.keys, status)
        text = "; ".join(f"{c.name} ({c.role}, key {c.fingerprint[7:19]}…, "
                         + ("trusted" if c.ok else c.problem or "UNKNOWN KEY, not in the trusted signers") + ")"
                         for c in checks)
        return text, all(c.ok for c in checks), trust.describe()
    if record.get("checked_by"):
        return f"not signed ({record['checked_by']}: a {NAME_TYPED})", True, None
    return "not yet checked", True, None


def _summary_results(record):
    """The governing results of a record's kind (its calculation's ``SUMMARY_RESULTS``; none for an unknown kind)."""
    try:
        from ..calcs import get_calculation
        return tuple(getattr(get_calculation(record.get("kind")), "SUMMARY_RESULTS", ()))
    except SteamcalcError:
        return ()


def _revision_key(revision):
    """Sort key of a revision: A < B < ... < Z < AA, 1 < 2 < 10, P1 < P2."""
    parts = re.findall(r"\d+|[^\d]+", str(revision).strip().upper())
    return tuple((0, int(p), "") if p.isdigit() else (1, len(p), p) for p in parts)


def _input_labels(record):
    """Input key -> its label on the form, for the record's kind ({} when the kind is unknown)."""
    try:
        from ..calcs import get_calculation
        from ..calcs.base import input_fields
        return {f.name: f.metadata["label"] for f in input_fields(get_calculation(record.get("kind")).Inputs)}
    except (SteamcalcError, KeyError, ValueError, TypeError):
        return {}


def _result_label(record, key, labels):
    entry = (record.get("results") or {}).get(key)
    if isinstance(entry, dict) and entry.get("label"):
        return entry["label"]
    return labels.get(key, key)


#: One neutral tint for every row that differs (the mark says how): red and green would call a change bad or good.
_ROW_COLOURS = {"changed": "#f0f4f8", "added": "#f0f4f8", "removed": "#f0f4f8", "same": "transparent"}
#: The old value struck through in grey, the new one in bold blue (as the HTML comparison page shows them).
_OLD_STYLE, _NEW_STYLE = "color:#6b7379;text-decoration:line-through", "color:#1d4f91;font-weight:bold"


def _comparison_rows(rows):
    """Table rows of a comparison, grouped under their section, each coloured by what happened to it."""
    out, section = [], None
    for r in rows:
        if r["section_label"] != section:
            section = r["section_label"]
            out.append(f"<tr><td colspan='7'><b>{html.escape(section)}</b></td></tr>")
        old = html.escape(r["old_text"]) + (f"<br><small>as given: {html.escape(r['old_given'])}</small>"
                                            if r.get("old_given") and r["old_given"] != r["old_text"] else "")
        new = html.escape(r["new_text"]) + (f"<br><small>as given: {html.escape(r['new_given'])}</small>"
                                            if r.get("new_given") and r["new_given"] != r["new_text"] else "")
        differs = r["status"] != "same"
        old_style = f";{_OLD_STYLE}" if differs and r["status"] != "added" else ""
        new_style = f";{_NEW_STYLE}" if differs and r["status"] != "removed" else ""
        out.append(f"<tr class='steamcalc-diff-{r['status']}' style='background:{_ROW_COLOURS[r['status']]}'>"
                   f"<td>{html.escape(r['marker'])}</td><td>{html.escape(str(r['label']))}</td>"
                   f"<td style='text-align:right{old_style}'>{old}</td><td style='text-align:right{new_style}'>{new}</td>"
                   f"<td>{html.escape(r['unit_label'])}</td>"
                   f"<td style='text-align:right'>{html.escape(str(r['change_text']))}</td>"
                   f"<td><small><code>{html.escape(str(r.get('case_key') or r['key']))}</code></small></td></tr>")
    return "".join(out)


def _summary_html(text):
    """The verification summary as HTML lines; a FAILED verdict or an edited record styled as a failure."""
    lines = []
    for line in text.split("\n"):
        escaped = html.escape(line)
        if line.startswith("verdict: FAILED") or line.startswith("integrity: EDITED"):
            cls = "steamcalc-verdict-failed" if line.startswith("verdict") else "steamcalc-integrity-failed"
            escaped = (f"<span class='{cls}' style='color:#fff;background:#a3201b;font-weight:bold;"
                       f"padding:1px 6px;border-radius:3px'>&#10008; {escaped}</span>")
        elif line.startswith("verdict: VERIFIED"):
            escaped = (f"<span class='steamcalc-verdict-verified' style='color:#2f6b3a;font-weight:bold'>"
                       f"&#10004; {escaped}</span>")
        lines.append(escaped)
    return "<br>".join(lines)


def _workbook_fix(text):
    """A sign-off message with its command-line fix put in the review workbook's words."""
    text = re.sub(r"give --by \"Your Name\"", "type your name in the Checker box", text)
    text = text.replace("field '--by': ", "").replace("field '--key': ", "the Key file box: ")
    text = text.replace("field '--passphrase-file': ", "the Passphrase box: ")
    text = text.replace("run steamcalc verify for the details", "see the verification table above for the details")
    return text
