"""Character plots for the terminal UI: braille curves and block histograms.

Plain Python over sequences of floats, no textual and no rich, so the drawing can be
tested on its own and redrawn on every resize without side effects. A plot is a list
of equal-width strings; the widgets in ``picker.ui.widgets`` wrap them in Rich text.

Braille cells hold 2 x 4 dots (Unicode block "Braille Patterns", U+2800..U+28FF; the
dot numbering is the one of the Unicode standard, chapter 21.1). Frequency runs on a
linear axis of log10(f) with the decades labelled by hand.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

BRAILLE_BASE = 0x2800
# bit of each dot, indexed [row][column] inside one 2x4 cell (Unicode dots 1-8)
_DOT = ((0x01, 0x08), (0x02, 0x10), (0x04, 0x20), (0x40, 0x80))
BLOCKS = " ▁▂▃▄▅▆▇█"


def hz_label(f_hz: float) -> str:
    """Short label of a decade: 1, 10, 100, 1k, 10k, 100k, 1M ..."""
    for scale, prefix in ((1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, ""), (1e-3, "m")):
        if f_hz >= scale * 0.999:
            v = f_hz / scale
            text = f"{v:.0f}" if v >= 1 else f"{v:g}"
            return text + prefix
    return f"{f_hz:g}"


def decades(f_lo_hz: float, f_hi_hz: float) -> list[float]:
    """Powers of ten inside [f_lo_hz, f_hi_hz]."""
    lo = math.ceil(math.log10(f_lo_hz) - 1e-9)
    hi = math.floor(math.log10(f_hi_hz) + 1e-9)
    return [10.0**k for k in range(lo, hi + 1)]


def nice_range(lo: float, hi: float, step: float) -> tuple[float, float]:
    """``lo`` and ``hi`` widened outwards to multiples of ``step`` (never empty)."""
    a = math.floor(lo / step) * step
    b = math.ceil(hi / step) * step
    if b <= a:
        b = a + step
    return a, b


def braille_curve(
    xs: Sequence[float],
    ys: Sequence[float],
    *,
    width: int,
    height: int,
    x_range: tuple[float, float],
    y_range: tuple[float, float],
) -> list[str]:
    """Draw the polyline (xs, ys) in ``width`` x ``height`` braille cells.

    Points outside ``y_range`` are clipped to its edge; NaN breaks the line.
    Consecutive points are joined by a vertical run so steep slopes leave no gaps.
    """
    if width < 1 or height < 1:
        return []
    cols, rows = 2 * width, 4 * height
    grid = [[0] * width for _ in range(height)]
    x0, x1 = x_range
    y0, y1 = y_range
    sx = (cols - 1) / (x1 - x0) if x1 != x0 else 0.0
    sy = (rows - 1) / (y1 - y0) if y1 != y0 else 0.0

    def dot(c: int, r: int) -> None:
        if 0 <= c < cols and 0 <= r < rows:
            grid[r // 4][c // 2] |= _DOT[r % 4][c % 2]

    prev: tuple[int, int] | None = None
    for x, y in zip(xs, ys, strict=False):
        if x is None or y is None or math.isnan(x) or math.isnan(y) or not x0 <= x <= x1:
            prev = None
            continue
        y = min(max(y, y0), y1)
        c = round((x - x0) * sx)
        r = rows - 1 - round((y - y0) * sy)
        if prev is not None and abs(r - prev[1]) > 1:
            # join steep steps with a vertical run, half in each column
            pc, pr = prev
            mid = (pr + r) // 2
            for rr in range(min(pr, mid), max(pr, mid) + 1):
                dot(pc, rr)
            for rr in range(min(mid, r), max(mid, r) + 1):
                dot(c, rr)
        dot(c, r)
        prev = (c, r)
    return ["".join(chr(BRAILLE_BASE + b) for b in row) for row in grid]


def labelled_plot(
    xs: Sequence[float],
    ys: Sequence[float],
    *,
    width: int,
    height: int,
    x_range: tuple[float, float],
    y_range: tuple[float, float],
    y_step: float,
    y_unit: str,
    x_ticks: Sequence[tuple[float, str]],
) -> list[str]:
    """A braille curve with a y gutter (value labels) and an x axis line of tick labels.

    ``width`` is the whole width in characters; 7 go to the gutter. ``x_ticks`` are
    (x, label) pairs placed under the axis.
    """
    gutter = 7
    inner = max(width - gutter, 4)
    body = braille_curve(xs, ys, width=inner, height=height, x_range=x_range, y_range=y_range)
    y0, y1 = y_range
    labels: dict[int, str] = {}
    n_steps = int(round((y1 - y0) / y_step))
    for k in range(n_steps + 1):
        value = y0 + k * y_step
        row = height - 1 - round((value - y0) / (y1 - y0) * (height - 1)) if height > 1 else 0
        labels.setdefault(row, f"{value:g}{y_unit}")
    lines = [f"{labels.get(i, ''):>{gutter - 1}}│{row}" for i, row in enumerate(body)]
    axis = [" "] * inner
    x0, x1 = x_range
    for x, label in x_ticks:
        pos = round((x - x0) / (x1 - x0) * (inner - 1)) if x1 != x0 else 0
        start = min(max(pos - len(label) // 2, 0), inner - len(label))
        if start < 0 or any(ch != " " for ch in axis[max(start - 1, 0) : start + len(label) + 1]):
            continue  # no room: skip rather than overprint
        axis[start : start + len(label)] = list(label)
    lines.append(" " * (gutter - 1) + "└" + "─" * inner)
    lines.append(" " * gutter + "".join(axis))
    return lines


def count_bars(counts: Sequence[int], *, height: int, repeat: int = 1) -> list[str]:
    """Vertical block bars of ``counts``, each bin ``repeat`` characters wide.

    The tallest bin fills ``height`` rows; eighths of a row use the block elements
    U+2581..U+2588; a bin with any count never looks empty.
    """
    if height < 1 or not counts:
        return []
    top = max(counts) or 1
    eighths = [round(c / top * height * 8) for c in counts]
    eighths = [max(e, 1) if c else e for e, c in zip(eighths, counts, strict=False)]
    lines = []
    for row in range(height - 1, -1, -1):
        lines.append("".join(BLOCKS[min(max(e - row * 8, 0), 8)] * repeat for e in eighths))
    return lines
