"""Step and delay views of one candidate as a rich renderable (CLI report and TUI).

    from picker.analysis.step_delay import candidate_views
    console.print(ViewsPanel(candidate_views(candidate, ("step", "delay"))))

Numbers carry the meaning (overshoot, settling time, delay at DC and at its peak, phase
in degrees); a two-row block curve of each shows the shape at a glance: a Chebyshev's
ringing, a Bessel's flat delay. Fits 80 columns; nothing rests on colour.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from rich import box
from rich.console import Console, ConsoleOptions, Group, RenderResult
from rich.panel import Panel
from rich.table import Table
from rich.text import Text

from stock.values import format_si

# eighths of a character cell, empty to full (U+2581..U+2588)
BLOCKS = " ▁▂▃▄▅▆▇█"
CURVE_ROWS = 2
CURVE_WIDTH = 60


def block_curve(values: Sequence[float], *, width: int, rows: int = CURVE_ROWS) -> list[str]:
    """``values`` resampled to ``width`` columns and drawn as block bars ``rows`` high,
    from the smallest value (empty) to the largest (full)."""
    finite = [v for v in values if math.isfinite(v)]
    if not finite or width < 1:
        return []
    lo, hi = min(finite), max(finite)
    span = hi - lo or 1.0
    n = len(values)
    cols = [values[min(n - 1, round(i * (n - 1) / max(width - 1, 1)))] for i in range(width)]
    levels = [0 if not math.isfinite(v) else round((v - lo) / span * rows * 8) for v in cols]
    return block_rows(levels, rows=rows)


def block_rows(eighths: Sequence[int], *, rows: int, repeat: int = 1) -> list[str]:
    """Bars standing on the bottom row, top row first: column ``i`` filled to
    ``eighths[i]`` eighths of a row, each column ``repeat`` characters wide."""
    return [
        "".join(BLOCKS[max(0, min(8, e - r * 8))] * repeat for e in eighths)
        for r in range(rows - 1, -1, -1)
    ]


def count_eighths(counts: Sequence[int], *, rows: int) -> list[int]:
    """Histogram bins as bar heights in eighths of a row: the tallest bin fills ``rows``
    rows, and a bin with any count is never drawn empty."""
    top = max(counts, default=0) or 1
    return [max(round(c / top * rows * 8), 1) if c else 0 for c in counts]


def _pct(x: float | None) -> str:
    return "-" if x is None else f"{x:.3g} %"


def _time(x: float | None) -> str:
    return "not within the window" if x is None else format_si(x, "s")


class ViewsPanel:
    """The views of ``picker.analysis.step_delay.candidate_views`` in one panel."""

    def __init__(self, views, *, title: str = "step and delay views") -> None:
        self.views = views
        self.title = title

    def _step(self, width: int) -> list:
        s = self.views.step
        kind = self.views.response_type
        if kind == "lowpass":
            over = f"overshoot {_pct(s.overshoot_pct)} above its final {s.final:.4g} V"
        elif kind == "highpass":
            over = f"swings {_pct(s.overshoot_pct)} of its first jump past zero"
        else:
            over = "returns to zero"
        head = Text(
            f"step response (1 V step in): {over}; settles to 1 % in {_time(s.settling_s)}",
            style="bold",
        )
        out: list = [head]
        # the curve up to twice the settling time: the part worth seeing
        end = len(s.t_s)
        if s.settling_s:
            end = min(
                end, max(8, next((i for i, t in enumerate(s.t_s) if t > 2 * s.settling_s), end))
            )
        out += [Text(line) for line in block_curve(s.y[:end], width=width)]
        left, right = "0 s", format_si(s.t_s[end - 1], "s")
        out.append(Text(left + " " * max(1, width - len(left) - len(right)) + right))
        return out

    def _delay(self, width: int) -> list:
        d = self.views.delay
        if d.dc_s is not None and d.dc_s > 0:
            ratio = d.peak_s / d.dc_s
            shape = (
                "flat: the peak is the DC delay"
                if ratio < 1.005
                else f"peak {ratio:.2f} x the DC delay"
            )
            head = (
                f"group delay: {format_si(d.dc_s, 's')} at DC, peak "
                f"{format_si(d.peak_s, 's')} at {format_si(d.peak_hz, 'Hz')} ({shape})"
            )
        else:
            head = f"group delay: peak {format_si(d.peak_s, 's')} at {format_si(d.peak_hz, 'Hz')}"
        out: list = [Text(head, style="bold")]
        out += [Text(line) for line in block_curve(d.delay_s, width=width)]
        left, right = format_si(d.f_hz[0], "Hz"), format_si(d.f_hz[-1], "Hz")
        mid = "(log frequency)"
        gap = max(1, width - len(left) - len(right) - len(mid))
        out.append(Text(left + " " * (gap // 2) + mid + " " * (gap - gap // 2) + right))
        table = Table(box=box.SIMPLE_HEAD, pad_edge=False, show_edge=False)
        for name in ("frequency", "magnitude", "phase", "group delay"):
            table.add_column(name, justify="right")
        labels = ("half of it", "-3 dB point", "twice it")
        if self.views.response_type == "bandpass":
            labels = ("half of it", "centre", "twice it")
        for (f, mag, ph, tau), label in zip(d.points, labels, strict=False):
            table.add_row(
                f"{format_si(f, 'Hz')} ({label})",
                f"{mag:.2f} dB",
                f"{ph:.1f}°",
                format_si(tau, "s"),
            )
        out.append(table)
        return out

    def __rich_console__(self, console: Console, options: ConsoleOptions) -> RenderResult:
        width = max(20, min(CURVE_WIDTH, options.max_width - 4))
        parts: list = []
        if self.views.step is not None:
            parts += self._step(width)
        if self.views.delay is not None:
            if parts:
                parts.append(Text(""))
            parts += self._delay(width)
        if not parts:
            parts.append(Text("no view asked"))
        yield Panel(Group(*parts), title=self.title, title_align="left", expand=False)
