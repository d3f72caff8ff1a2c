"""Plans of the first-order topologies: the capacitor first, the rest from ``tau = R C``.

``f0 = 1/(2 pi R C)`` (picker.filters.topologies.*), so with C fixed R lies in
``[tau_lo, tau_hi] / C``; an inverting stage's gain ``R2/R1`` then fixes the other
resistor to ``R2/G'`` (low-pass) or ``R1 G'`` (high-pass). The non-inverting gain
network ``1 + RB/RA`` is independent of f0, so it is its own group.
"""

from __future__ import annotations

from picker.search.plans import PLANS, Group, Plan, Step, gain_group


def _tau(r: str, c: str) -> Step:
    return Step(r, lambda v, w: [(w.tau_lo / v[c], w.tau_hi / v[c])])


_RC = Group((Step("C1"), _tau("R1", "C1")), determines=("f0",))
for _key in ("non-inverting-lowpass", "non-inverting-highpass"):
    PLANS[_key] = Plan((_RC,))
for _key in ("non-inverting-lowpass-gain", "non-inverting-highpass-gain"):
    PLANS[_key] = Plan((_RC, gain_group()))

PLANS["inverting-lowpass"] = Plan(
    (
        Group(
            (
                Step("C1"),
                _tau("R2", "C1"),
                Step("R1", lambda v, w: [(v["R2"] / w.g_hi, v["R2"] / w.g_lo)]),
            )
        ),
    )
)
PLANS["inverting-highpass"] = Plan(
    (
        Group(
            (
                Step("C1"),
                _tau("R1", "C1"),
                Step("R2", lambda v, w: [(v["R1"] * w.g_lo, v["R1"] * w.g_hi)]),
            )
        ),
    )
)
