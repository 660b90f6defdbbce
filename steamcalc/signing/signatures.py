"""Sign-offs with keys: making a record's signature entry, and checking its signatures against the trusted keys.

A checker makes a key pair once (``steamcalc keys new``, :mod:`steamcalc.signing.keys`): a private key
file ``*.key`` and a public key file ``*.pub`` that carries the checker's name and the key's
fingerprint. A site trusts the public keys in the folder ``trusted_signers/`` beside its
``site.toml``; which list applies is decided in :mod:`steamcalc.signing.trust`.

``verify`` holds every set of signatures to the rules ``sign`` keeps (:data:`RULES`): checked before
approved, two different keys and people, the preparer never the checker, no signature on a failing
record. A signature made through the library that breaks one fails and names the rule.

A name typed into the record (the ``signoff`` block of release 0.1) is not a signature: it is shown
as a name typed, counts as not signed, and is no longer issued.

A signature covers the record's canonical content (everything but the ``signatures`` list
and the ``digest``) together with its own entry (role, name, date, fingerprint, the
verification summary), so neither the record nor the claims of the sign-off can be edited
without the signature failing. The plain digests only catch accidental edits: anyone can
recompute them.
"""

from __future__ import annotations

import base64
from dataclasses import dataclass
from datetime import datetime, timezone

from .keys import ALGORITHM, fingerprint, short_fingerprint
from .names import name_key, name_problem
from ..records.record import canonical_json, compute_digest

SCHEME = "steamcalc.signature/1"
ROLES = ("checked", "approved")


def signed_message(record, entry):
    """The bytes a signature is made over: the record's content and the entry's own claims."""
    body = {k: v for k, v in record.items() if k not in ("signatures", "digest")}
    claims = {k: v for k, v in entry.items() if k != "signature"}
    return canonical_json({"scheme": SCHEME, "record": body, "signature": claims}).encode("utf-8")


@dataclass
class SignatureCheck:
    """One signature as checked: valid (made by its key over this record) and trusted (key in the list)."""

    role: str
    name: str
    date: str
    fingerprint: str
    valid: bool
    trusted: bool
    problem: str | None = None

    @property
    def ok(self):
        return self.valid and self.trusted and self.problem is None

    def describe(self):
        trust = "trusted" if self.trusted else "UNKNOWN KEY (not in the trusted signers)"
        text = (f"{self.role}: signed by {self.name} on {self.date}, key {short_fingerprint(self.fingerprint)}, "
                f"{'valid' if self.valid else 'INVALID'}, {trust}")
        return text + (f" - {self.problem}" if self.problem else "")


def _check_one(record, entry, trusted):
    from cryptography.exceptions import InvalidSignature
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey

    if not isinstance(entry, dict):
        return SignatureCheck("?", "?", "?", "?", False, False, "the signature entry is not a table")
    check = SignatureCheck(str(entry.get("role")), str(entry.get("name")), str(entry.get("date")),
                           str(entry.get("fingerprint")), False, False)
    problem = name_problem(entry.get("name"))
    if problem:   # a name that reorders or hides what the reader sees is never shown as a signer's
        check.name = ascii(entry.get("name"))
        check.problem = f"the signer's name cannot stand on a record: {problem}"
        return check
    try:
        raw = base64.b64decode(str(entry.get("public_key")), validate=True)
        signature = base64.b64decode(str(entry.get("signature")), validate=True)
        key = Ed25519PublicKey.from_public_bytes(raw)
    except ValueError:
        check.problem = "the entry's key or signature is not readable"
        return check
    if fingerprint(raw) != check.fingerprint:
        check.problem = "the fingerprint is not the entry's key's"
        return check
    try:
        key.verify(signature, signed_message(record, entry))
        check.valid = True
    except InvalidSignature:
        check.problem = "the signature is not over this record's content (edited after signing, or copied)"
    known = trusted.get(check.fingerprint)
    if known is not None:
        check.trusted = True
        if known.name != check.name:
            check.problem = f"the trusted key belongs to {known.name}, not to {check.name}"
    if check.role not in ROLES and check.problem is None:
        check.problem = f"role {check.role!r} is not one of {', '.join(ROLES)}"
    return check


