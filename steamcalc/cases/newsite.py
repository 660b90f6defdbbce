"""A new plant folder from a template site: site file, cases and workbooks, never into an existing folder."""

from __future__ import annotations

import errno
import json
import os
import shutil
import stat
import tempfile
from pathlib import Path

from ..errors import SteamcalcError
from .filemodes import file_mode, folder_mode

#: Largest file new-site copies, bytes: case files, key files and workbooks are far smaller; a larger one is not
#: a file of a site.
MAX_SITE_FILE = 16 * 1024 * 1024
#: The trusted signers folder of a site (as ``steamcalc.signing.keys.TRUSTED_FOLDER``; the cases layer does not
#: import the signing layer).
TRUSTED_FOLDER = "trusted_signers"
#: Marks of a private key in a file's text: steamcalc's own header, or any PEM private key.
_PRIVATE_MARKS = ("steamcalc private signing key", "PRIVATE KEY-----")


def default_template():
    """The demo site: workbooks/demo_site under the current folder, or beside the package's source."""
    here = Path.cwd() / "workbooks" / "demo_site"
    if here.is_dir():
        return here
    source = Path(__file__).resolve().parent.parent.parent / "workbooks" / "demo_site"
    if source.is_dir():
        return source
    raise SteamcalcError("no template given and workbooks/demo_site was not found",
                         fix="give --from PATH/TO/TEMPLATE_SITE")


def new_site(destination, template=None):
    """Copy a template site to a new folder.

    The new folder gets the template's ``site.toml``; every case file of its ``cases/`` (the revisions the
    workbooks saved, ``<id>_rev<X>.toml``, too); the public keys (``*.pub``) of its ``trusted_signers/`` (the
    people whose signatures it trusts), never a private key; and the workbooks that sit beside the template
    (their parameters re-pointed at the new folder's cases and ``records/``). No records are copied.

    The new folder appears whole or not at all: the files are written into a hidden folder beside it, which
    is renamed into place at the end and removed if anything fails.

    Raises
    ------
    SteamcalcError
        An existing destination, a template without ``site.toml``, a private key or a special file (a pipe, a
        device) in the template, a file that cannot be read, or one that cannot be written (a full disk, a
        read-only folder): each names the file and the fix.

    Returns
    -------
    list of Path
        The files written.
    """
    destination = Path(destination)
    template = Path(template) if template else default_template()
    if destination.exists() or destination.is_symlink():
        raise SteamcalcError("the folder already exists; new-site never writes into an existing folder",
                             source=destination, fix="name a folder that does not exist yet")
    if not (template / "site.toml").is_file():
        raise SteamcalcError("the template has no site.toml", source=template,
                             fix="give --from a site folder (with site.toml and cases/)")
    plan = _files_to_copy(template)
    workbooks = [(path, _workbook_text(path, template.name))
                 for path in sorted(template.parent.glob("*.ipynb")) + sorted(template.glob("*.ipynb"))]
    try:
        destination.parent.mkdir(parents=True, exist_ok=True)
        staging = Path(tempfile.mkdtemp(prefix=f".{destination.name}.", dir=destination.parent))
    except OSError as exc:
        raise _write_error(exc, destination, "make the new site folder") from None
    target = destination
    try:
        # mkdtemp makes a private (0700) folder; the new site is shared like any folder the user makes.
        os.chmod(staging, folder_mode())
        for relative, data in plan:
            target = destination / relative
            _write_new(staging / relative, data)
        for notebook, text in workbooks:
            target = destination / notebook.name
            _write_new(staging / notebook.name, text.encode("utf-8"))
        target = destination
        staging.rename(destination)
    except OSError as exc:
        shutil.rmtree(staging, ignore_errors=True)
        raise _write_error(exc, target, "write the new site's file" if target != destination else
                           "make the new site folder") from None
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    return sorted(p for p in destination.rglob("*") if p.is_file())


