"""The two exact rankings, ``pieces`` and ``error``, over the stage classes (docs/search.md).

Keys, smaller first; a candidate's tolerance keys are its worst tolerance and the sum
of its pieces' tolerances:

- ``error``: ``(worst error, pieces, worst tolerance, tolerance sum)``.
- ``pieces`` with the goal ``P``: a candidate within the goal (worst error ``<= P``)
  has ``(0, pieces, worst error, worst tolerance, tolerance sum)``, any other
  ``(1, worst error, pieces, ...)``: every candidate within the goal comes first,
  fewest pieces first; if none is within it, the order is that of ``error``.

Why ``pieces`` is exact. The joint score is the max over the stages, so a candidate
within ``P`` uses in every stage a row scoring ``<= P``, hence a class ``j`` of that
stage with best score ``b_s(j) <= P`` (``b_s`` exact, :mod:`picker.search.tradeoff`).
The totals ``k = j_1 + ... + j_n`` of such classes are taken in increasing order; for
each, :func:`exact_at` finds the best combinations with exactly ``k`` pieces among the
rows ``<= P`` (quantities shared, :func:`picker.search.allocate.combine`, exhaustive
up to its bound). A class may first be cut to its best rows; the answer is accepted
only when every row left out scores above the worst combination kept (or nothing was
cut), otherwise more rows are loaded. The first ``k`` with a combination gives rank 1;
all smaller totals were searched completely and hold none within ``P``. Later ranks
come from the next totals, then (if fewer than asked are within the goal) from the
``error`` ranking's list, those above ``P``.

Why ``error`` is exact: see :mod:`picker.search.api` (the threshold loop).

Time limit. The clock (:class:`picker.search.progress.Clock`) is checked between
patterns and every few hundred rows of the joint allocation. When it runs out, the
best found so far is returned with ``proven`` False and ``bound``, a proved lower bound
of rank 1's key: for ``error``, the worst error no candidate goes below (the largest
best score of a stage alone, or a threshold searched completely without a find); for
``pieces``, the fewest pieces a candidate within the goal can have (every smaller
total searched completely, or each stage's fewest pieces within the goal). When the
limit passes before any candidate is found, the ``error`` search goes on with a clock
of its own, fewest-piece classes first, until it has one (a shell always gets a
candidate to show, or a clear "no design").
"""

from __future__ import annotations

import contextlib
import math
from dataclasses import dataclass, field

from picker.search.allocate import combine
from picker.search.progress import Clock, Stopped
from picker.search.tradeoff import LOOK_AHEAD, TRUNCATE, lower_bounds

RANKS = ("pieces", "error")
DEFAULT_MAX_ERROR = 0.005  # the precision goal of ``pieces``: 0.5 %


def tolerances(candidate) -> tuple[float, float]:
    """(worst tolerance, sum of tolerances) over every piece of ``candidate``."""
    tols = [p.tolerance for st in candidate.stages for _, arr in st.positions for p in arr.parts]
    return (max(tols, default=0.0), float(sum(tols)))


def rank_key(rank: str, max_error: float, candidate) -> tuple:
    """The sort key of ``candidate`` under ``rank`` (smaller is better; see the module)."""
    tmax, tsum = tolerances(candidate)
    score, pieces = candidate.score, candidate.pieces
    if rank == "pieces" and score <= max_error:
        return (0, pieces, score, tmax, tsum)
    return (1, score, pieces, tmax, tsum)


@dataclass
class Ranked:
    """What a ranking found: candidates in any order until :meth:`finish` sorts them."""

    candidates: list = field(default_factory=list)
    proven: bool = False  # rank 1 is proven the best of the whole space
    bound: float | None = None
    bound_of: str | None = None  # "pieces" or "error": what ``bound`` bounds
    goal_met: bool = True
    step_limited: bool = False
    ties_unsure: bool = False  # rank 1 proven but for the tolerance tie-break
    timed_out: bool = False  # no first candidate within twice the time limit
    notes: list[str] = field(default_factory=list)

    def add(self, got, clock: Clock | None, key) -> None:
        seen = {c.stages for c in self.candidates}
        self.candidates += [c for c in got if c.stages not in seen]
        if clock is not None and self.candidates:
            best = min(self.candidates, key=key)
            clock.found(best.score, best.pieces)


