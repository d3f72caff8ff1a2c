"""The human report of ``picker design``: ranked candidates, trade-off, schematic, warnings.

A rich renderable (``__rich_console__``) that fits 80 columns; the same object can sit
in a Textual ``Static``.
"""

from __future__ import annotations

from rich.console import Console, ConsoleOptions, Group, RenderableType, RenderResult
from rich.table import Table
from rich.text import Text

from picker.report.owner import owner_text, visible
from picker.report.schematic import arrangement_text, schematic
from stock.values import format_si


def pct(score: float, digits: int = 2) -> str:
    """A relative error as percent with sensible digits: 0.0123 % , 1.2 %; ``digits``
    significant digits below 1 % (3 tells the rows of a list apart: 0.133 %, 0.135 %)."""
    p = 100.0 * score
    if p == 0:
        return "0 %"
    if p >= 1:
        return f"{p:.2f} %"
    return f"{p:.{digits}g} %" if p >= 1e-4 else f"{p:.1e} %"


def tradeoff_table(tradeoff, *, rank1_pieces: int | None = None) -> Table | None:
    """Parts against precision, one row per piece count: its best worst error and a bar
    whose length grows with the log of that error (CLI report and TUI matches pane).
    None when there is no trade-off to show."""
    import math

    from rich import box

    rows = [(int(p), float(s)) for p, s in tradeoff or ()]
    if not rows:
        return None
    table = Table(
        title="parts vs precision: best for each piece count",
        title_justify="left",
        box=box.SIMPLE_HEAD,
        pad_edge=False,
    )
    table.add_column("pieces", justify="right")
    table.add_column("worst error", justify="right")
    table.add_column("(longer bar: less precise)", no_wrap=True)
    table.add_column("", no_wrap=True)
    scores = [s for _, s in rows if s > 0 and math.isfinite(s)]
    hi = math.log10(max(scores)) if scores else 0.0
    lo = math.log10(min(scores)) if scores else 0.0
    for pieces, score in rows:
        if score > 0 and math.isfinite(score) and hi > lo:
            n = 1 + round(29 * (math.log10(score) - lo) / (hi - lo))
        else:
            n = 30
        mark = "< rank 1" if pieces == rank1_pieces else ""
        table.add_row(str(pieces), pct(score), "#" * n, mark)
    return table


class DesignReport:
    """Report of a search result.

    Parameters
    ----------
    result : picker.search.SearchResult
    title : str
        One line saying what was asked (type, corner, order ...).
    budget_panel : renderable, optional
        The error-budget panel of rank 1.
    warnings : list of str
        Warnings of the design as a whole (the op amp, the budget's practical checks).
    """

    def __init__(self, result, *, title: str = "", budget_panel=None, warnings=()):
        self.result = result
        self.title = title
        self.budget_panel = budget_panel
        self.warnings = list(warnings)

    def _candidates(self) -> Table:
        table = Table(
            title="candidates, best first",
            title_justify="left",
            expand=False,
            show_lines=True,
            pad_edge=False,
        )
        table.add_column("#", justify="right")
        table.add_column("worst error", justify="right")
        table.add_column("pieces", justify="right")
        table.add_column("parts (position value drawer)", overflow="fold")
        for rank, cand in enumerate(self.result.candidates, 1):
            parts = []
            for s, choice in enumerate(cand.stages):
                items = []
                for name, arr in choice.positions:
                    value, drawer = arrangement_text(arr)
                    items.append(f"{name} {value} @{drawer}")
                prefix = f"{s + 1}: " if len(cand.stages) > 1 else ""
                parts.append(prefix + ", ".join(items))
            parts += [f"({visible(note)})" for note in getattr(cand, "alike", ())]
            # a drawer is owner text: a Text cell is never read as markup
            table.add_row(str(rank), pct(cand.score), str(cand.pieces), Text("\n".join(parts)))
        return table

    def __rich_console__(self, console: Console, options: ConsoleOptions) -> RenderResult:
        parts: list[RenderableType] = []
        if self.title:
            parts.append(Text(self.title, style="bold"))
        if not self.result.candidates:
            parts.append(Text("no candidate"))
            yield Group(*parts)
            return
        best = self.result.candidates[0]
        parts.append(Text(ranking_line(self.result)))
        parts.append(self._candidates())
        first = self.result.candidates[0].pieces
        trade = tradeoff_table(self.result.tradeoff, rank1_pieces=first)
        if trade is not None:
            parts.append(trade)
        parts.append(Text("best candidate (rank 1):", style="bold"))
        parts.append(schematic(best))
        for choice in best.stages:
            t, a = choice.target, choice.achieved
            line = (
                f"{choice.topology}: f0 {format_si(a.f0_hz, 'Hz')} for {format_si(t.f0_hz, 'Hz')}"
            )
            if t.q is not None:
                line += f", Q {a.q:.4g} for {t.q:.4g}"
            if t.gain is not None:
                line += f", gain {a.gain:.4g} for {t.gain:.4g}"
            parts.append(Text("  " + line))
        if self.budget_panel is not None:
            parts.append(self.budget_panel)
        warnings = list(best.warnings)
        for w in list(self.warnings) + list(getattr(self.result, "notes", ())):
            if w not in warnings:
                warnings.append(w)
        for w in warnings:
            parts.append(owner_text(f"warning: {w}"))
        yield Group(*parts)


