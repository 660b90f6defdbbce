"""Comparing two records, row by row: what changed, what was added or removed, and what is the same.

Every section a checker compares is covered: the record's identity and status, the inputs (with
the text as given beside the SI value), the uncertainty section (the ± tolerances on the inputs,
the coverage bands of the results, the one-at-a-time sensitivity and the Monte Carlo settings),
the results, checks, assumptions, cautions, references, warnings, site data and software.

Rows that differ come first, each marked (``*`` changed, ``+`` added, ``-`` removed); the rows
that are the same follow on request, marked ``=``, so a change is never buried among them.
"""

from __future__ import annotations

import math
import sys

#: Section key -> the heading a reader sees, in the order sections are compared.
SECTIONS = {
    "record": "Record", "inputs": "Inputs", "tolerances": "Input tolerances (±)", "results": "Results",
    "bands": "Uncertainty bands", "sensitivity": "Sensitivity (swing of the result over each tolerance)",
    "uncertainty": "Uncertainty method", "checks": "Checks", "assumptions": "Assumptions", "cautions": "Cautions",
    "references": "References", "warnings": "Warnings", "figures": "Figures (their data)", "site": "Site data",
    "software": "Software",
}
#: Row status -> its marker in the terminal and Markdown (the HTML page uses the same).
MARKERS = {"changed": "*", "added": "+", "removed": "-", "same": "="}

_RECORD_FIELDS = {"kind": "Calculation", "id": "Case", "revision": "Revision", "title": "Title",
                  "prepared_by": "Prepared by", "status": "Overall status",
                  "checked_by": "Checked by (name-only sign-off)"}
_BAND_ENDS = (("low", "p05", "low end of the {} % band"), ("p50", "p50", "median"),
              ("high", "p95", "high end of the {} % band"))
_METHOD_FIELDS = {"method": "Method", "samples": "Samples", "seed": "Seed", "generator": "Random generator",
                  "coverage": "Coverage", "valid_samples": "Valid samples",
                  "failed_sample_count": "Failed samples", "property_engine": "Property engine"}
_LISTS = {"assumptions": "Assumption", "cautions": "Caution", "references": "Reference", "warnings": "Warning"}


def diff_records(old, new, unchanged=False):
    """The rows that differ between two records, first; with ``unchanged``, the same rows after them.

    Parameters
    ----------
    old, new : dict
        Two records (usually two revisions of one case).
    unchanged : bool
        Also return the rows that are the same (status ``"same"``), after every changed row.

    Returns
    -------
    list of dict
        One row per compared item, in section order within each group. Keys: ``section`` (see
        :data:`SECTIONS`) and ``section_label``; ``key`` (the record key; for inputs and
        tolerances ``case_key``, the case-file address) and ``label`` (trade words); ``old`` and
        ``new`` (record values, SI) with ``old_text`` / ``new_text`` (as a report shows them) and
        ``old_given`` / ``new_given`` (the text as typed, for inputs and tolerances, else None);
        ``unit`` and ``unit_label`` (as people write it, pressures with their basis); ``change``
        (the numeric difference where both are numbers, else 'added', 'removed', 'changed',
        'detail', 'status pass → warn' or 'as given: A → B') and ``change_text``; ``status``
        ('changed', 'added', 'removed', 'same') and ``marker`` (:data:`MARKERS`).

    Examples
    --------
    >>> old = {"kind": "none", "revision": "A", "inputs": {"mass_flow": {"value": 4500.0, "unit": "kg/h",
    ...        "given": "4.5 t/h"}}}
    >>> new = {"kind": "none", "revision": "B", "inputs": {"mass_flow": {"value": 5000.0, "unit": "kg/h",
    ...        "given": "5 t/h"}}}
    >>> [(r["marker"], r["label"], r["old_given"], r["new_given"], r["change_text"]) for r in diff_records(old, new)]
    [('*', 'Revision', None, None, 'changed'), ('*', 'mass flow', '4.5 t/h', '5 t/h', '+500')]
    """
    rows = compare_records(old, new)
    changed = [r for r in rows if r["status"] != "same"]
    return changed + ([r for r in rows if r["status"] == "same"] if unchanged else [])


