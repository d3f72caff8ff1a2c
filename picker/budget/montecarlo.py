"""Monte Carlo yield of a candidate, vectorised and seeded.

Each trial draws every physical piece on its own (uniform within its tolerance, or
normal with the tolerance taken as 3 sigma), combines the pieces per arrangement,
evaluates each stage's analytic f0, Q and gain over the whole array of trials, and
counts a trial good when every stage's f0, Q and gain are inside the window around
the stage's TARGET (not its nominal achieved value).

The histogram is of one frequency per trial, chosen so that it means what a person
would measure on the built filter:

* one stage: the stage's f0 (pole frequency; centre frequency for a band-pass);
* a cascade of low-pass or of high-pass stages: the -3 dB corner of the whole cascade,
  found on a log-frequency grid from the analytic first/second-order transfer functions
  of the stages (see ``picker.budget.cascade``) and interpolated in log f;
* any other cascade: the geometric centre sqrt(f_lo f_hi) of the outer -3 dB edges.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from picker.budget.cascade import cascade_frequency
from picker.budget.pieces import StagePieces, evaluate

HIST_BINS = 30


@dataclass(frozen=True)
class Histogram:
    quantity: str  # what was counted, in words
    edges: tuple[float, ...]  # Hz, HIST_BINS + 1 edges
    counts: tuple[int, ...]
    nominal: float  # Hz, the same quantity for the nominal parts
    target: float  # Hz, the same quantity for the stage targets
    outside: int  # trials with no such frequency on the search grid

    def to_json(self) -> dict:
        def num(x):
            return float(x) if np.isfinite(x) else None

        return {
            "quantity": self.quantity,
            "unit": "Hz",
            "edges": list(self.edges),
            "counts": list(self.counts),
            "nominal": num(self.nominal),
            "target": num(self.target),
            "outside": self.outside,
        }


@dataclass(frozen=True)
class MonteCarloResult:
    trials: int
    yield_: float  # fraction of trials with every stage inside the window
    std_error: float  # binomial standard error sqrt(p (1 - p) / N)
    distribution: str
    window: tuple[tuple[str, float], ...]  # (("f0", rel), ("q", rel), ("gain", rel))
    stage_yield: tuple[float, ...]  # per stage, fraction inside the window on its own
    histogram: Histogram

    def to_json(self) -> dict:
        return {
            "trials": self.trials,
            "yield": self.yield_,
            "std_error": self.std_error,
            "distribution": self.distribution,
            "window": dict(self.window),
            "stage_yield": list(self.stage_yield),
            "histogram": self.histogram.to_json(),
        }


def draw(rng: np.random.Generator, sp: StagePieces, trials: int, distribution: str):
    """Piece values ``(trials, n_pieces)``: uniform in +/-tol, or normal with tol = 3 sigma."""
    nom, tol = sp.nominal, sp.tolerance
    n = len(nom)
    if distribution == "uniform":
        rel = rng.uniform(-1.0, 1.0, size=(trials, n)) * tol
    else:
        rel = rng.standard_normal(size=(trials, n)) * (tol / 3.0)
    # a 3-sigma normal of a very wide part could cross zero: keep values physical
    return nom * np.maximum(1.0 + rel, 1e-3)


def inside(y: np.ndarray, target: float | None, window: float) -> np.ndarray | bool:
    """True where ``|y / target - 1| <= window``; True everywhere when there is no target."""
    if target is None or y is None:
        return True
    return np.abs(y / target - 1.0) <= window


def monte_carlo(
    stages, *, trials: int, distribution: str, window: dict[str, float], seed: int = 0
) -> MonteCarloResult:
    """Yield and histogram for ``stages``: a list of ``(topology, StagePieces, StageChoice)``."""
    rng = np.random.default_rng(seed)
    good = np.ones(trials, dtype=bool)
    per_stage, samples = [], []
    for topology, sp, choice in stages:
        f0, q, gain = evaluate(topology, sp.positions(draw(rng, sp, trials, distribution)))
        t = choice.target
        ok = (
            inside(f0, t.f0_hz, window["f0"])
            & inside(q, t.q, window["q"])
            & inside(gain, t.gain, window["gain"])
        )
        ok = np.broadcast_to(ok, (trials,))
        per_stage.append(float(ok.mean()))
        good &= ok
        samples.append((topology, f0, q, gain))
    p = float(good.mean())
    return MonteCarloResult(
        trials=trials,
        yield_=p,
        std_error=float(np.sqrt(p * (1.0 - p) / trials)),
        distribution=distribution,
        window=tuple((k, float(window[k])) for k in ("f0", "q", "gain")),
        stage_yield=tuple(per_stage),
        histogram=_histogram(stages, samples),
    )


def _nominal_chars(stages, which: str):
    out = []
    for topology, sp, choice in stages:
        if which == "target":
            t = choice.target
            f0 = np.array([t.f0_hz])
            # a second-order target always carries Q; 1/sqrt(2) only guards a malformed one
            q = None if topology.order == 1 else np.array([t.q if t.q is not None else 0.7071])
            gain = np.array([t.gain if t.gain is not None else 1.0])
        else:
            f0, q, gain = evaluate(topology, sp.positions(sp.nominal[None, :]))
        out.append((topology, f0, q, gain))
    return out


def _histogram(stages, samples) -> Histogram:
    if len(stages) == 1:
        values = samples[0][1]
        quantity = "f0 of the stage"
        nominal = float(_nominal_chars(stages, "nominal")[0][1][0])
        target = float(stages[0][2].target.f0_hz)
        outside = 0
    else:
        nominal_v, lo, hi, quantity = cascade_frequency(_nominal_chars(stages, "nominal"))
        target_v, *_ = cascade_frequency(_nominal_chars(stages, "target"))
        nominal, target = float(nominal_v[0]), float(target_v[0])
        around = (float(lo[0]), float(hi[0]))
        values, *_ = cascade_frequency(
            samples, around=around if np.isfinite(around).all() else None
        )
        outside = int(np.count_nonzero(~np.isfinite(values)))
        values = values[np.isfinite(values)]
    if values.size == 0:
        return Histogram(quantity, (), (), nominal, target, outside)
    lo, hi = float(values.min()), float(values.max())
    if hi - lo <= 1e-9 * hi:
        lo, hi = lo * (1 - 1e-6), hi * (1 + 1e-6)
    counts, edges = np.histogram(values, bins=HIST_BINS, range=(lo, hi))
    return Histogram(
        quantity,
        tuple(float(e) for e in edges),
        tuple(int(c) for c in counts),
        nominal,
        target,
        outside,
    )
