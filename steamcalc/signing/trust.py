"""Which trusted signers list applies: only one the user names or configures, never one beside the records.

A signature proves who signed only against a list of public keys the *verifier* trusts. A list that
travels with the records proves nothing: anyone who can put a forged record into a folder can put a
``site.toml`` and a ``trusted_signers/`` holding their own key, relabelled with a checker's name, beside
it. So the list comes, in this order, from

1. the folder named with ``--trusted DIR``;
2. the user's settings file (``trusted_signers`` in its ``[signing]`` table; the file is
   ``$STEAMCALC_SETTINGS``, else ``$XDG_CONFIG_HOME/steamcalc/settings.toml``, else
   ``~/.config/steamcalc/settings.toml``);
3. the site the records belong to: the site folder a user names (``steamcalc register SITE``), or the
   folder holding the ``site.toml`` that the cases name, directly above the records folder (``run``
   writes records to ``records/`` beside the site file). A site folder that lies inside another site
   folder is not used (it could have been made inside that site's records), and neither is anything in
   the records folder itself.

Whatever is used is said (:meth:`TrustList.describe`), and a list found beside the records and not used is
reported too, so a reader sees that it was there. How the folder used is read (what is skipped unopened,
what is refused, what is warned of) is :func:`read_trusted`'s.
"""

from __future__ import annotations

import os
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from .keys import (TRUSTED_FOLDER, SigningInputError, holds_private_key, load_public_key, not_regular,
                   read_small_file, short_fingerprint)
from .names import name_key

SETTINGS_VARIABLE = "STEAMCALC_SETTINGS"
SETTINGS_KEY = "signing.trusted_signers"


@dataclass(frozen=True)
class TrustList:
    """The trusted signers used for a verification: where they came from, and the keys.

    Attributes
    ----------
    folder : Path or None
        The ``trusted_signers`` folder used (None: no list, every key is unknown).
    origin : str
        Why this folder, in words ("named with --trusted", ...), or why there is none.
    keys : dict
        Fingerprint -> :class:`steamcalc.signing.keys.PublicKey`.
    ignored : tuple of Path
        Trust lists found in the records' own folder, never used.
    problems : tuple of str
        Entries of the list used that were skipped unopened (a FIFO or device named ``*.pub``), and keys
        not trusted, each with the reason (:func:`steamcalc.signing.keys.read_trusted`); warnings such as
        two keys under one name.
    """

    folder: Path | None
    origin: str
    keys: dict = field(default_factory=dict)
    ignored: tuple = ()
    problems: tuple = ()

    def describe(self):
        """One line for ``verify`` and ``register``: the list used and why.

        Examples
        --------
        >>> TrustList(None, "no site.toml above the records folder").describe()
        'none (no site.toml above the records folder); every signature counts as an unknown key'
        """
        if self.folder is None:
            return f"none ({self.origin}); every signature counts as an unknown key"
        count = len(self.keys)
        return f"{self.folder} ({count} key{'' if count == 1 else 's'}; {self.origin})"

    def notes(self):
        """What was found beside the records and not used, and what in the list used was skipped, one line each."""
        return [f"not used: {path} - a trust list in the records' own folder is never used (whoever can put a "
                "record there can put a key there); name the list with --trusted DIR or in your settings file"
                for path in self.ignored] + [f"trusted signers: {line}" for line in self.problems]


@dataclass(frozen=True)
class TrustedFolder:
    """The public keys read from a trusted signers folder, and what in it was not used and why.

    Attributes
    ----------
    keys : dict
        Fingerprint -> :class:`PublicKey`, the keys trusted.
    problems : tuple of str
        One line per entry skipped unopened (a FIFO, device, socket or folder named ``*.pub``) and per
        key not trusted because two files give it two names.
    warnings : tuple of str
        Two trusted keys under one name.
    """

    keys: dict
    problems: tuple = ()
    warnings: tuple = ()


