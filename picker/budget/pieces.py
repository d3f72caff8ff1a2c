"""Flatten a stage into its physical pieces and put positions back together over arrays.

Every budget method varies the *pieces* (each piece of a series or parallel pair on its
own) and evaluates the topology's analytic characteristics on the *position* values.
This module is the one place that maps between the two, vectorised: an array of piece
values of shape ``(..., n_pieces)`` becomes a dict of position arrays of shape ``(...)``.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

if TYPE_CHECKING:
    import numpy.typing as npt

from picker.errors import DesignError
from picker.parts import Piece, StageChoice


@dataclass(frozen=True)
class Slot:
    """One position of a stage: its name, the combining rule and its piece columns."""

    name: str
    kind: str  # "resistor" | "capacitor"
    arrangement: str  # "single" | "series" | "parallel"
    columns: tuple[int, ...]


@dataclass(frozen=True)
class StagePieces:
    """The pieces of one stage in a fixed column order, and how positions use them."""

    slots: tuple[Slot, ...]
    pieces: tuple[Piece, ...]
    labels: tuple[str, ...]  # "R1", or "R1a"/"R1b" for the two pieces of a pair

    @property
    def nominal(self) -> np.ndarray:
        return np.array([p.value for p in self.pieces], dtype=float)

    @property
    def tolerance(self) -> np.ndarray:
        return np.array([p.tolerance for p in self.pieces], dtype=float)

    def positions(self, piece_values: np.ndarray) -> dict[str, np.ndarray]:
        """Position values from piece values of shape ``(..., n_pieces)``.

        Resistors add in series, capacitors in parallel; the other pairing is the
        product over the sum (same rule as ``picker.parts.combine``).
        """
        out: dict[str, np.ndarray] = {}
        for slot in self.slots:
            cols = [piece_values[..., c] for c in slot.columns]
            if slot.arrangement == "single":
                out[slot.name] = cols[0]
                continue
            a, b = cols
            adds = (slot.kind == "resistor") == (slot.arrangement == "series")
            out[slot.name] = a + b if adds else a * b / (a + b)
        return out


def stage_pieces(stage: StageChoice) -> StagePieces:
    """Column layout of the pieces of ``stage``."""
    slots: list[Slot] = []
    pieces: list[Piece] = []
    labels: list[str] = []
    for name, arr in stage.positions:
        if arr.arrangement not in ("single", "series", "parallel"):
            raise DesignError(f"position {name}: unknown arrangement {arr.arrangement!r}")
        want = 1 if arr.arrangement == "single" else 2
        if len(arr.parts) != want:
            raise DesignError(
                f"position {name}: a {arr.arrangement} arrangement needs {want} "
                f"piece(s), got {len(arr.parts)}"
            )
        cols = []
        for j, piece in enumerate(arr.parts):
            cols.append(len(pieces))
            pieces.append(piece)
            labels.append(name if want == 1 else f"{name}{'ab'[j]}")
        slots.append(Slot(name, arr.kind, arr.arrangement, tuple(cols)))
    return StagePieces(tuple(slots), tuple(pieces), tuple(labels))


def topology_of(key: str):
    """The registered topology for ``key`` (DesignError naming the known keys otherwise)."""
    from picker.filters import get_topology

    return get_topology(key)


def evaluate(topology, values: Mapping[str, npt.ArrayLike]):
    """(f0_hz, q or None, gain) as float arrays broadcast to the shape of the values.

    Division by zero is allowed: a stage pushed past its stability limit (e.g. a
    Sallen-Key with a large gain) gives an infinite or negative Q, which the callers
    report instead of failing.
    """
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        f0, q, gain = topology.characteristics(values)
    shape = np.broadcast(*values.values()).shape
    f0 = np.broadcast_to(np.asarray(f0, dtype=float), shape)
    q = None if q is None else np.broadcast_to(np.asarray(q, dtype=float), shape)
    gain = np.broadcast_to(np.abs(np.asarray(gain, dtype=float)), shape)
    return f0, q, gain
