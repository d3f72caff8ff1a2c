"""The search space: supply units and realizable values per kind (docs/search.md).

A *unit* is a group of interchangeable physical pieces: the nominal pieces of one stock
line (``count = nominal_qty``, value = the nominal value, tolerance = the line's) or one
individually measured piece (``count = 1``, value = its reading, tolerance = the line's
meter accuracy). Units have one id space across kinds (resistor units first).

A *realizable value* fills one position: a single unit, or two units in series or in
parallel (the same unit twice only where its count is at least 2). Used-up lines
(qty 0) and polarized capacitors (unless allowed) supply nothing; values outside the
bounds of their kind are dropped. Each kind's values are kept as parallel numpy arrays
sorted by value, so a window of values is two ``np.searchsorted`` calls.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np

from picker.parts import Arrangement, ArrangementKind, Piece
from stock.model import Capacitor, Resistor, Stock

SINGLE, SERIES, PARALLEL = 0, 1, 2
ARRANGEMENT_NAMES: tuple[ArrangementKind, ...] = ("single", "series", "parallel")


@dataclass(frozen=True)
class Bounds:
    """Allowed combined value of each position, per kind (ohm, farad); see docs/search.md."""

    r_min: float = 1e3
    r_max: float = 1e6
    c_min: float = 100e-12
    c_max: float = 10e-6

    def of(self, kind: str) -> tuple[float, float]:
        return (self.r_min, self.r_max) if kind == "resistor" else (self.c_min, self.c_max)


@dataclass(frozen=True)
class Unit:
    kind: str
    line: Resistor | Capacitor
    value: float
    tolerance: float
    count: int
    measured: int | None  # index into line.measured, None for the nominal pieces

    def piece(self) -> Piece:
        return Piece(
            line=self.line, value=self.value, tolerance=self.tolerance, measured=self.measured
        )


@dataclass(frozen=True)
class Values:
    """Realizable values of one kind, sorted by value. Parallel arrays of equal length.

    The tolerance columns are either stored (``tol_max``, ``tol_sum``) or, for the large
    arrays of a stock, derived on demand from ``unit_tol`` (tolerance per unit id) by
    :meth:`tol_max_at` and :meth:`tol_sum_at`, with the same floating-point operations."""

    value: np.ndarray  # float64, ohm or farad
    pieces: np.ndarray  # small int, 1 or 2
    unit_a: np.ndarray  # int, global unit id
    unit_b: np.ndarray  # int, global unit id or -1 for a single
    code: np.ndarray  # small int, SINGLE | SERIES | PARALLEL
    tol_max: np.ndarray | None = None  # float64, worst tolerance of the pieces
    tol_sum: np.ndarray | None = None  # float64, sum of the pieces' tolerances
    unit_tol: np.ndarray | None = None  # float64 per unit id, when the two above are None

    def __len__(self) -> int:
        return int(self.value.size)

    def subset(self, mask: np.ndarray) -> Values:
        cols: dict[str, Any] = {
            f: None if getattr(self, f) is None else getattr(self, f)[mask] for f in _FIELDS
        }
        return Values(**cols, unit_tol=self.unit_tol)

    def _pair_tols(self, idx):
        assert self.unit_tol is not None
        a = self.unit_tol[self.unit_a[idx]]
        b_id = self.unit_b[idx]
        b = self.unit_tol[np.maximum(b_id, 0)]
        return a, b, b_id >= 0

    def tol_max_at(self, idx) -> np.ndarray:
        if self.tol_max is not None:
            return self.tol_max[idx]
        a, b, pair = self._pair_tols(idx)
        return np.where(pair, np.maximum(a, b), a)

    def tol_sum_at(self, idx) -> np.ndarray:
        if self.tol_sum is not None:
            return self.tol_sum[idx]
        a, b, pair = self._pair_tols(idx)
        return np.where(pair, a + b, a)


_FIELDS = ("value", "pieces", "unit_a", "unit_b", "code", "tol_max", "tol_sum")


@dataclass(frozen=True)
class Space:
    """Units of a stock and the realizable values of each kind."""

    units: tuple[Unit, ...]
    counts: np.ndarray  # int64 per unit id
    values: dict[str, Values]  # "resistor" | "capacitor" -> Values
    usable: dict[str, int]  # pieces on hand per kind (units usable at all)
    _parts: dict = field(default_factory=dict, compare=False, repr=False)

    def with_pieces(self, kind: str, pieces: int) -> tuple[Values, np.ndarray]:
        """The values of ``kind`` made of ``pieces`` pieces (1 or 2), and their indices in
        ``values[kind]``; made once per space, shared by every stage and pattern."""
        key = (kind, pieces)
        if key not in self._parts:
            values = self.values[kind]
            mask = values.pieces == pieces
            self._parts[key] = (values.subset(mask), np.flatnonzero(mask))
        return self._parts[key]

    def arrangement(self, kind: str, index: int) -> Arrangement:
        """The picker.parts record of value ``index`` of ``kind`` (the boundary conversion)."""
        v = self.values[kind]
        code = int(v.code[index])
        parts = [self.units[int(v.unit_a[index])].piece()]
        if code != SINGLE:
            parts.append(self.units[int(v.unit_b[index])].piece())
        return Arrangement(ARRANGEMENT_NAMES[code], tuple(parts))


def stock_units(stock: Stock, *, allow_polarized: bool = False) -> list[Unit]:
    """Supply units of ``stock`` (resistors first, then capacitors), in file order."""
    units: list[Unit] = []
    for kind, lines in (("resistor", stock.resistors), ("capacitor", stock.capacitors)):
        for line in lines:
            if line.qty <= 0:
                continue
            if isinstance(line, Capacitor) and line.polarized and not allow_polarized:
                continue
            if line.nominal_qty > 0:
                units.append(
                    Unit(
                        kind,
                        line,
                        float(line.value),
                        float(line.tolerance),
                        int(line.nominal_qty),
                        None,
                    )
                )
            for i, reading in enumerate(line.measured):
                units.append(Unit(kind, line, float(reading), float(line.meter), 1, i))
    return units


def build_space(
    stock: Stock, *, singles: bool = False, allow_polarized: bool = False, bounds: Bounds = Bounds()
) -> Space:
    """Units and sorted realizable values of ``stock`` under ``bounds``."""
    units = stock_units(stock, allow_polarized=allow_polarized)
    counts = np.array([u.count for u in units], dtype=np.int64)
    unit_val = np.array([u.value for u in units], dtype=float)
    unit_tol = np.array([u.tolerance for u in units], dtype=float)
    values: dict[str, Values] = {}
    usable: dict[str, int] = {}
    for kind in ("resistor", "capacitor"):
        ids = np.array([i for i, u in enumerate(units) if u.kind == kind], dtype=np.int64)
        usable[kind] = int(counts[ids].sum()) if ids.size else 0
        values[kind] = _kind_values(kind, ids, unit_val, unit_tol, counts, singles, bounds.of(kind))
    return Space(tuple(units), counts, values, usable)


CHUNK = 1 << 20  # pairs generated at a time (memory: a few such blocks, never n^2 at once)
UNIT = np.int32  # unit ids (a stock file has far fewer than 2^31 units)
SMALL = np.int8  # piece counts and arrangement codes


def _kind_values(kind, ids, unit_val, unit_tol, counts, singles, limits) -> Values:
    """Singles and pairs of one kind within ``limits``, sorted by (value, pieces, tolerances).

    Pairs are never enumerated outside the bounds: with the singles sorted by value, the
    partners ``b >= a`` of each ``a`` whose sum lies in ``[lo, hi]`` are one index range
    (``b`` in ``[lo - a, hi - a]``), and so are those whose reciprocal sum does
    (``1/b`` in ``[1/hi - 1/a, 1/lo - 1/a]``); the ranges are widened by a relative 1e-9
    and the exact bound test applied after, so rounding drops nothing. Arrays are sized
    from the range lengths first and filled block by block (:data:`CHUNK` pairs)."""
    lo, hi = limits
    val, tol = unit_val[ids], unit_tol[ids]
    by_value = np.argsort(val, kind="stable")
    ids, val, tol = ids[by_value], val[by_value], tol[by_value]
    twice = counts[ids] >= 2 if ids.size else np.zeros(0, bool)
    inside = (val >= lo) & (val <= hi)
    blocks = [
        (val[inside], ids[inside], np.full(int(inside.sum()), -1, np.int64), SINGLE, tol[inside])
    ]
    total = int(inside.sum())
    plans = []
    if not singles and ids.size:
        # resistors add in series, capacitors in parallel (picker.parts.combine)
        add_code, rec_code = (SERIES, PARALLEL) if kind == "resistor" else (PARALLEL, SERIES)
        for code, start, stop in (
            (add_code, *_sum_ranges(val, lo, hi)),
            (rec_code, *_reciprocal_ranges(val, lo, hi)),
        ):
            plans.append((code, code == add_code, start, stop))
            total += int(np.maximum(stop - start, 0).sum())
    out = {
        "value": np.empty(total, float),
        "pieces": np.empty(total, SMALL),
        "unit_a": np.empty(total, UNIT),
        "unit_b": np.empty(total, UNIT),
        "code": np.empty(total, SMALL),
    }
    n = 0

    def put(v, a, b, code):
        nonlocal n
        k = v.size
        sl = slice(n, n + k)
        out["value"][sl], out["unit_a"][sl], out["unit_b"][sl] = v, a, b
        out["pieces"][sl] = 1 if code == SINGLE else 2
        out["code"][sl] = code
        n += k

    v, a, b, code, _ = blocks[0]
    put(v, a, b, code)
    for code, additive, start, stop in plans:
        for ia, ib in _pair_blocks(start, stop):
            keep = (ia != ib) | twice[ia]  # the same unit twice needs two pieces
            ia, ib = ia[keep], ib[keep]
            x, y = val[ia], val[ib]
            combined = x + y if additive else x * y / (x + y)
            ok = (combined >= lo) & (combined <= hi)
            ia, ib, combined = ia[ok], ib[ok], combined[ok]
            ua, ub = ids[ia], ids[ib]
            put(combined, np.minimum(ua, ub), np.maximum(ua, ub), code)
    cut = Values(**{f: out[f][:n] for f in _FIELDS[:5]}, unit_tol=unit_tol)
    arrays = [getattr(cut, f) for f in _FIELDS[:5]]
    tmax, tsum = np.empty(n), np.empty(n)
    for start in range(0, n, CHUNK):  # block by block: no full-size temporaries
        part = np.arange(start, min(n, start + CHUNK))
        tmax[part], tsum[part] = cut.tol_max_at(part), cut.tol_sum_at(part)
    arrays += [tmax, tsum]
    del tmax, tsum
    out.clear()
    # ties in (value, pieces, tolerances) keep the order of the unit ids: singles, then
    # series before parallel pairs, each by (first unit, second unit)
    order = np.lexsort(
        (arrays[3], arrays[2], arrays[4], arrays[6], arrays[5], arrays[1], arrays[0])
    )
    del arrays[5:]  # derived again on demand (tol_max_at, tol_sum_at)
    return Values(**{f: a[order] for f, a in zip(_FIELDS, arrays, strict=False)}, unit_tol=unit_tol)


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
