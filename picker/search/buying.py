"""What to buy: the purchases that improve rank 1 most (docs/buying.md).

A *purchase* is a few pieces of one preferred value (IEC 60063 series) of one kind at
one tolerance. Each is tried on a copy of the stock in memory with the purchase as an
extra line (the user's file is never written). Steps:

1. Before: rank 1 of the stock as it is (the same ``search`` call the design command
   makes), or no design at all.
2. Values tried (``scope="near"``): the preferred values near the value and the ideal
   value of each position of rank 1 and of each stage's best with single pieces
   (:mod:`picker.search.buyvalues`); with no design at all, near the topology's own
   synthesis. ``scope="all"``: every preferred value within the bounds.
3. Each value gets a quick estimate (:func:`picker.search.buyvalues.estimate`), which
   orders the trials; under ``scope="near"`` only the ``NEAR_MAX`` best are tried.
4. In that order, each purchase is searched for real (``search`` with the purchase
   added, ``top=1``); a purchase counts when rank 1 after is better under ``rank`` than
   rank 1 before and takes some of it. When every value was searched the ``n`` best
   are the best of the values tried (``proven``); a time limit ends the trials early,
   and the result says so.
5. When no single purchase reaches the goal (``max_error``), pairs of the ``PAIR_POOL``
   most promising single purchases are tried the same way (heuristic: the pool).

``qty`` of a suggestion is the number of pieces of it the rank 1 after takes; the trial
offered twice the positions of its kind, so that limit never binds (a rank 1 that takes
``q`` pieces is also rank 1 with only ``q`` offered: it is still in the smaller space).
"""

from __future__ import annotations

import dataclasses
import math
import time
from dataclasses import dataclass

from picker.search.buytrial import Trial, with_purchases
from picker.search.buyvalues import (
    Source,
    estimate,
    near_values,
    rank_key,
    series_in,
)
from picker.search.space import Bounds, build_space

PAIR_POOL = 6  # single purchases (best bounds) whose pairs are tried when none reaches the goal
RANKS = ("pieces", "error")
NEAR_MAX = 24  # values tried under scope "near": the best by the estimate


@dataclass(frozen=True)
class Purchase:
    kind: str  # "resistor" | "capacitor"
    value: float  # ohm | farad
    tolerance: float  # fraction
    qty: int


@dataclass(frozen=True)
class Suggestion:
    """One purchase (``also``: a second one bought with it) and rank 1 before and after,
    each as (pieces, score); ``before`` is None when the stock had no design."""

    kind: str
    value: float
    tolerance: float
    qty: int
    before: tuple[int, float] | None
    after: tuple[int, float]
    also: tuple[Purchase, ...] = ()

    @property
    def purchases(self) -> tuple[Purchase, ...]:
        return (Purchase(self.kind, self.value, self.tolerance, self.qty), *self.also)

    def to_json(self) -> dict:
        def pair(pq):
            return None if pq is None else {"pieces": pq[0], "score": pq[1]}

        out = {
            "kind": self.kind,
            "value": self.value,
            "tolerance": self.tolerance,
            "qty": self.qty,
            "before": pair(self.before),
            "after": pair(self.after),
        }
        out["also"] = [dataclasses.asdict(p) for p in self.also]
        return out


@dataclass(frozen=True)
class BuyResult:
    suggestions: list[Suggestion]
    before: tuple[int, float] | None
    tried: tuple[tuple[str, float], ...]  # (kind, value) of the single purchases considered
    searched: int  # real searches run
    proven: bool  # the suggestions are the best of the values tried
    notes: tuple[str, ...] = ()
    ruled_out: int = 0  # purchases that searches of single stages proved unable to help


def suggestions(stock, stages, **kw) -> list[Suggestion]:
    """The ``n`` best purchases (see :func:`suggest`)."""
    return suggest(stock, stages, **kw).suggestions


