"""Signing keys: Ed25519 key pairs in files, and the public keys a site trusts.

A private key file (``*.key``, mode 0600) holds a PEM PKCS#8 Ed25519 key after three header lines
(what the file is, the signer's name, the key's fingerprint); it is encrypted when a passphrase is
given. A public key file (``*.pub``) is four lines of text: what it is, the name, the fingerprint
(``sha256:`` over the 32 raw key bytes) and the raw key in base64. A site trusts the public key
files in ``trusted_signers/`` beside its ``site.toml``; which list a verification uses (never one beside
the records) is decided in :mod:`steamcalc.signing.trust`.
"""

from __future__ import annotations

import base64
import hashlib
import os
import re
import stat
import tempfile
from dataclasses import dataclass
from pathlib import Path

from ..errors import SteamcalcError

ALGORITHM = "Ed25519"
TRUSTED_FOLDER = "trusted_signers"
_PRIVATE_HEADER = "steamcalc private signing key (Ed25519) - keep this file to yourself"
_PUBLIC_HEADER = "steamcalc public signing key (Ed25519)"


class SigningInputError(SteamcalcError):
    """A key file, passphrase or trusted list that cannot be used (bad input: exit 2)."""


@dataclass(frozen=True)
class PublicKey:
    """A public key as read from a ``.pub`` file or a signature entry."""

    name: str
    fingerprint: str
    raw: bytes
    path: Path | None = None


def fingerprint(raw):
    """Fingerprint of a raw 32-byte Ed25519 public key: ``sha256:`` and 64 hex digits.

    Examples
    --------
    >>> fingerprint(bytes(32))[:19]
    'sha256:66687aadf862'
    """
    return "sha256:" + hashlib.sha256(raw).hexdigest()


def short_fingerprint(text):
    """The first 12 hex digits of a fingerprint, as people quote it.

    Examples
    --------
    >>> short_fingerprint("sha256:3f9a1c2b7d4e5f60718293a4b5c6d7e8")
    '3f9a1c2b7d4e…'
    """
    return str(text).removeprefix("sha256:")[:12] + "…"


def _slug(name):
    return re.sub(r"[^A-Za-z0-9]+", "-", name).strip("-").lower() or "key"


def _check_name(name, field="--name"):
    name = (name or "").strip()
    if not name or "\n" in name or "\r" in name:
        raise SigningInputError("the signer's name is empty or spans lines", field=field, value=name or None,
                                fix='give the name as it should appear on the record, e.g. --name "C. Checker"')
    return name


def read_passphrase(path):
    """The passphrase in a file (its first line, without the line end)."""
    try:
        text = Path(path).read_bytes()
    except OSError as exc:
        raise SigningInputError(f"the passphrase file cannot be read ({exc.strerror})", source=path,
                                field="--passphrase-file", fix="give a readable file holding the passphrase") from None
    passphrase = text.splitlines()[0] if text.strip() else b""
    if not passphrase:
        raise SigningInputError("the passphrase file is empty", source=path, field="--passphrase-file",
                                fix="write the passphrase on the file's first line")
    return passphrase


def _write_new(path, text, mode):
    """Write a file that must not exist yet: a temporary file, then a link that fails if it does."""
    try:
        handle, temp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".part")
    except OSError as exc:
        raise SigningInputError(f"the key file cannot be written ({exc.strerror})", source=path, field="--out",
                                fix="give a folder you can write to") from None
    try:
        os.chmod(temp, mode)
        with os.fdopen(handle, "w", encoding="utf-8", newline="\n") as out:
            out.write(text)
        os.link(temp, path)
    except FileExistsError:
        raise SigningInputError("the file exists already; a key is never overwritten", source=path,
                                fix="choose another --out folder, or move the old key away") from None
    finally:
        Path(temp).unlink(missing_ok=True)


