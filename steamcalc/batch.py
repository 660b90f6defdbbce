"""Many cases to records: parallel worker processes, an index of the records, and every failure listed.

One bad case never stops the others: each case's outcome is collected and reported at the
end with its file and error.
"""

from __future__ import annotations

import csv
import html
import io
import os
from concurrent.futures import ProcessPoolExecutor
from dataclasses import dataclass, field
from pathlib import Path

from .errors import SteamcalcError
from .record import load_record, record_stem, write_text_atomic

#: Below this many cases the start-up of worker processes costs more than it saves.
PARALLEL_FROM = 4


@dataclass
class CaseOutcome:
    """What happened to one case file."""

    path: str
    ok: bool
    record_id: str = ""
    revision: str = ""
    status: str = ""
    write_status: str = ""
    paths: list = field(default_factory=list)
    checks: list = field(default_factory=list)
    error: str = ""
    out_dir: str = ""


def find_case_files(paths):
    """Case files named, and every case file under named folders (site files and records excluded)."""
    files = []
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            found = sorted(p for p in path.rglob("*.toml")
                           if p.name != "site.toml" and "records" not in p.relative_to(path).parts)
            if not found:
                raise SteamcalcError("no case files (*.toml) in this folder", source=path)
            files.extend(found)
        else:
            files.append(path)
    return files


def run_one(path, site_override=None, out_override=None):
    """Compute one case and write its record; never raises for a user's error."""
    from .record import write_record
    from .report import RENDERERS
    from .runner import default_out_dir, record_for_case
    from .site import case_site, load_case

    try:
        case = load_case(path)
        site = case_site(case, site_override)
        record, _ = record_for_case(case, site)
        out = Path(out_override) if out_override else default_out_dir(case)
        paths, status = write_record(record, out, RENDERERS)
    except SteamcalcError as exc:
        return CaseOutcome(path=str(path), ok=False, error=str(exc.with_source(path)))
    return CaseOutcome(path=str(path), ok=True, record_id=record["id"], revision=record["revision"],
                       status=record["status"], write_status=status, paths=[str(p) for p in paths],
                       checks=[c for c in record["checks"] if c["status"] != "pass"], out_dir=str(out))


def run_cases(paths, site_override=None, out_override=None, progress=True, workers=None, scheduler=None):
    """Run case files, in worker processes when there are several (or as tasks on the Dask scheduler
    at ``scheduler``, see :mod:`steamcalc.cluster`); outcomes in the order given."""
    if scheduler:
        from .cluster import run_cases_on_cluster
        return run_cases_on_cluster(paths, site_override, out_override, scheduler, progress)
    if len(paths) < PARALLEL_FROM:
        iterator = (run_one(p, site_override, out_override) for p in paths)
        return list(_progress(iterator, len(paths), progress))
    workers = workers or min(len(paths), os.cpu_count() or 1)
    with ProcessPoolExecutor(max_workers=workers) as pool:
        futures = [pool.submit(run_one, p, site_override, out_override) for p in paths]
        return list(_progress((f.result() for f in futures), len(paths), progress))


def _progress(iterator, total, enabled):
    if not enabled:
        return iterator
    try:
        from tqdm import tqdm
    except ImportError:
        return iterator
    return tqdm(iterator, total=total, desc="cases", unit="case", leave=False)


_INDEX_COLUMNS = ("id", "revision", "kind", "title", "status", "checked_by", "created", "json", "html")


def write_index(folder, failures=()):
    """An index of every record in a folder (HTML with links, and CSV), plus this run's failures.

    Returns
    -------
    tuple of Path
        The HTML and CSV index files.
    """
    folder = Path(folder)
    rows = []
    from .register import INDEX_COLUMNS, index_columns
    currency = index_columns(folder)
    for path in sorted(folder.glob("*.json")):
        try:
            record = load_record(path)
        except SteamcalcError:
            continue
        stem = record_stem(record)
        rows.append({"id": record["id"], "revision": record["revision"], "kind": record["kind"],
                     "title": record.get("title", ""), "status": record.get("status", ""),
                     "checked_by": record.get("checked_by") or "", "created": record.get("created", ""),
                     "json": f"{stem}.json", "html": f"{stem}.html",
                     **{c: "" for c in INDEX_COLUMNS}, **currency.get("*", {}), **currency.get(path.name, {})})
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=_INDEX_COLUMNS + INDEX_COLUMNS, lineterminator="\n")
    writer.writeheader()
    writer.writerows(rows)
    csv_path = folder / "index.csv"
    write_text_atomic(csv_path, buffer.getvalue())

    colours = {"pass": "#2f6b3a", "warn": "#8a5a00", "fail": "#a3201b"}
    body = "".join(
        f"<tr><td><a href='{html.escape(r['html'])}'>{html.escape(r['id'])}</a></td><td>{html.escape(r['revision'])}"
        f"</td><td>{html.escape(r['kind'])}</td><td>{html.escape(r['title'])}</td>"
        f"<td style='color:{colours.get(r['status'], '#000')};font-weight:bold'>{html.escape(r['status'].upper())}</td>"
        f"<td>{html.escape(r['checked_by'])}</td><td>{html.escape(r['created'])}</td>"
        f"<td><a href='{html.escape(r['json'])}'>JSON</a></td>"
        + "".join(f"<td>{html.escape(r[c])}</td>" for c in INDEX_COLUMNS) + "</tr>" for r in rows)
    failed = "".join(f"<li><code>{html.escape(f.path)}</code>: {html.escape(f.error)}</li>" for f in failures)
    page = f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>steamcalc records index</title>
<style>body{{font:10.5pt/1.4 "DejaVu Sans",Arial,sans-serif;margin:2em auto;max-width:64em;padding:0 1.5em}}
table{{border-collapse:collapse;width:100%}}th,td{{text-align:left;padding:.25em .5em;border-bottom:1px solid #b9c2c9}}
th{{background:#eef1f3}}.fail{{color:#a3201b}}</style></head><body>
<h1>Calculation records</h1><p>{len(rows)} records in this folder.</p>
<table><tr><th>Case</th><th>Rev</th><th>Kind</th><th>Title</th><th>Status</th><th>Checked by</th><th>Created</th>
<th>Record</th>{"".join(f"<th>{c.replace('_', ' ')}</th>" for c in INDEX_COLUMNS)}</tr>{body}</table>
{f'<h2 class="fail">Cases not run in the last batch</h2><ul>{failed}</ul>' if failed else ''}
</body></html>
"""
    html_path = folder / "index.html"
    write_text_atomic(html_path, page)
    return html_path, csv_path