def suggest(
    stock,
    stages,
    *,
    rank: str = "error",
    max_error: float = 0.005,
    series: str = "E24",
    tolerance_r: float = 0.01,
    tolerance_c: float = 0.05,
    n: int = 3,
    bounds: Bounds = Bounds(),
    singles: bool = False,
    allow_polarized: bool = False,
    scope: str = "near",
    time_limit: float | None = None,
    trial_time_limit: float | None = None,
    before=None,
) -> BuyResult:
    """The ``n`` purchases that improve rank 1 most under ``rank`` (see the module text).

    ``before``: rank 1 of the stock when the caller has it (a Candidate), the string
    ``"none"`` when the stock has no design, None to search for it here.
    ``time_limit``: seconds for all the trials (one clock: a trial's search gets at most
    what is left, and one it cuts short is dropped); ``trial_time_limit``: for each
    search (passed on when the search takes one)."""
    from picker.errors import NoDesignError
    from stock.eseries import series as mantissas

    if rank not in RANKS:
        raise ValueError(f"rank {rank!r}: purchases are ranked under {' or '.join(RANKS)}")
    start = time.monotonic()
    left = None if time_limit is None else (lambda: time_limit - (time.monotonic() - start))
    opts: dict = dict(singles=singles, allow_polarized=allow_polarized, bounds=bounds)
    trial = Trial(stock, stages, rank, max_error, opts, trial_time_limit)
    trial.left = left
    if before is None:
        try:
            before = trial.rank1(stock)
        except NoDesignError:
            before = "none"
    cand0 = None if isinstance(before, str) else before
    before_pq = None if cand0 is None else (int(cand0.pieces), float(cand0.score))
    key0 = rank_key(rank, max_error, *(before_pq or (None, None)))
    need = {"resistor": 0, "capacitor": 0}
    for topo, _ in stages:
        for p in topo.positions:
            need[p.kind] += 1
    space0 = build_space(stock, singles=singles, allow_polarized=allow_polarized, bounds=bounds)
    sources = trial.sources(cand0)
    spots = near_values(stages, sources, bounds, mantissas(series), space0)
    if scope == "all":  # every preferred value within the bounds, and only those
        every = [
            (kind, v)
            for kind, count in need.items()
            if count
            for v in series_in(mantissas(series), *bounds.of(kind))
        ]
        spots = {kv: spots.get(kv, []) for kv in every}
    tol = {"resistor": tolerance_r, "capacitor": tolerance_c}

    def guess(kind_value) -> tuple:
        per_stage = [
            (src, estimate(stages, src, name, at, n, space0, bounds))
            for src, name, at, n in spots[kind_value]
        ]
        keys = [rank_key(rank, max_error, *joint(cand0, src, est)) for src, est in per_stage]
        return min(keys, default=(math.inf,))

    order = sorted(spots, key=lambda kv: (guess(kv), kv))
    if scope == "near":
        order = order[:NEAR_MAX]
    purchases = [(Purchase(k, v, tol[k], 2 * need[k]),) for k, v in order]
    found, complete = trial.run(purchases, key0, n, left, cand0)
    notes = []
    best = min([key0] + [f[0] for f in found])
    reached = best[0] == 0.0 if rank == "pieces" else best[0] <= max_error
    if not reached and len(order) > 1:
        pool = [p for (p,) in purchases[:PAIR_POOL]]
        pairs = [(a, b) for i, a in enumerate(pool) for b in pool[i + 1 :]]
        more, done = trial.run(pairs, key0, n, left, cand0)
        complete = complete and done
        found += more
        notes.append(
            f"no single purchase reaches the goal: pairs of the {len(pool)} most promising "
            "values were tried too (the pool is a heuristic; each pair's after is exact)"
        )
    if not complete:
        notes.append("the time limit ended the trials: these are the best found so far")
    found.sort(key=lambda f: f[0])
    out = [
        Suggestion(
            ps[0].kind, ps[0].value, ps[0].tolerance, ps[0].qty, before_pq, after, tuple(ps[1:])
        )
        for _, (ps, after) in found[: max(0, n)]
    ]
    return BuyResult(
        out, before_pq, tuple(order), trial.count, complete, tuple(notes), trial.skipped
    )


def joint(cand0, src: Source, est) -> tuple[int, float]:
    """(pieces, score) of the whole design with one stage's estimate in place of rank 1's."""
    score, pieces = est
    if cand0 is None:
        return pieces, score
    rest_pieces = 0
    rest_score = 0.0
    for s, choice in enumerate(cand0.stages):
        if s == src.stage:
            continue
        rest_pieces += sum(len(arr.parts) for _, arr in choice.positions)
        rest_score = max(rest_score, stage_error(choice))
    return rest_pieces + pieces, max(rest_score, score)


def stage_error(choice) -> float:
    """Worst relative error of one filled stage (as the search scores it)."""
    t, a = choice.target, choice.achieved
    errs = [abs(a.f0_hz / t.f0_hz - 1.0)]
    if t.q is not None and a.q is not None:
        errs.append(abs(a.q / t.q - 1.0))
    if t.gain is not None and a.gain is not None:
        errs.append(abs(a.gain / t.gain - 1.0))
    return max(errs)


__all__ = [
    "BuyResult",
    "Purchase",
    "Suggestion",
    "Trial",
    "suggest",
    "suggestions",
    "with_purchases",
]
