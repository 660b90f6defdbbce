"""Signing keys: Ed25519 key pairs in files, and the public keys a site trusts.

A private key file (``*.key``, mode 0600) holds a PEM PKCS#8 Ed25519 key after three header lines
(what the file is, the signer's name, the key's fingerprint); it is encrypted when a passphrase is
given. A public key file (``*.pub``) is four lines of text: what it is, the name, the fingerprint
(``sha256:`` over the 32 raw key bytes) and the raw key in base64. A site trusts the public key
files in ``trusted_signers/`` beside its ``site.toml``; which list a verification uses (never one beside
the records), and how a folder of them is read, is decided in :mod:`steamcalc.signing.trust`.

Every key and passphrase file is read by :func:`read_small_file`: a FIFO or device is refused by its type
before it is opened, and a file far larger than a key by its size. The names a key carries are checked
by :mod:`steamcalc.signing.names`.
"""

from __future__ import annotations

import base64
import errno
import hashlib
import os
import re
import stat
import tempfile
from dataclasses import dataclass
from pathlib import Path

from ..errors import SteamcalcError
from .names import name_problem

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


#: Largest key, public key or passphrase file read, bytes: a key file is well under 1 KB, so anything far larger
#: is not one (and /dev/zero would otherwise be read until memory runs out).
MAX_KEY_FILE = 64 * 1024
class _Shown(str):
    """A value shown in an error as it stands (already escaped; not quoted a second time)."""

    def __repr__(self):
        return str(self)


def _check_name(name, field="--name", source=None):
    name = (name or "").strip(" ") if isinstance(name, str) else name   # spaces only: a line end is refused
    if not name:
        raise SigningInputError("the signer's name is empty", field=field, source=source,
                                fix='give the name as it should appear on the record, e.g. --name "C. Checker"')
    problem = name_problem(name)
    if problem:
        raise SigningInputError(f"the signer's name cannot stand on a record: {problem}", field=field,
                                value=_Shown(ascii(name)), source=source,
                                fix='give the name in plain characters on one line, e.g. --name "C. Checker"'
                                if source is None else "make a new key pair under the name in plain characters")
    return name


_FILE_TYPES = ((stat.S_ISDIR, "a folder"), (stat.S_ISFIFO, "a FIFO (named pipe)"), (stat.S_ISCHR, "a character device"),
               (stat.S_ISBLK, "a block device"), (stat.S_ISSOCK, "a socket"))


def not_regular(mode):
    """What a file that is not a regular file is, in words (None for a regular file)."""
    if stat.S_ISREG(mode):
        return None
    return next((words for test, words in _FILE_TYPES if test(mode)), "not a regular file")


def read_small_file(path, what, field=None, fix=None, limit=MAX_KEY_FILE):
    """The bytes of a small regular file, and its status: a key, public key or passphrase file.

    A FIFO, device, socket or folder is refused by its type before it is opened (a FIFO would block
    the reader for ever, ``/dev/zero`` would fill memory); a file over ``limit`` bytes by its size. The
    file is opened without blocking and its type checked again on the open file, so one swapped for a
    FIFO between the two looks is refused too, never read.

    Returns
    -------
    tuple
        ``(data, os.stat_result)``.

    Raises
    ------
    SigningInputError
        Naming the file, what it is and the fix.
    """
    path = Path(path)
    fix = fix or f"give the {what} itself, a regular file"

    def refuse(message, more_fix=None):
        return SigningInputError(message, source=str(path), field=field, fix=more_fix or fix)
    try:
        info = os.stat(path)
    except FileNotFoundError:
        raise refuse(f"the {what} is missing" + (" (a link to a file that does not exist)" if path.is_symlink()
                                                 else "")) from None
    except OSError as exc:
        raise refuse(f"the {what} cannot be looked at ({exc.strerror or exc})") from None
    kind = not_regular(info.st_mode)
    if kind:
        raise refuse(f"the {what} is {kind}, not a regular file; it was not opened")
    if info.st_size > limit:
        raise refuse(f"the {what} is {info.st_size:,} bytes; a {what} is under {limit:,}")
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0) | getattr(os, "O_CLOEXEC", 0)
    try:
        handle = os.open(path, flags)
    except OSError as exc:
        raise refuse(f"the {what} cannot be read ({exc.strerror or exc})",
                     "check its permissions" if exc.errno in (errno.EACCES, errno.EPERM) else None) from None
    try:
        info = os.fstat(handle)
        kind = not_regular(info.st_mode)
        if kind:   # replaced between the two looks
            raise refuse(f"the {what} is {kind}, not a regular file; it was not read")
        chunks, left = [], limit + 1
        while left > 0:
            chunk = os.read(handle, left)
            if not chunk:
                break
            chunks.append(chunk)
            left -= len(chunk)
    except OSError as exc:
        raise refuse(f"the {what} cannot be read ({exc.strerror or exc})") from None
    finally:
        os.close(handle)
    data = b"".join(chunks)
    if len(data) > limit:   # it grew after it was looked at
        raise refuse(f"the {what} is over {limit:,} bytes; a {what} is under that")
    return data, info


