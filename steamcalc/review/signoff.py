"""The sign-off by name alone, which is no longer issued.

Release 0.1 let a checker sign by typing a name (``checked_by`` and a ``signoff`` block). Anyone can type a
name and recompute a record's public digests, so such a sign-off proves nothing about who checked the
record: it is no longer issued, and those already in records are shown as a name typed, not a signature,
and counted as not signed (:func:`steamcalc.signing.signatures.name_only_signoff`). Records are signed
with a key (:func:`steamcalc.review.sign.sign_with_key`).

Comparing two records lives in :mod:`steamcalc.review.diff`; ``diff_records`` is re-exported here for the
callers that import it from this module.
"""

from __future__ import annotations

from .diff import diff_records  # noqa: F401  (re-exported, see the module docstring)
from ..signing.keys import SigningInputError

#: How to sign instead, as every refusal of a name-only sign-off says it.
SIGN_WITH_A_KEY = ('sign with your key: steamcalc sign RECORD.json --key YOUR.key (make a key pair once with: '
                   'steamcalc keys new --name "Your Name", and have its .pub file put in the site\'s trusted_signers/)')


def name_only_refused(path=None, name=None):
    """The error that refuses a sign-off by name alone (bad input: exit 2)."""
    return SigningInputError("a sign-off by name alone is not issued: a typed name proves nothing about who checked "
                             "the record (anyone can type it and recompute the digests)", source=path,
                             field="--by", value=name or None, fix=SIGN_WITH_A_KEY)


def sign_record(path, record, checker, now=None):
    """Refused: a record is signed with a key (:func:`steamcalc.review.sign.sign_with_key`), never by name alone.

    Raises
    ------
    SigningInputError
        Always, naming the record and the fix; nothing is written.
    """
    raise name_only_refused(path, checker)
