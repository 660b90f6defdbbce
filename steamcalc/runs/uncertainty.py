"""Uncertainty: result bands from ± tolerances on the inputs, and a one-at-a-time sensitivity.

Each toleranced input is sampled from a rectangular (uniform) distribution over its
± tolerance — the distribution JCGM 100:2008 (GUM) §4.3.7 assigns when only bounds are
known — with a seeded generator, so a run is reproducible and a record's bands re-verify.
Every sample is computed on the fast IF97 engine (seuif97, chosen for this run's context only,
so a record computed alongside in another thread keeps the reference engine), numbers only: by
the kind's vectorised sample path where it has one (:func:`steamcalc.calcs.sample_path`, all
samples at once; it answers the samples it is sure of), and by the calculation's own
``calculate()`` for the rest, one by one. The sensitivity moves one input at a time to each end
of its tolerance, by the same two paths. Each band is the probabilistically symmetric coverage
interval of JCGM 101:2008 §7.7 — 90 % unless the case chooses another coverage — and samples
that gave no result are counted in the record; more than 1 % of them is a warn.
"""

from __future__ import annotations

import dataclasses
import itertools
import re
from dataclasses import dataclass

import numpy as np

from ..calcs import sample_path
from ..calcs.base import input_fields
from ..errors import CaseFileError, InputError, SteamcalcError, UnitError
from ..units.amounts import Limit, Phrase, amount, text_of, verdict
from ..units.quantities import RECORD_UNITS, from_record_unit, parse_quantity, to_record_unit
from ..calcs.base import numbers_only
from ..properties.engines import FAST_ENGINE, engine_description, states_not_remembered, using_engine

DEFAULT_SAMPLES = 2000
DEFAULT_SEED = 1
MAX_SAMPLES = 100_000
#: Coverage probability of the bands unless the case chooses one (JCGM 101:2008 §7.7).
DEFAULT_COVERAGE = 0.90
COVERAGE_RANGE = (0.50, 0.99)
#: Above this fraction of samples without a result the bands are a warn: they describe only
#: the inputs that could be computed.
FAILED_SAMPLES_WARN = 0.01
SETTINGS = ("samples", "seed", "coverage")
#: Up to this many tolerances the corners of the tolerance box are checked (2**n Inputs) before
#: samples take the vectorised path; with more, every sample goes through ``calculate()``.
MAX_SCREENED_TOLERANCES = 8
#: Input kinds a tolerance can be put on, and the quantity kind of the tolerance itself: a
#: difference (a pressure tolerance has no gauge or absolute basis, a temperature one is in K);
#: None for plain numbers.
_DIFFERENCE_KINDS = {"pressure": "pressure_difference", "temperature": "temperature_difference",
                     "temperature_difference": "temperature_difference", "mass_flow": "mass_flow",
                     "velocity": "velocity", "flow_coefficient": "flow_coefficient", "specific_heat": "specific_heat",
                     "heat_transfer_coefficient": "heat_transfer_coefficient",
                     "fouling_resistance": "fouling_resistance", "area": "area", "volume_flow": "volume_flow",
                     "density": "density", "fraction": None, "number": None}
_PERCENT = re.compile(r"^\s*±?\s*([+-]?[0-9.]+(?:[eE][+-]?\d+)?)\s*%\s*$")
_BASIS = re.compile(r"(\(\s*[aAgG]\s*\)|(bar|psi)[ag])\s*$")


@dataclass(frozen=True)
class Tolerance:
    """A ± tolerance on one input: absolute (in the input's SI unit) or relative (a fraction)."""

    field: str
    value: float
    relative: bool
    given: str

    def half_width(self, nominal):
        return abs(nominal) * self.value if self.relative else self.value

    def to_record(self, kind):
        if self.relative:
            return {"value": self.value * 100.0, "unit": "percent", "given": self.given}
        difference = _DIFFERENCE_KINDS[kind] or "dimensionless"
        return {"value": to_record_unit(self.value, difference), "unit": RECORD_UNITS[difference],
                "given": self.given}


