"""Reading the files a user hands to steamcalc: bounded in size, regular files only, UTF-8.

Case files, site files and records are small text files. Anything else a path can name (a
device such as ``/dev/zero``, a FIFO that blocks, a folder, a symlink loop, a multi-gigabyte
file) is refused by name before it is read, so a wrong path never hangs or exhausts memory.
"""

from __future__ import annotations

import os
import stat
from pathlib import Path

from ..errors import CaseFileError

#: Largest case or site file read, bytes.
MAX_INPUT_FILE = 1024 * 1024
#: Largest record file read, bytes (records carry steps and bands, still far below this).
MAX_RECORD_FILE = 16 * 1024 * 1024

_BOM = "\ufeff"


def read_text_file(path, what, limit=MAX_INPUT_FILE, error=CaseFileError):
    """The text of a small UTF-8 file (a leading byte-order mark is dropped).

    Parameters
    ----------
    path : str or Path
        The file.
    what : str
        What it is, for messages ("case file", "site file", "record file").
    limit : int
        Largest size accepted, bytes.
    error : type
        The :class:`~steamcalc.errors.SteamcalcError` subclass raised.

    Raises
    ------
    SteamcalcError
        Of class ``error``, naming the file, for anything but a readable regular file
        within the limit.

    Examples
    --------
    >>> read_text_file("/dev/null", "case file")  # doctest: +ELLIPSIS
    Traceback (most recent call last):
    ...
    steamcalc.errors.CaseFileError: /dev/null: the case file is a device or pipe, not a regular file ...
    """
    path = Path(path)
    try:
        info = os.stat(path)
    except FileNotFoundError:
        raise error(f"{what} not found", source=str(path),
                    fix="check the path (relative paths are from the current folder)") from None
    except OSError as exc:
        raise error(f"{what} cannot be opened: {exc.strerror or exc}", source=str(path),
                    fix="check the path (a symbolic link that points to itself, or a folder you may not read)"
                    ) from None
    if stat.S_ISDIR(info.st_mode):
        raise error(f"the {what} is a folder, not a file", source=str(path), fix=f"name the {what} itself")
    if not stat.S_ISREG(info.st_mode):
        raise error(f"the {what} is a device or pipe, not a regular file", source=str(path),
                    fix=f"name a {what} saved on disk")
    if info.st_size > limit:
        raise error(f"the {what} is {info.st_size:,} bytes; steamcalc reads at most {limit:,}",
                    source=str(path), fix=f"check that this is the {what} you meant")
    try:
        with open(path, "rb") as handle:
            data = handle.read(limit + 1)
    except PermissionError:
        raise error(f"you may not read this {what}", source=str(path),
                    fix="check its permissions, or copy it somewhere you can read") from None
    except OSError as exc:
        raise error(f"the {what} could not be read: {exc.strerror or exc}", source=str(path)) from None
    if len(data) > limit:  # it grew between the check and the read
        raise error(f"the {what} is over {limit:,} bytes", source=str(path))
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise error(f"the {what} is not UTF-8 text (byte {exc.start} cannot be read)", source=str(path),
                    fix="save it as UTF-8 text") from None
    return text[1:] if text.startswith(_BOM) else text
