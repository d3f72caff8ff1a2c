"""Repair mode: a stage as built, and stock parts that replace a failed one.

Opened with ``m`` from the main screen. The cautions come first (a dialog: y goes on,
n goes back). Then: choose the circuit, type each position's value as marked (RKM or
SI, ``/tolerance`` optional), optionally the op amp's GBW; the screen shows f0, Q, gain,
the tolerance extremes and the magnitude/phase plot. Choose the failed part (and the
ones free to change too) and the ranked substitutes from the stock follow, with their
drawers and f0/Q/gain error. ``b`` (or enter on a row) builds one through the same
saved design -> build plan -> confirmation -> build path as the chosen pane.

Analysis and substitution run in child processes (``picker.ui.offload``), each in its
own lane: a newer reading kills the older job. See docs/repair.md ("Terminal UI").
"""

from __future__ import annotations

from pathlib import Path

from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import Screen
from textual.timer import Timer
from textual.widgets import DataTable, Static
from textual.worker import Worker, WorkerState, get_current_worker

from picker.ui import backend, offload
from picker.ui.offload import Cancelled, Lane
from picker.ui.screens import repair_jobs as jobs
from picker.ui.widgets.common import (
    KeysFooter,
    MessageBox,
    Plain,
    RowTable,
    TypingAware,
    cell,
    say,
)
from picker.ui.widgets.plots import ResponsePlot
from picker.ui.widgets.repair_form import Reading, RepairForm
from stock.errors import PickerError

DEBOUNCE_S = 0.3
COLUMNS = ("#", "worst", "f0 err", "Q err", "gain err", "pcs", "parts [drawer]")


def cautions_text() -> str:
    from picker.repair.safety import caution_lines

    return "\n".join(caution_lines())


