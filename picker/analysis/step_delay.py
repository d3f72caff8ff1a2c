"""Views of a candidate in time and phase: step response (overshoot, settling time) and
group delay (at DC, its peak), with the phase in degrees at a few frequencies.

Works on anything shaped like a candidate: ``stages`` whose items have ``topology``,
``achieved`` (f0_hz, q) and ``values()``, and an ``opamp`` with ``gbw`` or ``gbw_hz``
(a search ``Candidate`` or a ``SavedDesign``). The op amp's gain-bandwidth is in the
model when the candidate names one. Definitions (docs/outputs.md, "Views"):

* overshoot: of a low-pass, how far the step goes past its final value, in percent of
  it; of a high-pass, how far it swings past zero, in percent of its first jump; none
  for a band-pass (its step returns to zero);
* settling time: the last moment the output is further than 1 % from where it ends,
  1 % of the final value (low-pass), of the first jump (high-pass) or of the largest
  excursion (band-pass);
* group delay -d(phase)/d(omega) from the nodal analysis; "at DC" is at 0 Hz when the
  filter passes DC, else absent.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from picker.analysis.nodal import cascade_group_delay_s, cascade_response, chain
from picker.analysis.response import HALF_POWER_DB, corner_hz, phase_deg
from picker.analysis.transient import step_response
from picker.errors import DesignError

SETTLE_BAND = 0.01  # settling to 1 %
POINTS_PER_RADIAN = 25  # time steps per radian of the fastest section's f0
MAX_STEP_POINTS = 60_000
VIEWS = ("step", "delay")


@dataclass(frozen=True)
class StepView:
    """Output for a 1 V input step; the curve is kept for plots."""

    t_s: tuple[float, ...]
    y: tuple[float, ...]
    final: float  # the value it settles to (0 for high-pass and band-pass)
    reference: float  # what 1 % is taken of (final, first jump or largest excursion)
    overshoot_pct: float | None
    settling_s: float | None  # None when it has not settled within the window

    def as_json(self) -> dict:
        return {
            "final": self.final,
            "overshoot_pct": self.overshoot_pct,
            "settling_s": self.settling_s,
            "settle_band": SETTLE_BAND,
            "window_s": self.t_s[-1],
        }


@dataclass(frozen=True)
class DelayView:
    """Group delay and phase over a log grid around the reference frequency."""

    f_hz: tuple[float, ...]
    delay_s: tuple[float, ...]
    phase_deg: tuple[float, ...]
    magnitude_db: tuple[float, ...]
    reference_hz: float  # the -3 dB corner (band-pass: the peak)
    dc_s: float | None
    peak_s: float
    peak_hz: float
    # (f_hz, magnitude dB, phase deg, delay s) at half, one and two times the reference
    points: tuple[tuple[float, float, float, float], ...]

    def as_json(self) -> dict:
        return {
            "reference_hz": self.reference_hz,
            "dc_s": self.dc_s,
            "peak_s": self.peak_s,
            "peak_hz": self.peak_hz,
            "points": [
                {"f_hz": f, "magnitude_db": m, "phase_deg": p, "delay_s": d}
                for f, m, p, d in self.points
            ],
        }


@dataclass(frozen=True)
class CandidateViews:
    response_type: str
    step: StepView | None = None
    delay: DelayView | None = None

    def as_json(self) -> dict:
        out: dict = {"response_type": self.response_type}
        if self.step is not None:
            out["step"] = self.step.as_json()
        if self.delay is not None:
            out["delay"] = self.delay.as_json()
        return out


def _netlists(candidate):
    from picker.filters import get_topology

    topologies = [get_topology(st.topology) for st in candidate.stages]
    nets = [t.netlist(st.values()) for t, st in zip(topologies, candidate.stages, strict=True)]
    return topologies, nets


def _gbw(candidate) -> float | None:
    oa = getattr(candidate, "opamp", None)
    if oa is None:
        return None
    return getattr(oa, "gbw", None) or getattr(oa, "gbw_hz", None)


def response_type_of(candidate) -> str:
    from picker.filters import get_topology

    kinds = {get_topology(st.topology).response_type for st in candidate.stages}
    if len(kinds) != 1:
        raise DesignError(f"the stages mix {', '.join(sorted(kinds))}; one kind expected")
    return kinds.pop()


def step_view(candidate, *, window_s: float | None = None, gbw: bool = True) -> StepView:
    """Step response of the whole cascade and its overshoot and 1 % settling time.

    The window is 12 time constants of the slowest section (12 / sigma, sigma = w0 / 2Q,
    or w0 for a first-order stage), doubled up to twice more while the output has not
    settled in its last fifth; the step is ``POINTS_PER_RADIAN`` per radian of the
    fastest section's w0.
    """
    kind = response_type_of(candidate)
    _, nets = _netlists(candidate)
    gbw_hz = _gbw(candidate) if gbw else None
    w0s = [2 * math.pi * st.achieved.f0_hz for st in candidate.stages]
    sigmas = [
        w if st.achieved.q is None else w / (2.0 * st.achieved.q)
        for w, st in zip(w0s, candidate.stages, strict=True)
    ]
    if min(sigmas) <= 0 or not all(math.isfinite(s) for s in sigmas):
        raise DesignError("a stage is not stable (Q not positive): no step response")
    t_end = window_s if window_s is not None else 12.0 / min(sigmas)
    net = chain(nets)
    f_ref = max(st.achieved.f0_hz for st in candidate.stages)
    for _ in range(3):
        n = int(min(MAX_STEP_POINTS, max(400, t_end * max(w0s) * POINTS_PER_RADIAN)))
        t = np.linspace(0.0, t_end, n)
        y = step_response(net, t, gbw_hz=gbw_hz)
        view = _step_metrics(kind, t, y, *_final_and_jump(nets, f_ref, kind))
        if window_s is not None or (view.settling_s is not None and view.settling_s < 0.8 * t_end):
            return view
        t_end *= 2.0
    return view


def _final_and_jump(nets, f_ref: float, kind: str) -> tuple[float, float]:
    """Where the step ends (the DC gain) and its first jump (the high-frequency gain of
    the ideal circuit), read from the nodal response."""
    if kind == "lowpass":
        return float(np.real(cascade_response(nets, [0.0])[0])), 0.0
    if kind == "highpass":
        return 0.0, float(np.real(cascade_response(nets, [f_ref * 1e6])[0]))
    return 0.0, 0.0


def _step_metrics(kind: str, t: np.ndarray, y: np.ndarray, final: float, jump: float) -> StepView:
    if kind == "lowpass":
        reference = final
        overshoot = max(0.0, float(np.max(y / final) - 1.0) * 100.0)
    elif kind == "highpass":
        reference = jump
        overshoot = max(0.0, float(np.max(-y / reference)) * 100.0)
    else:
        reference = float(y[np.argmax(np.abs(y))])
        overshoot = None
    outside = np.nonzero(np.abs(y - final) > SETTLE_BAND * abs(reference))[0]
    if len(outside) == 0:
        settling = 0.0
    elif outside[-1] + 1 < len(t):
        settling = float(t[outside[-1] + 1])
    else:
        settling = None
    return StepView(
        t_s=tuple(float(x) for x in t),
        y=tuple(float(v) for v in y),
        final=final,
        reference=reference,
        overshoot_pct=overshoot,
        settling_s=settling,
    )


def delay_view(candidate, *, points: int = 400, gbw: bool = True) -> DelayView:
    """Group delay and phase from a hundredth to a hundred times the reference frequency."""
    kind = response_type_of(candidate)
    _, nets = _netlists(candidate)
    gbw_hz = _gbw(candidate) if gbw else None
    f0s = [st.achieved.f0_hz for st in candidate.stages]
    f_lo, f_hi = min(f0s) / 100.0, max(f0s) * 100.0
    f = np.geomspace(f_lo, f_hi, points)
    h = cascade_response(nets, f, gbw_hz)
    if kind == "bandpass":
        ref = float(f[np.argmax(np.abs(h))])
    else:
        ref = corner_hz(f, h, level_db=HALF_POWER_DB, reference="auto")
    marks = np.array([ref / 2.0, ref, ref * 2.0])
    f = np.unique(np.concatenate([f, marks]))
    h = cascade_response(nets, f, gbw_hz)
    tau = cascade_group_delay_s(nets, f, gbw_hz)
    ph = phase_deg(h)
    mag = 20.0 * np.log10(np.abs(h))
    dc = None
    if kind == "lowpass":
        dc = float(cascade_group_delay_s(nets, [0.0], gbw_hz)[0])
    k = int(np.argmax(tau))
    rows = []
    for m in marks:
        i = int(np.argmin(np.abs(f - m)))
        rows.append((float(f[i]), float(mag[i]), float(ph[i]), float(tau[i])))
    return DelayView(
        f_hz=tuple(float(x) for x in f),
        delay_s=tuple(float(x) for x in tau),
        phase_deg=tuple(float(x) for x in ph),
        magnitude_db=tuple(float(x) for x in mag),
        reference_hz=ref,
        dc_s=dc,
        peak_s=float(tau[k]),
        peak_hz=float(f[k]),
        points=tuple(rows),
    )


def candidate_views(candidate, show: Sequence[str] = VIEWS) -> CandidateViews:
    """The views named in ``show`` ("step", "delay") of ``candidate``."""
    unknown = [s for s in show if s not in VIEWS]
    if unknown:
        raise DesignError(f"unknown view {unknown[0]!r}; choose from {', '.join(VIEWS)}")
    return CandidateViews(
        response_type=response_type_of(candidate),
        step=step_view(candidate) if "step" in show else None,
        delay=delay_view(candidate) if "delay" in show else None,
    )