def check_diff_target(path, compared=(), force=False):
    """Refuse ``diff --html`` onto a file it did not write (unless ``force``), onto one of the records compared,
    a record's file, a folder or a device (never, :func:`steamcalc.records.issuing.refuse_foreign_file`).

    Returns
    -------
    Path
        ``path``, which may be written.
    """
    import os
    from pathlib import Path

    from ..errors import RecordConflictError
    from ..records.issuing import refuse_foreign_file

    target = Path(path)
    for record in compared:
        try:
            same = os.path.samefile(record, target)
        except OSError:   # either absent: not the same file
            same = False
        if same:
            raise RecordConflictError("--html names one of the records being compared", source=str(path),
                                      fix="give --html a new file name such as changes.html")
    return refuse_foreign_file(target, force, "diff")


def write_diff_html(path, old, new, rows, compared=(), force=False):
    """Write the comparison of two records as an HTML page at ``path``, after :func:`check_diff_target`."""
    from ..records.record import write_text_atomic
    from ..render.report import render_diff_html

    check_diff_target(path, compared, force)
    write_text_atomic(path, render_diff_html(old, new, rows))
    return path


def compare_records(old, new):
    """Every compared row of two records, in section order (see :func:`diff_records`)."""
    rows = []
    labels = _input_labels(new.get("kind") or old.get("kind"))
    for key, label in _RECORD_FIELDS.items():
        rows.append(_row("record", key, label, old.get(key), new.get(key)))
    _entries(rows, "inputs", _table(old.get("inputs")), _table(new.get("inputs")), labels)
    u_old, u_new = _table(old.get("uncertainty")), _table(new.get("uncertainty"))
    _entries(rows, "tolerances", _table(u_old.get("tolerances")), _table(u_new.get("tolerances")), labels)
    _entries(rows, "results", _table(old.get("results")), _table(new.get("results")), {})
    results = {k: _table(v) for k, v in {**_table(old.get("results")), **_table(new.get("results"))}.items()}
    coverage = u_new.get("coverage", u_old.get("coverage", 0.9))
    _bands(rows, _table(u_old.get("bands")), _table(u_new.get("bands")), results, coverage)
    _sensitivity(rows, _table(u_old.get("sensitivity")), _table(u_new.get("sensitivity")), results, labels)
    if u_old or u_new:
        for key, label in _METHOD_FIELDS.items():
            a, b = _short(u_old.get(key)) if u_old else None, _short(u_new.get(key)) if u_new else None
            rows.append(_row("uncertainty", key, label, a, b, presence=(key in u_old, key in u_new)))
    _checks(rows, _list(old.get("checks")), _list(new.get("checks")))
    for section, label in _LISTS.items():
        a, b = _list(old.get(section)), _list(new.get(section))
        for text in list(a) + [t for t in b if t not in a]:
            rows.append(_row(section, "", label, text if text in a else None, text if text in b else None,
                             presence=(text in a, text in b)))
    _figures(rows, _list(old.get("figures")), _list(new.get("figures")))
    for section in ("site", "software"):
        field = "provenance" if section == "software" else "site"
        a, b = _table(old.get(field)), _table(new.get(field))
        for key in list(a) + [k for k in b if k not in a]:
            rows.append(_row(section, key, str(key).replace("_", " "), _short(a.get(key)), _short(b.get(key)),
                             presence=(key in a, key in b)))
    _label_units(rows, new)
    return rows


def diff_summary(rows):
    """How many rows changed, were added, removed, or are the same, in words.

    Examples
    --------
    >>> diff_summary([{"status": "changed"}, {"status": "same"}, {"status": "same"}])
    '1 changed, 0 added, 0 removed; 2 the same'
    """
    count = {s: sum(1 for r in rows if r["status"] == s) for s in MARKERS}
    return f"{count['changed']} changed, {count['added']} added, {count['removed']} removed; {count['same']} the same"


