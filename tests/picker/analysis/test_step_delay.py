"""Step response and group delay views against scipy.signal: ``step`` of the same
transfer function, and the phase of ``freqs`` differentiated; Bessel's DC delay from
scipy.signal.bessel(norm="delay")."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pytest
from scipy import signal

from picker.analysis.step_delay import SETTLE_BAND, candidate_views, delay_view, step_view
from picker.errors import DesignError
from picker.filters import plan_stages
from picker.parts import StageTarget


@dataclass(frozen=True)
class Stage:
    topology: str
    achieved: StageTarget
    vals: dict

    def values(self):
        return dict(self.vals)


@dataclass(frozen=True)
class Design:
    stages: tuple
    opamp: object = None


def design(kind, response, order, fc=1000.0, ripple=1.0, gain=1.0, family=None):
    """Ideal values from each topology's synthesis; ``achieved`` from its analysis."""
    stages = []
    for topo, target in plan_stages(
        kind, response=response, order=order, fc_hz=fc, ripple_db=ripple, gain=gain, family=family
    ):
        vals = topo.synthesize(target)
        f0, q, g = topo.characteristics(vals)
        stages.append(Stage(topo.key, StageTarget(float(f0), q and float(q), float(g)), vals))
    return Design(tuple(stages))


def transfer_function(d, kind):
    """(b, a) of the cascade from each stage's achieved f0, Q and gain (standard first-
    and second-order sections; the sign of an inverting stage kept)."""
    from picker.filters import get_topology

    b, a = np.array([1.0]), np.array([1.0])
    for st in d.stages:
        topo = get_topology(st.topology)
        w0, q = 2 * math.pi * st.achieved.f0_hz, st.achieved.q
        g = st.achieved.gain * (-1 if topo.inverting else 1)
        if q is None:
            num = [g * w0] if kind == "lowpass" else [g, 0.0]
            den = [1.0, w0]
        else:
            num = {"lowpass": [g * w0 * w0], "highpass": [g, 0.0, 0.0]}[kind]
            den = [1.0, w0 / q, w0 * w0]
        b, a = np.polymul(b, num), np.polymul(a, den)
    return b, a


CASES = [
    ("lowpass", "butterworth", 4, 1.0),
    ("lowpass", "chebyshev", 5, 1.0),
    ("lowpass", "chebyshev", 4, 3.0),
    ("lowpass", "bessel", 6, 1.0),
    ("highpass", "butterworth", 3, 1.0),
    ("highpass", "chebyshev", 4, 0.5),
]


@pytest.mark.parametrize("kind, response, order, ripple", CASES)
def test_step_against_scipy_step(kind, response, order, ripple):
    d = design(kind, response, order, ripple=ripple)
    view = step_view(d)
    b, a = transfer_function(d, kind)
    t = np.asarray(view.t_s)
    # scipy.signal.step of the same transfer function on the same time grid
    _, y_ref = signal.step((b, a), T=t)
    peak = np.max(np.abs(y_ref))
    assert np.max(np.abs(np.asarray(view.y)[2:] - y_ref[2:])) < 3e-3 * peak
    if kind == "lowpass":
        final = y_ref[-1]
        over_ref = (np.max(y_ref / final) - 1) * 100
    else:
        final = 0.0
        jump = b[0] / a[0]  # the high-frequency gain of the transfer function
        over_ref = np.max(-y_ref / jump) * 100
    assert view.final == pytest.approx(final, abs=2e-3 * peak)
    assert view.overshoot_pct == pytest.approx(over_ref, abs=0.2)
    ref = final if kind == "lowpass" else jump
    outside = np.nonzero(np.abs(y_ref - final) > SETTLE_BAND * abs(ref))[0]
    settle_ref = t[outside[-1] + 1]
    assert view.settling_s == pytest.approx(settle_ref, rel=0.02)


def test_overshoot_tells_the_responses_apart():
    # common practice: a Bessel step barely overshoots (under 1 %), a Butterworth 4th
    # order about 11 %, a 1 dB Chebyshev 4th order more than that
    shoot = {
        r: step_view(design("lowpass", r, 4)).overshoot_pct
        for r in ("bessel", "butterworth", "chebyshev")
    }
    assert shoot["bessel"] < 1.0 < shoot["butterworth"] < shoot["chebyshev"]
    assert shoot["butterworth"] == pytest.approx(10.8, abs=0.5)  # from memory


@pytest.mark.parametrize("kind, response, order, ripple", CASES)
def test_group_delay_against_scipy_phase(kind, response, order, ripple):
    d = design(kind, response, order, ripple=ripple)
    view = delay_view(d)
    b, a = transfer_function(d, kind)
    f = np.asarray(view.f_hz)
    # phase of scipy.signal.freqs, unwrapped and differentiated on a fine grid around each f
    for fi, tau in zip(f[::37], np.asarray(view.delay_s)[::37], strict=True):
        w = 2 * math.pi * fi * np.array([1 - 1e-5, 1 + 1e-5])
        _, h = signal.freqs(b, a, worN=w)
        ph = np.unwrap(np.angle(h))
        ref = -(ph[1] - ph[0]) / (w[1] - w[0])
        assert tau == pytest.approx(ref, rel=1e-4, abs=1e-12 / fi)
    # the phase in degrees against the same scipy response at the reported points
    for fi, _mag, ph_deg, _tau in view.points:
        _, h = signal.freqs(b, a, worN=[2 * math.pi * fi])
        diff = (ph_deg - math.degrees(np.angle(h[0])) + 180) % 360 - 180
        assert abs(diff) < 1e-6


def test_bessel_delay_is_flat_and_matches_scipy_bessel_delay_norm():
    d = design("lowpass", "bessel", 4)
    view = delay_view(d)
    # scipy.signal.bessel(4, 1, norm="delay") has unit group delay at DC; our corner sits
    # where its response is -3 dB, so the DC delay is 1 / (2 pi fc_delay) with fc_delay the
    # frequency of the delay-normalised filter that ends at the same -3 dB point
    b, a = signal.bessel(4, 1.0, analog=True, norm="delay")
    w = np.geomspace(0.1, 10, 20001)
    _, h = signal.freqs(b, a, worN=w)
    w3 = w[np.argmin(np.abs(20 * np.log10(np.abs(h)) + 10 * math.log10(2)))]
    assert view.dc_s == pytest.approx(w3 / (2 * math.pi * view.reference_hz), rel=2e-3)
    # flat: the peak is the DC delay (within 0.5 %), unlike a Butterworth's
    assert view.peak_s <= view.dc_s * 1.005
    bw = delay_view(design("lowpass", "butterworth", 4))
    assert bw.peak_s > 1.3 * bw.dc_s  # Butterworth 4th order: peak delay well above DC


def test_candidate_views_picks_what_is_asked():
    d = design("lowpass", "butterworth", 2)
    v = candidate_views(d, ("delay",))
    assert v.step is None and v.delay is not None
    assert set(v.as_json()) == {"response_type", "delay"}
    with pytest.raises(DesignError, match="unknown view"):
        candidate_views(d, ("noise",))
