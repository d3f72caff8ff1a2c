"""Each plan's windows are necessary: an assignment scoring s is found by within(t = s).

Random assignments are drawn from a dense stock; for each one the exact score s is
computed with Topology.characteristics, and the stage's within(s) must contain it
(the boundary case: its score equals the threshold). This checks the window algebra of
picker.search.plans directly, including values at the edges of the windows.
"""

from __future__ import annotations

import numpy as np
import pytest

from picker.filters import REGISTRY
from picker.parts import StageTarget
from picker.search.space import build_space
from picker.search.stage import StageProblem, scores
from stock.eseries import series
from stock.model import Capacitor, Resistor, Stock

# E24 resistors (IEC 60063) 1k..910k, E6 capacitors 100p..6.8u, ample quantities
STOCK = Stock(
    resistors=tuple(
        Resistor(m * 10.0**e, 4, 0.01, index=i)
        for i, (e, m) in enumerate((e, m) for e in range(3, 6) for m in series("E24"))
    ),
    capacitors=tuple(
        Capacitor(m * 10.0**e, 4, 0.05, index=i)
        for i, (e, m) in enumerate((e, m) for e in range(-10, -5) for m in series("E6"))
    ),
)
SPACE = build_space(STOCK, singles=True)


@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_window_keeps_every_assignment_at_its_own_score(key):
    topo = REGISTRY[key]
    rng = np.random.default_rng(7)
    arrays = {p.name: SPACE.values[p.kind] for p in topo.positions}
    target = StageTarget(
        1000.0, 0.7071 if topo.order == 2 else None, 2.0 if topo.sets_gain else None
    )
    found = 0
    for _ in range(200):
        idx = {n: rng.integers(len(a)) for n, a in arrays.items()}
        values = {n: arrays[n].value[i] for n, i in idx.items()}
        s = float(scores(topo, target, values))
        if not np.isfinite(s) or s >= 0.05:  # keep the enumeration small
            continue
        problem = StageProblem(topo, target, SPACE, arrays)
        rows = problem.within(s)
        hit = np.ones(len(rows), bool)
        for n, i in idx.items():
            hit &= rows.idx[n] == i
        assert hit.sum() == 1, (key, values, s)
        found += 1
    # ... and near-optimal assignments: nudge the target onto a random assignment
    for _ in range(60):
        idx = {n: rng.integers(len(a)) for n, a in arrays.items()}
        values = {n: arrays[n].value[i] for n, i in idx.items()}
        f0, q, g = topo.characteristics(values)
        if not (np.isfinite(f0) and (q is None or 0 < q < 20)):
            continue
        nudge = 1.0 + rng.uniform(-5e-4, 5e-4, 3)  # the binding target varies
        tgt = StageTarget(
            float(f0) * nudge[0],
            None if q is None else float(q) * nudge[1],
            float(g) * nudge[2] if topo.sets_gain else None,
        )
        s = float(scores(topo, tgt, values))
        rows = StageProblem(topo, tgt, SPACE, arrays).within(s)
        hit = np.ones(len(rows), bool)
        for n, i in idx.items():
            hit &= rows.idx[n] == i
        assert hit.sum() == 1, (key, values, s)
        found += 1
    assert found >= 10