def _input_labels(kind):
    """Input name -> (label, case-file address) for a kind; empty for a kind not known here."""
    from ..calcs import get_calculation
    from ..calcs.base import field_path, input_fields

    try:
        calc = get_calculation(kind)
    except Exception:   # an unknown kind is reported by verify; the diff falls back to the keys
        return {}
    return {f.name: (f.metadata["label"], field_path(f)) for f in input_fields(calc.Inputs)}


def _entries(rows, section, a, b, labels):
    for key in list(a) + [k for k in b if k not in a]:
        x, y = a.get(key), b.get(key)
        label, case_key = labels.get(key, ((x or y or {}).get("label") if isinstance(x or y, dict) else None, None))
        row = _row(section, key, label or key.replace("_", " "), _value(x), _value(y), presence=(key in a, key in b),
                   unit=_unit(x) or _unit(y), given=(_given(x), _given(y)))
        row["case_key"] = case_key
        rows.append(row)


def _bands(rows, a, b, results, coverage):
    for key in list(a) + [k for k in b if k not in a]:
        x, y = _table(a.get(key)), _table(b.get(key))
        name = results.get(key, {}).get("label") or key.replace("_", " ")
        for stat, fallback, words in _BAND_ENDS:
            rows.append(_row("bands", f"{key}.{stat}", f"{name}: {words.format(_percent(coverage))}",
                             x.get(stat, x.get(fallback)),
                             y.get(stat, y.get(fallback)), presence=(bool(x), bool(y)),
                             unit=x.get("unit") or y.get("unit", ""), basis_key=key))


def _sensitivity(rows, a, b, results, labels):
    for key in list(a) + [k for k in b if k not in a]:
        x = {str(s.get("input")): s.get("swing") for s in _list(a.get(key)) if isinstance(s, dict)}
        y = {str(s.get("input")): s.get("swing") for s in _list(b.get(key)) if isinstance(s, dict)}
        name = results.get(key, {}).get("label") or key.replace("_", " ")
        # A swing is a difference: of a temperature in K, of a pressure in bar (labelled a difference).
        unit = _unit(results.get(key))
        unit = {"degC": "K", "degF": "delta_degF"}.get(unit, unit)
        for source in list(x) + [s for s in y if s not in x]:
            words = _in_sentence(labels.get(source, (str(source).replace("_", " "),))[0])
            rows.append(_row("sensitivity", f"{key}.{source}", f"{name}: over the {words} tolerance",
                             x.get(source), y.get(source), presence=(source in x, source in y), unit=unit,
                             basis_key=key))


def _percent(fraction):
    from ..render.report import format_number

    return format_number(fraction * 100) if _is_number(fraction) else "?"


def _in_sentence(label):
    # Lower-case the first letter for use inside a sentence, unless it starts an acronym (Kv, LMTD).
    return label if len(label) > 1 and label[1].isupper() else label[:1].lower() + label[1:]


def _checks(rows, a, b):
    old = {str(c.get("name")): c for c in a if isinstance(c, dict)}
    new = {str(c.get("name")): c for c in b if isinstance(c, dict)}
    for name in list(old) + [n for n in new if n not in old]:
        x, y = old.get(name), new.get(name)
        row = _row("checks", name, name, None if x is None else f"{x.get('status')}: {x.get('detail')}",
                   None if y is None else f"{y.get('status')}: {y.get('detail')}", presence=(x is not None, y is not None))
        if row["status"] == "changed":
            row["change"] = (f"status {x.get('status')} → {y.get('status')}" if x.get("status") != y.get("status")
                             else "detail")
        rows.append(row)


def _figure_words(figure):
    if "missing" in figure:
        return f"missing: {figure['missing']}"
    series = figure.get("series") or []
    return f"{len(series)} series, {sum(len(s.get('x') or ()) for s in series if isinstance(s, dict))} points"