def ranked(classes, counts, *, rank: str, max_error: float, top: int, clock: Clock, build):
    """The ``top`` best candidates under ``rank`` (a :class:`Ranked`, sorted, cut to top).

    ``classes``: one :class:`picker.search.tradeoff.StageClasses` per stage;
    ``build(key, rows, loaded)`` makes the Candidate of one combination."""
    out = Ranked()
    for c in classes:
        c.clock = clock
    stopped = False
    try:
        if rank == "pieces":
            _pieces(classes, counts, top, max_error, clock, build, out)
        else:
            _error(classes, counts, top, clock, build, out)
    except Stopped:
        stopped = True
    if stopped and rank == "error" and not out.proven:
        # each stage's best is at least the floor of its classes: no candidate goes below
        floor = max((c.floor() for c in classes), default=0.0)
        out.bound, out.bound_of = max(out.bound or 0.0, floor), "error"
    if stopped and not out.candidates:
        # One more span as long as the time limit (at least RESCUE_S) to find a
        # first candidate; past it the search ends with none and says so (api.search).
        span = max(clock.deadline - clock.start, RESCUE_S)
        rescue = Clock(
            span if math.isfinite(span) else None,
            progress=clock.progress,
        )
        for c in classes:
            c.clock = rescue
        sub = Ranked()
        with contextlib.suppress(Stopped):
            # fewest-piece classes first (_error under a clock): a first candidate soon
            _error(classes, counts, 1, rescue, build, sub, first=True)
        out.candidates = sub.candidates
        if rank == "error" and sub.proven:
            out.proven = True
        if rank == "error" or out.bound_of is None:
            # each stage's best is at least the floor of its classes: none goes below
            floor = max((c.floor() for c in classes), default=0.0)
            out.bound, out.bound_of = max(out.bound or 0.0, floor), "error"
        if not out.candidates:
            out.timed_out = True
            return out
        out.notes.append(
            "the time limit passed before a first candidate was found; the search went "
            f"on until it had one ({rescue.elapsed():.1f} s more)"
        )
    key = lambda c: rank_key(rank, max_error, c)  # noqa: E731
    out.candidates = sorted(out.candidates, key=key)[:top]
    if out.candidates and rank == "pieces":
        out.goal_met = out.candidates[0].score <= max_error
    if out.proven:
        out.bound = out.bound_of = None
    if stopped and out.candidates:
        out.notes.append(_stop_note(rank, out, clock))
    if out.step_limited and not out.proven:
        out.notes.append(
            "the stages compete for scarce pieces and the joint allocation stopped at "
            "its step limit: these are the best combinations found, not proven optimal"
        )
    elif out.ties_unsure:
        out.notes.append(
            "rank 1's piece count and worst error are proven; among candidates equal in "
            "both, the tighter tolerance is the best the joint allocation found within "
            "its step limit"
        )
    elif out.step_limited and len(out.candidates) > 1:
        out.notes.append(
            "rank 1 is proven; the joint allocation stopped at its step limit after it, "
            "so the later ranks are the best it found"
        )
    if out.candidates and rank == "pieces" and not out.goal_met:
        best = out.candidates[0].score
        out.notes.append(
            f"no candidate reaches the precision goal of {max_error * 100:.3g} %: the "
            f"smallest worst error is {best * 100:.3g} %, {(best - max_error) * 100:.3g} "
            "points above the goal; ranked by worst error instead"
        )
    return out


RESCUE_S = 5.0  # at least this long for a first candidate after a very short limit


def _stop_note(rank: str, out: Ranked, clock: Clock) -> str:
    head = f"stopped after {clock.elapsed():.1f} s"
    if out.proven:
        return f"{head}: rank 1 is proven; the later ranks are the best found"
    if out.bound is None or out.bound <= 0.0:
        return f"{head}: rank 1 is the best found, not proven"
    if out.bound_of == "pieces":
        proof = f"no candidate within the goal uses fewer than {int(out.bound)} pieces"
    else:
        proof = f"no candidate has a worst error below {out.bound * 100:.3g} %"
    return f"{head}: rank 1 is the best found, not proven; proved so far: {proof}"


