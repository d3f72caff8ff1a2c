"""Command-line entry: ``picker [--stock FILE]`` starts the terminal UI; subcommands script it.

Each subcommand lives in ``picker/commands/<name>.py`` with ``register(subparsers)`` and
``run(args) -> int``. Those modules import nothing heavy at module level: numpy, scipy,
rich and textual are imported inside ``run`` so that ``picker stock ...`` starts fast.

Exit codes, output streams and value syntax: docs/cli.md. In short: 0 done; 1 no design
is possible from this stock; 2 bad input; 3 the stock file was written, then the command
failed (docs/reliability.md); 70 internal error (one line, the traceback
only with ``PICKER_DEBUG=1``); 141 output cut short by a closed pipe. No traceback
reaches a user otherwise, and a crash never reads as "no design".
"""

from __future__ import annotations

import argparse
import contextlib
import importlib
import os
import re
import sys
import warnings

from stock.errors import PickerError

# subcommand -> module; order is the order of the help text
COMMAND_MODULES = (
    "picker.commands.stock_cmd",
    "picker.commands.design_cmd",
    "picker.commands.outputs_cmd",
    "picker.commands.build_cmd",
    "picker.commands.plot_cmd",
    "picker.commands.repair_cmd",
)

EX_SOFTWARE = 70  # sysexits.h: an internal software error
EX_PIPE = 141  # 128 + SIGPIPE, what a shell reports for a reader that went away
DEBUG_VAR = "PICKER_DEBUG"

EXAMPLES = """\
examples:
  picker stock check inventory.toml            is my stock file valid?
  picker stock list --kind capacitor           what is in the drawers
  picker design lowpass --fc 1k --order 2 --save d.toml
  picker bom d.toml                            parts, and which drawer to open
  picker netlist d.toml > d.cir && ngspice -b d.cir
  picker build d.toml --stock inventory.toml   take the parts (asks first)
  picker undo --stock inventory.toml           put the stock back as it was
  picker analyse sallen-key-lowpass R1=10k R2=10k C1=22n C2=10n
  picker substitute sallen-key-lowpass R1=10k R2=10k C1=22n C2=10n --part C1
  picker --stock inventory.toml                the terminal UI

Each command has its own help: picker design --help, picker stock adjust --help.
Exit codes: 0 done, 1 no design is possible from this stock, 2 bad input,
3 parts taken but not recorded (the message says how to undo),
70 internal error (PICKER_DEBUG=1 shows the details)."""


