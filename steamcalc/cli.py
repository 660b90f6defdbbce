"""The ``steamcalc`` command line.

Exit codes: 0 all good; 1 a record failed a check or a verification (or a signature was
refused for it); 2 bad input or usage, with a message naming the file, the field and the
fix (no traceback).
"""

from __future__ import annotations

import argparse
import contextlib
import io
import os
import re
import signal
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


#: Exit codes every command shares; each command's help lists what they mean for it.
_BAD_INPUT = "2  bad input or usage (the message names the file, the field, the value and the fix)"

#: name -> (one line for the command list, what it does, examples, exit codes)
_HELP = {
    "run": (
        "compute case files and write their records (JSON, HTML, Markdown)",
        "Compute each case file and issue its record: the JSON (the record itself) with its HTML and Markdown\n"
        "reports, in records/ beside the site file unless --out says otherwise. A folder runs every case in\n"
        "it, in worker processes; a bad case is reported at the end and the others still run. A record of\n"
        "the same id and revision already there is kept when its content is the same, and refused when it\n"
        "differs (raise the case's revision).\n\n"
        "Running several cases also writes index.html and index.csv, an index of every record in the\n"
        "folder. The index lists each record once: a file holding the same record as another in the folder\n"
        "(the same digest - a copy made with cp, say) is not a second row; the row points at the file named\n"
        "as steamcalc names it (ID_revR.json) and names the copies in its 'copies' column. A copy that\n"
        "differs (edited, or signed in one place and not the other) is a record of its own: its own row,\n"
        "pointing at its own JSON, and at its own HTML when there is one beside it. Running one case writes\n"
        "the folder's index again when it has one, so it never lists a record as it was before the run.",
        ["steamcalc run demo_site/cases/LD-01.toml",
         "steamcalc run demo_site/cases --out demo_site/records",
         "steamcalc run demo_site/cases/HX-01.toml --pdf --notebook"],
        ["0  every record written (or kept, unchanged) and none has a failing check",
         "1  a record has a failing check (it is still written, so the checker sees it)",
         _BAD_INPUT + "; in a batch, some cases did not run (each is listed)",
         "130  stopped with Ctrl-C: the records finished are kept, the cases not run are listed"]),
    "verify": (
        "check a record's digest and recompute its results",
        "Check each record: integrity (its digests), then reproduction - every result, check, status,\n"
        "caution and step recomputed from the record's own inputs and compared with what it states, and\n"
        "its uncertainty bands recomputed - then its HTML and Markdown and its signatures. It prints the\n"
        "verdict and every difference first, then what else was checked and the governing results; --all\n"
        "lists every compared value. Each input's text as given is read again and must give the value the\n"
        "record holds; the title, preparer, site name and notes are the engineer's own words. A record\n"
        "whose set is being written (its JSON in place, its reports not yet) is 'issue in progress'.\n\n"
        "Signatures are checked against one trusted signers list, which verify names: the folder given\n"
        "with --trusted, else trusted_signers in your settings file (~/.config/steamcalc/settings.toml,\n"
        "[signing] table), else trusted_signers/ of the site folder directly above the records folder.\n"
        "A list in the records folder itself is never used. A signature must also keep the rules sign\n"
        "keeps: checked before approved, two different keys and people, the preparer never the checker,\n"
        "no signature on a failing record. A name typed into a record is not a signature.",
        ["steamcalc verify demo_site/records/LD-01_revB.json",
         "steamcalc verify demo_site/records --engine fast"],
        ["0  every record verified",
         "1  a record is edited, not reproduced, its companions differ, its issue is in progress, or a signature "
         "is invalid or unknown",
         _BAD_INPUT + "; a file is not a readable record, or a folder named holds no records; --repair cannot "
         "write a report"]),
    "diff": (
        "what changed between two records",
        "Compare two records row by row: the record itself, inputs (the SI value with the text as given\n"
        "beside it), input tolerances, results, uncertainty bands and sensitivity, the uncertainty method,\n"
        "checks, assumptions, cautions, references, warnings, site data and software. Rows that differ come\n"
        "first, marked * changed, + added, - removed; the rows that are the same are counted, and listed\n"
        "after them (marked =) with --all. The HTML page shows the same, the rows that are the same folded\n"
        "away under the ones that differ.",
        ["steamcalc diff demo_site/records/LD-01_revB.json demo_site/records/LD-01_revC.json",
         "steamcalc diff OLD.json NEW.json --all --html changes.html"],
        ["0  compared (whether or not anything differs)",
         _BAD_INPUT + "; a file is not a readable record"]),
    "sign": (
        "the checker's sign-off, after a passing verification",
        "Sign a record with your key after it verifies: the record is verified first (nothing it states is\n"
        "taken on trust) and only a record that verifies and has no failing check is signed. The signature\n"
        "goes into the JSON and shows in its HTML and Markdown. When the record's folder has a records\n"
        "index (index.html, index.csv) the index is written again, so it shows the signature. A record is\n"
        "signed with a key only: a name alone (--by without --key) is refused.",
        ['steamcalc keys new --name "C. Checker" --out ~/keys',
         "steamcalc sign demo_site/records/LD-01_revB.json --key ~/keys/c-checker.key",
         "steamcalc sign demo_site/records/LD-01_revB.json --key ~/keys/a-approver.key --role approved"],
        ["0  signed",
         "1  refused: the record does not verify, has a failing check or is already signed",
         _BAD_INPUT + "; the key file or passphrase cannot be read, or no key is given"]),
    "keys": (
        "signing keys: make a key pair for a checker or approver",
        "Make the signing keys of a checker or approver.",
        ['steamcalc keys new --name "C. Checker" --out ~/keys'],
        ["0  done", _BAD_INPUT]),
    "keys new": (
        "a new Ed25519 key pair: NAME.key (private, 0600) and NAME.pub",
        "Make a new Ed25519 key pair: NAME.key, your private key (file mode 0600; keep it to yourself), and\n"
        "NAME.pub, the public key to put in the site's trusted_signers/ folder. Existing files are never\n"
        "overwritten.",
        ['steamcalc keys new --name "C. Checker" --out ~/keys',
         'steamcalc keys new --name "C. Checker" --out ~/keys --passphrase-file ~/keys/passphrase.txt'],
        ["0  the key pair is written", _BAD_INPUT + "; a key file of that name exists"]),
    "register": (
        "every record of a site or records folder: status, signatures, whether it is current",
        "List every record of a site folder (its records/) or of a records folder, re-verifying each: its\n"
        "status, verification, signatures, and whether it is current - not superseded by a later revision,\n"
        "its case file and the site data unchanged since it was issued, made by the same steamcalc and\n"
        "property engine, its HTML and Markdown matching its JSON. The case compared is the file named as\n"
        "steamcalc names it (ID.toml, or ID_revR.toml as the workbooks save), its [uncertainty] table too;\n"
        "other files giving the same id are named in a warning.\n\n"
        "Every record is recomputed and its reports redrawn. With --remember, a record this same steamcalc (byte\n"
        "for byte, with the same libraries) verified before, unchanged since, is not recomputed again and a\n"
        "report it drew before is compared by its digest (said so in its row): the memory is kept in your cache\n"
        "folder (STEAMCALC_CACHE, else ~/.cache/steamcalc), never among the records, only for records that\n"
        "verified. It is for re-listing a large folder quickly; a register you sign against is made without it.\n\n"
        "--html and --csv replace only a register steamcalc wrote; any other file is refused unless --force,\n"
        "and a record's own files, folders and devices are never written over.",
        ["steamcalc register demo_site",
         "steamcalc register demo_site/records --html register.html --csv register.csv"],
        ["0  every record is current and valid",
         "1  a record is not current or not valid (each reason is listed)",
         _BAD_INPUT + "; the folder holds no records, or --html/--csv names a file the register may not replace"]),
    "new-site": (
        "a new plant folder from a template site",
        "Make a new plant folder from a template site: the site file, the case files and the workbooks\n"
        "beside it, pointed at the new folder. An existing folder is never written into.",
        ["steamcalc new-site ../plant2",
         "steamcalc new-site ../plant2 --from demo_site"],
        ["0  the folder is made", _BAD_INPUT + "; the folder exists"]),
}


