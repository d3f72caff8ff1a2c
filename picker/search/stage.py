"""One stage: every assignment scoring ``<= t``, exactly, with the stage's own quantities.

``StageProblem.within(t)`` returns every assignment of the stage's positions (over the
value arrays given) whose score is ``<= t`` and that takes no unit more often than it
has pieces. Proof sketch: a plan's windows are necessary conditions (see
:mod:`picker.search.plans`), so the join keeps every assignment of each group that
could score ``<= t``; a group's ``determines`` errors are part of the stage score, so
dropping group rows whose partial error exceeds ``t`` drops nothing that passes; the
cross product of the surviving group rows is then scored exactly with
``Topology.characteristics`` and filtered by ``score <= t``. ``t = inf`` (or ``t >=
plans.WIDE``) uses no windows, i.e. the plain enumeration.

``StageProblem.best(need)`` finds the smallest ``t`` that holds ``need`` assignments:
a cheap probe (the join with zero-width windows plus each window's nearest neighbours)
gives real assignments whose ``need``-th score is an upper bound, and ``within`` at
that bound is exact; if the probe finds too few, ``t`` grows until enough are found or
the space is exhausted.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from picker.search import join
from picker.search.plans import WIDE, plan_for, windows
from picker.search.progress import Clock

PROBE_KEEP = 64  # rows per group kept by the probe of a multi-group plan
PROBE_ROWS = 1024  # rows per block kept by the probe of a one-group plan
PROBE_OUTER = 32  # outer values the probe of a one-group plan tries
PRUNE_ROWS = 1 << 16  # rows held by a branch-and-bound search before those above t go


@dataclass(frozen=True)
class StageRows:
    """Assignments of one stage, best first. ``units``: rows x (2 * positions) unit ids."""

    idx: dict[str, np.ndarray]
    score: np.ndarray
    pieces: np.ndarray
    tol_max: np.ndarray
    tol_sum: np.ndarray
    units: np.ndarray

    def __len__(self) -> int:
        return int(self.score.size)

    def take(self, sel) -> StageRows:
        return StageRows(
            {p: i[sel] for p, i in self.idx.items()},
            self.score[sel],
            self.pieces[sel],
            self.tol_max[sel],
            self.tol_sum[sel],
            self.units[sel],
        )


def scores(topology, target, values: dict, only=("f0", "q", "gain")) -> np.ndarray:
    """Worst relative error over the targets in ``only`` (docs/search.md); nan -> inf."""
    f0, q, gain = topology.characteristics(values)
    errs = []
    with np.errstate(divide="ignore", invalid="ignore"):
        if "f0" in only:
            errs.append(np.abs(np.asarray(f0, float) / target.f0_hz - 1.0))
        if "q" in only and target.q is not None and q is not None:
            errs.append(np.abs(np.asarray(q, float) / target.q - 1.0))
        if "gain" in only and target.gain is not None and topology.sets_gain:
            errs.append(np.abs(np.asarray(gain, float) / target.gain - 1.0))
    out = np.maximum.reduce(np.broadcast_arrays(*errs)) if len(errs) > 1 else errs[0]
    return np.where(np.isnan(out), np.inf, out)


class StageProblem:
    """Search of one stage over given value arrays (one per position)."""

    def __init__(self, topology, target, space, arrays: dict, label: str = "stage"):
        self.topology, self.target, self.space = topology, target, space
        self.arrays = arrays
        self.names = topology.position_names()
        self.plan = plan_for(topology)
        self.label = label
        self.limits = {k: space.extent(k) or (1.0, 1.0) for k in ("resistor", "capacitor")}
        self._cache: tuple[float, StageRows] | None = None
        self.clock: Clock | None = None  # checked between blocks (progress.py)
        self._trimmed = False  # the last best() left out ties (see _keep)

    def empty(self) -> bool:
        return any(len(self.arrays[n]) == 0 for n in self.names)

    # ------------------------------------------------------------------ exact list
    def within(self, t: float) -> StageRows:
        if self._cache is not None and t <= self._cache[0]:
            rows = self._cache[1]
            return rows.take(slice(0, int(np.searchsorted(rows.score, t, side="right"))))
        rows = self._rows(t, probe=False)
        self._cache = (t, rows)
        return rows

    def best(self, need: int = 1, *, cap: float = math.inf) -> tuple[StageRows, float]:
        """At least ``need`` best assignments (fewer only if the space has fewer), and the
        threshold ``t`` they were searched at: every assignment below ``t`` is among them,
        and every one at ``t`` too unless more than ``need`` tie there, when the best
        ``need`` by the whole order (score, pieces, tolerances, values) are kept; so
        thousands of look-alike rows (one value in many drawers) are never all held.

        ``cap``: only assignments scoring ``<= cap`` are wanted (a caller that already
        holds a better one elsewhere); fewer than ``need``, even none, may come back."""
        if self.empty():
            return self._rows(math.inf, probe=False), math.inf
        if self._cache is not None and len(self._cache[1]) >= need:
            rows = self._cache[1]
            t = min(float(rows.score[need - 1]), cap)
            return self.within(t), t
        if self._cache is not None and self._cache[0] >= cap:
            return self.within(cap), cap  # every row <= cap is already known
        if math.isfinite(cap) and cap < WIDE:
            t = cap  # the caller's bound is a real assignment's score: no probe needed
        else:
            probe = self._rows(0.0, probe=True)
            t = float(probe.score[min(need, len(probe)) - 1]) if len(probe) else 1e-4
            t = min(t, cap)
        while True:
            self._trimmed = False
            rows, t_end = self._rows(t, probe=False, shrink=need), t
            if len(rows) >= need:
                t_end = float(rows.score[need - 1])
                rows = rows.take(slice(0, int(np.searchsorted(rows.score, t_end, "right"))))
            if len(rows) >= need or math.isinf(t) or t >= cap:
                known, t_known = rows, t_end
                if self._trimmed:  # ties at t_end past the best `need` were left out
                    t_known = float(np.nextafter(t_end, -np.inf))
                    known = rows.take(slice(0, int(np.searchsorted(rows.score, t_end, "left"))))
                if self._cache is None or t_known > self._cache[0]:
                    self._cache = (t_known, known)
                return rows, t_end
            t = min(cap, math.inf if t >= WIDE else max(4.0 * t, 1e-9))

    # ------------------------------------------------------------------ machinery
    def _ctx(self, t: float, probe: bool):
        return windows(self.target, 0.0 if probe else t, self.limits) if probe or t < WIDE else None

    def _rows(self, t: float, *, probe: bool, shrink: int | None = None) -> StageRows:
        """Rows with score <= t (probe: rows near the zero-width windows, any score).

        ``shrink``: lower ``t`` to the ``shrink``-th best score found so far after each
        block of outer values (branch and bound); rows above the final ``t`` may remain.
        """
        if self.empty():
            return self._finish({n: np.zeros(0, np.int64) for n in self.names}, t, probe)
        groups = self.plan.groups
        if len(groups) == 1:
            state: dict[str, Any] = {"t": t, "best": np.zeros(0)}
            outer = None
            if probe:
                n = len(self.arrays[groups[0].steps[0].position])
                outer = np.arange(0, n, max(1, n // PROBE_OUTER), dtype=np.int64)
            kept: list[tuple] = []
            for rows in join.group_rows(
                groups[0],
                self.arrays,
                lambda: self._ctx(state["t"], probe),
                neighbors=probe,
                outer=outer,
                tick=self._tick,
            ):
                self._tick()
                self._keep(self._filter(rows, state["t"], probe), kept, state, shrink)
            if not kept:
                return self._finish({n: np.zeros(0, np.int64) for n in self.names}, t, probe)
            merged = {n: np.concatenate([k[0][n] for k in kept]) for n in self.names}
            return self._finish(merged, t, probe, np.concatenate([k[1] for k in kept]))
        if self.plan.link is not None and len(groups) == 2 and (probe or t < WIDE):
            return self._linked(t, probe, shrink)
        parts = []
        ctx = self._ctx(t, probe)
        for group in groups:
            self._tick()
            rows = join.collect(
                join.group_rows(group, self.arrays, ctx, neighbors=probe, tick=self._tick),
                f"{self.label} ({self.topology.key})",
            )
            if not rows:
                return self._finish({n: np.zeros(0, np.int64) for n in self.names}, t, probe)
            part = scores(self.topology, self.target, self._values(rows), group.determines)
            order = np.argsort(part, kind="stable")
            order = order[:PROBE_KEEP] if probe else order[part[order] <= t]
            parts.append({p: i[order] for p, i in rows.items()})
        kept = [
            k for k in (self._filter(rows, t, probe) for rows in _cross(parts)) if k is not None
        ]
        if not kept:
            return self._finish({n: np.zeros(0, np.int64) for n in self.names}, t, probe)
        merged = {n: np.concatenate([k[0][n] for k in kept]) for n in self.names}
        return self._finish(merged, t, probe, np.concatenate([k[1] for k in kept]))

    def _linked(self, t: float, probe: bool, shrink: int | None) -> StageRows:
        """Rows of a two-group plan joined through its :class:`Link` (branch and bound
        as in the one-group case): the second group's rows sorted by the link key, and
        for each block of the first group's rows the key intervals they can pair with,
        found by ``np.searchsorted`` (widened by ``join.EPS``; the probe also takes the
        nearest key outside). Every pair that can score ``<= t`` is formed: the
        intervals are necessary conditions and the exact score decides."""
        first, second = self.plan.groups
        link = self.plan.link
        assert link is not None
        none = {n: np.zeros(0, np.int64) for n in self.names}
        label = f"{self.label} ({self.topology.key})"
        rows2 = join.collect(
            join.group_rows(
                second, self.arrays, self._ctx(t, probe), neighbors=probe, tick=self._tick
            ),
            label,
        )
        if not rows2:
            return self._finish(none, t, probe)
        if not probe:
            part = scores(self.topology, self.target, self._values(rows2), second.determines)
            rows2 = {p: i[part <= t] for p, i in rows2.items()}
        key = np.asarray(link.key(self._values(rows2)), float)
        order = np.argsort(key, kind="stable")
        key, rows2 = key[order], {p: i[order] for p, i in rows2.items()}
        state: dict[str, Any] = {"t": t, "best": np.zeros(0)}
        outer = None
        if probe:
            n = len(self.arrays[first.steps[0].position])
            outer = np.arange(0, n, max(1, n // PROBE_OUTER), dtype=np.int64)
        kept: list[tuple] = []
        for rows1 in join.group_rows(
            first,
            self.arrays,
            lambda: self._ctx(state["t"], probe),
            neighbors=probe,
            outer=outer,
            tick=self._tick,
        ):
            self._tick()
            v1 = self._values(rows1)
            if not probe:
                part = scores(self.topology, self.target, v1, first.determines)
                sel = part <= state["t"]
                rows1 = {p: i[sel] for p, i in rows1.items()}
                v1 = {p: x[sel] for p, x in v1.items()}
            ctx = self._ctx(state["t"], probe)
            (w_lo, w_hi), *_ = link.window(v1, ctx)
            if not probe:
                w_lo, w_hi = np.maximum(w_lo, ctx.d_lo), np.minimum(w_hi, ctx.d_hi)
            lo = np.searchsorted(key, w_lo - np.abs(w_lo) * join.EPS, side="left")
            hi = np.searchsorted(key, w_hi + np.abs(w_hi) * join.EPS, side="right")
            if probe:
                lo, hi = np.maximum(lo - 1, 0), np.minimum(np.maximum(hi, lo) + 1, key.size)
            counts = np.maximum(hi - lo, 0)
            for parent, pick in join.pairs_in_blocks(lo, counts):
                rows = {p: i[parent] for p, i in rows1.items()}
                rows |= {p: i[pick] for p, i in rows2.items()}
                self._keep(self._filter(rows, state["t"], probe), kept, state, shrink)
        if not kept:
            return self._finish(none, t, probe)
        merged = {n: np.concatenate([k[0][n] for k in kept]) for n in self.names}
        return self._finish(merged, t, probe, np.concatenate([k[1] for k in kept]))

    def _keep(self, k, kept: list, state: dict, shrink: int | None) -> None:
        """Keep filtered rows ``k`` (if any); with ``shrink``, lower the threshold
        ``state["t"]`` to the ``shrink``-th best score kept so far (branch and bound).

        Past ``PRUNE_ROWS`` held, rows above the threshold go, and of more than
        ``shrink`` ties only the best ``shrink`` by the whole order stay (why this is
        exact: docs/search.md, "Cost"; ``best`` marks its cache short of the tie)."""
        if k is None:
            return
        kept.append(k)
        if shrink:
            state["best"] = np.sort(np.concatenate([state["best"], k[1]]))[:shrink]
            if state["best"].size >= shrink:
                state["t"] = min(state["t"], float(state["best"][-1]))
            held = sum(s.size for _, s in kept)
            if held > max(PRUNE_ROWS, 2 * shrink):  # memory follows shrink, not the rows
                t = state["t"]
                kept[:] = [
                    ({n: i[s <= t] for n, i in rows.items()}, s[s <= t])
                    for rows, s in kept
                    if s.size and s.min() <= t
                ]
                held = sum(s.size for _, s in kept)
                if held > 2 * shrink:
                    rows = {n: np.concatenate([r[n] for r, _ in kept]) for n in self.names}
                    score = np.concatenate([s for _, s in kept])
                    best = self._order(rows, score)[:shrink]
                    kept[:] = [({n: i[best] for n, i in rows.items()}, score[best])]
                    self._trimmed = True

    def _tick(self) -> None:
        """Between blocks of work: let the search's clock stop it (see progress.py)."""
        if self.clock is not None:
            self.clock.check()

    def _filter(self, rows, t, probe):
        s = scores(self.topology, self.target, self._values(rows))
        # the probe only needs its best few
        keep = np.argsort(s, kind="stable")[:PROBE_ROWS] if probe else np.flatnonzero(s <= t)
        keep = keep[self._feasible({n: rows[n][keep] for n in self.names})]
        if not keep.size:
            return None
        return {n: rows[n][keep] for n in self.names}, s[keep]

    def _values(self, rows) -> dict:
        n = next(iter(rows.values())).size
        return {p: (self.arrays[p].value[rows[p]] if p in rows else np.ones(n)) for p in self.names}

    def _units(self, rows) -> np.ndarray:
        cols = []
        for p in self.names:
            arr = self.arrays[p]
            cols += [arr.unit_a[rows[p]], arr.unit_b[rows[p]]]
        return np.stack(cols, axis=1)

    def _feasible(self, rows) -> np.ndarray:
        """No unit taken more often than its count within the row (vectorised)."""
        units = np.sort(self._units(rows), axis=1)
        ok = np.ones(units.shape[0], bool)
        counts = self.space.counts
        for j in range(units.shape[1]):
            col = units[:, j]
            occurs = (units == col[:, None]).sum(axis=1)
            ok &= (col < 0) | (occurs <= counts[np.maximum(col, 0)])
        return ok

    def _tols(self, rows):
        """(pieces, worst tolerance, tolerance sum) of each row."""
        pieces = sum(self.arrays[p].pieces[rows[p]] for p in self.names)
        tol_max = np.maximum.reduce([self.arrays[p].tol_max_at(rows[p]) for p in self.names])
        tol_sum = sum(self.arrays[p].tol_sum_at(rows[p]) for p in self.names)
        return pieces, tol_max, tol_sum

    def _order(self, rows, s, tols=None) -> np.ndarray:
        """Rows best first: by score, pieces, worst tolerance, tolerance sum, then the
        value indices (last position first), so ties always go the same way."""
        if not s.size:
            return np.zeros(0, np.int64)
        pieces, tol_max, tol_sum = self._tols(rows) if tols is None else tols
        keys = [rows[p] for p in reversed(self.names)] + [tol_sum, tol_max, pieces, s]
        return np.lexsort(keys)

    def _finish(self, rows, t, probe, s=None) -> StageRows:
        if s is None:
            n = rows[self.names[0]].size
            s = scores(self.topology, self.target, self._values(rows)) if n else np.zeros(0)
            keep = np.ones(s.size, bool) if probe else s <= t
            if n:
                keep &= self._feasible(rows)
            rows = {p: rows[p][keep] for p in self.names}
            s = s[keep]
        pieces, tol_max, tol_sum = self._tols(rows)
        order = self._order(rows, s, (pieces, tol_max, tol_sum))
        out = StageRows(
            rows,
            s,
            np.asarray(pieces, np.int64),
            np.asarray(tol_max, float),
            np.asarray(tol_sum, float),
            self._units(rows) if s.size else np.zeros((0, 2 * len(self.names)), np.int64),
        )
        return out.take(order)


