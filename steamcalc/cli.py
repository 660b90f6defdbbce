"""The ``steamcalc`` command line.

Exit codes: 0 all good; 1 a record failed a check or a verification (or a signature was
refused for it); 2 bad input or usage, with a message naming the file, the field and the
fix (no traceback).
"""

from __future__ import annotations

import argparse
import os
import re
import sys
from pathlib import Path

from . import __version__
from .errors import SteamcalcError

EXIT_OK, EXIT_FAILED, EXIT_BAD_INPUT = 0, 1, 2
EXIT_INTERRUPTED = 130  # 128 + SIGINT, as shells report a Ctrl-C

# Control characters (C0 but newline and tab, DEL, C1) and the bidirectional overrides: text from a
# record or a case file must not move the cursor, recolour the terminal or reorder what it shows.
_CONTROL = re.compile("[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]")


def plain_text(text):
    """Text for the terminal: control characters and escape sequences removed.

    Examples
    --------
    >>> plain_text("\x1b[32mVERIFIED\x1b[0m ok")
    '[32mVERIFIED[0m ok'
    """
    return _CONTROL.sub("", str(text))


def _say(text="", file=None):
    print(plain_text(text), file=file or sys.stdout)


class _Parser(argparse.ArgumentParser):
    def error(self, message):
        self.print_usage(sys.stderr)
        print(f"steamcalc: {message}", file=sys.stderr)
        raise SystemExit(EXIT_BAD_INPUT)


def _parser():
    parser = _Parser(prog="steamcalc", description="Steam-system calculation records on IAPWS-IF97.")
    parser.add_argument("--version", action="version", version=f"steamcalc {__version__}")
    sub = parser.add_subparsers(dest="command", required=True, parser_class=_Parser)

    run = sub.add_parser("run", help="compute case files and write their records (JSON, HTML, Markdown)")
    run.add_argument("cases", nargs="+", metavar="CASE", help="case files (.toml) or folders of them")
    run.add_argument("--site", metavar="SITE.toml", help="site file to use instead of each case's own")
    run.add_argument("--out", metavar="DIR", help="folder for the records (default: records/ beside the site file)")
    run.add_argument("--notebook", action="store_true", help="also save the executed workbook beside each record")
    run.add_argument("--pdf", action="store_true", help="also print each record to PDF (needs Chromium)")
    run.add_argument("--quiet", action="store_true", help="no progress bar")
    run.add_argument("--force", action="store_true",
                     help="replace report, index and companion files of the records' names that steamcalc did not write")

    verify = sub.add_parser("verify", help="check a record's digest and recompute its results")
    verify.add_argument("records", nargs="+", metavar="RECORD.json")

    diff = sub.add_parser("diff", help="what changed between two records")
    diff.add_argument("old", metavar="OLD.json")
    diff.add_argument("new", metavar="NEW.json")
    diff.add_argument("--html", metavar="FILE.html", help="also write the comparison as an HTML page")
    diff.add_argument("--force", action="store_true", help="replace an existing FILE.html that steamcalc did not write")

    sign = sub.add_parser("sign", help="the checker's sign-off, after a passing verification")
    sign.add_argument("record", metavar="RECORD.json")
    sign.add_argument("--by", required=True, metavar="NAME", help="the checker's name")

    site = sub.add_parser("new-site", help="a new plant folder from a template site")
    site.add_argument("folder", metavar="DIR")
    site.add_argument("--from", dest="template", metavar="TEMPLATE", help="template site (default: the demo site)")
    return parser


