"""Plans of the Sallen-Key stages: both capacitors, then R1 from a quadratic, then R2.

With ``P = R1 R2`` and ``d = K - 1`` (``K = 1 + RB/RA``, ``d = 0`` at unity gain), the
topology modules give ``b0 = R1 R2 C1 C2`` and

* low-pass:  ``b1 = C2 (R1 + R2) - d R1 C1 = (C2 - d C1) R1 + C2 P / R1``
* high-pass: ``b1 = R1 (C1 + C2) - d R2 C2 = (C1 + C2) R1 - d C2 P / R1``

Both read ``b1 = alpha x + beta / x`` with ``x = R1`` and ``alpha``, ``beta`` in
intervals set by the windows on ``P`` (from ``b0``) and on ``d`` (from the gain). For
``x > 0`` the right side is increasing in ``alpha`` and ``beta``, so a feasible ``x``
must satisfy ``alpha_lo x + beta_lo / x <= b1_hi`` and ``alpha_hi x + beta_hi / x >=
b1_lo``: two quadratic inequalities in ``x``, solved exactly (``quad_le``/``quad_ge``).
R2 then lies in ``[P_lo, P_hi] / R1``. The capacitors are bounded through ``P`` by the
resistors on offer; unity low-pass also needs ``C1/C2 >= 4 Q'^2`` (AM-GM on
``R1 + R2 >= 2 sqrt(P)``), so ``C2 <= C1 / (4 Q^2 (1-t)^2)``. The gain network is its
own group (``K`` reaches the windows only through its window ``[d_lo, d_hi]``).

Link of the gain variants (:class:`picker.search.plans.Link`): with the first group's
values fixed, ``b1`` is linear in ``d`` (slope ``-R1 C1`` low-pass, ``-R2 C2``
high-pass), and ``|Q'/Q - 1| <= t`` means ``b1`` in ``[sqrt(b0)/(Q (1+t)),
sqrt(b0)/(Q (1-t))]``, so ``d`` lies in one interval; it is widened by ``1e-9`` of the
terms' size, so rounding in the subtraction drops nothing.
"""

from __future__ import annotations

import numpy as np

from picker.search.plans import (
    PLANS,
    Group,
    Link,
    Plan,
    Step,
    gain_group,
    intersect,
    quad_ge,
    quad_le,
)


def _p(v, w):
    cc = v["C1"] * v["C2"]
    return w.b0_lo / cc, w.b0_hi / cc


def _c2_by_bounds(v, w):
    return w.b0_lo / (w.r_hi**2 * v["C1"]), w.b0_hi / (w.r_lo**2 * v["C1"])


def _r1_set(alpha_lo, alpha_hi, beta_lo, beta_hi, w):
    return intersect(quad_le(alpha_lo, -w.b1_hi, beta_lo), quad_ge(alpha_hi, -w.b1_lo, beta_hi))


def _r2(v, w):
    p_lo, p_hi = _p(v, w)
    return [(p_lo / v["R1"], p_hi / v["R1"])]


def _d(v) -> np.ndarray:
    return v["RB"] / v["RA"]


def _d_window(base, slope, v, w):
    """``d`` with ``base - slope d`` (= b1) inside the Q window at ``w.t``."""
    root = np.sqrt(v["R1"] * v["R2"] * v["C1"] * v["C2"])
    b1_lo, b1_hi = root / (w.q * (1.0 + w.t)), root / (w.q * (1.0 - w.t))
    slack = 1e-9 * (np.abs(base) + b1_hi) / slope
    return [((base - b1_hi) / slope - slack, (base - b1_lo) / slope + slack)]


LOWPASS_LINK = Link(
    _d, lambda v, w: _d_window(v["C2"] * (v["R1"] + v["R2"]), v["R1"] * v["C1"], v, w)
)
HIGHPASS_LINK = Link(
    _d, lambda v, w: _d_window(v["R1"] * (v["C1"] + v["C2"]), v["R2"] * v["C2"], v, w)
)


def _lowpass(gain: bool) -> Plan:
    def c2(v, w):
        lo, hi = _c2_by_bounds(v, w)
        if not gain:
            hi = np.minimum(hi, v["C1"] / (4.0 * w.q_lo**2))
        return [(lo, hi)]

    def r1(v, w):
        c1, c2v = v["C1"], v["C2"]
        p_lo, p_hi = _p(v, w)
        return _r1_set(c2v - w.d_hi * c1, c2v - w.d_lo * c1, c2v * p_lo, c2v * p_hi, w)

    group = Group(
        (Step("C1"), Step("C2", c2), Step("R1", r1), Step("R2", _r2)),
        determines=("f0",) if gain else ("f0", "q", "gain"),
    )
    return Plan((group, gain_group()), LOWPASS_LINK) if gain else Plan((group,))


def _highpass(gain: bool) -> Plan:
    def r1(v, w):
        c1, c2v = v["C1"], v["C2"]
        p_lo, p_hi = _p(v, w)
        alpha = c1 + c2v
        return _r1_set(alpha, alpha, -w.d_hi * c2v * p_hi, -w.d_lo * c2v * p_lo, w)

    group = Group(
        (
            Step("C1"),
            Step("C2", lambda v, w: [_c2_by_bounds(v, w)]),
            Step("R1", r1),
            Step("R2", _r2),
        ),
        determines=("f0",) if gain else ("f0", "q", "gain"),
    )
    return Plan((group, gain_group()), HIGHPASS_LINK) if gain else Plan((group,))


PLANS["sallen-key-lowpass"] = _lowpass(False)
PLANS["sallen-key-lowpass-gain"] = _lowpass(True)
PLANS["sallen-key-highpass"] = _highpass(False)
PLANS["sallen-key-highpass-gain"] = _highpass(True)
