"""``picker design ... --suggest N``: what to buy to improve the design (docs/buying.md).

The design command calls ``register_options`` (the options), ``read_options`` (checked
before any search: a bad option exits 2 at once), ``run`` (the suggestions, given the
design's rank 1 or None when the stock has no design), ``add_json`` and ``print_section``.
Imports nothing heavy at module level.
"""

from __future__ import annotations

import sys
from dataclasses import dataclass

SERIES = ("E12", "E24", "E48", "E96")
DEFAULT_TOLERANCE = "1%,5%"
SUGGEST_MAX = 20
NO_LIMIT_S = 60.0  # all the trials of one --suggest under --time-limit none (docs/buying.md)


@dataclass(frozen=True)
class BuyOptions:
    n: int
    series: str
    tolerance_r: float
    tolerance_c: float


def register_options(p) -> None:
    p.add_argument(
        "--suggest",
        default=None,
        metavar="N",
        help="also list the N purchases (a few pieces of one preferred value, or two "
        "values) that improve rank 1 most",
    )
    p.add_argument(
        "--buy-series",
        default="E24",
        metavar="SERIES",
        help=f"preferred values to buy from: {', '.join(SERIES)} (default E24)",
    )
    p.add_argument(
        "--buy-tolerance",
        default=DEFAULT_TOLERANCE,
        metavar="P[,Q]",
        help="tolerance of the parts bought: one for both kinds, or resistors,capacitors "
        "(default 1%%,5%%)",
    )


def read_options(args) -> BuyOptions | None:
    """The checked options, or None without ``--suggest``; DesignError (exit 2) when bad."""
    from picker.errors import DesignError
    from stock.errors import ValueParseError
    from stock.values import parse_percent

    raw = getattr(args, "suggest", None)
    if raw is None:
        return None
    text = str(raw).strip()
    if not text.isdigit() or not 1 <= int(text) <= SUGGEST_MAX:
        raise DesignError(f"--suggest {raw!r}: give a whole number from 1 to {SUGGEST_MAX}")
    series = str(args.buy_series).strip().upper()
    if series not in SERIES:
        raise DesignError(f"--buy-series {args.buy_series!r}: choose one of {', '.join(SERIES)}")
    parts = [s.strip() for s in str(args.buy_tolerance).split(",")]
    if len(parts) not in (1, 2) or not all(parts):
        raise DesignError(
            f"--buy-tolerance {args.buy_tolerance!r}: give one percentage (both kinds) "
            "or two, resistors then capacitors, e.g. 1%,5%"
        )
    tols = []
    for s in parts:
        try:
            t = parse_percent(s)
        except ValueParseError:
            raise DesignError(
                f"--buy-tolerance {s!r}: write a percentage, e.g. 1% or 0.5%"
            ) from None
        if not 0 < t <= 0.5:
            raise DesignError(f"--buy-tolerance {s!r}: must be above 0 % and at most 50 %")
        tols.append(t)
    if len(tols) == 1:
        tols.append(tols[0])
    rank_of(args)  # refuses --rank yield and a bad goal before any search
    return BuyOptions(int(text), series, tols[0], tols[1])


def rank_of(args) -> tuple[str, float]:
    """The design's ranking and precision goal (fraction)."""
    from picker.errors import DesignError
    from stock.values import parse_percent

    rank = getattr(args, "rank", None) or "error"
    if rank == "yield":
        raise DesignError(
            "--suggest cannot rank purchases by yield, because each trial would need its "
            "own Monte Carlo yield ranking and they would not fit in one time limit: run "
            "--suggest with --rank error, then check the purchase you pick with --rank yield"
        )
    goal = getattr(args, "max_error", None)
    if goal is None:
        return rank, 0.005
    if isinstance(goal, (int, float)):
        return rank, float(goal)
    import picker.targets as targets

    read = getattr(targets, "read_max_error", None)  # the design's own reading, when it has one
    return rank, read(goal) if read else parse_percent(str(goal).strip())