def _command(sub, name, **kwargs):
    """A sub-command whose help says what it does, gives examples, and lists its exit codes."""
    summary, description, examples, codes = _HELP[name]
    import textwrap

    codes = [textwrap.fill(c, 96, initial_indent="  ", subsequent_indent="       ") for c in codes]
    epilog = ("Example" + ("s" if len(examples) > 1 else "") + ":\n" + "\n".join(f"  {e}" for e in examples)
              + "\n\nExit codes:\n" + "\n".join(codes))
    return sub.add_parser(name.split()[-1], help=summary, description=description, epilog=epilog,
                          formatter_class=argparse.RawDescriptionHelpFormatter, **kwargs)


def _parser():
    parser = _Parser(prog="steamcalc", description="Steam-system calculation records on IAPWS-IF97.",
                     formatter_class=argparse.RawDescriptionHelpFormatter,
                     epilog="Example:\n  steamcalc run demo_site/cases && steamcalc verify demo_site/records\n\n"
                            "Each command's --help says what it does, with examples and its exit codes:\n"
                            "  0 all good; 1 a record failed a check or a verification (or a signature was\n"
                            "  refused); 2 bad input or usage, with a message naming the file, the field and the fix.")
    parser.add_argument("--version", action="version", version=f"steamcalc {__version__}")
    sub = parser.add_subparsers(dest="command", required=True, parser_class=_Parser, metavar="COMMAND")

    run = _command(sub, "run")
    run.add_argument("cases", nargs="+", metavar="CASE", help="case files (.toml) or folders of them")
    run.add_argument("--site", metavar="SITE.toml", help="site file to use instead of each case's own")
    run.add_argument("--out", metavar="DIR", help="folder for the records (default: records/ beside the site file)")
    run.add_argument("--notebook", action="store_true", help="also save the executed workbook beside each record")
    run.add_argument("--pdf", action="store_true", help="also print each record to PDF (needs Chromium)")
    run.add_argument("--quiet", action="store_true", help="no progress bar")
    run.add_argument("--scheduler", metavar="ADDRESS", help="hand the cases to the Dask scheduler at ADDRESS "
                     "(needs the cluster extra; default: local worker processes)")
    run.add_argument("--force", action="store_true",
                     help="replace report, index and companion files of the records' names that steamcalc did not write")

    verify = _command(sub, "verify")
    verify.add_argument("records", nargs="+", metavar="RECORD.json", help="record files, or folders of them")
    verify.add_argument("--repair", action="store_true",
                        help="re-render the HTML and Markdown beside a record that verifies, where they differ")
    verify.add_argument("--trusted", metavar="DIR", help="trusted signers folder (default: the one in your settings "
                        "file, else trusted_signers/ of the site above the records folder; never one among the "
                        "records)")
    verify.add_argument("--scheduler", metavar="ADDRESS", help="verify the records as tasks on the Dask scheduler "
                        "at ADDRESS (needs the cluster extra)")
    verify.add_argument("--engine", choices=("iapws", "fast"), default="iapws",
                        help="IF97 engine to recompute with: iapws (the records' own, default) or fast (seuif97, "
                             "an independent second implementation)")
    verify.add_argument("--all", action="store_true",
                        help="list every compared value, recorded and recomputed (by default: the verdict, the "
                             "differences, then the governing results)")

    diff = _command(sub, "diff")
    diff.add_argument("old", metavar="OLD.json", help="the earlier record")
    diff.add_argument("new", metavar="NEW.json", help="the later record")
    diff.add_argument("--html", metavar="FILE.html", help="also write the comparison as an HTML page")
    diff.add_argument("--all", action="store_true", help="also list the rows that are the same, after the ones that differ")
    diff.add_argument("--force", action="store_true", help="replace an existing FILE.html that steamcalc did not write")

    sign = _command(sub, "sign")
    sign.add_argument("record", metavar="RECORD.json", help="the record to sign (its HTML and Markdown are re-rendered)")
    sign.add_argument("--by", metavar="NAME", help="the signer's name, checked against the key's name (a name "
                      "alone, without --key, is refused: it proves nothing about who signed)")
    sign.add_argument("--key", metavar="KEYFILE", help="your private key file (*.key, from `steamcalc keys new`)")
    sign.add_argument("--role", choices=("checked", "approved"), default="checked", help="what the signature says")
    sign.add_argument("--passphrase-file", metavar="FILE", help="file holding the key's passphrase")
    sign.add_argument("--trusted", metavar="DIR", help="trusted signers folder (default: the one in your settings "
                      "file, else trusted_signers/ of the site above the records folder; never one among the records)")

    keys = _command(sub, "keys")
    keys_sub = keys.add_subparsers(dest="keys_command", required=True, parser_class=_Parser)
    keys_new = _command(keys_sub, "keys new")
    keys_new.add_argument("--name", required=True, metavar="NAME", help="your name as it goes on signed records")
    keys_new.add_argument("--out", default=".", metavar="DIR", help="folder for the two files (default: here)")
    keys_new.add_argument("--passphrase-file", metavar="FILE", help="protect the private key with the passphrase "
                          "in FILE (without it the key is protected by its file mode only)")

    register = _command(sub, "register")
    register.add_argument("folder", metavar="DIR", help="a site folder (with site.toml) or a records folder")
    register.add_argument("--html", metavar="FILE.html", help="also write the register as an HTML page")
    register.add_argument("--csv", metavar="FILE.csv", help="also write the register as CSV")
    register.add_argument("--trusted", metavar="DIR", help="trusted signers folder (default: the one in your "
                          "settings file, else the site's trusted_signers/; never one among the records)")
    register.add_argument("--remember", action="store_true", help="use and keep this machine's memory of the records "
                          "the same steamcalc verified before: those are not recomputed (default: every record is)")
    register.add_argument("--force", action="store_true", help="replace an existing FILE.html or FILE.csv that is "
                          "not a register steamcalc wrote (never a record's file, a folder or a device)")

    site = _command(sub, "new-site")
    site.add_argument("folder", metavar="DIR", help="the new plant folder (must not exist yet)")
    site.add_argument("--from", dest="template", metavar="TEMPLATE", help="template site (default: the demo site)")
    return parser


