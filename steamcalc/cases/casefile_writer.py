"""Writing a case file from edited inputs (the workbook's "Save case file"), never over another one.

The workbook's inputs are saved as a case file that ``steamcalc run`` reads like any other, so the
case file and the record issued from it stay in step. The user's own texts are written as typed
(``"16 bar(g)"``, ``"header:LP"``), so the file read back gives the same ``Inputs`` and the same
"as given" column in the record.

A case file is never replaced: the file is created only if its name is free (an exclusive link
of a fully written temporary file, so two savers at once cannot both win and a kill leaves no
half-written file), and a revision of a case id that a case file in the folder already holds
with other contents is refused with the next free revision named. Saving contents that a case
file already holds writes nothing and says so.
"""

from __future__ import annotations

import math
import os
import re
import tempfile
import tomllib
from dataclasses import dataclass
from pathlib import Path

from ..errors import CaseFileError, SteamcalcError

#: The first line of a written case file.
HEADER = ("# steamcalc case file, saved from the workbook. Edit it like any case file; a changed case\n"
          "# gets a new revision (it is not overwritten).\n")


@dataclass(frozen=True)
class SavedCase:
    """What saving did: the case file's path and ``"written"`` or ``"unchanged"`` (already there)."""

    path: Path
    status: str


def case_file_name(case_id, revision):
    """The file name a saved revision gets.

    Examples
    --------
    >>> case_file_name("LD-01", "B")
    'LD-01_revB.toml'
    """
    return f"{case_id}_rev{revision}.toml"


def next_revision(revision):
    """The revision after this one: A → B, Z → AA, B1 → B2, 09 → 10, 1.2 → 1.3.

    Examples
    --------
    >>> [next_revision(r) for r in ("A", "Z", "az", "B1", "09", "1.2", "P-")]
    ['B', 'AA', 'ba', 'B2', '10', '1.3', 'P-1']
    """
    digits = re.search(r"(\d+)$", revision)
    if digits:
        number = digits.group(1)
        return revision[:digits.start()] + str(int(number) + 1).zfill(len(number))
    letters = re.search(r"([A-Za-z]+)$", revision)
    if not letters:
        return revision + "1"
    chars = list(letters.group(1))
    i = len(chars) - 1
    while i >= 0:
        if chars[i] in "zZ":
            chars[i] = "a" if chars[i] == "z" else "A"
            i -= 1
            continue
        chars[i] = chr(ord(chars[i]) + 1)
        break
    else:
        chars.insert(0, "a" if chars[0] == "a" else "A")
    return revision[:letters.start()] + "".join(chars)


# -- TOML out (only what case files hold: text, numbers, true/false, lists, tables) ----------

def _toml_string(text):
    out = ['"']
    for ch in text:
        if ch == '"':
            out.append('\\"')
        elif ch == "\\":
            out.append("\\\\")
        elif ch in "\n\t\r":
            out.append({"\n": "\\n", "\t": "\\t", "\r": "\\r"}[ch])
        elif ord(ch) < 0x20 or ord(ch) == 0x7F:
            out.append(f"\\u{ord(ch):04X}")
        else:
            out.append(ch)
    out.append('"')
    return "".join(out)


def _toml_value(value):
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise CaseFileError("a case file holds finite numbers only", value=value)
        return repr(value)
    if isinstance(value, str):
        return _toml_string(value)
    if isinstance(value, (list, tuple)):
        return "[" + ", ".join(_toml_value(v) for v in value) + "]"
    raise CaseFileError(f"cannot be written to a case file ({type(value).__name__})", value=value)


def _bare_key(key):
    return key if re.fullmatch(r"[A-Za-z0-9_-]+", key) else _toml_string(key)


