"""Signing a record file: verify it as a checker would, sign it with a key, write it and its reports back."""

from __future__ import annotations

from pathlib import Path

from ..errors import RecordError
from ..records.issuing import issue_set, record_lock, recover
from ..records.record import load_record, record_text
from ..render.report import RENDERERS
from ..signing.keys import SigningInputError, fingerprint, load_private_key, read_passphrase
from ..signing.signatures import ROLES, add_signature, refusal, verification_summary
from ..signing.trust import resolve_trust
from .verify import check_companions, verify_record


def sign_with_key(path, key_file, role="checked", by=None, passphrase_file=None, trusted_dir=None, now=None):
    """Verify a record as a checker would and sign it with a key; write it and its reports back.

    Parameters
    ----------
    path : str or Path
        The record's JSON file.
    key_file : str or Path
        The signer's private key file.
    role : {'checked', 'approved'}
    by : str, optional
        The signer's name; when given it must be the key's.
    passphrase_file : str or Path, optional
    trusted_dir : str or Path, optional
        The trusted signers folder (default: the one set in the user's settings, else the site's
        ``trusted_signers/`` above the records folder; never one in the records folder,
        :func:`steamcalc.signing.trust.resolve_trust`).

    Returns
    -------
    dict
        The signed record.

    Raises
    ------
    SigningInputError
        Bad input (key, passphrase, name, trusted list): nothing is written.
    RecordError
        The record may not be signed (it does not verify, its recomputed status is fail, ...).
    """
    if role not in ROLES:
        raise SigningInputError(f"role {role!r} is not one of {', '.join(ROLES)}", field="--role", value=role)
    passphrase = read_passphrase(passphrase_file) if passphrase_file else None
    key, name = load_private_key(key_file, passphrase)
    if by is not None and by.strip() != name:
        raise SigningInputError(f"the key belongs to {name}, not to {by.strip()}", field="--by", value=by,
                                fix="give the key's own name with --by, or leave --by out")
    path = Path(path)
    trusted = resolve_trust(path.parent, trusted_dir).keys
    if not path.is_file():
        raise SigningInputError("record file not found", source=path, fix="check the path")
    # One writer per record: the lock is held from reading the record through verifying it to
    # writing it back, so a second signer waits and then sees the record as the first left it.
    with record_lock(path.parent, path.stem):
        recover(path.parent, path.stem)
        try:
            record = load_record(path)
        except RecordError as exc:  # not a record: bad input, not a refusal
            raise SigningInputError(exc.message, source=path, field=exc.field, fix=exc.fix) from None
        outcome = verify_record(record)
        companions = check_companions(path, record)
        reason = refusal(record, outcome, role, name, trusted, companions, key_fingerprint=_fingerprint_of(key))
        if reason:
            raise RecordError(f"not signed: {reason}", source=path)
        signed = add_signature(record, key, name, role, verification_summary(outcome, companions), now)
        write_signed(path, signed)
    return signed


def _fingerprint_of(private_key):
    from cryptography.hazmat.primitives import serialization

    raw = private_key.public_key().public_bytes(serialization.Encoding.Raw, serialization.PublicFormat.Raw)
    return fingerprint(raw)


def write_signed(path, signed):
    """Write a signed record back with its reports as one set (call with the record's lock held).

    The JSON moves into place first, so a report never shows a signature its JSON lacks; a kill
    at any instant leaves the old set or the new one (:mod:`steamcalc.records.issuing`).
    """
    path = Path(path)
    reports = [(path.with_suffix(suffix).name, text) for suffix, text in RENDERERS.draw(signed).items()]
    issue_set(path.parent, path.stem, [(path.name, record_text(signed))] + reports)
