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
reported too, so a reader sees that it was there.
"""

from __future__ import annotations

import os
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from .keys import TRUSTED_FOLDER, SigningInputError, load_trusted

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
    """

    folder: Path | None
    origin: str
    keys: dict = field(default_factory=dict)
    ignored: tuple = ()

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
        """What was found beside the records and not used, one line each."""
        return [f"not used: {path} - a trust list in the records' own folder is never used (whoever can put a "
                "record there can put a key there); name the list with --trusted DIR or in your settings file"
                for path in self.ignored]


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
        keys = load_trusted(folder, required=True)
        return TrustList(folder, "named with --trusted", keys, _planted(records_folder, folder))
    configured, settings = configured_folder()
    if configured is not None:
        if not configured.is_dir():
            raise SigningInputError("the trusted signers folder set in your settings file does not exist",
                                    source=settings, field=SETTINGS_KEY, value=str(configured),
                                    fix="correct the folder name, or remove the setting")
        keys = load_trusted(configured, required=True)
        return TrustList(configured, f"set in your settings file {settings}", keys,
                         _planted(records_folder, configured))
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
    keys = load_trusted(folder)
    origin = f"the trusted_signers/ of the site {site}" + ("" if folder.is_dir() else " - there is none")
    return TrustList(folder if folder.is_dir() else None, origin, keys, _planted(records_folder, folder))
