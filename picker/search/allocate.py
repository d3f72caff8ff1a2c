"""Joint allocation across stages with quantities shared (docs/search.md).

Each stage offers its assignments in *classes* by piece count ``j`` (one class per
total of pieces in the stage, see :mod:`picker.search.tradeoff`); a class is described
by its best score ``b_j`` and a loader that returns every feasible assignment of that
class with score ``<= t`` (sorted by score), called only when the search reaches it.
:func:`combine` finds the ``top`` best combinations (one assignment per stage) that
take no unit more often than it has pieces, under the key ``(max score, total pieces,
worst tolerance, sum of tolerances)``: depth-first over the stages with a shared usage
counter, classes in increasing ``j``, rows in increasing score; branch and bound: a
class or row is skipped when the lower bound of its key (its own score and pieces,
the best scores and fewest pieces the later stages can offer) cannot beat the
``top``-th key found, and a class's loop ends at the first row whose score alone is
too high. Classes are loaded lazily, so a large class that the bound rules out is
never enumerated.

Exactness across stages (the caller's loop in :mod:`picker.search.api`): every
combination with joint score ``<= t`` consists of rows of these classes within ``t``;
the search is exhaustive up to the bound, so what it returns is the best of all
combinations with joint score ``<= t``. If it finds fewer than needed, the caller
raises ``t``; the first ``t`` that yields enough gives the exact answer for the space.
"""

from __future__ import annotations

import bisect

import numpy as np

STEPS = 300_000  # rows the depth-first search may try before it stops (see combine)
CHECK_EVERY = 512  # rows between two looks at the clock


class Incomplete(Exception):
    """The search stopped after ``STEPS`` rows; what it found is not proven best."""


