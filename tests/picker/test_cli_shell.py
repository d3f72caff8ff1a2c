"""The top-level command line (docs/cli.md): help with examples, and the terminal
UI refused with exit 2 (bad input) instead of hanging when there is no terminal."""

import subprocess
import sys
from pathlib import Path

import pytest

from picker.cli import build_parser, main

ROOT = Path(__file__).resolve().parents[2]


def test_no_terminal_no_ui(capsys):
    # pytest's captured stdin/stdout are not terminals, as under a script or CI
    assert main([]) == 2
    err = capsys.readouterr().err
    assert "needs a terminal" in err and "picker --help" in err


def test_no_terminal_no_ui_subprocess(tmp_path):
    r = subprocess.run(
        [sys.executable, "-m", "picker"],
        stdin=subprocess.DEVNULL,
        capture_output=True,
        text=True,
        cwd=tmp_path,
        timeout=60,
    )
    assert r.returncode == 2 and "needs a terminal" in r.stderr
    assert "Traceback" not in r.stderr


def test_help_names_every_command_and_gives_examples():
    text = build_parser().format_help()
    for cmd in ("stock", "design", "bom", "netlist", "build", "undo"):
        assert f"\n    {cmd} " in text
    assert "examples:" in text and "picker design lowpass --fc 1k" in text
    # the exit codes of docs/cli.md
    assert "0 done, 1 no design is possible from this stock, 2 bad input" in text


@pytest.mark.parametrize(
    "argv",
    [
        ["stock", "check", "--help"],
        ["stock", "adjust", "--help"],
        ["stock", "list", "--help"],
        ["bom", "--help"],
        ["netlist", "--help"],
        ["build", "--help"],
        ["undo", "--help"],
    ],
)
def test_subcommand_help_has_examples(argv, capsys):
    with pytest.raises(SystemExit) as info:
        main(argv)
    assert info.value.code == 0
    assert "example" in capsys.readouterr().out
