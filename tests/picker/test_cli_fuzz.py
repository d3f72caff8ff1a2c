"""Fuzz of the command line (hypothesis): argv lists built from the real option names of
every subcommand, with odd values, run in-process through ``picker.cli.main`` with the
output captured. Whatever the options, the exit is one of the project's own (0 done,
1 no design from this stock, 2 bad input; docs/cli.md) and no traceback is printed.

An exit 70 here is an internal error the fuzz found: a bug to fix, not an accepted
outcome. Example counts are modest (each design example runs a real search on a tiny
stock); the seed is fixed through hypothesis' database-free derandomised mode so that a
run in CI is repeatable.
"""

from __future__ import annotations

import argparse
import shutil

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from picker import cli

STOCK = """\
[stock]
name = "fuzz bench"

[[resistor]]
value = "10k"
qty = 6
tolerance = "1%"
location = "A1"

[[resistor]]
value = "22k"
qty = 4
tolerance = "1%"
location = "[b]A2"

[[resistor]]
value = "4k7"
qty = 4
location = "A3"

[[capacitor]]
value = "10n"
qty = 6
tolerance = "5%"
dielectric = "C0G"
location = "C1"

[[capacitor]]
value = "22n"
qty = 4
dielectric = "X7R"
location = "C2"

[[opamp]]
name = "dual amp"
gbw = "3MHz"
channels = 2
qty = 2
location = "IC tray"
"""

# odd values: signs, empties, huge and tiny numbers, markup, control characters, RKM,
# ranges, percentages, words, a long text
ODD = [
    "",
    " ",
    "-",
    "--",
    "-1",
    "-1k",
    "0",
    "0.0",
    "1e400",
    "-1e400",
    "1e-300",
    "1e300",
    "1e30",
    "-0",
    "nan",
    "inf",
    "-inf",
    "99999999999999999999999",
    "0x10",
    "1,5",
    "½",
    "1k5",
    "4k7",
    "2n2",
    "1M",
    "100%",
    "150%",
    "-5%",
    "0..70",
    "-20..85",
    "85..-20",
    "..",
    "-300..0",
    "[bold]",
    "[/]",
    "\x1b[2J",
    "a\x00b",
    "x" * 300,
    "butterworth",
    "mfb",
    "5",
    "2",
    "1",
    "8",
    "9",
]
GOOD = {
    "--fc": ["1k", "1.5k", "500", "2k2", "10k"],
    "--order": ["1", "2", "3", "4"],
    "--gain": ["1", "2", "0.5", "10"],
    "--q": ["0.707", "2", "5"],
    "--ripple": ["0.5", "1", "3"],
    "--top": ["1", "2", "3"],
    "--trials": ["10", "100"],
    "--window": ["5%", "1%", "50%"],
    "--temp": ["0..70", "-20..85"],
    "--supply": ["12", "30V", "100"],
    "--vout-peak": ["1", "5V"],
    "--seed": ["0", "1", "7"],
    "--pick": ["1", "2"],
    "--by": ["-1", "1", "0", "-100"],
    "--kind": ["resistor", "capacitor", "opamp", "r"],
    "--value": ["10k", "22k", "10n", "dual amp"],
    "--location": ["A1", "C1", "[b]A2"],
    "--line": ["1", "5", "0"],
    "--r-min": ["1k", "100", "4k7"],
    "--r-max": ["1M", "100k", "22k"],
    "--c-min": ["100p", "1n"],
    "--c-max": ["10u", "22n"],
}


def _options(parser: argparse.ArgumentParser):
    """(option string, takes a value, choices) of every optional argument of ``parser``."""
    out = []
    for action in parser._actions:
        if not action.option_strings or isinstance(action, argparse._HelpAction):
            continue
        name = max(action.option_strings, key=len)
        takes = action.nargs != 0
        out.append((name, takes, tuple(action.choices or ())))
    return out


def _positionals(parser: argparse.ArgumentParser):
    return [a for a in parser._actions if not a.option_strings]


PARSER = cli.build_parser()


def _commands():
    """[(argv prefix, leaf parser)] for every subcommand, nested ones included."""
    found = []

    def walk(parser, prefix):
        subs = cli._subparser_actions(parser)
        if not subs:
            found.append((prefix, parser))
            return
        for action in subs:
            for name, child in action.choices.items():
                walk(child, [*prefix, name])

    walk(PARSER, [])
    return found


COMMANDS = _commands()
DESIGN = [c for c in COMMANDS if c[0] == ["design"]]
OTHERS = [c for c in COMMANDS if c[0] != ["design"]]


