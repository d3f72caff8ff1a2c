"""Pick list: the BOM grouped by drawer, so each drawer is opened once (docs/outputs.md)."""

from __future__ import annotations

import re
from dataclasses import dataclass

from picker.export.bom import BomRow, bom_rows
from picker.export.design_file import SavedDesign

NO_LOCATION = "(no location)"


@dataclass(frozen=True)
class PickGroup:
    location: str | None  # the drawer or bin label; None when the stock line has none
    rows: tuple[BomRow, ...]

    @property
    def count(self) -> int:
        return sum(r.count for r in self.rows)

    @property
    def label(self) -> str:
        return self.location if self.location is not None else NO_LOCATION


def pick_list(design: SavedDesign) -> tuple[PickGroup, ...]:
    """BOM rows grouped by location, locations in natural order, no location last."""
    groups: dict[str | None, list[BomRow]] = {}
    for row in bom_rows(design):
        groups.setdefault(row.location, []).append(row)
    named = sorted((k for k in groups if k is not None), key=_natural)
    keys: list[str | None] = list(named)
    if None in groups:
        keys.append(None)
    return tuple(PickGroup(location=k, rows=tuple(groups[k])) for k in keys)


def pick_count(groups) -> int:
    """Physical items to take: pieces plus op-amp packages."""
    return sum(g.count for g in groups)


def pick_list_lines(groups, note=None) -> list[str]:
    """Plain-text pick list, one drawer header and one line per stock line.

    ``note(row)``, when given, may return a line of words to put under the row's line.
    """
    lines = []
    for g in groups:
        lines.append(f"{g.label}:")
        for r in g.rows:
            what = r.value if r.kind == "opamp" else f"{r.kind} {r.value} {r.tolerance}".strip()
            extra = f"  measured {', '.join(r.measured)}" if r.measured else ""
            lines.append(f"  take {r.count} x {what}  for {r.positions}{extra}")
            words = note(r) if note is not None else None
            if words:
                lines.append(f"    {words}")
    return lines


def _natural(text: str):
    """Sort key that puts A2 before A10 (digits compared as numbers)."""
    return [
        (0, int(t), "") if t[0] in "0123456789" else (1, 0, t.lower())
        for t in re.findall(r"[0-9]+|[^0-9]+", text)
    ]
