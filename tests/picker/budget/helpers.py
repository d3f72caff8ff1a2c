"""Candidates built directly from values, for the budget tests (no search involved)."""

from __future__ import annotations

from picker.filters import get_topology
from picker.parts import Arrangement, Candidate, Piece, StageChoice, StageTarget
from stock.model import Capacitor, OpAmp, Resistor


def piece(kind: str, value: float, tol: float, **line) -> Piece:
    cls = Resistor if kind == "resistor" else Capacitor
    return Piece(
        cls(value=value, qty=10, tolerance=tol, tolerance_assumed=False, **line), value, tol
    )


def stage(
    key: str,
    values: dict,
    *,
    tol=0.01,
    ctol=None,
    target=None,
    pairs=None,
    r_line=None,
    c_line=None,
    tols=None,
) -> StageChoice:
    """A stage of ``key`` with one piece per position (or a pair where ``pairs`` says).

    ``pairs`` maps a position to (arrangement, (value_a, value_b)); ``tols`` maps a
    position to its own tolerance; ``r_line``/``c_line`` are extra stock-line fields.
    """
    topo = get_topology(key)
    pairs = pairs or {}
    positions = []
    for spec in topo.positions:
        t = tol if spec.kind == "resistor" or ctol is None else ctol
        t = (tols or {}).get(spec.name, t)
        extra = (r_line if spec.kind == "resistor" else c_line) or {}
        if spec.name in pairs:
            arr, vals = pairs[spec.name]
            parts = tuple(piece(spec.kind, v, t, **extra) for v in vals)
        else:
            arr, parts = "single", (piece(spec.kind, values[spec.name], t, **extra),)
        positions.append((spec.name, Arrangement(arr, parts)))
    choice = StageChoice(key, StageTarget(0.0), StageTarget(0.0), tuple(positions))
    f0, q, gain = topo.characteristics(choice.values())
    achieved = StageTarget(float(f0), None if q is None else float(q), float(abs(gain)))
    return StageChoice(key, target or achieved, achieved, tuple(positions))


def candidate(*stages, opamp=None) -> Candidate:
    pieces = sum(len(a.parts) for s in stages for _, a in s.positions)
    return Candidate(score=0.0, pieces=pieces, stages=tuple(stages), opamp=opamp)


def opamp(gbw=3e6, slew=13e6, ib=None, supply=36.0) -> OpAmp:
    return OpAmp(name="dual JFET-input, 3 MHz", gbw=gbw, qty=2, slew=slew, ib=ib, supply=supply)