def read_passphrase(path):
    """The passphrase in a file (its first line, without the line end)."""
    text, _ = read_small_file(path, "passphrase file", field="--passphrase-file",
                              fix="give a regular file holding the passphrase on its first line (chmod 600)")
    passphrase = text.splitlines()[0] if text.strip() else b""
    if not passphrase:
        raise SigningInputError("the passphrase file is empty", source=path, field="--passphrase-file",
                                fix="write the passphrase on the file's first line")
    return passphrase


#: What a failed write of a key file says to do, by errno.
_WRITE_FIXES = {
    errno.ENOSPC: "free some disk space and run it again; no key file was left behind",
    errno.EDQUOT: "free some of your disk quota and run it again; no key file was left behind",
    errno.EROFS: "give --out a folder on a writable drive",
    errno.EACCES: "give --out a folder you may write to",
    errno.EPERM: "give --out a folder you may write to",
}


def _write_new(path, text, mode):
    """Write a file that must not exist yet: a temporary file, then a link that fails if it does.

    A failed write (a full disk, a read-only drive) leaves nothing behind and is refused by name.
    """
    def cannot(exc):
        return SigningInputError(f"the key file cannot be written ({exc.strerror or exc})", source=path, field="--out",
                                 fix=_WRITE_FIXES.get(exc.errno, "give a folder you can write to"))
    try:
        handle, temp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".part")
    except OSError as exc:
        raise cannot(exc) from None
    try:
        os.fchmod(handle, mode)
        data = memoryview(text.encode("utf-8"))
        while data:
            data = data[os.write(handle, data):]
        os.fsync(handle)
        os.close(handle)
        handle = None
        os.link(temp, path)
    except FileExistsError:
        raise SigningInputError("the file exists already; a key is never overwritten", source=path,
                                fix="choose another --out folder, or move the old key away") from None
    except OSError as exc:
        raise cannot(exc) from None
    finally:
        if handle is not None:
            os.close(handle)
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
    stem = _slug(name)
    key_path, pub_path = out_dir / f"{stem}.key", out_dir / f"{stem}.pub"
    try:
        if out_dir.exists() and not out_dir.is_dir():
            raise SigningInputError("--out names a file, not a folder", source=out_dir, field="--out",
                                    fix="give a folder for the two key files")
        for path in (key_path, pub_path):
            if path.exists() or path.is_symlink():
                raise SigningInputError("the file exists already; a key is never overwritten", source=path,
                                        fix="choose another --out folder, or move the old key away")
        out_dir.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise SigningInputError(f"the folder cannot be made or looked into ({exc.strerror or exc})", source=out_dir,
                                field="--out", fix=_WRITE_FIXES.get(exc.errno, "give a folder you can write to")) from None
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


