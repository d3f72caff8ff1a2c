"""Rank 1 (and the top 3, and the trade-off) against plain exhaustive search.

Hypothesis draws small random stocks (E12/E6 values of IEC 60063, quantities 0..3,
measured pieces, polarized lines); ``brute.py`` enumerates every assignment with
itertools. Equal scores may come from different parts, so scores are compared, not
identities.
"""

from __future__ import annotations

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from picker.filters import get_topology
from picker.parts import StageTarget
from tests.picker.search.helpers import check_against_brute, stocks

SETTINGS = settings(max_examples=50, deadline=None, suppress_health_check=[HealthCheck.too_slow])
F0 = st.floats(200.0, 20e3)


@SETTINGS
@given(stocks(), F0, st.sampled_from((1.0, 2.2, 10.0)), st.booleans())
def test_first_order_inverting(stock, f0, gain, singles):
    stages = [(get_topology("inverting-lowpass"), StageTarget(f0, None, gain))]
    check_against_brute(stock, stages, singles=singles)


@SETTINGS
@given(stocks(), F0, st.booleans())
def test_first_order_follower_polarized(stock, f0, allow):
    stages = [(get_topology("non-inverting-highpass"), StageTarget(f0))]
    check_against_brute(stock, stages, allow_polarized=allow)


@SETTINGS
@given(stocks(r=(3, 4), c=(3, 4)), F0, st.sampled_from((0.5, 0.7071, 1.3)))
def test_sallen_key_lowpass(stock, f0, q):
    check_against_brute(stock, [(get_topology("sallen-key-lowpass"), StageTarget(f0, q))])


@SETTINGS
@given(stocks(r=(3, 4), c=(3, 4)), F0, st.sampled_from((0.5, 0.7071, 1.3)))
def test_sallen_key_highpass(stock, f0, q):
    check_against_brute(stock, [(get_topology("sallen-key-highpass"), StageTarget(f0, q))])


@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    stocks(r=(2, 2), c=(2, 3)),
    F0,
    st.sampled_from((0.7071, 1.3)),
    st.sampled_from((1.5, 2.0)),
    st.sampled_from(("lowpass", "highpass")),
)
def test_sallen_key_gain(stock, f0, q, gain, kind):
    topo = get_topology(f"sallen-key-{kind}-gain")
    check_against_brute(stock, [(topo, StageTarget(f0, q, gain))])


@settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(
    stocks(r=(2, 3), c=(2, 3)),
    F0,
    st.sampled_from((0.5, 0.7071, 2.0)),
    st.sampled_from((1.0, 2.0)),
    st.sampled_from(("lowpass", "highpass", "bandpass")),
)
def test_multiple_feedback(stock, f0, q, gain, kind):
    check_against_brute(stock, [(get_topology(f"mfb-{kind}"), StageTarget(f0, q, gain))])


@SETTINGS
@given(stocks(r=(2, 4), c=(2, 4), qty_max=2), F0, st.floats(1.2, 3.0))
def test_cascade_competes_for_pieces(stock, f0, ratio):
    """Two stages drawing on the same few pieces (quantities 0..2)."""
    topo = get_topology("non-inverting-lowpass")
    stages = [(topo, StageTarget(f0)), (topo, StageTarget(f0 * ratio))]
    check_against_brute(stock, stages)


@settings(max_examples=15, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(stocks(r=(2, 3), c=(2, 3), qty_max=2), F0, st.floats(1.5, 4.0))
def test_cascade_with_gain_stage(stock, f0, gain):
    stages = [
        (get_topology("non-inverting-lowpass-gain"), StageTarget(f0, None, gain)),
        (get_topology("non-inverting-lowpass"), StageTarget(f0 * 1.7)),
    ]
    check_against_brute(stock, stages)
