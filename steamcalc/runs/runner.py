"""Re-running a record: its calculation and its uncertainty section from the record's own inputs and site."""

from __future__ import annotations

import os
from pathlib import Path

from ..properties.engines import REFERENCE_ENGINE, using_engine

from ..calcs import get_calculation
from ..calcs.base import from_record_inputs
from ..cases.site import Site


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