class Parser(argparse.ArgumentParser):
    """argparse, except that a value beginning with a minus sign and a digit or a point
    (``--temp -20..85``, ``--fc -1k``, ``--by -2``) is read as the option's value, not
    as an unknown option; picker has no option spelt like a number."""

    def __init__(self, *args, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        # argparse's own pattern takes only plain negative numbers (-2, -0.5)
        self._negative_number_matcher = re.compile(r"^-\.?[0-9]")
        self.register("action", None, _Store)
        self.register("action", "store", _Store)


GIVEN = "_stock_given_"  # namespace keys: every --stock value, per option (see stock_given)


class _Store(argparse._StoreAction):
    """argparse's store, except that each ``--stock`` value is also kept, so that a stock
    file named twice (``picker --stock a.toml design ... --stock b.toml``) is seen: the
    last one would win without a word otherwise."""

    def __call__(self, parser, namespace, values, option_string=None) -> None:
        super().__call__(parser, namespace, values, option_string)
        if self.dest == "stock":
            key = f"{GIVEN}{id(self)}"  # one key per option: a subcommand's namespace
            seen = getattr(namespace, key, [])  # is copied over its parent's key by key
            setattr(namespace, key, [*seen, values])


def stock_given(args: argparse.Namespace) -> list[str]:
    """Every --stock value on the command line, in order; the record keys are removed."""
    given: list[str] = []
    for key in [k for k in vars(args) if k.startswith(GIVEN)]:
        given += getattr(args, key)
        delattr(args, key)
    return given


def _same_file(a: str, b: str) -> bool:
    """Whether two --stock values name one file. By path first (no file access): a
    stat of each would race with another process replacing the file atomically
    (``stock adjust`` does), the same path then seeming two files; hard links and
    other spellings, by device and inode."""
    import os

    if a == b or os.path.realpath(a) == os.path.realpath(b):
        return True
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def _subparser_actions(parser: argparse.ArgumentParser):
    return [a for a in parser._actions if isinstance(a, argparse._SubParsersAction)]


def _leaf_parsers(parser: argparse.ArgumentParser):
    """Every parser that runs a command (the subcommands' parsers, nested ones included)."""
    subs = _subparser_actions(parser)
    if not subs:
        yield parser
        return
    for action in subs:
        for child in dict.fromkeys(action.choices.values()):
            yield from _leaf_parsers(child)


def _add_stock_everywhere(parser: argparse.ArgumentParser) -> None:
    """``--stock FILE`` after every subcommand (``picker stock check --stock F``)."""
    for leaf in _leaf_parsers(parser):
        if "--stock" not in leaf._option_string_actions:
            leaf.add_argument(
                "--stock",
                metavar="FILE",
                default=argparse.SUPPRESS,
                help="stock file (as the top-level --stock)",
            )


def version() -> str:
    """The installed package's version (its metadata), else the source tree's."""
    from importlib.metadata import PackageNotFoundError
    from importlib.metadata import version as installed

    try:
        return installed("picker")
    except PackageNotFoundError:
        import picker

        return str(getattr(picker, "__version__", "unknown"))


class _VersionAction(argparse.Action):
    """``--version``: the version is looked up only when asked (no cost at start-up)."""

    def __init__(self, option_strings, dest=argparse.SUPPRESS, **kwargs) -> None:
        super().__init__(option_strings, dest, nargs=0, default=argparse.SUPPRESS, **kwargs)

    def __call__(self, parser, namespace, values, option_string=None) -> None:
        print(f"picker {version()}")
        parser.exit(0)


def build_parser() -> argparse.ArgumentParser:
    parser = Parser(
        prog="picker",
        description="Design active analog filters from the parts in your own drawers. "
        "Without a COMMAND, picker opens its terminal UI on the stock file.",
        epilog=EXAMPLES,
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    parser.add_argument(
        "--stock",
        metavar="FILE",
        help="stock file (default: $PICKER_STOCK, ./inventory.toml, else the bundled sample)",
    )
    parser.add_argument(
        "--mouse", action="store_true", help="let the terminal UI take the mouse (off by default)"
    )
    parser.add_argument("--version", action=_VersionAction, help="print picker's version and exit")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name in COMMAND_MODULES:
        try:
            module = importlib.import_module(name)
        except ModuleNotFoundError as exc:
            if exc.name != name:
                raise
            continue  # a command not built yet
        module.register(sub)
    _add_stock_everywhere(parser)
    return parser


# characters picker prints that an ASCII-only terminal cannot show, and what to show instead
PLAIN = {
    "\u03a9": "ohm",  # Greek capital omega
    "\u2126": "ohm",  # ohm sign
    "\u00b5": "u",  # micro sign
    "\u03bc": "u",  # Greek small mu
    "\u00b1": "+/-",
    "\u00b0": "deg",
    "\u00d7": "x",
    "\u2026": "...",
    "\u2013": "-",
    "\u2014": "-",
    "\u2019": "'",
}


def _plain(err: UnicodeError):
    """codecs error handler: a character the terminal cannot encode becomes plain text."""
    if not isinstance(err, UnicodeEncodeError):
        raise err
    out = []
    for ch in err.object[err.start : err.end]:
        if ch in PLAIN:
            out.append(PLAIN[ch])
        elif "\u2500" <= ch <= "\u257f":  # box drawing: rules and corners
            out.append("|" if ch in "│┃║┆┇┊┋" else "-" if ch in "─━═┄┅┈┉" else "+")
        elif "\u2580" <= ch <= "\u259f":  # block elements of the histogram bars
            out.append("#")
        else:
            out.append(f"\\u{ord(ch):04x}" if ord(ch) < 0x10000 else f"\\U{ord(ch):08x}")
    return "".join(out), err.end


def plain_text_streams() -> None:
    """Let stdout and stderr fall back to plain text where their encoding lacks a character
    (PYTHONIOENCODING=ascii, a Latin-1 terminal), instead of failing mid-report."""
    import codecs

    try:
        codecs.lookup_error("picker-plain")
    except LookupError:
        codecs.register_error("picker-plain", _plain)
    for stream in (sys.stdout, sys.stderr):
        encoding = (getattr(stream, "encoding", None) or "").lower().replace("_", "-")
        if encoding in ("utf-8", "utf8", "utf-16", "utf-32"):
            continue
        # not every stream can change (a test's StringIO): then it stays as it is
        with contextlib.suppress(AttributeError, ValueError, OSError):
            stream.reconfigure(errors="picker-plain")  # type: ignore[union-attr]


def _quiet_stdout() -> None:
    """After a closed pipe: point stdout at /dev/null so the exit flush says nothing."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        os.close(devnull)
    except (OSError, ValueError, AttributeError):
        pass


def _rich_broken_pipe(exc: SystemExit) -> bool:
    """rich's Console meets a closed pipe by pointing stdout at /dev/null and raising
    SystemExit(1) from ``Console.on_broken_pipe``; 1 would read as "no design"."""
    tb = exc.__traceback__
    while tb is not None and tb.tb_next is not None:
        tb = tb.tb_next
    return tb is not None and tb.tb_frame.f_code.co_name == "on_broken_pipe"


def _shown(line: str) -> str:
    """A message line with any control character escaped (it may quote owner text)."""
    if line.isprintable():
        return line
    from picker.report.owner import visible

    return visible(line)


def _debug() -> bool:
    return os.environ.get(DEBUG_VAR, "").strip() not in ("", "0")


def _internal_error(exc: BaseException) -> int:
    if _debug():
        import traceback

        traceback.print_exception(exc, file=sys.stderr)
    what = _shown(" ".join(str(exc).split())[:200]) or "no message"
    print(
        f"picker: internal error: {type(exc).__name__}: {what}; "
        f"run again with {DEBUG_VAR}=1 for details",
        file=sys.stderr,
    )
    return EX_SOFTWARE


def main(argv: list[str] | None = None) -> int:
    plain_text_streams()
    try:
        with warnings.catch_warnings():
            if not _debug():
                # numpy's notes on an overflow inside a far-off corner say nothing to a user
                warnings.simplefilter("ignore", RuntimeWarning)
            return _main(argv)
    except SystemExit as exc:
        if _rich_broken_pipe(exc):
            return EX_PIPE
        raise  # argparse's own exit: 0 after --help, 2 for a bad option
    except KeyboardInterrupt:
        print("picker: interrupted", file=sys.stderr)
        return 130
    except BrokenPipeError:
        _quiet_stdout()
        return EX_PIPE
    except MemoryError:  # a memory limit below what this request needs (docs/search.md)
        print(
            "picker: this request needs more memory than the process may use; narrow the "
            "value bounds (--r-min/--r-max/--c-min/--c-max), use --singles, or use a "
            "smaller stock",
            file=sys.stderr,
        )
        return 1
    except PickerError as exc:
        from picker.errors import NoDesignError

        for line in str(exc).splitlines() or [type(exc).__name__]:
            print(f"picker: {_shown(line)}", file=sys.stderr)
        if isinstance(exc, NoDesignError):
            return 1
        return int(getattr(exc, "exit_code", 2))  # 3: parts taken, the record failed
    except Exception as exc:  # anything else is our bug: one line, never exit 1
        return _internal_error(exc)


def _main(argv: list[str] | None) -> int:
    parser = build_parser()
    for text in sys.argv[1:] if argv is None else argv:
        if "\x00" in str(text):  # no shell can pass one; a path with one cannot be opened
            print(
                f"picker: argument {_shown(str(text))!r} contains a NUL character", file=sys.stderr
            )
            return 2
    args = parser.parse_args(argv)
    given = stock_given(args)
    other = next((g for g in given if not _same_file(g, given[0])), None)
    if other is not None:
        print(
            f"picker: --stock names two files, {_shown(given[0])!r} and {_shown(other)!r}: "
            "give it once (the command would use one and ignore the other)",
            file=sys.stderr,
        )
        return 2
    if args.command is None:
        if not (sys.stdin.isatty() and sys.stdout.isatty()):
            print(
                "picker: the terminal UI needs a terminal (standard input and output "
                "are not one here); for scripts use a command, see picker --help",
                file=sys.stderr,
            )
            return 2
        from picker.commands.ui_cmd import run as run_ui

        return run_ui(args)
    code = int(args.run(args) or 0)
    sys.stdout.flush()  # a closed pipe shows here, inside the handlers above
    return code


if __name__ == "__main__":
    raise SystemExit(main())
