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
from stock.units import format_percent

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


def reference_name(kind: str, name: str, stage: int, suffix: str = "") -> str:
    """The netlist's and the per-reference BOM's name of a piece: ``R1_S2``; pair pieces
    ``R1_S2a``/``R1_S2b``. ``kind`` is the element letter ("R", "C", "U"); a position
    whose name does not start with it gets it in front."""
    base = name if name[:1].upper() == kind else kind + name
    return f"{base}_S{stage}{suffix}"


def opamp_packages(design: SavedDesign) -> int:
    """Op-amp packages the design needs: one channel per stage."""
    if design.opamp is None:
        return 0
    return math.ceil(len(design.stages) / max(1, design.opamp.channels))


def _format_tolerance(tol: float) -> str:
    return format_percent(tol, digits=2 if tol * 100.0 < 1 else 3)


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


def csv_text(header, rows) -> str:
    """CSV text as RFC 4180 writes it: a header row, quoted where needed, CRLF line ends."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\r\n")
    writer.writerow(header)
    writer.writerows(rows)
    return out.getvalue()


def rows_csv(header, rows) -> str:
    """``rows`` (records with a field of each ``header`` name) as ``csv_text``: None is
    an empty cell, a tuple its items joined by spaces."""

    def cell(v):
        return "" if v is None else " ".join(v) if isinstance(v, tuple) else v

    return csv_text(header, ([cell(getattr(r, name)) for name in header] for r in rows))


def bom_csv(design: SavedDesign) -> str:
    """The BOM as CSV text (RFC 4180: quoted where needed, CRLF line ends, a header row)."""
    return rows_csv(CSV_HEADER, bom_rows(design))


# --------------------------------------------------------------------------- per reference

CSV_PER_REFERENCE_HEADER = (
    "reference",
    "kind",
    "value",
    "tolerance",
    "location",
    "stage",
    "position",
    "measured",
    "note",
)


@dataclass(frozen=True)
class ReferenceRow:
    """One physical piece (or op-amp channel, or kept part) under its netlist name."""

    reference: str  # "R1_S1", "R2_S1a", "U1_S2"
    kind: str  # "resistor" | "capacitor" | "opamp"
    value: str  # RKM code of the nominal value; the op amp's name
    tolerance: str  # "1%"; empty for op amps and kept parts of unknown tolerance
    location: str | None
    stage: int
    position: str  # the topology's designator: "R1"
    measured: str = ""  # the reading, RKM code, of a measured piece
    note: str = ""


def reference_rows(design: SavedDesign) -> list[ReferenceRow]:
    """One row per reference designator, in the order of the stages and their positions.

    Pair pieces are ``R1_S1a`` and ``R1_S1b`` as the netlist names them; a position kept
    from the board (a repair) has one row, noted, and takes nothing from the stock; each
    stage's op-amp channel is ``U1_S<stage>`` (the netlist's ``XU1_S<stage>`` without
    SPICE's subcircuit prefix), with the package and channel it sits on.
    """
    from stock.values import format_rkm

    rows: list[ReferenceRow] = []
    for s, stage in enumerate(design.stages, start=1):
        for pos in stage.positions:
            letter = "R" if pos.kind == "resistor" else "C"
            if not pos.parts:
                tol = pos.kept_tolerance
                rows.append(
                    ReferenceRow(
                        reference=reference_name(letter, pos.name, s),
                        kind=pos.kind,
                        value=format_rkm(pos.value, pos.kind),
                        tolerance="" if tol is None else _format_tolerance(tol),
                        location=None,
                        stage=s,
                        position=pos.name,
                        note="kept: the part on the board stays",
                    )
                )
                continue
            for k, part in enumerate(pos.parts):
                suffix = "" if pos.arrangement == "single" else "ab"[k]
                rows.append(
                    ReferenceRow(
                        reference=reference_name(letter, pos.name, s, suffix),
                        kind=part.kind,
                        value=format_rkm(part.nominal, part.kind),
                        tolerance=_format_tolerance(_line_tolerance(part)),
                        location=part.location,
                        stage=s,
                        position=pos.name,
                        measured="" if part.measured is None else format_rkm(part.value, part.kind),
                        note="" if pos.arrangement == "single" else f"{pos.arrangement} pair",
                    )
                )
    if design.opamp is not None:
        oa = design.opamp
        channels = max(1, oa.channels)
        for s in range(1, len(design.stages) + 1):
            package, channel = divmod(s - 1, channels)
            rows.append(
                ReferenceRow(
                    reference=reference_name("U", "U1", s),
                    kind="opamp",
                    value=oa.name,
                    tolerance="",
                    location=oa.location,
                    stage=s,
                    position="U1",
                    note=f"package {package + 1}, channel {channel + 1} of {channels}",
                )
            )
    return rows


def reference_csv(design: SavedDesign) -> str:
    """The per-reference BOM as CSV (RFC 4180, CRLF, a header row)."""
    return rows_csv(CSV_PER_REFERENCE_HEADER, reference_rows(design))