def read_trusted(folder, required=False):
    """The public keys a site trusts, with what was skipped: a :class:`TrustedFolder`.

    One FIFO in a shared folder must not hang every verification: an entry named ``*.pub`` that is not a
    regular file (a FIFO, device, socket, folder) is skipped without being opened, and reported. A damaged
    ``.pub`` file is refused, naming it, as is a private key found in the folder under any name (``*.key``,
    or a file holding a private key): whoever can read the folder may have copied it, so its owner must make
    a new key pair. The same key under two names is trusted under neither; two keys under one name are both
    trusted, with a warning.

    Parameters
    ----------
    folder : str or Path or None
        The ``trusted_signers/`` folder.
    required : bool
        True when the user named the folder: a missing one is then an error.

    Raises
    ------
    SigningInputError
        A named folder that does not exist or cannot be listed, a ``.pub`` file that is not a public key
        (or is a link to a missing file), a private key in the folder, or a key whose name cannot stand on
        a record.
    """
    if folder is None:
        return TrustedFolder({})
    folder = Path(folder)
    try:
        is_folder = folder.is_dir()
        if not is_folder and (required or folder.exists() or folder.is_symlink()):
            raise SigningInputError("the trusted signers folder does not exist or is not a folder", source=folder,
                                    field="--trusted", fix="name the folder holding the trusted .pub files "
                                    "(trusted_signers/ beside site.toml)")
        entries = sorted(folder.iterdir()) if is_folder else []
    except OSError as exc:
        raise SigningInputError(f"the trusted signers folder cannot be read ({exc.strerror or exc})", source=folder,
                                field="--trusted", fix="check the folder's permissions") from None
    problems, loaded = [], []
    for path in entries:
        kind = _entry_type(path)
        if path.suffix == ".key" or (kind is None and _looks_private(path)):
            raise SigningInputError("a private key file is in the trusted signers folder, where the whole team can "
                                    "read it", source=path, fix="move it back to its owner (only the .pub file "
                                    "belongs here); its owner should make a new key pair, since this one may have "
                                    "been copied")
        if path.suffix != ".pub":
            continue
        if kind not in (None, "missing", "unreadable"):
            problems.append(f"skipped {path}: it is {kind}, not a public key file; it was not opened - remove it "
                            "(a trusted signer's file is the .pub file that `steamcalc keys new` wrote)")
            continue
        loaded.append(load_public_key(path))
    keys, conflicting = {}, set()
    for key in loaded:
        other = keys.get(key.fingerprint)
        if other is not None and name_key(other.name) != name_key(key.name):
            problems.append(f"not trusted: key {short_fingerprint(key.fingerprint)} is in {other.path} as "
                            f"{other.name} and in {key.path} as {key.name}; one key has one owner - remove the "
                            "file that names the wrong person")
            conflicting.add(key.fingerprint)
        keys.setdefault(key.fingerprint, key)
    keys = {k: v for k, v in keys.items() if k not in conflicting}
    by_name = {}
    for key in keys.values():
        by_name.setdefault(name_key(key.name), []).append(key)
    warnings = tuple(f"two trusted keys carry the name {same[0].name}: " + ", ".join(
        f"{short_fingerprint(k.fingerprint)} ({k.path.name if k.path else '?'})" for k in same)
        + "; a signature by either shows the same name - remove the one no longer in use"
        for same in by_name.values() if len(same) > 1)
    return TrustedFolder(keys, tuple(problems), warnings)


def _entry_type(path):
    """What a folder entry is when it is not a regular file ("missing" for a dangling link), else None."""
    try:
        return not_regular(os.stat(path).st_mode)
    except FileNotFoundError:
        return "missing"
    except OSError:
        return "unreadable"


def _looks_private(path):
    """A regular file (of any name) holding a private key; only regular files are opened."""
    try:
        data, _ = read_small_file(path, "file")
    except SigningInputError:
        return False
    return holds_private_key(data.decode("utf-8", "replace"))


def load_trusted(folder, required=False):
    """The public keys a site trusts: fingerprint -> :class:`~steamcalc.signing.keys.PublicKey` (see
    :func:`read_trusted`)."""
    return read_trusted(folder, required).keys


def settings_file():
    """The user's settings file (it need not exist)."""
    named = os.environ.get(SETTINGS_VARIABLE)
    if named:
        return Path(named).expanduser()
    base = os.environ.get("XDG_CONFIG_HOME")
    if not base:
        try:
            base = Path.home() / ".config"
        except RuntimeError:   # no home folder known: no settings file
            return None
    return Path(base) / "steamcalc" / "settings.toml"


def configured_folder():
    """The trusted signers folder set in the user's settings file: ``(folder, settings file)``.

    ``folder`` is None when the file does not exist or sets none. A file named by
    ``$STEAMCALC_SETTINGS`` must exist.

    Raises
    ------
    SigningInputError
        The settings file cannot be read, is not TOML, or its ``trusted_signers`` is not a folder name.
    """
    from ..cases.inputfiles import read_text_file

    path = settings_file()
    if path is None or (not os.environ.get(SETTINGS_VARIABLE) and not path.exists()):
        return None, path
    text = read_text_file(path, "settings file", error=SigningInputError)
    fix = f'write it as\n[signing]\ntrusted_signers = "/path/to/trusted_signers"\nin {path}'
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise SigningInputError(f"the settings file is not valid TOML ({exc})", source=path, fix=fix) from None
    table = data.get("signing", {})
    value = table.get("trusted_signers") if isinstance(table, dict) else None
    if value is None:
        if not isinstance(table, dict):
            raise SigningInputError("[signing] must be a table", source=path, field="signing", fix=fix)
        return None, path
    if not isinstance(value, str) or not value.strip() or any(ch < " " for ch in value):
        raise SigningInputError("trusted_signers must name a folder", source=path, field=SETTINGS_KEY,
                                value=value, fix=fix)
    folder = Path(value.strip()).expanduser()
    return (folder if folder.is_absolute() else path.parent / folder), path


