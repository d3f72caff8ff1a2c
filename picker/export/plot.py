"""The response of a saved design as a figure (SVG or PNG), drawn with matplotlib.

Magnitude (dB) and phase (degrees) against log frequency, with the tolerance band, the
target corner (a dashed vertical line) and the -3 dB point (a marker); optionally the
step response in a third panel. matplotlib is imported here only, and only by
``picker plot`` (its object-oriented Figure, no pyplot and no GUI backend).

Test hooks: the curves, the band and the panels carry SVG ids (``GIDS``), so a test can
find their paths and map their points back through the panel limits in ``PlotInfo``.
Why matplotlib, and what was compared: docs/outputs.md.
"""

from __future__ import annotations

from dataclasses import dataclass

from picker.errors import DesignError
from picker.export.response_data import ResponseData

GIDS = {
    "magnitude": "picker-magnitude",
    "phase": "picker-phase",
    "band": "picker-tolerance-band",
    "step": "picker-step",
    "magnitude_axes": "picker-magnitude-axes",
    "phase_axes": "picker-phase-axes",
    "step_axes": "picker-step-axes",
}
FORMATS = ("svg", "png")
SIZE_IN = (8.0, 6.0)
SIZE_WITH_STEP_IN = (8.0, 8.5)
PNG_DPI = 120
# every vertex kept (the tests read them back), text kept as text (searchable, small),
# ids not random (the same design gives the same file)
RC = {"path.simplify": False, "svg.fonttype": "none", "svg.hashsalt": "picker"}
SPAN_DB = 100.0  # the magnitude panel shows at most this far below the curve's peak


@dataclass(frozen=True)
class PlotInfo:
    """Data limits of the panels as drawn: (x0, x1) and (y0, y1); frequency in hertz."""

    magnitude_xlim: tuple[float, float]
    magnitude_ylim: tuple[float, float]
    phase_ylim: tuple[float, float]
    step_xlim: tuple[float, float] | None = None  # seconds
    step_ylim: tuple[float, float] | None = None  # volts


def _matplotlib():
    try:
        import matplotlib
    except ImportError:
        raise DesignError(
            "picker plot needs matplotlib (a dependency of picker): pip install matplotlib"
        ) from None
    from matplotlib.figure import Figure

    return matplotlib, Figure


def _hz(f: float) -> str:
    from stock.values import format_si

    return format_si(f, "Hz")


def draw(data: ResponseData, *, title: str, step=None):
    """The matplotlib Figure of ``data`` (and of ``step``, a StepView, when given)."""
    import numpy as np

    matplotlib, Figure = _matplotlib()
    rows = 3 if step is not None else 2
    with matplotlib.rc_context(RC):
        fig = Figure(figsize=SIZE_WITH_STEP_IN if step else SIZE_IN, layout="constrained")
        axes = fig.subplots(rows, 1)
        ax_m, ax_p = axes[0], axes[1]
        f = data.f_hz
        band = ax_m.fill_between(
            f,
            data.band_low_db,
            data.band_high_db,
            color="tab:orange",
            alpha=0.35,
            linewidth=0,
            label="tolerance band (corners of every piece)",
        )
        band.set_gid(GIDS["band"])
        (line_m,) = ax_m.plot(f, data.magnitude_db, color="tab:blue", label="magnitude")
        line_m.set_gid(GIDS["magnitude"])
        (line_p,) = ax_p.plot(f, data.phase_deg, color="tab:blue", label="phase")
        line_p.set_gid(GIDS["phase"])
        from matplotlib.ticker import FuncFormatter, NullFormatter

        for ax in (ax_m, ax_p):
            ax.set_xscale("log")
            ax.set_xlim(float(f[0]), float(f[-1]))
            # plain "1 kHz" labels: easier to read than powers of ten, and no mathtext
            ax.xaxis.set_major_formatter(FuncFormatter(lambda x, _pos: _hz(x)))
            ax.xaxis.set_minor_formatter(NullFormatter())
            ax.grid(True, which="both", alpha=0.3)
            ax.set_xlabel("frequency (Hz)")
            if data.target_hz is not None:
                ax.axvline(data.target_hz, color="tab:green", linestyle="--", linewidth=1.2)
        finite = data.magnitude_db[np.isfinite(data.magnitude_db)]
        top = float(np.max(data.band_high_db[np.isfinite(data.band_high_db)]))
        bottom = max(float(np.min(finite)), top - SPAN_DB)
        ax_m.set_ylim(bottom - 3.0, top + 3.0)
        if data.target_hz is not None:
            what = "centre" if data.response_type == "bandpass" else "corner"
            label = f"target {what} {_hz(data.target_hz)}"
            ax_m.plot([], [], color="tab:green", linestyle="--", label=label)
        if data.corner_hz is not None:
            level = float(np.interp(np.log(data.corner_hz), np.log(f), data.magnitude_db))
            name = "peak" if data.response_type == "bandpass" else "-3 dB point"
            ax_m.plot(
                [data.corner_hz],
                [level],
                marker="o",
                color="tab:red",
                linestyle="none",
                label=f"{name} {_hz(data.corner_hz)}",
            )
        ax_m.set_ylabel("magnitude (dB)")
        corner_side = {"lowpass": "lower left", "highpass": "lower right"}
        ax_m.legend(loc=corner_side.get(data.response_type, "best"), fontsize="small")
        _zoom(ax_m, data)
        ax_p.set_ylabel("phase (degrees)")
        ax_m.patch.set_gid(GIDS["magnitude_axes"])
        ax_p.patch.set_gid(GIDS["phase_axes"])
        info: dict[str, tuple[float, float]] = {
            "magnitude_xlim": _lim(ax_m.get_xlim()),
            "magnitude_ylim": _lim(ax_m.get_ylim()),
            "phase_ylim": _lim(ax_p.get_ylim()),
        }
        if step is not None:
            ax_s = axes[2]
            t_ms = np.asarray(step.t_s) * 1e3
            (line_s,) = ax_s.plot(t_ms, step.y, color="tab:purple")
            line_s.set_gid(GIDS["step"])
            ax_s.patch.set_gid(GIDS["step_axes"])
            ax_s.set_xlim(float(t_ms[0]), float(t_ms[-1]))
            ax_s.grid(True, alpha=0.3)
            ax_s.set_xlabel("time (ms)")
            ax_s.set_ylabel("output for a 1 V step (V)")
            words = []
            if step.overshoot_pct is not None:
                words.append(f"overshoot {step.overshoot_pct:.3g} %")
            if step.settling_s is not None:
                words.append(f"settles to 1 % in {step.settling_s * 1e3:.3g} ms")
            head = "step response" + (": " + ", ".join(words) if words else "")
            ax_s.set_title(head, fontsize="medium")
            info["step_xlim"] = _lim(ax_s.get_xlim(), scale=1e-3)
            info["step_ylim"] = _lim(ax_s.get_ylim())
        fig.suptitle(title)
    return fig, PlotInfo(**info)


