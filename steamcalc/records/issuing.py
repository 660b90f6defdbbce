"""Issuing a record's files as one set: one writer at a time, staged, then committed.

A record is a set of files with one stem: ``<id>_rev<revision>.json`` (the truth) and its
companions (``.html``, ``.md``). Writing the set goes:

1. take the record's lock (one ``filelock`` lock per id and revision, in the folder's hidden
   work folder ``.steamcalc/``), so that the read-compare-write of ``run``, the workbook's save
   and ``sign`` is never interleaved with another writer's;
2. finish or undo whatever an interrupted writer left (:func:`recover`);
3. write every file of the new set into a staging folder, flush it to disk, and only then write
   the staging folder's commit list;
4. move the staged files into place, the JSON first, and remove the staging folder.

A kill before the commit list exists leaves the old set (the staging folder is removed by the
next writer); a kill after it leaves a commit that the next writer rolls forward to the new
set. Because the JSON moves first, a companion never claims more than its JSON: a sign-off
caught half-way shows a signed JSON beside a report that does not yet say so, never the
reverse.

Files are created with the permissions the user's umask gives (0644 under umask 022), as any
other program's output would be.
"""

from __future__ import annotations

import errno
import json
import os
import shutil
import tempfile
from contextlib import contextmanager
from pathlib import Path

from ..cases.filemodes import file_mode
from ..errors import RecordBusyError, RecordError

#: Hidden folder beside the records for locks and staging.
WORK_FOLDER = ".steamcalc"
#: Seconds a second writer of the same record waits before giving up.
LOCK_TIMEOUT = 10.0
_COMMIT_LIST = "COMMIT"
#: The files of a record's set: its JSON and the reports beside it.
_SET_SUFFIXES = (".json", ".html", ".md", ".pdf", ".ipynb")


def os_error(exc, path, doing):
    """A user-facing error for a failed file operation (disk full, permission, not a folder...)."""
    reason = exc.strerror or str(exc)
    fixes = {
        errno.ENOSPC: "free some disk space and run it again; files already there were left as they were",
        errno.EDQUOT: "free some of your disk quota and run it again; files already there were left as they were",
        errno.EACCES: "check that you may write to this folder (or choose another with --out)",
        errno.EPERM: "check that you may write to this folder (or choose another with --out)",
        errno.EROFS: "choose a folder on a writable drive",
        errno.ENOTDIR: "a file stands where a folder is needed: give a folder",
        errno.EEXIST: "a file stands where a folder is needed: give a folder",
    }
    return RecordError(f"could not {doing}: {reason}", source=str(path),
                       fix=fixes.get(exc.errno, "check the folder and run it again"))


def ensure_folder(folder):
    """Create a folder (and parents) with umask permissions; refuse a file standing in its way."""
    folder = Path(folder)
    if folder.exists() and not folder.is_dir():
        raise RecordError("this is a file, not a folder", source=str(folder),
                          fix="give a folder for the records (--out DIR), not a file")
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise os_error(exc, folder, "create the folder") from None
    return folder


def write_file(path, data):
    """Write bytes or text to a new file, flushed to disk; mode from the umask."""
    if isinstance(data, str):
        data = data.encode("utf-8")
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, file_mode())
    try:
        view = memoryview(data)
        while view:
            written = os.write(fd, view)
            view = view[written:]
        os.fsync(fd)
    finally:
        os.close(fd)


def _sync_folder(folder):
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)


def write_text_atomic(path, text):
    """Write one file through a temporary file and a rename: never half-written.

    The temporary file sits beside the target (so the rename stays on one drive) and is
    removed if anything fails, a full disk included.
    """
    path = Path(path)
    ensure_folder(path.parent)
    handle, temp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".part")
    os.close(handle)
    try:
        os.unlink(temp)
        write_file(temp, text)
        os.replace(temp, path)
    except OSError as exc:
        Path(temp).unlink(missing_ok=True)
        raise os_error(exc, path, "write the file") from None
    except BaseException:
        Path(temp).unlink(missing_ok=True)
        raise


def _work_folder(folder):
    work = Path(folder) / WORK_FOLDER
    if not work.is_dir():
        ensure_folder(work)
    return work


@contextmanager
def record_lock(folder, stem, timeout=None):
    """Hold the exclusive lock of one record (id and revision) in a folder.

    Raises
    ------
    RecordBusyError
        When another writer holds it for longer than ``timeout`` seconds.
    """
    from filelock import FileLock, Timeout

    folder = ensure_folder(folder)
    if timeout is None:
        timeout = float(os.environ.get("STEAMCALC_LOCK_TIMEOUT", LOCK_TIMEOUT))
    lock_path = _work_folder(folder) / f"{stem}.lock"
    lock = FileLock(lock_path, timeout=timeout, mode=file_mode())
    try:
        lock.acquire()
    except Timeout:
        raise RecordBusyError(
            f"another steamcalc is writing record {stem} in this folder (waited {timeout:g} s)",
            source=str(folder), fix="let the other run, save or sign-off finish, then try again") from None
    except OSError as exc:
        raise os_error(exc, lock_path, "lock the record") from None
    try:
        yield
    finally:
        lock.release()