def _run(args):
    from .batch.batch import find_case_files, run_cases, write_index

    paths = find_case_files(args.cases)
    if args.out and Path(args.out).exists() and not Path(args.out).is_dir():
        raise SteamcalcError("--out names a file, not a folder", source=args.out,
                             fix="give --out a folder for the records (it is created if absent)")
    from .render.display import shown_check

    outcomes = run_cases(paths, args.site, args.out, progress=not args.quiet and len(paths) > 1, force=args.force,
                         scheduler=args.scheduler)
    worst = EXIT_OK
    failures = [o for o in outcomes if not o.ok]
    for outcome in outcomes:
        if not outcome.ok:
            continue
        note = "written" if outcome.write_status == "written" else "unchanged (same content as the existing record, kept)"
        _say(f"{outcome.record_id} rev {outcome.revision}: {outcome.status.upper()} - {note}")
        for p in outcome.paths:
            _say(f"  {p}")
        system = _display_system(outcome) if outcome.checks else "SI"
        for check in outcome.checks:
            name, detail = shown_check(check, system)   # in the site's display units, as the record shows them
            _say(f"  {check['status']}: {name}: {detail}")
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
    else:
        # One case: the folder's index, when it has one, is written again (as after a sign-off), so it never
        # lists the record as it was before this run.
        from .batch.batch import refresh_index
        for folder in sorted({o.out_dir for o in outcomes if o.out_dir and o.ok}):
            note = refresh_index(folder)
            if note:
                _say(f"  {note}")
    stopped = [o for o in failures if o.interrupted]
    failed = [o for o in failures if not o.interrupted]
    if failed:
        _say(f"\n{len(failed)} of {len(outcomes)} case(s) not run:", file=sys.stderr)
        for outcome in failed:
            _say(f"error: {outcome.error}", file=sys.stderr)
        worst = EXIT_BAD_INPUT
    if stopped:
        _say(f"\nstopped (Ctrl-C or a stop signal): {len(stopped)} of {len(outcomes)} case(s) did not run:", file=sys.stderr)
        for outcome in stopped:
            _say(f"  not run: {outcome.path}", file=sys.stderr)
        return EXIT_INTERRUPTED
    return worst