def _lim(pair, *, scale: float = 1.0) -> tuple[float, float]:
    return float(pair[0]) * scale, float(pair[1]) * scale


def _zoom(ax, data: ResponseData) -> None:
    """An inset around the corner where the tolerance band is wide enough to see, on the
    side of the panel the curve leaves empty (none for a band-pass)."""
    import numpy as np

    if data.corner_hz is None or data.response_type not in ("lowpass", "highpass"):
        return
    f = data.f_hz
    lo_f, hi_f = data.corner_hz / 4.0, data.corner_hz * 2.0
    if data.response_type == "highpass":
        lo_f, hi_f = data.corner_hz / 2.0, data.corner_hz * 4.0
    inside = (f >= lo_f) & (f <= hi_f)
    if inside.sum() < 4:
        return
    ref = float(np.max(data.magnitude_db[inside]))
    spot = [0.68, 0.52, 0.3, 0.4] if data.response_type == "lowpass" else [0.06, 0.52, 0.3, 0.4]
    inset = ax.inset_axes(spot)
    inset.fill_between(
        f[inside],
        data.band_low_db[inside],
        data.band_high_db[inside],
        color="tab:orange",
        alpha=0.35,
        linewidth=0,
    )
    inset.plot(f[inside], data.magnitude_db[inside], color="tab:blue", linewidth=1.0)
    if data.target_hz is not None and lo_f <= data.target_hz <= hi_f:
        inset.axvline(data.target_hz, color="tab:green", linestyle="--", linewidth=1.0)
    inset.set_xscale("log")
    inset.set_xlim(lo_f, hi_f)
    from matplotlib.ticker import FixedLocator, FuncFormatter, NullFormatter

    ticks = [data.corner_hz / 2.0, data.corner_hz, data.corner_hz * 2.0]
    inset.xaxis.set_major_locator(FixedLocator(ticks))
    inset.xaxis.set_major_formatter(FuncFormatter(lambda x, _pos: _hz(x)))
    inset.xaxis.set_minor_formatter(NullFormatter())
    inset.set_ylim(ref - 6.0, ref + 1.0)
    inset.grid(True, which="both", alpha=0.3)
    inset.tick_params(labelsize="x-small")
    inset.set_title("around the corner (dB)", fontsize="x-small")


def write_figure(fig, path, fmt: str) -> None:
    """Save ``fig`` as ``fmt`` ("svg" or "png") to ``path``, whole or not at all."""
    import io
    from pathlib import Path

    from picker.export.design_file import write_atomic

    if fmt not in FORMATS:
        raise DesignError(f"figure format must be one of {', '.join(FORMATS)}; got {fmt!r}")
    matplotlib, _ = _matplotlib()
    buf = io.BytesIO()
    with matplotlib.rc_context(RC):
        fig.savefig(buf, format=fmt, dpi=PNG_DPI, metadata=_metadata(fmt))
    write_atomic(Path(path), buf.getvalue())


def _metadata(fmt: str) -> dict:
    # no creation date: the same design gives the same file
    if fmt == "svg":
        return {"Date": None, "Creator": "picker (matplotlib)"}
    return {"Software": "picker (matplotlib)"}