def toml_text(document):
    """A case document (tables of values, one level of sub-tables) as TOML text.

    Examples
    --------
    >>> print(toml_text({"case": {"id": "X-1"}, "inputs": {"p": "2 bar(g)", "valve": {"fl": 0.9}}}), end="")
    [case]
    id = "X-1"
    <BLANKLINE>
    [inputs]
    p = "2 bar(g)"
    <BLANKLINE>
    [inputs.valve]
    fl = 0.9
    """
    blocks = []
    for name, table in document.items():
        plain = {k: v for k, v in table.items() if not isinstance(v, dict)}
        lines = [f"[{_bare_key(name)}]"] + [f"{_bare_key(k)} = {_toml_value(v)}" for k, v in plain.items()]
        blocks.append("\n".join(lines))
        for sub, subtable in table.items():
            if isinstance(subtable, dict):
                lines = [f"[{_bare_key(name)}.{_bare_key(sub)}]"]
                lines += [f"{_bare_key(k)} = {_toml_value(v)}" for k, v in subtable.items()]
                blocks.append("\n".join(lines))
    return "\n\n".join(blocks) + "\n"


# -- the case document ------------------------------------------------------------------------

def _case_value(kind, raw):
    """A form value as the case file holds it: true/false for flags, numbers as numbers, texts as typed."""
    if kind == "flag" and isinstance(raw, str) and raw.strip().lower() in ("true", "false", "yes", "no"):
        return raw.strip().lower() in ("true", "yes")
    if isinstance(raw, float) and raw.is_integer() and abs(raw) < 2 ** 53:
        return int(raw)
    if isinstance(raw, tuple):
        return list(raw)
    return raw


def case_document(case, values, inputs_class, uncertainty=None, folder=None):
    """The TOML document of a case with these input values.

    Parameters
    ----------
    case : steamcalc.cases.site.Case
        Identity (kind, id, title, revision, preparer), site file and notes.
    values : dict
        Field name → the user's value (text as typed, or a number), as a form or
        :func:`steamcalc.cases.site.flatten_inputs` gives them.
    inputs_class : type
        The kind's Inputs class (its fields' sections and case-file keys).
    uncertainty : dict, optional
        The ``[uncertainty]`` table (tolerances and settings); defaults to the case's own.
    folder : Path, optional
        Where the file will be written: the site file is named relative to it.
    """
    from ..calcs.base import field_key, input_fields

    meta = {"kind": case.kind, "id": case.id, "title": case.title, "revision": case.revision}
    if case.prepared_by:
        meta["prepared_by"] = case.prepared_by
    if case.site_path is not None:
        base = Path(folder) if folder is not None else Path(case.path).parent
        meta["site"] = Path(os.path.relpath(os.path.abspath(case.site_path), os.path.abspath(base))).as_posix()
    inputs = {}
    for f in input_fields(inputs_class):
        if f.name not in values or values[f.name] is None or values[f.name] == "":
            continue
        value = _case_value(f.metadata["kind"], values[f.name])
        section = f.metadata["section"]
        target = inputs if section is None else inputs.setdefault(section, {})
        target[field_key(f)] = value
    document = {"case": meta, "inputs": inputs}
    table = case.uncertainty if uncertainty is None else uncertainty
    if table:
        document["uncertainty"] = {k: _case_value("", v) for k, v in table.items()}
    if case.notes:
        document["assumptions"] = {"notes": list(case.notes)}
    return document


def _contents(document, folder):
    """What makes two case files the same case: everything but the site path's spelling."""
    meta = dict(document.get("case", {}))
    site = meta.pop("site", None)
    if site is not None:
        meta["site"] = os.path.normpath(os.path.join(os.path.abspath(folder), site))
    return {**document, "case": meta}


def _same_revision_files(folder, case_id, revision):
    """(path, document) of each case file in the folder holding this id and revision."""
    found = []
    for path in sorted(Path(folder).glob("*.toml")):
        try:
            from .inputfiles import read_text_file
            document = tomllib.loads(read_text_file(path, "case file"))
        except (SteamcalcError, tomllib.TOMLDecodeError, RecursionError):
            continue   # not a readable case file: it holds no revision
        meta = document.get("case")
        if isinstance(meta, dict) and meta.get("id") == case_id and str(meta.get("revision", "A")) == revision:
            found.append((path, document))
    return found


