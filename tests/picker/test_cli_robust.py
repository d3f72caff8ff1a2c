"""The command line under hostile conditions (docs/cli.md): internal errors exit 70 with one
line, a closed pipe is quiet, a terminal that cannot encode the output gets plain text,
negative values reach their option, ``--stock`` after every subcommand, and the design
options read by the shared rules of ``picker.targets``.

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
from tests.helpers import run_cli as run
from tests.helpers import write_stock

SMALL = """\
[[resistor]]
value = "10k"
qty = 4
tolerance = "1%"
location = "A1"

[[resistor]]
value = "22k"
qty = 3
tolerance = "1%"
location = "A3"

[[capacitor]]
value = "10n"
qty = 4
tolerance = "5%"
dielectric = "C0G"
location = "C1"

[[opamp]]
name = "dual general purpose"
gbw = "3MHz"
channels = 2
qty = 2
location = "IC tray"
"""


@pytest.fixture
def small(tmp_path):
    return write_stock(tmp_path, SMALL)


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
    stock.write_text(SMALL + '\n[[resistor]]\nvalue = "1k"\nqty = 2\nnote = "Ω µ ±"\n')
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


# ------------------------------------------------------------------ argument parsing


def test_negative_values_reach_their_option(capsys, small):
    code, _, err = run(capsys, "design", "lowpass", "--fc", "-1k", "--stock", str(small))
    assert code == 2
    assert "--fc '-1k': must be above 0" in err
    assert "expected one argument" not in err


def test_negative_temperature_span_is_read(capsys, small):
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--order",
        "1",
        "--temp",
        "-20..85",
        "--trials",
        "100",
        "--stock",
        str(small),
        "--json",
    )
    assert code == 0, err
    import json

    temp = json.loads(out)["candidates"][0]["stages"][0]["budget"]["temperature"]
    assert temp  # computed over the span given


def test_rkm_frequency_is_read(capsys, small):
    # 1k5 is 1.5 k in the RKM code of IEC 60062
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k5",
        "--order",
        "1",
        "--json",
        "--trials",
        "50",
        "--stock",
        str(small),
    )
    assert code == 0, err
    import json

    assert json.loads(out)["candidates"][0]["stages"][0]["targets"]["f0"] == 1500.0


@pytest.mark.parametrize(
    "argv",
    [
        ["stock", "check"],
        ["stock", "list"],
        ["stock", "list", "--json"],
    ],
)
def test_stock_after_every_subcommand(capsys, small, argv):
    code, out, err = run(capsys, *argv, "--stock", str(small))
    assert code == 0, err
    assert "unrecognized arguments" not in err
    assert "bundled sample" not in err  # the file given was used


def test_every_command_parser_takes_stock():
    parser = cli.build_parser()
    leaves = list(cli._leaf_parsers(parser))
    assert len(leaves) >= 7
    for leaf in leaves:
        assert "--stock" in leaf._option_string_actions, leaf.prog


def test_stock_check_file_and_stock_option_must_agree(capsys, small, tmp_path):
    other = tmp_path / "other.toml"
    other.write_text(SMALL)
    code, _, err = run(capsys, "stock", "check", str(small), "--stock", str(other))
    assert code == 2 and "two stock files" in err


@pytest.mark.parametrize(
    "argv, quoted",
    [
        (["--window", "150%"], "at most 100 %"),
        (["--window", "0%"], "above 0 %"),
        (["--r-min", "-1k"], "--r-min '-1k': must be above 0"),
        (["--gain", "-2"], "--gain '-2': must be above 0"),
        (["--order", "9"], "--order '9': write a whole number from 1 to 8"),
        (["--order", "-1"], "--order '-1'"),
        (["--ripple", "-1", "--response", "chebyshev"], "--ripple '-1' dB"),
        (["--temp", "85..-20"], "--temp '85..-20': LO must be at most HI"),
        (["--temp", "-300..20"], "below absolute zero"),
        (["--supply", "-12"], "--supply '-12': must be above 0"),
        (["--r-min", "100k", "--r-max", "10k"], "--r-max 10k is below --r-min 100k"),
    ],
)
def test_bad_design_options_exit_2_quoting_the_value(capsys, small, argv, quoted):
    code, _, err = run(capsys, "design", "lowpass", "--fc", "1k", *argv, "--stock", str(small))
    assert code == 2, err
    assert quoted in err


def test_ripple_without_a_ripple_response_is_a_warning(capsys, small):
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--order",
        "1",
        "--ripple",
        "0.5",
        "--trials",
        "50",
        "--json",
        "--stock",
        str(small),
    )
    assert code == 0, err
    assert "warning: --ripple is not used: a butterworth response has no passband ripple" in err


def test_bandpass_report_is_titled_by_what_it_is(capsys, small, monkeypatch):
    monkeypatch.setenv("COLUMNS", "100")
    code, out, err = run(
        capsys,
        "design",
        "bandpass",
        "--fc",
        "1k",
        "--q",
        "2",
        "--trials",
        "50",
        "--stock",
        str(small),
    )
    assert code == 0, err
    first = out.splitlines()[0]
    assert first == "band-pass, centre 1 kHz, Q 2, gain 1, 1 stage"
    assert "butterworth" not in out


def test_bandpass_title_does_not_name_a_response():
    from picker.commands.design_cmd import title_of

    req = {"type": "bandpass", "fc_hz": 1e3, "q": 5.0, "gain": 1.0, "response": "butterworth"}
    assert title_of(req, 1) == "band-pass, centre 1 kHz, Q 5, gain 1, 1 stage"
    req = {"type": "lowpass", "fc_hz": 2e3, "q": None, "gain": 2.0}
    req |= {"response": "chebyshev", "ripple_db": 0.5}
    assert title_of(req, 2) == "low-pass chebyshev 0.5 dB ripple, fc 2 kHz, gain 2, 2 stages"


def test_response_with_a_bandpass_is_a_warning(capsys, small):
    code, _, err = run(
        capsys,
        "design",
        "bandpass",
        "--fc",
        "1k",
        "--q",
        "2",
        "--response",
        "bessel",
        "--trials",
        "50",
        "--json",
        "--stock",
        str(small),
    )
    assert "warning: --response bessel is not used for a band-pass" in err


def test_an_error_carries_its_own_exit_code(capsys, small, monkeypatch):
    from stock.errors import PartlyDoneError

    def partly(args):
        raise PartlyDoneError("the parts were taken; the record could not be written")

    monkeypatch.setattr("picker.commands.stock_cmd.run_check", partly)
    code, _, err = run(capsys, "stock", "check", str(small))
    assert code == 3 and "the parts were taken" in err  # docs/cli.md, docs/reliability.md
