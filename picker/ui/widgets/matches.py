"""The matches pane: ranked candidates and the parts-versus-precision trade-off.

The screen feeds it (``show_busy``, ``show_result``, ``show_message``); choosing a
row posts ``MatchesPane.Chosen`` with the candidate.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.containers import Vertical
from textual.message import Message
from textual.widgets import DataTable, Static

from picker.report.design import pct, tradeoff_table
from picker.report.yields import yield_text

COLUMNS = ("rank", "worst error", "pieces", "values (stages split by |)", "notes")


def parts_text(candidate) -> str:
    """Every position's combined value, RKM style, so that rows of equal score and piece
    count can be told apart at a glance ("R1 18k59 R2 28k3 C1 10n03 C2 4n8")."""
    from stock.display import format_rkm_display  # a pair's value at 4 figures, as the CLI
    from stock.values import format_rkm

    def shown(arr) -> str:
        show = format_rkm if arr.arrangement == "single" else format_rkm_display
        return show(arr.value, arr.kind)

    return " | ".join(
        " ".join(f"{name} {shown(arr)}" for name, arr in stage.positions)
        for stage in candidate.stages
    )


class MatchesPane(Vertical):
    class Chosen(Message):
        def __init__(self, candidate, rank: int) -> None:
            self.candidate = candidate
            self.rank = rank
            super().__init__()

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.candidates: list = []
        self.last_status = ""
        self.outcome = ""  # what the search gave, for the targets pane

    def compose(self) -> ComposeResult:
        yield Static("no search yet: fill in the targets (pane 2)", id="m-status", markup=False)
        yield DataTable(id="m-table", cursor_type="row")
        yield Static("", id="m-tradeoff")

    def on_mount(self) -> None:
        self.query_one(DataTable).add_columns(*COLUMNS)

    def show_stale(self, text: str) -> None:
        """Keep the rows, but say first that they answer other targets."""
        self.query_one("#m-status", Static).update(f"[old] {text}\n{self.last_status}")

    def _show_status(self, text: str) -> None:
        self.last_status = text
        self.query_one("#m-status", Static).update(text)

    def show_busy(self, what: str) -> None:
        self._show_status(f"[busy] searching: {what} …")

    def show_message(self, text: str) -> None:
        self.outcome = text
        self.candidates = []
        self.query_one(DataTable).clear()
        self.query_one("#m-tradeoff", Static).update("")
        self._show_status(text)

    def show_result(self, result, *, seconds: float, what: str, stopped: bool = False) -> None:
        self.candidates = list(result.candidates)
        table = self.query_one(DataTable)
        table.clear()
        seen: dict[str, int] = {}
        yields = list(getattr(result, "yields", ()))  # rank yield: each one's, where computed
        for rank, c in enumerate(self.candidates, 1):
            values = parts_text(c)
            notes = [f"yield {yield_text(yields[rank - 1])}"] if rank <= len(yields) else []
            notes += [f"{len(c.warnings)} warning(s)"] if c.warnings else []
            if values in seen:
                notes.append(f"as {seen[values]}, other drawers")
            seen.setdefault(values, rank)
            table.add_row(
                str(rank), pct(c.score, 3), str(c.pieces), values, "; ".join(notes), key=str(rank)
            )
        n = len(self.candidates)
        head = "stopped" if stopped else "done"
        note = ""
        if not getattr(result, "proven", True):
            bound = getattr(result, "bound", None)
            note = "; the best so far, not proven the best" + (
                f" (a proven bound: {bound:g} {getattr(result, 'bound_of', '') or ''})".rstrip()
                if bound is not None
                else ""
            )
        if not getattr(result, "goal_met", True):
            note += "; none within the precision goal"
        if yields:  # the yield ranking: rank 1's yield in the status lines too
            note += f"; rank 1 yield {yield_text(yields[0])}"
        self._show_status(
            f"{head}: {n} candidate(s) for {what} in {seconds:.2f} s{note}"
            + ("; enter on a row: look closer" if n else "")
        )
        self.outcome = f"{head}: {n} candidate(s) for {what}{note}"  # no time: see pane 3
        first = self.candidates[0].pieces if self.candidates else None
        trade = tradeoff_table(result.tradeoff, rank1_pieces=first)
        self.query_one("#m-tradeoff", Static).update(
            trade if trade is not None else "no trade-off reported"
        )

    @on(DataTable.RowSelected, "#m-table")
    def _chosen(self, event: DataTable.RowSelected) -> None:
        rank = event.cursor_row + 1
        if 1 <= rank <= len(self.candidates):
            self.post_message(self.Chosen(self.candidates[rank - 1], rank))
