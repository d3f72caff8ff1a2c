"""The main screen: four panes behind one bar, the search worker, the stock state.

Panes are switched with 1-4 (outside text fields), F1-F4 or ctrl+n (anywhere); only the
pane shown takes part in tab focus. The screen owns the stock read from the file and
the targets; a change of either restarts the search after a short pause.
"""

from __future__ import annotations

import time
from pathlib import Path

from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.screen import Screen
from textual.timer import Timer
from textual.widgets import ContentSwitcher, Static
from textual.worker import Worker, WorkerState, get_current_worker

from picker.ui import backend, offload
from picker.ui.offload import Cancelled, Lane
from picker.ui.targets_form import Targets
from picker.ui.widgets.chosen import ChosenPane
from picker.ui.widgets.common import FocusRows, KeysFooter, TypingAware, plain_lines
from picker.ui.widgets.drawers import DrawersPane
from picker.ui.widgets.matches import MatchesPane
from picker.ui.widgets.targets import TargetsPane
from stock.errors import PickerError, StockFileError

PANES = (
    ("drawers", "drawers"),
    ("targets", "targets"),
    ("matches", "matches"),
    ("chosen", "chosen"),
)
DEBOUNCE_S = 0.3
PAUSE_S = 0.15  # between the steps of start-up
# where the focus lands when a pane is shown (else its first focusable widget)
FIRST_FOCUS = {"drawers": "#stock-table", "matches": "#m-table", "chosen": "#chosen"}


def describe(targets: Targets) -> str:
    text = f"order {targets.order} {targets.response} {targets.response_type}"
    return text + f" at {targets.fc_hz:g} Hz"


def bar_text(current: str, *, busy: bool, stock_name: str) -> Text:
    """The pane names with the current one in brackets, the busy mark, the file name."""
    text = Text()
    for n, (pane_id, label) in enumerate(PANES, 1):
        if pane_id == current:
            text.append(f"[{n} {label}]", style="reverse bold")
        else:
            text.append(f" {n} {label} ")
        text.append(" ")
    text.append("  [busy] " if busy else "  ", style="bold")
    text.append(plain_lines(stock_name))  # a file name is owner text too
    return text


class PaneBar(Static):
    """The pane names with the current one marked by brackets, and the busy state."""

    def show(self, current: str, *, busy: bool, stock_name: str) -> None:
        self.update(bar_text(current, busy=busy, stock_name=stock_name))