#: The document-control rules a record's signatures must keep, as ``verify`` names them when one is broken.
RULES = {
    "order": "checked before approved",
    "keys": "checking and approving take two different keys",
    "people": "checking and approving are done by two different people",
    "preparer": "the preparer never checks their own record",
    "failing": "no signature on a failing record",
}


def same_person(a, b):
    """Two names of one person: equal but for case and spacing (an empty name is no one).

    Examples
    --------
    >>> same_person("C. Checker", " c.  checker"), same_person("C. Checker", "D. Approver"), same_person("", "")
    (True, False, False)
    >>> same_person("C. Checker", "\uff23. Checker")   # a full-width letter is the same letter
    True
    """
    a, b = (name_key(n) for n in (a, b))
    return bool(a) and a == b


def _broken(check, rule, detail):
    text = f"rule broken: {RULES[rule]} ({detail})"
    check.problem = text if check.problem is None else f"{check.problem}; {text}"


def _keep_rules(record, checks, status):
    """Mark every signature that breaks a document-control rule, naming the rule."""
    if status == "fail":
        for check in checks:
            _broken(check, "failing", "its status is FAIL; resolve the failing checks in a new revision")
    checked = [(i, c) for i, c in enumerate(checks) if c.role == "checked"]
    for i, check in checked:
        if same_person(check.name, record.get("prepared_by")):
            _broken(check, "preparer", f"{check.name} prepared it")
    for i, approval in ((i, c) for i, c in enumerate(checks) if c.role == "approved"):
        if not checked:
            _broken(approval, "order", "approved without a 'checked' signature before it")
            continue
        j, check = checked[0]
        if j > i or check.date > approval.date:
            _broken(approval, "order", f"the approval of {approval.date} comes before the check of {check.date}")
        if check.fingerprint == approval.fingerprint:
            _broken(approval, "keys", f"both are made with key {short_fingerprint(check.fingerprint)}")
        if same_person(check.name, approval.name):
            _broken(approval, "people", f"{check.name} both checked and approved it")


def check_signatures(record, trusted, status=None):
    """Check every signature of a record against the trusted keys and the document-control rules.

    Parameters
    ----------
    record : dict
    trusted : dict
        Fingerprint -> :class:`steamcalc.signing.keys.PublicKey`.
    status : str, optional
        The record's status as recomputed (default: the status it states); on ``fail`` every
        signature breaks a rule.

    Returns
    -------
    list of SignatureCheck
        One per signature, in the record's order (empty for an unsigned record).
    """
    entries = record.get("signatures") or []
    if not isinstance(entries, list):
        return [SignatureCheck("?", "?", "?", "?", False, False, "'signatures' is not a list")]
    checks = [_check_one(record, entry, trusted) for entry in entries]
    seen = set()
    for check in checks:
        if check.role in seen and check.problem is None:
            check.problem = f"a second '{check.role}' signature"
        seen.add(check.role)
    _keep_rules(record, checks, status if status is not None else record.get("status"))
    return checks


NAME_TYPED = "name typed, not a signature"


def name_only_signoff(record, outcome=None):
    """A name typed into the record (release 0.1's sign-off without a key): what it is, and what does not hold.

    It is not a signature: anyone can type a name and recompute the digests. It is shown as such and
    counts as not signed; what it claims is still compared with the verification, since a false claim
    in a record is a finding of its own.

    Parameters
    ----------
    record : dict
    outcome : steamcalc.review.verify.Verification, optional
        The record's verification now: the sign-off's claims are compared with it.

    Returns
    -------
    tuple or None
        ``(text, problems)``.
    """
    signoff, checked_by = record.get("signoff"), record.get("checked_by")
    if not signoff and not checked_by:
        return None
    signoff = signoff if isinstance(signoff, dict) else {}
    problems = []
    if signoff.get("by") != checked_by:
        problems.append(f"checked_by ({checked_by}) is not the sign-off's name ({signoff.get('by')})")
    claims = signoff.get("verification", {}) if isinstance(signoff.get("verification"), dict) else {}
    if outcome is not None and not outcome.error:
        same = sum(1 for c in outcome.comparisons if c.verdict == "same")
        actual = f"{same} of {len(outcome.comparisons)}"
        if claims.get("results_reproduced") != actual:
            problems.append(f"it claims {claims.get('results_reproduced')} results reproduced; this record gives {actual}")
    if str(signoff.get("date", "")) < str(record.get("created", "")):
        problems.append("it is dated before the record was created (copied from another record?)")
    text = f"{NAME_TYPED}: {checked_by or signoff.get('by')} on {signoff.get('date', '?')}"
    return text, problems


