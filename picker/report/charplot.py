"""Character plots: braille curves, their axes, a response's marks.

Plain Python over sequences of floats, no textual and no rich, so the drawing can be
tested on its own and redrawn on every resize without side effects. A plot is a list
of equal-width strings; the terminal UI's widgets (``picker.ui.widgets.plots``) wrap
them in Rich text and the repair report (``picker.repair.report``) prints them, both
through ``response_plot``.

Braille cells hold 2 x 4 dots (Unicode block "Braille Patterns", U+2800..U+28FF; the
dot numbering is the one of the Unicode standard, chapter 21.1). Frequency runs on a
linear axis of log10(f) with the decades labelled by hand. Block bars (histograms)
are ``picker.report.views.block_rows``.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from stock.values import format_si

BRAILLE_BASE = 0x2800
# bit of each dot, indexed [row][column] inside one 2x4 cell (Unicode dots 1-8)
_DOT = ((0x01, 0x08), (0x02, 0x10), (0x04, 0x20), (0x40, 0x80))
CLIP_MARK = "▼"  # on the x axis under columns where the curve is below the plot


def decades(f_lo_hz: float, f_hi_hz: float) -> list[float]:
    """Powers of ten inside [f_lo_hz, f_hi_hz]."""
    lo = math.ceil(math.log10(f_lo_hz) - 1e-9)
    hi = math.floor(math.log10(f_hi_hz) + 1e-9)
    return [10.0**k for k in range(lo, hi + 1)]


def decade_ticks(f_lo_hz: float, f_hi_hz: float) -> list[tuple[float, str]]:
    """(log10 f, label) of each decade inside the span: "100 Hz", "1 kHz" ..."""
    return [(math.log10(d), format_si(d, "Hz")) for d in decades(f_lo_hz, f_hi_hz)]


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

    def dot(c: int, r: int) -> None:
        if 0 <= c < cols and 0 <= r < rows:
            grid[r // 4][c // 2] |= _DOT[r % 4][c % 2]

    prev: tuple[int, int] | None = None
    for x, y in zip(xs, ys, strict=False):
        if x is None or y is None or math.isnan(x) or math.isnan(y) or not x0 <= x <= x1:
            prev = None
            continue
        y = min(max(y, y0), y1)
        c = _dot_column(x, x_range, cols)
        r = _dot_row(y, y_range, rows)
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


def _dot_column(x: float, x_range: tuple[float, float], cols: int) -> int:
    x0, x1 = x_range
    return round((x - x0) * (cols - 1) / (x1 - x0)) if x1 != x0 else 0


def _dot_row(y: float, y_range: tuple[float, float], rows: int) -> int:
    y0, y1 = y_range
    return rows - 1 - round((y - y0) * (rows - 1) / (y1 - y0)) if y1 != y0 else rows - 1


def axis_labels(
    y_range: tuple[float, float], y_step: float, height: int, unit: str
) -> dict[int, str]:
    """The label of each character row: every multiple of ``y_step`` inside the range,
    on the row where ``braille_curve`` puts the dots of that value (so a flat curve at
    a labelled value runs through its label's row). Two values on one row: the one
    nearer the row's middle keeps it."""
    y0, y1 = y_range
    rows = 4 * height
    best: dict[int, tuple[float, str]] = {}
    k = math.ceil(y0 / y_step - 1e-9)
    while k * y_step <= y1 + 1e-9 * abs(y_step):
        value = k * y_step
        r = _dot_row(value, y_range, rows)
        off = abs(r % 4 - 1.5)
        if r // 4 not in best or off < best[r // 4][0]:
            best[r // 4] = (off, f"{value + 0.0:g}{unit}")
        k += 1
    return {row: label for row, (_off, label) in best.items()}


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
    marks: Sequence[tuple[float, str]] = (),
    clip_marks: bool = True,
) -> list[str]:
    """A braille curve with a y gutter (value labels) and an x axis line of tick labels.

    ``width`` is the whole width in characters; 7 go to the gutter. ``x_ticks`` are
    (x, label) pairs placed under the axis. The axis line itself carries ``marks``
    ((x, one character) pairs, a later one wins a shared column) and ``CLIP_MARK``
    under every column where the curve lies below ``y_range`` (drawn at its edge),
    unless ``clip_marks`` is False.
    """
    gutter = 7
    inner = max(width - gutter, 4)
    body = braille_curve(xs, ys, width=inner, height=height, x_range=x_range, y_range=y_range)
    labels = axis_labels(y_range, y_step, height, y_unit)
    lines = [f"{labels.get(i, ''):>{gutter - 1}}│{row}" for i, row in enumerate(body)]
    axis = [" "] * inner
    x0, x1 = x_range
    for x, label in x_ticks:
        pos = round((x - x0) / (x1 - x0) * (inner - 1)) if x1 != x0 else 0
        start = min(max(pos - len(label) // 2, 0), inner - len(label))
        if start < 0 or any(ch != " " for ch in axis[max(start - 1, 0) : start + len(label) + 1]):
            continue  # no room: skip rather than overprint
        axis[start : start + len(label)] = list(label)
    line = ["─"] * inner
    last = None  # the column of the previous point, when it was below the plot too
    for x, y in zip(xs, ys, strict=False):
        if not (clip_marks and x0 <= x <= x1 and math.isfinite(y) and y < y_range[0]):
            last = None
            continue
        col = _dot_column(x, x_range, 2 * inner) // 2
        for c in range(col if last is None else min(last, col), max(col, last or col) + 1):
            line[c] = CLIP_MARK
        last = col
    for x, ch in marks:
        if x0 <= x <= x1:
            line[_dot_column(x, x_range, 2 * inner) // 2] = ch
    lines.append(" " * (gutter - 1) + "└" + "".join(line))
    lines.append(" " * gutter + "".join(axis))
    return lines


# --------------------------------------------------------------------------- response


PHASE_STEPS = (45.0, 90.0, 180.0, 360.0)


def phase_axis(p_min: float, p_max: float, height: int) -> tuple[float, float, float]:
    """(lo, hi, step) of a phase axis ``height`` rows high: the finest step of
    ``PHASE_STEPS`` whose labels get a row each. An end a hair past a multiple of the
    step (within 2 % of the span, less than a dot row) is drawn at that multiple, so an
    8th-order low-pass whose op amps add a few degrees still reads 0 to -720."""
    slack = 0.02 * max(p_max - p_min, 1e-9)
    for step in PHASE_STEPS:
        lo = math.ceil(p_min / step) * step if p_min % step > step - slack else p_min
        hi = math.floor(p_max / step) * step if p_max % step < slack else p_max
        lo, hi = nice_range(lo, max(hi, lo), step)
        if (hi - lo) / step <= height - 1:
            break
    return lo, hi, step


def passband_index(mag_db: Sequence[float]) -> int:
    """Where the passband of a sampled response is: the first sample of a low-pass (the
    low end is 20 dB above the high end), the last of a high-pass, else the peak."""
    finite = [m if math.isfinite(m) else -math.inf for m in mag_db]
    if finite[0] >= finite[-1] + 20.0:
        return 0
    if finite[-1] >= finite[0] + 20.0:
        return len(finite) - 1
    return max(range(len(finite)), key=finite.__getitem__)


def passband_phase(mag_db: Sequence[float], phase_deg: Sequence[float]) -> list[float]:
    """An unwrapped phase moved by whole turns so that it reads between -180 and 180
    degrees in the passband: a high-pass reads 0 there (not -720), a low-pass starts at
    0 and an 8th-order one settles at -720."""
    i = passband_index(mag_db)
    turns = round(phase_deg[i] / 360.0) if math.isfinite(phase_deg[i]) else 0
    return [p - 360.0 * turns for p in phase_deg]


def crossings(freqs: Sequence[float], mag_db: Sequence[float], drop_db: float = 3.0) -> list[float]:
    """The frequencies, nearest the passband on each side, where the magnitude first
    falls ``drop_db`` below its passband level; interpolated on log f."""
    i = passband_index(mag_db)
    level = mag_db[i] - drop_db
    found = []
    for step in (-1, 1):
        j = i
        while 0 <= j + step < len(mag_db) and mag_db[j + step] >= level:
            j += step
        k = j + step
        if 0 <= k < len(mag_db) and math.isfinite(mag_db[k]):
            a, b = mag_db[j], mag_db[k]
            t = (a - level) / (a - b) if a != b else 0.0
            lf = math.log10(freqs[j]) + t * (math.log10(freqs[k]) - math.log10(freqs[j]))
            found.append(10.0**lf)
    return sorted(found)


FC_MARK, DROP_MARK = "F", "3"


def response_plot(
    freqs: Sequence[float],
    mag_db: Sequence[float],
    phase_deg: Sequence[float],
    *,
    width: int,
    fc_hz: float | None = None,
    mag_height: int = 8,
    phase_height: int = 5,
) -> tuple[list[str], list[str], list[str]]:
    """(legend, magnitude rows, phase rows) of a response against log frequency.

    The phase is moved by whole turns to read between -180 and 180 degrees in the
    passband (``passband_phase``). The magnitude's axis line marks the corner frequency
    (``F``, when given), the -3 dB point(s) (``3``) and, with ``CLIP_MARK``, where the
    curve is below the plot; the phase axis has no clip marks (``phase_axis`` clips by
    less than a dot row, on purpose)."""
    freqs, mag_db = list(freqs), list(mag_db)
    phase = passband_phase(mag_db, list(phase_deg))
    xs = [math.log10(f) for f in freqs]
    x_range = (xs[0], xs[-1])
    ticks = decade_ticks(freqs[0], freqs[-1])
    finite = [m for m in mag_db if math.isfinite(m)]
    top = max(finite) if finite else 0.0
    m_lo, m_hi = nice_range(max(min(finite, default=-60.0), top - 80.0), top + 1.0, 20.0)
    legend, marks = [], []
    drops = crossings(freqs, mag_db)
    marks += [(math.log10(f), DROP_MARK) for f in drops]
    if drops:
        legend.append(f"{DROP_MARK} -3 dB " + ", ".join(format_si(f, "Hz") for f in drops))
    if fc_hz:
        marks.append((math.log10(fc_hz), FC_MARK))  # wins a shared column
        legend.insert(0, f"{FC_MARK} fc {format_si(fc_hz, 'Hz')}")
    if min(finite, default=m_lo) < m_lo:
        legend.append(f"{CLIP_MARK} below {m_lo:g} dB")
    mag = labelled_plot(
        xs, mag_db, width=width, height=mag_height, x_range=x_range, y_range=(m_lo, m_hi),
        y_step=20.0, y_unit="", x_ticks=ticks, marks=marks,
    )  # fmt: skip
    finite_p = [p for p in phase if math.isfinite(p)]
    p_lo, p_hi, p_step = phase_axis(
        min(finite_p, default=-90.0), max(finite_p, default=90.0), phase_height
    )
    rows = labelled_plot(
        xs, phase, width=width, height=phase_height, x_range=x_range,
        y_range=(p_lo, p_hi), y_step=p_step, y_unit="°", x_ticks=ticks, clip_marks=False,
    )  # fmt: skip
    return legend, mag, rows
