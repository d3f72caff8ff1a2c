"""Text schematic of a candidate: every part between its two nodes, value and drawer.

Drawn from the topology's own netlist (``Topology.netlist``), so it matches every
topology without a drawing per circuit. Nodes: ``in`` the stage input, ``out`` its
output (the next stage's input), ``gnd`` ground, letters the inner nodes. Plain ASCII,
so it reads the same over SSH, in tmux and in a log; values are RKM-style (IEC 60062).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from picker.report.owner import visible
from stock.display import format_rkm_display
from stock.values import format_rkm, format_si

if TYPE_CHECKING:
    from rich.text import Text

NODE = {"0": "gnd"}
JOIN = {"series": " + ", "parallel": " || "}


def _node(name: str) -> str:
    return NODE.get(name, name)


def arrangement_text(arr) -> tuple[str, str]:
    """(value text, drawer text) of one position: ``4k7`` / ``4k7 + 470R`` and ``A3``.

    The drawer text is owner text with its control characters escaped
    (``picker.report.owner``); put it in a ``Text``, never in markup."""
    kind = arr.kind
    if arr.arrangement == "single":
        p = arr.parts[0]
        value = format_rkm(p.value, kind) + (" (measured)" if p.measured is not None else "")
    else:
        value = (
            format_rkm_display(arr.value, kind)
            + " = "
            + JOIN[arr.arrangement].join(format_rkm(p.value, kind) for p in arr.parts)
        )
    drawers = []
    for p in arr.parts:
        loc = visible(p.location) if p.location else "?"
        if loc not in drawers:
            drawers.append(loc)
    return value, ", ".join(drawers)


def stage_lines(choice, index: int) -> list[str]:
    from picker.filters import get_topology

    topo = get_topology(choice.topology)
    arrangements = dict(choice.positions)
    values = {name: arr.value for name, arr in choice.positions}
    head = f"stage {index + 1}: {choice.topology}, f0 {format_si(choice.achieved.f0_hz, 'Hz')}"
    if choice.achieved.q is not None:
        head += f", Q {choice.achieved.q:.3g}"
    if topo.sets_gain:
        head += f", gain {choice.achieved.gain:.4g}"
    lines = [head]
    for el in topo.netlist(values):
        if el.kind == "OA":
            plus, minus, out = (_node(n) for n in el.nodes)
            how = "follower" if minus == out else f"- input at {minus}"
            lines.append(f"  {el.name:<3} op amp: + input at {plus}, {how}, output {out}")
            continue
        a, b = (_node(n) for n in el.nodes)
        arr = arrangements.get(el.name)
        value, drawer = arrangement_text(arr) if arr is not None else ("", "")
        lines.append(f"  {el.name:<3} {a:>3} -- {b:<4} {value:<26} {drawer}".rstrip())
    return lines


def schematic(candidate) -> Text:
    """The text schematic of every stage of ``candidate`` (a rich Text, no markup)."""
    from rich.text import Text

    lines = []
    for i, choice in enumerate(candidate.stages):
        if i:
            lines.append("")
        lines += stage_lines(choice, i)
    if candidate.opamp is not None:
        o = candidate.opamp
        where = f" ({visible(o.location)})" if o.location else ""
        lines.append(
            f"op amp: {visible(o.name)}, {format_si(o.gbw, 'Hz')} GBW{where}; one channel per stage"
        )
    return Text("\n".join(lines))
