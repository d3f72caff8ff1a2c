"""Plain exhaustive search, written independently of picker.search, for cross-checks.

Every position takes every single piece and every pair (series, parallel) straight from
the stock lines; ``itertools.product`` enumerates every assignment of every stage;
quantities are counted per supply unit (a line's nominal pieces, each measured piece);
the score is the worst relative error (docs/search.md) from ``Topology.characteristics``.
"""

from __future__ import annotations

import itertools

import numpy as np

from picker.parts import combine


def units_of(stock, allow_polarized=False):
    out = []  # (kind, value, tolerance, count, key)
    for kind, lines in (("resistor", stock.resistors), ("capacitor", stock.capacitors)):
        for n, line in enumerate(lines):
            if line.qty == 0 or (kind == "capacitor" and line.polarized and not allow_polarized):
                continue
            if line.qty - len(line.measured):
                out.append(
                    (
                        kind,
                        line.value,
                        line.tolerance,
                        line.qty - len(line.measured),
                        (kind, n, None),
                    )
                )
            for i, m in enumerate(line.measured):
                out.append((kind, m, line.meter, 1, (kind, n, i)))
    return out


def options(units, kind, bounds, singles=False):
    """[(value, pieces, tol_max, tol_sum, {unit: uses})] for one position of ``kind``."""
    mine = [i for i, u in enumerate(units) if u[0] == kind]
    opts = [(units[i][1], 1, units[i][2], units[i][2], {i: 1}) for i in mine]
    if not singles:
        for a, b in itertools.combinations_with_replacement(mine, 2):
            if a == b and units[a][3] < 2:
                continue
            for arr in ("series", "parallel"):
                v = combine(kind, arr, [units[a][1], units[b][1]])
                use = {a: 2} if a == b else {a: 1, b: 1}
                ta, tb = units[a][2], units[b][2]
                opts.append((v, 2, max(ta, tb), ta + tb, use))
    lo, hi = bounds.of(kind)
    return [o for o in opts if lo <= o[0] <= hi]


def stage_score(topology, target, values):
    f0, q, g = topology.characteristics(values)
    errs = [np.abs(np.asarray(f0) / target.f0_hz - 1)]
    if target.q is not None:
        errs.append(np.abs(np.asarray(q) / target.q - 1))
    if target.gain is not None and topology.sets_gain:
        errs.append(np.abs(np.asarray(g) / target.gain - 1))
    s = np.max(np.broadcast_arrays(*errs), axis=0)
    return np.where(np.isnan(s), np.inf, s)


def brute(stock, stages, bounds, *, singles=False, allow_polarized=False):
    """All feasible assignments: arrays (score, pieces, tol_max, tol_sum), unsorted."""
    units = units_of(stock, allow_polarized)
    counts = np.array([u[3] for u in units])
    slots = []  # (stage index, position name, option list)
    for s, (topo, _) in enumerate(stages):
        for p in topo.positions:
            slots.append((s, p.name, options(units, p.kind, bounds, singles)))
    if any(not o for _, _, o in slots):
        return (np.zeros(0),) * 4
    idx = np.array(list(itertools.product(*[range(len(o)) for _, _, o in slots])))
    use = np.zeros((idx.shape[0], len(units)), dtype=int)
    pieces = np.zeros(idx.shape[0], int)
    tmax = np.zeros(idx.shape[0])
    tsum = np.zeros(idx.shape[0])
    stage_scores = []
    values = [dict() for _ in stages]
    for col, (s, name, opts) in enumerate(slots):
        table_use = np.zeros((len(opts), len(units)), dtype=int)
        for k, o in enumerate(opts):
            for u, m in o[4].items():
                table_use[k, u] = m
        pick = idx[:, col]
        use += table_use[pick]
        pieces += np.array([o[1] for o in opts])[pick]
        tmax = np.maximum(tmax, np.array([o[2] for o in opts])[pick])
        tsum += np.array([o[3] for o in opts])[pick]
        values[s][name] = np.array([o[0] for o in opts], dtype=float)[pick]
    for s, (topo, target) in enumerate(stages):
        stage_scores.append(stage_score(topo, target, values[s]))
    score = np.max(np.stack(stage_scores), axis=0)
    ok = (use <= counts).all(axis=1)
    return score[ok], pieces[ok], tmax[ok], tsum[ok]


def brute_tradeoff(score, pieces):
    return sorted((int(k), float(score[pieces == k].min())) for k in np.unique(pieces))