def _holds_site(folder):
    return (folder / "site.toml").is_file()


def enclosing_site(folder):
    """The nearest folder above ``folder`` (not itself) holding a site.toml, or None."""
    for parent in Path(folder).resolve().parents:
        if _holds_site(parent):
            return parent
    return None


def is_site_folder(folder):
    """A folder holding a site.toml that lies inside no other site folder.

    A site inside another site's tree is what a trust list planted among that site's records looks like,
    so it is never taken as a site on its own.
    """
    folder = Path(folder).resolve()
    return _holds_site(folder) and enclosing_site(folder) is None


def site_of_records(records_folder):
    """The site a records folder belongs to: ``(site folder or None, why not)``.

    Only the folder directly above the records folder, holding a site.toml (``run`` writes records to
    ``records/`` beside the site file) and inside no other site folder; never the records folder itself.
    """
    records_folder = Path(records_folder).resolve()
    site = records_folder.parent
    if site == records_folder or not _holds_site(site):
        return None, f"no site.toml in {site}, the folder above the records"
    outer = enclosing_site(site)
    if outer is not None:
        return None, (f"{site} holds a site.toml but lies inside the site folder {outer}; a site inside another "
                      "site's folder is not trusted")
    return site, ""


def _planted(records_folder, used):
    """Trust lists in the records' own folder (a site.toml or a trusted_signers/), other than the one used."""
    if records_folder is None:
        return ()
    folder = Path(records_folder).resolve()
    found = [p for p in (folder / "site.toml", folder / TRUSTED_FOLDER) if p.exists() or p.is_symlink()]
    used = Path(used).resolve() if used is not None else None
    return tuple(p for p in found if used is None or p.resolve() != used)


def resolve_trust(records_folder=None, trusted_dir=None, site_dir=None):
    """The trusted signers for records in a folder (see the module's docstring for the order).

    Parameters
    ----------
    records_folder : str or Path, optional
        The folder of the records checked (its own site.toml or trusted_signers/ is never used).
    trusted_dir : str or Path, optional
        The folder named with ``--trusted``.
    site_dir : str or Path, optional
        A site folder the user named (``steamcalc register SITE``); without it, the site above the
        records folder.

    Returns
    -------
    TrustList

    Raises
    ------
    SigningInputError
        A named or configured folder that does not exist, or a bad key file in the list used.
    """
    if trusted_dir:
        folder = Path(trusted_dir)
        read = read_trusted(folder, required=True)
        return TrustList(folder, "named with --trusted", read.keys, _planted(records_folder, folder), _lines(read))
    configured, settings = configured_folder()
    if configured is not None:
        if not configured.is_dir():
            raise SigningInputError("the trusted signers folder set in your settings file does not exist",
                                    source=settings, field=SETTINGS_KEY, value=str(configured),
                                    fix="correct the folder name, or remove the setting")
        read = read_trusted(configured, required=True)
        return TrustList(configured, f"set in your settings file {settings}", read.keys,
                         _planted(records_folder, configured), _lines(read))
    if site_dir is not None:
        site, why = Path(site_dir).resolve(), ""
    elif records_folder is not None:
        site, why = site_of_records(records_folder)
    else:
        site, why = None, "no records folder or site named"
    if site is None:
        return TrustList(None, why + "; give --trusted DIR, or set trusted_signers in your settings file "
                         f"({settings or 'settings.toml'})", {}, _planted(records_folder, None))
    folder = site / TRUSTED_FOLDER
    read = read_trusted(folder)
    origin = f"the trusted_signers/ of the site {site}" + ("" if folder.is_dir() else " - there is none")
    return TrustList(folder if folder.is_dir() else None, origin, read.keys, _planted(records_folder, folder),
                     _lines(read))


def _lines(read: TrustedFolder):
    """What a trusted folder's reading skipped or warns of, one line each."""
    return tuple(read.problems) + tuple(f"warning: {line}" for line in read.warnings)
