"""Properties: every Monte Carlo trial lies inside the tolerance ranges (uniform draws stay
inside the tolerance box, and the ranges are the extremes over that box)."""

from __future__ import annotations

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

from picker.budget.montecarlo import draw
from picker.budget.pieces import evaluate, stage_pieces
from picker.budget.tolerance import tolerance
from picker.filters import get_topology
from tests.picker.budget.helpers import stage

KEYS = [
    "sallen-key-lowpass",
    "sallen-key-highpass-gain",
    "mfb-lowpass",
    "mfb-bandpass",
    "sallen-key-lowpass-gain",
]
decade = st.floats(min_value=1.0, max_value=10.0)


@settings(max_examples=60, deadline=None)
@given(
    key=st.sampled_from(KEYS),
    mantissas=st.lists(decade, min_size=6, max_size=6),
    tol=st.sampled_from([0.01, 0.02, 0.05, 0.10]),
    ctol=st.sampled_from([0.01, 0.05, 0.2]),
    seed=st.integers(0, 2**16),
)
def test_trials_stay_inside_the_tolerance_ranges(key, mantissas, tol, ctol, seed):
    topo = get_topology(key)
    values = {}
    for spec, m in zip(topo.positions, mantissas, strict=False):
        values[spec.name] = m * (1e4 if spec.kind == "resistor" else 1e-8)
    if "RB" in values:  # keep a gain stage stable: K = 1 + RB/RA <= 1.5
        values["RB"] = values["RA"] * 0.5 * mantissas[-1] / 10.0
    choice = stage(key, values, tol=tol, ctol=ctol)
    sp = stage_pieces(choice)
    res = tolerance(topo, sp, sets_gain=True)
    f0, q, gain = evaluate(
        topo, sp.positions(draw(np.random.default_rng(seed), sp, 4000, "uniform"))
    )
    eps = 1e-9
    assert res.f0[0] * (1 - eps) <= f0.min() and f0.max() <= res.f0[1] * (1 + eps)
    assert res.gain[0] * (1 - eps) <= gain.min() and gain.max() <= res.gain[1] * (1 + eps)
    if res.q[0] > 0:  # a stable box: the Q range holds every trial
        assert res.q[0] * (1 - eps) <= q.min() and q.max() <= res.q[1] * (1 + eps)
