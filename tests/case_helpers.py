"""Run a case file's text through the command line, as a user's file would go."""

import json

from steamcalc.cli import main
from steamcalc.records.record import compute_content_digest, compute_digest


def run_case_text(tmp_path, capsys, text, name="case.toml"):
    """Write the case, run ``steamcalc run`` on it into tmp_path/out; return (exit code, stdout, stderr)."""
    case = tmp_path / name
    case.write_text(text)
    code = main(["run", str(case), "--out", str(tmp_path / "out")])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def assert_refused(tmp_path, capsys, text, field):
    """The case is bad input: exit 2, the file and the field named, no record written."""
    code, _, err = run_case_text(tmp_path, capsys, text)
    assert code == 2, err
    assert field in err and str(tmp_path / "case.toml") in err
    assert not (tmp_path / "out").exists()


def forged_copy(path, edit, folder):
    """A copy of the record at ``path`` in ``folder/forged`` with ``edit`` applied and both digests recomputed,
    as a forger would make it."""
    record = json.loads(path.read_text(encoding="utf-8"))
    edit(record)
    record["content_digest"] = compute_content_digest(record)
    record["digest"] = compute_digest(record)
    forged = folder / "forged" / path.name
    forged.parent.mkdir(exist_ok=True)
    forged.write_text(json.dumps(record, indent=2), encoding="utf-8")
    return forged