def free_revision(folder, case_id, revision):
    """The first revision after ``revision`` that no case file in ``folder`` holds or is named for."""
    taken = set()
    for path in Path(folder).glob("*.toml"):
        taken.add(path.name)
    candidate = next_revision(revision)
    for _ in range(1000):
        if case_file_name(case_id, candidate) not in taken and not _same_revision_files(folder, case_id, candidate):
            return candidate
        candidate = next_revision(candidate)
    return candidate


def write_new_file(path, text):
    """Create ``path`` with ``text``, or raise FileExistsError: never replaces a file.

    The text is written and flushed to a temporary file beside it, then linked to the name
    (which fails if the name is taken), so a reader sees the whole file or none.
    """
    path = Path(path)
    descriptor, temporary = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.", suffix=".partial")
    try:   # a failed write (disk full, a text that cannot be encoded) removes its temporary file too
        with os.fdopen(descriptor, "w", encoding="utf-8", newline="\n") as handle:
            handle.write(text)
            handle.flush()
            os.fsync(handle.fileno())
        os.link(temporary, path)
    finally:
        os.unlink(temporary)


def save_case(case, values, inputs_class, folder=None, uncertainty=None):
    """Write a case's inputs as a new case file (``<id>_rev<revision>.toml``) in ``folder``.

    Parameters
    ----------
    case : steamcalc.cases.site.Case
        The case as edited (its revision is the one saved).
    values, inputs_class, uncertainty
        As for :func:`case_document`.
    folder : str or Path, optional
        Where to write; defaults to the folder of the case file the case was read from.

    Returns
    -------
    SavedCase
        ``written``, or ``unchanged`` when a case file there already holds exactly this revision.

    Raises
    ------
    CaseFileError
        When this revision of the case is already in a case file with other contents, or the
        file name is taken: naming the file, and the next free revision as the fix.
    """
    from .site import is_file_name_part

    for name in ("id", "revision"):   # they make the file name: nothing that leads out of the folder
        if not is_file_name_part(getattr(case, name)):
            raise CaseFileError(f"the {name} is text of letters, digits, '.', '_' and '-', not starting with '.', at most 80 "
                                "characters",
                                field=name, value=getattr(case, name), fix=f"give a plain {name}, e.g. {'LD-02' if name == 'id' else 'B'}")
    folder = Path(folder) if folder is not None else Path(case.path).parent
    document = case_document(case, values, inputs_class, uncertainty, folder)
    text = HEADER + "\n" + toml_text(document)
    if tomllib.loads(text) != document:   # the writer must round-trip what it wrote
        raise CaseFileError("the case could not be written so that it reads back the same",
                            fix="report this; save the record instead")
    try:
        text.encode("utf-8")
    except UnicodeEncodeError as exc:     # a lone surrogate, which a browser can send
        raise CaseFileError("a text holds a character that cannot be written to a file "
                            f"(an unpaired surrogate at position {exc.start} of the case file)",
                            fix="retype the title, notes or inputs without it") from None
    mine = _contents(document, folder)
    for path, existing in _same_revision_files(folder, case.id, case.revision):
        if _contents(existing, folder) == mine:
            return SavedCase(path, "unchanged")
        free = free_revision(folder, case.id, case.revision)
        raise CaseFileError(
            f"revision {case.revision} of {case.id} is already saved in {path.name}, with other inputs; "
            "it is not overwritten", source=str(path), field="revision", value=case.revision,
            fix=f"raise the revision to {free}: these inputs are then saved as {case_file_name(case.id, free)}")
    path = folder / case_file_name(case.id, case.revision)
    try:
        write_new_file(path, text)
    except FileExistsError:
        free = free_revision(folder, case.id, case.revision)
        raise CaseFileError(f"{path.name} already exists and is not overwritten", source=str(path),
                            field="revision", value=case.revision,
                            fix=f"raise the revision to {free}: these inputs are then saved as "
                                f"{case_file_name(case.id, free)}") from None
    except OSError as exc:
        raise CaseFileError(f"the case file could not be written: {exc.strerror or exc}", source=str(path),
                            fix="check that the folder exists and that you may write to it") from None
    return SavedCase(path, "written")


__all__ = ["save_case", "case_document", "toml_text", "next_revision", "free_revision", "case_file_name",
           "SavedCase", "write_new_file"]
