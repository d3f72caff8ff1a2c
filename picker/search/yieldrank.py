"""``rank="yield"``: the candidate with the highest Monte Carlo yield (docs/yield.md).

Steps, and what each one proves:

1. The ``pieces`` and ``error`` rankings' rank 1 (``picker.search.api.search``; proven
   exactly as those modes prove theirs).
2. A pool per stage, from searches of that stage alone: its ``POOL_KEEP`` best by worst
   error, with pairs and with single pieces only, and its ``POOL_KEEP`` best under the
   ``pieces`` ranking with the goal at a tenth of the widest window (every row of those
   exact lists); and its ``POOL_KEEP`` best by worst error from only the
   pieces of the tighter tolerances on hand (the ``TIGHT_LEVELS`` tightest per kind).
3. Each pool row's yield is estimated (:mod:`picker.search.yieldest`: first order,
   normal, vectorised); a combination's estimate is the product over its stages (the
   true yield is such a product: stages share no piece).
4. The combinations with the best estimates, quantities shared, come from a depth-first
   branch and bound (:func:`best_joint`) at a few prices per piece, so that combinations
   with fewer pieces and nearly the same yield are among them.
5. The best few, and both rank 1s of step 1, go through the real Monte Carlo of the
   error budget (:func:`picker.budget.montecarlo.monte_carlo`: the same trials, window,
   spread and seed, so the yield is the one the budget shows).
6. The confirmed set is ranked by :func:`order_confirmed`: highest yield; yields equal
   within the standard error of their difference go to fewer pieces. A candidate goes
   ahead of a higher one only if it is within that error of it and of both rank 1s of
   step 1, so rank 1's yield is never below theirs by more than the sampling error.

Not proven: that no candidate outside the pool, or not confirmed, has a higher yield.
Only the public search is used, so this module follows the search as it changes.
"""

from __future__ import annotations

import dataclasses
import inspect
import math
import time
from collections import Counter
from dataclasses import dataclass

import numpy as np

from picker.parts import Candidate
from picker.search.api import SearchResult
from picker.search.space import Bounds
from picker.search.yieldjoint import STEPS, best_joint  # noqa: F401 (re-exported)
from picker.search.yieldpieces import (  # noqa: F401 (re-exported)
    capacity,
    identity,
    levels,
    piece_key,
    restore,
    tight_stock,
)

POOL_KEEP = 60  # rows per stage from each pool search
TIGHT_LEVELS = 2  # tightest tolerances per kind the pool also searches on their own
JOINT_TOP = 6  # combinations kept per price
CONFIRM = 4  # of each price's list, confirmed by Monte Carlo (besides the shown ones)
PRICES = (0.0, 1.0, 4.0)  # price per piece, in standard errors of the yield
# under --time-limit (docs/yield.md, "Time limit"): shares of the time left
REFERENCE_SHARE = 0.3  # each of the two reference searches of step 1
POOL_SHARE = 0.8  # the pool searches of step 2, shared out run by run
MIN_SEARCH_S = 0.05  # no search is given less (it returns its best so far)


@dataclass(frozen=True)
class YieldInfo:
    """The yield of one candidate and how it was found."""

    value: float
    method: str  # "monte carlo" | "estimate"
    std_error: float | None = None
    trials: int | None = None

    def to_json(self) -> dict:
        return {
            "value": self.value,
            "method": self.method,
            "std_error": self.std_error,
            "trials": self.trials,
        }


@dataclass(frozen=True)
class YieldResult(SearchResult):
    """A SearchResult ranked by yield: ``yields[i]`` belongs to ``candidates[i]``;
    ``references``: ``(("pieces", YieldInfo), ("error", YieldInfo))``, the Monte Carlo
    yields of those modes' rank 1."""

    yields: tuple[YieldInfo, ...] = ()
    references: tuple[tuple[str, YieldInfo], ...] = ()