def parse_tolerances(inputs_class, table, inputs):
    """Tolerances and settings from a case's ``[uncertainty]`` table.

    Returns
    -------
    tuple
        ``(tolerances, samples, seed)``; the coverage is read by :func:`parse_coverage`.
    """
    fields = {f.name: f for f in input_fields(inputs_class)}
    tolerances = []
    for key, raw in table.items():
        if key in SETTINGS:
            continue
        if key not in fields or fields[key].metadata["kind"] not in _DIFFERENCE_KINDS:
            numeric = [n for n, f in fields.items() if f.metadata["kind"] in _DIFFERENCE_KINDS]
            raise CaseFileError(f"'{key}' cannot take a tolerance", field=f"uncertainty.{key}",
                                fix=f"tolerances go on numeric inputs: {', '.join(numeric)}")
        if getattr(inputs, key) is None:
            raise CaseFileError(f"a tolerance on '{key}', which the case does not give", field=f"uncertainty.{key}",
                                fix="give the input in [inputs], or remove its tolerance")
        tolerances.append(_parse_one(key, raw, fields[key].metadata["kind"]))
    samples = table.get("samples", DEFAULT_SAMPLES)
    seed = table.get("seed", DEFAULT_SEED)
    if isinstance(samples, bool) or not isinstance(samples, int) or not 10 <= samples <= MAX_SAMPLES:
        raise CaseFileError("samples must be a whole number from 10 to 100000", field="uncertainty.samples",
                            value=samples)
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise CaseFileError("seed must be a whole number, 0 or more", field="uncertainty.seed", value=seed)
    parse_coverage(table)
    return tuple(tolerances), samples, seed


def parse_coverage(table):
    """Coverage probability of the bands from a case's ``[uncertainty]`` table: ``coverage = 0.95``
    or ``"95 %"``; 0.90 when not given.

    Examples
    --------
    >>> parse_coverage({}), parse_coverage({"coverage": "95 %"}), parse_coverage({"coverage": 0.8})
    (0.9, 0.95, 0.8)
    """
    raw = table.get("coverage", DEFAULT_COVERAGE)
    percent = _PERCENT.match(raw) if isinstance(raw, str) else None
    if percent:
        value = float(percent.group(1)) / 100.0
    elif isinstance(raw, (int, float)) and not isinstance(raw, bool):
        value = float(raw)
    else:
        raise CaseFileError("coverage is a fraction such as 0.95, or a percentage such as \"95 %\"",
                            field="uncertainty.coverage", value=raw)
    low, high = COVERAGE_RANGE
    if not low <= value <= high:
        raise CaseFileError(f"coverage must be from {low:g} to {high:g} (50 % to 99 %)",
                            field="uncertainty.coverage", value=raw, limits=(low, high, ""),
                            fix="0.90 (the default) or 0.95 are usual")
    return value


def _parse_one(key, raw, kind):
    name = f"uncertainty.{key}"
    difference = _DIFFERENCE_KINDS[kind]
    text = raw if isinstance(raw, str) else repr(raw)
    percent = _PERCENT.match(text) if isinstance(raw, str) else None
    if percent:
        value, relative = float(percent.group(1)) / 100.0, True
    elif difference is None:
        if isinstance(raw, bool) or not isinstance(raw, (int, float)):
            raise UnitError("a tolerance on a plain number is a plain number (or %)", field=name, value=raw)
        value, relative = float(raw), False
    else:
        if isinstance(raw, str) and _BASIS.search(raw):
            raise UnitError("a tolerance is a difference and has no gauge or absolute basis", field=name,
                            value=text, fix="write it as e.g. '0.3 bar'")
        value, relative = parse_quantity(raw.lstrip(" ±") if isinstance(raw, str) else raw, name, difference), False
    if value <= 0.0:
        raise InputError("a tolerance must be above zero", field=name, value=text)
    return Tolerance(field=key, value=value, relative=relative, given=text)


def _numeric(result):
    return {k: v.value for k, v in result.values.items()
            if isinstance(v.value, (int, float)) and not isinstance(v.value, bool)}


def _sample_values(result, keys):
    """The banded numbers of one sample (NaN where the sample has no such result)."""
    values = result.values
    return [values[k].value if k in values else np.nan for k in keys]


