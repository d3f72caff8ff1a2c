"""Rows of the drawers table and the reading of what the owner types there (no textual).

A row is keyed by the stock line's identity ``(kind, index)`` (stock.model); the
filter keeps a row when every word typed matches one of its cells, or names the same
value in another spelling ("4.7k" finds the "4k7" line).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

from picker.report.owner import visible
from stock.errors import ValueParseError

KIND_MARK = {"resistor": "R", "capacitor": "C", "opamp": "op amp"}
COLUMNS = ("kind", "value", "qty", "tol", "drawer", "about")


@dataclass(frozen=True)
class Row:
    kind: str
    index: int
    value: float | None  # ohm or farad; gain-bandwidth in hertz for an op amp
    qty: int
    cells: tuple[str, ...]  # the texts shown, in COLUMNS order; owner text controls escaped


ASSUMED_MARK = "*"  # after a tolerance the file does not state (the default is assumed)


def _pct(fraction: float, assumed: bool) -> str:
    text = f"{fraction * 100:g}%"
    return text + ASSUMED_MARK if assumed else text


def rows_of(
    stock, fmt_value: Callable[[float, str], str], fmt_si: Callable[[float, str], str]
) -> list[Row]:
    """One row per stock line: resistors, then capacitors, then op amps."""
    rows: list[Row] = []
    for r in stock.resistors:
        about = [visible(r.note or "")]
        if r.measured:
            about.insert(0, f"{len(r.measured)} measured")
        rows.append(
            Row(
                "resistor",
                r.index,
                r.value,
                r.qty,
                (
                    "R",
                    fmt_value(r.value, "resistor"),
                    str(r.qty),
                    _pct(r.tolerance, r.tolerance_assumed),
                    visible(r.location or "-"),
                    ", ".join(a for a in about if a),
                ),
            )
        )
    for c in stock.capacitors:
        about = [
            visible(c.dielectric or ""),
            fmt_si(c.voltage, "V") if c.voltage else "",
            "POLARIZED" if c.polarized else "",
            visible(c.note or ""),
        ]
        if c.measured:
            about.insert(0, f"{len(c.measured)} measured")
        rows.append(
            Row(
                "capacitor",
                c.index,
                c.value,
                c.qty,
                (
                    "C",
                    fmt_value(c.value, "capacitor"),
                    str(c.qty),
                    _pct(c.tolerance, c.tolerance_assumed),
                    visible(c.location or "-"),
                    ", ".join(a for a in about if a),
                ),
            )
        )
    for o in stock.opamps:
        about = [visible(o.name), f"{o.channels} per package", visible(o.note or "")]
        rows.append(
            Row(
                "opamp",
                o.index,
                o.gbw,
                o.qty,
                (
                    "op amp",
                    fmt_si(o.gbw, "Hz"),
                    str(o.qty),
                    "",
                    visible(o.location or "-"),
                    ", ".join(a for a in about if a),
                ),
            )
        )
    return rows


def matches(row: Row, words: str, parse: Callable[[str, str | None], float] | None) -> bool:
    """True when every word of ``words`` is found in a cell or names the row's value."""
    haystack = " ".join(row.cells).lower() + " " + row.kind
    for word in words.lower().split():
        if word in haystack:
            continue
        if parse is not None and row.value is not None and row.kind != "opamp":
            try:
                v = parse(word, row.kind)
            except (ValueParseError, ValueError):
                return False
            if math.isclose(v, row.value, rel_tol=1e-9):
                continue
        return False
    return True


def qty_delta(text: str, current: int) -> int:
    """Change of quantity from what was typed: "12" sets 12, "+3" adds, "-2" takes away.

    Raises ``ValueParseError`` quoting the text when it is not a whole number or the
    quantity would go below zero.
    """
    t = text.strip()
    body = t[1:] if t[:1] in "+-" else t
    if not body.isdigit():
        raise ValueParseError(f"quantity '{text}': write a whole number (12), or +3 / -2")
    n = int(body)
    delta = n if t[0] == "+" else -n if t[0] == "-" else n - current
    if current + delta < 0:
        raise ValueParseError(f"quantity '{text}': only {current} on hand, cannot go below 0")
    return delta
