"""``search``: ranked candidates and the parts/precision trade-off for a list of stages.

Joint exactness (docs/search.md). Let ``t_s`` be the best score of stage ``s`` alone (with
its own quantities) and ``t = max_s t_s``; no combination scores below ``t``. Every
combination with joint score ``<= t`` is built from rows of the per-stage lists
``within(t)``, and :func:`picker.search.allocate.combine` searches those exhaustively
(with quantities shared) for the ``top`` best keys. If fewer than ``top`` feasible
combinations exist within ``t``, ``t`` is raised (x4, then to infinity, where the lists
are the whole space) and the search repeated. The first ``t`` that yields ``top``
combinations gives the exact ``top`` of the whole space, since any better combination
would score ``<= t`` and so be among those searched.

The ``pieces`` ranking (the default: fewest pieces within a precision goal), the time
limit and the proved lower bound are in :mod:`picker.search.ranking`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from picker.errors import NoDesignError
from picker.parts import Candidate, StageChoice, StageTarget
from picker.search.opamp import choose_opamp
from picker.search.plans import WIDE
from picker.search.progress import Clock, Stopped
from picker.search.ranking import DEFAULT_MAX_ERROR, RANKS, ranked
from picker.search.reach import REACH_SLACK, check_reach, check_supply  # noqa: F401 (re-exported)
from picker.search.space import Bounds, build_space, extents
from picker.search.stage import StageProblem, to_canonical
from picker.search.tradeoff import StageClasses


@dataclass(frozen=True)
class SearchResult:
    """Candidates best first; trade-off as (total pieces, best score); notes for people.

    ``rank``, ``max_error``: the ranking used and its precision goal (a fraction).
    ``proven``: rank 1 is proven the best of the whole space under that ranking.
    ``bound``: when not proven, a proved lower bound of rank 1's key, of the kind
    ``bound_of`` names: "pieces", the fewest pieces a candidate within the goal can
    have; "error", the worst error no candidate goes below; None when proven.
    ``goal_met``: rank 1 is within ``max_error`` (``error`` ranking: always True)."""

    candidates: list[Candidate]
    tradeoff: list[tuple[int, float]] = field(default_factory=list)
    notes: tuple[str, ...] = ()
    rank: str = "pieces"
    max_error: float = DEFAULT_MAX_ERROR
    proven: bool = True
    bound: float | None = None
    goal_met: bool = True
    bound_of: str | None = None


TIES = 200  # rows of one stage made into candidates at most (equal scores can be many)
SPARE = 4  # combinations asked for per candidate shown, so that look-alikes can go
# The trade-off's own budget after the search (docs/search.md): as long as the search
# took, at least TRADEOFF_MIN_S, at most TRADEOFF_SHARE of the time limit
TRADEOFF_SHARE = 0.1
TRADEOFF_MIN_S = 0.5


def signature(candidate: Candidate) -> tuple:
    """What a person building it sees: per position the arrangement and the pieces'
    values and drawers. Two candidates that differ only in which of two identical
    pieces they take (two lines of one value in one drawer, two equal measured
    readings) have the same signature."""
    return tuple(
        tuple(
            (name, arr.arrangement, tuple(sorted((p.value, p.location or "") for p in arr.parts)))
            for name, arr in stage.positions
        )
        for stage in candidate.stages
    )


def distinct(candidates: list[Candidate]) -> list[Candidate]:
    """Candidates in order, each signature once (the first, i.e. best-ranked, kept)."""
    seen, out = set(), []
    for c in candidates:
        sig = signature(c)
        if sig not in seen:
            seen.add(sig)
            out.append(c)
    return out


def _timed_out(clock: Clock) -> NoDesignError:
    """No candidate at all within the time limit (and, in the ranking, as long again)."""
    span = clock.deadline - clock.start
    return NoDesignError(
        f"no candidate found within the time limit ({span:.3g} s): the values on hand "
        "make this search long; give more time (--time-limit, the form's time limit), "
        "narrow the value bounds, or fill positions with single pieces only"
    )


def grow(t: float) -> float:
    """Next threshold: x4 (from at least 1e-9), infinity once windows stop helping."""
    return math.inf if t >= WIDE else max(4.0 * t, 1e-9)


def search(
    stock,
    stages,
    *,
    singles: bool = False,
    allow_polarized: bool = False,
    bounds: Bounds = Bounds(),
    top: int = 5,
    tradeoff: bool = True,
    for_people: bool = False,
    rank: str = "pieces",
    max_error: float = DEFAULT_MAX_ERROR,
    time_limit: float | None = None,
    progress=None,
    should_stop=None,
) -> SearchResult:
    """Best ``top`` candidates from ``stock`` for ``stages`` (from ``plan_stages``).

    Parameters
    ----------
    stock : stock.model.Stock
    stages : list of (Topology, StageTarget), in signal order
    singles : one piece per position only
    allow_polarized : let polarized capacitors fill positions
    bounds : allowed combined value per position
    top : number of candidates
    tradeoff : also compute the best score for each total piece count
    for_people : the shells' policy (CLI report, TUI): refuse at once, naming the reach
        of the parts, a stage whose f0 lies outside what the values on hand can reach
        (rather than searching the whole space for a far-off best), and show each
        look-alike candidate once, with a note (:mod:`picker.search.alike`). Rank 1 is
        the same either way.
    rank : "pieces" (fewest pieces within ``max_error``, then smaller worst error, then
        tighter tolerance) or "error" (smallest worst error, then fewer pieces, then
        tighter tolerance); see :mod:`picker.search.ranking`. The yield ranking is
        :func:`picker.search.yieldrank.search`.
    max_error : the precision goal of "pieces", a fraction (0.005 = 0.5 %)
    time_limit : seconds (None: no limit); past it the best found so far is returned
        with ``proven`` False and ``bound`` (the trade-off has a budget of its own after
        the search, see ``TRADEOFF_SHARE``; piece counts it does not reach are listed in
        a note)
    progress : called with :class:`picker.search.progress.Progress` records
    should_stop : called often; once it returns true the search stops as at the limit

    Raises
    ------
    NoDesignError
        naming what is missing when no candidate exists.
    """
    from picker.search.tradeoff import tradeoff as trade

    if rank not in RANKS:
        raise ValueError(f"rank {rank!r}: choose {' or '.join(RANKS)} (yield: yieldrank)")
    if not (math.isfinite(max_error) and max_error >= 0.0):
        raise ValueError(f"max_error {max_error!r}: a fraction, 0 or above")
    if not stages:
        raise NoDesignError("no stages to design")
    clock = Clock(time_limit, progress=progress, should_stop=should_stop)
    top = max(1, int(top))
    space = build_space(stock, singles=singles, allow_polarized=allow_polarized, bounds=bounds)
    check_supply(space, stages, bounds)
    if for_people:
        check_reach(
            space,
            stages,
            wider=lambda: extents(stock, singles=singles, allow_polarized=allow_polarized),
        )
    spare = SPARE if for_people else 1
    classes = [
        StageClasses(topo, target, space, singles=singles, label=f"stage {i + 1}")
        for i, (topo, target) in enumerate(stages)
    ]
    opamp, warnings = choose_opamp(stock.opamps, stages)
    notes: list[str] = []
    proven, bound, goal_met, bound_of = True, None, True, None
    if len(stages) == 1 and rank == "error" and time_limit is None and should_stop is None:
        # one search over the whole space; under a limit the classes go fewest pieces
        # first instead, so that a stopped search has the best of what it finished
        topo, target = stages[0]
        problem = StageProblem(
            topo, target, space, {p.name: space.values[p.kind] for p in topo.positions}
        )
        problem.clock = clock
        try:
            rows, _ = problem.best(top * spare)
        except Stopped:
            raise _timed_out(clock) from None
        rows = to_canonical(space, topo, rows)
        loaded = {(0, None): rows}
        candidates = [
            build_candidate(stages, loaded, space, ((None, i),), (float(rows.score[i]),), opamp, ())
            for i in range(min(len(rows), max(top * spare, TIES)))
        ]
    else:
        out = ranked(
            classes,
            space.counts,
            rank=rank,
            max_error=max_error,
            top=top * spare,
            clock=clock,
            build=lambda key, rows, loaded: build_candidate(
                stages, loaded, space, rows, key, opamp, ()
            ),
        )
        if out.timed_out:
            raise _timed_out(clock)
        candidates, notes = out.candidates, list(out.notes)
        proven, bound, goal_met, bound_of = out.proven, out.bound, out.goal_met, out.bound_of
    if not candidates:
        raise NoDesignError(
            "no combination of the parts on hand fills every position of "
            "every stage with the quantities in stock"
        )
    shown = tuple(warnings) + tuple(n for n in notes if "not proven" in n)
    candidates = [replace(c, warnings=shown) for c in candidates]
    if for_people:
        from picker.search.alike import group

        candidates = group(candidates)
    candidates = candidates[:top]
    curve: list[tuple[int, float]] = []
    if tradeoff:
        limit = None
        if time_limit is not None:  # as long as the search took, within its bounds
            limit = min(TRADEOFF_SHARE * time_limit, max(TRADEOFF_MIN_S, clock.elapsed()))
        tclock = Clock(limit, progress=progress, should_stop=should_stop)
        tclock.stage, tclock.phase = 0, "trade-off"
        curve, skipped = trade(classes, space.counts, tclock)
        if tclock.stopped:
            notes.append(
                f"trade-off: stopped at the time limit; {len(curve)} piece counts shown"
                + (f", {len(skipped)} not reached" if skipped else "")
            )
        elif skipped:
            notes.append(
                "trade-off: piece counts "
                + ", ".join(map(str, skipped))
                + " left out (the joint allocation hit its step limit there)"
            )
        first = candidates[0]
        if proven and first.pieces not in {k for k, _ in curve}:
            # rank 1 is the exact best of its piece count (docs/search.md)
            curve = sorted(curve + [(first.pieces, first.score)])
    return SearchResult(
        candidates,
        curve,
        tuple(notes),
        rank=rank,
        max_error=float(max_error),
        proven=proven,
        bound=bound,
        goal_met=goal_met,
        bound_of=bound_of,
    )


def build_candidate(stages, loaded, space, rows, key, opamp, warnings) -> Candidate:
    """The picker.parts record of one combination (the boundary conversion)."""
    choices = []
    pieces = 0
    for s, ((topo, target), (j, i)) in enumerate(zip(stages, rows, strict=False)):
        stage_rows = loaded[(s, j)]
        pieces += int(stage_rows.pieces[i])
        positions = tuple(
            (p.name, space.arrangement(p.kind, int(stage_rows.idx[p.name][i])))
            for p in topo.positions
        )
        values = {name: arr.value for name, arr in positions}
        f0, q, gain = topo.characteristics(values)
        achieved = StageTarget(float(f0), None if q is None else float(q), float(gain))
        choices.append(StageChoice(topo.key, target, achieved, positions))
    return Candidate(
        score=float(key[0]),
        pieces=pieces,
        stages=tuple(choices),
        opamp=opamp,
        warnings=tuple(warnings),
    )
