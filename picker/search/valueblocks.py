"""The value blocks of one kind: singles and in-bounds pairs, each sorted (docs/search.md,
"Cost"). Made by :func:`picker.search.space.build_space`."""

from __future__ import annotations

import numpy as np

from picker.search.space import _FIELDS, PARALLEL, SERIES, SINGLE, Values

CHUNK = 1 << 20  # pairs generated at a time (memory: a few such blocks, never n^2 at once)
UNIT = np.int32  # unit ids (a stock file has far fewer than 2^31 units)
SMALL = np.int8  # piece counts and arrangement codes
SAMPLE_EVERY = 64  # pairs per value kept to place the sort buckets' edges


def kind_blocks(kind, ids, unit_val, unit_tol, counts, singles, limits):
    """(singles, pairs) of one kind within ``limits``, each sorted by (value, worst
    tolerance, tolerance sum, code, first unit, second unit).

    Pairs are never enumerated outside the bounds: with the singles sorted by value, the
    partners ``b >= a`` of each ``a`` whose sum lies in ``[lo, hi]`` are one index range
    (``b`` in ``[lo - a, hi - a]``), and so are those whose reciprocal sum does
    (``1/b`` in ``[1/hi - 1/a, 1/lo - 1/a]``); the ranges are widened by a relative 1e-9
    and the exact bound test applied after, so rounding drops nothing.

    Memory: beyond :data:`CHUNK` pairs, the pairs are made three times, block by block:
    the first pass keeps one value in ``SAMPLE_EVERY`` to set the edges of value buckets
    of about ``CHUNK`` pairs each, the second counts each bucket, the third writes each
    pair into its bucket's part of the output; each bucket is then sorted on its own
    (up to ``CHUNK`` pairs, the first pass keeps them and one sort does). Buckets are
    value ranges (equal values share one), so the order is that of one sort of the
    whole array, while the sort's temporaries stay the size of a bucket."""
    lo, hi = limits
    val, tol = unit_val[ids], unit_tol[ids]
    by_value = np.argsort(val, kind="stable")
    ids, val, tol = ids[by_value], val[by_value], tol[by_value]
    inside = (val >= lo) & (val <= hi)
    n1 = int(inside.sum())
    one = _sorted(
        {
            "value": val[inside],
            "pieces": np.ones(n1, SMALL),
            "unit_a": ids[inside].astype(UNIT),
            "unit_b": np.full(n1, -1, UNIT),
            "code": np.full(n1, SINGLE, SMALL),
        },
        unit_tol,
    )
    plans = []
    if not singles and ids.size:
        # resistors add in series, capacitors in parallel (picker.parts.combine)
        add_code, rec_code = (SERIES, PARALLEL) if kind == "resistor" else (PARALLEL, SERIES)
        for code, start, stop in (
            (add_code, *_sum_ranges(val, lo, hi)),
            (rec_code, *_reciprocal_ranges(val, lo, hi)),
        ):
            plans.append((code, code == add_code, start, stop))
    twice = counts[ids] >= 2 if ids.size else np.zeros(0, bool)

    def pairs():
        """(combined value, first unit, second unit, code) block by block."""
        for code, additive, start, stop in plans:
            for ia, ib in _pair_blocks(start, stop):
                keep = (ia != ib) | twice[ia]  # the same unit twice needs two pieces
                ia, ib = ia[keep], ib[keep]
                x, y = val[ia], val[ib]
                combined = x + y if additive else x * y / (x + y)
                ok = (combined >= lo) & (combined <= hi)
                ua, ub = ids[ia[ok]], ids[ib[ok]]
                yield combined[ok], np.minimum(ua, ub), np.maximum(ua, ub), code

    sample, total, held = [], 0, []
    for block in pairs():
        sample.append(block[0][::SAMPLE_EVERY])
        total += block[0].size
        held = [*held, block] if total <= CHUNK else []  # a few pairs: one pass is enough
    if total <= CHUNK:
        cols = {"value": np.concatenate([np.zeros(0)] + [b[0] for b in held])}
        cols["unit_a"] = np.concatenate([np.zeros(0, UNIT)] + [b[1].astype(UNIT) for b in held])
        cols["unit_b"] = np.concatenate([np.zeros(0, UNIT)] + [b[2].astype(UNIT) for b in held])
        cols["code"] = np.concatenate(
            [np.zeros(0, SMALL)] + [np.full(b[0].size, b[3], SMALL) for b in held]
        )
        cols["pieces"] = np.full(total, 2, SMALL)
        return one, _sorted(cols, unit_tol)
    picked = np.sort(np.concatenate(sample))
    edges = np.unique(picked[CHUNK // SAMPLE_EVERY :: CHUNK // SAMPLE_EVERY])
    del sample, held
    out = {
        "value": np.empty(total, float),
        "pieces": np.full(total, 2, SMALL),
        "unit_a": np.empty(total, UNIT),
        "unit_b": np.empty(total, UNIT),
        "code": np.empty(total, SMALL),
    }
    sizes = np.zeros(edges.size + 1, np.int64)
    for v, _, _, _ in pairs():  # the buckets' sizes, then each pair into its bucket
        sizes += np.bincount(np.searchsorted(edges, v, "right"), minlength=sizes.size)
    ends = np.cumsum(sizes)
    cursor = ends - sizes
    for v, a, b, code in pairs():
        bucket = np.searchsorted(edges, v, "right")
        order = np.argsort(bucket, kind="stable")
        bucket, runs = np.unique(bucket[order], return_counts=True)
        first = 0
        for k, m in zip(bucket.tolist(), runs.tolist(), strict=True):
            at, part = slice(cursor[k], cursor[k] + m), order[first : first + m]
            out["value"][at], out["unit_a"][at], out["unit_b"][at] = v[part], a[part], b[part]
            out["code"][at] = code
            cursor[k] += m
            first += m
    start = 0
    for stop in ends.tolist():
        if stop > start:
            part = _sorted({f: c[start:stop] for f, c in out.items()}, unit_tol)
            for f in _FIELDS[:5]:
                out[f][start:stop] = getattr(part, f)
        start = stop
    two = Values(**{f: out[f] for f in _FIELDS[:5]}, unit_tol=unit_tol)
    return one, two


def _sorted(cols: dict, unit_tol) -> Values:
    """``cols`` (the five stored columns) sorted by (value, worst tolerance, tolerance
    sum, code, first unit, second unit); ties keep that order of the unit ids.

    One sort by value, then the runs of equal values (the same value in several drawers,
    or two pairs that add up alike) sorted by the rest; code and unit ids in one integer
    key (code, then each id + 1 in 30 bits: far more units than a stock file holds)."""
    value = cols["value"]
    order = np.argsort(value, kind="stable")
    val = value[order]
    same = val[1:] == val[:-1]
    tie = np.zeros(val.size, bool)
    tie[:-1] |= same
    tie[1:] |= same
    at = np.flatnonzero(tie)
    if at.size:
        sub = order[at]
        run = np.cumsum(np.r_[True, val[at][1:] != val[at][:-1]])
        v = Values(**{f: cols[f][sub] for f in _FIELDS[:5]}, unit_tol=unit_tol)
        every = np.arange(sub.size)
        ids = (
            (v.code.astype(np.int64) << 60)
            | (v.unit_a.astype(np.int64) + 1) << 30
            | (v.unit_b.astype(np.int64) + 1)
        )
        order[at] = sub[np.lexsort((ids, v.tol_sum_at(every), v.tol_max_at(every), run))]
    return Values(**{f: cols[f][order] for f in _FIELDS[:5]}, unit_tol=unit_tol)


def _sum_ranges(val, lo, hi):
    """Per ``a`` (sorted ``val``), partners ``b >= a`` with ``a + b`` in ``[lo, hi]``."""
    first = np.arange(val.size)
    start = np.maximum(first, np.searchsorted(val, (lo - val) * (1 - 1e-9), side="left"))
    stop = np.searchsorted(val, (hi - val) * (1 + 1e-9), side="right")
    return start, np.maximum(stop, start)


def _reciprocal_ranges(val, lo, hi):
    """Per ``a``, partners ``b >= a`` with ``1/(1/a + 1/b)`` in ``[lo, hi]``."""
    first = np.arange(val.size)
    with np.errstate(divide="ignore", invalid="ignore"):
        inv_lo = 1.0 / np.float64(hi) - 1.0 / val  # 1/b >= this
        inv_hi = 1.0 / np.float64(lo) - 1.0 / val  # 1/b <= this (inf for lo = 0)
        b_min = np.where(inv_hi > 0, 1.0 / inv_hi, np.inf)
        b_max = np.where(inv_lo > 0, 1.0 / inv_lo, np.inf)
    start = np.maximum(first, np.searchsorted(val, b_min * (1 - 1e-9), side="left"))
    stop = np.searchsorted(val, np.where(np.isinf(b_max), np.inf, b_max * (1 + 1e-9)), "right")
    return start, np.maximum(stop, start)


def _pair_blocks(start, stop, chunk: int = CHUNK):
    """``(ia, ib)`` index arrays of every ``ib`` in ``[start[ia], stop[ia])``, in blocks."""
    width = np.maximum(stop - start, 0)
    cum = np.cumsum(width)
    first = 0
    while first < width.size:
        base = int(cum[first - 1]) if first else 0
        last = max(int(np.searchsorted(cum, base + chunk, side="right")), first + 1)
        w = width[first:last]
        ia = np.repeat(np.arange(first, last), w)
        offset = np.arange(ia.size) - np.repeat(np.cumsum(w) - w, w)
        ib = start[ia] + offset
        if ia.size:
            yield ia, ib
        first = last
