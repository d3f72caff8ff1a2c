"""The trials of :mod:`picker.search.buying`: real searches with purchases added, and
the bounds that spare them (docs/buying.md)."""

from __future__ import annotations

import contextlib
import dataclasses
import math
from collections import Counter

from picker.search.buyvalues import Source, rank_key, synthesized
from picker.search.space import build_space
from picker.search.yieldrank import _has_rank


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


MIN_TRIAL_S = 0.05  # no trial's search is given less (it returns its best so far)


class Trial:
    """Real searches with purchases added, counted."""

    def __init__(self, stock, stages, rank, max_error, opts, time_limit):
        self.stock, self.stages, self.rank, self.max_error = stock, stages, rank, max_error
        self.opts, self.time_limit, self.count = opts, time_limit, 0
        self.alone0: list = []
        self.screens: list | None = None
        self.known: dict = {}  # purchases -> after, proven by the stage bounds
        self.screened: dict = {}  # purchases -> stage bounds not attained at once
        self.skipped = 0  # purchases a stage search proved unable to help
        # the suggestion run's shared clock (seconds left, or None): a trial's search gets
        # at most that; one it cut short before its search was proven is dropped and
        # counted in ``cut``, so every "after" shown is what picker design gives
        self.left = None
        self.cut = 0
        self._capped = False
        self._proven = True

    def rank1(self, stock, stages=None, rank=None, **over):
        from picker.search.yieldrank import reference

        self.count += 1
        kw = dict(self.opts, top=1, tradeoff=False, for_people=True, max_error=self.max_error)
        limit, self._capped = self.time_limit, False
        if self.left is not None:
            remaining = max(MIN_TRIAL_S, self.left())
            if limit is None or remaining < limit:
                limit, self._capped = remaining, True
        if limit is not None:
            kw["time_limit"] = limit
        kw.update(over)
        found = reference(stock, stages or self.stages, rank or self.rank, **kw)
        self._proven = bool(getattr(found, "proven", True))
        return found.candidates[0]

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
            self.prove(purchases, lines, key, [k for r in results for k in r[2]])
        elif key is not None:
            self.screened[purchases] = (results, space, lines, key)
        return key

    def prove(self, purchases, lines, key, taken) -> None:
        """Record rank 1 after as ``key``, attained by a combination taking ``taken``."""
        count = Counter(taken)
        used = [count[(ln.kind, ln.index, None)] for ln in lines]
        if all(used):
            bought = tuple(
                dataclasses.replace(p, qty=u) for p, u in zip(purchases, used, strict=True)
            )
            self.known[purchases] = (key, (bought, (int(key[1]), float(key[2]))))

    def fit_other(self, purchases) -> None:
        """The stages' bests clashed: look for other assignments of the same piece counts
        scoring no worse than the bound that fit together (:func:`buystage.fit`)."""
        from picker.search.buystage import fit

        results, space, lines, key = self.screened.pop(purchases)
        screens = self.screens or []
        choices = [sc.options(space, r[0], key[2]) for sc, r in zip(screens, results, strict=True)]
        taken = fit(choices, space)
        if taken is not None:
            self.prove(purchases, lines, key, list(taken))

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

        if purchases in self.screened:
            self.fit_other(purchases)
        if purchases in self.known:
            return self.known[purchases]
        copy, lines = with_purchases(self.stock, purchases)
        try:
            cand = self.rank1(copy)
        except NoDesignError:
            if self._capped:  # "nothing within the time limit" may be the shared clock's
                self.cut += 1
            return None
        if self._capped and not self._proven:  # the shared clock cut this one short
            self.cut += 1
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
            for i, ps in enumerate(purchases):
                if left is not None and left() <= 0:
                    break  # each bound builds a space: on a large stock they cost seconds
                bounds[i] = self.lower(ps, cand0)
            low = (-math.inf,)
            ranked = sorted(range(len(purchases)), key=lambda i: (bounds.get(i) or low, i))
            purchases = [purchases[i] for i in ranked]
            bounds = {k: bounds[i] for k, i in enumerate(ranked) if i in bounds}
        cut0 = self.cut
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
        return found, self.cut == cut0
