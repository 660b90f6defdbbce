"""From a case (file, or a form's inputs) to a record: the one path every front end uses."""

from __future__ import annotations

from ..calcs import get_calculation
from ..calcs.base import to_record_inputs
from ..cases.site import case_inputs, case_site, load_case
from ..errors import SteamcalcError
from ..properties.engines import remembering_states
from .record import IssuedRecords, build_record


def record_for_case(case, site, *, inputs=None, given=None, created=None, with_uncertainty=True, record_folder=None):
    """Compute a loaded case against a site and assemble its record.

    Parameters
    ----------
    case : steamcalc.cases.site.Case
        The case as read by :func:`steamcalc.cases.site.load_case`.
    site : steamcalc.cases.site.Site
        The site it runs against.
    inputs, given : optional
        Inputs object and given texts when they come from a form rather than the file.
    created : str, optional
        Creation time to stamp (defaults to now).
    with_uncertainty : bool
        Run the case's ``[uncertainty]`` (Monte Carlo) too; a live form leaves it for a button.
    record_folder : str or Path, optional
        Where this run writes its records: a record the case links is looked for there too when it is not
        in the folder the case names.
    """
    calc = get_calculation(case.kind)
    if inputs is None:
        inputs, given = case_inputs(case, site, read_record=IssuedRecords(record_folder))
    try:
        # A calculation evaluates many states more than once (a header's saturation in each load case, a valve's
        # outlet in each sizing pass): within one case each is evaluated once, with the very same values.
        with remembering_states():
            result = calc.calculate(inputs, site)
        uncertainty = None
        if case.uncertainty and with_uncertainty:
            from ..runs.uncertainty import add_sample_check, parse_coverage, parse_tolerances, run_uncertainty
            tolerances, samples, seed = parse_tolerances(calc.Inputs, case.uncertainty, inputs)
            if tolerances:
                uncertainty = run_uncertainty(calc, inputs, site, tolerances, samples, seed,
                                              coverage=parse_coverage(case.uncertainty), nominal_result=result)
                add_sample_check(result, uncertainty)
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
