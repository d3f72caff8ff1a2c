"""Cheap, vectorised yield estimate of many stage assignments at once (docs/yield.md).

For each row (one assignment of a stage's positions) the estimate is first order:

* each physical piece varies on its own, ``x = x0 (1 + d)`` with ``d`` uniform in
  ``+/- tol`` or normal with ``tol`` = 3 sigma, the distributions of the Monte Carlo in
  ``picker.budget``; a measured piece has the meter's accuracy as its tolerance;
* a pair's ln value moves by ``w_a d_a + w_b d_b``: for a sum (resistors in series,
  capacitors in parallel) ``w_a = a / (a + b)``; for a product over a sum
  (resistors in parallel, capacitors in series) ``w_a = b / (a + b)``;
* the relative sensitivities ``S = d ln y / d ln x`` of f0, Q and gain to each position
  come from ``Topology.characteristics`` by a central difference in ln x, all rows in
  one evaluation per position and side;
* so ``ln(y / target) = ln(y_nominal / target) + sum_k c_k d_k / tol_k`` over the
  pieces ``k`` (:func:`linear_model`), and a row is inside when every target's value
  lies in ``[ln(1 - w), ln(1 + w)]``;
* that linear model is evaluated on ``SAMPLES`` seeded draws of the pieces' deviations,
  the same draws for every row (common random numbers, so rows are compared on the
  same luck): the shape of the distribution (a sum of few uniform pieces is far from
  normal) and the correlation of f0, Q and gain through shared pieces are kept.

What is exact: nothing here is a bound; the estimate only chooses which candidates the
real (seeded) Monte Carlo confirms. Its errors: the linearisation (small for parts
within a few percent) and the sampling (standard error about sqrt(p (1 - p) / SAMPLES)).
The product over *stages* is exact for the true yield, as stages share no piece.
"""

from __future__ import annotations

import numpy as np

STEP = 1e-5  # ln step of the central difference
SAMPLES = 4096  # shared draws of the linear model
BLOCK = 1 << 22  # rows x samples evaluated at a time


def position_terms(arrangements):
    """(nominal value, (n, 2) coefficients of the pieces' unit deviations) of one
    position over rows: ``d ln value = c_a u_a + c_b u_b`` with ``u`` in [-1, 1]
    (uniform) or 3 sigma = 1 (normal)."""
    n = len(arrangements)
    a, b = np.empty(n), np.ones(n)
    ta, tb = np.empty(n), np.zeros(n)
    pair, adds = np.zeros(n, bool), np.zeros(n, bool)
    for i, arr in enumerate(arrangements):
        a[i], ta[i] = arr.parts[0].value, arr.parts[0].tolerance
        if arr.arrangement != "single":
            pair[i] = True
            b[i], tb[i] = arr.parts[1].value, arr.parts[1].tolerance
            # the pair's value is a + b: resistors in series, capacitors in parallel
            adds[i] = (arr.arrangement == "series") == (arr.kind == "resistor")
    wa = np.where(pair, np.where(adds, a, b) / (a + b), 1.0)
    value = np.where(pair, np.where(adds, a + b, a * b / (a + b)), a)
    return value, np.stack([wa * ta, (1.0 - wa) * tb], axis=1)


def targets_of(topology, target) -> list[tuple[str, float]]:
    """The (name, goal) pairs the Monte Carlo checks for this stage."""
    out = [("f0", target.f0_hz)]
    if target.q is not None and topology.order == 2:
        out.append(("q", target.q))
    if target.gain is not None:
        out.append(("gain", target.gain))
    return out


def linear_model(topology, target, choices):
    """``{target: (mu (n,), coef (n, pieces))}``: ln(y / goal) = mu + coef @ u."""
    names = topology.position_names()
    nominal, terms = {}, {}
    for name in names:
        nominal[name], terms[name] = position_terms([dict(c.positions)[name] for c in choices])
    out = {}
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        base = _chars(topology, nominal)
        sens = {k: [] for k, _ in targets_of(topology, target)}
        for name in names:
            up = dict(nominal, **{name: nominal[name] * np.exp(STEP)})
            down = dict(nominal, **{name: nominal[name] * np.exp(-STEP)})
            hi, lo = _chars(topology, up), _chars(topology, down)
            for k in sens:
                s = (np.log(np.abs(hi[k])) - np.log(np.abs(lo[k]))) / (2 * STEP)
                sens[k].append(s[:, None] * terms[name])
        for k, goal in targets_of(topology, target):
            out[k] = (np.log(np.abs(base[k]) / goal), np.concatenate(sens[k], axis=1))
    return out


def unit_draws(n_pieces: int, distribution: str, samples: int = SAMPLES) -> np.ndarray:
    """Seeded ``(samples, n_pieces)`` deviations in units of the tolerance."""
    rng = np.random.default_rng(20261202)
    if distribution == "uniform":
        return rng.uniform(-1.0, 1.0, size=(samples, n_pieces))
    return rng.standard_normal(size=(samples, n_pieces)) / 3.0


def estimate(topology, target, choices, *, window: dict, distribution: str) -> np.ndarray:
    """Estimated yield (0..1) of each ``picker.parts.StageChoice`` of one stage.

    ``window``: relative window per target, ``{"f0": .., "q": .., "gain": ..}``."""
    n = len(choices)
    if n == 0:
        return np.zeros(0)
    model = linear_model(topology, target, choices)
    n_pieces = next(iter(model.values()))[1].shape[1]
    u = unit_draws(n_pieces, distribution)
    out = np.empty(n)
    step = max(1, BLOCK // u.shape[0])
    for start in range(0, n, step):
        rows = slice(start, start + step)
        good = np.ones((min(step, n - start), u.shape[0]), bool)
        for k, (mu, coef) in model.items():
            w = window[k]
            lo = np.log1p(-w) if w < 1 else -np.inf
            x = mu[rows, None] + coef[rows] @ u.T
            good &= (x >= lo) & (x <= np.log1p(w))
        out[rows] = good.mean(axis=1)
    return np.where(np.isfinite(out), out, 0.0)


def _chars(topology, values) -> dict:
    f0, q, gain = topology.characteristics(values)
    n = next(iter(values.values())).shape
    return {
        "f0": np.broadcast_to(np.asarray(f0, float), n),
        "q": None if q is None else np.broadcast_to(np.asarray(q, float), n),
        "gain": np.broadcast_to(np.abs(np.asarray(gain, float)), n),
    }