def reference(stock, stages, rank: str, **kw) -> SearchResult:
    """``search`` in mode ``rank``, passing only the options it knows."""
    from picker.search.api import search as plain

    params = inspect.signature(plain).parameters
    kw = {k: v for k, v in kw.items() if k in params}
    if "rank" in params:
        kw["rank"] = rank
    return plain(stock, stages, **kw)


def monte_carlo_yield(candidate, *, trials, distribution, window, seed) -> YieldInfo:
    """The error budget's Monte Carlo yield of ``candidate`` (same call, same seed)."""
    from picker.budget.montecarlo import monte_carlo
    from picker.budget.pieces import stage_pieces, topology_of

    layout = [(topology_of(c.topology), stage_pieces(c), c) for c in candidate.stages]
    mc = monte_carlo(layout, trials=trials, distribution=distribution, window=window, seed=seed)
    return YieldInfo(mc.yield_, "monte carlo", mc.std_error, trials)


def se_diff(a: YieldInfo, b: YieldInfo) -> float:
    """Standard error of the difference of two independent Monte Carlo yields."""
    return math.hypot(a.std_error or 0.0, b.std_error or 0.0)


def order_confirmed(items, refs=()):
    """Rank ``[(candidate, YieldInfo)]``: repeatedly, among those whose yield is within
    the standard error of the best left and of every reference in ``refs``, the fewest
    pieces (then the higher yield, then the smaller score)."""
    left, out = list(items), []
    while left:
        top = max(left, key=lambda it: it[1].value)
        ties = [
            it
            for it in left
            if it[1].value >= top[1].value - se_diff(it[1], top[1])
            and all(it[1].value >= r.value - se_diff(it[1], r) for r in refs)
        ] or [top]
        pick = min(ties, key=lambda it: (it[0].pieces, -it[1].value, it[0].score))
        out.append(pick)
        left.remove(pick)
    return out


def stage_pool(
    stock, stage, *, goal: float, common: dict, clock, skipped: list | None = None
) -> list[Candidate]:
    """Distinct one-stage candidates of ``stage`` from the pool searches (step 2).

    ``clock(runs_left)``: seconds for the next run (None: no limit; 0 or less: the time
    is up, and the runs not made are counted in ``skipped``)."""
    skipped = [] if skipped is None else skipped
    from picker.errors import NoDesignError

    runs: list[tuple] = [(stock, "error", None, False), (stock, "error", None, True)]
    if _has_rank():
        runs.append((stock, "pieces", goal / 10.0, False))
    r_levels, c_levels = levels(stock, "resistor"), levels(stock, "capacitor")
    for r in r_levels[:TIGHT_LEVELS]:
        for c in c_levels[:TIGHT_LEVELS]:
            if r < r_levels[-1] or c < c_levels[-1]:
                runs.append(
                    (tight_stock(stock, {"resistor": r, "capacitor": c}), "error", None, False)
                )
    if common.get("singles"):
        runs = [r for r in runs if r[3]]
    pool: dict[tuple, Candidate] = {}
    for n, (part, rank, g, singles) in enumerate(runs):
        limit = clock(len(runs) - n)  # this run's share of what is left
        if limit is not None and limit <= 0.0:
            skipped.append(len(runs) - n)
            break
        kw = dict(common, top=POOL_KEEP, tradeoff=False, time_limit=limit, singles=singles)
        if g is not None:
            kw["max_error"] = g
        try:
            found = reference(part, [stage], rank, **kw)
        except NoDesignError:
            continue
        for cand in found.candidates:
            cand = cand if part is stock else restore(cand, stock)
            pool.setdefault(identity(cand), cand)
    return list(pool.values())


def _has_rank() -> bool:
    from picker.search.api import search as plain

    return "rank" in inspect.signature(plain).parameters


