"""What this machine's steamcalc has already worked out about a record, so that a register run does it once.

Re-verifying a record recomputes it and draws its reports again; both depend on nothing but the record
and the software. When the same software (this steamcalc, byte for byte, and the libraries it names)
has verified the very same record — the same digest, itself intact — the outcome is known: the memory
keeps the recomputed status of each record that verified, and the digest of each report as this
software draws it. A register run then still makes every check on every record (digests, signatures
and their trust, case and site currency, software, each report against what the JSON gives) and
recomputes only what it has not verified before. A record that did not verify is never remembered: it
is recomputed each time, so its differences are listed afresh.

The memory is one JSON file in the user's cache folder (``$STEAMCALC_CACHE``, else
``$XDG_CACHE_HOME/steamcalc``, else ``~/.cache/steamcalc``), never among the records; it is written
through a temporary file and a rename, and a memory that cannot be read or written is simply not used.
``steamcalc register --fresh`` neither reads nor writes it.
"""

from __future__ import annotations

import hashlib
import json
import os
from importlib import metadata
from pathlib import Path

#: The memory's file name in the cache folder.
FILE_NAME = "register-memory.json"
#: Libraries whose version is part of the software a remembered outcome holds for (besides steamcalc's files).
LIBRARIES = ("iapws", "seuif97", "numpy", "scipy", "fluids", "ht", "pint", "jinja2", "fastjsonschema",
             "cryptography", "plotly")
#: Most records the memory keeps (the oldest entries go first).
MAX_ENTRIES = 20_000
#: How long a save waits for another run's save to finish, seconds (then this run's memory is simply not kept).
LOCK_SECONDS = 30
#: Age from which a temporary file of the memory is taken as left behind by a killed run, seconds.
LEFT_BEHIND_SECONDS = 3600


def cache_folder():
    """The user's cache folder for steamcalc."""
    if os.environ.get("STEAMCALC_CACHE"):
        return Path(os.environ["STEAMCALC_CACHE"])
    base = os.environ.get("XDG_CACHE_HOME") or str(Path.home() / ".cache")
    return Path(base) / "steamcalc"


def software_fingerprint():
    """A digest of the software that verifies and draws records: every file of the steamcalc package, and the
    Python and library versions.

    Examples
    --------
    >>> software_fingerprint() == software_fingerprint() and software_fingerprint().startswith("sha256:")
    True
    """
    import platform

    digest = hashlib.sha256()
    package = Path(__file__).resolve().parents[1]
    for path in sorted(p for p in package.rglob("*") if p.is_file() and "__pycache__" not in p.parts):
        digest.update(str(path.relative_to(package)).encode("utf-8") + b"\0" + path.read_bytes() + b"\0")
    versions = {"python": platform.python_version()}
    for name in LIBRARIES:
        try:
            versions[name] = metadata.version(name)
        except metadata.PackageNotFoundError:
            versions[name] = None
    digest.update(json.dumps(versions, sort_keys=True).encode("utf-8"))
    return "sha256:" + digest.hexdigest()


def text_digest(text):
    """sha256 of a report's text (UTF-8)."""
    return "sha256:" + hashlib.sha256(text.encode("utf-8")).hexdigest()


def _stored_entries(path, software):
    """The entries the memory file holds for ``software`` (none when it is absent, unreadable or another's)."""
    try:
        stored = json.loads(Path(path).read_text("utf-8"))
        entries = stored["records"] if stored.get("software") == software else {}
    except (OSError, ValueError, KeyError, TypeError, AttributeError):
        return {}
    return entries if isinstance(entries, dict) else {}


