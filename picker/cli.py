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
)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="picker",
        description="Design active analog filters from the parts in your own drawers.",
    )
    parser.add_argument("--stock", metavar="FILE",
                        help="stock file (default: $PICKER_STOCK, ./inventory.toml, "
                             "else the bundled sample)")
    parser.add_argument("--mouse", action="store_true",
                        help="let the terminal UI take the mouse (off by default)")
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
