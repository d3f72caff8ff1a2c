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

from dataclasses import dataclass

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
    """Realizable values of one kind, sorted by value. Parallel arrays of equal length."""

    value: np.ndarray  # float64, ohm or farad
    pieces: np.ndarray  # int64, 1 or 2
    unit_a: np.ndarray  # int64, global unit id
    unit_b: np.ndarray  # int64, global unit id or -1 for a single
    code: np.ndarray  # int64, SINGLE | SERIES | PARALLEL
    tol_max: np.ndarray  # float64, worst tolerance of the pieces
    tol_sum: np.ndarray  # float64, sum of the pieces' tolerances

    def __len__(self) -> int:
        return int(self.value.size)

    def subset(self, mask: np.ndarray) -> Values:
        return Values(*(getattr(self, f)[mask] for f in _FIELDS))


_FIELDS = ("value", "pieces", "unit_a", "unit_b", "code", "tol_max", "tol_sum")


@dataclass(frozen=True)
class Space:
    """Units of a stock and the realizable values of each kind."""

    units: tuple[Unit, ...]
    counts: np.ndarray  # int64 per unit id
    values: dict[str, Values]  # "resistor" | "capacitor" -> Values
    usable: dict[str, int]  # pieces on hand per kind (units usable at all)

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
    values: dict[str, Values] = {}
    usable: dict[str, int] = {}
    for kind in ("resistor", "capacitor"):
        ids = np.array([i for i, u in enumerate(units) if u.kind == kind], dtype=np.int64)
        usable[kind] = int(counts[ids].sum()) if ids.size else 0
        values[kind] = _kind_values(kind, ids, units, counts, singles, bounds.of(kind))
    return Space(tuple(units), counts, values, usable)


def _kind_values(kind, ids, units, counts, singles, limits) -> Values:
    val = np.array([units[i].value for i in ids], dtype=float)
    tol = np.array([units[i].tolerance for i in ids], dtype=float)
    cols = [
        (
            val,
            np.ones(ids.size, np.int64),
            ids,
            np.full(ids.size, -1, np.int64),
            np.full(ids.size, SINGLE, np.int64),
            tol,
            tol,
        )
    ]
    if not singles and ids.size:
        ia, ib = np.triu_indices(ids.size)  # unordered pairs, a <= b
        keep = (ia != ib) | (counts[ids[ia]] >= 2)  # the same unit twice needs two pieces
        ia, ib = ia[keep], ib[keep]
        a, b = val[ia], val[ib]
        plus, product = a + b, a * b / (a + b)
        # resistors add in series, capacitors in parallel (picker.parts.combine)
        series, parallel = (plus, product) if kind == "resistor" else (product, plus)
        n = ia.size
        for combined, code in ((series, SERIES), (parallel, PARALLEL)):
            cols.append(
                (
                    combined,
                    np.full(n, 2, np.int64),
                    ids[ia],
                    ids[ib],
                    np.full(n, code, np.int64),
                    np.maximum(tol[ia], tol[ib]),
                    tol[ia] + tol[ib],
                )
            )
    arrays = [np.concatenate([c[k] for c in cols]) for k in range(len(_FIELDS))]
    lo, hi = limits
    inside = (arrays[0] >= lo) & (arrays[0] <= hi)
    arrays = [a[inside] for a in arrays]
    order = np.lexsort((arrays[6], arrays[5], arrays[1], arrays[0]))
    return Values(*(a[order] for a in arrays))