def _staging(folder, stem):
    return Path(folder) / WORK_FOLDER / f"{stem}.staged"


def recover(folder, stem):
    """Finish or undo an interrupted writer of this record (call with the record's lock held).

    A staging folder with its commit list is rolled forward (its files moved into place);
    one without is removed. Stray temporary files of the record are removed too.

    Returns
    -------
    str or None
        ``"rolled forward"``, ``"rolled back"`` or None when there was nothing to do.
    """
    folder = Path(folder)
    done = None
    staging = _staging(folder, stem)
    if staging.is_dir():
        if (staging / _COMMIT_LIST).is_file():
            _move_into_place(folder, staging)
            done = "rolled forward"
        else:
            shutil.rmtree(staging, ignore_errors=True)
            done = "rolled back"
    # Temporary files of an interrupted single-file write of this record's set.
    for stray in folder.glob(f".{stem}.*.part"):
        stray.unlink(missing_ok=True)
        done = done or "cleaned"
    return done


def _commit_names(staging, stem):
    """The file names a staging folder's commit list holds, each checked to be one of this record's own files.

    Recovery moves what the list names: a list edited or planted to name anything else (``../site.toml``, an
    absolute path, another record, a link) would let it overwrite a file outside the set, so it is refused.
    """
    listing = staging / _COMMIT_LIST
    refused = RecordError(
        "the staging folder of an interrupted issue holds a commit list that names files other than this "
        "record's own", source=str(listing),
        fix=f"nothing was moved: check the folder {staging} and delete it, then run the command again")
    try:
        names = json.loads(listing.read_text(encoding="utf-8"))
    except (OSError, ValueError, UnicodeDecodeError):
        raise refused from None
    allowed = {f"{stem}{suffix}" for suffix in _SET_SUFFIXES}
    if not isinstance(names, list) or not names or not all(isinstance(n, str) and n in allowed for n in names):
        raise refused
    for name in names:
        staged = staging / name
        if staged.is_symlink() or (staged.exists() and not staged.is_file()):
            raise refused
    return names


def _move_into_place(folder, staging):
    stem = staging.name[:-len(".staged")]
    names = _commit_names(staging, stem)
    for number, name in enumerate(names):
        staged = staging / name
        if staged.exists():
            os.replace(staged, folder / name)
        _fault_point(f"moved:{number}")
    _sync_folder(folder)
    shutil.rmtree(staging, ignore_errors=True)


def issue_set(folder, stem, files):
    """Write a set of files as one: staged, flushed, then moved into place in the order given.

    Call with the record's lock held and after :func:`recover`.

    Parameters
    ----------
    folder : Path
        Folder the files go into.
    stem : str
        The record's stem (its staging folder's name).
    files : list of (str, str)
        ``(file name, text)`` in commit order: the JSON first.
    """
    folder = Path(folder)
    staging = _staging(folder, stem)
    try:
        staging.mkdir(mode=0o700)
        for number, (name, text) in enumerate(files):
            write_file(staging / name, text)
            _fault_point(f"staged:{number}")
        write_file(staging / f"{_COMMIT_LIST}.part", json.dumps([name for name, _ in files]))
        os.replace(staging / f"{_COMMIT_LIST}.part", staging / _COMMIT_LIST)
        _sync_folder(staging)
        _fault_point("listed")
    except OSError as exc:
        shutil.rmtree(staging, ignore_errors=True)
        raise os_error(exc, folder / files[0][0], "write the record") from None
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    try:
        _move_into_place(folder, staging)
    except OSError as exc:
        raise RecordError(f"the record was staged but not all of it moved into place: {exc.strerror or exc}",
                          source=str(folder / files[0][0]),
                          fix="run the same command again: it completes the interrupted issue") from None


def _fault_point(name):
    # Fault injection for the crash tests: STEAMCALC_TEST_KILL_AT names the instant at which
    # the process kills itself, as a power cut or kill -9 would. Unset, this does nothing.
    if os.environ.get("STEAMCALC_TEST_KILL_AT") == name:
        import signal
        os.kill(os.getpid(), signal.SIGKILL)


def is_own_output(path, suffix=None):
    """True when a file is one steamcalc writes as a record's companion or index.

    Used before replacing a file: what steamcalc did not write is never overwritten.
    """
    path = Path(path)
    suffix = suffix or path.suffix
    try:
        if not path.is_file():
            return False
        with path.open("rb") as handle:
            head = handle.read(4096)
            handle.seek(0, os.SEEK_END)
            size = handle.tell()
            handle.seek(max(0, size - 4096))
            tail = handle.read()
    except OSError:
        return False
    text = (head + tail).decode("utf-8", "replace")
    if suffix in (".html", ".htm"):
        return 'name="generator" content="steamcalc' in text or (
            "steamcalc" in text and "digest" in text) or "steamcalc records index" in text
    if suffix == ".md":
        return "record digest `sha256:" in text
    if suffix == ".csv":
        return text.startswith("id,revision,kind,title,status")
    if suffix == ".pdf":
        return head.startswith(b"%PDF") and (b"Skia/PDF" in head + tail or b"Chromium" in head + tail)
    if suffix == ".ipynb":
        return '"papermill"' in text and '"case_file"' in text
    return False


