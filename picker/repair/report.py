"""The human reports of ``picker analyse`` and ``picker substitute`` (rich renderables).

Both fit 80 columns, carry the safety cautions (``picker.repair.safety``) and never rest
meaning on colour. The response is drawn with the project's character plots
(``picker.report.charplot``, plain Python without textual). See docs/repair.md.
"""

from __future__ import annotations

import math

from rich.console import Console, ConsoleOptions, Group, RenderResult
from rich.table import Table
from rich.text import Text

from picker.repair.safety import caution_lines
from picker.report.design import pct
from picker.report.schematic import arrangement_text
from stock.values import format_rkm, format_si

PLOT_WIDTH = 76
PLOT_HEIGHT = 6


def _signed(x: float | None) -> str:
    if x is None:
        return "-"
    return "0 %" if x == 0 else f"{x * 100:+.3g} %"


def _q(q: float | None) -> str:
    return "-" if q is None else f"{q:.4g}"


def _gain(g: float) -> str:
    db = 20 * math.log10(g) if g > 0 else -math.inf
    return f"{g:.4g} ({db:+.2f} dB)"


def _span(r, ref: float, unit: str = "") -> str:
    lo, hi = r
    num = (lambda v: format_si(v, unit)) if unit else (lambda v: f"{v:.4g}")
    rel = f"{_signed(lo / ref - 1)} .. {_signed(hi / ref - 1)}" if ref else ""
    return f"{num(lo)} .. {num(hi)}  ({rel})"


def wrap(lines: list[str], width: int) -> list[str]:
    """Each line folded at ``width``, continuations indented two past its own indent.

    Plot rows (braille or box drawing) are left as they are."""
    import textwrap

    out: list[str] = []
    for line in lines:
        if len(line) <= width or any(ch in line for ch in "│└"):
            out.append(line)
            continue
        indent = " " * (len(line) - len(line.lstrip(" -")) + 2)
        out += textwrap.wrap(
            line, width=width, subsequent_indent=indent, break_on_hyphens=False
        ) or [""]
    return out


def stage_lines(i: int, s) -> list[str]:
    """The text of one analysed stage."""
    kind = f"{'first' if s.order == 1 else 'second'}-order {s.response_type}"
    lines = [f"Stage {i}: {s.topology} ({kind}{', inverting' if s.inverting else ''})"]
    parts = []
    for label, p in zip(s.pieces.labels, s.pieces.pieces, strict=True):
        tol = f"{p.tolerance * 100:g}%" + (" assumed" if label in s.assumed else "")
        parts.append(f"{label}={format_rkm(p.value, p.kind)}/{tol}")
    lines.append("  values: " + ", ".join(parts))
    head = f"  f0 {format_si(s.f0_hz, 'Hz')}"
    if s.q is not None:
        head += f", Q {_q(s.q)}"
    head += f", gain {_gain(s.gain)}" + (" inverted" if s.inverting else "")
    lines.append(head)
    if s.q is not None and not 0 < s.q < math.inf:
        lines.append(
            "  Q <= 0 or infinite: as marked the stage is unstable and oscillates; "
            "check the values read off the board"
        )
    c = s.corners
    lines.append(f"  within tolerance ({c.method}):")
    lines.append(f"    f0   {_span(c.f0, s.f0_hz, 'Hz')}")
    if c.q is not None and s.q is not None:
        lines.append(f"    Q    {_span(c.q, s.q)}")
        if not (0 < c.q[0] <= c.q[1] < math.inf):
            lines.append("    Q leaves the stable range inside the tolerance: it can oscillate")
    if s.sets_gain:
        lines.append(f"    gain {_span(c.gain, s.gain)}")
    if s.assumed:
        lines.append(
            f"  tolerance assumed for {', '.join(s.assumed)} (the stock file's defaults: "
            "5 % resistors, 10 % capacitors); give NAME=VALUE/TOL% for the real one"
        )
    sens = [
        f"{name} {f:+.2f}" + ("" if q is None else f"/{q:+.2f}")
        for name, f, q, _ in c.sensitivities
    ]
    what = "f0/Q" if s.q is not None else "f0"
    lines.append(f"  sensitivity of {what} to each part: " + ", ".join(sens))
    if s.opamp is not None:
        o = s.opamp
        shift = f"f0 {_signed(o.shift[0])}"
        if o.shift[1] is not None:
            shift += f", Q {_signed(o.shift[1])}"
        shift += f", gain {_signed(o.shift[2])}"
        lines.append(f"  op amp of GBW {format_si(o.gbw_hz, 'Hz')} moves {shift}")
        verdict = "enough" if o.gbw_hz >= o.gbw_needed_hz else "too slow for this stage"
        lines.append(
            f"    common practice asks GBW >= {format_si(o.gbw_needed_hz, 'Hz')} "
            f"(100 x noise gain x Q x f0): {verdict}"
        )
    return lines


