"""The chosen pane: one candidate up close, and building it.

Shows, from the top: what the pick answers, the budget's headline (the yield), the
text schematic (reference designators, values, drawers), then the warnings, the whole
error budget, the magnitude/phase plot and the Monte Carlo histogram of f0. At 80x24
the first three are on screen without scrolling; the rest is reached with space or
page down, j/k or the arrows, and each new pick starts at the top. The budget and the
response are computed in a child process. Build and undo ask first, then go through
the building API (``picker.building``) and post ``ChosenPane.StockChanged``.
"""

from __future__ import annotations

from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.message import Message
from textual.widgets import Static
from textual.worker import Worker, WorkerState, get_current_worker

from picker.report.design import pct
from picker.report.owner import owner_lines
from picker.ui import backend
from picker.ui.build_text import build_listing
from picker.ui.offload import Cancelled, Lane
from picker.ui.pick_targets import answers, differences
from picker.ui.widgets.common import Plain, say
from picker.ui.widgets.plots import F0Histogram, ResponsePlot
from stock.errors import PickerError

BUSY = "[busy] computing …"


class ChosenPane(VerticalScroll):
    BINDINGS = [
        Binding("b", "build", "build"),
        Binding("u", "undo", "undo build"),
        Binding("w", "write_files", "write files"),
        Binding("j", "scroll_down", "down", show=False),
        Binding("k", "scroll_up", "up", show=False),
        Binding("space", "page_down", "page down", show=False),
    ]

    class StockChanged(Message):
        def __init__(self, note: str) -> None:
            self.note = note
            super().__init__()

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.candidate = None
        self.targets = None
        self.lane = Lane("detail")
        self.rank = 0
        self.stock = None
        self.current_targets = None  # the form's targets now (None: a field is wrong)

    def compose(self) -> ComposeResult:
        yield Plain("no candidate chosen yet: pick one in pane 3 (matches)", id="c-title")
        yield Plain("", id="c-stale")
        yield Plain("", id="c-status")
        yield Static("", id="c-headline")
        with Vertical(id="c-body"):
            yield Plain("", id="c-schematic")
            yield Plain("", id="c-warnings")
            yield Plain("", id="c-budget")
            yield ResponsePlot(id="c-plot")
            yield F0Histogram(id="c-hist")

    def on_mount(self) -> None:
        for name in ("#c-stale", "#c-status", "#c-headline", "#c-warnings"):
            self.query_one(name).display = False

    def _line(self, name: str, text) -> None:
        """Show ``text`` in the static ``name``; an empty one takes no row."""
        static = self.query_one(name, Static)
        static.update(text)
        static.display = bool(str(text))

    def on_unmount(self) -> None:
        self.lane.cancel()

    def set_stock(self, stock) -> None:
        self.stock = stock

    # showing ---------------------------------------------------------------------
    def show(self, candidate, rank: int, targets=None) -> None:
        from picker.report.schematic import schematic

        self.candidate, self.rank, self.targets = candidate, rank, targets
        self.current_targets = targets
        warn = f"; {len(candidate.warnings)} warning(s) below" if candidate.warnings else ""
        what = f" for {answers(targets)}" if targets is not None else ""
        self.query_one("#c-title", Static).update(
            f"candidate {rank}{what}\nworst error {pct(candidate.score, 3)}, "
            f"{candidate.pieces} pieces{warn}   (b: build it, w: write files)"
        )
        self._show_stale()
        self._line("#c-status", "")
        self._line("#c-headline", f"error budget: {BUSY}")
        # drawers, op amp names and notes are owner text: shown as written, controls escaped
        self.query_one("#c-schematic", Static).update(schematic(candidate))  # a Text
        warnings = "\n".join(f"warning: {w}" for w in candidate.warnings)
        self._line("#c-warnings", owner_lines(warnings))
        self.query_one("#c-budget", Static).update(f"error budget: {BUSY}")
        self.query_one(ResponsePlot).set_note(BUSY)
        self.query_one(F0Histogram).set_note(BUSY)
        self.scroll_home(animate=False)  # a new pick starts at the top
        self._detail(candidate)

    def set_current(self, targets) -> None:
        """The form's targets changed: mark the pick when it no longer answers them."""
        self.current_targets = targets
        self._show_stale()

    def stale(self) -> list[str]:
        """How the targets of the pick differ from the form's now (empty: they agree)."""
        if self.candidate is None or self.targets is None:
            return []
        return differences(self.targets, self.current_targets)

    def _show_stale(self) -> None:
        diff = self.stale()
        text = (
            "[old] this pick answers earlier targets, not the form's now: "
            + "; ".join(diff)
            + ". Pick again in pane 3, or b asks before building it anyway."
            if diff
            else ""
        )
        self._line("#c-stale", text)

    @work(thread=True, exclusive=True, group="detail", exit_on_error=False)
    def _detail(self, candidate) -> None:
        """Response and budget of ``candidate``, computed in a child process."""
        worker = get_current_worker()
        try:
            out = self.lane.run(backend.detail_job, candidate, self.targets)  # its budget inputs
        except Cancelled:
            return
        except PickerError as exc:
            out = {"plot_note": f"error: {exc}", "budget_note": f"error: {exc}"}
        if not worker.is_cancelled:
            self.app.call_from_thread(self._detail_done, candidate, out)

    def _detail_done(self, candidate, out: dict) -> None:
        if candidate is not self.candidate:
            return
        plot = self.query_one(ResponsePlot)
        if "plot" in out:
            fc = self.targets.fc_hz if self.targets is not None else None
            freqs, mag_db, phase_deg = out["plot"]
            plot.set_curve(freqs, mag_db, phase_deg, fc_hz=fc)
        else:
            plot.set_note(out.get("plot_note", ""))
        budget_static = self.query_one("#c-budget", Static)
        hist = self.query_one(F0Histogram)
        if "budget" in out:
            from picker.report.budget_panel import BudgetPanel, yield_line

            budget = out["budget"]
            head = Text("error budget: ")
            head.append_text(yield_line(budget))
            warned = f"; {len(budget.warnings)} budget warning(s)" if budget.warnings else ""
            head.append(f"{warned}; the whole budget below (space / page down)")
            self._line("#c-headline", head)
            budget_static.update(BudgetPanel(budget, compact=True))
            hist.set_histogram(backend.f0_histogram(budget))
        else:
            note = out.get("budget_note", "none")
            self._line("#c-headline", Text(f"error budget: {note}"))
            budget_static.update(Text(f"error budget: {note}"))
            hist.set_note(note)

    @on(Worker.StateChanged)
    def _worker_failed(self, event: Worker.StateChanged) -> None:
        if event.state == WorkerState.ERROR:
            self._status(say("error", f"{event.worker.error}"))

    # building --------------------------------------------------------------------
    def _status(self, text: str) -> None:
        """A line under the title (seen without scrolling: the view goes to the top)."""
        self._line("#c-status", owner_lines(text))  # it can quote a drawer or a note
        self.scroll_home(animate=False)

    def action_build(self) -> None:
        if self.candidate is None:
            self._status(say("error", "choose a candidate first (pane 3)"))
            return
        if self.stock is None or self.stock.path is None:
            self._status(say("error", "no stock file is open"))
            return
        try:
            plan = backend.plan_build(self.candidate, self.stock, self.targets)
            body = build_listing(plan, self.stock)
        except PickerError as exc:
            self._status(say("refused", str(exc)))
            return
        from picker.ui.screens.confirm import ConfirmScreen

        def answered(yes: bool | None) -> None:
            if not yes:
                self._status("build cancelled: the stock file is unchanged")
                return
            try:
                note = backend.do_build(plan, self.stock.path)
            except PickerError as exc:
                self._status(say("refused", str(exc) + " (the stock file is unchanged)"))
                return
            self._status(f"built: {note}   (u: undo)")
            self.post_message(self.StockChanged(f"built candidate {self.rank}: {note}"))

        what = f" ({answers(self.targets)})" if self.targets is not None else ""
        diff = self.stale()
        if diff:
            question = (
                f"Build candidate {self.rank}{what}? It answers earlier targets, not the "
                f"form's now: {'; '.join(diff)}. Take its parts out anyway?"
            )
            yes = "y: yes, build it for the earlier targets"
        else:
            question = f"Build candidate {self.rank}{what}: take these parts out of the stock file?"
            yes = "y: yes, take them out"
        self.app.push_screen(
            ConfirmScreen(question, body, yes=yes, no="n: no, leave the stock as it is"),
            answered,
        )

    def action_write_files(self) -> None:
        """w: the saved design, BOM CSV and netlist, through a short form of names."""
        if self.candidate is None:
            self._status(say("error", "choose a candidate first (pane 3)"))
            return
        from picker.ui.screens.write_files import WriteFilesScreen

        def answered(done: list[str] | None) -> None:
            if done:
                self._status("wrote: " + "; ".join(done))
            else:
                self._status("nothing written")

        self.app.push_screen(
            WriteFilesScreen(self.candidate, self.rank, self.targets, self.stock), answered
        )

    def action_undo(self) -> None:
        if self.stock is None or self.stock.path is None:
            self._status(say("error", "no stock file is open"))
            return
        try:
            last = backend.last_build(self.stock.path)
        except PickerError as exc:
            self._status(say("refused", str(exc)))
            return
        from picker.ui.screens.confirm import ConfirmScreen

        def answered(yes: bool | None) -> None:
            if not yes:
                self._status("undo cancelled: the stock file is unchanged")
                return
            try:
                note = backend.undo_last(self.stock.path)
            except PickerError as exc:
                self._status(say("refused", str(exc) + " (the stock file is unchanged)"))
                return
            self._status(f"undone: {note}")
            self.post_message(self.StockChanged(f"undid the last build: {note}"))

        self.app.push_screen(
            ConfirmScreen(
                "Undo the last build: put the file back as it was before it?",
                last,
                yes="y: yes, restore the file",
                no="n: no, keep it as it is",
            ),
            answered,
        )