def verification_summary(outcome, companions=None):
    """What the signer's verification found, as the signature entry states it."""
    same = sum(1 for c in outcome.comparisons if c.verdict == "same")
    summary = {
        "integrity": "intact",
        "results_reproduced": f"{same} of {len(outcome.comparisons)}",
        "checks_reproduced": not outcome.check_changes,
        "status_recomputed": outcome.recomputed_status,
        "version_changes": {k: {"record": a, "checker": b} for k, (a, b) in outcome.version_changes.items()},
    }
    if companions is not None:
        summary["companions"] = "match" if not any(c.differs for c in companions) \
            else "differ"
    return summary


def refusal(record, outcome, role, name, trusted, companions=(), key_fingerprint=None):
    """Why a record must not be signed in this role, or None when it may be (the rules :func:`check_signatures` holds
    every signature to, and more: a record that does not verify is not signed at all)."""
    if record.get("signoff") or record.get("checked_by"):
        return (f"it carries a {NAME_TYPED} (a sign-off without a key, from an earlier release); sign it with "
                "your key under a raised revision (set [case] revision and run it again)")
    if not (outcome.digest_ok and outcome.content_digest_ok):
        return "its digest does not match (the file was edited)"
    if outcome.error:
        return outcome.error
    if outcome.recomputed_status == "fail":
        failing = "; ".join(outcome.recomputed_failing) or "see verify"
        return f"its recomputed status is FAIL ({failing}); resolve the failing checks in a new revision"
    if not outcome.ok:
        return "what it states is not what its inputs give today: " + "; ".join(outcome.differences()[:4])
    edited = [c.path.name for c in companions if c.differs or c.verdict == "in progress"]
    if edited:
        return (f"its companion files do not match the JSON ({', '.join(edited)}); "
                "inspect them, then run steamcalc verify --repair")
    checks = check_signatures(record, trusted, outcome.recomputed_status)
    bad = [c.describe() for c in checks if not c.ok]
    if bad:
        return "it carries a signature that does not hold: " + "; ".join(bad)
    if any(c.role == role for c in checks):
        return f"it is already signed as {role}; a signed record stays as signed"
    if role == "approved" and not any(c.role == "checked" for c in checks):
        return "it has no 'checked' signature yet; it is checked before it is approved"
    if any(same_person(c.name, name) for c in checks):
        return f"{name} has signed it already; checking and approving are done by different people"
    if key_fingerprint is not None and any(c.fingerprint == key_fingerprint for c in checks):
        return (f"it is signed with this key ({short_fingerprint(key_fingerprint)}) already; checking and approving "
                "take two different keys")
    if role == "checked" and same_person(name, record.get("prepared_by")):
        return f"{name} prepared it; a record is checked by someone other than its preparer"
    return None


def add_signature(record, private_key, name, role, summary, now=None):
    """A copy of the record with one more signature entry (and a new digest).

    Parameters
    ----------
    record : dict
    private_key : cryptography Ed25519PrivateKey
    name, role : str
    summary : dict
        :func:`verification_summary` of the record.
    now : str, optional
        ISO 8601 UTC time of signing.
    """
    from cryptography.hazmat.primitives import serialization

    raw = private_key.public_key().public_bytes(serialization.Encoding.Raw, serialization.PublicFormat.Raw)
    entry = {
        "role": role, "name": name,
        "date": now or datetime.now(timezone.utc).strftime("%Y-%m-%dT%H:%M:%SZ"),
        "algorithm": ALGORITHM, "fingerprint": fingerprint(raw),
        "public_key": base64.b64encode(raw).decode(), "verification": summary,
    }
    signed = dict(record)
    entry["signature"] = base64.b64encode(private_key.sign(signed_message(record, entry))).decode()
    signed["signatures"] = list(record.get("signatures") or []) + [entry]
    signed["digest"] = compute_digest(signed)
    return signed
