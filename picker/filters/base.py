"""The contract every topology module fulfils.

A topology is one circuit: its positions (reference designators as the trade draws
them), its analytic f0/Q/gain from component values, the synthesis of ideal values
from targets with the free choices made explicit, and its netlist for nodal analysis
(``picker.analysis``) and for SPICE export.

Adding a topology = one module in ``picker/filters/topologies/`` that subclasses
``Topology`` and calls ``register`` + its tests. Nothing else changes.
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from collections.abc import Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING, ClassVar

from picker.parts import StageTarget

if TYPE_CHECKING:  # numpy only in annotations: `picker netlist` starts without it
    import numpy as np


@dataclass(frozen=True)
class PositionSpec:
    name: str  # reference designator: "R1", "C2", "RA" ...
    kind: str  # "resistor" | "capacitor"
    role: str  # a few words for people: "input resistor", "feedback capacitor"


@dataclass(frozen=True)
class Element:
    """One netlist element. Nodes are strings; "0" is ground, "in" the input, "out" the output.

    kind "R" and "C": ``nodes`` = (a, b), ``value`` in ohm or farad.
    kind "OA": ``nodes`` = (non-inverting input, inverting input, output); ``value`` unused.
    """

    kind: str
    name: str
    nodes: tuple[str, ...]
    value: float = 0.0


class Topology(ABC):
    key: ClassVar[str]  # registry key, e.g. "sallen-key-lowpass"
    family: ClassVar[str]  # "inverting" | "non-inverting" | "sallen-key" | "mfb"
    response_type: ClassVar[str]  # "lowpass" | "highpass" | "bandpass"
    order: ClassVar[int]  # 1 or 2
    positions: ClassVar[tuple[PositionSpec, ...]]
    sets_gain: ClassVar[bool]  # True when |gain| is a target of this stage
    inverting: ClassVar[bool]  # True when the passband (or centre) gain is negative

    @abstractmethod
    def characteristics(self, values: Mapping[str, np.ndarray | float]):
        """Analytic (f0_hz, q, gain) from component values, numpy-broadcast.

        ``q`` is None for first-order stages; ``gain`` is the magnitude of the passband
        gain (centre gain for band-pass); it is returned even when the stage does not
        set it (a follower returns 1).
        """

    @abstractmethod
    def synthesize(self, target: StageTarget, **choices: float) -> dict[str, float]:
        """Ideal component values for ``target``. Free choices are keyword arguments
        with documented defaults (e.g. ``c=10e-9``, ``ratio=...``)."""

    @abstractmethod
    def netlist(self, values: Mapping[str, float]) -> list[Element]:
        """Elements between nodes "in", "out" and "0", with the op amp as one "OA"."""

    # convenience -----------------------------------------------------------------
    def position_names(self) -> tuple[str, ...]:
        return tuple(p.name for p in self.positions)

    def kind_of(self, name: str) -> str:
        for p in self.positions:
            if p.name == name:
                return p.kind
        raise KeyError(name)


REGISTRY: dict[str, Topology] = {}


def register(topology: Topology) -> Topology:
    REGISTRY[topology.key] = topology
    return topology
