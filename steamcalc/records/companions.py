"""Companions of a record: the executed workbook (papermill) and a PDF (headless Chromium)."""

from __future__ import annotations

import os
import shutil
import subprocess
import tempfile
from contextlib import contextmanager
from pathlib import Path

from ..calcs import get_calculation
from ..errors import SteamcalcError

CHROMIUM_NAMES = ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable")


def find_workbook(case):
    """The kind's workbook for a case: beside its site folder, or in a folder above the case file."""
    name = get_calculation(case.kind).WORKBOOK
    places = []
    if case.site_path is not None:
        places += [case.site_path.parent, case.site_path.parent.parent]
    places += list(Path(case.path).resolve().parents)[:3]
    for place in places:
        candidate = Path(place) / name
        if candidate.exists():
            return candidate
    raise SteamcalcError(f"the workbook {name} was not found beside the site folder or above the case file",
                         source=case.path, fix=f"keep {name} beside the site folder (steamcalc new-site copies it)")


def _refuse_foreign(target, force):
    # What steamcalc did not write is never overwritten: a notebook or PDF of the record's name
    # that is not its executed workbook or printed record stays as it is.
    from .issuing import is_own_output

    if target.exists() and not force and not is_own_output(target):
        raise SteamcalcError("a file of this name exists and was not written by steamcalc", source=target,
                             fix="move it away (or give --force to replace it)")


def run_notebook(case, out_dir, stem, force=False):
    """Execute the case's workbook headless with its parameters; save it beside the record.

    An existing file of the target's name that steamcalc did not write is refused unless ``force``.
    """
    import papermill

    workbook = find_workbook(case)
    target = Path(out_dir) / f"{stem}.ipynb"
    _refuse_foreign(target, force)
    partial = target.with_name(f".{target.stem}.part.ipynb")
    with _local_kernel() as (kernel_options, kernel_log):
        try:
            papermill.execute_notebook(
                str(workbook), str(partial), cwd=str(workbook.parent), progress_bar=False, kernel_name="python3",
                parameters={"case_file": str(Path(case.path).resolve()), "record_folder": str(Path(out_dir).resolve()),
                            "save_on_run": False}, **kernel_options)
        except Exception as exc:  # papermill wraps kernel errors in its own exception types
            partial.unlink(missing_ok=True)
            said = _log_tail(kernel_log)
            raise SteamcalcError(f"the workbook {workbook.name} did not run: {exc}"
                                 + (f" (the kernel said: {said})" if said else ""), source=case.path) from None
    os.replace(partial, target)
    return target


@contextmanager
def _local_kernel():
    """Papermill options for one headless run whose kernel is reached over local sockets.

    By default a kernel listens on TCP ports of localhost without encryption, and ipykernel
    warns so on its stderr at every start. Where the system has Unix sockets the kernel is
    reached through sockets in a private temporary folder instead (mode 0700, removed after the
    run): nothing listens on the network and the warning does not arise. The kernel manager is
    still made, started and shut down by the notebook client, and the kernel's own errors still
    reach the user: the kernel's standard error goes to a log in that folder, quoted in the refusal
    when the workbook fails. When it runs, the log is dropped: what a kernel prints as it shuts down
    (a messaging library's assertion on a loaded machine, seen once in CI) is not the user's business,
    and the notebook's own errors are in its outputs. Elsewhere (Windows) the default manager is used.

    Yields (papermill options, path of the kernel's log or None).
    """
    if os.name == "nt":
        yield {}, None
        return
    from jupyter_client.manager import AsyncKernelManager
    from traitlets import default

    folder = tempfile.mkdtemp(prefix="steamcalc-kernel-")

    class LocalSocketKernelManager(AsyncKernelManager):
        @default("transport")
        def _local_sockets(self):
            return "ipc"

        @default("connection_file")
        def _private_connection_file(self):
            # The sockets are named after it, so they land in the private folder too.
            return os.path.join(folder, "kernel.json")

        async def _async_pre_start_kernel(self, **kw):
            kernel_cmd, kw = await super()._async_pre_start_kernel(**kw)
            kw["stderr"] = log_file
            return kernel_cmd, kw

    log_path = os.path.join(folder, "kernel.log")
    log_file = open(log_path, "wb")  # noqa: SIM115 - kept open for the kernel's whole life
    try:
        yield {"kernel_manager_class": LocalSocketKernelManager}, log_path
    finally:
        log_file.close()
        shutil.rmtree(folder, ignore_errors=True)


def _log_tail(path, limit=400):
    """The last ``limit`` characters of a kernel's log, on one line; '' when there is none."""
    if path is None or not os.path.exists(path):
        return ""
    with open(path, "rb") as log:
        text = log.read().decode("utf-8", "replace")
    return " ".join(text.split())[-limit:]


def find_chromium():
    """A headless-capable Chromium, or None."""
    explicit = os.environ.get("STEAMCALC_CHROMIUM")
    if explicit and Path(explicit).exists():
        return explicit
    for name in CHROMIUM_NAMES:
        found = shutil.which(name)
        if found:
            return found
    return None


def write_pdf(html_path, force=False):
    """Print a record's HTML to PDF with headless Chromium; the PDF lands beside it.

    An existing PDF of that name that steamcalc did not print is refused unless ``force``.
    """
    _refuse_foreign(Path(html_path).with_suffix(".pdf"), force)
    chromium = find_chromium()
    if chromium is None:
        raise SteamcalcError(
            "no PDF written: no Chromium was found", source=html_path,
            fix="install it (Debian: apt-get install chromium) or set STEAMCALC_CHROMIUM; the HTML record "
                "prints cleanly from any browser too")
    html_path = Path(html_path).resolve()
    pdf = html_path.with_suffix(".pdf")
    partial = pdf.with_name(f".{pdf.name}.part")
    done = subprocess.run(
        [chromium, "--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking",
         "--no-first-run", "--disable-component-update", "--no-pdf-header-footer",
         f"--print-to-pdf={partial}", html_path.as_uri()],
        capture_output=True, text=True, timeout=120)
    if done.returncode != 0 or not partial.exists():
        partial.unlink(missing_ok=True)
        raise SteamcalcError(f"Chromium did not print the PDF: {done.stderr.strip()[-300:]}", source=html_path)
    os.replace(partial, pdf)
    return pdf
