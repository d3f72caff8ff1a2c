"""Which purchases can matter, and a quick estimate of each (docs/buying.md).

A *source* is one filled stage the stock can build, or the topology's own ideal values
when the stock builds nothing: rank 1's stages, and each stage's best with single pieces
only. For every position of a source, the values tried are the preferred values just
below and just above its value and just below and above its *ideal value* (the value
that best meets the stage's targets with the other positions held, found on a
log-spaced grid within the bounds and refined twice).

The *estimate* of buying ``v`` for a position of a source: the stage with ``v`` there
as a single piece and, for each other position in turn, that position moved to the
realizable value (of the space) nearest its new ideal; the best of these. It orders the
real searches; it proves nothing.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from picker.search.stage import scores

GRID = 481  # points of the coarse grid of :func:`ideal_value` (about 60 per decade)


def rank_key(rank: str, max_error: float, pieces: int | None, score: float | None) -> tuple:
    """Sort key of a rank 1 (smaller is better); ``pieces=None``: no design at all.

    ``pieces``: within the goal, fewer pieces then the smaller error; outside it, the
    smaller error. ``error``: the smaller error, then fewer pieces."""
    if pieces is None or score is None:
        return (2.0, math.inf, math.inf) if rank == "pieces" else (math.inf, math.inf, 0.0)
    if rank == "pieces":
        return (0.0, float(pieces), score) if score <= max_error else (1.0, score, float(pieces))
    return (score, float(pieces), 0.0)


@dataclass(frozen=True)
class Source:
    stage: int
    values: dict  # position -> combined value
    pieces: dict  # position -> pieces (1 or 2)


def ideal_value(topo, target, values: dict, name: str, lo: float, hi: float) -> float | None:
    """The value of position ``name`` in [lo, hi] that best meets ``target`` with the
    other positions at ``values``; None when no value there gives a finite score."""
    if not (0 < lo < hi and math.isfinite(hi)):
        return None
    grid = np.geomspace(lo, hi, GRID)
    best = None
    for _ in range(3):  # coarse, then twice a finer grid around the best point
        trial = {n: (grid if n == name else float(v)) for n, v in values.items()}
        s = scores(topo, target, trial)
        i = int(np.argmin(s))
        if not math.isfinite(float(s[i])):
            return best
        best = float(grid[i])
        step = grid[min(i + 1, grid.size - 1)] / grid[max(i - 1, 0)]
        grid = np.geomspace(max(lo, best / step), min(hi, best * step), 101)
    return best


def bracket(x: float, mantissas: tuple[float, ...]) -> tuple[float, float]:
    """The preferred values just below and just above ``x`` (equal when ``x`` is one)."""
    exp = math.floor(math.log10(x))
    ladder = [float(f"{m * 10.0**e:.12g}") for e in (exp - 1, exp, exp + 1) for m in mantissas]
    below = max((v for v in ladder if v <= x * (1 + 1e-9)), default=ladder[0])
    above = min((v for v in ladder if v >= x * (1 - 1e-9)), default=ladder[-1])
    return below, above


def series_in(mantissas: tuple[float, ...], lo: float, hi: float) -> list[float]:
    """Every preferred value of the series within [lo, hi], ascending."""
    out = set()
    for e in range(math.floor(math.log10(lo)) - 1, math.ceil(math.log10(hi)) + 1):
        for m in mantissas:
            v = float(f"{m * 10.0**e:.12g}")
            if lo * (1 - 1e-9) <= v <= hi * (1 + 1e-9):
                out.add(v)
    return sorted(out)


def synthesized(stage: int, topo, target) -> list[Source]:
    """The topology's own ideal values (its default free choices), when it has them."""
    try:
        values = topo.synthesize(target)
    except Exception:  # a target the topology cannot meet: nothing to start from
        return []
    return [Source(stage, {n: float(v) for n, v in values.items()}, dict.fromkeys(values, 1))]


PARTNERS = 2  # stock values on each side of an ideal value that a purchase may pair with


def near_values(stages, sources: list[Source], bounds, mantissas, space) -> dict:
    """``{(kind, value): [(source, position, combined value there, pieces there)]}``:
    the purchases worth trying and where each may go (see the module text)."""
    out: dict[tuple[str, float], list] = {}
    for src in sources:
        topo, target = stages[src.stage]
        for p in topo.positions:
            lo, hi = bounds.of(p.kind)
            ideal = ideal_value(topo, target, src.values, p.name, lo, hi)
            for x, wanted in ((src.values[p.name], None), (ideal, ideal)):
                if x is None or not (x > 0 and math.isfinite(x)):
                    continue
                forms = [(x, None)]
                if wanted is not None:
                    forms += partner_forms(p.kind, x, space)
                for need, partner in forms:
                    for v in bracket(need, mantissas):
                        if not lo * (1 - 1e-9) <= v <= hi * (1 + 1e-9):
                            continue  # a part bought lies within the bounds itself
                        at = v if partner is None else partner(v)
                        spot = (src, p.name, at, 1 if partner is None else 2)
                        spots = out.setdefault((p.kind, v), [])
                        if spot not in spots:
                            spots.append(spot)
    return out


def partner_forms(kind: str, x: float, space) -> list:
    """``[(value to buy, combined(v))]``: a bought value that, in series or parallel
    with one of the ``PARTNERS`` single values on hand nearest below (resistors: series,
    capacitors: parallel) or above ``x``, makes ``x``."""
    singles = np.unique(space.with_pieces(kind, 1)[0].value)
    i = int(np.searchsorted(singles, x))
    out = []
    for w in singles[max(0, i - PARTNERS) : i]:
        w = float(w)
        need = x - w  # the adding arrangement (resistors in series, capacitors in parallel)
        if need > 0:
            out.append((need, lambda v, w=w: v + w))
    for w in singles[i : i + PARTNERS]:
        w = float(w)
        if w > x:
            need = 1.0 / (1.0 / x - 1.0 / w)  # the other arrangement
            out.append((need, lambda v, w=w: v * w / (v + w)))
    return out


def estimate(stages, src: Source, name: str, value: float, n: int, space, bounds):
    """(score, pieces) of the stage of ``src`` with ``name`` made ``value`` of ``n``
    pieces, one of them bought."""
    topo, target = stages[src.stage]
    vals = dict(src.values, **{name: value})
    pieces = dict(src.pieces, **{name: n})
    best = (float(scores(topo, target, vals)), sum(pieces.values()))
    for p in topo.positions:
        if p.name == name:
            continue
        ideal = ideal_value(topo, target, vals, p.name, *bounds.of(p.kind))
        if ideal is None:
            continue
        for near, near_pieces in space.nearest(p.kind, ideal):
            trial = dict(vals, **{p.name: near})
            n = sum(pieces.values()) - pieces[p.name] + near_pieces
            best = min(best, (float(scores(topo, target, trial)), n))
    return best
