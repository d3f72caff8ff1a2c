"""Tolerance corners, the Q range inside the tolerance box, and sensitivities.

Every physical piece varies on its own within ``value * (1 +/- tolerance)``; the two
pieces of a series or parallel pair are separate pieces.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import product

import numpy as np

from picker.budget.pieces import StagePieces, evaluate

MAX_CORNER_PIECES = 16  # 2**16 = 65,536 corners: still one small array
GRID_LEVELS_MAX_POINTS = 60_000
BOX_SAMPLE_POINTS = 20_000


@dataclass(frozen=True)
class ToleranceResult:
    """Extremes of f0 (Hz), Q and gain over the tolerance box of one stage."""

    f0: tuple[float, float]
    q: tuple[float, float] | None
    gain: tuple[float, float] | None
    corners: int  # corners evaluated
    exhaustive: bool  # True when every corner was evaluated
    method: str  # how the ranges were found, in words
    # (position, S_f0, S_q or None, S_gain), each d ln y / d ln x
    sensitivities: tuple[tuple[str, float, float | None, float], ...]


def corner_matrix(n: int) -> np.ndarray:
    """All 2**n sign patterns as a ``(2**n, n)`` array of -1.0/+1.0 (row k = bits of k)."""
    k = np.arange(2**n, dtype=np.int64)[:, None]
    bits = (k >> np.arange(n, dtype=np.int64)) & 1
    return bits * 2.0 - 1.0


def box_values(lo: np.ndarray, hi: np.ndarray, signs: np.ndarray) -> np.ndarray:
    """Piece values for ``signs`` in [-1, 1] between per-piece ``lo`` and ``hi``."""
    return lo + (hi - lo) * (signs + 1.0) / 2.0


def _grid3(n: int) -> np.ndarray:
    levels = np.array(list(product((-1.0, 0.0, 1.0), repeat=n)))
    return levels


def _sweep(
    topology, sp, lo, hi, pts, q_pts, sense: float, *, starts=4, levels=33, passes=3
) -> float:
    """Best Q (sense +1: largest, -1: smallest) found by coordinate sweeps inside the box.

    From the ``starts`` best points of ``pts``, each piece in turn is swept over
    ``levels`` evenly spaced values of its band with the others held; the best value is
    kept; ``passes`` rounds. Every point evaluated is a real point of the box, so the
    result never overstates the range; it finds an interior extremum such as the Q peak
    of a Sallen-Key stage at equal resistors.
    """
    order = np.argsort(sense * q_pts)[::-1][:starts]
    cur = pts[order].copy()  # (starts, n) in [-1, 1]
    grid = np.linspace(-1.0, 1.0, levels)
    best = sense * q_pts[order]
    for _ in range(passes):
        for j in range(cur.shape[1]):
            trial = np.repeat(cur[:, None, :], levels, axis=1)  # (starts, levels, n)
            trial[:, :, j] = grid[None, :]
            _, qv, _ = evaluate(topology, sp.positions(box_values(lo, hi, trial)))
            k = np.argmax(sense * qv, axis=1)
            val = (sense * qv)[np.arange(len(k)), k]
            better = val > best
            cur[better, j] = grid[k[better]]
            best = np.where(better, val, best)
    return float(sense * best.max())


def box_extremes(
    topology,
    sp: StagePieces,
    lo: np.ndarray,
    hi: np.ndarray,
    *,
    seed: int = 0,
    widen_q: bool = True,
):
    """Extremes of (f0, q, gain) over the box of piece values ``lo..hi``.

    f0 and gain come from the corners (every corner when there are at most
    ``MAX_CORNER_PIECES`` pieces, else a seeded sample of corners, said in ``method``).
    Q can peak inside the box (e.g. a Sallen-Key Q is largest where its two resistors
    are equal), so its range is widened: a 3-level grid (each piece at low, nominal,
    high) when that grid is small, else ``BOX_SAMPLE_POINTS`` seeded uniform points,
    then coordinate sweeps from the best points (``_sweep``). This is a search over real
    points of the box, not a proof of a bound.

    Returns ``(f0, q, gain, corners, exhaustive, method)``.
    """
    n = len(sp.pieces)
    rng = np.random.default_rng(seed)
    if n <= MAX_CORNER_PIECES:
        signs = corner_matrix(n)
        exhaustive = True
        method = f"all {2**n} corners of {n} pieces"
    else:
        signs = rng.choice([-1.0, 1.0], size=(2**MAX_CORNER_PIECES, n))
        exhaustive = False
        method = (
            f"{n} pieces are too many for every corner: {2**MAX_CORNER_PIECES} "
            f"seeded random corners"
        )
    f0, q, gain = evaluate(topology, sp.positions(box_values(lo, hi, signs)))
    f0_r = (float(f0.min()), float(f0.max()))
    gain_r = (float(gain.min()), float(gain.max()))
    q_r = None
    if q is not None:
        q_lo, q_hi = float(q.min()), float(q.max())
        if widen_q:
            if 3**n <= GRID_LEVELS_MAX_POINTS:
                inner = _grid3(n)
                how = f"a {3**n}-point 3-level grid"
            else:
                inner = rng.uniform(-1.0, 1.0, size=(BOX_SAMPLE_POINTS, n))
                how = f"{BOX_SAMPLE_POINTS} seeded points"
            pts = np.concatenate([signs, inner])
            _, q_all, _ = evaluate(topology, sp.positions(box_values(lo, hi, pts)))
            q_lo = min(q_lo, _sweep(topology, sp, lo, hi, pts, q_all, -1.0))
            q_hi = max(q_hi, _sweep(topology, sp, lo, hi, pts, q_all, +1.0))
            method += f"; Q also searched inside the box ({how}, then coordinate sweeps)"
        q_r = (q_lo, q_hi)
    return f0_r, q_r, gain_r, len(signs), exhaustive, method


def sensitivities(topology, sp: StagePieces, *, step: float = 1e-5):
    """Relative sensitivities d ln y / d ln x of f0, Q and gain to each position value.

    Central difference in ln x: ``(ln y(x e^h) - ln y(x e^-h)) / (2 h)``, all positions
    in one vectorised evaluation. S_q is None for first-order stages.

    References
    ----------
    .. [1] Classical sensitivity S^y_x = (x / y) dy/dx of active-filter design (common
           practice); e.g. S^f0 = -1/2 to each R and C of a second-order stage (from memory).
    """
    nominal = sp.positions(sp.nominal)
    names = list(nominal)
    m = len(names)
    values = {k: np.full(2 * m, float(v)) for k, v in nominal.items()}
    for i, k in enumerate(names):
        values[k][2 * i] *= np.exp(step)
        values[k][2 * i + 1] *= np.exp(-step)
    f0, q, gain = evaluate(topology, values)

    def sens(y, i):
        # ln |y|: the relative sensitivity stays defined for a negative (unstable) Q
        with np.errstate(divide="ignore", invalid="ignore"):
            return float((np.log(abs(y[2 * i])) - np.log(abs(y[2 * i + 1]))) / (2 * step))

    out = []
    for i, k in enumerate(names):
        out.append((k, sens(f0, i), None if q is None else sens(q, i), sens(gain, i)))
    return tuple(out)


def tolerance(topology, sp: StagePieces, *, sets_gain: bool, seed: int = 0) -> ToleranceResult:
    """Tolerance extremes and sensitivities of one stage (gain range None unless set)."""
    nom, tol = sp.nominal, sp.tolerance
    f0, q, gain, corners, exhaustive, method = box_extremes(
        topology, sp, nom * (1 - tol), nom * (1 + tol), seed=seed
    )
    return ToleranceResult(
        f0=f0,
        q=q,
        gain=gain if sets_gain else None,
        corners=corners,
        exhaustive=exhaustive,
        method=method,
        sensitivities=sensitivities(topology, sp),
    )
