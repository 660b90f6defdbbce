"""Many cases to records: parallel worker processes, an index of the records, and every failure listed.

One bad case never stops the others: each case runs inside its own error boundary, and its
outcome is collected and reported at the end with its file and error. An unexpected error (a
bug) becomes that case's failure, with a request to report it. Ctrl-C stops the batch within
about two seconds; the cases that finished keep their records and the others are listed as not
run.
"""

from __future__ import annotations

import csv
import html
import io
import os
import signal
import time
from pathlib import Path

from ..errors import SteamcalcError
from ..render.csv_cells import csv_safe
from ..records.record import load_record, write_text_atomic
from .tasks import CaseOutcome, link_phases, progress_bar, run_one

#: Below this many cases the start-up of worker processes costs more than it saves.
PARALLEL_FROM = 4


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


def run_cases(paths, site_override=None, out_override=None, progress=True, workers=None, force=False,
              scheduler=None):
    """Run case files, in worker processes when there are several (or as tasks on the Dask scheduler
    at ``scheduler``, see :mod:`steamcalc.batch.cluster`); outcomes in the order given.

    On Ctrl-C the batch stops at once: cases not finished come back as outcomes with
    ``interrupted`` set. A worker stopped in the middle of issuing a record leaves the old set
    or a commit the next run completes (see :mod:`steamcalc.records.issuing`), never a half-written file.
    """
    if scheduler:
        from .cluster import run_cases_on_cluster
        return run_cases_on_cluster(paths, site_override, out_override, scheduler, progress)
    bar = progress_bar(len(paths), progress)
    outcomes = {}
    try:
        # Cases that link issued records (a site balance) run after the rest, so that the records they link are
        # issued first when a whole site folder is run.
        phases = link_phases(paths)
        if len(paths) < PARALLEL_FROM:
            for phase in phases:
                for number in phase:
                    outcomes[number] = run_one(paths[number], site_override, out_override, force)
                    bar.update(1)
        else:
            _run_parallel(paths, phases, site_override, out_override, force, workers, outcomes, bar)
    except KeyboardInterrupt:
        pass
    finally:
        bar.close()
    return [outcomes.get(number) or CaseOutcome(path=str(path), ok=False, interrupted=True,
                                                error=f"{path}: not run (the batch was stopped)",
                                                out_dir=str(out_override or ""))
            for number, path in enumerate(paths)]


def _start_worker():
    from ..properties.engines import remember_states_from_now
    from ..records.record import remember_intact_records_from_now
    from ..review.forked import interrupts_held

    # A batch's cases share states (a site's headers, a sweep's inlet): a worker evaluates each once. Every case
    # is still computed in full; remembering changes no value. Its site balances read the same linked records.
    remember_states_from_now()
    remember_intact_records_from_now()
    # Workers leave Ctrl-C to the main process, which stops them all at once; the main process's SIGTERM and
    # SIGHUP handlers (which turn them into Ctrl-C) are not theirs: a worker the pool terminates just ends.
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    for name in ("SIGTERM", "SIGHUP"):
        if hasattr(signal, name):
            signal.signal(getattr(signal, name), signal.SIG_DFL)
    interrupts_held(False)   # held by the parent while it started this worker (see _run_parallel)


def _run_parallel(paths, phases, site_override, out_override, force, workers, outcomes, bar):
    """Run the phases one after the other on one pool of workers (each keeps what it imported and remembered)."""
    import multiprocessing

    from ..review.forked import interrupts_held

    workers = workers or min(len(paths), os.cpu_count() or 1)
    # Ctrl-C is held while the workers start: one that came in the instant after a fork would interrupt the new
    # worker before it ignores it, in Python's own start-up code, and print a traceback. It arrives here after.
    interrupts_held(True)
    try:
        pool = multiprocessing.get_context().Pool(workers, initializer=_start_worker)
    except BaseException:
        interrupts_held(False)
        raise
    try:
        # A Ctrl-C held while the workers started arrives here, where it stops them (below), not before.
        interrupts_held(False)
        for phase in phases:
            pending = {n: pool.apply_async(run_one, (paths[n], site_override, out_override, force)) for n in phase}
            while pending:
                for number in [n for n, r in pending.items() if r.ready()]:
                    outcomes[number] = pending.pop(number).get()
                    bar.update(1)
                if pending:
                    time.sleep(0.05)
        pool.close()
    except BaseException:
        # Ctrl-C: stop the workers now rather than when their cases end (the pool's terminate signals them at
        # once, busy or not). They are not signalled before it: a worker waiting for its next case holds the
        # pool's queue lock, and one killed then never lets it go, so the pool's shutdown waited for ever.
        pool.terminate()
        raise
    finally:
        pool.join()


