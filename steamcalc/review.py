"""Review: verify a record (digest integrity, then reproduction by re-computation).

Integrity and reproduction are reported apart: an intact record whose numbers a
newer library no longer reproduces is a different finding from an edited file.

Reproduction runs on the engine of issued records (iapws) by default. With
``engine="fast"`` the record is recomputed on the second, independent IF97
implementation (seuif97) instead: a cross-check that no bug of one implementation can
pass. Its uncertainty bands are then not recomputed (their samples run on the fast
engine already); the ordinary verification reproduces them.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from .engines import REFERENCE_ENGINE, check_engine
from .errors import SteamcalcError
from .record import compute_content_digest, compute_digest, provenance
from .runner import recompute, recompute_uncertainty

#: Relative tolerance on recomputed numbers; IF97 evaluations are deterministic, so
#: this only absorbs floating-point differences between platforms and library builds.
RELATIVE_TOLERANCE = 1e-6
#: Absolute tolerance, in the result's own unit, for values that are zero or near it.
ABSOLUTE_TOLERANCE = 1e-9


@dataclass
class Comparison:
    """One result, as recorded and as recomputed."""

    key: str
    recorded: object
    recomputed: object
    unit: str
    abs_diff: float | None
    rel_diff: float | None
    verdict: str  # "same", "differs", "missing", "new"


@dataclass
class Verification:
    """Outcome of verifying one record."""

    digest_ok: bool
    content_digest_ok: bool
    comparisons: list = field(default_factory=list)
    check_changes: list = field(default_factory=list)
    version_changes: dict = field(default_factory=dict)
    error: str | None = None
    engine: str = REFERENCE_ENGINE
    notes: list = field(default_factory=list)

    @property
    def largest_difference(self):
        """The compared result with the largest relative difference, or None."""
        numeric = [c for c in self.comparisons if c.rel_diff is not None]
        return max(numeric, key=lambda c: c.rel_diff, default=None)

    @property
    def reproduced(self):
        return self.error is None and not self.check_changes and all(
            c.verdict == "same" for c in self.comparisons)

    @property
    def ok(self):
        return self.digest_ok and self.content_digest_ok and self.reproduced


def _compare(key, recorded, recomputed):
    unit = recorded.get("unit", "") if recorded else recomputed.get("unit", "")
    if recorded is None:
        return Comparison(key, None, recomputed["value"], unit, None, None, "new")
    if recomputed is None:
        return Comparison(key, recorded["value"], None, unit, None, None, "missing")
    a, b = recorded["value"], recomputed["value"]
    if isinstance(a, (int, float)) and isinstance(b, (int, float)) and not isinstance(a, bool):
        diff = abs(a - b)
        rel = diff / abs(a) if a else (0.0 if diff == 0 else float("inf"))
        same = diff <= max(RELATIVE_TOLERANCE * abs(a), ABSOLUTE_TOLERANCE) and recorded.get("unit", "") == \
            recomputed.get("unit", "")
        return Comparison(key, a, b, unit, diff, rel if rel != float("inf") else None,
                          "same" if same else "differs")
    return Comparison(key, a, b, unit, None, None, "same" if a == b else "differs")


def verify_record(record, engine=REFERENCE_ENGINE):
    """Verify a record: its digests, then its results recomputed from its inputs.

    Parameters
    ----------
    record : dict
        A record as read by :func:`steamcalc.record.load_record`.
    engine : str
        IF97 engine of the recomputation: "iapws" (the record's own) or "fast" (seuif97,
        the independent cross-check).

    Returns
    -------
    Verification
    """
    result = Verification(
        digest_ok=compute_digest(record) == record.get("digest"),
        content_digest_ok=compute_content_digest(record) == record.get("content_digest"),
        engine=check_engine(engine),
    )
    now = provenance()
    then = record.get("provenance", {})
    result.version_changes = {k: (then.get(k), v) for k, v in now.items() if then.get(k) != v}
    try:
        fresh = recompute(record, engine=engine)
    except (SteamcalcError, KeyError, TypeError, ValueError) as exc:
        result.error = f"the record's inputs could not be recomputed: {exc}"
        return result
    new_results = {k: v.to_record() for k, v in fresh.values.items()}
    old_results = record.get("results", {})
    for key in list(old_results) + [k for k in new_results if k not in old_results]:
        result.comparisons.append(_compare(key, old_results.get(key), new_results.get(key)))
    new_checks = [(c.name, c.status) for c in fresh.checks]
    if "uncertainty" in record:
        if engine == REFERENCE_ENGINE:
            section = _compare_uncertainty(record, result)
        else:
            section = record["uncertainty"]
            result.notes.append("uncertainty bands not recomputed on this engine (their samples run on the fast "
                                "engine already); the ordinary verification reproduces them")
        if section is not None and "failed_sample_count" in section:
            from .uncertainty import sample_check
            name, status, _ = sample_check(section)
            new_checks.append((name, status))
    old_checks = [(c.get("name"), c.get("status")) for c in record.get("checks", [])]
    if old_checks != new_checks:
        result.check_changes = [f"recorded: {n} = {s}" for n, s in old_checks if (n, s) not in new_checks] + \
            [f"recomputed: {n} = {s}" for n, s in new_checks if (n, s) not in old_checks]
    return result


def verify_file(path, engine=REFERENCE_ENGINE):
    """Load and verify one record file: ``(path, record, verification, error)``. A file that cannot
    be read gives its error text instead of raising (one bad file never stops a batch)."""
    from .record import load_record

    try:
        record = load_record(path)
    except SteamcalcError as exc:
        return path, None, None, str(exc)
    return path, record, verify_record(record, engine=engine), None


def _compare_uncertainty(record, outcome):
    try:
        fresh = recompute_uncertainty(record)
    except (SteamcalcError, KeyError, TypeError, ValueError) as exc:
        outcome.error = f"the record's uncertainty section could not be recomputed: {exc}"
        return None
    old_bands = record["uncertainty"].get("bands", {})
    for key in list(old_bands) + [k for k in fresh["bands"] if k not in old_bands]:
        old = old_bands.get(key)
        new = fresh["bands"].get(key)
        # Records made before the coverage interval was kept carry only the percentiles.
        stats = ("p05", "p50", "p95") + (("low", "high") if old is None or "low" in old else ())
        for stat in stats:
            outcome.comparisons.append(_compare(
                f"uncertainty.{key}.{stat}",
                None if old is None else {"value": old[stat], "unit": old["unit"]},
                None if new is None else {"value": new[stat], "unit": new["unit"]}))
    return fresh
