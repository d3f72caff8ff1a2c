"""The windowed join: all partial assignments of a plan group whose values lie in the windows.

Rows are partial assignments (one index into each filled position's sorted value array).
Each step asks its window function for intervals per row, turns them into index ranges
with ``np.searchsorted`` (left edge 'left', right edge 'right', so every value inside a
closed interval is kept), merges overlapping ranges of a row, and expands the rows.
Intervals are widened by a relative ``EPS`` first, so floating-point rounding in the
window algebra never drops an assignment that the exact score accepts.
Work proceeds depth first in blocks of at most ``BLOCK`` rows, so memory stays bounded.
"""

from __future__ import annotations

from collections.abc import Iterator

import numpy as np

from picker.errors import NoDesignError

EPS = 1e-9
BLOCK = 1 << 18
LIMIT = 4_000_000  # rows a group may hold before the search gives up


def group_rows(
    group,
    arrays: dict,
    ctx,
    *,
    neighbors: bool = False,
    block: int = BLOCK,
    outer=None,
    tick=None,
) -> Iterator[dict[str, np.ndarray]]:
    """Blocks of complete rows of ``group`` (position -> index array).

    ``arrays``: position -> :class:`picker.search.space.Values`. ``ctx``: the
    :class:`picker.search.plans.Windows`, or None for no windows (every value), or a
    callable returning the current one (asked again before each block of outer values,
    so a caller can tighten the threshold as it finds better rows: branch and bound).
    ``neighbors``: also keep the nearest value just outside each non-empty window (the
    cheap probe that finds a first feasible score). ``outer``: indices of the first
    position to use (default all), taken in blocks of growing size. ``tick``: called
    before each block at every level (a clock's check, which may raise to stop).
    """
    first = group.steps[0].position
    if outer is None:
        outer = np.arange(len(arrays[first]), dtype=np.int64)
    start, size = 0, 16
    while start < outer.size:
        rows = {first: outer[start : start + size]}
        current = ctx() if callable(ctx) else ctx
        yield from _expand(group.steps, 1, rows, arrays, current, neighbors, block, tick)
        start += size
        size = min(2 * size, block)


def _expand(steps, level, rows, arrays, ctx, neighbors, block, tick=None):
    if tick is not None:
        tick()
    nrows = next(iter(rows.values())).size
    if nrows == 0:
        return
    if level == len(steps):
        yield rows
        return
    step = steps[level]
    values = arrays[step.position].value
    lo, hi = _ranges(step, rows, arrays, ctx, values, neighbors, nrows)
    counts = np.maximum(hi - lo, 0)
    per_row = counts.sum(axis=1)
    cum = np.cumsum(per_row)
    start = 0
    while start < nrows:
        base = cum[start - 1] if start else 0
        stop = int(np.searchsorted(cum, base + block, side="right"))
        stop = max(stop, start + 1)
        if stop == start + 1 and per_row[start] > block:
            # one row with more picks than a block (a wide window over a pair array):
            # its picks go in blocks too, so no level holds more than ``block`` rows
            for new_rows in _split_row(rows, start, lo[start], counts[start], step.position, block):
                yield from _expand(steps, level + 1, new_rows, arrays, ctx, neighbors, block, tick)
            start = stop
            continue
        sub = slice(start, stop)
        new_rows = _materialize(rows, sub, lo[sub], counts[sub], step.position)
        yield from _expand(steps, level + 1, new_rows, arrays, ctx, neighbors, block, tick)
        start = stop


def _split_row(rows, r, lo, counts, position, block):
    """Row ``r`` of ``rows`` expanded by its picks (ranges ``lo[j] .. lo[j] + counts[j]``,
    in order), at most ``block`` picks at a time."""
    for first, count in zip(lo.tolist(), counts.tolist(), strict=True):
        for a in range(first, first + count, block):
            picks = np.arange(a, min(a + block, first + count), dtype=np.int64)
            same = np.zeros(picks.size, np.int64)
            yield {pos: idx[r : r + 1][same] for pos, idx in rows.items()} | {position: picks}