class RepairScreen(TypingAware, Screen):
    DEFAULT_CSS = """
    RepairScreen #r-title { height: 1; background: $panel; }
    RepairScreen #r-body { height: 1fr; }
    RepairScreen #r-analysis, RepairScreen #r-sub-status { height: auto; padding: 0 1; }
    RepairScreen #r-options { height: auto; max-height: 12; }
    RepairScreen #r-cautions { height: auto; padding: 1 1 0 1; }
    RepairScreen #r-status-box { max-height: 4; }
    """
    BINDINGS = [
        Binding("ctrl+g,escape", "close", "back", key_display="^g"),
        Binding("b", "build", "build the option"),
        Binding("question_mark", "app.help", "help", key_display="?"),
    ]
    LETTER_ACTIONS = frozenset({"build", "app.help"})

    def __init__(self, stock_path: Path | None, stock=None) -> None:
        super().__init__()
        self.stock_path = stock_path
        self.stock = stock
        self.reading: Reading | None = None
        self.substitution = None  # the Substitution shown in the table
        self.analysis: dict | None = None
        self._timer: Timer | None = None
        self._jobs = {"analyse": 0, "substitute": 0}  # generation of the newest job
        self._busy: set[str] = set()
        self.lanes = {"analyse": Lane("repair-analyse"), "substitute": Lane("repair-substitute")}
        self.confirmed = False  # the cautions were read

    def compose(self) -> ComposeResult:
        name = self.stock_path.name if self.stock_path else "no stock file"
        yield Plain(
            f"repair: a stage as built, stock parts for a failed one   {name}",
            id="r-title",
        )
        with VerticalScroll(id="r-body"):
            yield RepairForm(id="r-form")
            yield Plain("", id="r-sub-status")
            table: DataTable = RowTable(id="r-options", zebra_stripes=False)
            table.add_columns(*COLUMNS)
            yield table
            yield Plain("", id="r-analysis")
            yield ResponsePlot(id="r-plot")
            yield Plain(cautions_text(), id="r-cautions")
        with MessageBox(id="r-status-box"):  # wraps, and scrolls past 4 lines
            yield Plain("", id="r-status")
        yield KeysFooter()

    def on_mount(self) -> None:
        offload.start()  # idempotent: the main screen has started it already
        self.query_one(ResponsePlot).set_note("type a value for every position")
        from picker.ui.screens.confirm import ConfirmScreen

        def answered(yes: bool | None) -> None:
            if not yes:
                if self.app.screen is self:
                    self.app.pop_screen()
                return
            self.confirmed = True
            self.query_one("#r-topology").focus()

        self.app.push_screen(
            ConfirmScreen(
                "Repair mode: read these cautions first.",
                cautions_text(),
                yes="y: I have read them, go on",
                no="n: back to the main screen",
            ),
            answered,
        )

    def on_unmount(self) -> None:
        for lane in self.lanes.values():
            lane.cancel()

    @property
    def idle(self) -> bool:
        """No reading waiting for its pause and no job running (for tests)."""
        return self._timer is None and not self._busy

    def _status(self, text: str) -> None:
        self.query_one("#r-status", Static).update(text)

    def action_close(self) -> None:
        """Back to the main screen (escape too)."""
        if self.app.screen is self:
            self.app.pop_screen()

    # reading -----------------------------------------------------------------------
    @on(RepairForm.Changed)
    def _form_changed(self, event: RepairForm.Changed) -> None:
        self.reading = event.reading
        if self._timer is not None:
            self._timer.stop()
        self._timer = self.set_timer(DEBOUNCE_S, self._start)

    def _start(self) -> None:
        self._timer = None
        r = self.reading
        if r is None:
            return
        text = self.query_one("#r-analysis", Static)
        if r.stage is None:
            self.analysis = None
            text.update(say("waiting", "give every position a value (see beside each field)"))
            self.query_one(ResponsePlot).set_note("type a value for every position")
            self._clear_options("no analysis yet: the values are not complete")
            return
        text.update("[busy] analysing …")
        self._run("analyse", jobs.analyse_job, r.stage, r.gbw_hz)
        if r.failed is None:
            self._clear_options("choose the failed part to see substitutes from the stock")
        elif self.stock is None:
            self._clear_options(
                "no stock loaded: start picker with --stock FILE"
                if self.stock_path is None
                else "the stock file is not read (yet, or it has a fault: see pane 1)"
            )
        elif r.errors:
            self._clear_options(say("waiting", "; ".join(r.errors)))
        else:
            what = r.failed + (f" (with {', '.join(r.free)} free)" if r.free else "")
            self._clear_options(f"[busy] looking for substitutes for {what} …")
            self._run(
                "substitute",
                jobs.substitute_job,
                r.stage,
                self.stock,
                r.failed,
                r.free,
                r.singles,
                r.allow_polarized,
            )

    def _run(self, lane: str, fn, *args) -> None:
        self._jobs[lane] += 1
        self._busy.add(lane)
        self._job(lane, self._jobs[lane], fn, args)

    @work(thread=True, group="repair", exit_on_error=False)
    def _job(self, lane: str, generation: int, fn, args: tuple) -> None:
        worker = get_current_worker()
        try:
            outcome = ("done", self.lanes[lane].run(fn, *args))
        except Cancelled:
            return
        except PickerError as exc:
            outcome = ("error", str(exc))
        if not worker.is_cancelled:
            self.app.call_from_thread(self._job_done, lane, generation, outcome)

    def _job_done(self, lane: str, generation: int, outcome) -> None:
        if generation != self._jobs[lane]:
            return  # a newer job in this lane is on its way
        self._busy.discard(lane)
        kind, payload = outcome
        if lane == "analyse":
            self._show_analysis(kind, payload)
        else:
            self._show_options(kind, payload)

    @on(Worker.StateChanged)
    def _worker_failed(self, event: Worker.StateChanged) -> None:
        if event.worker.group == "repair" and event.state == WorkerState.ERROR:
            self._busy.clear()
            self._status(say("error", f"the computation failed: {event.worker.error}"))

    # showing -----------------------------------------------------------------------
    def _show_analysis(self, kind: str, payload) -> None:
        text = self.query_one("#r-analysis", Static)
        plot = self.query_one(ResponsePlot)
        if kind != "done":
            self.analysis = None
            text.update(say("error", payload))
            plot.set_note("no response: " + payload)
            return
        self.analysis = payload
        assert self.reading is not None
        head = f"{self.reading.topology} as marked:"
        text.update("\n".join([head, *payload["lines"], payload["corner"]]))
        plot.set_curve(*payload["curve"])

    def _clear_options(self, note: str) -> None:
        self.substitution = None
        self.query_one("#r-options", DataTable).clear()
        self.query_one("#r-sub-status", Static).update(note)

    def _show_options(self, kind: str, payload) -> None:
        table = self.query_one("#r-options", DataTable)
        table.clear()
        status = self.query_one("#r-sub-status", Static)
        if kind != "done":
            self.substitution = None
            status.update(say("no substitute", payload))
            return
        self.substitution = sub = payload
        for rank, option in enumerate(sub.options, start=1):
            table.add_row(*(cell(c) for c in jobs.option_cells(option, rank)))
        t = sub.intended
        q = "" if t.q is None else f", Q {t.q:.4g}"
        status.update(
            f"substitutes for {', '.join(sub.refill)}, best first, against the intended "
            f"f0 {backend.format_si(t.f0_hz, 'Hz')}{q}, gain {t.gain:.4g}"
            "   (b or enter: build one)"
        )
        table.scroll_visible(animate=False)

    # building ----------------------------------------------------------------------
    @on(DataTable.RowSelected, "#r-options")
    def _row_chosen(self) -> None:
        self.action_build()

    def action_build(self) -> None:
        sub = self.substitution
        if sub is None or not sub.options:
            self._status(say("error", "no substitutes shown: choose the failed part first"))
            return
        if self.stock is None or self.stock.path is None:
            self._status(say("error", "no stock file is open"))
            return
        pick = self.query_one("#r-options", DataTable).cursor_row + 1
        pick = min(max(pick, 1), len(sub.options))
        try:
            plan = jobs.plan_repair_build(sub, pick, self.stock)
            body = backend.build_listing(plan)
        except PickerError as exc:
            self._status(say("refused", str(exc)))
            return
        parts = jobs.option_cells(sub.options[pick - 1], pick)[-1]
        stock_path = self.stock.path
        from picker.ui.screens.confirm import ConfirmScreen

        def answered(yes: bool | None) -> None:
            if not yes:
                self._status("build cancelled: the stock file is unchanged")
                return
            try:
                note = backend.do_build(plan, stock_path)
            except PickerError as exc:
                self._status(say("refused", str(exc) + " (the stock file is unchanged)"))
                return
            self._status(f"built: {note}   (undo: picker undo, or u in pane 4)")
            self._stock_changed(f"built repair option {pick}: {note}")

        self.app.push_screen(
            ConfirmScreen(
                f"Build repair option {pick} ({parts}): take these parts out of "
                f"{Path(stock_path).name}?",
                body + "\n\n" + cautions_text(),
                yes="y: yes, take them out",
                no="n: no, leave the stock as it is",
            ),
            answered,
        )

    def _stock_changed(self, note: str) -> None:
        """Read the stock again on the main screen (which hands it here), then search again."""
        from picker.ui.screens.main import MainScreen

        mains = [s for s in self.app.screen_stack if isinstance(s, MainScreen)]
        for screen in mains:
            screen.read_stock(note)  # calls stock_read below
        if not mains:
            try:
                assert self.stock_path is not None  # a build needs the stock file
                self.stock_read(backend.load_stock(self.stock_path))
            except PickerError as exc:
                self.stock_read(None)
                self._status(say("error", f"cannot read the stock file again: {exc}"))

    def stock_read(self, stock) -> None:
        """The stock as the main screen read it (None: it could not be read)."""
        self.stock = stock
        if self.is_mounted and self.reading is not None:
            self._start()


def open_repair(main) -> None:
    """Push the repair screen with the main screen's stock file and stock."""
    main.app.push_screen(RepairScreen(main.stock_path, main.stock))
