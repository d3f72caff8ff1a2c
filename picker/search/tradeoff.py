"""Stage classes by piece count, and the trade-off between parts and precision.

Each stage's space splits by *pattern* (one piece or a pair in each position); a
pattern's sub-problem is searched like a stage (exact within a threshold, see
:mod:`picker.search.stage`). A *class* ``j`` of a stage is the union of its patterns
with ``j`` pieces in all; ``b_s(j)``, its best score, is exact.

Trade-off. One stage: the curve is ``b(j)``. Several stages: for a total ``k`` the joint
best is at least ``LB(k) = min over splits j_1 + ... = k of max_s b_s(j_s)``; starting
from ``t = LB(k)``, the classes with ``b_s(j) <= t`` are searched jointly with
quantities shared and the total fixed to ``k`` (:func:`picker.search.allocate.combine`);
if nothing is found ``t`` grows. Every combination with ``k`` pieces and score ``<= t``
uses, in each stage, a class with ``b_s(j_s) <= t``, so the first feasible ``t`` gives
the exact best for ``k``.
"""

from __future__ import annotations

import math

import numpy as np

from picker.search.allocate import combine
from picker.search.stage import StageProblem, StageRows, patterns


class StageClasses:
    """The pattern sub-problems of one stage, grouped by piece count."""

    def __init__(self, topo, target, space, *, singles: bool = False, label: str = "stage"):
        self.topology, self.target = topo, target
        self.by_j: dict[int, list[tuple[StageProblem, dict]]] = {}
        for pat in patterns(len(topo.positions), singles):
            arrays, back = {}, {}
            for p, n in zip(topo.positions, pat):
                values = space.values[p.kind]
                mask = values.pieces == n
                arrays[p.name], back[p.name] = values.subset(mask), np.flatnonzero(mask)
            problem = StageProblem(topo, target, space, arrays, label=label)
            if not problem.empty():
                self.by_j.setdefault(sum(pat), []).append((problem, back))
        self._best: dict[int, float] | None = None

    def best(self) -> dict[int, float]:
        """``{j: best score with exactly j pieces}`` over the reachable classes."""
        if self._best is None:
            self._best = {}
            for j, problems in self.by_j.items():
                b = math.inf
                # densest patterns (most pairs on the resistor side) first: their best
                # caps the search of the others in the class
                for problem, _ in sorted(problems, key=lambda pb: -_density(pb[0])):
                    rows, _ = problem.best(1, cap=b)
                    if len(rows):
                        b = min(b, float(rows.score[0]))
                if math.isfinite(b):
                    self._best[j] = b
        return self._best

    def classes(self, t: float):
        """``[(j, b_j, loader)]`` for the classes that have an assignment ``<= t``."""
        out = []
        for j, b in sorted(self.best().items()):
            if b <= t:
                out.append((j, b, lambda j=j: self.rows(j, t)))
        return out


    def rows(self, j: int, t: float) -> StageRows:
        """Every assignment of class ``j`` with score ``<= t``, indices into the full
        value arrays of the space (so :meth:`Space.arrangement` reads them)."""
        parts = []
        for problem, back in self.by_j[j]:
            rows = problem.within(t)
            parts.append(StageRows({n: back[n][i] for n, i in rows.idx.items()}, rows.score,
                                   rows.pieces, rows.tol_max, rows.tol_sum, rows.units))
        return merge(parts)


def _density(problem) -> int:
    return sum(len(a) for a in problem.arrays.values())


def merge(parts: list[StageRows]) -> StageRows:
    """One StageRows from several, sorted by (score, pieces, worst tol, tol sum)."""
    nonempty = [p for p in parts if len(p)] or parts[:1]
    if len(nonempty) == 1:
        return nonempty[0]
    names = list(nonempty[0].idx)
    merged = StageRows({n: np.concatenate([p.idx[n] for p in nonempty]) for n in names},
                       *(np.concatenate([getattr(p, f) for p in nonempty])
                         for f in ("score", "pieces", "tol_max", "tol_sum", "units")))
    order = np.lexsort((merged.tol_sum, merged.tol_max, merged.pieces, merged.score))
    return merged.take(order)


def tradeoff(classes: list[StageClasses], counts) -> list[tuple[int, float]]:
    """[(total pieces, best score)] for every reachable piece count, fewest pieces first."""
    from picker.search.api import grow

    best = [c.best() for c in classes]
    if any(not b for b in best):
        return []
    if len(classes) == 1:
        return sorted((j, s) for j, s in best[0].items() if math.isfinite(s))
    lb = {0: 0.0}
    for b in best:                      # LB(k) by dynamic programming over the stages
        nxt: dict[int, float] = {}
        for k, s in lb.items():
            for j, sj in b.items():
                v = max(s, sj)
                if v < nxt.get(k + j, math.inf):
                    nxt[k + j] = v
        lb = nxt
    curve = []
    for k in sorted(lb):
        t = lb[k]
        while True:
            found, _ = combine([c.classes(t) for c in classes], counts, top=1,
                               pieces_total=k)
            if found:
                curve.append((k, float(found[0][0][0])))
                break
            if math.isinf(t):
                break
            t = grow(t)
    return curve
