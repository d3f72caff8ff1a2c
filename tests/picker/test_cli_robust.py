"""The command line under hostile conditions (docs/cli.md): internal errors exit 70 with one
line, a closed pipe is quiet, a terminal that cannot encode the output gets plain text,
and an error's own exit code reaches the shell. The options: test_cli_options.py.

Exit codes 0/1/2 are the project's own; 70 is EX_SOFTWARE of sysexits.h (from memory:
BSD sysexits, "internal software error"); 141 is 128 + SIGPIPE (13), what a POSIX shell
reports for a process a closed pipe ended (common practice).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from picker import cli
from picker.cli import main
from tests.helpers import SMALL_STOCK
from tests.helpers import run_cli as run


def _env(**extra):
    env = {k: v for k, v in os.environ.items() if k not in ("COLUMNS", "LINES", "PICKER_DEBUG")}
    env.update(extra)
    return env


# ------------------------------------------------------------------ internal errors -> 70


def _boom(args):
    raise ZeroDivisionError("a bug in a command")


def test_an_unexpected_exception_is_one_line_and_exit_70(capsys, small, monkeypatch):
    monkeypatch.delenv("PICKER_DEBUG", raising=False)
    monkeypatch.setattr("picker.commands.stock_cmd.run_check", _boom)
    code, out, err = run(capsys, "stock", "check", str(small))
    assert code == 70  # sysexits EX_SOFTWARE, never 1 ("no design")
    assert err.count("\n") == 1
    assert err.startswith("picker: internal error: ZeroDivisionError: a bug in a command;")
    assert "PICKER_DEBUG=1" in err and "Traceback" not in err


def test_picker_debug_shows_the_traceback(capsys, small, monkeypatch):
    monkeypatch.setenv("PICKER_DEBUG", "1")
    monkeypatch.setattr("picker.commands.stock_cmd.run_check", _boom)
    code, _, err = run(capsys, "stock", "check", str(small))
    assert code == 70
    assert "Traceback (most recent call last)" in err and "_boom" in err
    assert err.rstrip().splitlines()[-1].startswith("picker: internal error: ZeroDivisionError")


def test_internal_error_in_a_real_process_exits_70(tmp_path):
    code = (
        "import sys; import picker.commands.stock_cmd as m\n"
        "def boom(args): raise KeyError('x')\n"
        "m.run_check = boom\n"
        "from picker.cli import main; sys.exit(main(['stock', 'check']))\n"
    )
    r = subprocess.run(
        [sys.executable, "-c", code],
        capture_output=True,
        text=True,
        cwd=tmp_path,
        env=_env(),
        timeout=60,
    )
    assert r.returncode == 70 and "Traceback" not in r.stderr
    assert "internal error: KeyError" in r.stderr


# ------------------------------------------------------------------ closed pipe


def _big_stock(path: Path, lines: int = 1500) -> None:
    rows = []
    for i in range(lines):
        rows.append(f'[[resistor]]\nvalue = "{1000 + i}"\nqty = 1\nlocation = "bin {i}"\n')
    path.write_text("\n".join(rows), encoding="utf-8")


def test_closed_pipe_exits_quietly_with_141(tmp_path):
    stock = tmp_path / "big.toml"
    _big_stock(stock)  # some 100 kB of table: more than a pipe holds
    with subprocess.Popen(
        [sys.executable, "-m", "picker", "stock", "list", str(stock)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        env=_env(),
        cwd=tmp_path,
    ) as proc:
        assert proc.stdout is not None and proc.stderr is not None
        first = proc.stdout.readline()  # what `| head -1` reads, then it goes away
        proc.stdout.close()
        err = proc.stderr.read().decode()
        code = proc.wait(timeout=60)
    assert first
    assert code in (0, 141), err  # never 1 ("no design")
    assert "Traceback" not in err and "Exception ignored" not in err and err == ""


class _ClosedPipe:
    """A stdout whose reader went away: every write fails as on a closed pipe."""

    encoding = "utf-8"

    def __init__(self, fd: int):
        self.fd = fd

    def write(self, text):
        raise BrokenPipeError(32, "Broken pipe")

    def flush(self):
        raise BrokenPipeError(32, "Broken pipe")

    def isatty(self):
        return False

    def fileno(self):
        return self.fd


@pytest.mark.parametrize(
    "argv",
    [
        ["stock", "list"],
        ["stock", "check"],
        ["stock", "list", "--json"],
        ["design", "lowpass", "--fc", "1k", "--order", "1", "--json", "--trials", "50"],
    ],
)
def test_closed_pipe_in_process_is_never_exit_1(argv, small, monkeypatch, capsys):
    fd = os.open(os.devnull, os.O_WRONLY)  # where rich points stdout after a closed pipe
    monkeypatch.setattr(sys, "stdout", _ClosedPipe(fd))
    try:
        code = main([*argv, "--stock", str(small)])
    finally:
        os.close(fd)
    err = capsys.readouterr().err
    assert code in (0, 141) and "Traceback" not in err


# ------------------------------------------------------------------ terminal encodings


@pytest.mark.parametrize(
    "env",
    [{"PYTHONIOENCODING": "ascii"}, {"LANG": "C", "LC_ALL": "C"}, {"PYTHONIOENCODING": "latin-1"}],
)
def test_a_terminal_that_cannot_encode_gets_plain_text(tmp_path, env):
    stock = tmp_path / "inventory.toml"
    stock.write_text(SMALL_STOCK + '\n[[resistor]]\nvalue = "1k"\nqty = 2\nnote = "Ω µ ±"\n')
    r = subprocess.run(
        [sys.executable, "-m", "picker", "stock", "list", "--stock", str(stock)],
        capture_output=True,
        env=_env(**env),
        cwd=tmp_path,
        timeout=60,
    )
    assert r.returncode == 0, r.stderr
    assert b"Traceback" not in r.stderr
    if env.get("PYTHONIOENCODING") == "ascii":
        assert max(r.stdout) < 128  # plain ASCII
        assert b"ohm u +/-" in r.stdout  # the note, spelt in plain letters


def test_design_report_in_ascii(small, tmp_path):
    r = subprocess.run(
        [sys.executable, "-m", "picker", "design", "lowpass", "--fc", "1k", "--order", "1"]
        + ["--trials", "200", "--stock", str(small)],
        capture_output=True,
        env=_env(PYTHONIOENCODING="ascii"),
        cwd=tmp_path,
        timeout=120,
    )
    assert r.returncode == 0, r.stderr
    assert b"Traceback" not in r.stderr and max(r.stdout) < 128


def test_plain_handler_spells_units_and_escapes_the_rest():
    text = "10 kΩ ± 1 %, 4.7 µF │ █ \u2603"
    assert cli.plain_text_streams() is None
    import codecs

    codecs.lookup_error("picker-plain")
    assert text.encode("ascii", "picker-plain") == b"10 kohm +/- 1 %, 4.7 uF | # \\u2603"


def test_an_error_carries_its_own_exit_code(capsys, small, monkeypatch):
    from stock.errors import PartlyDoneError

    def partly(args):
        raise PartlyDoneError("the parts were taken; the record could not be written")

    monkeypatch.setattr("picker.commands.stock_cmd.run_check", partly)
    code, _, err = run(capsys, "stock", "check", str(small))
    assert code == 3 and "the parts were taken" in err  # docs/cli.md, docs/reliability.md
