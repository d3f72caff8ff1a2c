"""Records shared by the search, the error budget, the exports and the shells.

A ``Piece`` is one physical part taken from one stock line; an ``Arrangement`` is what
sits in one position of a stage (one piece, or two in series or in parallel); a
``StageChoice`` is one stage with every position filled; a ``Candidate`` is a whole
design. Plain frozen data: no numpy arrays, no rich, no textual.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

from stock.model import Capacitor, OpAmp, Resistor

ArrangementKind = Literal["single", "series", "parallel"]


@dataclass(frozen=True)
class Piece:
    """One physical piece from a stock line.

    ``value`` is the nominal value, or the reading of a measured piece; ``tolerance``
    is the line's tolerance, or the meter's accuracy for a measured piece.
    ``measured`` is the index into ``line.measured`` for a measured piece, else None.
    """

    line: Resistor | Capacitor
    value: float
    tolerance: float
    measured: int | None = None

    @property
    def kind(self) -> str:
        return self.line.kind

    @property
    def location(self) -> str | None:
        return self.line.location


@dataclass(frozen=True)
class Arrangement:
    """What fills one position: one piece, or two pieces in series or parallel."""

    arrangement: ArrangementKind
    parts: tuple[Piece, ...]

    @property
    def kind(self) -> str:
        return self.parts[0].kind

    @property
    def value(self) -> float:
        return combine(self.kind, self.arrangement, [p.value for p in self.parts])


def combine(kind: str, arrangement: str, values) -> float:
    """Combined value of pieces: resistors add in series, capacitors in parallel."""
    if arrangement == "single":
        (v,) = values
        return float(v)
    a, b = values
    adds = (kind == "resistor") == (arrangement == "series")
    return float(a + b) if adds else float(a * b / (a + b))


@dataclass(frozen=True)
class StageTarget:
    """What one stage must do. ``gain`` is a magnitude; None where the stage does not set it."""

    f0_hz: float
    q: float | None = None
    gain: float | None = None


@dataclass(frozen=True)
class StageChoice:
    """One stage of a candidate: its topology (registry key), targets, achieved values, parts."""

    topology: str
    target: StageTarget
    achieved: StageTarget
    positions: tuple[tuple[str, Arrangement], ...]  # (reference designator, arrangement), in order

    def values(self) -> dict[str, float]:
        return {name: arr.value for name, arr in self.positions}


@dataclass(frozen=True)
class Candidate:
    """A whole design: every stage filled, scored by the worst relative error (docs/search.md)."""

    score: float
    pieces: int
    stages: tuple[StageChoice, ...]
    opamp: OpAmp | None = None
    warnings: tuple[str, ...] = ()
    alike: tuple[str, ...] = ()  # what its look-alikes change ("R1 and R2 may be swapped")
