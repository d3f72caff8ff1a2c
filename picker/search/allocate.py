"""Joint allocation across stages with quantities shared (DESIGN.md 5).

Given, per stage, the list of its own feasible assignments with score ``<= t`` (sorted
best first), :func:`combine` finds the ``top`` best combinations (one row per stage)
that take no unit more often than it has pieces, under the key
``(max score, total pieces, worst tolerance, sum of tolerances)``. Depth-first search
over the stages with a shared usage counter; branch and bound: a branch stops when its
lower bound (its own key combined with the best remaining score and fewest remaining
pieces of the later stages) cannot beat the ``top``-th key found. Because each list is
sorted by score, the first row whose score alone exceeds the bound ends the loop.

Exactness across stages (the caller's loop in :mod:`picker.search.api`): every
combination with joint score ``<= t`` has each stage's score ``<= t``, so it is made of
rows of these lists; the search over them is exhaustive up to the bound, so the
combinations it returns are the best of all combinations with joint score ``<= t``.
If it finds fewer than needed, the caller raises ``t`` and asks again; the first ``t``
that yields enough gives the exact answer for the whole space.
"""

from __future__ import annotations

import bisect

import numpy as np


def combine(lists, counts: np.ndarray, *, top: int = 1, pieces_total: int | None = None):
    """Best ``top`` combinations: list of (key, tuple of row index per stage), best first."""
    n = len(lists)
    if any(len(rows) == 0 for rows in lists):
        return []
    min_score = [float(r.score[0]) for r in lists]
    min_pieces = [int(r.pieces.min()) for r in lists]
    max_pieces = [int(r.pieces.max()) for r in lists]
    rest_score = [0.0] * (n + 1)
    rest_min = [0] * (n + 1)
    rest_max = [0] * (n + 1)
    for s in range(n - 1, -1, -1):
        rest_score[s] = max(rest_score[s + 1], min_score[s])
        rest_min[s] = rest_min[s + 1] + min_pieces[s]
        rest_max[s] = rest_max[s + 1] + max_pieces[s]
    cols = [(r.score.tolist(), r.pieces.tolist(), r.tol_max.tolist(), r.tol_sum.tolist())
            for r in lists]
    usage_cache: list[dict[int, list]] = [{} for _ in lists]
    used: dict[int, int] = {}
    found: list[tuple] = []
    chosen: list[int] = []

    def needs(s, i):
        cache = usage_cache[s]
        if i not in cache:
            ids, mult = np.unique(lists[s].units[i], return_counts=True)
            cache[i] = [(int(u), int(m)) for u, m in zip(ids, mult) if u >= 0]
        return cache[i]

    def worst():
        return found[-1][0] if len(found) >= top else None

    def visit(s, score, pieces, tmax, tsum):
        if s == n:
            if pieces_total is not None and pieces != pieces_total:
                return
            key = (score, pieces, tmax, tsum, tuple(chosen))
            bisect.insort(found, (key[:4] + (key[4],), tuple(chosen)))
            del found[top:]
            return
        sc, pc, tm, ts = cols[s]
        for i in range(len(sc)):
            bound = worst()
            lb_score = max(score, sc[i], rest_score[s + 1])
            if bound is not None and lb_score > bound[0]:
                break
            p = pieces + pc[i]
            if pieces_total is not None and not (
                    p + rest_min[s + 1] <= pieces_total <= p + rest_max[s + 1]):
                continue
            if bound is not None and (lb_score, p + rest_min[s + 1],
                                      max(tmax, tm[i])) > bound[:3]:
                continue
            need = needs(s, i)
            if any(used.get(u, 0) + m > counts[u] for u, m in need):
                continue
            for u, m in need:
                used[u] = used.get(u, 0) + m
            chosen.append(i)
            visit(s + 1, max(score, sc[i]), p, max(tmax, tm[i]), tsum + ts[i])
            chosen.pop()
            for u, m in need:
                used[u] -= m

    visit(0, 0.0, 0, 0.0, 0.0)
    return [(key[:4], rows) for key, rows in found]
