"""What the build dialog lists: the parts to take by drawer, each stock line named
exactly where a drawer holds look-alikes (no textual here).

Two lines of one drawer with the same kind and nominal value look alike in the hand
(a 10n C0G 50 V beside a 10n X7R 16 V); the dialog then names the stock line the
piece comes from: its line number in the file, and for capacitors the dielectric and
voltage rating, for resistors the tolerance and power rating (docs/outputs.md).
"""

from __future__ import annotations

from stock.units import format_percent


def _lines(stock, kind: str) -> tuple:
    return {"resistor": stock.resistors, "capacitor": stock.capacitors}.get(kind, ())


def look_alikes(stock, kind: str, index: int) -> tuple:
    """The other lines of ``kind`` in the same drawer as line ``index``, same nominal value."""
    lines = _lines(stock, kind)
    if not 0 <= index < len(lines):
        return ()
    me = lines[index]
    return tuple(
        other
        for other in lines
        if other.index != me.index
        and other.location == me.location
        and abs(other.value - me.value) <= 1e-9 * abs(me.value)
    )


def line_words(item) -> str:
    """The stock line in words that tell it from a look-alike: "line 42, C0G, 50 V"."""
    from stock.values import format_si

    words = [f"line {item.line}"]
    if item.kind == "capacitor":
        words.append(item.dielectric or "dielectric not given")
        words.append(format_si(item.voltage, "V") if item.voltage else "voltage not given")
    else:
        words.append(format_percent(item.tolerance))
        if item.power:
            words.append(format_si(item.power, "W"))
    return ", ".join(words)


def line_note(stock, row) -> str | None:
    """For a pick-list row whose drawer holds a look-alike: which line to take from."""
    others = look_alikes(stock, row.kind, row.index) if stock is not None else ()
    if not others:
        return None
    me = _lines(stock, row.kind)[row.index]
    return (
        f"from {line_words(me)}; not from "
        + "; ".join(line_words(o) for o in others)
        + " (same value, same drawer)"
    )


def build_listing(plan, stock=None) -> str:
    """The confirmation's body: the items by drawer (with the exact line of any piece
    whose drawer holds a look-alike in ``stock``), the cautions, warnings and the
    safety note."""
    from picker.building import SAFETY_NOTE
    from picker.export.picklist import pick_list_lines

    lines = [f"{plan.count} item(s) to take, by drawer:"]
    lines += pick_list_lines(plan.picks, note=lambda row: line_note(stock, row))
    lines += [f"caution: {c}" for c in plan.cautions]
    lines += [f"warning: {w}" for w in plan.warnings]
    lines += ["", SAFETY_NOTE]
    return "\n".join(lines)