def to_canonical(space, topo, rows: StageRows) -> StageRows:
    """``rows`` found over ``space.values`` (the merged arrays) with their indices made
    canonical, the ones :meth:`picker.search.space.Space.arrangement` reads."""
    idx = {p.name: space.canonical(p.kind)[rows.idx[p.name]] for p in topo.positions}
    return StageRows(idx, rows.score, rows.pieces, rows.tol_max, rows.tol_sum, rows.units)


def _cross(parts: list[dict], block: int = join.BLOCK):
    """Blocks of the cross product of group rows (position -> index arrays)."""
    sizes = [next(iter(p.values())).size for p in parts]
    rest = math.prod(sizes[1:])
    step = max(1, block // max(rest, 1))
    for start in range(0, sizes[0], step):
        first = {p: i[start : start + step] for p, i in parts[0].items()}
        local = [first] + parts[1:]
        grids = np.meshgrid(*[np.arange(next(iter(p.values())).size) for p in local], indexing="ij")
        out = {}
        for part, grid in zip(local, grids, strict=False):
            flat = grid.ravel()
            for p, idx in part.items():
                out[p] = idx[flat]
        yield out


def patterns(n_positions: int, singles: bool):
    """Piece counts per position: every mix of singles (1) and pairs (2)."""
    if singles:
        return [(1,) * n_positions]
    return list(itertools.product((1, 2), repeat=n_positions))