def _run(args):
    from .batch import find_case_files, run_cases, write_index

    paths = find_case_files(args.cases)
    if args.out and Path(args.out).exists() and not Path(args.out).is_dir():
        raise SteamcalcError("--out names a file, not a folder", source=args.out,
                             fix="give --out a folder for the records (it is created if absent)")
    outcomes = run_cases(paths, args.site, args.out, progress=not args.quiet and len(paths) > 1, force=args.force)
    worst = EXIT_OK
    failures = [o for o in outcomes if not o.ok]
    for outcome in outcomes:
        if not outcome.ok:
            continue
        note = "written" if outcome.write_status == "written" else "unchanged (same content as the existing record, kept)"
        _say(f"{outcome.record_id} rev {outcome.revision}: {outcome.status.upper()} - {note}")
        for p in outcome.paths:
            _say(f"  {p}")
        for check in outcome.checks:
            _say(f"  {check['status']}: {check['name']}: {check['detail']}")
        if outcome.status == "fail" and worst == EXIT_OK:
            worst = EXIT_FAILED
        worst = max(worst, _companions(args, outcome))
    if len(paths) > 1:
        # The index is written even when cases failed or the batch was stopped: it lists what is there.
        for folder in sorted({o.out_dir for o in outcomes if o.out_dir}):
            try:
                html_index, csv_index = write_index(folder, failures, force=args.force)
            except SteamcalcError as exc:
                _say(f"error: no index written: {exc}", file=sys.stderr)
                worst = EXIT_BAD_INPUT
                continue
            _say(f"index: {html_index} and {csv_index}")
    stopped = [o for o in failures if o.interrupted]
    failed = [o for o in failures if not o.interrupted]
    if failed:
        _say(f"\n{len(failed)} of {len(outcomes)} case(s) not run:", file=sys.stderr)
        for outcome in failed:
            _say(f"error: {outcome.error}", file=sys.stderr)
        worst = EXIT_BAD_INPUT
    if stopped:
        _say(f"\nstopped (Ctrl-C): {len(stopped)} of {len(outcomes)} case(s) did not run:", file=sys.stderr)
        for outcome in stopped:
            _say(f"  not run: {outcome.path}", file=sys.stderr)
        return EXIT_INTERRUPTED
    return worst