@pytest.fixture(scope="module")
def bench(tmp_path_factory):
    """A tiny stock, a design saved from it, and the folder they live in."""
    folder = tmp_path_factory.mktemp("fuzz")
    stock = folder / "inventory.toml"
    stock.write_text(STOCK, encoding="utf-8")
    design = folder / "d.toml"
    code = cli.main(
        ["design", "lowpass", "--fc", "1k", "--trials", "20", "--stock", str(stock)]
        + ["--save", str(design)]
    )
    assert code == 0
    (folder / "pristine.toml").write_text(STOCK, encoding="utf-8")
    return folder


def _value(draw, name: str, choices, bench, odd: bool) -> str:
    """An odd value, or a sensible one so that the run gets past the parsing."""
    files = [str(bench / "inventory.toml"), str(bench / "d.toml"), str(bench / "nothing.toml")]
    files += [str(bench), str(bench / "new.toml")]  # a folder, a file that is not there
    good = [str(c) for c in choices] + GOOD.get(name, [])
    if name in ("--stock", "--save"):
        good = files
    return draw(st.sampled_from(ODD if odd or not good else good))


@st.composite
def argv_for(draw, commands, bench):
    """A sensible command line with one or two odd values in it (or none)."""
    prefix, parser = draw(st.sampled_from(commands))
    slots = []  # (option or None for a positional, action)
    for action in _positionals(parser):
        if action.nargs in ("?", "*") and draw(st.booleans()):
            continue
        slots.append((None, action))
    if prefix == ["design"]:
        slots += [("--fc", None), ("--trials", None)]
    opts = {name: (takes, choices) for name, takes, choices in _options(parser)}
    chosen = draw(st.lists(st.sampled_from(sorted(opts)), max_size=5, unique=True))
    slots += [(name, None) for name in chosen if name not in ("--fc", "--trials")]
    if prefix == ["design"] and draw(st.booleans()):
        slots.append(("--q", None))  # a band-pass needs it
    n_odd = draw(st.integers(0, 2))
    odd = set(draw(st.lists(st.integers(0, len(slots) - 1), max_size=n_odd))) if slots else set()
    argv = list(prefix)
    for i, (name, action) in enumerate(slots):
        if name is None:
            if action.choices:
                good = [str(c) for c in action.choices]
            elif action.dest == "design":
                good = [str(bench / "d.toml"), str(bench / "inventory.toml")]
            else:
                good = [str(bench / "inventory.toml")]
            argv.append(draw(st.sampled_from(ODD if i in odd else good)))
            continue
        takes, choices = opts.get(name, (True, ()))
        if not takes:
            argv.append(name)
            continue
        value = _value(draw, name, choices, bench, i in odd)
        argv += [f"{name}={value}"] if draw(st.booleans()) else [name, value]
    if "--stock" not in argv and (prefix == ["design"] or draw(st.booleans())):
        # a design always names its stock: the bundled sample would make each search slow
        argv += ["--stock", str(bench / "inventory.toml")]
    return argv


OUTCOMES: dict[int, int] = {}


def _run(argv, capsys, bench) -> int:
    try:
        code = cli.main(argv)
    except SystemExit as exc:  # argparse: --help 0, a bad option 2
        code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 2)
    out, err = capsys.readouterr()
    OUTCOMES[code] = OUTCOMES.get(code, 0) + 1
    assert code in (0, 1, 2), (argv, code, err[-2000:])
    assert "Traceback" not in out + err, (argv, err[-2000:])
    # a build or an undo may have changed the stock: put it back for the next example
    shutil.copyfile(bench / "pristine.toml", bench / "inventory.toml")
    return code


SETTINGS = dict(
    deadline=None,
    derandomize=True,
    database=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
)


def test_fuzz_finds_every_command(bench):
    names = {" ".join(p) for p, _ in COMMANDS}
    assert {"design", "stock check", "stock list", "stock adjust", "bom", "netlist"} <= names
    assert {"build", "undo"} <= names


@settings(max_examples=100, **SETTINGS)
@given(data=st.data())
def test_fuzz_design_options(data, capsys, bench, monkeypatch):
    monkeypatch.chdir(bench)
    monkeypatch.delenv("PICKER_STOCK", raising=False)
    argv = data.draw(argv_for(DESIGN, bench))
    _run(argv, capsys, bench)


@settings(max_examples=250, **SETTINGS)
@given(data=st.data())
def test_fuzz_other_commands(data, capsys, bench, monkeypatch):
    monkeypatch.chdir(bench)
    monkeypatch.delenv("PICKER_STOCK", raising=False)
    argv = data.draw(argv_for(OTHERS, bench))
    _run(argv, capsys, bench)


@settings(max_examples=60, **SETTINGS)
@given(
    data=st.lists(st.sampled_from(["--stock", "--mouse", "-h", *ODD[:10]]), max_size=4),
)
def test_fuzz_top_level(data, capsys, bench, monkeypatch):
    monkeypatch.chdir(bench)
    _run(list(data), capsys, bench)
