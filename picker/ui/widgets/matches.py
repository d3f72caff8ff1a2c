"""The matches pane: ranked candidates, what to buy, the parts-versus-precision trade-off.

The screen feeds it (``show_busy``, ``show_result``, ``show_message``); choosing a
row posts ``MatchesPane.Chosen`` with the candidate. ``p`` runs the suggestion search
of ``picker design --suggest`` (``picker.ui.buying``) for the targets of the rows shown,
in a child process; ``s`` stops it (and, when none runs, the screen's search). The
suggestions show under the rows: what to buy, rank 1 before and after.
"""

from __future__ import annotations

from rich.console import Group
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.message import Message
from textual.widgets import DataTable, Static
from textual.worker import get_current_worker

from picker.report.design import pct, tradeoff_table
from picker.report.yields import yield_text
from picker.ui.offload import Cancelled, Lane
from picker.ui.widgets.common import Plain, RowTable, cell, say
from stock.errors import PickerError

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
    BINDINGS = [
        Binding("p", "buy", "what to buy"),
        Binding("s", "stop", "stop", show=False),
    ]

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
        self.buy_lane = Lane("buy")
        self.buying = False  # a suggestion search runs
        self.buy = None  # its BuyResult, once shown (for tests)
        self._buy_for = None  # the (stock, targets) of the rows shown

    def compose(self) -> ComposeResult:
        yield Plain("no search yet: fill in the targets (pane 2)", id="m-status")
        yield RowTable(id="m-table")
        yield Plain("", id="m-buy")
        yield Static("", id="m-tradeoff")

    def on_mount(self) -> None:
        self.query_one(DataTable).add_columns(*COLUMNS)
        self.query_one("#m-buy").display = False

    def on_unmount(self) -> None:
        self.buy_lane.cancel()

    def show_stale(self, text: str) -> None:
        """Keep the rows, but say first that they answer other targets."""
        self.query_one("#m-status", Static).update(f"[old] {text}\n{self.last_status}")

    def _show_status(self, text: str) -> None:
        self.last_status = text
        self.query_one("#m-status", Static).update(text)

    def show_busy(self, what: str) -> None:
        self._show_status(f"[busy] searching: {what} …")

    def show_message(self, text: str) -> None:
        self._clear_buy()
        self.outcome = text
        self.candidates = []
        self.query_one(DataTable).clear()
        self.query_one("#m-tradeoff", Static).update("")
        self._show_status(text)

    def show_result(self, result, *, seconds: float, what: str, stopped: bool = False) -> None:
        self._clear_buy()
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
                str(rank), pct(c.score, 3), str(c.pieces), cell(values), cell("; ".join(notes)),
                key=str(rank),
            )  # fmt: skip
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

    # what to buy -----------------------------------------------------------------
    def _buy_line(self, content) -> None:
        static = self.query_one("#m-buy", Static)
        static.update(content)
        static.display = bool(content)

    def _clear_buy(self) -> None:
        """New rows: suggestions for the old ones no longer apply."""
        self.buy_lane.cancel()
        self.buying, self.buy = False, None
        self._buy_line("")

    def action_buy(self) -> None:
        """p: what to buy for the targets of the rows shown (as ``--suggest 3``)."""
        screen = self.screen
        stock = getattr(screen, "stock", None)
        targets = getattr(screen, "result_targets", None)
        if getattr(screen, "busy", False) or targets is None or stock is None:
            self._buy_line(say("error", "what to buy: wait for the search's rows first"))
            return
        if targets != getattr(screen, "targets", None):
            self._buy_line(
                say("error", "what to buy: these rows answer earlier targets; wait for the search")
            )
            return
        before = self.candidates[0] if self.candidates else None
        self.buying, self.buy = True, None
        self._buy_line(
            "[busy] what to buy: trying purchases of E24 values against this stock … (s: stop)"
        )
        self._buy(stock, targets, before)

    @work(thread=True, exclusive=True, group="buy", exit_on_error=False)
    def _buy(self, stock, targets, before) -> None:
        from picker.ui.buying import buy_job

        worker = get_current_worker()
        try:
            outcome = ("done", self.buy_lane.run(buy_job, stock, targets, before))
        except Cancelled:
            outcome = ("stopped", None)
        except PickerError as exc:
            outcome = ("error", str(exc))
        if not worker.is_cancelled:
            self.app.call_from_thread(self._bought, outcome)

    def _bought(self, outcome) -> None:
        if not self.buying:
            return  # cleared meanwhile (new rows)
        self.buying = False
        kind, payload = outcome
        if kind == "done":
            from picker.commands.design_buy import buy_section

            self.buy = payload
            self._buy_line(Group(*buy_section(payload)))
        elif kind == "stopped":  # the helper process ended without an answer
            self._buy_line("what to buy: the helper process ended, no suggestion (p: again)")
        else:
            self._buy_line(say("error", f"what to buy: {payload}"))

    def action_stop(self) -> None:
        """s: stop the suggestion search; with none running, the screen's search."""
        if self.buying:  # stopped now: a result that still comes is not shown
            self.buying = False
            self.buy_lane.cancel()
            self._buy_line("what to buy: stopped, no suggestion (p: try again)")
            return
        stop = getattr(self.screen, "action_stop_search", None)
        if stop is not None:
            stop()