def _companions(args, outcome):
    if not (args.notebook or args.pdf):
        return EXIT_OK
    from .companions import run_notebook, write_pdf
    from .site import load_case

    json_path = Path(outcome.paths[0])
    try:
        if args.notebook:
            _say(f"  {run_notebook(load_case(outcome.path), json_path.parent, json_path.stem, force=args.force)}")
        if args.pdf:
            _say(f"  {write_pdf(json_path.with_suffix('.html'), force=args.force)}")
    except SteamcalcError as exc:
        _say(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    return EXIT_OK


def _verify(args):
    from .record import load_record
    from .review import verify_record

    worst = EXIT_OK
    for raw in args.records:
        # Each file is verified and reported on its own: a bad one never hides the others.
        try:
            record = load_record(raw)
            outcome = verify_record(record)
        except SteamcalcError as exc:
            _say(f"{raw}: NOT VERIFIED - {exc}", file=sys.stderr)
            worst = EXIT_BAD_INPUT
            continue
        except Exception as exc:  # a bug: say so for this file and go on to the next
            if os.environ.get("STEAMCALC_DEBUG"):
                raise
            _say(f"{raw}: NOT VERIFIED - unexpected error {type(exc).__name__}: {exc}. Please report it.",
                 file=sys.stderr)
            worst = EXIT_BAD_INPUT
            continue
        _say(f"{raw}: {record['id']} rev {record['revision']}")
        _say(f"  integrity: {'intact' if outcome.digest_ok and outcome.content_digest_ok else 'EDITED - digest does not match'}")
        if outcome.error:
            _say(f"  reproduction: NOT POSSIBLE - {outcome.error}")
        else:
            _say(format_comparisons(outcome.comparisons))
            for change in outcome.check_changes:
                _say(f"  check changed: {change}")
            _say(f"  reproduction: {'reproduced' if outcome.reproduced else 'NOT REPRODUCED'}")
        for name, (then, now) in outcome.version_changes.items():
            _say(f"  version: {name} {then} in the record, {now} here")
        _say(f"  verdict: {'VERIFIED' if outcome.ok else 'FAILED'}")
        if not outcome.ok and worst != EXIT_BAD_INPUT:
            worst = EXIT_FAILED
    return worst


def format_comparisons(comparisons):
    """The per-result table of a verification, as text."""
    from .review import ABSOLUTE_TOLERANCE, RELATIVE_TOLERANCE

    width = max((len(c.key) for c in comparisons), default=10)
    lines = [f"  {'result':<{width}}  {'recorded':>14}  {'recomputed':>14}  {'abs. diff':>9}  {'rel. diff':>9}  "
             f"{'tolerance':>9}  verdict"]
    for c in comparisons:
        absolute = "" if c.abs_diff is None else f"{c.abs_diff:.1e}"
        relative = "" if c.rel_diff is None else f"{c.rel_diff:.1e}"
        tolerance = f"{RELATIVE_TOLERANCE:.0e}" if c.abs_diff is not None else "exact"
        lines.append(f"  {c.key:<{width}}  {_cell(c.recorded):>14}  {_cell(c.recomputed):>14}  {absolute:>9}  "
                     f"{relative:>9}  {tolerance:>9}  {c.verdict}")
    lines.append(f"  (tolerance: relative {RELATIVE_TOLERANCE:.0e}, or {ABSOLUTE_TOLERANCE:.0e} absolute near zero)")
    return "\n".join(lines)


def _cell(value):
    if isinstance(value, float):
        return f"{value:.8g}"
    return "-" if value is None else str(value)


def _diff(args):
    from .record import load_record
    from .signoff import diff_records

    if args.html:
        _check_diff_target(args)
    old, new = load_record(args.old), load_record(args.new)
    rows = diff_records(old, new)
    _say(f"{args.old} ({old['id']} rev {old['revision']}) -> {args.new} ({new['id']} rev {new['revision']})")
    if not rows:
        _say("  no differences in inputs, assumptions, results or checks")
    for row in rows:
        change = row["change"]
        change = f"{change:+.6g}" if isinstance(change, float) else change
        _say(f"  [{row['section']}] {row['key']}: {_cell(row['old'])} -> {_cell(row['new'])} {row['unit']}  ({change})")
    if args.html:
        from .record import write_text_atomic
        from .report import render_diff_html
        write_text_atomic(args.html, render_diff_html(old, new, rows))
        _say(f"  written: {args.html}")
    return EXIT_OK


def _check_diff_target(args):
    from .issuing import is_own_output

    target = Path(args.html)
    if target.exists() and not target.is_file():
        raise SteamcalcError("--html names a folder or device, not a file", source=args.html,
                             fix="give --html a file name such as changes.html")
    for record in (args.old, args.new):
        if Path(record).exists() and target.exists() and os.path.samefile(record, target):
            raise SteamcalcError("--html names one of the records being compared", source=args.html,
                                 fix="give --html a new file name such as changes.html")
    if target.exists() and not args.force and (target.suffix == ".json" or not is_own_output(target, ".html")):
        raise SteamcalcError("a file of this name exists and is not a comparison steamcalc wrote", source=args.html,
                             fix="give --html a new file name (or --force to replace it)")


def _sign(args):
    from .record import load_record
    from .signoff import sign_record

    record = load_record(args.record)
    try:
        signed = sign_record(args.record, record, args.by)
    except SteamcalcError as exc:
        _say(f"refused: {exc}", file=sys.stderr)
        return EXIT_FAILED if exc.field != "--by" else EXIT_BAD_INPUT
    path = Path(args.record)
    _say(f"{signed['id']} rev {signed['revision']}: signed by {signed['checked_by']} on {signed['signoff']['date']}")
    _say(f"  {path} (new digest {signed['digest'][:23]}...), with its HTML and Markdown")
    return EXIT_OK


def _new_site(args):
    from .newsite import new_site

    files = new_site(args.folder, args.template)
    _say(f"new site folder {args.folder}: {len(files)} files")
    for f in files:
        _say(f"  {f}")
    _say("next: edit site.toml (name, elevation, headers, prices) and the cases, then "
          f"`steamcalc run {args.folder}/cases`")
    return EXIT_OK


_COMMANDS = {"run": _run, "verify": _verify, "diff": _diff, "sign": _sign, "new-site": _new_site}


def main(argv=None):
    """Run the command line; return the exit code."""
    args = _parser().parse_args(argv)
    try:
        return _COMMANDS[args.command](args)
    except SteamcalcError as exc:
        _say(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return EXIT_INTERRUPTED
    except BrokenPipeError:
        # The reader went away (`steamcalc diff ... | head`): stop quietly, as other tools do.
        try:
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, sys.stdout.fileno())
        except (OSError, ValueError):
            pass
        return EXIT_FAILED
    except Exception as exc:  # a bug, not bad input: say so briefly, full trace on request
        if os.environ.get("STEAMCALC_DEBUG"):
            raise
        _say(f"internal error: {type(exc).__name__}: {exc}. Please report it; set STEAMCALC_DEBUG=1 "
              "for the full trace.", file=sys.stderr)
        return EXIT_BAD_INPUT


def entry_point():
    """Console-script entry: exit with :func:`main`'s code."""
    sys.exit(main())