def run_uncertainty(calc, inputs, site, tolerances, samples=DEFAULT_SAMPLES, seed=DEFAULT_SEED,
                    coverage=DEFAULT_COVERAGE, engine=FAST_ENGINE, nominal_result=None, vectorised=True):
    """Monte Carlo bands and one-at-a-time sensitivity of a calculation's headline results.

    Parameters
    ----------
    calc : module
        A registered calculation kind (with ``UNCERTAINTY_RESULTS``).
    inputs : Inputs
        The nominal inputs.
    site : steamcalc.cases.site.Site
    tolerances : sequence of Tolerance
    samples, seed : int
        Monte Carlo size and generator seed (numpy PCG64).
    coverage : float
        Coverage probability of each band, 0.5 to 0.99 (default 0.90).
    engine : str
        IF97 engine of the samples and the sensitivity: "fast" (seuif97, the default and what
        records use) or "iapws" (for a cross-check of the bands, or a benchmark baseline).
    nominal_result : Result, optional
        The nominal case's own result when the caller has it already (the record's run);
        computed here otherwise.
    vectorised : bool
        Use the kind's vectorised sample path on the fast engine (default). False sends every
        sample through ``calculate()`` (the consistency tests and the benchmark baseline).

    Returns
    -------
    dict
        The record's ``uncertainty`` section: per band the nominal value, the 5th, 50th and
        95th percentiles, ``low`` and ``high`` (the ends of the coverage interval: the
        (1 - coverage)/2 and (1 + coverage)/2 quantiles), mean, standard deviation and the number
        of samples behind it; the count and reasons of samples that gave no result.

    Notes
    -----
    The nominal case runs on the reference engine (it is the record's own result); samples
    and the sensitivity run on the fast engine, in this context only. Before samples take the
    vectorised path, every corner of the tolerance box must make valid Inputs: the Inputs checks
    of such a kind are intervals and orderings between inputs, whose valid set is convex, so
    every sample inside the box is valid too (otherwise every sample is made, and checked, one
    by one).

    References
    ----------
    JCGM 101:2008, Evaluation of measurement data — Supplement 1 to the GUM: propagation of
    distributions using a Monte Carlo method, §7.7 (probabilistically symmetric coverage
    interval); JCGM 100:2008 §4.3.7 (rectangular distribution).
    """
    kinds = {f.name: f.metadata["kind"] for f in input_fields(type(inputs))}
    # Draw in the Inputs' declaration order, so a case file and a form give the same samples.
    order = list(kinds)
    tolerances = sorted(tolerances, key=lambda t: order.index(t.field))
    if nominal_result is None:
        nominal_result = calc.calculate(inputs, site)
    nominal = _numeric(nominal_result)
    keys = [k for k in calc.UNCERTAINTY_RESULTS if k in nominal]
    rng = np.random.default_rng(seed)
    draws = {t.field: rng.uniform(-1.0, 1.0, samples) * t.half_width(getattr(inputs, t.field)) +
             getattr(inputs, t.field) for t in tolerances}
    table = np.full((samples, len(keys)), np.nan)
    failures = {}
    # dataclasses.replace, with the unchanged fields read once rather than per sample; the
    # constructor (and its input checks in __post_init__) still runs for every such sample.
    unchanged = {f.name: getattr(inputs, f.name) for f in dataclasses.fields(inputs) if f.init}
    make = type(inputs)
    vector = _vector_path(calc, inputs, tolerances, keys, engine) if vectorised else None
    with using_engine(engine), numbers_only():
        pending = _vector_samples(vector, inputs, site, draws, samples, keys, table)
        # Each sample's states are its own: remembered, they would only push the shared ones out of a worker's memory.
        with states_not_remembered():
            for i in pending:
                # Python floats, not numpy scalars: those would slow every property call.
                row = {name: column[i].item() for name, column in draws.items()}
                try:
                    table[i] = _sample_values(calc.calculate(make(**{**unchanged, **row}), site), keys)
                except SteamcalcError as exc:
                    reason = exc.message.split(":")[0][:80]
                    failures[reason] = failures.get(reason, 0) + 1
        sensitivity = _one_at_a_time(calc, inputs, site, tolerances, keys, vector)
    units = {k: nominal_result.values[k].unit for k in keys}
    tail = round((1.0 - coverage) / 2.0 * 100.0, 9)
    bands = {}
    for j, k in enumerate(keys):
        array = table[:, j]
        array = array[np.isfinite(array)]
        if array.size == 0:
            continue
        p05, p50, p95, low, high = np.percentile(array, [5.0, 50.0, 95.0, tail, 100.0 - tail])
        bands[k] = {"nominal": nominal[k], "p05": float(p05), "p50": float(p50), "p95": float(p95),
                    "low": float(low), "high": float(high),
                    "mean": float(array.mean()), "std": float(array.std(ddof=1)) if array.size > 1 else 0.0,
                    "samples": int(array.size), "unit": units[k]}
    failed = sum(failures.values())
    section = {
        "method": "Monte Carlo (JCGM 101:2008) with rectangular distributions over each ± tolerance "
                  "(JCGM 100:2008 4.3.7); bands are probabilistically symmetric coverage intervals "
                  "(JCGM 101:2008 7.7); one-at-a-time sensitivity to each end of each tolerance",
        "samples": samples, "seed": seed, "generator": "numpy PCG64", "valid_samples": samples - failed,
        "failed_samples": failures, "failed_sample_count": failed, "coverage": coverage,
        "property_engine": engine_description(engine),
        "tolerances": {t.field: t.to_record(kinds[t.field]) for t in tolerances},
        "bands": bands, "sensitivity": sensitivity,
    }
    section["summary"] = summary_lines(section, calc)
    return section


