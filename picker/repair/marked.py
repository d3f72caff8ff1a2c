"""A stage as marked on the board: its topology and one value per position.

``parse_stage("sallen-key-lowpass", ["R1=10k", "R2=10k/1%", "C1=22n", "C2=10n"])`` checks
the topology key, every position name (case does not matter: ``r1`` is ``R1``), the value
(RKM or SI, IEC 60062; ``stock.values.parse_value``) and the optional tolerance after a
slash. A position given without a tolerance takes the stock file's default (5 % for a
resistor, 10 % for a capacitor; ``stock.model``) and is marked *assumed*. Every error is a
DesignError that names the bad text and lists what is accepted (CLI exit 2).
See docs/repair.md.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

from picker.errors import DesignError
from stock.errors import ValueParseError
from stock.fields import RANGES
from stock.model import DEFAULT_CAPACITOR_TOLERANCE, DEFAULT_RESISTOR_TOLERANCE
from stock.values import format_rkm, format_si, parse_percent, parse_value

DEFAULT_TOLERANCE = {
    "resistor": DEFAULT_RESISTOR_TOLERANCE,
    "capacitor": DEFAULT_CAPACITOR_TOLERANCE,
}


@dataclass(frozen=True)
class MarkedPart:
    """One position as read off the board."""

    name: str  # reference designator of the topology, e.g. "R1"
    kind: str  # "resistor" | "capacitor"
    value: float  # ohm or farad
    tolerance: float  # fraction
    assumed: bool  # True: no tolerance given, the stock file's default is used

    def text(self) -> str:
        """``R1=10k/1%`` (``/5% assumed`` when the tolerance was not given)."""
        tol = f"{self.tolerance * 100:g}%"
        return f"{self.name}={format_rkm(self.value, self.kind)}/{tol}" + (
            " assumed" if self.assumed else ""
        )


@dataclass(frozen=True)
class MarkedStage:
    """A topology (registry key) with every one of its positions given."""

    topology: str
    parts: tuple[MarkedPart, ...]  # in the topology's position order

    def values(self) -> dict[str, float]:
        return {p.name: p.value for p in self.parts}

    def part(self, name: str) -> MarkedPart:
        for p in self.parts:
            if p.name == name:
                return p
        raise KeyError(name)


def known_topologies() -> str:
    from picker.filters import REGISTRY

    return ", ".join(sorted(REGISTRY))


def topology_of(key: str):
    """The registered topology ``key``; DesignError listing the known ones otherwise."""
    from picker.filters import REGISTRY

    topo = REGISTRY.get(key.strip().lower()) if isinstance(key, str) else None
    if topo is None:
        raise DesignError(
            f"unknown topology {key!r}; known: {known_topologies()} "
            "(picker analyse --list shows their positions)"
        )
    return topo


def positions_text(topology) -> str:
    """``R1 (input resistor), R2 (second resistor), ...``"""
    return ", ".join(f"{p.name} ({p.role})" for p in topology.positions)


def position_name(topology, text: str, *, option: str = "") -> str:
    """The canonical designator of ``text`` in ``topology``; DesignError listing the right ones."""
    names = {p.name.lower(): p.name for p in topology.positions}
    name = names.get(str(text).strip().lower())
    if name is None:
        where = f" ({option})" if option else ""
        raise DesignError(
            f"{topology.key} has no position {text!r}{where}; its positions are "
            f"{positions_text(topology)}"
        )
    return name


def parse_part(topology, text: str) -> MarkedPart:
    """One ``NAME=VALUE`` or ``NAME=VALUE/TOL%`` of ``topology``."""
    name_text, sep, rest = str(text).partition("=")
    if not sep or not name_text.strip() or not rest.strip():
        raise DesignError(
            f"{text!r}: write NAME=VALUE, e.g. R1=10k or C1=22n/5% "
            f"({topology.key} positions: {positions_text(topology)})"
        )
    name = position_name(topology, name_text)
    kind = topology.kind_of(name)
    value_text, slash, tol_text = rest.partition("/")
    try:
        value = parse_value(value_text.strip(), kind=kind)
    except ValueParseError as exc:
        raise DesignError(f"{name}={rest}: {exc}") from None
    lo, hi, span = RANGES[kind]
    if not (math.isfinite(value) and lo <= value <= hi):
        unit = "Ω" if kind == "resistor" else "F"
        raise DesignError(
            f"{name}={rest}: {format_si(value, unit)} is not a plausible {kind} value ({span})"
        )
    if slash:
        try:
            tol = parse_percent(tol_text.strip())
        except ValueParseError as exc:
            raise DesignError(f"{name}={rest}: tolerance: {exc}") from None
        if not 0.0 <= tol < 1.0:
            raise DesignError(f"{name}={rest}: tolerance must lie in 0% .. 100%")
        return MarkedPart(name, kind, value, tol, False)
    return MarkedPart(name, kind, value, DEFAULT_TOLERANCE[kind], True)


def parse_stage(key: str, texts: Iterable[str]) -> MarkedStage:
    """Check ``texts`` against the positions of topology ``key``: each once, none missing."""
    topo = topology_of(key)
    given: dict[str, MarkedPart] = {}
    for text in texts:
        part = parse_part(topo, text)
        if part.name in given:
            raise DesignError(f"{topo.key}: position {part.name} is given twice")
        given[part.name] = part
    missing = [p.name for p in topo.positions if p.name not in given]
    if missing:
        raise DesignError(
            f"{topo.key}: no value for {', '.join(missing)}; give every position as "
            f"NAME=VALUE: {positions_text(topo)}"
        )
    return MarkedStage(topo.key, tuple(given[p.name] for p in topo.positions))


def parse_stage_text(text: str) -> MarkedStage:
    """One ``--stage`` argument: ``"TOPOLOGY NAME=VALUE ..."``."""
    words = str(text).split()
    if not words:
        raise DesignError('--stage: empty; write --stage "TOPOLOGY NAME=VALUE ..."')
    return parse_stage(words[0], words[1:])


def listing() -> list[tuple[str, str, Sequence[tuple[str, str, str]]]]:
    """Every topology: (key, what it is, ((position, kind, role), ...)), sorted by key."""
    from picker.filters import REGISTRY

    out: list[tuple[str, str, Sequence[tuple[str, str, str]]]] = []
    for key in sorted(REGISTRY):
        t = REGISTRY[key]
        order = "first-order" if t.order == 1 else "second-order"
        gain = "sets its gain" if t.sets_gain else "gain 1"
        what = f"{order} {t.response_type}, {t.family}, {gain}"
        if t.inverting:
            what += ", inverting"
        out.append((key, what, tuple((p.name, p.kind, p.role) for p in t.positions)))
    return out