def _lines(text):
    """A key file's lines, split at line feeds only: a line or paragraph separator (or any other character
    str.splitlines breaks at) stays inside its line, so a name holding one is refused, not cut short."""
    return [line.removesuffix("\r") for line in text.split("\n")]


def _fields(lines):
    fields = {}
    for line in lines:
        key, sep, value = line.partition(":")
        if sep:
            fields.setdefault(key.strip(" \t"), value.strip(" \t"))
    return fields


def _key_text(data, path, what, field, fix):
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError:
        raise SigningInputError(f"the {what} is not UTF-8 text, so not a steamcalc key file", source=str(path),
                                field=field, fix=fix) from None


def load_private_key(path, passphrase=None):
    """Read a private key file written by :func:`new_key_pair`.

    Returns
    -------
    tuple
        ``(private_key, name)``.

    Raises
    ------
    SigningInputError
        The file is missing, not a regular file (a FIFO or device is refused unopened), too large to be a
        key, not a steamcalc key, not Ed25519, or the passphrase is wrong or missing; or the name in it
        cannot stand on a record.
    """
    from cryptography.hazmat.primitives import serialization
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PrivateKey

    path = Path(path)
    make = 'make one with: steamcalc keys new --name "Your Name"'
    data, info = read_small_file(path, "private key file", field="--key",
                                 fix="give your private key file (*.key) from `steamcalc keys new`")
    text = _key_text(data, path, "private key file", "--key", make)
    head, sep, pem = text.partition("-----BEGIN")
    if not text.startswith(_PRIVATE_HEADER) or not sep:
        what = "a public key file" if text.startswith(_PUBLIC_HEADER) else "not a steamcalc private key file"
        raise SigningInputError(f"{what}; sign with your private key (*.key)", source=path, field="--key", fix=make)
    name = _fields(_lines(head)).get("name", "")
    mode = stat.S_IMODE(info.st_mode)
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
    return key, _check_name(name, field="name", source=str(path))


_PUBLIC_FIX = "a trusted signer's file is the .pub file that `steamcalc keys new` wrote; replace or remove this one"


def load_public_key(path):
    """Read a public key file (``*.pub``) written by :func:`new_key_pair`.

    Raises
    ------
    SigningInputError
        The file is missing, not a regular file (refused unopened), too large, not a steamcalc public key
        (a private key among them), or its fingerprint or name does not hold.
    """
    from cryptography.hazmat.primitives.asymmetric.ed25519 import Ed25519PublicKey

    path = Path(path)
    data, _ = read_small_file(path, "public key file", fix=_PUBLIC_FIX)
    text = _key_text(data, path, "public key file", None, _PUBLIC_FIX)
    if holds_private_key(text):
        raise SigningInputError("this is a private key, not a public key file", source=path,
                                fix="move it back to its owner (only .pub files belong among the trusted signers); "
                                    "its owner should make a new key pair, since this one may have been copied")
    lines = _lines(text)
    fields = _fields(lines[1:])
    if not lines or lines[0] != _PUBLIC_HEADER or not {"name", "fingerprint", "key"} <= set(fields):
        raise SigningInputError("not a steamcalc public key file", source=path, fix=_PUBLIC_FIX)
    try:
        raw = base64.b64decode(fields["key"], validate=True)
        Ed25519PublicKey.from_public_bytes(raw)
    except ValueError:
        raise SigningInputError("the key in the public key file is not an Ed25519 key", source=path,
                                fix=_PUBLIC_FIX) from None
    if fingerprint(raw) != fields["fingerprint"]:
        raise SigningInputError("the fingerprint written in the file is not its key's", source=path, fix=_PUBLIC_FIX)
    return PublicKey(_check_name(fields["name"], field="name", source=str(path)), fields["fingerprint"], raw, path)


_PEM_PRIVATE = re.compile(r"-----BEGIN [A-Z0-9 ]*PRIVATE KEY-----")


def holds_private_key(text):
    return text.startswith(_PRIVATE_HEADER) or bool(_PEM_PRIVATE.search(text))