def _figures(rows, old, new):
    """One row per figure: its series and points, changed when any of its data differs (as verify compares it)."""
    from .verify import compare_figures

    old = [f for f in old if isinstance(f, dict)]
    new = [f for f in new if isinstance(f, dict)]
    verdicts = {c.key.removeprefix("figure "): c for c in compare_figures(old, new)}
    before, after = {f.get("name"): f for f in old}, {f.get("name"): f for f in new}
    for name in list(before) + [n for n in after if n not in before]:
        a, b = before.get(name), after.get(name)
        row = _row("figures", name, (b or a).get("title") or str(name), None if a is None else _figure_words(a),
                   None if b is None else _figure_words(b), presence=(a is not None, b is not None))
        comparison = verdicts.get(str(name))
        if row["status"] == "same" and comparison is not None and comparison.verdict == "differs":
            where = str(comparison.recomputed).partition("(")[2].rstrip(")") or "its data"
            row.update(status="changed", marker=MARKERS["changed"], change=where)
        rows.append(row)


def _row(section, key, label, old, new, presence=(True, True), unit="", given=(None, None), basis_key=None):
    if presence == (True, True) and old is None and new is None:
        presence = (False, False)
    if not presence[1] and presence[0]:
        status, change = "removed", "removed"
    elif not presence[0] and presence[1]:
        status, change = "added", "added"
    elif _same(old, new) and given[0] == given[1]:
        status, change = "same", ""
    elif _is_number(old) and _is_number(new) and not _same(old, new):
        status, change = "changed", new - old
    elif _same(old, new):
        status, change = "changed", f"as given: {given[0]} → {given[1]}"
    else:
        status, change = "changed", "changed"
    return dict(section=section, section_label=SECTIONS[section], key=key, label=label, old=old, new=new,
                old_given=given[0], new_given=given[1], unit=unit or "", change=change, status=status,
                marker=MARKERS[status], basis_key=basis_key or key)


def _label_units(rows, record):
    from ..render.display import pressure_basis
    from ..render.report import format_number, format_unit

    for row in rows:
        # Bands and sensitivity swings are in their result's unit: a band of a pressure is a pressure,
        # a swing of one is a difference.
        section = {"bands": "results", "sensitivity": "tolerances"}.get(row["section"], row["section"])
        unit = row["unit"]
        row["unit_label"] = format_unit(unit, pressure_basis(record, section, row.pop("basis_key"))) if unit else ""
        row["old_text"], row["new_text"] = (str(v) if _oversized(v) else format_number(v) for v in (row["old"], row["new"]))
        change = row["change"]
        row["change_text"] = f"{'+' if change > 0 else ''}{format_number(change)}" if _is_number(change) else change
        row.setdefault("case_key", None)


def _value(entry):
    return entry.get("value") if isinstance(entry, dict) else entry


def _unit(entry):
    unit = entry.get("unit", "") if isinstance(entry, dict) else ""
    return unit if isinstance(unit, str) else ""


def _given(entry):
    given = entry.get("given") if isinstance(entry, dict) else None
    return None if given is None else str(given)


# A crafted or damaged record must give a comparison, not a crash: a section of the wrong type
# compares as empty (verify reports the record itself).
def _table(value):
    return value if isinstance(value, dict) else {}


def _list(value):
    return value if isinstance(value, list) else []


def _is_number(value):
    # an integer beyond a double (a crafted record) is not one: arithmetic with it overflows
    return (isinstance(value, (int, float)) and not isinstance(value, bool)
            and (isinstance(value, float) or abs(value) <= sys.float_info.max))


def _oversized(value):
    return isinstance(value, int) and not isinstance(value, bool) and not _is_number(value)


def _same(a, b):
    # Round trips through record units may move the last bits; those are not changes. An infinite
    # value is the same only as itself (the tolerance 1e-12·inf would take any number).
    if _is_number(a) and _is_number(b):
        return a == b or (math.isfinite(a) and math.isfinite(b) and abs(a - b) <= 1e-12 * max(abs(a), abs(b)))
    if isinstance(a, list) and isinstance(b, list) and len(a) == len(b):
        return all(_same(x, y) for x, y in zip(a, b))
    return a == b


def _short(value):
    """A site, provenance or method entry as one cell of text (numbers stay numbers)."""
    if isinstance(value, dict) and "value" in value:
        if not isinstance(value["value"], float):
            return value["value"]
        from ..render.report import format_unit

        return f"{value['value']:g} {format_unit(value.get('unit', ''))}".strip()
    if isinstance(value, dict):
        return ", ".join(f"{k} {_short(v)}" for k, v in value.items())
    return value
