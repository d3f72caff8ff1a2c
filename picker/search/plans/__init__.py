"""Search plans: per topology, the order in which positions are filled and NECESSARY windows.

A plan is a tuple of independent *groups*; a group is a sequence of *steps*; a step names
a position and, except for the first step of a group, a window function. Given the
values already chosen in the row (numpy arrays, one entry per partial assignment) and
the threshold windows ``w`` (:class:`Windows`), it returns the interval(s) ``[lo, hi]``
that the position's value must lie in for the stage to score ``<= w.t``. Windows are
necessary conditions only: they may let through assignments that fail (the exact
score through ``Topology.characteristics`` decides later), never drop one that passes.
Groups of one stage are joined by a cross product before exact scoring.

The algebra (every topology in ``picker.filters`` has a denominator ``b0 s^2 + b1 s + 1``,
so ``f0 = 1/(2 pi sqrt(b0))`` and ``Q = sqrt(b0)/b1``; first-order stages ``1 + s tau``):

* ``|f0/F - 1| <= t``  <=>  ``b0 in [1/(w (1+t))^2, 1/(w (1-t))^2]`` with ``w = 2 pi F``
  (first order: ``tau in [1/(w (1+t)), 1/(w (1-t))]``);
* ``|Q'/Q - 1| <= t`` with ``b0`` in its window  =>  ``b1 = sqrt(b0)/Q'`` lies in
  ``[sqrt(b0_lo)/(Q (1+t)), sqrt(b0_hi)/(Q (1-t))]``;
* ``|G'/G - 1| <= t``  <=>  ``G' in [G (1-t), G (1+t)]``.

For ``t >= WIDE`` (0.5) no window is derived: every step takes every value (exact, and
only ever reached for stocks far from the target, where the space is small or the
caller's row limit stops it).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from picker.parts import StageTarget

WIDE = 0.5
Window = Callable[[dict, "Windows"], list]


@dataclass(frozen=True)
class Step:
    position: str
    window: Window | None = None  # None: every value of the position's array


@dataclass(frozen=True)
class Group:
    """Steps filled together. ``determines``: the targets ("f0", "q", "gain") that depend on
    this group's positions only, so their error is a lower bound on the stage's score."""

    steps: tuple[Step, ...]
    determines: tuple[str, ...] = ("f0", "q", "gain")


@dataclass(frozen=True)
class Link:
    """How the second group of a two-group plan meets the first: ``key(values)`` of a row
    of the second group (e.g. ``d = RB/RA``), and ``window(values, w)``: the intervals
    of that key a row of the first group can pair with and score ``<= w.t`` (necessary,
    like every window). The stage then joins the groups by ``np.searchsorted`` on the
    sorted keys instead of a cross product."""

    key: Callable[[dict], np.ndarray]
    window: Window


@dataclass(frozen=True)
class Plan:
    groups: tuple[Group, ...]
    link: Link | None = None


@dataclass(frozen=True)
class Windows:
    """Windows on the stage's characteristic quantities at threshold ``t``.

    ``r_lo``/``r_hi`` and ``c_lo``/``c_hi`` are the smallest and largest values on offer per
    kind (so products of two positions can be bounded).
    """

    t: float
    tau_lo: float
    tau_hi: float
    b0_lo: float
    b0_hi: float
    b1_lo: float
    b1_hi: float
    g_lo: float
    g_hi: float
    r_lo: float
    r_hi: float
    c_lo: float
    c_hi: float
    q_lo: float = 0.0  # smallest Q' allowed, Q (1 - t)
    q: float = 1.0  # the target Q

    @property
    def d_lo(self) -> float:
        """Smallest K - 1 of a 1 + RB/RA gain network (never below 0)."""
        return max(self.g_lo - 1.0, 0.0)

    @property
    def d_hi(self) -> float:
        return max(self.g_hi - 1.0, 0.0)


def windows(target: StageTarget, t: float, limits: dict[str, tuple[float, float]]) -> Windows:
    """The :class:`Windows` of ``target`` at threshold ``0 <= t < WIDE``."""
    w = 2.0 * math.pi * target.f0_hz
    lo, hi = 1.0 + t, 1.0 - t
    q = target.q if target.q is not None else 1.0
    g = target.gain if target.gain is not None else 1.0
    b0_lo, b0_hi = 1.0 / (w * lo) ** 2, 1.0 / (w * hi) ** 2
    return Windows(
        t,
        1.0 / (w * lo),
        1.0 / (w * hi),
        b0_lo,
        b0_hi,
        math.sqrt(b0_lo) / (q * lo),
        math.sqrt(b0_hi) / (q * hi),
        g * hi,
        g * lo,
        *limits["resistor"],
        *limits["capacitor"],
        q * hi,
        q,
    )


def quad_le(a, b, c):
    """``{x > 0 : a x^2 + b x + c <= 0}`` as two intervals ``[(lo1, hi1), (lo2, hi2)]``.

    Arrays broadcast; an empty interval has ``lo > hi``. Roots by the cancellation-free
    form ``q = -(b + sign(b) sqrt(D))/2``, roots ``q/a`` and ``c/q`` (from memory).
    """
    a, b, c = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (a, b, c)))
    inf = np.full(a.shape, np.inf)
    zero = np.zeros(a.shape)
    empty = (inf, zero)
    with np.errstate(divide="ignore", invalid="ignore"):
        disc = b * b - 4.0 * a * c
        root = np.sqrt(np.maximum(disc, 0.0))
        qq = -0.5 * (b + np.where(b >= 0, root, -root))
        r1, r2 = qq / a, np.where(qq != 0, c / qq, 0.0)
        small, large = np.minimum(r1, r2), np.maximum(r1, r2)
        lin = np.where(b != 0, -c / b, 0.0)
    has = disc >= 0
    pos, neg, flat = a > 0, a < 0, a == 0
    lo1 = np.select(
        [pos & has, neg & has, neg, flat & (b > 0), flat & (b < 0), flat & (b == 0) & (c <= 0)],
        [np.maximum(small, 0), zero, zero, zero, np.maximum(lin, 0), zero],
        inf,
    )
    hi1 = np.select(
        [pos & has, neg & has, neg, flat & (b > 0), flat & (b < 0), flat & (b == 0) & (c <= 0)],
        [large, small, inf, lin, inf, inf],
        zero,
    )
    lo2 = np.where(neg & has, np.maximum(large, 0), empty[0])
    hi2 = np.where(neg & has, inf, empty[1])
    return [(lo1, hi1), (lo2, hi2)]


def quad_ge(a, b, c):
    """``{x > 0 : a x^2 + b x + c >= 0}``, as :func:`quad_le`."""
    return quad_le(-np.asarray(a, float), -np.asarray(b, float), -np.asarray(c, float))


def intersect(first, second):
    """Pairwise intersection of two lists of intervals."""
    return [(np.maximum(a0, b0), np.minimum(a1, b1)) for a0, a1 in first for b0, b1 in second]


def gain_group(ra: str = "RA", rb: str = "RB") -> Group:
    """The 1 + RB/RA network: RB/RA = K - 1 within the gain window."""
    return Group(
        (Step(ra), Step(rb, lambda v, w: [(v[ra] * w.d_lo, v[ra] * w.d_hi)])), determines=("gain",)
    )


PLANS: dict[str, Plan] = {}


def plan_for(topology) -> Plan:
    """The registered plan of ``topology``, else one that enumerates every position."""
    from picker.search.plans import first_order, mfb, sallen_key  # noqa: F401  (register)

    plan = PLANS.get(topology.key)
    if plan is None:
        plan = Plan((Group(tuple(Step(p.name) for p in topology.positions)),))
    return plan