def response_lines(r, *, width: int = PLOT_WIDTH, height: int = PLOT_HEIGHT) -> list[str]:
    """Magnitude and phase against log frequency, as character plots (the terminal UI's
    drawing: ``picker.report.charplot.response_plot``)."""
    from picker.report.charplot import response_plot

    legend, mag, phase = response_plot(
        r.freqs_hz, [float(m) for m in r.magnitude_db], [float(p) for p in r.phase_deg],
        width=width, mag_height=height, phase_height=height,
    )  # fmt: skip
    head = "magnitude, dB" + (("   " + "   ".join(legend)) if legend else "")
    return [head, *mag, "phase, degrees", *phase]


def corner_text(r) -> str:
    if r.band_hz is not None:
        lo, hi = r.band_hz
        return (
            f"-3 dB band {format_si(lo, 'Hz')} .. {format_si(hi, 'Hz')} "
            f"(below the peak of {r.reference_db:+.2f} dB)"
        )
    if r.corner_hz is not None:
        return (
            f"-3 dB corner {format_si(r.corner_hz, 'Hz')} "
            f"(below the passband {r.reference_db:+.2f} dB)"
        )
    return "no -3 dB point inside the plotted range"


class AnalysisReport:
    """Report of ``picker.repair.analyse.Analysis``: stages, overall response, cautions."""

    def __init__(self, analysis, *, plot: bool = True):
        self.analysis = analysis
        self.plot = plot

    def __rich_console__(self, console: Console, options: ConsoleOptions) -> RenderResult:
        a = self.analysis
        lines: list[str] = []
        for i, s in enumerate(a.stages, start=1):
            lines += stage_lines(i, s) + [""]
        n = len(a.stages)
        what = "the stage" if n == 1 else f"the {n} stages in cascade"
        lines.append(f"Response of {what}: {corner_text(a.response)}")
        if a.gbw_hz is not None:
            lines[-1] += f", op amps of GBW {format_si(a.gbw_hz, 'Hz')}"
        if self.plot:
            width = min(PLOT_WIDTH, max(options.max_width - 2, 30))
            lines += response_lines(a.response, width=width)
        lines += [""] + caution_lines()
        yield Text("\n".join(wrap(lines, options.max_width)))


def options_table(sub) -> Table:
    table = Table(
        title="options, best first", title_justify="left", show_lines=True, pad_edge=False
    )
    table.add_column("#", justify="right")
    table.add_column("worst", justify="right")
    table.add_column("f0 / Q / gain error", overflow="fold")
    table.add_column("pcs", justify="right")
    table.add_column("parts (position value drawer)", overflow="fold")
    for rank, o in enumerate(sub.options, start=1):
        errs = [f"f0 {_signed(o.errors[0])}"]
        if o.errors[1] is not None:
            errs.append(f"Q {_signed(o.errors[1])}")
        errs.append(f"gain {_signed(o.errors[2])}")
        parts = []
        for name, arr in o.refilled:
            value, drawer = arrangement_text(arr)
            polar = any(getattr(p.line, "polarized", False) for p in arr.parts)
            parts.append(f"{name} {value} [{drawer}]" + (" POLARIZED" if polar else ""))
        table.add_row(
            str(rank), pct(o.score), Text("\n".join(errs)), str(o.pieces), Text("\n".join(parts))
        )  # Text cells: drawer names are the owner's text, never markup
    return table


class SubstitutionReport:
    """Report of ``picker.repair.substitute.Substitution``."""

    def __init__(self, sub):
        self.sub = sub

    def __rich_console__(self, console: Console, options: ConsoleOptions) -> RenderResult:
        sub = self.sub
        t = sub.intended
        failed, free = sub.refill[0], sub.refill[1:]
        head = [f"Repair of {sub.stage.topology}: {failed} to replace"]
        if free:
            head[0] += f", {', '.join(free)} free to change"
        want = f"  intended (from the marked values): f0 {format_si(t.f0_hz, 'Hz')}"
        if t.q is not None:
            want += f", Q {_q(t.q)}"
        head.append(want + f", gain {t.gain:.4g}")
        kept = [p.text() for p in sub.stage.parts if p.name not in sub.refill]
        if kept:
            head.append("  stays on the board: " + ", ".join(kept))
        head.append(
            "  from the stock: singles"
            + ("" if sub.singles else ", series and parallel pairs")
            + (", polarized capacitors allowed" if sub.allow_polarized else "")
        )
        yield Text("\n".join(wrap(head, options.max_width)))
        yield options_table(sub)
        tail = [""]
        best = sub.options[0]
        if best.score > 0.01:
            tail.append(
                f"The best option is {pct(best.score)} off: the stock has nothing closer; "
                "consider --free on a neighbouring part or buying the marked value."
            )
        tail.append(
            "Save one with --save FILE [--pick N]; then picker bom FILE and picker build FILE."
        )
        tail += [""] + caution_lines()
        yield Text("\n".join(wrap(tail, options.max_width)))


def render(renderable, *, width: int = 80) -> str:
    """Plain text of a renderable at ``width`` columns (tests, the TUI)."""
    import io

    console = Console(file=io.StringIO(), width=width, color_system=None, highlight=False)
    console.print(Group(renderable))
    out = console.file.getvalue()  # type: ignore[attr-defined]
    return str(out)
