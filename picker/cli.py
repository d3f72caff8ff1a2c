"""Command-line entry: ``picker [--stock FILE]`` starts the terminal UI; subcommands script it.

Each subcommand lives in ``picker/commands/<name>.py`` with ``register(subparsers)`` and
``run(args) -> int``. Those modules import nothing heavy at module level: numpy, scipy,
rich and textual are imported inside ``run`` so that ``picker stock ...`` starts fast.

Exit codes (DESIGN.md section 6): 0 done; 1 no design is possible from this stock;
2 bad input. No traceback reaches a user.
"""

from __future__ import annotations

import argparse
import importlib
import sys

from stock.errors import PickerError

# subcommand -> module; order is the order of the help text
COMMAND_MODULES = (
    "picker.commands.stock_cmd",
    "picker.commands.design_cmd",
    "picker.commands.outputs_cmd",
    "picker.commands.repair_cmd",
)


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
Exit codes: 0 done, 1 no design is possible from this stock, 2 bad input."""


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
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
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name in COMMAND_MODULES:
        try:
            module = importlib.import_module(name)
        except ModuleNotFoundError as exc:
            if exc.name != name:
                raise
            continue  # a command not built yet
        module.register(sub)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
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
        return int(args.run(args) or 0)
    except KeyboardInterrupt:
        print("picker: interrupted", file=sys.stderr)
        return 130
    except PickerError as exc:
        from picker.errors import NoDesignError

        for line in str(exc).splitlines() or [type(exc).__name__]:
            print(f"picker: {line}", file=sys.stderr)
        return 1 if isinstance(exc, NoDesignError) else 2
    except BrokenPipeError:
        return 0


if __name__ == "__main__":
    raise SystemExit(main())
