"""Character plots: magnitude and phase against log frequency, and a histogram of f0.

Both draw from ``picker.report.charplot`` at whatever size they have, so a resize simply
redraws. Frequency is plotted as log10(f) on a linear axis with labelled decades.
"""

from __future__ import annotations

from rich.text import Text
from textual.widget import Widget

from picker.report.charplot import response_plot
from picker.report.views import block_rows, count_eighths
from stock.values import format_si


class ResponsePlot(Widget):
    """|H| in dB and phase in degrees over frequency; ``set_curve`` gives the data.

    The phase is moved by whole turns to read between -180 and 180 degrees in the
    passband. The magnitude's axis line marks the corner frequency (``F``, when given),
    the -3 dB point(s) (``3``) and, with ``▼``, where the curve is below the plot.
    """

    DEFAULT_CSS = """
    ResponsePlot { height: 19; width: 1fr; }
    """

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.freqs: list[float] = []
        self.mag_db: list[float] = []
        self.phase_deg: list[float] = []
        self.fc_hz: float | None = None
        self.note = "no candidate chosen"

    def set_curve(self, freqs, mag_db, phase_deg, fc_hz: float | None = None) -> None:
        self.freqs, self.mag_db = list(freqs), list(mag_db)
        self.phase_deg = list(phase_deg)
        self.fc_hz = fc_hz
        self.note = ""
        self.refresh()

    def set_note(self, note: str) -> None:
        self.freqs, self.mag_db, self.phase_deg, self.note = [], [], [], note
        self.refresh()

    def render(self) -> Text:
        if not self.freqs:
            return Text(f"response plot: {self.note}")
        legend, mag, phase = response_plot(
            self.freqs, self.mag_db, self.phase_deg, width=max(self.size.width, 20),
            fc_hz=self.fc_hz,
        )  # fmt: skip
        text = Text()
        text.append("magnitude, dB", style="bold")
        text.append(("   " + "   ".join(legend)) if legend else ", against frequency")
        text.append("\n" + "\n".join(mag) + "\n")
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
        bars = block_rows(count_eighths(counts, rows=6), rows=6, repeat=repeat)
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
        left, right = format_si(lo, "Hz", digits=4), format_si(hi, "Hz", digits=4)
        labels[: len(left)] = left
        labels[width - len(right) :] = right
        text = Text()
        text.append(f"{h['quantity']}: {h['trials']} trials", style="bold")
        text.append(f", {h['yield'] * 100:.1f}% inside the window ±{window * 100:g}%\n")
        text.append("\n".join(bars) + "\n" + "".join(axis) + "\n" + "".join(labels) + "\n")
        text.append(
            f"^ target {format_si(target, 'Hz', digits=4)}   "
            f"o nominal parts {format_si(h['nominal'], 'Hz', digits=4)}   [ ] window"
        )
        if h.get("outside"):
            text.append(f"\n{h['outside']} trial(s) had no such frequency and are not shown")
        return text
