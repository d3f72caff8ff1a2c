"""Subcommands that read a saved design: ``bom`` and ``netlist`` (``build`` and ``undo``,
which write the stock file, are in ``build_cmd``).

    picker bom DESIGN.toml [--csv [--per-reference]] [--json]
                                                parts list and pick list by drawer
    picker netlist DESIGN.toml                  SPICE text for ngspice

Heavy imports (rich, the export package) happen inside ``run`` functions; ``bom --csv``
and ``netlist`` import neither numpy nor rich. JSON shapes (``outputs_json``):
docs/outputs.md.
"""

from __future__ import annotations

import argparse
import sys


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