def _files_to_copy(template):
    """(path relative to the site, bytes) of each file of the template the new site gets, read and checked first.

    The site file; every regular file under ``cases/`` (hidden ones, such as editors' lock files, left out);
    the ``*.pub`` files and the read-me of ``trusted_signers/``. A private key there, or a pipe or device
    anywhere in what is copied, is refused by name.
    """
    plan = [(Path("site.toml"), _read(template / "site.toml"))]
    cases = template / "cases"
    if cases.is_dir():
        for path in sorted(cases.rglob("*")):
            relative = path.relative_to(template)
            if any(part.startswith(".") for part in relative.parts) or path.is_dir():
                continue
            plan.append((relative, _read(path)))
    trusted = template / TRUSTED_FOLDER
    if trusted.is_dir():
        for path in sorted(trusted.iterdir()):
            if path.name.startswith(".") or path.is_dir():
                continue
            data = _read(path)
            if path.suffix == ".key" or any(mark.encode() in data for mark in _PRIVATE_MARKS):
                raise SteamcalcError("a private key file is in the template's trusted signers folder; new-site "
                                     "copies public keys only, never a private key", source=path,
                                     fix="move it back to its owner (only the .pub file belongs in "
                                         "trusted_signers/); its owner should make a new key pair, since this one "
                                         "may have been copied")
            if path.suffix == ".pub" or path.name.lower().startswith("readme"):
                plan.append((path.relative_to(template), data))
    return plan


def _read(path):
    """A template file's bytes: a regular file (or a link to one) of a sensible size, else refused by name."""
    try:
        info = os.stat(path)
    except OSError as exc:
        raise SteamcalcError(f"the template's file cannot be read: {exc.strerror or exc}", source=path,
                             fix="check that the template folder is readable (or give another with --from)") from None
    if not stat.S_ISREG(info.st_mode):
        raise SteamcalcError("not a regular file (a pipe, a device or a socket): new-site copies files only",
                             source=path, fix="remove it from the template (or give another template with --from)")
    if info.st_size > MAX_SITE_FILE:
        raise SteamcalcError(f"the file is {info.st_size:,} bytes, larger than any site file "
                             f"({MAX_SITE_FILE // (1024 * 1024)} MiB at most)", source=path,
                             fix="remove it from the template (or give another template with --from)")
    try:
        with open(path, "rb") as handle:
            return handle.read(MAX_SITE_FILE + 1)
    except OSError as exc:
        raise SteamcalcError(f"the template's file cannot be read: {exc.strerror or exc}", source=path,
                             fix="check that you may read the template folder (or give another with --from)") from None


def _write_new(path, data):
    """Create ``path`` (and its folders) with ``data``, under the user's umask; never replaces a file."""
    path.parent.mkdir(parents=True, exist_ok=True)
    os.chmod(path.parent, folder_mode())
    descriptor = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, file_mode())
    try:
        view = memoryview(data)
        while view:
            written = os.write(descriptor, view)
            view = view[written:]
    finally:
        os.close(descriptor)


#: The fix for a file new-site could not write, by the system's reason.
_WRITE_FIXES = {
    errno.ENOSPC: "free some disk space and run new-site again; nothing was left behind (the new folder is made "
                  "whole or not at all)",
    errno.EDQUOT: "free some of your disk quota and run new-site again; nothing was left behind",
    errno.EROFS: "name a folder on a writable drive",
    errno.EACCES: "name a folder you may write to (or ask for write access to this one)",
    errno.EPERM: "name a folder you may write to (or ask for write access to this one)",
    errno.ENOTDIR: "a file stands where a folder is needed: name another folder",
    errno.EEXIST: "the folder appeared while it was being made: name a folder that does not exist yet",
    errno.ENOTEMPTY: "the folder appeared while it was being made: name a folder that does not exist yet",
    errno.ENAMETOOLONG: "name a folder with a shorter path",
}


def _write_error(exc, path, doing):
    """A refusal naming the file new-site could not write, the system's reason and the fix."""
    return SteamcalcError(f"could not {doing}: {exc.strerror or exc}", source=str(path),
                          fix=_WRITE_FIXES.get(exc.errno, "check the folder and run new-site again; nothing was "
                                                          "left behind"))


def _workbook_text(source, template_name):
    """A workbook beside the template, its parameters re-pointed at the new site and its outputs cleared."""
    data = _read(source)
    try:
        notebook = json.loads(data.decode("utf-8"))
        cells = notebook.get("cells", [])
        for cell in cells:
            if "parameters" in cell.get("metadata", {}).get("tags", []):
                text = "".join(cell["source"]) if isinstance(cell["source"], list) else cell["source"]
                cell["source"] = text.replace(f'"{template_name}/', '"')
            if cell.get("cell_type") == "code":
                cell["outputs"] = []
                cell["execution_count"] = None
    except (UnicodeDecodeError, ValueError, AttributeError, KeyError, TypeError) as exc:
        raise SteamcalcError(f"the workbook beside the template is not a readable notebook ({exc})", source=source,
                             fix="repair or remove it (new-site copies the workbooks beside the template)") from None
    return json.dumps(notebook, indent=1, ensure_ascii=False) + "\n"
