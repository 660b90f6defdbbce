"""A new plant folder from a template site: site file, cases and workbooks, never into an existing folder."""

from __future__ import annotations

import json
import os
import shutil
import tempfile
from pathlib import Path

from ..errors import SteamcalcError
from .filemodes import folder_mode


def default_template():
    """The demo site: workbooks/demo_site under the current folder, or beside the package's source."""
    here = Path.cwd() / "workbooks" / "demo_site"
    if here.is_dir():
        return here
    source = Path(__file__).resolve().parent.parent / "workbooks" / "demo_site"
    if source.is_dir():
        return source
    raise SteamcalcError("no template given and workbooks/demo_site was not found",
                         fix="give --from PATH/TO/TEMPLATE_SITE")


def new_site(destination, template=None):
    """Copy a template site to a new folder.

    The new folder gets the template's ``site.toml``, its ``cases/``, its ``trusted_signers/``
    (the public keys of the people whose signatures it trusts) and the workbooks that
    sit beside the template (their parameters re-pointed at the new folder's cases and
    ``records/``). No records are copied.

    Returns
    -------
    list of Path
        The files written.
    """
    destination = Path(destination)
    template = Path(template) if template else default_template()
    if destination.exists():
        raise SteamcalcError("the folder already exists; new-site never writes into an existing folder",
                             source=destination, fix="name a folder that does not exist yet")
    if not (template / "site.toml").is_file():
        raise SteamcalcError("the template has no site.toml", source=template,
                             fix="give --from a site folder (with site.toml and cases/)")
    destination.parent.mkdir(parents=True, exist_ok=True)
    staging = Path(tempfile.mkdtemp(prefix=f".{destination.name}.", dir=destination.parent))
    try:
        # mkdtemp makes a private (0700) folder; the new site is shared like any folder the user makes.
        os.chmod(staging, folder_mode())
        shutil.copy2(template / "site.toml", staging / "site.toml")
        if (template / "cases").is_dir():
            shutil.copytree(template / "cases", staging / "cases")
        if (template / "trusted_signers").is_dir():
            # Public keys only: a private key that strayed into the folder is not carried on.
            shutil.copytree(template / "trusted_signers", staging / "trusted_signers",
                            ignore=shutil.ignore_patterns("*.key"))
        for notebook in sorted(template.parent.glob("*.ipynb")) + sorted(template.glob("*.ipynb")):
            _copy_workbook(notebook, staging / notebook.name, template.name)
        _follow_umask(staging)
        staging.rename(destination)
    except BaseException:
        shutil.rmtree(staging, ignore_errors=True)
        raise
    return sorted(p for p in destination.rglob("*") if p.is_file())


def _follow_umask(folder):
    # Copies keep the template's modes; a new folder's files should have the user's own, as `cp` gives.
    from .filemodes import file_mode

    for path in folder.rglob("*"):
        os.chmod(path, folder_mode() if path.is_dir() else file_mode())


def _copy_workbook(source, target, template_name):
    data = json.loads(source.read_text(encoding="utf-8"))
    for cell in data.get("cells", []):
        if "parameters" in cell.get("metadata", {}).get("tags", []):
            text = "".join(cell["source"]) if isinstance(cell["source"], list) else cell["source"]
            cell["source"] = text.replace(f'"{template_name}/', '"')
        if cell.get("cell_type") == "code":
            cell["outputs"] = []
            cell["execution_count"] = None
    target.write_text(json.dumps(data, indent=1, ensure_ascii=False) + "\n", encoding="utf-8")
