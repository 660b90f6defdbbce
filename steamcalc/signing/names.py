"""Names that go on records as a key's owner or a signer: what is refused, and when two names are one person's.

A name is shown on every signed record, in reports, terminals and the register. Characters that reorder or
hide what a reader sees (bidirectional controls, line and paragraph separators, control characters,
zero-width characters) would let one name be shown as another, so such a name is refused wherever it
enters: ``keys new --name``, a key file, a trusted public key, a signature entry.
"""

from __future__ import annotations

import unicodedata

#: Longest signer's name accepted, characters.
MAX_NAME = 200
#: Bidirectional controls (embeddings, overrides, isolates and the implicit marks): they reorder what a reader sees,
#: so "C. Checker" could be shown for a name that is stored otherwise.
_BIDI = frozenset("\u061c\u200e\u200f\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")
#: Invisible characters that make two names look alike (zero-width space, word joiner, soft hyphen, BOM).
_INVISIBLE = frozenset("\u00ad\u200b\u2060\ufeff")


def name_problem(name):
    """Why a key's or signer's name cannot stand on a record, or None when it can.

    Refused: control characters (tabs and line ends among them), bidirectional controls (U+202A-202E,
    U+2066-2069, U+200E/200F, U+061C), line and paragraph separators (U+2028/2029), invisible characters
    that make two names look alike, and names over :data:`MAX_NAME` characters.

    Examples
    --------
    >>> name_problem("C. Checker") is None
    True
    >>> name_problem("C. Checker\u202e")
    'it holds a bidirectional control (U+202E), which reorders what a reader sees'
    >>> name_problem("C.\u2028Checker")
    'it holds a line or paragraph separator (U+2028)'
    """
    if not isinstance(name, str):
        return "it is not text"
    for ch in name:
        code = f"U+{ord(ch):04X}"
        if ch in _BIDI:
            return f"it holds a bidirectional control ({code}), which reorders what a reader sees"
        category = unicodedata.category(ch)
        if category in ("Zl", "Zp"):
            return f"it holds a line or paragraph separator ({code})"
        if category == "Cc":
            return f"it holds a control character ({code})"
        if ch in _INVISIBLE:
            return f"it holds an invisible character ({code}) that makes it look like another name"
    if len(name) > MAX_NAME:
        return f"it is {len(name)} characters long; a name has at most {MAX_NAME}"
    return None


def name_key(name):
    """A name as two names of one person compare: compatibility-normalised, case-folded, spaces collapsed.

    Examples
    --------
    >>> name_key("  C.  Checker") == name_key("c. checker") == name_key("\uff23. Checker")
    True
    """
    return " ".join(unicodedata.normalize("NFKC", str(name or "")).split()).casefold()