class RegisterMemory:
    """The outcomes remembered for the software in use; made by :meth:`open` for one register run.

    Parameters
    ----------
    path : Path or None
        The memory's file (None: remember for this run only).
    software : str
        :func:`software_fingerprint` of the software in use.
    entries : dict
        Record digest -> what is known of it (``status``, ``failing``, ``reports``: suffix -> digest).
    """

    def __init__(self, path, software, entries):
        self.path, self.software, self._entries = path, software, entries
        self._changed = False

    @classmethod
    def open(cls, folder=None):
        """The memory in ``folder`` (default :func:`cache_folder`), empty when it is absent, unreadable, or was
        written by other software."""
        path = Path(folder or cache_folder()) / FILE_NAME
        software = software_fingerprint()
        return cls(path, software, _stored_entries(path, software))

    @staticmethod
    def _key(record, intact):
        """The record's own digest when it is intact (it then stands for every byte of the record), else None."""
        digest = record.get("digest")
        return digest if intact and isinstance(digest, str) else None

    def verified(self, record, intact):
        """``(status, failing checks)`` the record was recomputed to when this software verified it, or None."""
        entry = self._entries.get(self._key(record, intact))
        if not isinstance(entry, dict) or "status" not in entry:
            return None
        return entry["status"], list(entry.get("failing", []))

    def remember_verified(self, record, intact, outcome):
        """Keep a verification that reproduced the record (any other is never kept)."""
        key = self._key(record, intact)
        if key is None or not outcome.ok:
            return
        entry = self._entries.setdefault(key, {})
        entry.update(status=outcome.recomputed_status, failing=list(outcome.recomputed_failing))
        self._changed = True

    def report_digest(self, record, intact, suffix):
        """The digest of the report (``.html``, ``.md``) this software draws from the record, or None."""
        entry = self._entries.get(self._key(record, intact))
        return entry.get("reports", {}).get(suffix) if isinstance(entry, dict) else None

    def remember_report(self, record, intact, suffix, text):
        key = self._key(record, intact)
        if key is None:
            return
        self._entries.setdefault(key, {}).setdefault("reports", {})[suffix] = text_digest(text)
        self._changed = True

    def learnt(self, record, intact):
        """``(key, entry)``: what the memory holds of this record now, for a forked worker to send to the parent
        (:meth:`absorb`), or None when it holds nothing of it."""
        key = self._key(record, intact)
        entry = self._entries.get(key)
        return (key, entry) if isinstance(entry, dict) else None

    def absorb(self, learnt):
        """Take what a forked worker's copy of this memory learnt of one record (:meth:`learnt`)."""
        if learnt is None:
            return
        key, entry = learnt
        if self._entries.get(key) != entry:
            # Moved to the end, as the newest: the oldest entries are the ones dropped when the memory is full.
            self._entries.pop(key, None)
            self._entries[key] = entry
            self._changed = True

    def save(self):
        """Write the memory when it learnt something (through a temporary file and a rename, under a lock beside it);
        a memory that cannot be written is left as it was.

        What another run wrote meanwhile, for the same software, is kept: the file is read again under the lock and
        this run's entries added to it, so two registers remembering at once lose nothing of each other's.
        A temporary file a killed run left behind (an hour old or more) is removed.
        """
        if not self._changed or self.path is None:
            return
        from filelock import FileLock, Timeout

        from ..errors import SteamcalcError
        from ..records.record import write_text_atomic

        try:
            with FileLock(str(self.path) + ".lock", timeout=LOCK_SECONDS):
                entries = dict(_stored_entries(self.path, self.software))
                for key, entry in self._entries.items():
                    entries.pop(key, None)
                    entries[key] = entry
                if len(entries) > MAX_ENTRIES:
                    entries = dict(list(entries.items())[-MAX_ENTRIES:])
                write_text_atomic(self.path, json.dumps({"software": self.software, "records": entries},
                                                        separators=(",", ":")))
                self._sweep_left_behind()
        except (SteamcalcError, OSError, Timeout):
            return
        self._changed = False

    def _sweep_left_behind(self):
        import time

        for part in self.path.parent.glob(f".{self.path.name}.*.part"):
            try:
                if time.time() - part.stat().st_mtime >= LEFT_BEHIND_SECONDS:
                    part.unlink()
            except OSError:
                pass