def _error(classes, counts, top, clock, build, out: Ranked, *, first: bool = False) -> None:
    """``error``: the threshold loop of :mod:`picker.search.api` with the clock.

    Under a time limit (or a stop key) the loop first runs on the few-piece classes
    alone, one more class per stage each time (:func:`_error_upto`): each such pass is
    exact among those classes only, so its candidates are real but unproven, and a
    search stopped before the whole space is done still has the best of what it
    finished. The last pass, over every class, is the proof. ``first``: return after
    the first pass that finds a candidate (the search for a first candidate)."""
    if math.isfinite(clock.deadline) or clock.should_stop is not None:
        fewest = [min(c.by_j, default=0) for c in classes]
        most = max(
            (max(c.by_j, default=0) - m for c, m in zip(classes, fewest, strict=True)), default=0
        )
        key = lambda c: rank_key("error", 0.0, c)  # noqa: E731
        for extra in range(most):
            part = Ranked()
            _error_upto(classes, counts, top, clock, build, part, [m + extra for m in fewest])
            out.add(part.candidates, clock, key)
            if first and out.candidates:
                return
    _error_upto(classes, counts, top, clock, build, out, None)


def _error_upto(classes, counts, top, clock, build, out: Ranked, upto) -> None:
    """The threshold loop over the classes ``j <= upto[s]`` (every class: None). Only
    the loop over every class sets ``proven`` and ``bound``."""
    from picker.search.api import grow

    whole = upto is None
    ups = [None] * len(classes) if upto is None else upto
    t = 0.0
    for s, (c, up) in enumerate(zip(classes, ups, strict=True)):
        clock.at(s + 1, "stage values")
        best = c.best(up)
        if not best:
            out.proven = whole  # a stage has no assignment at all: no candidate
            return
        t = max(t, min(best.values()))
        if whole:
            out.bound, out.bound_of = t, "error"
    clock.at(0, "joint allocation")
    key = lambda c: rank_key("error", 0.0, c)  # noqa: E731
    while True:
        found, loaded, complete = cut_combine(classes, counts, t, top, clock, upto=upto)
        out.add([build(k, rows, loaded) for k, rows in found], clock, key)
        if clock.stopped:
            raise Stopped
        if not complete:
            out.step_limited = True
            return
        if not whole:
            if found or math.isinf(t):
                return
            t = grow(t)
            continue
        if found:
            out.proven = True
        else:
            out.bound = t if math.isfinite(t) else out.bound
        if len(found) >= top or math.isinf(t):
            if not found:
                out.proven = True  # the whole space searched: no candidate
            return
        t = grow(t)


def _pieces(classes, counts, top, goal, clock, build, out: Ranked) -> None:
    """``pieces``: totals in increasing order (see the module text). Classes are
    searched lazily, fewest pieces first: for a total ``k`` only the classes that can
    take part in it (``j_s <= m_s + k - k_0``, ``m_s`` the stage's fewest pieces
    within the goal, ``k_0`` their sum) are searched, and each only as far as the goal
    (:meth:`StageClasses.within`), so a request met by single pieces never searches a
    pair space."""
    fewest = [min(c.by_j, default=len(c.topology.positions)) for c in classes]
    out.bound, out.bound_of = float(sum(fewest)), "pieces"
    if any(not c.by_j for c in classes):
        out.proven = True  # a stage has no assignment at all: no candidate
        return
    for s, c in enumerate(classes):
        clock.at(s + 1, "stage values")
        for j in sorted(c.by_j):
            fewest[s] = j  # every class below j holds nothing within the goal
            out.bound = float(sum(fewest))
            if c.best_of(j, cap=goal) <= goal:
                break
        else:
            _error(classes, counts, top, clock, build, out)  # this stage misses the goal
            return
    first = sum(fewest)
    last = sum(max(c.by_j) for c in classes)
    key = lambda c: rank_key("pieces", goal, c)  # noqa: E731
    have = 0
    unsure = False  # a smaller total was cut short by the step limit
    for k in range(first, last + 1):
        upto = [m + k - first for m in fewest]
        clock.at(0, f"stage values, {k} pieces")
        lowest = lower_bounds([c.within(goal, up) for c, up in zip(classes, upto, strict=True)])
        if k not in lowest:  # no choice of classes within the goal has k pieces
            if not have and not unsure:
                out.bound = float(k + 1)
            continue
        clock.at(0, f"joint allocation, {k} pieces")
        if not have:  # rank 1 first: proving one is far cheaper than proving a list
            got, complete = exact_at(classes, counts, k, goal, 1, clock, build, upto)
            out.add(got, clock, key)
            if clock.stopped:
                raise Stopped
            if not complete and got and not unsure and got[0].score <= lowest[k]:
                # its pieces and worst error meet their lower bounds: proven but for the
                # tolerance tie-break, which the step limit cut short
                out.proven = out.step_limited = out.ties_unsure = True
            elif not complete:
                out.step_limited = unsure = True
            elif got and not unsure:
                out.proven = True
            if not got and not unsure:
                out.bound = float(k + 1)  # every total up to k holds none within the goal
            if not got:
                continue
        got, complete = exact_at(classes, counts, k, goal, top - have, clock, build, upto)
        out.add(got, clock, key)
        if clock.stopped:
            raise Stopped
        if not complete:
            out.step_limited = True
        have = len(out.candidates)
        if have >= top:
            return
    if not have:
        out.bound = None
        out.candidates = []
        _error(classes, counts, top, clock, build, out)
        return
    fill = Ranked()
    _error(classes, counts, top, clock, build, fill)
    out.add([c for c in fill.candidates if c.score > goal], clock, key)


