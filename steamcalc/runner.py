"""From a case (file, or a record's inputs) to a record: the one path every front end uses."""

from __future__ import annotations

import os
from pathlib import Path

from .engines import REFERENCE_ENGINE, using_engine

from .calcs import get_calculation
from .calcs.base import from_record_inputs, to_record_inputs
from .errors import SteamcalcError
from .record import build_record
from .site import Site, case_inputs, case_site, load_case


def record_for_case(case, site, *, inputs=None, given=None, created=None, with_uncertainty=True):
    """Compute a loaded case against a site and assemble its record.

    Parameters
    ----------
    case : steamcalc.site.Case
        The case as read by :func:`steamcalc.site.load_case`.
    site : steamcalc.site.Site
        The site it runs against.
    inputs, given : optional
        Inputs object and given texts when they come from a form rather than the file.
    created : str, optional
        Creation time to stamp (defaults to now).
    with_uncertainty : bool
        Run the case's ``[uncertainty]`` (Monte Carlo) too; a live form leaves it for a button.
    """
    calc = get_calculation(case.kind)
    if inputs is None:
        inputs, given = case_inputs(case, site)
    try:
        result = calc.calculate(inputs, site)
        uncertainty = None
        if case.uncertainty and with_uncertainty:
            from .uncertainty import parse_coverage, parse_tolerances, run_uncertainty, sample_check
            tolerances, samples, seed = parse_tolerances(calc.Inputs, case.uncertainty, inputs)
            if tolerances:
                uncertainty = run_uncertainty(calc, inputs, site, tolerances, samples, seed,
                                              coverage=parse_coverage(case.uncertainty), nominal_result=result)
                result.check(*sample_check(uncertainty))
    except SteamcalcError as exc:
        raise exc.with_source(case.path)
    return build_record(uncertainty=uncertainty,
        kind=case.kind, case_id=case.id, revision=case.revision, title=case.title,
        prepared_by=case.prepared_by, site=site, inputs_table=to_record_inputs(inputs, given),
        result=result, notes=case.notes, created=created,
    ), result


def record_for_case_file(path, site_path=None):
    """Load a case file, its site (or the override) and compute its record."""
    case = load_case(path)
    site = case_site(case, site_path)
    record, _ = record_for_case(case, site)
    return record


def recompute(record, engine=REFERENCE_ENGINE):
    """Re-run a record's calculation from its stored inputs and site.

    Parameters
    ----------
    record : dict
    engine : str
        The IF97 engine to recompute with: "iapws" (the engine of issued records) or "fast"
        (the independent second implementation).

    Returns
    -------
    steamcalc.calcs.base.Result
    """
    calc = get_calculation(record["kind"])
    inputs = from_record_inputs(calc.Inputs, record["inputs"])
    site = Site.from_record(record["site"])
    with using_engine(engine):
        return calc.calculate(inputs, site)


def recompute_uncertainty(record, nominal_result=None):
    """Re-run a record's uncertainty section from its inputs, tolerances, samples, seed and coverage.

    ``nominal_result`` is the record's calculation already recomputed on the engine of issued records
    (verify has it), so the nominal is not computed twice.
    """
    from .uncertainty import DEFAULT_COVERAGE, run_uncertainty, tolerances_from_record

    calc = get_calculation(record["kind"])
    section = record["uncertainty"]
    inputs = from_record_inputs(calc.Inputs, record["inputs"])
    with using_engine(REFERENCE_ENGINE):
        return run_uncertainty(calc, inputs, Site.from_record(record["site"]),
                               tolerances_from_record(calc.Inputs, section), section["samples"], section["seed"],
                               coverage=section.get("coverage", DEFAULT_COVERAGE), nominal_result=nominal_result)


def default_out_dir(case):
    """Where records go when no --out is given: ``records/`` beside the site file, else the case."""
    base = case.site_path.parent if case.site_path is not None else Path(case.path).parent
    return Path(os.path.normpath(base / "records"))
