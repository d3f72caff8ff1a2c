"""Character plots: magnitude and phase against log frequency, and a histogram of f0.

Both draw from ``picker.ui.plotting`` at whatever size they have, so a resize simply
redraws. Frequency is plotted as log10(f) on a linear axis with labelled decades.
"""

from __future__ import annotations

import math

from rich.text import Text
from textual.widget import Widget

from picker.ui.plotting import count_bars, decades, hz_label, labelled_plot, nice_range


class ResponsePlot(Widget):
    """|H| in dB and phase in degrees over frequency; ``set_curve`` gives the data."""

    DEFAULT_CSS = """
    ResponsePlot { height: 19; width: 1fr; }
    """

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.freqs: list[float] = []
        self.mag_db: list[float] = []
        self.phase_deg: list[float] = []
        self.note = "no candidate chosen"

    def set_curve(self, freqs, mag_db, phase_deg) -> None:
        self.freqs, self.mag_db, self.phase_deg = list(freqs), list(mag_db), list(phase_deg)
        self.note = ""
        self.refresh()

    def set_note(self, note: str) -> None:
        self.freqs, self.mag_db, self.phase_deg, self.note = [], [], [], note
        self.refresh()

    def render(self) -> Text:
        if not self.freqs:
            return Text(f"response plot: {self.note}")
        width = max(self.size.width, 20)
        xs = [math.log10(f) for f in self.freqs]
        x_range = (xs[0], xs[-1])
        ticks = [(math.log10(d), hz_label(d)) for d in decades(self.freqs[0], self.freqs[-1])]
        finite = [m for m in self.mag_db if math.isfinite(m)]
        top = max(finite) if finite else 0.0
        m_lo, m_hi = nice_range(max(min(finite, default=-60.0), top - 80.0), top + 1.0, 20.0)
        finite_p = [p for p in self.phase_deg if math.isfinite(p)]
        p_lo, p_hi = nice_range(min(finite_p, default=-90.0), max(finite_p, default=90.0), 90.0)
        p_step = 90.0 if p_hi - p_lo <= 360 else 180.0
        mag = labelled_plot(
            xs,
            self.mag_db,
            width=width,
            height=8,
            x_range=x_range,
            y_range=(m_lo, m_hi),
            y_step=20.0,
            y_unit="",
            x_ticks=ticks,
        )
        phase = labelled_plot(
            xs,
            self.phase_deg,
            width=width,
            height=5,
            x_range=x_range,
            y_range=(p_lo, p_hi),
            y_step=p_step,
            y_unit="°",
            x_ticks=ticks,
        )
        text = Text()
        text.append("magnitude, dB, against frequency, Hz\n", style="bold")
        text.append("\n".join(mag) + "\n")
        text.append("phase, degrees\n", style="bold")
        text.append("\n".join(phase))
        return text


class F0Histogram(Widget):
    """The Monte Carlo histogram of f0 from the error budget, as block bars.

    The axis row marks the target with ``^``, the nominal parts with ``o`` and the
    edges of the yield window with ``[`` and ``]``; the words under it say so.
    """

    DEFAULT_CSS = """
    F0Histogram { height: 12; width: 1fr; }
    """

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.hist: dict | None = None
        self.note = "no candidate chosen"

    def set_histogram(self, hist: dict) -> None:
        """``hist``: edges (Hz), counts, target, nominal (Hz), window (relative),
        trials, yield (fraction), quantity (words)."""
        self.hist = hist
        self.refresh()

    def set_note(self, note: str) -> None:
        self.hist, self.note = None, note
        self.refresh()

    def render(self) -> Text:
        h = self.hist
        if not h or not h["counts"]:
            return Text(f"f0 histogram: {self.note if not h else 'no trials to show'}")
        counts, edges = list(h["counts"]), list(h["edges"])
        repeat = max((self.size.width - 1) // len(counts), 1)
        width = repeat * len(counts)
        bars = count_bars(counts, height=6, repeat=repeat)
        lo, hi = edges[0], edges[-1]

        def col(f_hz: float) -> int | None:
            if not lo <= f_hz <= hi:
                return None
            return min(int((f_hz - lo) / (hi - lo) * width), width - 1)

        axis = ["─"] * width
        target, window = h["target"], h["window"]
        for f_hz, ch in (
            (target * (1 - window), "["),
            (target * (1 + window), "]"),
            (h["nominal"], "o"),
            (target, "^"),
        ):
            c = col(f_hz)
            if c is not None:
                axis[c] = ch
        labels = [" "] * width
        left, right = hz_text(lo), hz_text(hi)
        labels[: len(left)] = left
        labels[width - len(right) :] = right
        text = Text()
        text.append(f"{h['quantity']}: {h['trials']} trials", style="bold")
        text.append(f", {h['yield'] * 100:.1f}% inside the window ±{window * 100:g}%\n")
        text.append("\n".join(bars) + "\n" + "".join(axis) + "\n" + "".join(labels) + "\n")
        text.append(
            f"^ target {hz_text(target)}   o nominal parts {hz_text(h['nominal'])}   [ ] window"
        )
        if h.get("outside"):
            text.append(f"\n{h['outside']} trial(s) had no such frequency and are not shown")
        return text


def hz_text(f_hz: float) -> str:
    """Frequency with 4 significant digits and an SI prefix, for axis ends."""
    for scale, prefix in ((1e9, "G"), (1e6, "M"), (1e3, "k"), (1.0, "")):
        if abs(f_hz) >= scale:
            return f"{f_hz / scale:.4g} {prefix}Hz"
    return f"{f_hz:.4g} Hz"
