"""Step and delay views of the chosen candidate: ``v`` from the main screen.

The numbers and the two-row block curves come from the report's ``ViewsPanel``
(``picker.report.views``) over ``picker.analysis.step_delay.candidate_views``; under
them two braille plots make the shape plain at a glance: the step response against
time (a Chebyshev's overshoot and ringing) and the group delay against log frequency
(a Bessel's flat delay up to its corner). Computed in a child process
(``picker.ui.offload``). See docs/outputs.md ("Views").
"""

from __future__ import annotations

import math

from rich.console import Group
from rich.text import Text
from textual import work
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import Screen
from textual.widgets import Static
from textual.worker import get_current_worker

from picker.ui import offload
from picker.ui.offload import Cancelled, Lane
from picker.ui.widgets.common import KeysFooter, Plain, say
from stock.errors import PickerError

PLOT_ROWS = 7
UNITS = ((1.0, "s"), (1e-3, "ms"), (1e-6, "µs"), (1e-9, "ns"))


def views_job(candidate):
    """The step and delay views of ``candidate`` (a CandidateViews), in a child process."""
    from picker.analysis.step_delay import candidate_views

    return candidate_views(candidate, ("step", "delay"))


def nice_step(span: float, parts: int = 4) -> float:
    """A 1-2-5 step that cuts ``span`` into about ``parts`` pieces."""
    if not span > 0:
        return 1.0
    raw = span / parts
    base = 10.0 ** math.floor(math.log10(raw))
    for m in (1.0, 2.0, 5.0, 10.0):
        if m * base >= raw:
            return m * base
    return 10.0 * base


def time_unit(seconds: float) -> tuple[float, str]:
    """The scale and name of the unit that shows ``seconds`` as a number from 1 up."""
    for scale, name in UNITS:
        if abs(seconds) >= scale:
            return scale, name
    return UNITS[-1]


def step_plot(step, width: int) -> list[str]:
    """The step response against time, up to twice its settling time."""
    from picker.report.charplot import labelled_plot, nice_range

    t, y = list(step.t_s), list(step.y)
    end = len(t)
    if step.settling_s:
        end = next((i for i, x in enumerate(t) if x > 2 * step.settling_s), end)
    end = max(end, min(len(t), 8))
    t, y = t[:end], y[:end]
    scale, unit = time_unit(t[-1])
    xs = [x / scale for x in t]
    x_step = nice_step(xs[-1])
    ticks = [(k * x_step, f"{k * x_step:g}") for k in range(int(xs[-1] / x_step) + 1)]
    lo, hi = min(y), max(y)
    y_step = nice_step(hi - lo)
    lines = [f"step response, V, against time, {unit} (1 V step in)"]
    lines += labelled_plot(
        xs, y, width=width, height=PLOT_ROWS, x_range=(0.0, xs[-1]),
        y_range=nice_range(lo, hi, y_step), y_step=y_step, y_unit="", x_ticks=ticks,
    )  # fmt: skip
    return lines


def delay_plot(delay, width: int) -> list[str]:
    """The group delay against log frequency."""
    from picker.report.charplot import decade_ticks, labelled_plot, nice_range

    f, tau = list(delay.f_hz), list(delay.delay_s)
    scale, unit = time_unit(max(tau))
    ys = [d / scale for d in tau]
    xs = [math.log10(x) for x in f]
    ticks = decade_ticks(f[0], f[-1])
    top = max(ys)
    y_step = nice_step(top)
    lines = [f"group delay, {unit}, against frequency, Hz"]
    lines += labelled_plot(
        xs, ys, width=width, height=PLOT_ROWS, x_range=(xs[0], xs[-1]),
        y_range=nice_range(min(0.0, min(ys)), top, y_step), y_step=y_step, y_unit="",
        x_ticks=ticks,
    )  # fmt: skip
    return lines


def views_text(views, width: int) -> list[str]:
    """Both braille plots, one under the other."""
    lines: list[str] = []
    if views.step is not None:
        lines += step_plot(views.step, width)
    if views.delay is not None:
        lines += [""] + delay_plot(views.delay, width)
    return lines


class ViewsScreen(Screen):
    """The views of one candidate; ``candidate`` as the matches pane gives it."""

    DEFAULT_CSS = """
    ViewsScreen #v-title { height: 1; background: $panel; }
    ViewsScreen #v-body { height: 1fr; }
    ViewsScreen #v-panel, ViewsScreen #v-plots { height: auto; }
    """
    BINDINGS = [
        Binding("ctrl+g,escape,q", "close", "back", key_display="^g / q"),
        Binding("question_mark", "app.help", "help", key_display="?"),
    ]

    def __init__(self, candidate, rank: int = 0) -> None:
        super().__init__()
        self.candidate = candidate
        self.rank = rank
        self.views = None
        self.done = False  # True once the views (or a reason) are shown (for tests)
        self.lane = Lane("views")

    def compose(self) -> ComposeResult:
        stages = len(self.candidate.stages)
        which = f"candidate {self.rank}" if self.rank else "the chosen candidate"
        yield Plain(
            f"step and delay views of {which} ({stages} stage(s))   ^g / q: back",
            id="v-title",
        )
        with VerticalScroll(id="v-body"):
            yield Plain(
                "[busy] computing the step response and the group delay …",
                id="v-panel",
            )
            yield Plain("", id="v-plots")
        yield KeysFooter()

    def on_mount(self) -> None:
        offload.start()
        self.query_one("#v-body").focus()
        self._compute(self.candidate)

    def on_unmount(self) -> None:
        self.lane.cancel()

    def action_close(self) -> None:
        if self.app.screen is self:
            self.app.pop_screen()

    @work(thread=True, exclusive=True, group="views", exit_on_error=False)
    def _compute(self, candidate) -> None:
        worker = get_current_worker()
        try:
            outcome = ("done", self.lane.run(views_job, candidate))
        except Cancelled:
            return
        except PickerError as exc:
            outcome = ("error", str(exc))
        except Exception as exc:  # shown as text, never a traceback
            outcome = ("error", f"{type(exc).__name__}: {exc}")
        if not worker.is_cancelled:
            self.app.call_from_thread(self._show, outcome)

    def _show(self, outcome) -> None:
        kind, payload = outcome
        panel = self.query_one("#v-panel", Static)
        if kind != "done":
            panel.update(Text(say("error", f"no views: {payload}")))
            self.done = True
            return
        from picker.report.views import ViewsPanel

        self.views = payload
        panel.update(Group(ViewsPanel(payload)))
        width = max(self.size.width - 2, 30)
        self.query_one("#v-plots", Static).update("\n".join(views_text(payload, width)))
        self.done = True


def open_views(main) -> None:
    """Push the views of the main screen's chosen candidate, or say there is none."""
    from picker.ui.widgets.chosen import ChosenPane

    panes = list(main.query(ChosenPane))
    if not panes or panes[0].candidate is None:
        main.notify("views: choose a candidate first (pane 3, then enter)", severity="warning")
        return
    main.app.push_screen(ViewsScreen(panes[0].candidate, panes[0].rank))
