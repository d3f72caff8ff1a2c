"""``picker stock check|list|adjust``: validate, show and count the parts on hand.

    picker stock check [FILE]                     exit 0 (warnings printed) or 2 (every error)
    picker stock list [FILE] [--kind K] [--json]
    picker stock adjust --stock FILE --kind K --value V [--location L] --by N

Imports at module level stay light (argparse, os, sys); rich and tomlkit load inside
the run functions, so ``picker stock adjust`` starts without numpy, scipy or textual.
"""

from __future__ import annotations

import argparse
import sys

KIND_ALIASES = {
    "resistor": "resistor",
    "resistors": "resistor",
    "r": "resistor",
    "capacitor": "capacitor",
    "capacitors": "capacitor",
    "c": "capacitor",
    "opamp": "opamp",
    "opamps": "opamp",
    "op-amp": "opamp",
}


def _kind(text: str) -> str:
    kind = KIND_ALIASES.get(text.strip().lower())
    if kind is None:
        raise argparse.ArgumentTypeError(
            f"'{text}' is not a kind; use resistor, capacitor or opamp"
        )
    return kind


def register(subparsers) -> None:
    p = subparsers.add_parser(
        "stock",
        help="check, list or adjust the stock file",
        description="Check, list or adjust the stock file of parts on hand.",
    )
    sub = p.add_subparsers(dest="stock_command", metavar="ACTION", required=True)

    c = sub.add_parser(
        "check",
        help="validate a stock file",
        description="Validate a stock file: exit 0 when it loads (warnings are "
        "printed), 2 with every error, one per line.",
        epilog="examples:\n  picker stock check inventory.toml\n"
        "  picker stock check          (./inventory.toml or "
        "$PICKER_STOCK)",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    c.add_argument(
        "file",
        nargs="?",
        metavar="FILE",
        help="stock file (default: --stock, "
        "$PICKER_STOCK, ./inventory.toml, else the bundled sample)",
    )
    c.add_argument(
        "--json",
        action="store_true",
        help="print one JSON object: ok, counts, warnings or errors (exit codes as without)",
    )
    c.set_defaults(run=run_check)

    ls = sub.add_parser(
        "list",
        help="show the parts on hand",
        description="Show the parts on hand grouped by kind.",
        epilog="examples:\n  picker stock list inventory.toml\n"
        "  picker stock list --kind capacitor\n"
        "  picker stock list --json > stock.json",
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    ls.add_argument("file", nargs="?", metavar="FILE", help="stock file (default as for check)")
    ls.add_argument("--kind", type=_kind, metavar="K", help="resistor, capacitor or opamp")
    ls.add_argument("--json", action="store_true", help="print one JSON object")
    ls.set_defaults(run=run_list)

    a = sub.add_parser(
        "adjust",
        help="change the quantity of one stock line",
        description="Change the qty of one line of the stock file in place "
        "(comments and layout are kept).",
        epilog="examples:\n"
        "  picker stock adjust --stock inventory.toml --kind resistor "
        "--value 4k7 --location B1 --by -2\n"
        "  picker stock adjust --kind capacitor --value 10n --line 619 "
        "--by 5\n"
        '  picker stock adjust --kind opamp --value "dual JFET-input, '
        '3 MHz" --by 1',
        formatter_class=argparse.RawDescriptionHelpFormatter,
    )
    a.add_argument(
        "--stock",
        metavar="FILE",
        default=argparse.SUPPRESS,
        help="stock file to change (default: $PICKER_STOCK, else ./inventory.toml)",
    )
    a.add_argument(
        "--kind", type=_kind, required=True, metavar="K", help="resistor, capacitor or opamp"
    )
    a.add_argument(
        "--value",
        required=True,
        metavar="V",
        help="value as in the file (4k7, 10n ...), or the op amp's name",
    )
    a.add_argument("--location", metavar="L", help="drawer, when the value is in several")
    a.add_argument(
        "--line",
        type=int,
        metavar="N",
        help="a file line of the entry (its [[...]] header or any of its keys, "
        "e.g. the qty line), when value and drawer are not enough (picker lists "
        "the lines that match)",
    )
    a.add_argument(
        "--by",
        type=int,
        required=True,
        metavar="N",
        help="pieces to add (negative to take), e.g. --by -1",
    )
    a.set_defaults(run=run_adjust)


def _stock_path(args, *, positional: bool = True):
    from pathlib import Path

    from picker.commands.common import resolve_stock_path
    from stock.errors import StockError

    file = getattr(args, "file", None) if positional else None
    option = getattr(args, "stock", None)
    if file and option and Path(file) != Path(option):
        raise StockError(f"two stock files given, {file} and --stock {option}: name one")
    return resolve_stock_path(file or option)


def run_check(args) -> int:
    from stock.file import load

    path, note = _stock_path(args)
    if note:
        print(f"picker: {note}", file=sys.stderr)
    if getattr(args, "json", False):
        return _check_json(path)
    stock = load(path)
    from picker.report.owner import visible

    for w in stock.warnings:
        print(f"warning: {visible(w)}")
    counts = (
        f"{len(stock.resistors)} resistor, {len(stock.capacitors)} capacitor and "
        f"{len(stock.opamps)} op amp lines"
    )
    print(
        f"{visible(path)}: ok, {counts}, {len(stock.warnings)} warning"
        f"{'' if len(stock.warnings) == 1 else 's'}"
    )
    return 0


def _check_json(path) -> int:
    """``stock check --json``: one object on stdout, errors included; exit 0 or 2."""
    import json

    from stock.errors import PickerError
    from stock.file import load

    out: dict = {"path": str(path)}
    try:
        stock = load(path)
    except PickerError as exc:
        out.update(ok=False, errors=str(exc).splitlines() or [type(exc).__name__])
        code = 2
    else:
        out.update(
            ok=True,
            sha256=stock.sha256,
            lines={
                "resistor": len(stock.resistors),
                "capacitor": len(stock.capacitors),
                "opamp": len(stock.opamps),
            },
            warnings=list(stock.warnings),
            errors=[],
        )
        code = 0
    json.dump(out, sys.stdout, indent=2, ensure_ascii=False)
    print()
    return code


def run_list(args) -> int:
    from stock.file import load

    path, note = _stock_path(args)
    if note:
        print(f"picker: {note}", file=sys.stderr)
    stock = load(path)
    from picker.report.owner import visible

    for w in stock.warnings:
        print(f"picker: warning: {visible(w)}", file=sys.stderr)
    kinds = [args.kind] if args.kind else ["resistor", "capacitor", "opamp"]
    if args.json:
        import json

        from picker.report.stock_tables import stock_json

        json.dump(stock_json(stock, kinds), sys.stdout, indent=2, ensure_ascii=False)
        print()
        return 0
    from rich.console import Console
    from rich.table import Table

    from picker.report.stock_tables import fit_widths, stock_tables

    console = Console(highlight=False, markup=False, emoji=False)
    for renderable in stock_tables(stock, kinds):
        if isinstance(renderable, Table):
            fit_widths(renderable, console.width)
        console.print(renderable)
    return 0


def _describe(item) -> str:
    from stock.values import format_rkm

    name = item.name if item.kind == "opamp" else format_rkm(item.value, item.kind)
    where = f"in {item.location}" if item.location else "(no location)"
    return f"{item.kind} {name} {where}"


def _matches(stock, kind: str, value_text: str, location: str | None, line: int | None = None):
    from stock.errors import ValueParseError
    from stock.values import parse_value

    lines = stock.lines(kind)
    if kind == "opamp":
        want = value_text.strip().lower()
        found = [o for o in lines if o.name.strip().lower() == want]
    else:
        from stock.fields import RANGES

        try:
            target = parse_value(value_text, kind=kind)
        except ValueParseError as exc:
            raise ValueParseError(f"--value: {exc}") from None
        lo, hi, span = RANGES[kind]
        if not lo <= target <= hi:
            from stock.values import format_si

            unit = "Ω" if kind == "resistor" else "F"
            raise ValueParseError(
                f"--value: '{value_text}' is {format_si(target, unit)}, not "
                f"a plausible {kind} ({span})"
                + ("; write 10p, 10n or 10u" if kind == "capacitor" else "")
            )
        found = [x for x in lines if abs(x.value - target) <= 1e-9 * abs(target)]
    if location is not None:
        loc = location.strip().lower()
        found = [x for x in found if (x.location or "").strip().lower() == loc]
    if line is not None:
        owner = entry_at_line(stock, line)
        found = [x for x in found if x is owner]
    return found


def entry_at_line(stock, line: int):
    """The stock line whose entry holds file line ``line``: its ``[[...]]`` header or any
    line after it up to the next entry's header; None before the first entry."""
    entries = [x for k in ("resistor", "capacitor", "opamp") for x in stock.lines(k)]
    before = [x for x in entries if x.line <= line]
    return max(before, key=lambda x: x.line) if before else None


def _detail(item) -> str:
    """What tells two lines of the same value and drawer apart."""
    bits = []
    if item.kind == "capacitor" and item.dielectric:
        bits.append(item.dielectric)
    if item.kind != "opamp":
        from picker.report.stock_tables import tolerance_text

        bits.append(tolerance_text(item) + " tolerance")
    if item.note:
        bits.append(item.note)
    return f" ({', '.join(bits)})" if bits else ""


def run_adjust(args) -> int:
    from picker.report.owner import visible
    from stock.edit import is_sample
    from stock.errors import PartlyDoneError, StockEditError
    from stock.file import QtyChange, StockChangedError, apply_changes, load

    path, _note = _stock_path(args, positional=False)
    if is_sample(path):
        raise StockEditError(
            "adjust changes your own stock file: name it with --stock FILE "
            "(or $PICKER_STOCK, or ./inventory.toml); the bundled sample is "
            "not changed"
        )
    # another writer may change the file between our read and our lock: read again and
    # match again (the sha256 check under the lock makes this safe), a few times
    for attempt in range(ADJUST_ATTEMPTS):
        stock = load(path)
        item, new_qty = _pick_line(path, stock, args)
        if args.by == 0:
            print(visible(f"{_describe(item)}: qty {item.qty} (unchanged)"))
            return 0
        try:
            apply_changes(
                path, [QtyChange(args.kind, item.index, args.by)], expect_sha256=stock.sha256
            )
        except StockChangedError:
            if attempt == ADJUST_ATTEMPTS - 1:
                raise
            continue
        except PartlyDoneError as exc:  # written, but the folder could not be synced
            print(f"picker: {visible(str(exc))}", file=sys.stderr)
            print(visible(f"{_describe(item)}: qty {item.qty} -> {new_qty}"))
            return exc.exit_code
        print(visible(f"{_describe(item)}: qty {item.qty} -> {new_qty}"))
        return 0
    return 2  # not reached


ADJUST_ATTEMPTS = 50


def _pick_line(path, stock, args):
    from stock.errors import StockEditError

    line = getattr(args, "line", None)
    found = _matches(stock, args.kind, args.value, args.location, line)
    what = (
        f"{args.kind} {args.value}"
        + (f" in {args.location}" if args.location else "")
        + (f" at line {line}" if line is not None else "")
    )
    if not found:
        hint = ""
        if args.kind == "opamp" and stock.opamps:
            hint = "; the op amps in it: " + ", ".join(f"'{o.name}'" for o in stock.opamps)
        raise StockEditError(f"{path}: no {what} in the stock file{hint}")
    if len(found) > 1:
        rows = [f"  line {x.line}: {_describe(x)}{_detail(x)}, qty {x.qty}" for x in found]
        how = "--line" if args.location else "--location (or --line)"
        raise StockEditError(
            "\n".join([f"{path}: {len(found)} lines match {what}; add {how} to say which:"] + rows)
        )
    item = found[0]
    new_qty = item.qty + args.by
    if new_qty < 0:
        raise StockEditError(
            f"{path}:{item.line}: {_describe(item)} has qty {item.qty}; "
            f"--by {args.by} would go below zero; nothing was changed"
        )
    if args.by < 0 and item.kind != "opamp" and new_qty < len(item.measured):
        raise StockEditError(
            f"{path}:{item.line}: {_describe(item)} lists "
            f"{len(item.measured)} measured pieces; qty {new_qty} would be "
            "fewer: remove the readings you took from 'measured' in the file "
            "first; nothing was changed"
        )
    return item, new_qty
