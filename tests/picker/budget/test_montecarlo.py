"""Monte Carlo yield against an analytic case, the normal draw, and the cascade histogram."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import signal

from picker.budget import budget
from picker.budget.montecarlo import draw
from picker.budget.pieces import stage_pieces
from picker.filters import get_topology, plan_stages
from picker.parts import StageTarget
from tests.picker.budget.helpers import candidate, stage


def product_cdf(z: float, a: float, b: float) -> float:
    """P(X Y <= z) for X, Y independent and uniform on [a, b] (0 < a < b).

    Integrating the joint density 1/(b-a)^2 over {x y <= z} (derived here):
        a^2 <= z <= a b:   F(z) = (z ln(z / a^2) - z + a^2) / (b - a)^2
        a b <= z <= b^2:   F(z) = 1 - (b^2 - z - z ln(b^2 / z)) / (b - a)^2
    """
    if z <= a * a:
        return 0.0
    if z >= b * b:
        return 1.0
    if z <= a * b:
        return (z * math.log(z / a**2) - z + a**2) / (b - a) ** 2
    return 1.0 - (b**2 - z - z * math.log(b**2 / z)) / (b - a) ** 2


def rc_yield(t: float, w: float, offset: float) -> float:
    """Yield of a single RC corner f0 = 1/(2 pi R C), R and C uniform within +/-t.

    With X = R/R0 and Y = C/C0 uniform on [1-t, 1+t], f0 / f0_nominal = 1 / (X Y). The
    target is f0_nominal * offset, so the trial is good when
    |1 / (X Y offset) - 1| <= w, i.e. 1 / (offset (1 + w)) <= X Y <= 1 / (offset (1 - w)).
    """
    a, b = 1 - t, 1 + t
    return product_cdf(1 / (offset * (1 - w)), a, b) - product_cdf(1 / (offset * (1 + w)), a, b)


def test_product_cdf_against_numerical_integration():
    """Cross-check the closed form with scipy.integrate.quad of the same integral."""
    from scipy.integrate import quad

    a, b = 0.9, 1.1
    for z in (0.85, 0.95, 1.0, 1.1, 1.2):
        num, _ = quad(lambda x, z=z: (np.clip(z / x, a, b) - a) / (b - a) ** 2, a, b, limit=200)
        assert product_cdf(z, a, b) == pytest.approx(num, abs=1e-9)


@pytest.mark.parametrize(
    "t, w, offset", [(0.05, 0.05, 1.0), (0.10, 0.05, 1.0), (0.05, 0.03, 1.02), (0.02, 0.01, 1.0)]
)
def test_rc_yield_matches_the_product_of_two_uniforms(t, w, offset):
    choice = stage("non-inverting-lowpass", {"R1": 10e3, "C1": 10e-9}, tol=t)
    f0 = choice.achieved.f0_hz
    choice = type(choice)(
        choice.topology, StageTarget(f0 * offset), choice.achieved, choice.positions
    )
    n = 20000
    b = budget(candidate(choice), trials=n, window={"f0": w}, seed=7)
    p = rc_yield(t, w, offset)
    se = math.sqrt(p * (1 - p) / n)  # binomial standard error
    assert abs(b.monte_carlo.yield_ - p) <= 4 * se + 1e-12
    assert b.candidate_json()["monte_carlo"]["trials"] == n


def test_normal_draw_takes_tolerance_as_three_sigma():
    """Normal table: P(|Z| <= 3) = 0.99730 (standard normal distribution)."""
    choice = stage("non-inverting-lowpass", {"R1": 10e3, "C1": 10e-9}, tol=0.06)
    sp = stage_pieces(choice)
    vals = draw(np.random.default_rng(1), sp, 200_000, "normal")
    rel = vals / sp.nominal - 1
    assert rel.std(axis=0) == pytest.approx([0.02, 0.02], rel=0.01)
    inside = (np.abs(rel) <= 0.06).mean()
    assert inside == pytest.approx(0.99730, abs=0.0008)
    uni = draw(np.random.default_rng(1), sp, 200_000, "uniform") / sp.nominal - 1
    assert np.abs(uni).max() <= 0.06 and uni.std() == pytest.approx(0.06 / math.sqrt(3), rel=0.01)


def test_seeded_and_vectorised_trials_repeat():
    choice = stage(
        "sallen-key-lowpass",
        {"R1": 10e3, "R2": 10e3, "C1": 22e-9, "C2": 10e-9},
        tol=0.05,
        ctol=0.10,
    )
    one = budget(candidate(choice), trials=3000, seed=3).monte_carlo
    two = budget(candidate(choice), trials=3000, seed=3).monte_carlo
    other = budget(candidate(choice), trials=3000, seed=4).monte_carlo
    assert one == two
    assert one.yield_ != other.yield_ or one.histogram != other.histogram
    assert sum(one.histogram.counts) == 3000


def _designed(response_type, response, order, fc, tol=0.01, **kw):
    stages = []
    for topo, tgt in plan_stages(response_type, response=response, order=order, fc_hz=fc, **kw):
        stages.append(stage(topo.key, topo.synthesize(tgt), tol=tol, target=tgt))
    return candidate(*stages)


def _minus3db_hz(b, a, fc, high=False):
    """-3 dB frequency of analog (b, a) by scipy.signal.freqs on a dense grid, relative to
    the passband maximum: the gain at zero (low-pass) or infinite (high-pass) frequency,
    or a ripple peak above it."""
    w = 2 * np.pi * np.geomspace(fc / 3, fc * 3, 200001)
    _, h = signal.freqs(b, a, w)
    db = 20 * np.log10(np.abs(h))
    ref = max(20 * np.log10(abs(b[0] / a[0]) if high else abs(b[-1] / a[-1])), db.max())
    idx = np.nonzero(db >= ref - 10 * np.log10(2))[0]
    return w[idx[0] if high else idx[-1]] / (2 * np.pi)


def test_cascade_histogram_is_the_overall_minus_3db_corner_of_butterworth():
    """8th-order Butterworth low-pass: the cascade is -3 dB at fc (scipy.signal.butter)."""
    fc = 1000.0
    b = budget(_designed("lowpass", "butterworth", 8, fc, family="sallen-key"), trials=4000)
    h = b.monte_carlo.histogram
    ref = _minus3db_hz(*signal.butter(8, 2 * np.pi * fc, analog=True), fc)
    assert ref == pytest.approx(fc, rel=1e-4)
    assert h.nominal == pytest.approx(ref, rel=2e-4)
    assert h.target == pytest.approx(ref, rel=2e-4)
    assert "-3 dB corner" in h.quantity and h.outside == 0
    assert sum(h.counts) == 4000
    assert h.edges[0] < fc < h.edges[-1]


@pytest.mark.parametrize(
    "response_type, order, fc",
    [("highpass", 5, 2000.0), ("lowpass", 4, 700.0), ("lowpass", 6, 1234.0)],
)
def test_cascade_histogram_of_chebyshev_matches_scipy(response_type, order, fc):
    """1 dB Chebyshev: its -3 dB frequency from scipy.signal.cheby1, relative to the
    passband maximum (0 dB; an even order's DC gain is -1 dB)."""
    b = budget(_designed(response_type, "chebyshev", order, fc, ripple_db=1.0), trials=2000)
    high = response_type == "highpass"
    num, den = signal.cheby1(
        order, 1.0, 2 * np.pi * fc, btype="high" if high else "low", analog=True
    )
    ref = _minus3db_hz(num, den, fc, high=high)
    assert b.monte_carlo.histogram.nominal == pytest.approx(ref, rel=2e-5)
    assert abs(b.monte_carlo.histogram.target / ref - 1) < 2e-5


def test_cascade_of_band_pass_stages_is_centred_geometrically():
    """A second-order band-pass is geometrically symmetric about f0 (from memory), so two
    equal stages have sqrt(f_lo f_hi) = f0."""
    topo = get_topology("mfb-bandpass")
    tgt = StageTarget(1500.0, 3.0, 1.0)
    one = stage(topo.key, topo.synthesize(tgt), target=tgt)
    b = budget(candidate(one, one), trials=1000)
    assert b.monte_carlo.histogram.nominal == pytest.approx(1500.0, rel=2e-4)
    assert "centre" in b.monte_carlo.histogram.quantity


def test_cascade_yield_needs_every_stage_inside():
    c = _designed("lowpass", "butterworth", 4, 1000.0, tol=0.03, family="sallen-key")
    mc = budget(c, trials=5000, window=0.03).monte_carlo
    assert 0 < mc.yield_ <= min(mc.stage_yield) <= 1
    assert len(mc.stage_yield) == 2
