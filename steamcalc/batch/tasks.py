"""One case as a task: compute it, write its record set, and say what happened (worker processes and cluster tasks alike)."""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path

from ..cases.site import case_site, load_case
from ..errors import SteamcalcError
from ..records.build import record_for_case
from ..records.record import write_record
from ..render.report import RENDERERS
from ..runs.runner import default_out_dir


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
    interrupted: bool = False   # not run: the batch was stopped (Ctrl-C) before this case finished


def run_one(path, site_override=None, out_override=None, force=False):
    """Compute one case and write its record; never raises but for Ctrl-C.

    A user's error is the case's failure with its message; any other exception (a bug) is the
    case's failure too, saying so and asking for a report, so the rest of the batch runs on.
    """
    out = Path(out_override) if out_override else None
    try:
        case = load_case(path)
        out = out or default_out_dir(case)
        site = case_site(case, site_override)
        record, _ = record_for_case(case, site, record_folder=out)
        paths, status = write_record(record, out, RENDERERS, force=force)
    except SteamcalcError as exc:
        return CaseOutcome(path=str(path), ok=False, error=str(exc.with_source(path)),
                           out_dir=str(out) if out else "")
    except Exception as exc:  # a bug, not bad input: this case fails, the batch goes on
        if os.environ.get("STEAMCALC_DEBUG"):
            raise
        return CaseOutcome(path=str(path), ok=False, out_dir=str(out) if out else "",
                           error=f"{path}: unexpected error {type(exc).__name__}: {exc}. This is a fault in "
                                 "steamcalc, not in the case: please report it (STEAMCALC_DEBUG=1 shows the trace).")
    return CaseOutcome(path=str(path), ok=True, record_id=record["id"], revision=record["revision"],
                       status=record["status"], write_status=status, paths=[str(p) for p in paths],
                       checks=[c for c in record["checks"] if c["status"] != "pass"], out_dir=str(out))


class _NoBar:
    def update(self, n):
        pass

    def close(self):
        pass


def progress_bar(total, enabled):
    if not enabled:
        return _NoBar()
    try:
        from tqdm import tqdm
    except ImportError:
        return _NoBar()
    return tqdm(total=total, desc="cases", unit="case", leave=False)


def _links_records(path):
    """True for a case of a kind that links issued records (it has ``linked_record_problems``)."""
    from ..calcs import get_calculation

    try:
        return hasattr(get_calculation(load_case(path).kind), "linked_record_problems")
    except SteamcalcError:
        return False   # its own run names what is wrong with it


def link_phases(paths):
    """The case numbers in two phases: cases that link no records, then those that do (each in the order given)."""
    linking = [_links_records(path) for path in paths]
    return [phase for phase in ([n for n, link in enumerate(linking) if not link],
                                [n for n, link in enumerate(linking) if link]) if phase]