_INDEX_COLUMNS = ("id", "revision", "kind", "title", "status", "checked_by", "created", "json", "html")


def _link(name):
    # Only a relative file name: "./" and percent-encoding stop any "scheme:" reading (the register's rule too).
    from ..review.register import file_link

    return file_link(name)


#: Marks around the list of cases not run, so that a refresh of the index (after a sign-off) keeps it.
_FAILED_START, _FAILED_END = "<!-- cases not run: -->", "<!-- end of cases not run -->"


def index_rows(folder):
    """The records of a folder, one row each: identical copies of a record (``cp``) are one row.

    Files holding the same record (the digest they state and the digest of what they hold both the
    same) are one record: its row points at the file named as steamcalc
    names it (``ID_revR.json``) when that is one of them, else at the first by name, and lists the
    others under ``copies``. A copy with another digest (edited, or signed in one place only) is a
    record of its own, with its own row. The HTML link is given only when the HTML is there.

    Returns
    -------
    list of (Path, dict, list of str)
        The JSON file of each row, its record, and the names of its identical copies.
    """
    from ..records.record import compute_digest, record_stem

    groups = {}
    for path in sorted(Path(folder).glob("*.json")):
        try:
            record = load_record(path)
        except SteamcalcError:
            continue
        # The digest it states and the digest of what it holds: an edited file keeps the first, not the second.
        groups.setdefault((str(record.get("digest")), compute_digest(record)), []).append((path, record))
    rows = []
    for files in groups.values():
        own = [(p, r) for p, r in files if p.stem == record_stem(r)]
        path, record = (own or files)[0]
        rows.append((path, record, [p.name for p, _ in files if p != path]))
    rows.sort(key=lambda row: row[0].name)
    return rows


def write_index(folder, failures=(), force=False, keep_failures=False):
    """An index of every record in a folder (HTML with links, and CSV), plus this run's failures.

    Each record is listed once (see :func:`index_rows`). An existing ``index.html`` or
    ``index.csv`` that steamcalc did not write is not replaced unless ``force``. The index is
    written under the folder's index lock, so of two writers at once (two sign-offs, a run and a
    sign-off) the later sees the other's record.

    Parameters
    ----------
    keep_failures : bool
        Keep the list of cases not run from the index being replaced (a refresh after a sign-off
        does not forget what the last batch could not run).

    Returns
    -------
    tuple of Path
        The HTML and CSV index files.
    """
    from ..records.issuing import ensure_folder, record_lock

    folder = ensure_folder(folder)
    with record_lock(folder, "index"):
        return _write_index(folder, failures, force, keep_failures)


def refresh_index(folder):
    """Write a folder's records index again if it has one steamcalc wrote; say what was done.

    Returns
    -------
    str or None
        What happened, for the user; None when the folder has no index.
    """
    from ..records.issuing import refuse_foreign_file

    folder = Path(folder)
    present = [p for p in (folder / "index.html", folder / "index.csv") if p.exists() or p.is_symlink()]
    if not present:
        return None
    for path in present:   # a file of the index's name that is not an index steamcalc wrote stays, and is named
        try:
            refuse_foreign_file(path, False, "index")
        except SteamcalcError as exc:
            return f"index not refreshed: {path.name} in {folder}: {exc.message}"
    try:
        html_index, csv_index = write_index(folder, keep_failures=True)
    except SteamcalcError as exc:
        return f"index not refreshed: {exc}"
    return f"index refreshed: {html_index} and {csv_index}"


def _checked_by(record):
    """Who checked, as the index shows it: a checker's key signature by its name, a name typed into the record
    (release 0.1's sign-off) marked as not a signature, so the index never reads as signed when it is not.
    Whether a key is trusted is verify's and the register's to say."""
    from ..signing.signatures import NAME_TYPED

    names = [e.get("name") or "?" for e in record.get("signatures") or []
             if isinstance(e, dict) and e.get("role") == "checked"]
    if names:
        return "; ".join(f"{name} (key signature)" for name in names)
    typed = record.get("checked_by")
    return f"{typed} ({NAME_TYPED})" if typed else ""


