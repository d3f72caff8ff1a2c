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


class Offset:
    """Index map of a block into its kind's canonical index: ``i -> i + offset``
    (arrays or ints), without an index array the size of the block."""

    __slots__ = ("offset",)

    def __init__(self, offset: int):
        self.offset = offset

    def __getitem__(self, i):
        return i + self.offset


@dataclass(frozen=True)
class Space:
    """Units of a stock and the realizable values of each kind.

    Values are kept in blocks by piece count (``blocks[kind][0]`` singles, ``[1]``
    pairs), each sorted by value; a value's *canonical index* is its index in the
    singles block, or the singles' count plus its index in the pairs block. The search
    works on the blocks (:meth:`with_pieces`, no copies); :attr:`values` is the one
    value-sorted array of a kind, made only when a caller asks for it (what to buy,
    repair), with :meth:`canonical` mapping its indices back."""

    units: tuple[Unit, ...]
    counts: np.ndarray  # int64 per unit id
    blocks: dict[str, tuple[Values, Values]]  # kind -> (singles, pairs), each by value
    usable: dict[str, int]  # pieces on hand per kind (units usable at all)
    _merged: dict = field(default_factory=dict, compare=False, repr=False)

    def with_pieces(self, kind: str, pieces: int) -> tuple[Values, Offset]:
        """The values of ``kind`` made of ``pieces`` pieces (1 or 2), sorted by value,
        and the map of their indices to canonical ones."""
        return self.blocks[kind][pieces - 1], Offset(self.offset(kind, pieces))

    def offset(self, kind: str, pieces: int) -> int:
        return 0 if pieces == 1 else len(self.blocks[kind][0])

    def size(self, kind: str) -> int:
        return sum(len(b) for b in self.blocks[kind])

    def extent(self, kind: str) -> tuple[float, float] | None:
        """(smallest, largest) realizable value of ``kind``; None when there is none."""
        ends = [(float(b.value[0]), float(b.value[-1])) for b in self.blocks[kind] if len(b)]
        if not ends:
            return None
        return min(e[0] for e in ends), max(e[1] for e in ends)

    def nearest(self, kind: str, x: float) -> list[tuple[float, int]]:
        """(value, pieces) of the values of ``kind`` on either side of ``x``: those at
        ``i - 1`` and ``i`` of :attr:`values` (``i`` where ``x`` would go, clamped to the
        ends), found in the blocks without the merged array. Ties go as in the merged
        order: below ``x`` the last of equal values (a pair), above it the first (a
        single)."""
        below, above = [], []
        for pieces, block in enumerate(self.blocks[kind], start=1):
            i = int(np.searchsorted(block.value, x))
            if i > 0:
                below.append((float(block.value[i - 1]), pieces))
            if i < len(block):
                above.append((float(block.value[i]), pieces))
        if not below and not above:
            return []
        low = max(below) if below else min(above)
        high = min(above) if above else max(below)
        return sorted({low, high})

    @property
    def values(self) -> dict[str, Values]:
        """Every value of each kind in one array sorted by (value, pieces, ...): the
        blocks merged (stable, so singles come before pairs of equal value), made on
        first use and kept."""
        if not self._merged:
            for kind, (one, two) in self.blocks.items():
                both = {f: np.concatenate([getattr(one, f), getattr(two, f)]) for f in _FIELDS[:5]}
                order = np.argsort(both["value"], kind="stable")
                self._merged[kind] = (
                    Values(**{f: a[order] for f, a in both.items()}, unit_tol=one.unit_tol),
                    order,
                )
        return {kind: pair[0] for kind, pair in self._merged.items()}

    def canonical(self, kind: str) -> np.ndarray:
        """Canonical index of each index of ``values[kind]``."""
        self.values  # noqa: B018 (made on first use)
        return self._merged[kind][1]

    def arrangement(self, kind: str, index: int) -> Arrangement:
        """The picker.parts record of the value of canonical ``index`` of ``kind``."""
        one, two = self.blocks[kind]
        v, index = (one, index) if index < len(one) else (two, index - len(one))
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


class Extents:
    """(smallest, largest) realizable value per kind with no value bounds, found without
    making the pairs: the smallest is the single, or the two smallest units in
    parallel (resistors) or series (capacitors); the largest, the two largest the other
    way (series resistors, parallel capacitors); a unit pairs with itself only where it
    has two pieces."""

    def __init__(self, units: list[Unit], singles: bool):
        self._ends: dict[str, tuple[float, float] | None] = {}
        for kind in ("resistor", "capacitor"):
            mine = sorted((u.value, u.count) for u in units if u.kind == kind)
            if not mine:
                self._ends[kind] = None
                continue
            lo, hi = mine[0][0], mine[-1][0]
            if not singles:
                small = _two(mine)
                big = _two(mine[::-1])
                if small is not None and big is not None:
                    # resistors in series and capacitors in parallel add; the other way
                    # round the reciprocals add (picker.parts.combine)
                    lo = min(lo, small[0] * small[1] / (small[0] + small[1]))
                    hi = max(hi, big[0] + big[1])
            self._ends[kind] = (lo, hi)

    def extent(self, kind: str) -> tuple[float, float] | None:
        return self._ends[kind]


def _two(ordered) -> tuple[float, float] | None:
    """The first two pieces of ``ordered`` ((value, count) pairs), or None."""
    if ordered[0][1] >= 2:
        return ordered[0][0], ordered[0][0]
    return (ordered[0][0], ordered[1][0]) if len(ordered) > 1 else None


def extents(stock: Stock, *, singles: bool = False, allow_polarized: bool = False) -> Extents:
    """The :class:`Extents` of ``stock``'s usable units."""
    return Extents(stock_units(stock, allow_polarized=allow_polarized), singles)


def build_space(
    stock: Stock, *, singles: bool = False, allow_polarized: bool = False, bounds: Bounds = Bounds()
) -> Space:
    """Units and sorted realizable values of ``stock`` under ``bounds``."""
    from picker.search.valueblocks import kind_blocks  # it reads Values from here

    units = stock_units(stock, allow_polarized=allow_polarized)
    counts = np.array([u.count for u in units], dtype=np.int64)
    unit_val = np.array([u.value for u in units], dtype=float)
    unit_tol = np.array([u.tolerance for u in units], dtype=float)
    blocks: dict[str, tuple[Values, Values]] = {}
    usable: dict[str, int] = {}
    for kind in ("resistor", "capacitor"):
        ids = np.array([i for i, u in enumerate(units) if u.kind == kind], dtype=np.int64)
        usable[kind] = int(counts[ids].sum()) if ids.size else 0
        blocks[kind] = kind_blocks(kind, ids, unit_val, unit_tol, counts, singles, bounds.of(kind))
    return Space(tuple(units), counts, blocks, usable)