def _ranges(step, rows, arrays, ctx, values, neighbors, nrows):
    n = values.size
    if step.window is None or ctx is None:
        return np.zeros((nrows, 1), np.int64), np.full((nrows, 1), n, np.int64)
    current = {pos: arrays[pos].value[idx] for pos, idx in rows.items()}
    los, his = [], []
    for w_lo, w_hi in step.window(current, ctx):
        w_lo = np.broadcast_to(np.asarray(w_lo, float), (nrows,))
        w_hi = np.broadcast_to(np.asarray(w_hi, float), (nrows,))
        with np.errstate(invalid="ignore"):
            ok = w_lo <= w_hi
        a = np.searchsorted(values, np.where(ok, w_lo * (1.0 - EPS), np.inf), side="left")
        b = np.searchsorted(values, np.where(ok, w_hi * (1.0 + EPS), -np.inf), side="right")
        if neighbors:
            a = np.where(ok, np.maximum(a - 1, 0), a)
            b = np.where(ok, np.minimum(b + 1, n), b)
        b = np.maximum(a, b)
        los.append(a)
        his.append(b)
    lo, hi = np.stack(los, axis=1), np.stack(his, axis=1)
    if lo.shape[1] > 1:  # make the ranges of a row disjoint
        order = np.argsort(lo, axis=1, kind="stable")
        lo, hi = np.take_along_axis(lo, order, 1), np.take_along_axis(hi, order, 1)
        reach = hi[:, 0].copy()
        for j in range(1, lo.shape[1]):
            lo[:, j] = np.maximum(lo[:, j], reach)
            hi[:, j] = np.maximum(hi[:, j], lo[:, j])
            reach = np.maximum(reach, hi[:, j])
    return lo, hi


def _materialize(rows, sub, lo, counts, position):
    parents, picks = [], []
    ids = np.arange(lo.shape[0])
    for j in range(lo.shape[1]):
        c = counts[:, j]
        total = int(c.sum())
        if not total:
            continue
        rep = np.repeat(ids, c)
        offset = np.arange(total) - np.repeat(np.cumsum(c) - c, c)
        parents.append(rep)
        picks.append(lo[rep, j] + offset)
    if not parents:
        return {pos: idx[:0] for pos, idx in rows.items()} | {position: np.zeros(0, np.int64)}
    parent = np.concatenate(parents)
    out = {pos: idx[sub][parent] for pos, idx in rows.items()}
    out[position] = np.concatenate(picks)
    return out


def pairs_in_blocks(lo: np.ndarray, counts: np.ndarray, block: int = BLOCK):
    """``(parent, pick)`` arrays: for each row ``r``, picks ``lo[r] .. lo[r] + counts[r] - 1``,
    in blocks of at most ``block`` pairs (a row with more picks is split)."""
    cum = np.cumsum(counts)
    start = 0
    while start < counts.size:
        base = int(cum[start - 1]) if start else 0
        stop = max(int(np.searchsorted(cum, base + block, side="right")), start + 1)
        if stop == start + 1 and counts[start] > block:
            first, count = int(lo[start]), int(counts[start])
            for a in range(first, first + count, block):
                pick = np.arange(a, min(a + block, first + count), dtype=np.int64)
                yield np.full(pick.size, start, np.int64), pick
            start = stop
            continue
        c = counts[start:stop]
        total = int(c.sum())
        if total:
            parent = np.repeat(np.arange(start, stop), c)
            offset = np.arange(total) - np.repeat(np.cumsum(c) - c, c)
            yield parent, lo[parent] + offset
        start = stop


def collect(blocks, what: str) -> dict[str, np.ndarray]:
    """Concatenate row blocks; NoDesignError when they exceed ``LIMIT`` rows."""
    parts: list[dict] = []
    total = 0
    for rows in blocks:
        total += next(iter(rows.values())).size
        if total > LIMIT:
            raise NoDesignError(
                f"{what}: more than {LIMIT:,} partial assignments lie this "
                "far from the targets; the stock is too far from them "
                "to search exhaustively (narrow the bounds or add parts)"
            )
        parts.append(rows)
    if not parts:
        return {}
    return {pos: np.concatenate([p[pos] for p in parts]) for pos in parts[0]}