def _write_index(folder, failures, force, keep_failures):
    from ..records.issuing import refuse_foreign_file

    csv_path, html_path = folder / "index.csv", folder / "index.html"
    for path in (csv_path, html_path):
        refuse_foreign_file(path, force, "index")
    rows = []
    from ..review.register import INDEX_COLUMNS, index_columns
    currency = index_columns(folder)
    for path, record, copies in index_rows(folder):
        html_file = path.with_suffix(".html")
        rows.append({"id": record["id"], "revision": record["revision"], "kind": record["kind"],
                     "title": _plain(record.get("title", "")), "status": _plain(record.get("status", "")),
                     "checked_by": _plain(_checked_by(record)),
                     "created": _plain(record.get("created", "")),
                     "json": path.name, "html": html_file.name if html_file.is_file() else "",
                     **{c: "" for c in INDEX_COLUMNS}, **currency.get("*", {}), **currency.get(path.name, {}),
                     "copies": "; ".join(copies)})
    buffer = io.StringIO()
    # "copies" goes last: the columns that were there before keep their places.
    writer = csv.DictWriter(buffer, fieldnames=_INDEX_COLUMNS + INDEX_COLUMNS + ("copies",), lineterminator="\n")
    writer.writeheader()
    writer.writerows({k: csv_safe(v) for k, v in row.items()} for row in rows)

    colours = {"pass": "#2f6b3a", "warn": "#8a5a00", "fail": "#a3201b"}
    body = "".join(
        "<tr><td>" + (f"<a href='{html.escape(_link(r['html']))}'>{html.escape(r['id'])}</a>" if r["html"] else
                      f"{html.escape(r['id'])} <span class='small'>(no HTML beside the JSON)</span>")
        + f"</td><td>{html.escape(r['revision'])}"
        f"</td><td>{html.escape(r['kind'])}</td><td>{html.escape(r['title'])}</td>"
        f"<td style='color:{colours.get(r['status'], '#000')};font-weight:bold'>{html.escape(r['status'].upper())}</td>"
        f"<td>{html.escape(r['checked_by'])}</td><td>{html.escape(r['created'])}</td>"
        f"<td><a href='{html.escape(_link(r['json']))}'>{html.escape(r['json'])}</a></td>"
        + "".join(f"<td>{html.escape(_plain(r[c]))}</td>" for c in INDEX_COLUMNS)
        + f"<td>{html.escape(r['copies'])}</td></tr>" for r in rows)
    failed = "".join(f"<li><code>{html.escape(f.path)}</code>: {html.escape(f.error)}</li>" for f in failures)
    failed_block = f'<h2 class="fail">Cases not run in the last batch</h2><ul>{failed}</ul>' if failed else ""
    if keep_failures and not failures:
        failed_block = _kept_failures(html_path)
    copies = sum(1 for r in rows for _ in filter(None, r["copies"].split("; ")))
    count = f"{len(rows)} records in this folder" + (
        f" (and {copies} identical cop{'y' if copies == 1 else 'ies'} of them, named in the last column)" if copies else "")
    page = f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><meta name="generator" content="steamcalc index">
<title>steamcalc records index</title>
<style>body{{font:10.5pt/1.4 "DejaVu Sans",Arial,sans-serif;margin:2em auto;max-width:64em;padding:0 1.5em}}
table{{border-collapse:collapse;width:100%}}th,td{{text-align:left;padding:.25em .5em;border-bottom:1px solid #b9c2c9}}
th{{background:#eef1f3}}.fail{{color:#a3201b}}.small{{font-size:85%;color:#59636b}}</style></head><body>
<h1>Calculation records</h1><p>{count}. Each record is listed once; a file that holds the same record as a
listed one (the same digest: a copy) is named under <i>identical copies</i>, not listed again.</p>
<table><tr><th>Case</th><th>Rev</th><th>Kind</th><th>Title</th><th>Status</th><th>Checked by</th><th>Created</th>
<th>Record</th>{"".join(f"<th>{c.replace('_', ' ')}</th>" for c in INDEX_COLUMNS)}<th>identical copies</th></tr>{body}</table>
{_FAILED_START}{failed_block}{_FAILED_END}
</body></html>
"""
    write_text_atomic(csv_path, buffer.getvalue())
    write_text_atomic(html_path, page)
    return html_path, csv_path


def _kept_failures(html_path):
    try:
        text = html_path.read_text("utf-8")
    except (OSError, UnicodeDecodeError):
        return ""
    start, end = text.find(_FAILED_START), text.find(_FAILED_END)
    return text[start + len(_FAILED_START):end] if 0 <= start < end else ""


def _plain(value):
    # Index cells are text: a crafted record's table or number is shown as text, not a crash.
    return value if isinstance(value, str) else str(value)
