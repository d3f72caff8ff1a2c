"""Pieces of the yield ranking (docs/yield.md): supply units, exact identities of
candidates, the tolerance levels on hand, and stocks cut to a tolerance."""

from __future__ import annotations

import dataclasses

from picker.parts import Candidate


def piece_key(piece) -> tuple:
    """One supply unit: a line's nominal pieces, or one measured piece."""
    return (piece.kind, piece.line.index, piece.measured)


def capacity(piece) -> int:
    return 1 if piece.measured is not None else int(piece.line.nominal_qty)


def identity(candidate: Candidate) -> tuple:
    """The exact pieces of a candidate, position by position."""
    return tuple(
        (name, arr.arrangement, tuple(piece_key(p) for p in arr.parts))
        for stage in candidate.stages
        for name, arr in stage.positions
    )


def levels(stock, kind: str) -> list[float]:
    """Distinct tolerances of the pieces of ``kind`` on hand (lines and meter readings)."""
    out = set()
    for line in stock.lines(kind):
        if line.qty <= 0:
            continue
        if line.nominal_qty > 0:
            out.add(float(line.tolerance))
        if line.measured:
            out.add(float(line.meter))
    return sorted(out)


def tight_stock(stock, limits: dict):
    """``stock`` with only the pieces whose tolerance is within ``limits[kind]``: a
    looser line keeps its measured pieces (at the meter's accuracy) or goes. Kept lines
    keep their index, so :func:`restore` maps pieces back."""
    kept = {}
    for kind in ("resistor", "capacitor"):
        lines = []
        for line in stock.lines(kind):
            if line.tolerance <= limits[kind]:
                lines.append(line)
            elif line.measured and line.meter <= limits[kind]:
                lines.append(dataclasses.replace(line, qty=len(line.measured)))
        kept[kind] = tuple(lines)
    return dataclasses.replace(stock, resistors=kept["resistor"], capacitors=kept["capacitor"])


def restore(candidate: Candidate, stock) -> Candidate:
    """``candidate`` with every piece's line taken from ``stock`` (by kind and index)."""
    from picker.parts import Arrangement

    stages = []
    for stage in candidate.stages:
        positions = tuple(
            (
                name,
                Arrangement(
                    arr.arrangement,
                    tuple(
                        dataclasses.replace(p, line=stock.lines(p.kind)[p.line.index])
                        for p in arr.parts
                    ),
                ),
            )
            for name, arr in stage.positions
        )
        stages.append(dataclasses.replace(stage, positions=positions))
    return dataclasses.replace(candidate, stages=tuple(stages))
