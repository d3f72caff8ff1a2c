"""The lazy class search (docs/search.md, "Cost") against plain exhaustive search.

Stage classes are searched only when asked for, fewest pieces first, and each only up
to a cap; the ``pieces`` ranking never searches a class it does not need, and a search
under a stop request takes its classes fewest pieces first. Hypothesis draws small
random stocks (IEC 60063 E12/E6 values); ``brute.py`` enumerates every assignment.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from picker.errors import NoDesignError
from picker.filters import get_topology
from picker.parts import StageTarget
from picker.search import search
from picker.search.api import build_candidate
from picker.search.progress import Clock
from picker.search.ranking import ranked
from picker.search.space import build_space
from picker.search.tradeoff import StageClasses
from tests.picker.search.brute import brute
from tests.picker.search.helpers import BOUNDS, check_candidate, stocks

SETTINGS = settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
F0 = st.floats(200.0, 20e3)
CAPS = st.sampled_from((1e-4, 0.003, 0.03, 0.3, math.inf))


@SETTINGS
@given(stocks(r=(3, 4), c=(3, 4)), F0, st.sampled_from((0.5, 0.7071, 1.3)), CAPS)
def test_class_best_up_to_a_cap(stock, f0, q, cap):
    """``best_of(j, cap)``: the enumeration's best with ``j`` pieces when it is at most
    ``cap``, else inf; the floor is never above the enumeration's best."""
    topo = get_topology("sallen-key-lowpass")
    stages = [(topo, StageTarget(f0, q))]
    bs, bp, _, _ = brute(stock, stages, BOUNDS)
    space = build_space(stock, bounds=BOUNDS)
    classes = StageClasses(topo, StageTarget(f0, q), space)
    for j in sorted(classes.by_j):
        got = classes.best_of(j, cap=cap)
        exact = bs[bp == j].min() if (bp == j).any() else math.inf
        if exact <= cap:
            assert got == pytest.approx(exact, rel=1e-9, abs=1e-15)
        else:
            assert math.isinf(got)
    if bs.size:
        assert classes.floor() <= bs.min() * (1 + 1e-9)
    assert set(classes.best()) == {int(k) for k in np.unique(bp)}


def test_pieces_met_by_singles_searches_no_pair_class():
    """A goal the single pieces meet: rank 1 has one piece per position, and no class
    with a pair was searched (the pair spaces are never touched)."""
    from stock.model import Capacitor, Resistor, Stock

    # f0 = 1/(2 pi sqrt(R1 R2 C1 C2)) (from memory): 10k, 10k, 22n, 10n give 1.07 kHz
    stock = Stock(
        resistors=tuple(
            Resistor(value=v, qty=4, tolerance=0.01, line=i + 1, index=i)
            for i, v in enumerate((10e3, 12e3, 15e3, 22e3, 33e3))
        ),
        capacitors=tuple(
            Capacitor(value=v, qty=4, tolerance=0.05, line=100 + i, index=i)
            for i, v in enumerate((4.7e-9, 10e-9, 22e-9, 47e-9))
        ),
    )
    topo = get_topology("sallen-key-lowpass")
    target = StageTarget(1000.0, 0.7071)
    space = build_space(stock, bounds=BOUNDS)
    classes = [StageClasses(topo, target, space)]
    out = ranked(
        classes,
        space.counts,
        rank="pieces",
        max_error=0.2,
        top=1,
        clock=Clock(),
        build=lambda key, rows, loaded: build_candidate(
            [(topo, target)], loaded, space, rows, key, None, ()
        ),
    )
    assert out.proven and out.candidates
    assert out.candidates[0].pieces == 4
    searched = set(classes[0]._best_j) | set(classes[0]._above)
    assert searched == {4}
    bs, bp, _, _ = brute(stock, [(topo, target)], BOUNDS)
    assert bp[bs <= 0.2].min() == 4  # the enumeration agrees: 4 single pieces reach it


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(stocks(r=(3, 4), c=(3, 4)), F0, st.sampled_from((0.7071, 1.3)), st.integers(1, 60))
def test_one_stage_error_under_a_stop_request(stock, f0, q, after):
    """One stage, ``--rank error``, stopped after ``after`` looks at the clock (a count,
    not a time): proven and equal to the enumeration's best, or not proven with a
    bound the enumeration confirms is a lower bound."""
    stages = [(get_topology("sallen-key-lowpass"), StageTarget(f0, q))]
    bs, _, _, _ = brute(stock, stages, BOUNDS)
    looks = [0]

    def stop() -> bool:
        looks[0] += 1
        return looks[0] > after

    try:
        got = search(
            stock, stages, rank="error", should_stop=stop, top=1, tradeoff=False, bounds=BOUNDS
        )
    except NoDesignError:
        assert bs.size == 0
        return
    first = got.candidates[0]
    check_candidate(first, stock, stages)
    if got.proven:
        assert first.score == pytest.approx(bs.min(), rel=1e-9, abs=1e-15)
    else:
        assert got.bound is not None and got.bound_of == "error"
        assert bs.min() >= got.bound * (1 - 1e-9)


@settings(max_examples=20, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(stocks(r=(2, 4), c=(2, 4), qty_max=2), F0, st.integers(1, 200))
def test_tradeoff_stopped_keeps_the_fewest_piece_counts(stock, f0, after):
    """A trade-off stopped by its clock: each point shown is exact, and the points are
    the fewest piece counts (no count skipped before one shown)."""
    from picker.search.tradeoff import tradeoff
    from tests.picker.search.brute import brute_tradeoff

    topo = get_topology("non-inverting-lowpass")
    stages = [(topo, StageTarget(f0)), (topo, StageTarget(f0 * 2.0))]
    bs, bp, _, _ = brute(stock, stages, BOUNDS)
    if not bs.size:
        return
    exact = dict(brute_tradeoff(bs, bp))
    looks = [0]

    def stop() -> bool:
        looks[0] += 1
        return looks[0] > after

    space = build_space(stock, bounds=BOUNDS)
    classes = [StageClasses(t, g, space) for t, g in stages]
    curve, skipped = tradeoff(classes, space.counts, Clock(should_stop=stop))
    for k, score in curve:
        assert score == pytest.approx(exact[k], rel=1e-9, abs=1e-15)
    if skipped and curve:
        assert max(k for k, _ in curve) < min(skipped)
