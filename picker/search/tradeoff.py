"""Stage classes by piece count, and the trade-off between parts and precision.

Each stage's space splits by *pattern* (one piece or a pair in each position); a
pattern's sub-problem is searched like a stage (exact within a threshold, see
:mod:`picker.search.stage`). A *class* ``j`` of a stage is the union of its patterns
with ``j`` pieces in all; ``b_s(j)``, its best score, is exact.

Trade-off. One stage: the curve is ``b(j)``. Several stages: for a total ``k`` the joint
best is at least ``LB(k) = min over splits j_1 + ... = k of max_s b_s(j_s)``; starting
from ``t = LB(k)``, the classes with ``b_s(j) <= t`` are searched jointly with
quantities shared and the total fixed to ``k`` (:func:`picker.search.allocate.combine`);
if nothing is found ``t`` grows. Every combination with ``k`` pieces and score ``<= t``
uses, in each stage, a class with ``b_s(j_s) <= t``, so the first feasible ``t`` gives
the exact best for ``k``.
"""

from __future__ import annotations

import math

import numpy as np

from picker.search.allocate import combine
from picker.search.stage import StageProblem, StageRows, patterns

LOOK_AHEAD = False  # forward check in the trade-off: measured 6.7 s with, 4.5 s without (8th order)
TRUNCATE = 256  # rows per class the trade-off loads first (more only if needed)


class StageClasses:
    """The pattern sub-problems of one stage, grouped by piece count."""

    def __init__(self, topo, target, space, *, singles: bool = False, label: str = "stage"):
        self.topology, self.target, self.space = topo, target, space
        self.clock = None  # a picker.search.progress.Clock, checked between patterns
        self.by_j: dict[int, list[tuple[StageProblem, dict]]] = {}
        for pat in patterns(len(topo.positions), singles):
            arrays, back = {}, {}
            for p, n in zip(topo.positions, pat, strict=False):
                arrays[p.name], back[p.name] = space.with_pieces(p.kind, n)
            problem = StageProblem(topo, target, space, arrays, label=label)
            if not problem.empty():
                self.by_j.setdefault(sum(pat), []).append((problem, back))
        self._best_j: dict[int, float] = {}  # j -> exact best of class j (inf: no row)
        self._above: dict[int, float] = {}  # j -> a score class j has no row at or below

    def best_of(self, j: int, cap: float = math.inf) -> float:
        """The exact best score of class ``j`` when it is ``<= cap``, else inf (class
        ``j`` then has no row ``<= cap``). Classes are searched only when asked for,
        so a search that needs the few-piece classes never touches the pair spaces.

        Exact: each pattern's ``best(1, cap=c)`` returns its best row when that scores
        ``<= c`` (:meth:`StageProblem.best`); ``c`` is the smaller of ``cap`` and the
        best of the patterns before, so the least of the answers is the class's best
        whenever that is ``<= cap``. A stopped call caches nothing."""
        if j in self._best_j:
            b = self._best_j[j]
            return b if b <= cap else math.inf
        if j not in self.by_j or self._above.get(j, -math.inf) >= cap:
            return math.inf
        b = math.inf
        # densest patterns (most pairs on the resistor side) first: their best caps the
        # search of the others in the class
        for problem, _ in sorted(self.by_j[j], key=lambda pb: -_density(pb[0])):
            if self.clock is not None:
                self.clock.check()
            problem.clock = self.clock  # checked inside the stage's work too
            rows, _ = problem.best(1, cap=min(b, cap))
            if len(rows):
                b = min(b, float(rows.score[0]))
        if b <= cap:
            self._best_j[j] = b  # exact (inf: the class has no row at all)
        else:
            self._above[j] = cap
        return b if b <= cap else math.inf

    def floor(self) -> float:
        """A proved lower bound of the stage's best score over every class: the least
        over the classes of the exact best where known, of a score the class was
        searched up to without a row, else 0 (nothing known)."""
        return min((self._best_j.get(j, self._above.get(j, 0.0)) for j in self.by_j), default=0.0)

    def best(self, upto: int | None = None) -> dict[int, float]:
        """``{j: best score with exactly j pieces}`` over the reachable classes (those
        with ``j <= upto`` when given), each exact; computed in increasing ``j``."""
        out = {}
        for j in sorted(self.by_j):
            if upto is not None and j > upto:
                break
            b = self.best_of(j)
            if math.isfinite(b):
                out[j] = b
        return out

    def within(self, t: float, upto: int | None = None) -> dict[int, float]:
        """``{j: exact best}`` of the classes (``j <= upto``) whose best is ``<= t``;
        a class above ``t`` is searched only as far as ``t``."""
        out = {}
        for j in sorted(self.by_j):
            if upto is not None and j > upto:
                break
            b = self.best_of(j, cap=t)
            if b <= t:
                out[j] = b
        return out

    def classes(
        self,
        t: float,
        *,
        keep: int | None = None,
        tails: dict | None = None,
        upto: int | None = None,
    ):
        """``[(j, b_j, loader)]`` for the classes (``j <= upto``) with an assignment ``<= t``.

        ``keep``: a loader returns only the best ``keep`` rows of its class within ``t``;
        when it cuts, ``tails[j]`` receives (score, worst tolerance, tolerance sum) of
        the last row kept (every row left out sorts at or after it)."""
        out = []
        for j, b in self.within(t, upto).items():
            out.append((j, b, lambda j=j: self.rows(j, t, keep=keep, tails=tails)))
        return out

    def rows(
        self, j: int, t: float, *, keep: int | None = None, tails: dict | None = None
    ) -> StageRows:
        """Every assignment of class ``j`` with score ``<= t`` (or its best ``keep``),
        indices into the full value arrays (so :meth:`Space.arrangement` reads them)."""
        parts = []
        for problem, back in self.by_j[j]:
            problem.clock = self.clock
            rows = problem.within(t) if keep is None else problem.best(keep, cap=t)[0]
            parts.append(
                StageRows(
                    {n: back[n][i] for n, i in rows.idx.items()},
                    rows.score,
                    rows.pieces,
                    rows.tol_max,
                    rows.tol_sum,
                    rows.units,
                )
            )
        merged = merge(parts)
        merged = merged.take(slice(0, int(np.searchsorted(merged.score, t, side="right"))))
        if keep is not None and len(merged) >= keep:
            merged = merged.take(slice(0, keep))
            if tails is not None:  # the key of the last row kept (see ranking.cut_combine)
                tails[j] = tuple(
                    float(getattr(merged, f)[-1]) for f in ("score", "tol_max", "tol_sum")
                )
        return merged