class MainScreen(FocusRows, TypingAware, Screen):
    BINDINGS = [
        Binding("ctrl+n", "next_pane", "next pane", key_display="^n", priority=True),
        Binding("1", "pane('drawers')", "drawers", show=False),
        Binding("2", "pane('targets')", "targets", show=False),
        Binding("3", "pane('matches')", "matches", show=False),
        Binding("4", "pane('chosen')", "chosen", show=False),
        # the same from anywhere, also from inside a text field (where 1-4 are text)
        Binding("f1", "goto_pane('drawers')", "drawers", show=False),
        Binding("f2", "goto_pane('targets')", "targets", show=False),
        Binding("f3", "goto_pane('matches')", "matches", show=False),
        Binding("f4", "goto_pane('chosen')", "chosen", show=False),
        Binding("question_mark", "app.help", "help", key_display="?"),
        Binding("s", "stop_search", "stop search", show=False),
        Binding("m", "repair", "repair", show=False),  # in the help: the footer is full
        Binding("v", "views", "views"),  # shown on pane 4 only (check_action)
    ]
    LETTER_ACTIONS = frozenset({"pane", "app.help", "repair", "views", "stop_search"})

    def __init__(self, stock_path: Path | None, note: str | None = None) -> None:
        super().__init__()
        self.stock_path = stock_path
        self.note = note
        self.stock = None
        self.targets: Targets | None = None
        self.result_targets: Targets | None = None  # the targets of the matches shown
        self.busy = False
        self.generation = 0
        self._timer: Timer | None = None
        self._searching: Targets | None = None
        self.started = False  # True once every pane is mounted
        self._wanted_pane: str | None = None
        self.mounting = False  # the lazy panes are being mounted
        self.quit_wanted = False  # ctrl+q came meanwhile: quit once they are
        self.lane = Lane("search")
        self._stop = None  # the running search's stop event (shared with its process)

    def compose(self) -> ComposeResult:
        name = self.stock_path.name if self.stock_path else "no stock file"
        yield PaneBar(bar_text("drawers", busy=False, stock_name=name), id="pane-bar")
        with ContentSwitcher(initial="drawers", id="panes"):
            yield DrawersPane(id="drawers")  # the other panes come after the first paint
        yield KeysFooter()

    def on_mount(self) -> None:
        self._bar()
        self.query_one("#stock-table").focus()
        # Start-up in steps, each a moment after the last so that the frame before it
        # reaches the terminal (Textual writes frames from a thread that needs the
        # interpreter too): first paint, then the stock file, then the other panes.
        # (a timer, not call_after_refresh: with nothing else to redraw that could wait
        # for a refresh that never comes)
        self.set_timer(PAUSE_S, self._second_step)

    def _second_step(self) -> None:
        self.read_stock(self.note or "")
        self.set_timer(PAUSE_S, self._third_step)

    async def _third_step(self) -> None:
        offload.start()  # the fork server imports the core meanwhile
        panes = [TargetsPane(id="targets"), MatchesPane(id="matches"), ChosenPane(id="chosen")]
        for pane in panes:
            pane.display = False
        # Quitting in the middle of this would tear the panes down while they still
        # set themselves up (their on_mount finds no children and the app fails with
        # exit status 1): the quit waits for the mount, a fraction of a second.
        self.mounting = True
        try:
            await self.query_one(ContentSwitcher).mount_all(panes)
        finally:
            self.mounting = False
        if self.quit_wanted:
            self.app.exit()
            return
        for chosen in self.query(ChosenPane):
            chosen.set_stock(self.stock)
        self.started = True
        if self._wanted_pane is not None:  # a pane key pressed in the first moment
            self.action_pane(self._wanted_pane)

    def on_unmount(self) -> None:
        self.lane.cancel()

    @property
    def idle(self) -> bool:
        """Started, with no search waiting for its pause or running (for tests)."""
        return self.started and self._timer is None and not self.busy

    # panes -----------------------------------------------------------------------
    @property
    def current(self) -> str:
        return self.query_one(ContentSwitcher).current or "drawers"

    def _bar(self) -> None:
        name = self.stock_path.name if self.stock_path else "no stock file"
        self.query_one(PaneBar).show(self.current, busy=self.busy, stock_name=name)

    def action_pane(self, pane_id: str) -> None:
        if not self.started:
            # still mounting (a pane half mounted has nothing to focus yet): go there
            # once every pane is in place
            self._wanted_pane = None if pane_id == "drawers" else pane_id
            return
        self.query_one(ContentSwitcher).current = pane_id
        self._bar()
        pane = self.query_one(f"#{pane_id}")
        first = FIRST_FOCUS.get(pane_id)
        focusable = [w for w in pane.query(first or "*") if w.focusable]
        (focusable[0] if focusable else pane).focus()
        self.refresh_bindings()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "views" and self.current != "chosen":
            return False  # the views of the chosen candidate: v on pane 4
        return super().check_action(action, parameters)

    def action_repair(self) -> None:
        from picker.ui.screens.repair import open_repair

        open_repair(self)

    def action_views(self) -> None:
        from picker.ui.screens.views import open_views

        open_views(self)

    def action_goto_pane(self, pane_id: str) -> None:
        """F1-F4: a pane from anywhere (1-4 are text inside a field)."""
        self.action_pane(pane_id)

    def action_next_pane(self) -> None:
        ids = [p for p, _ in PANES]
        self.action_pane(ids[(ids.index(self.current) + 1) % len(ids)])

    # stock -----------------------------------------------------------------------
    def read_stock(self, note: str = "") -> None:
        drawers = self.query_one(DrawersPane)
        if self.stock_path is None:
            drawers.show_error("no stock file: start with picker --stock FILE")
            return
        try:
            self.stock = backend.load_stock(self.stock_path)
        except StockFileError as exc:
            self.stock = None
            drawers.show_error("\n".join(exc.problems))
        except PickerError as exc:
            self.stock = None
            drawers.show_error(str(exc))
        else:
            drawers.show_stock(self.stock, note)
        for chosen in self.query(ChosenPane):  # absent until the lazy mount is done
            chosen.set_stock(self.stock)
        # a screen opened over this one before the file was read (m pressed in the
        # first moment) gets the stock now, not never
        for screen in self.app.screen_stack:
            if screen is not self and hasattr(screen, "stock_read"):
                screen.stock_read(self.stock)
        if self.stock is not None:
            self.schedule_search()

    @on(DrawersPane.StockChanged)
    @on(ChosenPane.StockChanged)
    def _stock_changed(self, event) -> None:
        self.read_stock(event.note)

    # search ----------------------------------------------------------------------
    @on(TargetsPane.Changed)
    def _targets_changed(self, event: TargetsPane.Changed) -> None:
        self.targets = event.targets
        for chosen in self.query(ChosenPane):
            chosen.set_current(event.targets)
        self.schedule_search()

    @on(TargetsPane.Invalid)
    def _targets_invalid(self) -> None:
        self.targets = None
        for chosen in self.query(ChosenPane):
            chosen.set_current(None)
        if self._timer is not None:
            self._timer.stop()
            self._timer = None
        self.query_one(MatchesPane).show_stale(
            "the targets have a field marked error (pane 2): these matches answer "
            "the earlier targets"
        )

    def schedule_search(self) -> None:
        """Search again after DEBOUNCE_S of quiet: typing restarts the pause."""
        if self._timer is not None:
            self._timer.stop()
        self._timer = self.set_timer(DEBOUNCE_S, self._start_search)

    def _start_search(self) -> None:
        self._timer = None
        if self.targets is None:
            return
        matches = self.query_one(MatchesPane)
        if self.stock is None:
            matches.show_message("no stock loaded: see pane 1")
            return
        self.generation += 1
        self.busy = True
        self._bar()
        what = describe(self.targets)
        matches.show_busy(what + " (s: stop, keep the best so far)")
        for targets_pane in self.query(TargetsPane):
            targets_pane.show_progress(f"searching: {what}")
        self._stop = offload.context().Event()
        self._search(self.stock, self.targets, self.generation, what, self._stop)
        self._searching = self.targets

    @work(thread=True, exclusive=True, group="search", exit_on_error=False)
    def _search(self, stock, targets: Targets, generation: int, what: str, stop) -> None:
        """Plan and search in a child process; a newer search kills this one."""
        worker = get_current_worker()
        t0 = time.perf_counter()
        try:
            kind, payload = self.lane.run(
                backend.search_job,
                stock,
                targets,
                stop,
                on_progress=lambda line: self.app.call_from_thread(
                    self._progress, generation, line
                ),
            )
            outcome = (kind if kind == "done" else "message", payload)
        except Cancelled:
            return
        except PickerError as exc:
            outcome = ("message", f"no design: {exc}")
        seconds = time.perf_counter() - t0
        if not worker.is_cancelled:
            self.app.call_from_thread(self._searched, generation, outcome, seconds, what)

    def _progress(self, generation: int, line: str) -> None:
        """The running search's stage, phase, time and best so far, in panes 2 and 3."""
        if generation != self.generation or not self.busy:
            return
        if self._stop is not None and self._stop.is_set():
            line = "stopping: " + line
        what = line.removeprefix("searching: ")
        self.query_one(MatchesPane).show_busy(what + " (s: stop, keep the best so far)")
        for targets_pane in self.query(TargetsPane):
            targets_pane.show_progress(line)

    def action_stop_search(self) -> None:
        """s: the running search stops and shows the best it found so far."""
        if self.busy and self._stop is not None:
            self._stop.set()
            self.query_one(MatchesPane).show_busy("stopping: the best so far comes next …")

    def _searched(self, generation: int, outcome, seconds: float, what: str) -> None:
        if generation != self.generation:
            return  # a newer search is on its way
        self.busy = False
        stopped = self._stop is not None and self._stop.is_set()
        self._stop = None
        self._bar()
        matches = self.query_one(MatchesPane)
        kind, payload = outcome
        self.result_targets = self._searching
        if kind == "done":
            matches.show_result(payload, seconds=seconds, what=what, stopped=stopped)
        else:
            matches.show_message(payload)
        for targets_pane in self.query(TargetsPane):  # the outcome in pane 2 as well
            targets_pane.show_outcome(matches.outcome)

    @on(Worker.StateChanged)
    def _worker_failed(self, event: Worker.StateChanged) -> None:
        """A search that broke: say so in the matches pane (never a traceback)."""
        if event.worker.group == "search" and event.state == WorkerState.ERROR:
            self.busy = False
            self._bar()
            error = event.worker.error
            self.query_one(MatchesPane).show_message(
                f"error: the search failed: {type(error).__name__}: {error}"
            )

    @on(MatchesPane.Chosen)
    def _chosen(self, event: MatchesPane.Chosen) -> None:
        if self.busy or self._timer is not None or self.targets != self.result_targets:
            # the rows answer earlier targets: a search for the current ones is waiting,
            # running, or cannot start (a field is wrong); open nothing
            old = describe(self.result_targets) if self.result_targets else "earlier targets"
            self.query_one(MatchesPane).show_stale(
                f"these rows answer {old}, not the targets now: wait for the search "
                "(or fix the field marked error in pane 2), then enter opens a row"
            )
            return
        chosen = self.query_one(ChosenPane)
        chosen.set_stock(self.stock)
        chosen.show(event.candidate, event.rank, self.result_targets)
        self.action_pane("chosen")
