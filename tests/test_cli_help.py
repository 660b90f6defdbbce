"""What the command line tells its user: each sub-command's help (what it does, an example, its exit
codes), and that `run --notebook --pdf` prints no kernel warnings among its own lines."""

import argparse
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from steamcalc.cli import _parser, main
from steamcalc.records.companions import find_chromium

ROOT = Path(__file__).resolve().parent.parent


def _sub_commands(parser=None, prefix=()):
    """Every sub-command of the parser, nested ones too (``keys new``), as argument lists."""
    parser = parser or _parser()
    found = []
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction):
            for name, sub in action.choices.items():
                found.append(prefix + (name,))
                found.extend(_sub_commands(sub, prefix + (name,)))
    return found


COMMANDS = _sub_commands()


def _help(capsys, *command):
    with pytest.raises(SystemExit) as exit_:
        main([*command, "--help"])
    assert exit_.value.code == 0
    return capsys.readouterr().out


def test_the_documented_commands_are_all_there():
    assert {c[0] for c in COMMANDS} >= {"run", "verify", "diff", "sign", "keys", "register", "new-site"}
    assert ("keys", "new") in COMMANDS


@pytest.mark.parametrize("command", COMMANDS, ids=" ".join)
def test_each_command_help_has_a_description_an_example_and_exit_codes(command, capsys):
    text = _help(capsys, *command)
    usage, _, rest = text.partition("\n\n")
    assert usage.startswith(f"usage: steamcalc {' '.join(command)}")
    # A description paragraph of its own before the arguments, in sentences.
    description = rest.partition("\n\n")[0]
    assert not description.startswith(("positional arguments", "options")) and description.rstrip().endswith("."), \
        description
    assert "Example" in text and f"  steamcalc {' '.join(command)}" in text.partition("Example")[2]
    codes = text.partition("Exit codes:")[2]
    assert "  0  " in codes and "  2  bad input or usage" in codes, codes


def test_top_level_help_lists_the_commands_and_the_exit_codes(capsys):
    text = _help(capsys)
    for command in ("run", "verify", "diff", "sign", "keys", "register", "new-site"):
        assert f"    {command} " in text
    assert "Example" in text and "0 all good; 1 a record failed" in text


def test_run_help_says_what_once_means_in_the_index(capsys):
    text = " ".join(_help(capsys, "run").split())
    assert "The index lists each record once" in text and "the same digest" in text
    assert "pointing at its own JSON" in text


def test_the_exit_codes_in_the_help_are_the_ones_returned(tmp_path, capsys):
    # diff: 0 whatever the difference, 2 for a file that is not a record.
    (tmp_path / "not-a-record.json").write_text("{}")
    assert main(["diff", str(tmp_path / "not-a-record.json"), str(tmp_path / "not-a-record.json")]) == 2
    # new-site into an existing folder: 2, as its help says.
    assert main(["new-site", str(tmp_path)]) == 2
    assert "2  bad input or usage" in _help(capsys, "new-site").partition("Exit codes:")[2]


@pytest.fixture
def demo_copy(tmp_path, demo_site_dir):
    site = tmp_path / "demo_site"
    shutil.copytree(demo_site_dir, site, ignore=shutil.ignore_patterns("records"))
    for notebook in demo_site_dir.parent.glob("*.ipynb"):
        shutil.copy(notebook, tmp_path / notebook.name)
    return site


def _run_cli(*args):
    """The console command in a fresh process: everything it and its children print, stdout and stderr."""
    env = {**os.environ, "PYTHONPATH": str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
    done = subprocess.run([sys.executable, "-m", "steamcalc", *map(str, args)], capture_output=True, text=True,
                          env=env, timeout=600)
    return done.returncode, done.stdout, done.stderr


def test_run_notebook_prints_no_kernel_warnings(demo_copy):
    code, out, err = _run_cli("run", demo_copy / "cases" / "LD-02.toml", "--notebook")
    assert code == 0, err
    assert (demo_copy / "records" / "LD-02_revB.ipynb").exists()
    lines = (out + err).splitlines()
    assert not [line for line in lines if "kernel" in line.lower()], err
    assert not err.strip(), err   # nothing at all on stderr: no warnings of any library
    # The kernel's private socket folder is gone after the run.
    assert not any(Path(os.environ.get("TMPDIR", "/tmp")).glob("steamcalc-kernel-*/kernel.json"))


@pytest.mark.skipif(find_chromium() is None, reason="no Chromium: apt-get install chromium to test --pdf")
def test_run_pdf_and_notebook_prints_no_kernel_warnings(demo_copy):
    code, out, err = _run_cli("run", demo_copy / "cases" / "FL-01.toml", "--pdf", "--notebook")
    assert code == 0, err
    assert (demo_copy / "records" / "FL-01_revB.pdf").read_bytes().startswith(b"%PDF")
    assert not [line for line in (out + err).splitlines() if "kernel" in line.lower()], err
    assert not err.strip(), err
