"""Choice of the stock op amp for a design.

Rule (common practice for active filters, stated here as the one this tool uses): each
stage wants a gain-bandwidth product of at least ``100 x noise gain x f0``, times ``Q``
for a second-order stage when ``Q > 1``. The noise gain is ``1 + |G|`` for an inverting
stage and ``|G|`` (at least 1) for a non-inverting one. One op amp (channel) per stage:
a line qualifies when ``qty x channels >= stages`` and its GBW meets the largest need.
Among qualifying lines the one with the largest GBW is taken (less shift of f0 and Q);
when none qualifies the design goes on with the best available and a warning.
"""

from __future__ import annotations

from stock.model import OpAmp

GBW_FACTOR = 100.0


def required_gbw(stages) -> float:
    """The GBW in hertz the rule above asks for, over all ``(topology, target)`` stages."""
    need = 0.0
    for topology, target in stages:
        g = target.gain if target.gain is not None else 1.0
        noise_gain = 1.0 + g if topology.inverting else max(1.0, g)
        q = target.q if target.q is not None else 1.0
        need = max(need, GBW_FACTOR * noise_gain * target.f0_hz * max(1.0, q))
    return need


def choose_opamp(opamps, stages) -> tuple[OpAmp | None, list[str]]:
    """(op amp or None, warnings)."""
    from stock.values import format_si

    n = len(stages)
    need = required_gbw(stages)
    on_hand = [o for o in opamps if o.qty > 0]
    if not on_hand:
        return None, [
            "no op amp in stock: add one with a GBW of at least "
            f"{format_si(need, 'Hz')} ({n} channel{'s' if n > 1 else ''})"
        ]
    enough = [o for o in on_hand if o.qty * o.channels >= n]
    good = [o for o in enough if o.gbw >= need]
    if good:
        return max(good, key=lambda o: (o.gbw, -o.index)), []
    pool = enough or on_hand
    best = max(pool, key=lambda o: (o.gbw, -o.index))
    warnings = []
    if not enough:
        warnings.append(
            f"no op amp line has {n} channels on hand for {n} stages; "
            f"'{best.name}' has {best.qty * best.channels}"
        )
    if best.gbw < need:
        warnings.append(
            f"no op amp in stock meets GBW >= {format_si(need, 'Hz')} "
            f"(100 x noise gain x f0 x Q, common practice); using '{best.name}' "
            f"({format_si(best.gbw, 'Hz')}): expect f0 and Q to shift"
        )
    return best, warnings