def new_key_pair(name, out_dir=".", passphrase=None):
    """Make an Ed25519 key pair for a signer.

    Parameters
    ----------
    name : str
        The signer's name, as it will appear on signed records.
    out_dir : str or Path
        Folder for the two files (created if absent).
    passphrase : bytes, optional
        Protects the private key file; without one it is protected by its file mode only.

    Returns
    -------
    tuple of Path
        ``(private_key_file, public_key_file)``: ``<name>.key`` (mode 0600) and ``<name>.pub``.
    """
    from cryptography.hazmat.primitives import serialization
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

    name = _check_name(name)
    out_dir = Path(out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise SigningInputError("--out names a file, not a folder", source=out_dir, field="--out",
                                fix="give a folder for the two key files")
    stem = _slug(name)
    key_path, pub_path = out_dir / f"{stem}.key", out_dir / f"{stem}.pub"
    for path in (key_path, pub_path):
        if path.exists():
            raise SigningInputError("the file exists already; a key is never overwritten", source=path,
                                    fix="choose another --out folder, or move the old key away")
    try:
        out_dir.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise SigningInputError(f"the folder cannot be made ({exc.strerror})", source=out_dir, field="--out",
                                fix="give a folder you can write to") from None
    private = Ed25519PrivateKey.generate()
    raw = private.public_key().public_bytes(serialization.Encoding.Raw, serialization.PublicFormat.Raw)
    encryption = serialization.BestAvailableEncryption(passphrase) if passphrase else serialization.NoEncryption()
    pem = private.private_bytes(serialization.Encoding.PEM, serialization.PrivateFormat.PKCS8, encryption).decode()
    print_ = fingerprint(raw)
    _write_new(key_path, f"{_PRIVATE_HEADER}\nname: {name}\nfingerprint: {print_}\n{pem}", 0o600)
    try:
        _write_new(pub_path, f"{_PUBLIC_HEADER}\nname: {name}\nfingerprint: {print_}\n"
                             f"key: {base64.b64encode(raw).decode()}\n", 0o644)
    except BaseException:
        key_path.unlink(missing_ok=True)
        raise
    return key_path, pub_path


def _fields(lines):
    fields = {}
    for line in lines:
        key, sep, value = line.partition(":")
        if sep:
            fields.setdefault(key.strip(), value.strip())
    return fields


def load_private_key(path, passphrase=None):
    """Read a private key file written by :func:`new_key_pair`.

    Returns
    -------
    tuple
        ``(private_key, name)``.

    Raises
    ------
    SigningInputError
        The file is missing, not a steamcalc key, not Ed25519, or the passphrase is wrong or missing.
    """
    from cryptography.hazmat.primitives import serialization
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

    path = Path(path)
    make = 'make one with: steamcalc keys new --name "Your Name"'
    try:
        text = path.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError):
        raise SigningInputError("the private key file cannot be read", source=path, field="--key", fix=make) from None
    head, sep, pem = text.partition("-----BEGIN")
    if not text.startswith(_PRIVATE_HEADER) or not sep:
        what = "a public key file" if text.startswith(_PUBLIC_HEADER) else "not a steamcalc private key file"
        raise SigningInputError(f"{what}; sign with your private key (*.key)", source=path, field="--key", fix=make)
    name = _fields(head.splitlines()).get("name", "")
    mode = stat.S_IMODE(path.stat().st_mode)
    if os.name == "posix" and mode & 0o077:
        raise SigningInputError(f"the private key file can be read by others (mode {mode:04o})", source=path,
                                field="--key", fix=f"chmod 600 {path}; if others may have copied it, make a new key pair")
    try:
        key = serialization.load_pem_private_key((sep + pem).encode(), password=passphrase)
    except TypeError:
        if passphrase:
            raise SigningInputError("this key is not protected by a passphrase", source=path,
                                    field="--passphrase-file", fix="leave out --passphrase-file") from None
        raise SigningInputError("this key is protected by a passphrase", source=path, field="--passphrase-file",
                                fix="give --passphrase-file FILE with its passphrase") from None
    except ValueError:
        if passphrase:
            raise SigningInputError("the passphrase is wrong (or the key file is damaged)", source=path,
                                    field="--passphrase-file", fix="give the passphrase the key was made with") from None
        raise SigningInputError("the key in the file cannot be read", source=path, field="--key", fix=make) from None
    except Exception as exc:  # cryptography reports unsupported key types with its own classes
        raise SigningInputError(f"the key in the file cannot be used ({type(exc).__name__})", source=path,
                                field="--key", fix=make) from None
    if not isinstance(key, Ed25519PrivateKey):
        raise SigningInputError(f"the key is of the wrong type ({type(key).__name__.lstrip('_')}); steamcalc signs "
                                "with Ed25519 keys only", source=path, field="--key", fix=make)
    return key, _check_name(name, field="name")


def load_public_key(path):
    """Read a public key file (``*.pub``) written by :func:`new_key_pair`."""
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey

    path = Path(path)
    fix = "a trusted signer's file is the .pub file that `steamcalc keys new` wrote; replace or remove this one"
    try:
        lines = path.read_text(encoding="utf-8").splitlines()
    except FileNotFoundError:
        raise SigningInputError("the public key file is missing (a broken link?)", source=path, fix=fix) from None
    except (OSError, UnicodeDecodeError):
        raise SigningInputError("the public key file cannot be read", source=path, fix=fix) from None
    fields = _fields(lines[1:])
    if not lines or lines[0] != _PUBLIC_HEADER or not {"name", "fingerprint", "key"} <= set(fields):
        raise SigningInputError("not a steamcalc public key file", source=path, fix=fix)
    try:
        raw = base64.b64decode(fields["key"], validate=True)
        Ed25519PublicKey.from_public_bytes(raw)
    except ValueError:
        raise SigningInputError("the key in the public key file is not an Ed25519 key", source=path, fix=fix) from None
    if fingerprint(raw) != fields["fingerprint"]:
        raise SigningInputError("the fingerprint written in the file is not its key's", source=path, fix=fix)
    return PublicKey(_check_name(fields["name"], field="name"), fields["fingerprint"], raw, path)


def load_trusted(folder, required=False):
    """The public keys a site trusts: fingerprint -> :class:`PublicKey`.

    Parameters
    ----------
    folder : str or Path or None
        The ``trusted_signers/`` folder.
    required : bool
        True when the user named the folder: a missing one is then an error.

    Raises
    ------
    SigningInputError
        A named folder that does not exist, a ``.pub`` file that is not a public key, or one that
        is a link to a missing file.
    """
    if folder is None:
        return {}
    folder = Path(folder)
    if not folder.is_dir():
        if required or folder.exists():
            raise SigningInputError("the trusted signers folder does not exist", source=folder, field="--trusted",
                                    fix="name the folder holding the trusted .pub files (trusted_signers/ beside site.toml)")
        return {}
    strays = sorted(folder.glob("*.key"))
    if strays:
        raise SigningInputError("a private key file is in the trusted signers folder, where the whole team can read it",
                                source=strays[0], fix="move it back to its owner (only the .pub file belongs here); "
                                "its owner should make a new key pair, since this one may have been copied")
    trusted = {}
    for path in sorted(folder.glob("*.pub")):
        key = load_public_key(path)
        trusted[key.fingerprint] = key
    return trusted