def design_json(result, budgets=None) -> dict:
    """The ``--json`` object of docs/search.md (``budgets``: one Budget or None per candidate)."""
    budgets = list(budgets or [])
    budgets += [None] * (len(result.candidates) - len(budgets))
    out = []
    for cand, bud in zip(result.candidates, budgets, strict=False):
        stages = []
        for i, choice in enumerate(cand.stages):
            t, a = choice.target, choice.achieved
            stages.append(
                {
                    "topology": choice.topology,
                    "order": 1 if t.q is None else 2,
                    "targets": {"f0": t.f0_hz, "q": t.q, "gain": t.gain},
                    "achieved": {"f0": a.f0_hz, "q": a.q, "gain": a.gain},
                    "positions": {
                        name: {
                            "value": arr.value,
                            "arrangement": arr.arrangement,
                            "parts": [
                                {"kind": p.kind, "value": p.value, "location": p.location}
                                for p in arr.parts
                            ],
                        }
                        for name, arr in choice.positions
                    },
                    "budget": bud.stage_json(i) if bud is not None else None,
                }
            )
        warnings = list(cand.warnings)
        warnings += [n for n in getattr(result, "notes", ()) if n not in warnings]
        if bud is not None:
            warnings += [w for w in bud.warnings if w not in warnings]
        out.append(
            {
                "score": cand.score,
                "pieces": cand.pieces,
                "stages": stages,
                "budget": bud.candidate_json() if bud is not None else None,
                "warnings": warnings,
                "alike": list(getattr(cand, "alike", ())),
            }
        )
    return {
        "rank": getattr(result, "rank", "error"),
        "max_error": getattr(result, "max_error", None),
        "proven": getattr(result, "proven", True),
        "bound": getattr(result, "bound", None),
        "bound_of": getattr(result, "bound_of", None),
        "goal_met": getattr(result, "goal_met", True),
        "candidates": out,
        "tradeoff": [{"pieces": k, "score": s} for k, s in result.tradeoff],
    }


def ranking_line(result) -> str:
    """One line saying how rank 1 was chosen, the goal, and what is proven."""
    rank = getattr(result, "rank", "error")
    goal = float(getattr(result, "max_error", 0.0) or 0.0)
    if rank == "pieces":
        head = f"ranked by fewest pieces within {100 * goal:.4g} % worst error"
        if result.candidates and not getattr(result, "goal_met", True):
            miss = result.candidates[0].score - goal
            head += f": goal missed by {pct(miss)}, ranked by worst error instead"
        else:
            head += ": goal met"
    elif rank == "yield":
        head = "ranked by Monte Carlo yield (estimated, then confirmed; not proven)"
    else:
        head = "ranked by smallest worst error"
    if rank == "yield":
        return head
    if getattr(result, "proven", True):
        return head + "; rank 1 proven"
    bound, of = getattr(result, "bound", None), getattr(result, "bound_of", None)
    if bound is None:
        return head + "; rank 1 not proven"
    if of == "pieces":
        return head + f"; not proven: no candidate within the goal has fewer than {bound:g} pieces"
    return head + f"; not proven: no candidate has a worst error below {pct(bound)}"
