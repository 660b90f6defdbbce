"""The ``steamcalc`` command line.

Exit codes: 0 all good; 1 a record failed a check or a verification; 2 bad input
or usage, with a message naming the file, the field and the fix (no traceback).
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from . import __version__
from .errors import SteamcalcError
from .record import load_record, write_record
from .report import RENDERERS
from .review import verify_record
from .runner import default_out_dir, record_for_case
from .site import case_site, load_case

EXIT_OK, EXIT_FAILED, EXIT_BAD_INPUT = 0, 1, 2


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

    verify = sub.add_parser("verify", help="check a record's digest and recompute its results")
    verify.add_argument("records", nargs="+", metavar="RECORD.json")
    return parser


def _case_files(paths):
    files = []
    for raw in paths:
        path = Path(raw)
        if path.is_dir():
            found = sorted(p for p in path.rglob("*.toml") if p.name != "site.toml" and "records" not in p.parts)
            if not found:
                raise SteamcalcError("no case files (*.toml) in this folder", source=path)
            files.extend(found)
        else:
            files.append(path)
    return files


def _run(args):
    worst = EXIT_OK
    for path in _case_files(args.cases):
        try:
            case = load_case(path)
            site = case_site(case, args.site)
            record, _ = record_for_case(case, site)
            out = Path(args.out) if args.out else default_out_dir(case)
            paths, status = write_record(record, out, RENDERERS)
        except SteamcalcError as exc:
            print(f"error: {exc.with_source(path)}", file=sys.stderr)
            worst = EXIT_BAD_INPUT
            continue
        verdict = record["status"]
        note = "written" if status == "written" else "unchanged (same content as the existing record, kept)"
        print(f"{record['id']} rev {record['revision']}: {verdict.upper()} - {note}")
        for p in paths:
            print(f"  {p}")
        for check in record["checks"]:
            if check["status"] != "pass":
                print(f"  {check['status']}: {check['name']}: {check['detail']}")
        if verdict == "fail" and worst == EXIT_OK:
            worst = EXIT_FAILED
    return worst


def _verify(args):
    worst = EXIT_OK
    for raw in args.records:
        try:
            record = load_record(raw)
        except SteamcalcError as exc:
            print(f"error: {exc}", file=sys.stderr)
            worst = EXIT_BAD_INPUT
            continue
        outcome = verify_record(record)
        print(f"{raw}: {record['id']} rev {record['revision']}")
        print(f"  integrity: {'intact' if outcome.digest_ok and outcome.content_digest_ok else 'EDITED - digest does not match'}")
        if outcome.error:
            print(f"  reproduction: NOT POSSIBLE - {outcome.error}")
        else:
            width = max((len(c.key) for c in outcome.comparisons), default=10)
            print(f"  {'result':<{width}}  {'recorded':>14}  {'recomputed':>14}  {'rel. diff':>9}  verdict")
            for c in outcome.comparisons:
                rel = "" if c.rel_diff is None else f"{c.rel_diff:.1e}"
                print(f"  {c.key:<{width}}  {_cell(c.recorded):>14}  {_cell(c.recomputed):>14}  {rel:>9}  {c.verdict}")
            for change in outcome.check_changes:
                print(f"  check changed: {change}")
            print(f"  reproduction: {'reproduced' if outcome.reproduced else 'NOT REPRODUCED'}")
        for name, (then, now) in outcome.version_changes.items():
            print(f"  version: {name} {then} in the record, {now} here")
        print(f"  verdict: {'VERIFIED' if outcome.ok else 'FAILED'}")
        if not outcome.ok:
            worst = max(worst, EXIT_FAILED) if worst != EXIT_BAD_INPUT else worst
    return worst


def _cell(value):
    if isinstance(value, float):
        return f"{value:.8g}"
    return "-" if value is None else str(value)


def main(argv=None):
    """Run the command line; return the exit code."""
    args = _parser().parse_args(argv)
    try:
        if args.command == "run":
            return _run(args)
        return _verify(args)
    except SteamcalcError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        return 130
    except Exception as exc:  # a bug, not bad input: say so briefly, full trace on request
        if os.environ.get("STEAMCALC_DEBUG"):
            raise
        print(f"internal error: {type(exc).__name__}: {exc}. Please report it; set STEAMCALC_DEBUG=1 "
              "for the full trace.", file=sys.stderr)
        return EXIT_BAD_INPUT


def entry_point():
    """Console-script entry: exit with :func:`main`'s code."""
    sys.exit(main())
