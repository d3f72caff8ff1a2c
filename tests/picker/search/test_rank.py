"""The ``pieces`` ranking and the time limit against plain exhaustive search.

``pieces`` (docs/search.md): the candidates within the precision goal first, fewest
pieces first, then smaller worst error; if none is within it, the ``error`` order.
Hypothesis draws small random stocks (IEC 60063 E12/E6 values, quantities 0..3) and
goals from 0.2 % to 10 %, so that some examples reach the goal and some miss it;
``brute.py`` enumerates every assignment. A stopped search must report ``proven``
False and a bound that the enumeration confirms is a lower bound.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from picker.errors import NoDesignError
from picker.filters import get_topology
from picker.parts import StageTarget
from picker.search import search
from tests.picker.search.brute import brute
from tests.picker.search.helpers import BOUNDS, check_against_brute, check_candidate, stocks

SETTINGS = settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])
F0 = st.floats(200.0, 20e3)
GOALS = st.sampled_from((0.002, 0.01, 0.03, 0.1))


@SETTINGS
@given(stocks(), F0, st.sampled_from((1.0, 2.2, 10.0)), st.booleans(), GOALS)
def test_pieces_first_order(stock, f0, gain, singles, goal):
    stages = [(get_topology("inverting-lowpass"), StageTarget(f0, None, gain))]
    check_against_brute(stock, stages, singles=singles, rank="pieces", max_error=goal)


@SETTINGS
@given(stocks(r=(3, 4), c=(3, 4)), F0, st.sampled_from((0.5, 0.7071, 1.3)), GOALS)
def test_pieces_sallen_key(stock, f0, q, goal):
    stages = [(get_topology("sallen-key-lowpass"), StageTarget(f0, q))]
    check_against_brute(stock, stages, rank="pieces", max_error=goal)


@settings(max_examples=20, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(stocks(r=(2, 3), c=(2, 3)), F0, st.sampled_from((0.7071, 2.0)), GOALS)
def test_pieces_multiple_feedback(stock, f0, q, goal):
    stages = [(get_topology("mfb-bandpass"), StageTarget(f0, q, 1.0))]
    check_against_brute(stock, stages, rank="pieces", max_error=goal)


@SETTINGS
@given(stocks(r=(2, 4), c=(2, 4), qty_max=2), F0, st.floats(1.2, 3.0), GOALS)
def test_pieces_cascade_competes_for_pieces(stock, f0, ratio, goal):
    """Two stages drawing on the same few pieces (quantities 0..2)."""
    topo = get_topology("non-inverting-lowpass")
    stages = [(topo, StageTarget(f0)), (topo, StageTarget(f0 * ratio))]
    check_against_brute(stock, stages, rank="pieces", max_error=goal)


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(stocks(r=(2, 3), c=(2, 3), qty_max=2), F0, st.floats(1.5, 4.0), GOALS)
def test_pieces_cascade_with_gain_stage(stock, f0, gain, goal):
    stages = [
        (get_topology("non-inverting-lowpass-gain"), StageTarget(f0, None, gain)),
        (get_topology("non-inverting-lowpass"), StageTarget(f0 * 1.7)),
    ]
    check_against_brute(stock, stages, rank="pieces", max_error=goal)


def _cascade(f0, ratio):
    topo = get_topology("non-inverting-lowpass")
    return [(topo, StageTarget(f0)), (topo, StageTarget(f0 * ratio))]


@SETTINGS
@given(stocks(r=(2, 4), c=(2, 4), qty_max=2), F0, st.floats(1.2, 3.0), GOALS)
def test_pieces_stopped_at_once_bounds_the_pieces(stock, f0, ratio, goal):
    """A limit of 0 s stops before any proof: proven False, and no candidate within the
    goal (by enumeration) uses fewer pieces than the bound."""
    stages = _cascade(f0, ratio)
    bs, bp, _, _ = brute(stock, stages, BOUNDS)
    try:
        got = search(stock, stages, rank="pieces", max_error=goal, time_limit=0.0, top=2)
    except NoDesignError:
        assert bs.size == 0
        return
    assert bs.size > 0
    assert not got.proven and got.bound_of == "pieces"
    within = bp[bs <= goal]
    if within.size:
        assert within.min() >= got.bound
    assert any("stopped after" in n for n in got.notes)
    for cand in got.candidates:  # what it returns is real: feasible and scored right
        check_candidate(cand, stock, stages)


@SETTINGS
@given(
    stocks(r=(2, 4), c=(2, 4), qty_max=2),
    F0,
    st.floats(1.2, 3.0),
    st.sampled_from(("error", "pieces")),
    st.integers(1, 40),
)
def test_a_stop_request_keeps_a_true_bound(stock, f0, ratio, rank, after):
    """Stopped after ``after`` looks at the clock (a count, not a time): either proven
    and equal to the enumeration's rank 1, or not proven with a true lower bound."""
    stages = _cascade(f0, ratio)
    bs, bp, _, _ = brute(stock, stages, BOUNDS)
    looks = [0]

    def stop() -> bool:
        looks[0] += 1
        return looks[0] > after

    try:
        got = search(stock, stages, rank=rank, should_stop=stop, top=1, tradeoff=False)
    except NoDesignError:
        assert bs.size == 0
        return
    first = got.candidates[0]
    check_candidate(first, stock, stages)
    goal = got.max_error
    if got.proven:
        assert got.bound is None
        if rank == "error" or not (bs <= goal).any():
            assert first.score == pytest.approx(bs.min(), rel=1e-9, abs=1e-15)
        else:
            assert first.pieces == bp[bs <= goal].min()
        return
    assert got.bound is not None
    if got.bound_of == "error":
        assert bs.min() >= got.bound * (1 - 1e-9)
    else:
        within = bp[bs <= goal]
        assert within.size == 0 or within.min() >= got.bound