def exact_at(classes, counts, k: int, t: float, top: int, clock, build, upto=None):
    """(the best ``top`` candidates with exactly ``k`` pieces scoring ``<= t``, complete).

    ``upto``: per stage the largest class that can take part in a total of ``k``."""
    found, loaded, complete = cut_combine(
        classes,
        counts,
        t,
        top,
        clock,
        pieces_total=k,
        upto=upto,
        memo=False,
        look_ahead=LOOK_AHEAD,
    )
    return [build(key, rows, loaded) for key, rows in found], complete


def cut_combine(classes, counts, t: float, top: int, clock, *, upto=None, **options):
    """:func:`picker.search.allocate.combine` over the classes' rows ``<= t``, loaded
    cut to their best rows: ``(found, loaded, complete)`` as combine gives them.

    Classes are first cut to their best ``TRUNCATE`` rows; the list is accepted when
    nothing was cut, or when ``top`` were found and the worst of them sorts before
    anything a row left out could make (:func:`_beats_cut`); otherwise eight times as
    many rows are loaded.
    Memory then follows the rows the answer needs, not every row ``<= t``."""
    keep = TRUNCATE
    while True:
        tails: dict[int, dict] = {}
        stage_classes = [
            c.classes(
                t, keep=keep, tails=tails.setdefault(s, {}), upto=None if upto is None else upto[s]
            )
            for s, c in enumerate(classes)
        ]
        found, loaded, complete = combine(stage_classes, counts, top=top, clock=clock, **options)
        if not complete:
            return found, loaded, False
        cut = [(s, j, tails[s][j]) for (s, j) in loaded if j in tails[s]]
        if not cut or (len(found) >= top and _beats_cut(found[-1][0], cut, classes, options)):
            return found, loaded, True
        keep *= 8


def _beats_cut(worst, cut, classes, options) -> bool:
    """Whether every combination using a row left out of a cut class sorts after
    ``worst`` (the ``top``-th key found, ``(score, pieces, worst tol, tol sum)``).

    A row left out of class ``j`` of stage ``s`` sorts at or after the last row kept
    (rows go by score, then worst tolerance, then tolerance sum; pieces are ``j``), so
    a combination using it has a key at least ``(tail score, pieces, tail worst tol,
    tail tol sum)``, its pieces at least ``j`` plus the fewest of the other stages (the
    total where it is fixed). ``worst`` below that bound: nothing left out can enter.
    With one stage a combination is one row, and a row left out equal to that bound
    still loses the tie to the kept ones (they come first in the class), so equal
    passes too: look-alike rows by the thousand (one value in many drawers) need not
    all be loaded."""
    fixed = options.get("pieces_total")
    fewest = [min(c.by_j, default=0) for c in classes]
    for s, j, (score, tol_max, tol_sum) in cut:
        pieces = fixed if fixed is not None else j + sum(fewest) - fewest[s]
        bound = (score, pieces, tol_max, tol_sum)
        if not (tuple(worst) < bound or (len(classes) == 1 and tuple(worst) <= bound)):
            return False
    return True