def trial_limit(args) -> float | None:
    """Seconds each trial's search may take: the design's --time-limit, when it has one."""
    limit = getattr(args, "time_limit", None)
    if limit is None or isinstance(limit, (int, float)):
        return limit
    import picker.targets as targets

    read = getattr(targets, "read_time_limit", None)
    return read(limit) if read else float(limit)


def suggest_limit(time_limit: float | None) -> float:
    """Seconds for all the trials of one --suggest: the design's own time limit, shared
    by every trial (docs/buying.md, "Time"); without one, ``NO_LIMIT_S``."""
    return NO_LIMIT_S if time_limit is None else time_limit


def run(options: BuyOptions, args, stock, stages, kw: dict, before):
    """The BuyResult for the design; ``before``: its rank 1, or None (no design)."""
    from picker.search.buying import suggest

    rank, goal = rank_of(args)
    return suggest(
        stock,
        stages,
        rank=rank,
        max_error=goal,
        series=options.series,
        tolerance_r=options.tolerance_r,
        tolerance_c=options.tolerance_c,
        n=options.n,
        bounds=kw["bounds"],
        singles=kw["singles"],
        allow_polarized=kw["allow_polarized"],
        time_limit=suggest_limit(trial_limit(args)),
        trial_time_limit=trial_limit(args),
        before="none" if before is None else before,
    )


def no_design(options: BuyOptions, args, stock, stages, kw: dict) -> None:
    """The stock has no design: print what to buy (the caller then exits 1)."""
    buy = run(options, args, stock, stages, kw, None)
    if getattr(args, "json", False):
        import json

        print(json.dumps(add_json({"candidates": []}, buy), indent=2))
    else:
        print_section(buy)


def add_json(out: dict, buy) -> dict:
    out["suggestions"] = [s.to_json() for s in buy.suggestions]
    out["suggestions_proven"] = buy.proven
    out["suggestions_notes"] = list(buy.notes)
    out["suggestions_tried"] = {
        "values": len(buy.tried),
        "searches": buy.searched,
        "ruled_out": buy.ruled_out,
    }
    return out


def describe(p) -> str:
    """``1% resistor 20k`` for a purchase."""
    from stock.values import format_rkm

    return f"{100 * p.tolerance:g}% {p.kind} {format_rkm(p.value, p.kind)}"


def side(pq) -> str:
    from picker.report.design import pct

    return "no design" if pq is None else f"{pq[0]} pieces, {pct(pq[1])}"


def buy_section(buy) -> list:
    """The "What to buy" section as rich renderables (the CLI report, the TUI's matches)."""
    from rich.table import Table
    from rich.text import Text

    parts: list = []
    if buy.suggestions:
        table = Table(title="What to buy", title_justify="left", show_lines=False)
        for col in ("buy", "how many", "rank 1 before", "rank 1 after"):
            table.add_column(col)
        for s in buy.suggestions:
            what = " + ".join(describe(p) for p in s.purchases)
            many = " + ".join(str(p.qty) for p in s.purchases)
            table.add_row(Text(what), many, side(s.before), side(s.after))
        parts.append(table)
    else:
        parts.append(
            Text(f"What to buy: no purchase of the {len(buy.tried)} values tried improves rank 1")
        )
    tried = f"{len(buy.tried)} values tried, {buy.searched} searches"
    if buy.ruled_out:
        tried += f", {buy.ruled_out} purchases ruled out by searches of single stages"
    parts.append(Text(f"  ({tried})"))
    parts += [Text(f"  note: {note}") for note in buy.notes]
    return parts


def print_section(buy, *, file=None, width: int | None = None) -> None:
    """The "What to buy" section of the report."""
    from rich.console import Console

    console = Console(file=file or sys.stdout, width=width or min(Console().width, 100))
    for part in buy_section(buy):
        console.print(part)