def sample_limit(section):
    """The record's check on the samples that gave no result, as data: ``(name, quantity, limits, detail)``.

    The quantity is the share of the samples without a result, in percent; more than 1 % is a warn:
    the bands then describe only the inputs that could be computed (common practice; JCGM 101:2008
    assumes every draw gives a value). ``detail`` gives the check's Phrase for its status. Counts and
    reasons are no quantities: they stay in the words.
    """
    samples, failed = section["samples"], section.get("failed_sample_count", 0)
    share, limit = (failed * 100 / samples, "percent"), (FAILED_SAMPLES_WARN * 100, "percent")
    reasons = "; ".join(f"{n} × {reason}" for reason, n in section.get("failed_samples", {}).items())
    reasons = reasons.replace("{", "{{").replace("}", "}}")   # a reason's words are never a slot

    def detail(status):
        if failed == 0:
            return Phrase.of(f"all {samples} samples gave a result")
        if status == "pass":
            return Phrase.of(f"{failed} of {samples} samples ({{share:.3g}}) gave no result: {reasons}", share=share)
        return Phrase.of(f"{failed} of {samples} samples ({{share:.3g}}) gave no result: {reasons}; above {{limit:g}} "
                         "the bands describe only the inputs that could be computed: narrow the tolerances or check "
                         "the inputs near the limits", share=share, limit=limit)
    return "Uncertainty samples", share, [("<=", limit, "warn")], detail


def sample_check(section):
    """The record's check on the samples that gave no result: ``(name, status, detail)``, the detail in SI words.

    Examples
    --------
    >>> sample_check({"samples": 2000, "failed_sample_count": 30, "failed_samples": {"x": 30}})[1]
    'warn'
    >>> sample_check({"samples": 2000, "failed_sample_count": 20, "failed_samples": {"x": 20}})[1:]
    ('pass', '20 of 2000 samples (1 %) gave no result: 20 × x')
    """
    name, quantity, limits, detail = sample_limit(section)
    status = verdict(amount(quantity), [Limit(comparison, amount(limit), breach) for comparison, limit, breach in limits])
    return name, status, text_of(detail(status))


def _vector_path(calc, inputs, tolerances, keys, engine):
    """The kind's vectorised sample path when it may take these samples, else None: on the fast
    engine, giving every banded result, with every corner of the tolerance box valid Inputs."""
    vector = sample_path(calc) if engine == FAST_ENGINE else None
    if vector is None or not set(keys) <= set(vector.RESULTS) or len(tolerances) > MAX_SCREENED_TOLERANCES:
        return None
    ends = [[(t.field, getattr(inputs, t.field) + sign * t.half_width(getattr(inputs, t.field))) for sign in (-1.0, 1.0)]
            for t in tolerances]
    for corner in itertools.product(*ends):
        try:
            dataclasses.replace(inputs, **dict(corner))
        except SteamcalcError:
            return None
    return vector


def _vector_samples(vector, inputs, site, columns, size, keys, table):
    """Fill ``table`` with the rows the vectorised path answers; the indices of the rest."""
    if vector is None:
        return range(size)
    try:
        values, answered = vector.sample_results(inputs, site, columns, size, keys)
    except SteamcalcError:
        # A state outside what the array engine takes: every sample the one-by-one way, which
        # gives each its result or its reason.
        return range(size)
    table[answered] = values[answered]
    return np.flatnonzero(~answered).tolist()


