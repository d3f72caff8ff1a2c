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

import contextlib
import dataclasses
import math
import time
from collections import Counter
from dataclasses import dataclass

from picker.search.buyvalues import (
    Source,
    estimate,
    near_values,
    rank_key,
    series_in,
    synthesized,
)
from picker.search.space import Bounds, build_space
from picker.search.yieldrank import _has_rank

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


def with_purchases(stock, purchases) -> tuple:
    """(a copy of ``stock`` with one extra line per purchase, the new lines)."""
    from stock.model import Capacitor, Resistor

    lines = {"resistor": list(stock.resistors), "capacitor": list(stock.capacitors)}
    new = []
    for p in purchases:
        cls = Resistor if p.kind == "resistor" else Capacitor
        line = cls(
            value=p.value,
            qty=p.qty,
            tolerance=p.tolerance,
            tolerance_assumed=False,
            index=len(lines[p.kind]),
        )
        lines[p.kind].append(line)
        new.append(line)
    copy = dataclasses.replace(
        stock, resistors=tuple(lines["resistor"]), capacitors=tuple(lines["capacitor"])
    )
    return copy, new


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
    ``time_limit``: seconds for all the trials; ``trial_time_limit``: for each search
    (passed on when the search takes one)."""
    from picker.errors import NoDesignError
    from stock.eseries import series as mantissas

    if rank not in RANKS:
        raise ValueError(f"rank {rank!r}: purchases are ranked under {' or '.join(RANKS)}")
    start = time.monotonic()
    opts: dict = dict(singles=singles, allow_polarized=allow_polarized, bounds=bounds)
    trial = Trial(stock, stages, rank, max_error, opts, trial_time_limit)
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
    left = None if time_limit is None else (lambda: time_limit - (time.monotonic() - start))
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


class Trial:
    """Real searches with purchases added, counted."""

    def __init__(self, stock, stages, rank, max_error, opts, time_limit):
        self.stock, self.stages, self.rank, self.max_error = stock, stages, rank, max_error
        self.opts, self.time_limit, self.count = opts, time_limit, 0
        self.alone0: list = []
        self.screens: list | None = None
        self.known: dict = {}  # purchases -> after, proven by the stage bounds
        self.skipped = 0  # purchases a stage search proved unable to help

    def rank1(self, stock, stages=None, rank=None, **over):
        from picker.search.yieldrank import reference

        self.count += 1
        kw = dict(self.opts, top=1, tradeoff=False, for_people=True, max_error=self.max_error)
        if self.time_limit is not None:
            kw["time_limit"] = self.time_limit
        kw.update(over)
        return reference(stock, stages or self.stages, rank or self.rank, **kw).candidates[0]

    def lower_pieces(self, purchases):
        from picker.search.buystage import StageScreen, attained, lower_key

        if self.screens is None:
            space0 = build_space(self.stock, **self.opts)
            single = self.opts["singles"]
            self.screens = [
                StageScreen(topo, target, space0, singles=single, goal=self.max_error)
                for topo, target in self.stages
            ]
        copy, lines = with_purchases(self.stock, purchases)
        space = build_space(copy, **self.opts)
        ids = {i for i, u in enumerate(space.units) if any(u.line is ln for ln in lines)}
        results = [sc.after(space, ids) for sc in self.screens]
        key = lower_key(results)
        if key is not None and attained(results, space):  # rank 1 after, proven
            taken = Counter(k for r in results for k in r[2])
            used = [taken[(ln.kind, ln.index, None)] for ln in lines]
            if all(used):
                bought = tuple(
                    dataclasses.replace(p, qty=u) for p, u in zip(purchases, used, strict=True)
                )
                pq = (int(key[1]), float(key[2]))
                self.known[purchases] = (key, (bought, pq))
        return key

    def alone(self, stock, s: int):
        """(pieces, score) of stage ``s`` searched on its own, or None: no design."""
        from picker.errors import NoDesignError

        try:
            c = self.rank1(stock, [self.stages[s]])
        except NoDesignError:
            return None
        return int(c.pieces), float(c.score)

    def lower(self, purchases, cand0):
        """A key that rank 1 with ``purchases`` cannot beat, or None when nothing can
        tell. ``pieces``: from each stage's classes up to its fewest pieces
        (:mod:`picker.search.buystage`); ``error``: from searches of single stages (a
        design is never better than each of its stages alone; one stage: that search is
        the real one)."""
        if self.rank == "pieces":
            return self.lower_pieces(purchases)
        if len(self.stages) < 2:
            return None
        copy, _ = with_purchases(self.stock, purchases)
        sizes = [len(topo.positions) for topo, _ in self.stages]
        if cand0 is None:  # no design: a stage that has none alone must get one
            look = [s for s, a in enumerate(self.alone0) if a is None]
        elif self.rank == "error":  # the stages that hold rank 1 back
            look = [s for s, a in enumerate(self.alone0) if a and a[1] >= cand0.score]
        else:  # the stages with pairs, or outside the goal, on their own
            look = [
                s
                for s, a in enumerate(self.alone0)
                if a is None or a[0] > sizes[s] or a[1] > self.max_error
            ]
        if not look:
            return None
        got = {s: self.alone(copy, s) for s in look}
        if any(a is None for a in got.values()):
            return rank_key(self.rank, self.max_error, None, None)
        if cand0 is None:
            return None
        worst = max(a[1] for a in got.values())
        if self.rank == "error":
            return (worst, 0.0, 0.0)
        if worst > self.max_error:
            outside = max(a[1] for a in got.values() if a[1] > self.max_error)
            return (1.0, outside, 0.0)
        exact = _has_rank()  # a stage's own rank 1 under "pieces" has its fewest pieces
        pieces = sum(got[s][0] if (s in got and exact) else sizes[s] for s in range(len(sizes)))
        return (0.0, float(pieces), worst if exact else 0.0)

    def sources(self, cand0) -> list[Source]:
        """Rank 1's stages and each stage's best with single pieces only."""
        from picker.errors import NoDesignError

        if len(self.stages) > 1 and self.rank == "error":  # for the bounds of lower()
            self.alone0 = [self.alone(self.stock, s) for s in range(len(self.stages))]
        out = []
        for s, (topo, target) in enumerate(self.stages):
            choices = [] if cand0 is None else [cand0.stages[s]]
            with contextlib.suppress(NoDesignError):
                # a source only: the cheaper ranking will do
                one = self.rank1(self.stock, [(topo, target)], "error", singles=True)
                choices.append(one.stages[0])
            for choice in choices:
                values = {name: arr.value for name, arr in choice.positions}
                pieces = {name: len(arr.parts) for name, arr in choice.positions}
                out.append(Source(s, values, pieces))
            if not choices:
                out.extend(synthesized(s, topo, target))
        return out

    def after(self, purchases):
        """(key, (purchases with the qty taken, (pieces, score))) or None when the
        purchase is not used or leaves no design."""
        from picker.errors import NoDesignError

        if purchases in self.known:
            return self.known[purchases]
        copy, lines = with_purchases(self.stock, purchases)
        try:
            cand = self.rank1(copy)
        except NoDesignError:
            return None
        used = [0] * len(lines)
        for stage in cand.stages:
            for _, arr in stage.positions:
                for piece in arr.parts:
                    for i, ln in enumerate(lines):
                        if piece.kind == ln.kind and piece.line.index == ln.index:
                            used[i] += 1
        if not all(used):
            return None
        taken = tuple(dataclasses.replace(p, qty=u) for p, u in zip(purchases, used, strict=True))
        pq = (int(cand.pieces), float(cand.score))
        return rank_key(self.rank, self.max_error, *pq), (taken, pq)

    def better(self, key, than) -> bool:
        """``rank`` pieces: a smaller key; error: a smaller worst error."""
        return key < than if self.rank == "pieces" else key[0] < than[0]

    def run(self, purchases, key0, n, left, cand0) -> tuple[list, bool]:
        """The ``n`` best purchases that improve on ``key0`` (best first), and whether
        every purchase was either searched or proven unable to enter them."""
        found: list[tuple] = []
        bounds: dict[int, tuple | None] = {}
        if self.rank == "pieces":  # cheap bounds: all first, then best first
            bounds = {i: self.lower(ps, cand0) for i, ps in enumerate(purchases)}
            low = (-math.inf,)
            ranked = sorted(range(len(purchases)), key=lambda i: (bounds[i] or low, i))
            purchases = [purchases[i] for i in ranked]
            bounds = {k: bounds[i] for k, i in enumerate(ranked)}
        for k, ps in enumerate(purchases):
            if left is not None and left() <= 0:
                return found, False
            limit = found[n - 1][0] if len(found) >= n else key0
            lb = bounds[k] if k in bounds else self.lower(ps, cand0)
            if lb is not None and not self.better(lb, limit):
                self.skipped += 1
                continue
            res = self.after(ps)
            if res is not None and self.better(res[0], key0):
                found.append(res)
                found.sort(key=lambda f: f[0])
        return found, True