#: What each kind of file steamcalc writes carries, to be told apart from the others (and from everything else):
#: kind -> (marks near the top of the file, any of which makes it that kind). A record's HTML of an early
#: release, without its generator mark, is recognised by :func:`is_own_output` (as "record").
_OUTPUT_MARKS = {
    "diff": ('name="generator" content="steamcalc diff"',),
    "index": ('name="generator" content="steamcalc index"', "<title>steamcalc records index</title>",
              "id,revision,kind,title,status,checked_by,"),
    "register": ('name="generator" content="steamcalc register"', "<title>steamcalc register of records</title>",
                 "id,revision,kind,title,status,verification,"),
    "record": ('name="generator" content="steamcalc record"', '"schema": "steamcalc.record/'),
}
#: What each kind is called in a refusal.
_OUTPUT_NAMES = {"diff": "a comparison (steamcalc diff --html)", "index": "a records index",
                 "register": "a register (steamcalc register)", "record": "a record's report",
                 "pdf": "a record's PDF", "notebook": "a record's executed workbook"}
#: The files of an issued record's set: no other output goes over them, not even with --force.
_RECORD_SET = ("record", "pdf", "notebook")


def refuse_foreign_file(path, force=False, made_as=None):
    """Refuse to write over a file the command did not make itself: the one rule for every output a user names.

    A file may be replaced only when it is what the command writes there (``made_as``): a register over a
    register, a comparison over a comparison, an index over an index. Anything else - a case file, the site
    file, a key, a spreadsheet of the user's - is refused unless ``force``. Refused even with ``force``: a
    folder, a device, a FIFO or a socket (steamcalc writes regular files only, and its rename would replace a
    device node outright when run as root), and a record or one of its reports, PDF or workbook under the
    output of another command (an issued record is never lost to a mistyped ``--html``). A symbolic link is
    refused unless ``force``, which replaces the link, never what it points to.

    Parameters
    ----------
    path : str or Path
        The file about to be written.
    force : bool
        The user's ``--force``: replace a regular file (or link) steamcalc did not write.
    made_as : str, optional
        What the command writes: "diff", "index", "register", "record" (a record's HTML or Markdown),
        "pdf" or "notebook". None: any file steamcalc writes (:func:`is_own_output`).

    Returns
    -------
    Path
        ``path``, which may be written.

    Raises
    ------
    RecordConflictError
        Naming the file, what it is, and the fix.
    """
    import stat

    from ..errors import RecordConflictError

    path = Path(path)
    try:
        mode = path.lstat().st_mode
    except FileNotFoundError:
        return path
    except OSError as exc:
        raise os_error(exc, path, "look at the file") from None
    if stat.S_ISDIR(mode):
        raise RecordConflictError("this is a folder, not a file", source=str(path),
                                  fix="give the name of a file to write (a new name, or one steamcalc wrote)")
    if not (stat.S_ISREG(mode) or stat.S_ISLNK(mode)):
        raise RecordConflictError("this is a device, FIFO or socket, not a regular file: steamcalc never writes "
                                  "onto one, not even with --force", source=str(path),
                                  fix="give the name of a new file")
    kind = _output_kind(path) if stat.S_ISREG(mode) else None
    if kind in _RECORD_SET and made_as is not None and made_as not in _RECORD_SET:
        what = "a record" if kind == "record" and path.suffix == ".json" else _OUTPUT_NAMES[kind]
        raise RecordConflictError(f"this is {what}, one of an issued record's files: no other "
                                  "output is written over it, not even with --force", source=str(path),
                                  fix="give a new file name")
    if force:
        return path
    wanted = _OUTPUT_NAMES.get(made_as, "a file steamcalc writes here")
    if stat.S_ISLNK(mode):
        raise RecordConflictError(f"this is a symbolic link, not {wanted}", source=str(path),
                                  fix="give a new file name, or --force to replace the link (never what it points to)")
    if kind is not None and (made_as is None or kind == made_as):
        return path
    what = f"it is {_OUTPUT_NAMES[kind]}, not {wanted}" if kind else "it was not written by steamcalc"
    raise RecordConflictError(f"a file of this name exists and {what}", source=str(path),
                              fix="give a new file name, or move the file away (or give --force to replace it)")


def _output_kind(path):
    """Which of steamcalc's outputs a regular file is (a key of :data:`_OUTPUT_NAMES`), or None."""
    if path.suffix == ".pdf" and is_own_output(path, ".pdf"):
        return "pdf"
    if path.suffix == ".ipynb" and is_own_output(path, ".ipynb"):
        return "notebook"
    try:
        with path.open("rb") as handle:
            head = handle.read(4096).decode("utf-8", "replace")
    except OSError:
        return None
    for kind, marks in _OUTPUT_MARKS.items():
        if any(mark in head if not mark.startswith("id,") else head.startswith(mark) for mark in marks):
            return kind
    if path.suffix in (".html", ".htm", ".md") and is_own_output(path):
        return "record"
    return None