def search(
    stock,
    stages,
    *,
    window=0.05,
    trials: int = 10000,
    distribution: str = "uniform",
    seed: int = 0,
    top: int = 5,
    singles: bool = False,
    allow_polarized: bool = False,
    bounds: Bounds | None = None,
    tradeoff: bool = True,
    for_people: bool = False,
    time_limit: float | None = None,
    **search_kw,
) -> YieldResult:
    """Candidates ranked by Monte Carlo yield inside ``window`` (see the module text).

    ``window``, ``trials``, ``distribution`` and ``seed`` are those of the error budget
    (``picker.budget.budget``); the other options are ``search``'s, passed on to the
    searches of steps 1 and 2 (``time_limit`` is shared out: each search gets what is
    left of it)."""
    from picker.budget.core import _window
    from picker.search.opamp import choose_opamp
    from picker.search.yieldest import estimate

    win = _window(window)
    bounds = Bounds() if bounds is None else bounds
    # One clock for every step (docs/yield.md, "Time limit"): the two reference searches
    # get a share of what is left, the pool searches share out most of the rest run by
    # run, and the Monte Carlo confirmation stops at the deadline (the references' own
    # Monte Carlo is always made: rank 1 is never below theirs).
    deadline = None if time_limit is None else time.monotonic() + max(0.0, time_limit)

    def share(part: float) -> float | None:
        if deadline is None:
            return None
        return max(MIN_SEARCH_S, part * (deadline - time.monotonic()))

    common = dict(singles=singles, allow_polarized=allow_polarized, bounds=bounds, **search_kw)
    top = max(1, int(top))
    by_pieces = reference(
        stock, stages, "pieces", top=top, tradeoff=tradeoff, for_people=for_people,
        time_limit=share(REFERENCE_SHARE), **common,
    )  # fmt: skip
    by_error = reference(
        stock, stages, "error", top=1, tradeoff=False, time_limit=share(REFERENCE_SHARE), **common
    )
    mc = dict(trials=trials, distribution=distribution, window=win, seed=seed)
    refs = {
        "pieces": (by_pieces.candidates[0], monte_carlo_yield(by_pieces.candidates[0], **mc)),
        "error": (by_error.candidates[0], monte_carlo_yield(by_error.candidates[0], **mc)),
    }
    pool_end = (
        None if deadline is None else time.monotonic() + POOL_SHARE * (deadline - time.monotonic())
    )
    n_stages = len(stages)

    def pool_clock(stage_index: int):
        def clock(runs_left: int) -> float | None:
            if pool_end is None:
                return None
            left = pool_end - time.monotonic()
            stages_left = n_stages - stage_index
            return left / (runs_left * stages_left) if left > MIN_SEARCH_S else 0.0

        return clock

    pool_kw = {k: v for k, v in common.items() if k not in ("max_error",)}
    pools, offered, counts = [], [], {}
    skipped: list[int] = []
    for k, (topo, target) in enumerate(stages):
        rows = stage_pool(
            stock, (topo, target), goal=max(win.values()), common=pool_kw,
            clock=pool_clock(k), skipped=skipped,
        )  # fmt: skip
        if not rows:  # the time was up before this stage's first pool search
            rows = [_one_stage(c, k) for c in (refs["pieces"][0], refs["error"][0])]
        choices = [c.stages[0] for c in rows]
        est = estimate(topo, target, choices, window=win, distribution=distribution)
        needs = []
        for choice in choices:
            use = Counter(piece_key(p) for _, arr in choice.positions for p in arr.parts)
            for _, arr in choice.positions:
                for p in arr.parts:
                    counts[piece_key(p)] = capacity(p)
            needs.append(list(use.items()))
        pools.append((rows, est))
        pieces = np.array([c.pieces for c in rows], dtype=np.int64)
        offered.append((-np.log(np.maximum(est, 1e-300)), pieces, needs))

    notes = list(by_pieces.notes)
    if skipped:
        notes.append(
            f"yield ranking: the time limit ended the pool searches early ({sum(skipped)} "
            "of them not made): the candidates come from a smaller pool"
        )
    y0 = max(refs["pieces"][1].value, refs["error"][1].value, 1e-9)
    se = math.sqrt(max(y0 * (1.0 - y0), 1.0 / trials) / trials) / y0
    opamp, warnings = choose_opamp(stock.opamps, stages)
    built: dict[tuple, tuple] = {}
    for price in PRICES:
        found, complete = best_joint(offered, counts, price=price * se, top=JOINT_TOP)
        if not complete:
            notes.append(
                "yield ranking: the joint search of the estimates stopped at its step "
                "limit; the candidates confirmed are the best it found"
            )
        for rank, (_, _, rows) in enumerate(found):
            parts = [pools[s][0][i] for s, i in enumerate(rows)]
            cand = Candidate(
                score=max(p.score for p in parts),
                pieces=sum(p.pieces for p in parts),
                stages=tuple(p.stages[0] for p in parts),
                opamp=opamp,
                warnings=tuple(warnings),
            )
            joint = math.prod(float(pools[s][1][i]) for s, i in enumerate(rows))
            key = identity(cand)
            if key not in built or rank < built[key][2]:
                built[key] = (cand, YieldInfo(joint, "estimate"), rank)
    by_estimate = sorted(built.values(), key=lambda b: (-b[1].value, b[0].pieces, b[0].score))
    confirm = [b for b in by_estimate if b[2] < CONFIRM][: max(top, CONFIRM) + len(PRICES)]
    items: list[tuple[Candidate, YieldInfo]] = []
    for c, _, _ in confirm:
        if deadline is not None and time.monotonic() > deadline and items:
            notes.append(
                f"yield ranking: the time limit ended the Monte Carlo confirmation after "
                f"{len(items)} of {len(confirm)} candidates; the rest are ranked by estimate"
            )
            break
        items.append((c, monte_carlo_yield(c, **mc)))
    for cand, info in refs.values():
        if identity(cand) not in {identity(c) for c, _ in items}:
            items.append((cand, info))
    ranked = order_confirmed(items, [info for _, info in refs.values()])
    shown = {identity(c) for c, _ in ranked}
    ranked += [(c, info) for c, info, _ in by_estimate if identity(c) not in shown]
    if for_people:
        ranked = _alike(ranked, stages)
    ranked = ranked[:top]
    notes.append(
        "yield ranking: rank 1 has the highest Monte Carlo yield of the candidates "
        "confirmed (equal within the standard error: fewer pieces); it is not proven "
        "the highest of the whole space"
    )
    fields = {f.name: getattr(by_pieces, f.name) for f in dataclasses.fields(by_pieces)}
    fields.update(candidates=[c for c, _ in ranked], notes=tuple(notes))
    if "rank" in fields:
        met = not ranked or ranked[0][0].score <= by_pieces.max_error  # no proof carries over
        fields.update(rank="yield", proven=False, bound=None, bound_of=None, goal_met=met)
    return YieldResult(
        **fields,
        yields=tuple(info for _, info in ranked),
        references=tuple((k, info) for k, (_, info) in refs.items()),
    )


def _alike(ranked, stages):
    """Look-alike candidates once (the search's own grouping), each keeping its yield."""
    import importlib

    try:
        group = importlib.import_module("picker.search.alike").group
        kept = group([c for c, _ in ranked], stages)
    except ImportError:
        from picker.search.api import distinct

        kept = distinct([c for c, _ in ranked])
    out = []
    by_id = {identity(c): info for c, info in ranked}
    for c in kept:
        out.append((c, by_id[identity(c)]))
    return out


def _one_stage(candidate: Candidate, k: int) -> Candidate:
    """Stage ``k`` of ``candidate`` as a one-stage candidate (a pool row)."""
    from picker.search.buying import stage_error

    stage = candidate.stages[k]
    pieces = sum(len(arr.parts) for _, arr in stage.positions)
    return Candidate(
        score=stage_error(stage), pieces=pieces, stages=(stage,), opamp=candidate.opamp,
        warnings=candidate.warnings,
    )  # fmt: skip
