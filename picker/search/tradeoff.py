"""Trade-off between parts and precision: the best score for each total piece count.

Each stage's space splits by *pattern* (one piece or a pair in each position); a
pattern's sub-problem is searched like a stage (exact within a threshold, see
:mod:`picker.search.stage`), so ``b_s(j)``, the best score of stage ``s`` with exactly
``j`` pieces, is exact. One stage: the curve is ``b(j)``. Several stages: for a total
``k`` the joint best is at least ``LB(k) = min over splits j_1 + ... = k of max_s
b_s(j_s)``; starting from ``t = LB(k)``, the per-stage lists of the pattern classes
whose ``b_s(j) <= t`` are searched jointly with quantities shared and the total fixed
to ``k`` (:func:`picker.search.allocate.combine`); if nothing is found ``t`` grows.
Every combination with ``k`` pieces and score ``<= t`` uses, in each stage, a class
with ``b_s(j_s) <= t``, so the first feasible ``t`` gives the exact best for ``k``.
"""

from __future__ import annotations

import math

import numpy as np

from picker.search.allocate import combine
from picker.search.stage import StageProblem, StageRows, patterns


def _pattern_problems(topo, target, space, singles):
    out = []
    for pat in patterns(len(topo.positions), singles):
        arrays = {}
        for p, n in zip(topo.positions, pat):
            values = space.values[p.kind]
            arrays[p.name] = values.subset(values.pieces == n)
        problem = StageProblem(topo, target, space, arrays)
        if not problem.empty():
            out.append((sum(pat), problem))
    return out


def _merge(parts: list[StageRows]) -> StageRows:
    parts = [p for p in parts if len(p)]
    if not parts:
        return None
    if len(parts) == 1:
        return parts[0]
    names = list(parts[0].idx)
    merged = StageRows({n: np.concatenate([p.idx[n] for p in parts]) for n in names},
                       *(np.concatenate([getattr(p, f) for p in parts])
                         for f in ("score", "pieces", "tol_max", "tol_sum", "units")))
    order = np.lexsort((merged.tol_sum, merged.tol_max, merged.pieces, merged.score))
    return merged.take(order)


def tradeoff(stages, space, *, singles: bool = False) -> list[tuple[int, float]]:
    """[(total pieces, best score)] for every reachable piece count, fewest pieces first."""
    from picker.search.api import grow

    per_stage = [_pattern_problems(topo, target, space, singles) for topo, target in stages]
    best: list[dict[int, float]] = []
    for problems in per_stage:
        b: dict[int, float] = {}
        for j, problem in problems:
            rows, _ = problem.best(1)
            if len(rows):
                b[j] = min(b.get(j, math.inf), float(rows.score[0]))
        best.append(b)
    if any(not b for b in best):
        return []
    if len(stages) == 1:
        return sorted(best[0].items())
    # LB(k) by dynamic programming over the stages
    lb = {0: 0.0}
    for b in best:
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
            lists = []
            for problems, b in zip(per_stage, best):
                rows = [p.within(t) for j, p in problems if b.get(j, math.inf) <= t]
                lists.append(_merge(rows))
            found = [] if any(r is None for r in lists) else combine(
                lists, space.counts, top=1, pieces_total=k)
            if found:
                curve.append((k, float(found[0][0][0])))
                break
            if math.isinf(t):
                break
            t = grow(t)
    return curve
