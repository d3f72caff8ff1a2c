"""One stage with a purchase, under the ``pieces`` ranking, without a whole search
(docs/buying.md).

For a stage and the goal ``g``, ``m`` is the fewest pieces of an assignment scoring
``<= g`` with the stock as it is, and ``e(j)`` the best such score with exactly ``j``
pieces. Each class ``j`` is the union of the patterns (one piece or a pair in each
position) with ``j`` pieces; each pattern is a :class:`picker.search.stage.StageProblem`,
exact, searched with the cap ``g``.

With lines bought (unit ids ``new``), the assignments that differ are exactly those that
use a new unit in some position; for each position that can hold one, the pattern with
that position limited to values containing a new unit finds them. Only classes
``j <= m`` can give the stage fewer pieces or, at ``m`` pieces, a smaller error, so only
those are searched: :meth:`StageScreen.after` is ``{j: e'(j)}`` for ``j <= m`` (new and
old assignments), exact.

A design of several stages: a combination within the goal takes, in each stage, an
assignment within the goal, so at least ``sum_s m'_s`` pieces, and with exactly that
many every stage sits at its ``m'_s`` and the score is at least ``max_s e'_s(m'_s)``:
:func:`lower_key`. When the stages' bests together fit the quantities on hand
(:func:`attained`), or other assignments of the same piece counts scoring no worse than
that key do (:func:`fit`), they are such a combination, so that key is rank 1's key
after, and the whole search is not needed to know it (one stage: always, its quantities
are its own).
"""

from __future__ import annotations

import math
from collections import Counter

import numpy as np

from picker.search.stage import StageProblem, patterns

ALTERNATIVES = 12  # assignments per pattern that :func:`fit` may combine
FIT_STEPS = 20_000  # combinations :func:`fit` may try before it gives up (no proof then)


class StageScreen:
    """A stage's fewest pieces within the goal, before and with purchases."""

    def __init__(self, topo, target, space, *, singles: bool, goal: float):
        self.topo, self.target, self.singles, self.goal = topo, target, singles, goal
        self.m: int | None = None
        self.e: float = math.inf
        self.row: tuple = ()  # the pieces of that best, as unit keys
        n = len(topo.positions)
        for j in range(n, (n if singles else 2 * n) + 1):
            best = self._class(space, j, None, goal)
            if best is not None:
                self.m, self.e, self.row = j, best[0], best[1]
                break

    def _class(self, space, j: int, new, cap: float) -> tuple[float, tuple] | None:
        """(best score ``<= cap`` with exactly ``j`` pieces, its pieces as unit keys)
        (only assignments using a unit of ``new`` when given), or None."""
        kinds = set() if new is None else {space.units[int(u)].kind for u in new}
        best = None
        for pat in patterns(len(self.topo.positions), self.singles):
            if sum(pat) != j:
                continue
            limits = (
                [None] if new is None else [p.name for p in self.topo.positions if p.kind in kinds]
            )
            for limit in limits:
                arrays = {}
                for p, k in zip(self.topo.positions, pat, strict=False):
                    v = space.with_pieces(p.kind, k)[0]
                    if p.name == limit:
                        v = v.subset(np.isin(v.unit_a, new) | np.isin(v.unit_b, new))
                    arrays[p.name] = v
                problem = StageProblem(self.topo, self.target, space, arrays)
                if problem.empty():
                    continue
                rows, _ = problem.best(1, cap=cap if best is None else min(cap, best[0]))
                if len(rows):
                    taken = tuple(unit_key(space, int(u)) for u in rows.units[0] if u >= 0)
                    best = (float(rows.score[0]), taken)
        return best

    def after(self, space, new) -> tuple[int, float, tuple] | None:
        """(fewest pieces within the goal, best score with that many, the pieces of that
        best as unit keys) with the new units; None when the stage cannot reach the
        goal before (then nothing is screened)."""
        if self.m is None:
            return None
        ids = np.asarray(sorted(new), dtype=np.int64)
        n = len(self.topo.positions)
        for j in range(n, self.m):
            best = self._class(space, j, ids, self.goal)
            if best is not None:
                return j, best[0], best[1]
        best = self._class(space, self.m, ids, min(self.goal, self.e))
        if best is None or best[0] >= self.e:
            return self.m, self.e, self.row
        return self.m, best[0], best[1]

    def options(self, space, j: int, cap: float, keep: int = ALTERNATIVES) -> list[tuple]:
        """Up to ``keep`` best assignments per pattern with exactly ``j`` pieces and score
        ``<= cap`` over ``space`` (purchases included), as (score, unit keys)."""
        out = []
        for pat in patterns(len(self.topo.positions), self.singles):
            if sum(pat) != j:
                continue
            arrays = {}
            for p, k in zip(self.topo.positions, pat, strict=False):
                arrays[p.name] = space.with_pieces(p.kind, k)[0]
            problem = StageProblem(self.topo, self.target, space, arrays)
            if problem.empty():
                continue
            rows, _ = problem.best(keep, cap=cap)
            for i in range(min(keep, len(rows))):
                keys = tuple(unit_key(space, int(u)) for u in rows.units[i] if u >= 0)
                out.append((float(rows.score[i]), keys))
        return sorted(out)


def fit(choices: list[list[tuple]], space) -> tuple | None:
    """One assignment per stage (from ``choices``) that together fit the quantities on
    hand, as the unit keys they take; None when none is found within ``FIT_STEPS``."""
    have = {unit_key(space, i): int(c) for i, c in enumerate(space.counts)}
    use: Counter = Counter()
    steps = 0

    def visit(s: int) -> tuple | None:
        nonlocal steps
        if s == len(choices):
            return ()
        for _, keys in choices[s]:
            steps += 1
            if steps > FIT_STEPS:
                return None
            need = Counter(keys)
            if all(use[k] + n <= have.get(k, 0) for k, n in need.items()):
                use.update(need)
                rest = visit(s + 1)
                use.subtract(need)
                if rest is not None:
                    return keys + rest
        return None

    return visit(0)


def unit_key(space, uid: int) -> tuple:
    """A unit by its stock line and reading, the same in every space of the stock."""
    u = space.units[uid]
    return (u.kind, u.line.index, u.measured)


def lower_key(results) -> tuple | None:
    """The ``pieces`` key no combination beats, from each stage's ``after``; None when a
    stage could not be screened."""
    if any(r is None for r in results):
        return None
    return (0.0, float(sum(r[0] for r in results)), max(r[1] for r in results))


def attained(results, space) -> bool:
    """Whether the stages' own bests, taken together, fit the quantities on hand: then
    they are one combination whose key is :func:`lower_key`, i.e. rank 1's key."""
    if any(r is None for r in results):
        return False
    use = Counter(k for r in results for k in r[2])
    have = {unit_key(space, i): int(c) for i, c in enumerate(space.counts)}
    return all(n <= have.get(k, 0) for k, n in use.items())
