"""Step 4 of the yield ranking (docs/yield.md): the best combinations of per-stage rows
by estimated yield and pieces, with quantities shared across the stages."""

from __future__ import annotations

import math
from collections import Counter

import numpy as np

STEPS = 200_000  # rows the joint search may try


def best_joint(stages, counts: dict, *, price: float, top: int, steps: int = STEPS):
    """Best ``top`` combinations by ``sum(cost) + price * pieces`` (then pieces), no unit
    used more often than ``counts`` allows.

    ``stages``: per stage ``(cost array, pieces array, needs)``, ``needs[i]`` the
    ``[(unit, pieces)]`` of row ``i``. Depth-first over the stages with rows in
    increasing key; a branch ends when its key plus the smallest keys of the later
    stages cannot beat the ``top``-th found. Returns ``([(key, pieces, rows)], complete)``.
    """
    n = len(stages)
    keyed = []
    for cost, pieces, needs in stages:
        k = np.asarray(cost, float) + price * np.asarray(pieces, float)
        order = np.lexsort((pieces, k))
        keyed.append((k[order].tolist(), np.asarray(pieces)[order].tolist(), needs, order))
    rest = [0.0] * (n + 1)
    for s in range(n - 1, -1, -1):
        rest[s] = rest[s + 1] + (keyed[s][0][0] if keyed[s][0] else math.inf)
    found: list[tuple] = []
    used: Counter = Counter()
    chosen: list[int] = []
    tried = [0]

    def visit(s, key, pieces):
        if s == n:
            found.append((key, pieces, tuple(chosen)))
            found.sort(key=lambda f: (f[0], f[1]))
            del found[top:]
            return
        ks, ps, needs, order = keyed[s]
        for i in range(len(ks)):
            tried[0] += 1
            if tried[0] > steps:
                raise StopIteration
            # ties end the branch too: rows come fewest pieces first within a key
            if len(found) >= top and key + ks[i] + rest[s + 1] >= found[-1][0]:
                break
            need = needs[int(order[i])]
            if any(used[u] + m > counts[u] for u, m in need):
                continue
            used.update(dict(need))
            chosen.append(int(order[i]))
            visit(s + 1, key + ks[i], pieces + ps[i])
            chosen.pop()
            used.subtract(dict(need))

    complete = True
    try:
        visit(0, 0.0, 0)
    except StopIteration:
        complete = False
    return found, complete