def test_pieces_prefers_fewer_pieces_within_the_goal():
    """Hand-made stock for a follower low-pass at 1 kHz with 10n (f0 = 1/(2 pi R C),
    from memory): 16k alone gives 994.7 Hz (-0.53 %), 15k + 910 give 15.91k and
    1000.3 Hz (+0.03 %). Goal 1 %: the single (2 pieces); goal 0.1 %: the pair (3)."""
    from stock.model import Capacitor, Resistor, Stock

    stock = Stock(
        resistors=(
            Resistor(value=16e3, qty=2, tolerance=0.01, index=0, line=1),
            Resistor(value=15e3, qty=2, tolerance=0.01, index=1, line=2),
            Resistor(value=910.0, qty=2, tolerance=0.01, index=2, line=3),
        ),
        capacitors=(Capacitor(value=10e-9, qty=2, tolerance=0.05, index=0, line=4),),
    )
    stages = [(get_topology("non-inverting-lowpass"), StageTarget(1000.0))]
    loose = search(stock, stages, rank="pieces", max_error=0.01, top=1)
    assert loose.goal_met and loose.candidates[0].pieces == 2
    assert loose.candidates[0].score == pytest.approx(0.0053, abs=1e-4)
    tight = search(stock, stages, rank="pieces", max_error=0.001, top=1)
    assert tight.goal_met and tight.candidates[0].pieces == 3
    assert tight.candidates[0].score == pytest.approx(0.00034, abs=1e-4)
    exact = search(stock, stages, rank="error", top=1)
    assert exact.candidates[0].score <= tight.candidates[0].score
    missed = search(stock, stages, rank="pieces", max_error=1e-9, top=1)
    assert not missed.goal_met
    assert missed.candidates[0].score == pytest.approx(exact.candidates[0].score)
    assert any("precision goal" in n for n in missed.notes)
    assert np.isfinite(missed.candidates[0].score)
