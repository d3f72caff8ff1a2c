"""The error budget of one candidate as one rich renderable (CLI report and TUI).

    from picker.report.budget_panel import BudgetPanel
    console.print(BudgetPanel(budget))            # full: tables, sensitivities, histogram
    Static(BudgetPanel(budget, compact=True))     # compact: tables and warnings only

Everything fits in 80 columns; meaning never rests on colour (marks and words carry it).
"""

from __future__ import annotations

from rich import box
from rich.console import Console, ConsoleOptions, Group, RenderableType, RenderResult
from rich.panel import Panel
from rich.table import Table
from rich.text import Text

from picker.report.owner import owner_text, visible
from picker.report.views import block_rows, count_eighths
from stock.values import format_si

HIST_ROWS = 4


def _p(x: float) -> str:
    """A signed percentage number: two decimals below 10 %, one above."""
    return f"{x:+.2f}" if abs(x) < 9.995 else f"{x:+.1f}"


def _pct(x: float | None) -> str:
    return "-" if x is None else f"{_p(x * 100)} %"


def _span(r, ref: float | None) -> str:
    """A range relative to ``ref`` as '-1.23..+3.45 %'."""
    if r is None or not ref:
        return "-"
    return f"{_p((r[0] / ref - 1) * 100)}..{_p((r[1] / ref - 1) * 100)} %"


def _num(x: float | None, unit: str = "") -> str:
    if x is None:
        return "-"
    return format_si(x, unit) if unit else f"{x:.4g}"


def yield_line(budget) -> Text:
    """The budget's headline: the Monte Carlo yield inside the window, in one sentence."""
    mc = budget.monte_carlo
    w = dict(mc.window)
    text = Text()
    text.append("Yield ", style="bold")
    text.append(f"{mc.yield_ * 100:.1f} %", style="bold")
    text.append(
        f" (standard error {mc.std_error * 100:.1f} %) of {mc.trials:,} trials, "
        f"{mc.distribution}; "
        f"inside f0 +/-{w['f0'] * 100:g} %, Q +/-{w['q'] * 100:g} %, "
        f"gain +/-{w['gain'] * 100:g} % of the targets"
    )
    return text


class BudgetPanel:
    """One panel: Monte Carlo yield, a table per stage, the f0 histogram, the warnings.

    Parameters
    ----------
    budget : picker.budget.Budget
    compact : bool
        Leave out the sensitivities and the histogram (for a small pane).
    """

    def __init__(self, budget, *, compact: bool = False):
        self.budget = budget
        self.compact = compact

    # pieces ---------------------------------------------------------------------
    def _stage_table(self, s) -> Table:
        title = f"Stage {s.index + 1}: {s.topology}, order {s.order}"
        table = Table(
            title=title,
            title_justify="left",
            box=box.SIMPLE_HEAD,
            pad_edge=False,
            expand=False,
            show_edge=False,
        )
        table.add_column("", no_wrap=True)
        for name in ("f0", "Q", "gain"):
            table.add_column(name, justify="right", no_wrap=True)
        t, a = s.target, s.achieved
        table.add_row("target", _num(t.f0_hz, "Hz"), _num(t.q), _num(t.gain))
        table.add_row("achieved", _num(a.f0_hz, "Hz"), _num(a.q), _num(a.gain))
        table.add_row("value err", *(_pct(e) for e in s.value_error))
        tol = s.tolerance
        table.add_row(
            "tolerance", _span(tol.f0, t.f0_hz), _span(tol.q, t.q), _span(tol.gain, t.gain)
        )
        tp = s.temperature
        table.add_row(
            f"{tp.span_c[0]:g}..{tp.span_c[1]:g} C",
            _span(tp.f0, a.f0_hz),
            _span(tp.q, a.q),
            _span(tp.gain, a.gain),
        )
        if s.opamp is not None:
            o = s.opamp
            table.add_row(f"GBW {format_si(o.gbw_hz, 'Hz')}", *(_pct(x) for x in o.shift))
        return table

    def _notes(self, s) -> Text:
        text = Text(style="dim")
        if len(self.budget.monte_carlo.stage_yield) > 1:
            text.append(
                f"alone {self.budget.monte_carlo.stage_yield[s.index] * 100:.1f} % "
                "inside the window; "
            )
        text.append("tolerance vs target, temperature vs achieved at 25 C")
        assumed = [d.label for d in s.temperature.pieces if d.assumed]
        if assumed:
            text.append(f"; tempco assumed for {', '.join(assumed)}")
        if not self.compact:
            text.append(f"\ntolerance: {s.tolerance.method}")
            sens = "  ".join(
                f"{n}:{sf:+.2f}" + ("" if sq is None else f"/{sq:+.2f}")
                for n, sf, sq, _ in s.tolerance.sensitivities
            )
            text.append(f"\nsensitivity f0/Q: {sens}")
        return text

    def _histogram(self, width: int) -> Group | None:
        h = self.budget.monte_carlo.histogram
        if not h.counts:
            return None
        n = len(h.counts)
        cell = max(1, min(2, (width - 2) // n))
        eighths = count_eighths(h.counts, rows=HIST_ROWS)
        rows = [Text(line) for line in block_rows(eighths, rows=HIST_ROWS, repeat=cell)]
        axis = [" "] * (n * cell)
        lo, hi = h.edges[0], h.edges[-1]
        for value, mark in ((h.nominal, "n"), (h.target, "T")):
            if lo <= value <= hi:
                axis[min(n * cell - 1, int((value - lo) / (hi - lo) * n * cell))] = mark
        rows.append(Text("".join(axis)))
        left, right = format_si(lo, "Hz"), format_si(hi, "Hz")
        pad = max(1, n * cell - len(left) - len(right))
        rows.append(Text(left + " " * pad + right))
        head = Text(
            f"{h.quantity}, {sum(h.counts):,} trials (T target, n nominal parts)", style="bold"
        )
        if h.outside:
            head.append(f"; {h.outside} trials had no such frequency on the grid", style="")
        return Group(head, *rows)

    def _warnings(self) -> Table:
        table = Table(box=None, show_header=False, pad_edge=False, expand=True)
        table.add_column(width=1, no_wrap=True)
        table.add_column(ratio=1)
        for w in self.budget.warnings:
            table.add_row("!", owner_text(w))  # warnings quote op amp names and drawers
        return table

    # rich protocol -----------------------------------------------------------------
    def __rich_console__(self, console: Console, options: ConsoleOptions) -> RenderResult:
        width = min(options.max_width, 80)
        parts: list[RenderableType] = [yield_line(self.budget)]
        for s in self.budget.stages:
            parts += [Text(""), self._stage_table(s), self._notes(s)]
        if not self.compact:
            hist = self._histogram(width - 4)
            if hist is not None:
                parts += [Text(""), hist]
        if self.budget.warnings:
            parts += [Text(""), Text("Warnings", style="bold"), self._warnings()]
        name = self.budget.opamp_name
        which = f" (op amp: {visible(name)})" if name else " (ideal op amp)"
        title = Text("Error budget" + which)
        yield Panel(Group(*parts), title=title, title_align="left", width=width, box=box.ROUNDED)
