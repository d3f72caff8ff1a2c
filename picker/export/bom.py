"""Bill of materials of a saved design: one row per stock line used (docs/outputs.md).

A row names the stock line (kind, nominal value in RKM code, tolerance, location), how
many pieces to take from it, and where they go. Positions are reference designators;
the two pieces of a series or parallel pair are ``R1a`` and ``R1b`` (common practice on
schematics). With more than one stage each name carries its stage: ``R1, R3 (stage 2)``.
Measured pieces keep their line's row and are listed by their readings, so the right
piece can be picked from the bag. The op amp gets a row of its own: one channel per
stage, ``ceil(stages / channels)`` packages.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass

from picker.export.design_file import SavedDesign

KIND_ORDER = {"resistor": 0, "capacitor": 1, "opamp": 2}
CSV_HEADER = ("kind", "value", "tolerance", "location", "count", "positions", "measured")


@dataclass(frozen=True)
class BomRow:
    kind: str  # "resistor" | "capacitor" | "opamp"
    value: str  # RKM code of the nominal value; the op amp's name
    location: str | None
    count: int  # pieces (op amps: packages) to take
    positions: str  # "R1, R3 (stage 1); R2 (stage 2)"
    tolerance: str = ""  # "1%"; empty for op amps
    measured: tuple[str, ...] = ()  # readings of the measured pieces to take, RKM code
    index: int = 0  # the stock line: position among its kind's tables
    nominal: float = 0.0  # SI value (ohm, farad; the op amp's GBW in hertz)


def designator(position_name: str, arrangement: str, k: int) -> str:
    """Name of piece ``k`` of a position: ``R1`` alone, ``R1a``/``R1b`` in a pair."""
    return position_name if arrangement == "single" else position_name + "ab"[k]


def opamp_packages(design: SavedDesign) -> int:
    """Op-amp packages the design needs: one channel per stage."""
    if design.opamp is None:
        return 0
    return math.ceil(len(design.stages) / max(1, design.opamp.channels))


def _format_tolerance(tol: float) -> str:
    pct = tol * 100.0
    return f"{pct:.2g}%" if pct < 1 else f"{pct:.3g}%"


def _join_positions(by_stage: dict[int, list[str]], stages: int) -> str:
    if stages == 1:
        return ", ".join(n for names in by_stage.values() for n in names)
    return "; ".join(f"{', '.join(names)} (stage {s})" for s, names in sorted(by_stage.items()))


def bom_rows(design: SavedDesign) -> list[BomRow]:
    """One row per stock line used, resistors then capacitors by value, then the op amp.

    A measured piece gets a row of its own (after its line's plain pieces), so its
    reading stands beside the one position it goes to.
    """
    from stock.values import format_rkm

    groups: dict[tuple[str, int, int], dict] = {}
    for s, pos, k, part in design.parts():
        which = -1 if part.measured is None else part.measured
        g = groups.setdefault(
            (part.kind, part.index, which), {"part": part, "count": 0, "stages": {}, "measured": []}
        )
        g["count"] += 1
        g["stages"].setdefault(s, []).append(designator(pos.name, pos.arrangement, k))
        if part.measured is not None:
            g["measured"].append(part.value)
    rows = []
    for (kind, index, _which), g in groups.items():
        part = g["part"]
        rows.append(
            BomRow(
                kind=kind,
                value=format_rkm(part.nominal, kind),
                location=part.location,
                count=g["count"],
                positions=_join_positions(g["stages"], len(design.stages)),
                tolerance=_format_tolerance(_line_tolerance(part)),
                measured=tuple(format_rkm(v, kind) for v in sorted(g["measured"])),
                index=index,
                nominal=part.nominal,
            )
        )
    rows.sort(key=lambda r: (KIND_ORDER[r.kind], r.nominal, r.location or "", r.index, r.measured))
    if design.opamp is not None:
        oa = design.opamp
        n = len(design.stages)
        where = "stage 1" if n == 1 else "stages " + ", ".join(str(s) for s in range(1, n + 1))
        rows.append(
            BomRow(
                kind="opamp",
                value=oa.name,
                location=oa.location,
                count=opamp_packages(design),
                positions=where,
                index=oa.index,
                nominal=oa.gbw_hz,
            )
        )
    return rows


def _line_tolerance(part) -> float:
    """The stock line's own tolerance (older files: the piece's)."""
    return part.tolerance if part.line_tolerance is None else part.line_tolerance


def bom_csv(design: SavedDesign) -> str:
    """The BOM as CSV text (RFC 4180: quoted where needed, CRLF line ends, a header row)."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\r\n")
    writer.writerow(CSV_HEADER)
    for r in bom_rows(design):
        writer.writerow(
            (
                r.kind,
                r.value,
                r.tolerance,
                r.location or "",
                r.count,
                r.positions,
                " ".join(r.measured),
            )
        )
    return out.getvalue()
