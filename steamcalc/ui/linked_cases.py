"""A linked record not issued yet, issued from its case file beside the linking case, as a site run would.

``steamcalc run`` on a site folder issues the records a case links before the case (:mod:`steamcalc.batch.tasks`);
a workbook opened on one linking case (the site balance, a steam main fed by or feeding a linked record) does the
same for the record it finds missing: from ``<id>_rev<revision>.toml`` or ``<id>.toml`` beside the linking case,
when that file issues the very revision linked. Anything else stays the linking case's refusal.
"""

from __future__ import annotations

import re
from pathlib import Path

from ..cases.site import case_site, load_case
from ..errors import SteamcalcError
from ..records.build import record_for_case
from ..records.record import write_record
from ..render.report import RENDERERS

#: The refusal of a linked record that is not in its folder (:func:`steamcalc.calcs.links.find_linked_record`).
_MISSING_LINK = re.compile(r"^linked record (?P<id>\S+) revision (?P<revision>\S+) is not at (?P<path>.+?)"
                           r"(?: \(named by .+\))?$")
#: Most linked records issued for one case: each issue clears one refusal, a chain of links is short.
MAX_ISSUED = 50


def linked_case_file(folder, record_id, revision):
    """The case file beside the linking case's that issues ``record_id`` at ``revision`` (ID_revR.toml, else ID.toml
    when it holds that revision), or None."""
    for name in (f"{record_id}_rev{revision}.toml", f"{record_id}.toml"):
        path = Path(folder) / name
        if not path.is_file():
            continue
        try:
            case = load_case(path)
        except SteamcalcError:
            return None
        if case.id == record_id and str(case.revision) == revision:
            return path
    return None


def issue_missing_link(exc, case_folder, record_folder=None):
    """Issue the linked record ``exc`` says is missing, from its case file in ``case_folder``.

    Parameters
    ----------
    exc : InputError
        The linking case's refusal.
    case_folder : Path
        The folder of the linking case file.
    record_folder : Path, optional
        Where to write the record; the folder the refusal looked in when not given.

    Returns
    -------
    str or None
        What was issued, in words; None when the refusal is not a missing linked record with a case file beside
        the linking case (the caller shows the refusal).
    """
    missing = _MISSING_LINK.match(exc.message)
    case_path = missing and linked_case_file(case_folder, missing["id"], missing["revision"])
    if not case_path:
        return None
    linked = load_case(case_path)
    record, _ = record_for_case(linked, case_site(linked))
    folder = Path(record_folder) if record_folder is not None else Path(missing["path"]).parent
    write_record(record, folder, RENDERERS)
    return f"{linked.id} rev {linked.revision} issued from {case_path.name} (it was not in {folder.name}/)"


def issue_linked_records(read_inputs, case_folder, record_folder):
    """Issue each record a case links that is not issued yet, until ``read_inputs`` finds them all.

    Parameters
    ----------
    read_inputs : callable
        Reads the linking case's inputs (its linked records with them), raising its refusal.
    case_folder, record_folder : Path
        The folder of the linking case file; where to write the records issued.

    Returns
    -------
    list of str
        What was issued, in words. Any other refusal is left for the case to show.
    """
    issued = []
    for _ in range(MAX_ISSUED):
        try:
            read_inputs()
            break
        except SteamcalcError as exc:
            line = issue_missing_link(exc, case_folder, record_folder)
            if line is None:
                break
            issued.append(line)
    return issued


__all__ = ["MAX_ISSUED", "issue_linked_records", "issue_missing_link", "linked_case_file"]
