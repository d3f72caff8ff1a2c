"""Plans of the multiple-feedback stages (formulas of picker.filters.topologies.mfb_*).

* low-pass: ``b0 = R2 R3 C1 C2``, ``b1 = C1 (R2 + R3 (1 + G'))`` with ``G' = R2/R1``.
  With ``P = R2 R3``: ``b1 = C1 R2 + C1 (1 + G') P / R2``, the ``alpha x + beta / x``
  form of :mod:`picker.search.plans.sallen_key` in ``x = R2``; then ``R3 = P / R2`` and
  ``R1 = R2 / G'``. AM-GM gives ``b1 >= 2 C1 sqrt((1 + G') P)``, so
  ``Q' <= sqrt(C2/C1) / (2 sqrt(1 + G'))`` and ``C2 >= 4 Q^2 (1-t)^2 (1 + G (1-t)) C1``.
* high-pass: ``b0 = R1 R2 C2 C3``, ``b1 = R1 (C1 + C2 + C3)``, ``G' = C1/C3``: C3, then
  ``C1 = G' C3``, C2, ``R1 = b1 / (C1 + C2 + C3)``, ``R2 = b0 / (R1 C2 C3)``.
* band-pass: ``rp = R1 R2 / (R1 + R2)``, ``b0 = R3 C1 C2 rp``, ``b1 = (C1 + C2) rp``,
  ``G' = R3 C2 / (R1 (C1 + C2))``: C1, C2, ``rp = b1 / (C1 + C2)``, ``R3 = b0 / (C1 C2 rp)``,
  ``R1 = R3 C2 / (G' (C1 + C2))``, ``R2 = rp R1 / (R1 - rp)`` (increasing in rp; needs rp < R1).
"""

from __future__ import annotations

import numpy as np

from picker.search.plans import PLANS, Group, Plan, Step, intersect, quad_ge, quad_le


def _lp_c2(v, w):
    c1 = v["C1"]
    lo = np.maximum(w.b0_lo / (w.r_hi**2 * c1), c1 * 4.0 * w.q_lo**2 * (1.0 + w.g_lo))
    return [(lo, w.b0_hi / (w.r_lo**2 * c1))]


def _lp_p(v, w):
    cc = v["C1"] * v["C2"]
    return w.b0_lo / cc, w.b0_hi / cc


def _lp_r2(v, w):
    c1 = v["C1"]
    p_lo, p_hi = _lp_p(v, w)
    return intersect(
        quad_le(c1, -w.b1_hi, c1 * (1.0 + w.g_lo) * p_lo),
        quad_ge(c1, -w.b1_lo, c1 * (1.0 + w.g_hi) * p_hi),
    )


def _lp_r3(v, w):
    p_lo, p_hi = _lp_p(v, w)
    return [(p_lo / v["R2"], p_hi / v["R2"])]


PLANS["mfb-lowpass"] = Plan(
    (
        Group(
            (
                Step("C1"),
                Step("C2", _lp_c2),
                Step("R2", _lp_r2),
                Step("R3", _lp_r3),
                Step("R1", lambda v, w: [(v["R2"] / w.g_hi, v["R2"] / w.g_lo)]),
            )
        ),
    )
)


def _hp_c2(v, w):
    c3 = v["C3"]
    return [(w.b0_lo / (w.r_hi**2 * c3), w.b0_hi / (w.r_lo**2 * c3))]


def _hp_r1(v, w):
    total = v["C1"] + v["C2"] + v["C3"]
    return [(w.b1_lo / total, w.b1_hi / total)]


def _hp_r2(v, w):
    base = v["R1"] * v["C2"] * v["C3"]
    return [(w.b0_lo / base, w.b0_hi / base)]


PLANS["mfb-highpass"] = Plan(
    (
        Group(
            (
                Step("C3"),
                Step("C1", lambda v, w: [(v["C3"] * w.g_lo, v["C3"] * w.g_hi)]),
                Step("C2", _hp_c2),
                Step("R1", _hp_r1),
                Step("R2", _hp_r2),
            )
        ),
    )
)


def _bp_rp(v, w):
    total = v["C1"] + v["C2"]
    return w.b1_lo / total, w.b1_hi / total


def _bp_r3(v, w):
    rp_lo, rp_hi = _bp_rp(v, w)
    cc = v["C1"] * v["C2"]
    return [(w.b0_lo / (cc * rp_hi), w.b0_hi / (cc * rp_lo))]


def _bp_r1(v, w):
    base = v["R3"] * v["C2"] / (v["C1"] + v["C2"])
    return [(base / w.g_hi, base / w.g_lo)]


def _bp_r2(v, w):
    rp_lo, rp_hi = _bp_rp(v, w)
    r1 = v["R1"]
    with np.errstate(divide="ignore", invalid="ignore"):
        lo = np.where(rp_lo < r1, rp_lo * r1 / (r1 - rp_lo), np.inf)
        hi = np.where(rp_hi < r1, rp_hi * r1 / (r1 - rp_hi), np.inf)
    return [(lo, hi)]


PLANS["mfb-bandpass"] = Plan(
    (Group((Step("C1"), Step("C2"), Step("R3", _bp_r3), Step("R1", _bp_r1), Step("R2", _bp_r2))),)
)