def _display_system(outcome):
    """The display units of a record just written ("SI" or "US", from its site), for the lines run prints."""
    import json

    from .render.display import record_system
    try:
        return record_system(json.loads(Path(outcome.paths[0]).read_text(encoding="utf-8")))
    except (OSError, ValueError, IndexError, AttributeError):
        return "SI"


def _companions(args, outcome):
    if not (args.notebook or args.pdf):
        return EXIT_OK
    from .records.companions import run_notebook, write_pdf
    from .cases.site import load_case
    from .records.issuing import refuse_foreign_file

    json_path = Path(outcome.paths[0])
    try:
        # The one rule for named outputs, before anything runs (a folder or device of the name is never written).
        for wanted, suffix, kind in ((args.notebook, ".ipynb", "notebook"), (args.pdf, ".pdf", "pdf")):
            if wanted:
                refuse_foreign_file(json_path.with_suffix(suffix), args.force, kind)
        if args.notebook:
            _say(f"  {run_notebook(load_case(outcome.path), json_path.parent, json_path.stem, force=args.force)}")
        if args.pdf:
            _say(f"  {write_pdf(json_path.with_suffix('.html'), force=args.force)}")
    except SteamcalcError as exc:
        _say(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    return EXIT_OK


def _record_files(paths):
    """Record files named, and every record (*.json) in named folders; a folder holding none is refused
    (an empty verification would read as a pass)."""
    files = []
    for raw in paths:
        path = Path(raw)
        found = sorted(str(p) for p in path.glob("*.json")) if path.is_dir() else [raw]
        if not found:
            raise SteamcalcError("no records (*.json) in this folder", source=raw,
                                 fix="name record files, or the folder that holds them (a site's records/)")
        files.extend(found)
    return files


def _verify_one(raw, engine):
    """``(path, record, verification, error)`` for one record file; never raises for a bad file."""
    from .review.verify import verify_file

    try:
        return verify_file(raw, engine)
    except SteamcalcError as exc:
        return raw, None, None, str(exc)
    except Exception as exc:  # a bug: say so for this file and go on to the next
        if os.environ.get("STEAMCALC_DEBUG"):
            raise
        return raw, None, None, f"unexpected error {type(exc).__name__}: {exc}. Please report it."


def _verify(args):
    worst = EXIT_OK
    files = _record_files(args.records)
    if args.scheduler:
        from .batch.cluster import verify_on_cluster
        checked = verify_on_cluster(files, args.engine, args.scheduler, progress=len(files) > 1)
    else:
        checked = (_verify_one(raw, args.engine) for raw in files)
    for raw, record, outcome, error in checked:
        # Each file is verified and reported on its own: a bad one never hides the others.
        if error is not None:
            _say(f"{raw}: NOT VERIFIED - {error}", file=sys.stderr)
            worst = EXIT_BAD_INPUT
            continue
        # The verdict and what differs first; the rest after; every result only with --all.
        captured = io.StringIO()
        with contextlib.redirect_stdout(captured):
            trust_ok, signed, unwritable, in_progress = _verify_trust(args, raw, record, outcome)
        # A set caught between its JSON's move and its reports' is not verified as a set, nor called edited.
        verdict = "VERIFIED" if outcome.ok and trust_ok and not in_progress else \
            "FAILED" if not (outcome.ok and trust_ok) else "NOT YET VERIFIED - ISSUE IN PROGRESS"
        for line in verify_report(raw, record, outcome, f"{verdict} ({signed})", captured.getvalue().splitlines(),
                                  args.engine, args.all):
            _say(line)
        if unwritable:   # --repair could not write a report: the folder, not the record, is at fault
            worst = EXIT_BAD_INPUT
        if verdict != "VERIFIED" and worst != EXIT_BAD_INPUT:
            worst = EXIT_FAILED
    return worst


#: Words in a line of the signatures and companions part of a verification that mark it as a difference or a
#: failure (so it is listed with the differences, first).
_PROBLEM_WORDS = ("statement changed:", "DIFFERS", "ISSUE IN PROGRESS", "could NOT", "INVALID", "UNKNOWN KEY",
                  "unknown key", "rule broken", "does not hold", "do not hold", "repair: not done", "EDITED")


def verify_report(raw, record, outcome, verdict, trust_lines, engine="iapws", every_result=False):
    """The lines ``steamcalc verify`` prints for one record, in the order a checker reads them.

    First the verdict, the integrity and the reproduction in one line each, then every difference (the
    results that differ, with their recorded and recomputed values, the checks, statements, companions and
    signatures that do not hold); then the rest of what was checked (notes, versions, status, companions,
    signatures); last the governing results as recorded and recomputed - or, with ``every_result``
    (``--all``), the table of every compared value.

    Parameters
    ----------
    raw : str
        The record file as named.
    record : dict
    outcome : steamcalc.review.verify.Verification
    verdict : str
        The verdict in words ("VERIFIED (not signed)").
    trust_lines : list of str
        What the status, companions and signatures part of the verification said, one line each.
    engine : str
    every_result : bool
    """
    lines = [f"{raw}: {record['id']} rev {record['revision']}", f"  verdict: {verdict}"]
    if engine != "iapws":
        lines.append(f"  recomputed on the {engine} IF97 engine (the record was computed on iapws)")
    lines.append(f"  integrity: {'intact' if outcome.digest_ok and outcome.content_digest_ok else 'EDITED - digest does not match'}")
    problems = [line for line in trust_lines if any(word in line for word in _PROBLEM_WORDS)]
    rest = [line for line in trust_lines if line not in problems]
    if outcome.error:
        lines.append(f"  reproduction: NOT POSSIBLE - {outcome.error}")
        lines += problems + rest
        return lines
    comparisons = outcome.comparisons
    differing = [c for c in comparisons if c.verdict != "same"]
    explained = [c for c in differing if c.verdict == "changed"]
    lines.append(f"  reproduction: {'reproduced' if outcome.reproduced else 'NOT REPRODUCED'} - "
                 f"{len(comparisons) - len(differing)} of {len(comparisons)} values recomputed from the record's own "
                 f"inputs as recorded ({_counted(comparisons)})"
                 + (f"; {len(explained)} changed by a later release's basis, each explained in a note" if explained
                    else ""))
    if differing or outcome.check_changes or problems:
        count = len(differing) + len(outcome.check_changes) + len(problems)
        lines.append(f"  differences ({count}):")
        if differing:
            lines.append(format_comparisons(differing, record))
        lines += [f"  check changed: {change}" for change in outcome.check_changes] + problems
    else:
        lines.append("  differences: none")
    largest = outcome.largest_difference
    if largest is not None:
        from .render.display import result_label
        lines.append(f"  largest relative difference: {largest.rel_diff:.1e} ({result_label(record, largest.key)})")
    lines += [f"  note: {note}" for note in outcome.notes]
    lines += [f"  version: {name} {then} in the record, {now} here" for name, (then, now) in outcome.version_changes.items()]
    lines += rest
    if every_result:
        lines += ["  every compared value, recorded and recomputed:", format_comparisons(comparisons, record)]
        return lines
    from .calcs import get_calculation

    try:
        wanted = getattr(get_calculation(record.get("kind")), "SUMMARY_RESULTS", ())
    except SteamcalcError:
        wanted = ()
    governing = [c for key in wanted for c in comparisons if c.key == key and c.verdict == "same"]
    if governing:
        lines += ["  governing results, recorded and recomputed:", format_comparisons(governing, record)]
    others = len(comparisons) - len(differing) - len(governing)
    if others:
        lines.append(f"  ({others} other values are as recorded and not listed; steamcalc verify --all lists every one)")
    return lines


def _counted(comparisons):
    """What the compared values are, counted: results, figure data and uncertainty values."""
    figures = sum(1 for c in comparisons if c.key.startswith("figure "))
    bands = sum(1 for c in comparisons if c.key.startswith("uncertainty."))
    parts = [f"{len(comparisons) - figures - bands} results"]
    if figures:
        parts.append(f"{figures} figure{'' if figures == 1 else 's'}")
    if bands:
        parts.append(f"{bands} uncertainty values")
    return ", ".join(parts)


def format_comparisons(comparisons, record=None):
    """The per-result table of a verification, as text (laid out by :func:`steamcalc.render.display.verify_table`)."""
    from .render.display import comparisons_shown, record_system, verify_table
    from .review.verify import ABSOLUTE_TOLERANCE, RELATIVE_TOLERANCE

    # In a US site the values are shown in US units (converted by pint); the comparison itself is on the JSON's.
    shown, shown_record = comparisons_shown(comparisons, record)
    table = verify_table(shown, shown_record, RELATIVE_TOLERANCE, ABSOLUTE_TOLERANCE)
    if record_system(record) == "US":
        table += ("\n  (values in US customary units, converted for display from the record's SI values, "
                  "which are the ones compared)")
    return table


def _cell(value):
    if isinstance(value, float):
        return f"{value:.8g}"
    return "-" if value is None else str(value)


def _diff(args):
    from .records.record import load_record
    from .review.diff import check_diff_target, diff_records, write_diff_html

    if args.html:
        check_diff_target(args.html, (args.old, args.new), args.force)
    old, new = load_record(args.old), load_record(args.new)
    rows = diff_records(old, new, unchanged=True)
    for line in format_diff(rows, old, new, args.old, args.new, args.all):
        _say(line)
    if args.html:
        write_diff_html(args.html, old, new, rows, (args.old, args.new), args.force)
        _say(f"  written: {args.html}")
    return EXIT_OK


#: Old or new text longer than this goes on lines of its own under the item.
_LONG_TEXT = 48


def format_diff(rows, old, new, old_name, new_name, unchanged=False):
    """The lines ``steamcalc diff`` prints: a summary, then every row that differs, marked, by section;
    with ``unchanged`` the rows that are the same follow, marked ``=``."""
    from .review.diff import diff_summary

    differing = [r for r in rows if r["status"] != "same"]
    same = [r for r in rows if r["status"] == "same"]
    lines = [f"{old.get('id')} rev {old.get('revision')} -> {new.get('id')} rev {new.get('revision')}: "
             f"{diff_summary(rows)}",
             f"  old: {old_name} (created {old.get('created')})", f"  new: {new_name} (created {new.get('created')})",
             "  marks: * changed, + added, - removed, = the same; values in the records' SI units, "
             "the text as given in brackets"]
    if not differing:
        lines.append("no differences: every compared row is the same")
    lines += _diff_lines(differing)
    if same and unchanged:
        lines += ["", f"The same in both ({len(same)} rows)"] + _diff_lines(same)
    elif same:
        lines.append(f"({len(same)} rows the same in both are not listed; --all lists them after these)")
    return lines


def _diff_lines(rows):
    lines, section = [], None
    for row in rows:
        if row["section"] != section:
            section = row["section"]
            lines += ["", row["section_label"]]
        key = f" [{row['case_key']}]" if row.get("case_key") else ""
        old, new = _diff_cell(row, "old"), _diff_cell(row, "new")
        change = row["change_text"]
        if isinstance(row["change"], float) and row["unit_label"]:
            change += f" {row['unit_label']}"
        if row["status"] == "same":
            text = f"{old}" if len(old) <= _LONG_TEXT else ""
            lines.append(f"  = {row['label']}{key}: {text}".rstrip(": "))
            if len(old) > _LONG_TEXT:
                lines.append(f"      {old}")
        elif len(old) > _LONG_TEXT or len(new) > _LONG_TEXT:
            lines += [f"  {row['marker']} {row['label']}{key}: {change}", f"      old: {old}", f"      new: {new}"]
        else:
            said = row["status"] != "changed" or change == "changed"
            lines.append(f"  {row['marker']} {row['label']}{key}: {old} -> {new}" + ("" if said else f"; change {change}"))
    return lines


def _diff_cell(row, side):
    if row[side] is None and row["status"] in ("added", "removed"):
        return "(none)"
    text = row[f"{side}_text"]
    if row["unit_label"] and isinstance(row[side], (int, float)) and not isinstance(row[side], bool):
        text += f" {row['unit_label']}"
    given = row[f"{side}_given"]
    if given and given not in (row[f"{side}_text"], text):
        text += f" (as given: {given})"
    return text


def _verify_trust(args, raw, record, outcome):
    """Status, statements, companions and signatures of a verification: ``(all hold, signing state in words,
    a report --repair could not write, an issue of the set in progress)``."""
    from .review.verify import ENGINEERS_WORDS, check_companions
    from .signing.signatures import NAME_TYPED, check_signatures, name_only_signoff
    from .signing.trust import resolve_trust

    for change in outcome.statement_changes:
        _say(f"  statement changed: {change}")
    _say(f"  not recomputed, shown as the engineer's own words: {', '.join(ENGINEERS_WORDS)} (each input's text as "
         "given is read again and must give its value)")
    if outcome.recomputed_status:
        _say(f"  status: {record.get('status')} in the record, {outcome.recomputed_status} recomputed")
    notices = [c for c in record.get("checks", []) if isinstance(c, dict) and c.get("kind") == "notice"]
    if notices:   # statements that cannot warn or fail: apart from the checks, never counted as passes
        _say(f"  notices (statements, not checks: they cannot fail): {', '.join(str(c.get('name')) for c in notices)}")
    ok = True
    companions = check_companions(raw, record, repair=args.repair and outcome.ok)
    for c in companions:
        _say(f"  companion {c.path.name}: " + {"match": "matches the JSON", "absent": "absent",
              "repaired": "re-rendered from the JSON (repaired)",
              "differs": "DIFFERS from the JSON's rendering (edited by hand?)",
              "typed-as-signed": "DIFFERS from the JSON's rendering: drawn by an earlier release, it shows the typed "
                                 "name as a sign-off; steamcalc verify --repair draws it again as a name typed",
              "not checked": "NOT CHECKED - it cannot be compared with the JSON (print or run it again from the "
                             "verified record if you hand it on; only the JSON, HTML and Markdown are verified)",
              "earlier layout": "shows the JSON as releases 0.2 and 0.3 laid reports out (before the first page "
                                "for the checker); steamcalc verify --repair draws it in this release's layout",
              "older": "as this release draws it but for the charts release 0.2 drew (a schema-1 record keeps "
                       "no figure data, so they are not checked); kept as it is - re-issue the case under a new "
                       "revision for charts drawn from figure data",
              "in progress": "ISSUE IN PROGRESS, not edited - " + str(c.problem) + "; verify again once it is done "
                             "(a writer that was stopped is completed by the next steamcalc run or sign of this "
                             "record)",
              "not repaired": "DIFFERS and could NOT be re-rendered: " + str(c.problem)}[c.verdict]
             + (f" ({c.problem})" if c.problem and c.verdict in ("differs", "absent") else ""))
        ok = ok and not c.differs
    if args.repair and not outcome.ok:
        _say("  repair: not done - the JSON itself does not verify, so it is not rendered again")
    unwritable = [c for c in companions if c.verdict == "not repaired"]
    for c in unwritable:
        _say(f"error: {c.path}: the report could not be re-rendered: {c.problem}", file=sys.stderr)
    trust = resolve_trust(Path(raw).parent, args.trusted)
    status = outcome.recomputed_status or record.get("status")
    signatures = check_signatures(record, trust.keys, status)
    legacy = name_only_signoff(record, outcome)
    if signatures or legacy:
        _say(f"  trusted signers: {trust.describe()}")
    for note in trust.notes():
        _say(f"  {note}")
    if legacy:
        _say(f"  signature: none - {legacy[0]} (a name anyone can type; it counts as not signed)")
        for problem in legacy[1]:
            _say(f"  signature: the typed name's claims do not hold: {problem}")
        ok = ok and not legacy[1]
    if not signatures:
        _say("  signatures: not signed")
    for check in signatures:
        _say(f"  signature: {check.describe()}")
        ok = ok and check.ok
    if signatures and all(c.ok for c in signatures):
        signed = "signed: " + ", ".join(f"{c.role} by {c.name}" for c in signatures) + ", trusted keys"
    elif signatures:
        signed = "a signature does not hold"
    else:
        signed = f"not signed; {NAME_TYPED}" if legacy else "not signed"
    in_progress = any(c.verdict == "in progress" for c in companions)
    if in_progress:
        signed += "; its reports not yet in place: verify again when the issue is done"
    return ok, signed, bool(unwritable), in_progress


def _sign_with_key(args):
    from .signing.keys import SigningInputError, short_fingerprint
    from .review.sign import sign_with_key

    try:
        signed = sign_with_key(args.record, args.key, args.role, args.by, args.passphrase_file, args.trusted)
    except SigningInputError as exc:
        _say(f"error: {exc}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except SteamcalcError as exc:
        _say(f"refused: {exc}", file=sys.stderr)
        return EXIT_FAILED
    entry = signed["signatures"][-1]
    _say(f"{signed['id']} rev {signed['revision']}: {entry['role']} and signed by {entry['name']} on "
          f"{entry['date']}, key {short_fingerprint(entry['fingerprint'])}")
    _say(f"  {args.record}, with its HTML and Markdown")
    _refresh_index(args.record)
    from .signing.trust import resolve_trust

    trust = resolve_trust(Path(args.record).parent, args.trusted)
    if entry["fingerprint"] not in trust.keys:
        _say(f"  note: this key is not in the trusted signers used here, {trust.describe()}; verify reports it as "
              "unknown until its .pub file is added there")
    return EXIT_OK


def _keys(args):
    from .signing.keys import load_public_key, new_key_pair, read_passphrase, short_fingerprint

    passphrase = read_passphrase(args.passphrase_file) if args.passphrase_file else None
    private, public = new_key_pair(args.name, args.out, passphrase)
    _say(f"key pair for {args.name}, key {short_fingerprint(load_public_key(public).fingerprint)}")
    _say(f"  private: {private} (mode 0600{', passphrase-protected' if passphrase else ''}; keep it to yourself)")
    _say(f"  public:  {public} (give it to the site's trusted_signers/ folder)")
    return EXIT_OK


def _register(args):
    from .review.register import build_register, format_register, write_register_csv, write_register_html

    from .review.register import register_trust
    from .records.issuing import refuse_foreign_file

    targets = [(t, w) for t, w in ((args.html, write_register_html), (args.csv, write_register_csv)) if t]
    if len(targets) == 2 and os.path.abspath(args.html) == os.path.abspath(args.csv):
        raise SteamcalcError("--html and --csv name the same file", source=args.html,
                             fix="give each its own file name, such as register.html and register.csv")
    for target, _ in targets:   # refused before the records are recomputed, not after
        refuse_foreign_file(target, args.force, "register")
    trust = register_trust(args.folder, args.trusted)
    rows = build_register(args.folder, trusted_dir=args.trusted, remember=args.remember, workers=8)
    _say(f"trusted signers: {trust.describe()}")
    for note in trust.notes():
        _say(note)
    _say(format_register(rows))
    for target, write in targets:
        write(target, rows, force=args.force)
        _say(f"written: {target}")
    return EXIT_OK if all(r.ok for r in rows) else EXIT_FAILED


def _sign(args):
    from .review.signoff import name_only_refused

    if args.key:
        return _sign_with_key(args)
    if args.by:   # a typed name is not a signature: refused before the record is even read
        raise name_only_refused(args.record, args.by)
    raise SteamcalcError("give --key KEYFILE, your private key file", source=args.record, field="--key",
                         fix='make a key pair once with: steamcalc keys new --name "Your Name"; then sign with '
                             "--key pointing at its .key file")


def _refresh_index(record_path):
    """After a sign-off: the records index of the record's folder written again, when it has one."""
    from .batch.batch import refresh_index

    note = refresh_index(Path(record_path).parent)
    if note:
        _say(f"  {note}")


def _new_site(args):
    from .cases.newsite import new_site

    files = new_site(args.folder, args.template)
    _say(f"new site folder {args.folder}: {len(files)} files")
    for f in files:
        _say(f"  {f}")
    _say("next: edit site.toml (name, elevation, headers, prices) and the cases, then "
          f"`steamcalc run {args.folder}/cases`")
    return EXIT_OK


_COMMANDS = {"run": _run, "verify": _verify, "diff": _diff, "sign": _sign, "new-site": _new_site,
             "keys": _keys, "register": _register}


def _stop(signum, frame):
    raise KeyboardInterrupt(signal.Signals(signum).name)


def _stopping_signals():
    """SIGTERM and SIGHUP (a closed terminal, a service manager stopping the job) end a command as Ctrl-C does:
    what finished is kept and reported, staging is cleaned up, nothing is left half-written. The handlers
    before are returned, to be put back."""
    before = {}
    for name in ("SIGTERM", "SIGHUP"):
        number = getattr(signal, name, None)
        if number is None:
            continue
        try:
            before[number] = signal.signal(number, _stop)
        except ValueError:   # not the main thread (an embedding program): leave its signals alone
            pass
    return before


def main(argv=None):
    """Run the command line; return the exit code."""
    args = _parser().parse_args(argv)
    before = _stopping_signals()
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
    finally:
        for number, handler in before.items():
            signal.signal(number, handler)


def entry_point():
    """Console-script entry: exit with :func:`main`'s code."""
    sys.exit(main())