def _density(problem) -> int:
    return sum(len(a) for a in problem.arrays.values())


def merge(parts: list[StageRows]) -> StageRows:
    """One StageRows from several, sorted by (score, pieces, worst tol, tol sum)."""
    nonempty = [p for p in parts if len(p)] or parts[:1]
    if len(nonempty) == 1:
        return nonempty[0]
    names = list(nonempty[0].idx)
    merged = StageRows(
        {n: np.concatenate([p.idx[n] for p in nonempty]) for n in names},
        *(
            np.concatenate([getattr(p, f) for p in nonempty])
            for f in ("score", "pieces", "tol_max", "tol_sum", "units")
        ),
    )
    order = np.lexsort((merged.tol_sum, merged.tol_max, merged.pieces, merged.score))
    return merged.take(order)


def tradeoff(classes: list[StageClasses], counts, clock=None):
    """([(total pieces, best score)] for every reachable piece count, fewest pieces first,
    [piece counts left out: the joint allocation hit its step limit there, or the clock
    ran out before them]).

    Piece counts are done in increasing order, so when ``clock`` runs out the curve
    holds the fewest-piece counts (every point on it exact); ``clock.stopped`` tells
    the caller."""
    from picker.search.progress import Stopped

    for c in classes:  # the trade-off's own clock (its budget), in the stages' work too
        c.clock = clock
    curve: list[tuple[int, float]] = []
    skipped: list[int] = []
    lowest = [min(c.by_j, default=0) for c in classes]
    highest = sum(max(c.by_j, default=0) for c in classes)
    if any(not c.by_j for c in classes):
        return curve, skipped
    first = sum(lowest)
    for k in range(first, highest + 1):
        try:
            point = _point(classes, counts, k, [m + k - first for m in lowest], clock)
        except Stopped:
            point = "stopped"
        if point == "stopped" or (clock is not None and clock.stopped):
            skipped += [k for k in range(k, highest + 1) if _reachable(classes, k)]
            break
        if point is None:
            continue
        if point == "limit":
            skipped.append(k)
        else:
            curve.append(point)
    return curve, skipped


def _reachable(classes, k: int) -> bool:
    """Some choice of one class per stage (searched or not) has ``k`` pieces in all."""
    sums = {0}
    for c in classes:
        sums = {s + j for s in sums for j in c.by_j}
    return k in sums


def lower_bounds(bests: list[dict[int, float]]) -> dict[int, float]:
    """``LB(k) = min over splits j_1 + ... = k of max_s b_s(j_s)`` (dynamic programming)."""
    lb = {0: 0.0}
    for b in bests:
        nxt: dict[int, float] = {}
        for k, s in lb.items():
            for j, sj in b.items():
                v = max(s, sj)
                if v < nxt.get(k + j, math.inf):
                    nxt[k + j] = v
        lb = nxt
    return lb


def _point(classes, counts, k: int, upto: list[int], clock):
    """(k, exact best score with ``k`` pieces), None when no class choice has ``k``
    pieces, "limit" when the joint allocation hit its step limit. ``upto[s]``: the
    largest class of stage ``s`` that can take part in a total of ``k``."""
    from picker.search.api import grow

    bests = [c.best(up) for c, up in zip(classes, upto, strict=True)]
    if len(classes) == 1:
        return (k, bests[0][k]) if k in bests[0] else None
    lb = lower_bounds(bests)
    if k not in lb:
        return None
    t, keep = lb[k], TRUNCATE
    while True:
        tails: dict = {}
        stage_classes = [
            c.classes(t, keep=keep, tails=tails.setdefault(s, {}), upto=upto[s])
            for s, c in enumerate(classes)
        ]
        # no suffix memo here: with the total fixed it costs more than it saves
        # (measured: 8th order on the sample, 20 s without, 86 s with)
        found, loaded, complete = combine(
            stage_classes,
            counts,
            top=1,
            pieces_total=k,
            memo=False,
            look_ahead=LOOK_AHEAD,
            clock=clock,
        )
        if not complete:
            return "stopped" if clock is not None and clock.stopped else "limit"
        # a class cut to its best `keep` rows is exact when nothing it left out
        # could beat the score found: every left-out row scores >= its tail
        cut = [tails[s][j][0] for (s, j) in loaded if j in tails[s]]
        if not found and cut:
            keep *= 8  # the cut rows may hold the feasible ones
            continue
        if found:
            score = float(found[0][0][0])
            if all(score <= tail for tail in cut):
                return (k, score)
            keep *= 8
            continue
        if math.isinf(t):
            return None
        t = grow(t)