def combine(
    stages,
    counts: np.ndarray,
    *,
    top: int = 1,
    pieces_total: int | None = None,
    steps: int | None = STEPS,
    memo: bool = True,
    look_ahead: bool = True,
    clock=None,
):
    """Best ``top`` combinations.

    ``stages``: per stage a list of ``(j, best_score, loader)`` classes (only classes
    with ``best_score <= t``). Returns ``[(key, ((j, row), ...))]``, best first, the
    loaded lists as ``{(stage, j): StageRows}``, and whether the search was complete:
    when scarce pieces make the stages block each other, the depth-first search can
    need very many steps; after ``steps`` rows it stops and returns what it has, marked
    incomplete (then not proven optimal; the caller says so). ``memo``: skip suffixes
    proven fruitless before (see the memo below); ``look_ahead``: the forward check
    (see :func:`later_stages_can_fill` below); exact with or without either.
    ``clock``: a :class:`picker.search.progress.Clock`, checked every ``CHECK_EVERY``
    rows; when it runs out the search returns what it has, marked incomplete (the
    caller tells this from the step limit by ``clock.stopped``).
    """
    n = len(stages)
    loaded: dict[tuple[int, int], object] = {}
    if any(not classes for classes in stages):
        return [], loaded, True
    stages = [sorted(c, key=lambda x: x[0]) for c in stages]
    min_score = [min(b for _, b, _ in c) for c in stages]
    min_j = [min(j for j, _, _ in c) for c in stages]
    max_j = [max(j for j, _, _ in c) for c in stages]
    rest_score, rest_min, rest_max = [0.0] * (n + 1), [0] * (n + 1), [0] * (n + 1)
    for s in range(n - 1, -1, -1):
        rest_score[s] = max(rest_score[s + 1], min_score[s])
        rest_min[s] = rest_min[s + 1] + min_j[s]
        rest_max[s] = rest_max[s + 1] + max_j[s]
    columns: dict[tuple[int, int], tuple] = {}
    usage: dict[tuple[int, int, int], list] = {}
    used: dict[int, int] = {}
    found: list[tuple] = []
    chosen: list[tuple[int, int]] = []
    tried = [0]

    # smallest worst-tolerance and tolerance sum per loaded class: lower bounds of what
    # a later stage adds to the tie-break keys (an unloaded class counts as 0, which is
    # a valid, weaker bound), so ties on (score, pieces) need not be enumerated
    class_tol: dict[tuple[int, int], tuple[float, float]] = {}

    def rows_of(s, j, loader):
        if (s, j) not in columns:
            rows = loader()
            loaded[(s, j)] = rows
            columns[(s, j)] = (rows.score.tolist(), rows.tol_max.tolist(), rows.tol_sum.tolist())
            if len(rows):
                class_tol[(s, j)] = (float(np.min(rows.tol_max)), float(np.min(rows.tol_sum)))
        return columns[(s, j)]

    def rest_tol(s):
        """Lower bounds (worst tolerance, tolerance sum) of stages s .. n-1."""
        tm_lb, ts_lb = 0.0, 0.0
        for r in range(s, n):
            tms, tss = [], []
            for j, _, _ in stages[r]:
                tm, ts = class_tol.get((r, j), (0.0, 0.0))
                tms.append(tm)
                tss.append(ts)
            tm_lb = max(tm_lb, min(tms))
            ts_lb += min(tss)
        return tm_lb, ts_lb

    def needs(s, j, i):
        key = (s, j, i)
        if key not in usage:
            ids, mult = np.unique(loaded[(s, j)].units[i], return_counts=True)
            usage[key] = [(int(u), int(m)) for u, m in zip(ids, mult, strict=False) if u >= 0]
        return usage[key]

    # pieces left per unit, kept beside ``used`` for the vectorised look-ahead below
    avail = np.array(counts, dtype=np.int64, copy=True)

    def later_stages_can_fill(s_from):
        """Forward check: False only when some later stage has no row left that fits the
        pieces still available (every class of it loaded and each of its rows needing a
        unit that is used up). A relaxed test (a row needing one unit twice counts as
        fitting when one piece is left), so it never drops a feasible branch; it cuts the
        branches where scarce pieces are already taken, which otherwise cost a full
        enumeration of the later stages to prove empty."""
        for r in range(s_from, n):
            possible = False
            for j, _, _ in stages[r]:
                rows = loaded.get((r, j))
                if rows is None:
                    possible = True
                    break
                units = rows.units
                if len(units) == 0:
                    continue
                fits = np.all((units < 0) | (avail[np.maximum(units, 0)] >= 1), axis=1)
                if fits.any():
                    possible = True
                    break
            if not possible:
                return False
        return True

    # Memo of fruitless suffixes. A visit of stages s..n-1 that added nothing to
    # ``found`` proves: with this prefix key P1 = (score, pieces, tmax, tsum), this
    # bound B1 and these pieces left, no completion beats B1. The key grows
    # componentwise with the prefix (max and sum) and the bound only falls, so a later
    # visit with the same pieces left, a prefix >= P1 componentwise and a bound <= B1
    # cannot add anything either, and is skipped. "The same pieces left" only counts
    # the units that can still bind: those whose largest possible demand by the later
    # stages exceeds what is left (the others never block a row). Used only when every
    # class of the later stages is loaded, so that demand is known in full.
    inserted = [0]
    fruitless: dict[tuple, list] = {}
    demand_cache: dict[int, tuple] = {}

    def suffix_demand(s_from):
        """(unit ids, largest total demand) of stages s_from..n-1, or None if a class of
        them is not loaded yet."""
        if s_from in demand_cache:
            return demand_cache[s_from]
        total: dict[int, int] = {}
        for r in range(s_from, n):
            per_stage: dict[int, int] = {}
            for j, _, _ in stages[r]:
                rows = loaded.get((r, j))
                if rows is None:
                    return None
                units = rows.units
                if not len(units):
                    continue
                idx = np.repeat(np.arange(len(units)), units.shape[1])
                flat = units.ravel()
                keep = flat >= 0
                pairs, mult = np.unique(
                    np.stack([idx[keep], flat[keep]]), axis=1, return_counts=True
                )
                for u, m in zip(pairs[1].tolist(), mult.tolist(), strict=False):
                    if m > per_stage.get(u, 0):
                        per_stage[u] = m
            for u, m in per_stage.items():
                total[u] = total.get(u, 0) + m
        ids = np.array(sorted(total), dtype=np.int64)
        dem = np.array([total[u] for u in ids.tolist()], dtype=np.int64)
        demand_cache[s_from] = (ids, dem)
        return demand_cache[s_from]

    def memo_key(s):
        got = suffix_demand(s)
        if got is None:
            return None
        ids, dem = got
        left = avail[ids]
        binding = dem > left
        return (s, ids[binding].tobytes(), left[binding].tobytes())

    def visit(s, score, pieces, tmax, tsum):
        if s == n:
            if pieces_total is None or pieces == pieces_total:
                entry = ((score, pieces, tmax, tsum, tuple(chosen)), tuple(chosen))
                at = bisect.bisect(found, entry)
                if at < top:
                    found.insert(at, entry)
                    del found[top:]
                    inserted[0] += 1
            return
        key = memo_key(s) if s > 0 and memo else None
        bound0 = found[-1][0][:4] if len(found) >= top else None
        if key is not None:
            for ps, pp, pt, pts, b in fruitless.get(key, ()):
                if (
                    ps <= score
                    and pt <= tmax
                    and pts <= tsum
                    and (pp == pieces if pieces_total is not None else pp <= pieces)
                    and (b is None or (bound0 is not None and bound0 <= b))
                ):
                    return
        before = inserted[0]
        _visit(s, score, pieces, tmax, tsum)
        if key is not None and inserted[0] == before:
            entries = fruitless.setdefault(key, [])
            if len(entries) < 8:
                entries.append((score, pieces, tmax, tsum, bound0))

    arrays: dict[tuple[int, int], tuple] = {}

    def _last(s, j, p, score, tmax, tsum):
        """The last stage's rows of class ``j`` at once (vectorised): the same entries
        the row loop would insert, since ``found`` keeps the ``top`` smallest keys of
        every completion it is offered, in whatever order they come."""
        if (s, j) not in arrays:
            rows = loaded[(s, j)]
            u = np.asarray(rows.units)
            mult = np.stack([(u == u[:, c : c + 1]).sum(axis=1) for c in range(u.shape[1])], 1)
            arrays[(s, j)] = (rows.score, rows.tol_max, rows.tol_sum, u, mult)
        sc, tm, ts, u, mult = arrays[(s, j)]
        bound = found[-1][0] if len(found) >= top else None
        stop = sc.size
        if bound is not None:
            stop = 0 if score > bound[0] else int(np.searchsorted(sc, bound[0], side="right"))
        tried[0] += stop
        over = steps is not None and tried[0] > steps
        if over:
            stop -= tried[0] - steps
        if clock is not None:
            clock.check()
        if stop > 0:
            fits = np.all((u[:stop] < 0) | (avail[np.maximum(u[:stop], 0)] >= mult[:stop]), 1)
            idx = np.flatnonzero(fits)
            k0 = np.maximum(score, sc[idx])
            k2 = np.maximum(tmax, tm[idx])
            k3 = tsum + ts[idx]
            order = np.lexsort((idx, k3, k2, k0))[:top]
            prefix = tuple(chosen)
            for o in order.tolist():
                i = int(idx[o])
                ch = prefix + ((j, i),)
                entry = ((float(k0[o]), p, float(k2[o]), float(k3[o]), ch), ch)
                at = bisect.bisect(found, entry)
                if at >= top:
                    break
                found.insert(at, entry)
                del found[top:]
                inserted[0] += 1
        if over:
            raise Incomplete

    def _open_rows(s, j, score, p_lb, tmax, tsum, rest_tm, rest_ts):
        """Row indices of class ``j`` of stage ``s`` whose lower-bound key can still
        beat the ``top``-th key found (every row, before ``top`` are found). The bound
        only falls during the loop, so a row cut here would be cut there too."""
        rows = loaded[(s, j)]
        if len(found) < top:
            return range(len(rows))
        b0, b1, b2, b3 = found[-1][0][:4]
        lb = np.maximum(max(score, rest_score[s + 1]), rows.score)
        stop = int(np.searchsorted(lb, b0, side="right"))
        lb = lb[:stop]
        k2 = np.maximum(max(tmax, rest_tm), rows.tol_max[:stop])
        k3 = tsum + rows.tol_sum[:stop] + rest_ts
        if p_lb != b1:
            ok = (lb < b0) | (p_lb < b1)
        else:
            ok = (lb < b0) | ((k2 < b2) | ((k2 == b2) & (k3 < b3)))
        return np.flatnonzero(ok).tolist()

    def _visit(s, score, pieces, tmax, tsum):
        for j, b, loader in stages[s]:
            p = pieces + j
            if pieces_total is not None and not (
                p + rest_min[s + 1] <= pieces_total <= p + rest_max[s + 1]
            ):
                continue
            bound = found[-1][0] if len(found) >= top else None
            if (
                bound is not None
                and (max(score, b, rest_score[s + 1]), p + rest_min[s + 1]) > bound[:2]
            ):
                continue
            sc, tm, ts = rows_of(s, j, loader)
            if s + 1 == n:
                _last(s, j, p, score, tmax, tsum)
                continue
            rest_tm, rest_ts = rest_tol(s + 1)
            last = -1
            for i in _open_rows(s, j, score, p + rest_min[s + 1], tmax, tsum, rest_tm, rest_ts):
                step, last = i - last, i
                tried[0] += step  # the rows skipped count as tried, as in a plain loop
                if steps is not None and tried[0] > steps:
                    raise Incomplete
                if clock is not None and tried[0] % CHECK_EVERY < step:
                    clock.check()
                bound = found[-1][0] if len(found) >= top else None
                lb = max(score, sc[i], rest_score[s + 1])
                if bound is not None:
                    if lb > bound[0]:
                        break
                    if (
                        lb,
                        p + rest_min[s + 1],
                        max(tmax, tm[i], rest_tm),
                        tsum + ts[i] + rest_ts,
                    ) >= bound[:4]:
                        continue
                need = needs(s, j, i)
                if any(used.get(u, 0) + m > counts[u] for u, m in need):
                    continue
                for u, m in need:
                    used[u] = used.get(u, 0) + m
                    avail[u] -= m
                if s + 1 == n or not look_ahead or later_stages_can_fill(s + 1):
                    chosen.append((j, i))
                    visit(s + 1, max(score, sc[i]), p, max(tmax, tm[i]), tsum + ts[i])
                    chosen.pop()
                for u, m in need:
                    used[u] -= m
                    avail[u] += m

    from picker.search.progress import Stopped

    complete = True
    try:
        visit(0, 0.0, 0, 0.0, 0.0)
    except (Incomplete, Stopped):
        complete = False
    return [(key[:4], rows) for key, rows in found], loaded, complete