def _one_at_a_time(calc, inputs, site, tolerances, keys, vector=None):
    moves = [(t, sign) for t in tolerances for sign in (-1.0, 1.0)]
    columns = {}
    for t in tolerances:
        columns[t.field] = np.full(len(moves), float(getattr(inputs, t.field)))
    for r, (t, sign) in enumerate(moves):
        nominal = getattr(inputs, t.field)
        columns[t.field][r] = nominal + sign * t.half_width(nominal)
    table = np.full((len(moves), len(keys)), np.nan)
    pending = _vector_samples(vector, inputs, site, columns, len(moves), keys, table)
    outcomes = [{k: float(v) for k, v in zip(keys, row) if not np.isnan(v)} for row in table]
    for r in pending:
        t, sign = moves[r]
        nominal = getattr(inputs, t.field)
        try:
            outcomes[r] = _numeric(calc.calculate(
                dataclasses.replace(inputs, **{t.field: nominal + sign * t.half_width(nominal)}), site))
        except SteamcalcError:
            outcomes[r] = {}
    table = {k: [] for k in keys}
    for i, t in enumerate(tolerances):
        ends = {"low": outcomes[2 * i], "high": outcomes[2 * i + 1]}
        for k in keys:
            low, high = ends["low"].get(k), ends["high"].get(k)
            swing = None if low is None or high is None else abs(high - low)
            table[k].append({"input": t.field, "low": low, "high": high, "swing": swing})
    for k in keys:
        table[k].sort(key=lambda row: -(row["swing"] or 0.0))
    return table


_TRADE_WORDS = {"kv": "Kv", "cv": "Cv", "lmtd": "LMTD", "ua": "UA", "co2": "CO2"}


def _label(calc, key):
    field_labels = {f.name: f.metadata["label"] for f in input_fields(calc.Inputs)}
    label = field_labels.get(key, key.replace("_", " "))
    # Lower-case the first letter for use inside a sentence, unless it starts an acronym.
    return label if len(label) > 1 and label[1].isupper() else label[:1].lower() + label[1:]


def _result_words(key):
    return " ".join(_TRADE_WORDS.get(word, word) for word in key.split("_"))


def summary_lines(section, calc):
    """One plain sentence per band: nominal, the coverage interval, the most sensitive input."""
    from ..units.formatting import format_number, unit_label as format_unit

    lines = []
    coverage = section.get("coverage", DEFAULT_COVERAGE)
    for key, band in section["bands"].items():
        unit = format_unit(band["unit"])
        top = next((row for row in section["sensitivity"].get(key, []) if row["swing"]), None)
        low, high = band.get("low", band["p05"]), band.get("high", band["p95"])
        text = (f"{_result_words(key)} {format_number(band['nominal'])} {unit}, {coverage * 100:g} % coverage interval "
                f"{format_number(low)}-{format_number(high)} {unit}").replace("  ", " ").strip()
        text = text.replace(" ,", ",")
        if top:
            text += f"; most sensitive to {_label(calc, top['input'])}"
        lines.append(text)
    if section["failed_samples"]:
        lines.append(f"{section['samples'] - section['valid_samples']} of {section['samples']} samples gave no result: "
                     + "; ".join(f"{n} × {reason}" for reason, n in section["failed_samples"].items()))
    return lines


def add_sample_check(result, section):
    """Add the uncertainty section's own check (samples that gave no result) to a result.

    The one way ``run`` and ``verify`` add it, so that its check and its warning are the same in the
    record and in the recomputation.
    """
    result.check_limit(*sample_limit(section))


def tolerances_from_record(inputs_class, section):
    """Tolerances back from a record's uncertainty section (for re-verification)."""
    kinds = {f.name: f.metadata["kind"] for f in input_fields(inputs_class)}
    tolerances = []
    for field_name, entry in section.get("tolerances", {}).items():
        if entry["unit"] == "percent":
            tolerances.append(Tolerance(field_name, entry["value"] / 100.0, True, entry.get("given", "")))
        else:
            difference = _DIFFERENCE_KINDS[kinds[field_name]] or "dimensionless"
            value = from_record_unit(entry["value"], entry["unit"], difference)
            tolerances.append(Tolerance(field_name, value, False, entry.get("given", "")))
    return tuple(tolerances)


__all__ = ["Tolerance", "add_sample_check", "parse_coverage", "parse_tolerances", "run_uncertainty", "sample_check",
           "sample_limit", "summary_lines",
           "tolerances_from_record"]
