"""Subcommands on a saved design: ``bom``, ``netlist``, ``build``; and ``undo`` of a build.

    picker bom DESIGN.toml [--csv [--per-reference]] [--json]
                                                parts list and pick list by drawer
    picker netlist DESIGN.toml                  SPICE text for ngspice
    picker build DESIGN.toml --stock FILE [--yes] [--again] [--json]
    picker undo --stock FILE [--yes] [--json]

Exit 3 from build or undo: the stock file was changed but the command could not finish
(docs/reliability.md); the message says what was done and how to undo it.

Heavy imports (rich, the export package) happen inside ``run`` functions; ``bom --csv``
and ``netlist`` import neither numpy nor rich. JSON shapes (``outputs_json``):
docs/outputs.md.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "bom",
        help="bill of materials and pick list of a saved design",
        description="Bill of materials of a saved design, then the parts to take drawer by drawer.",
        epilog="examples:\n  picker bom d.toml\n  picker bom d.toml --csv > parts.csv\n"
        "  picker bom d.toml --csv --per-reference > board.csv\n  picker bom d.toml --json",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("design", metavar="DESIGN.toml", help="a design saved with picker design --save")
    p.add_argument("--csv", action="store_true", help="print the BOM as CSV (RFC 4180)")
    p.add_argument(
        "--per-reference",
        action="store_true",
        help="with --csv: one row per reference designator (R1_S1, R2_S1a ...), "
        "named as in the netlist, for board tools",
    )
    p.add_argument("--json", action="store_true", help="print one JSON object")
    p.set_defaults(run=run_bom)

    p = subparsers.add_parser(
        "netlist",
        help="SPICE netlist of a saved design",
        description="Print a SPICE netlist that `ngspice -b` runs as "
        "is: AC source on node in, output on node out, "
        "each op amp as a one-pole model with its GBW.",
        epilog="examples:\n  picker netlist d.toml > d.cir && ngspice -b "
        "d.cir\n  picker netlist d.toml | ngspice -b",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    p.add_argument("design", metavar="DESIGN.toml", help="a design saved with picker design --save")
    p.set_defaults(run=run_netlist)

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


# --------------------------------------------------------------------------- helpers


def _console(file=None):
    from rich.console import Console

    # markup and emoji codes off: these lines quote paths, names and drawers as written
    return Console(
        file=file or sys.stdout, highlight=False, soft_wrap=False, markup=False, emoji=False
    )


def _say(console, text: str) -> None:
    """Print a line that may quote owner text: as written, control characters escaped."""
    from picker.report.owner import owner_text

    console.print(owner_text(text))


def _err(text: str) -> None:
    from picker.report.owner import visible

    print(f"picker: {visible(text)}", file=sys.stderr)


def _interactive() -> bool:
    return sys.stdin.isatty() and sys.stdout.isatty()


def _ask(question: str) -> bool:
    try:
        from picker.report.owner import visible

        answer = input(f"{visible(question)} [y/N] ")
    except EOFError:
        return False
    return answer.strip().lower() in ("y", "yes")


def pick_table(groups):
    """A rich table of the pick list: one block per drawer (owner text shown as written)."""
    from rich.table import Table

    from picker.report.owner import owner_text

    table = Table(title="Pick list by drawer", title_justify="left", expand=False)
    table.add_column("drawer")
    table.add_column("take", justify="right")
    table.add_column("part")
    table.add_column("for")
    for g in groups:
        for i, r in enumerate(g.rows):
            what = r.value if r.kind == "opamp" else f"{r.kind} {r.value} {r.tolerance}".strip()
            if r.measured:
                what += f" (measured {', '.join(r.measured)})"
            table.add_row(
                owner_text(g.label) if i == 0 else "",
                str(r.count),
                owner_text(what),
                r.positions,
                end_section=i == len(g.rows) - 1,
            )
    return table


def bom_table(rows):
    from rich.table import Table

    from picker.report.owner import owner_text

    table = Table(title="Bill of materials", title_justify="left", expand=False)
    for name, justify in (
        ("kind", "left"),
        ("value", "left"),
        ("tol.", "right"),
        ("location", "left"),
        ("count", "right"),
        ("positions", "left"),
    ):
        table.add_column(name, justify=justify)
    for r in rows:
        value = r.value + (f" (measured {', '.join(r.measured)})" if r.measured else "")
        table.add_row(
            r.kind,
            owner_text(value),
            r.tolerance,
            owner_text(r.location or "-"),
            str(r.count),
            r.positions,
        )
    return table


def design_heading(design) -> str:
    """One line naming the design: what it is, how close, which stock it came from."""
    req = design.request
    what = " ".join(str(req[k]) for k in ("type", "response") if k in req) or "filter"
    if "order" in req:
        what += f", order {req['order']}"
    if "fc_hz" in req:
        from stock.values import format_si

        what += f", fc {format_si(float(req['fc_hz']), 'Hz')}"
    stock = f"; stock {design.stock_path}" if design.stock_path else ""
    n = len(design.stages)
    return (
        f"{what}: {n} stage{'' if n == 1 else 's'}, {design.pieces} pieces, worst error "
        f"{design.score * 100:.3g} %{stock}"
    )


# --------------------------------------------------------------------------- commands


def run_bom(args) -> int:
    from picker.errors import DesignError
    from picker.export import bom_csv, bom_rows, load_design, pick_list

    if args.per_reference and not args.csv and not args.json:
        raise DesignError(
            "--per-reference goes with --csv (or --json): picker bom d.toml --csv --per-reference"
        )
    if args.csv and args.json:
        raise DesignError("give --csv or --json, not both")
    design = load_design(args.design)
    if args.json:
        from picker.commands.outputs_json import bom_json, print_json

        print_json(bom_json(design))
        return 0
    if args.csv:
        from picker.export.bom import reference_csv

        text = reference_csv(design) if args.per_reference else bom_csv(design)
        if sys.stdout.isatty():  # on a screen, not into a file: no raw control characters
            from picker.report.owner import visible

            text = "".join(visible(line) + "\r\n" for line in text.split("\r\n")[:-1])
        sys.stdout.write(text)
        return 0
    console = _console()
    _say(console, design_heading(design))
    console.print(bom_table(bom_rows(design)))
    console.print(pick_table(pick_list(design)))
    return 0


def run_netlist(args) -> int:
    from picker.export import load_design, spice_netlist

    sys.stdout.write(spice_netlist(load_design(args.design)))
    return 0


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
            for line in str(exc).splitlines():
                _err(line)
            return exc.exit_code
        print_json(build_json(stock_path, plan, result))
        return 0
    console = _console()
    console.print(pick_table(plan.picks))
    for w in plan.warnings:
        _say(console, f"warning: {w}")
    for c in plan.cautions:
        _say(console, f"caution: {c}")
    if not args.yes:
        if not _interactive():
            _err("not a terminal: pass --yes to take the parts without asking")
            return 2
        if not _ask(f"Take these {plan.count} parts from {stock_path}?"):
            console.print("Nothing taken; the stock file is unchanged.")
            return 0
    try:
        result = do_build(stock_path, plan, again=again)
    except PartlyDoneError as exc:
        for line in str(exc).splitlines():
            _err(line)
        return exc.exit_code
    _say(console, f"Took {plan.count} parts; {result.path} updated.")
    for line in plan.summary:
        _say(console, f"  {line}")
    _say(console, f"Undo with: picker undo --stock {stock_path}")
    return 0


def _refuse_sample(stock_path) -> None:
    from picker.commands.common import is_bundled_sample
    from picker.errors import DesignError

    if is_bundled_sample(stock_path):
        raise DesignError(
            f"{stock_path} is the bundled sample, which picker does not change; "
            "copy it to ./inventory.toml (or your own file) and pass --stock"
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
            for line in str(exc).splitlines():
                _err(line)
            return exc.exit_code
        print_json(undo_json(stock_path, record, already_undone=preview.already_undone))
        return 0
    console = _console()
    if preview.already_undone:
        try:
            undo_last(stock_path)  # only records it: the file is as it was already
        except PartlyDoneError as exc:
            for line in str(exc).splitlines():
                _err(line)
            return exc.exit_code
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
    if not args.yes:
        if not _interactive():
            _err("not a terminal: pass --yes to undo without asking")
            return 2
        if not _ask(f"Put {stock_path} back as it was before build {record.number}?"):
            console.print("Nothing changed.")
            return 0
    try:
        undo_last(stock_path)
    except PartlyDoneError as exc:
        for line in str(exc).splitlines():
            _err(line)
        return exc.exit_code
    _say(console, f"Restored {stock_path} as it was before build {record.number}.")
    return 0
