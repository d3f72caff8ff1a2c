"""Subcommands that change the stock file from a saved design: ``build`` and ``undo``.

    picker build DESIGN.toml --stock FILE [--yes] [--again] [--json]
    picker undo --stock FILE [--yes] [--json]

Exit 3 from build or undo: the stock file was changed but the command could not finish
(docs/reliability.md); the message says what was done and how to undo it. The tables
and messages are the ones ``bom`` prints (``outputs_cmd``); JSON shapes
(``outputs_json``): docs/outputs.md.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from picker.commands.outputs_cmd import _console, _err, _say, pick_table


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "build",
        help="take a saved design's parts out of the stock file",
        description="Take exactly the design's pieces out of the stock "
        "file (undo with `picker undo`). Shows the pick "
        "list and asks first; without a terminal it needs "
        "--yes.",
        epilog="examples:\n  picker build d.toml --stock inventory.toml\n"
        "  picker build d.toml --stock inventory.toml --yes",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("design", metavar="DESIGN.toml", help="a design saved with picker design --save")
    p.add_argument(
        "--stock",
        metavar="FILE",
        default=argparse.SUPPRESS,
        help="stock file to take from (without it picker names the file the design was "
        "saved from and asks; with --yes it is needed)",
    )
    p.add_argument("--yes", action="store_true", help="do not ask for confirmation")
    p.add_argument(
        "--again",
        action="store_true",
        help="build the same design a second time onto the stock as its last build left it "
        "(otherwise read as a retry and refused, so parts are never taken twice)",
    )
    p.add_argument("--json", action="store_true", help="print one JSON object (needs --yes)")
    p.set_defaults(run=run_build)

    p = subparsers.add_parser(
        "undo",
        help="undo the last build on a stock file",
        description="Put the stock file back byte for byte as it was "
        "before its last build; run it again to undo the "
        "build before that.",
        epilog="example:\n  picker undo --stock inventory.toml",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument(
        "--stock",
        metavar="FILE",
        default=argparse.SUPPRESS,
        help="stock file (default: $PICKER_STOCK, else ./inventory.toml)",
    )
    p.add_argument("--yes", action="store_true", help="do not ask for confirmation")
    p.add_argument("--json", action="store_true", help="print one JSON object (needs --yes)")
    p.set_defaults(run=run_undo)


def _interactive() -> bool:
    return sys.stdin.isatty() and sys.stdout.isatty()


def _ask(question: str) -> bool:
    try:
        from picker.report.owner import visible

        answer = input(f"{visible(question)} [y/N] ")
    except EOFError:
        return False
    return answer.strip().lower() in ("y", "yes")


def _declined(args, console, question: str, without: str, nothing: str) -> int | None:
    """None when the command may go on (``--yes``, or a yes to ``question``); otherwise
    its exit code: 2 without a terminal to ask on (``without``: what --yes would do), 0
    after a no (``nothing`` says what was left as it was)."""
    if args.yes:
        return None
    if not _interactive():
        _err(f"not a terminal: pass --yes to {without}")
        return 2
    if not _ask(question):
        console.print(nothing)
        return 0
    return None


def _partly_done(exc) -> int:
    """A build or undo that changed the stock but could not finish: its lines, its code."""
    for line in str(exc).splitlines():
        _err(line)
    return exc.exit_code


def run_build(args) -> int:
    from picker.building import before_build, do_build, plan_build
    from picker.errors import DesignError
    from picker.export import load_design
    from stock.errors import PartlyDoneError
    from stock.file import load

    design = load_design(args.design)
    from picker.commands.outputs_json import json_needs_yes

    json_needs_yes(args, "build")
    stock_arg = getattr(args, "stock", None)
    if stock_arg is None:
        # the design file never chooses what gets written: name the file, and ask
        if design.stock_path is None:
            raise DesignError(f"{args.design}: the design names no stock file; pass --stock FILE")
        stock_path = design.stock_path
        _refuse_sample(stock_path, args.design)
        if args.yes or not _interactive():
            raise DesignError(
                f"{args.design} was saved from {stock_path}; name the stock file to take "
                f"from: picker build {args.design} --stock {stock_path}"
            )
        if not _ask(f"The design was saved from {stock_path}. Take the parts from that file?"):
            print("Nothing taken; no stock file was changed.")
            return 0
    else:
        stock_path = Path(stock_arg)
    _refuse_sample(stock_path)
    again = bool(getattr(args, "again", False))
    for line in before_build(stock_path, design.path, again=again):
        _err(f"note: {line}")
    stock = load(stock_path)
    plan = plan_build(design, stock)
    if args.json:
        from picker.commands.outputs_json import build_json, print_json

        try:
            result = do_build(stock_path, plan, again=again)
        except PartlyDoneError as exc:
            return _partly_done(exc)
        print_json(build_json(stock_path, plan, result))
        return 0
    console = _console()
    console.print(pick_table(plan.picks))
    for w in plan.warnings:
        _say(console, f"warning: {w}")
    for c in plan.cautions:
        _say(console, f"caution: {c}")
    question = f"Take these {plan.count} parts from {stock_path}?"
    no = _declined(args, console, question, "take the parts without asking",
                   "Nothing taken; the stock file is unchanged.")  # fmt: skip
    if no is not None:
        return no
    try:
        result = do_build(stock_path, plan, again=again)
    except PartlyDoneError as exc:
        return _partly_done(exc)
    _say(console, f"Took {plan.count} parts; {result.path} updated.")
    for line in plan.summary:
        _say(console, f"  {line}")
    _say(console, f"Undo with: picker undo --stock {stock_path}")
    return 0


def _refuse_sample(stock_path, design=None) -> None:
    """DesignError for the sample stock (``stock.edit.is_sample``: the bundled copy or the
    one at a source tree's root), which no command changes; ``design`` names the design
    file that was saved from it."""
    from picker.errors import DesignError
    from stock.edit import is_sample

    if is_sample(stock_path):
        saved = f"{design} was saved from " if design else ""
        raise DesignError(
            f"{saved}{stock_path}: it is the bundled sample, which picker does not change; "
            "copy it to ./inventory.toml (or your own file) and pass --stock with the copy"
        )


def run_undo(args) -> int:
    from picker.building import undo_last, undo_preview
    from picker.commands.common import resolve_stock_path
    from picker.commands.outputs_json import json_needs_yes
    from stock.errors import PartlyDoneError

    json_needs_yes(args, "undo")
    stock_path, note = resolve_stock_path(getattr(args, "stock", None))
    _refuse_sample(stock_path)
    if note:
        _err(f"note: {note}")
    preview = undo_preview(stock_path)
    for line in preview.notes:
        _err(f"note: {line}")
    record = preview.record
    if args.json:
        from picker.commands.outputs_json import print_json, undo_json

        try:
            undo_last(stock_path)
        except PartlyDoneError as exc:
            return _partly_done(exc)
        print_json(undo_json(stock_path, record, already_undone=preview.already_undone))
        return 0
    console = _console()
    if preview.already_undone:
        try:
            undo_last(stock_path)  # only records it: the file is as it was already
        except PartlyDoneError as exc:
            return _partly_done(exc)
        _say(
            console,
            f"Build {record.number} ({record.time}) was undone already: {stock_path} is as it "
            "was before it (an undo had been stopped before it could record that). "
            "Recorded it as undone; nothing else changed.",
        )
        return 0
    _say(
        console,
        f"Last build on {stock_path}: number {record.number}, {record.time}"
        + (f", design {record.design}" if record.design else ""),
    )
    for line in record.summary:
        _say(console, f"  {line}")
    question = f"Put {stock_path} back as it was before build {record.number}?"
    no = _declined(args, console, question, "undo without asking", "Nothing changed.")
    if no is not None:
        return no
    try:
        undo_last(stock_path)
    except PartlyDoneError as exc:
        return _partly_done(exc)
    _say(console, f"Restored {stock_path} as it was before build {record.number}.")
    return 0
