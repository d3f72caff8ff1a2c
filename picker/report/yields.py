"""The yield ranking's table: each candidate's yield and how it was found (docs/yield.md).

A rich renderable for the CLI report and the terminal UI; it reads the
``yields`` and ``references`` of a ``picker.search.yieldrank.YieldResult``.
"""

from __future__ import annotations

from rich.console import Console, ConsoleOptions, Group, RenderResult
from rich.table import Table
from rich.text import Text

from picker.report.design import pct


def yield_text(info) -> str:
    """``96.1 % +/- 0.19`` for a Monte Carlo yield, ``~96 % (estimate)`` for an estimate."""
    if info is None:
        return "-"
    if info.method == "monte carlo":
        return f"{100 * info.value:.2f} % +/- {100 * (info.std_error or 0.0):.2f}"
    return f"~{100 * info.value:.1f} % (estimate)"


class YieldTable:
    """Yield per candidate, best first, and the other rankings' rank 1 for comparison."""

    def __init__(self, result):
        self.result = result

    def __rich_console__(self, console: Console, options: ConsoleOptions) -> RenderResult:
        yields = list(getattr(self.result, "yields", ()))
        table = Table(
            title="yield inside the window (rank by yield)",
            title_justify="left",
            pad_edge=False,
        )
        table.add_column("#", justify="right")
        table.add_column("yield", justify="right")
        table.add_column("pieces", justify="right")
        table.add_column("worst error", justify="right")
        table.add_column("how")
        for rank, (cand, info) in enumerate(zip(self.result.candidates, yields, strict=False), 1):
            how = (
                f"Monte Carlo, {info.trials} trials"
                if info.method == "monte carlo"
                else "first-order estimate"
            )
            table.add_row(str(rank), yield_text(info), str(cand.pieces), pct(cand.score), how)
        refs = dict(getattr(self.result, "references", ()))
        lines = [
            Text(f"rank 1 by {name}: yield {yield_text(refs[name])}")
            for name in ("pieces", "error")
            if name in refs
        ]
        yield Group(table, *lines)
