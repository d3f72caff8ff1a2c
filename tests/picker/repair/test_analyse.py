"""``picker.repair.analyse`` against closed forms and scipy.signal (each source named)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import signal

from picker.errors import DesignError
from picker.filters import plan_stages
from picker.repair.analyse import analyse_marked
from picker.repair.marked import MarkedPart, MarkedStage, parse_stage

TWO_PI = 2.0 * math.pi


def _stage(key, values, tol=None):
    texts = [f"{k}={v!r}" + ("" if tol is None else f"/{tol}") for k, v in values.items()]
    return parse_stage(key, texts)


def _h(num, den, f):
    """scipy.signal.freqs of a transfer function in s (rad/s)."""
    return signal.freqs(num, den, worN=TWO_PI * np.asarray(f))[1]


def test_sallen_key_lowpass_closed_form_and_scipy():
    r1, r2, c1, c2 = 10e3, 10e3, 22e-9, 10e-9
    a = analyse_marked([_stage("sallen-key-lowpass", {"R1": r1, "R2": r2, "C1": c1, "C2": c2})])
    s = a.stages[0]
    # handbook formula of the unity-gain Sallen-Key low-pass:
    # f0 = 1 / (2 pi sqrt(R1 R2 C1 C2)), Q = sqrt(R1 R2 C1 C2) / (C2 (R1 + R2))
    root = math.sqrt(r1 * r2 * c1 * c2)
    assert s.f0_hz == pytest.approx(1.0 / (TWO_PI * root), rel=1e-12)
    assert s.f0_hz == pytest.approx(1073.02, abs=0.01)  # the same formula, by hand
    assert s.q == pytest.approx(root / (c2 * (r1 + r2)), rel=1e-12)
    assert s.gain == pytest.approx(1.0)
    # H(s) = 1 / (s^2 R1 R2 C1 C2 + s C2 (R1 + R2) + 1), evaluated by scipy.signal.freqs
    ref = _h([1.0], [r1 * r2 * c1 * c2, c2 * (r1 + r2), 1.0], a.response.freqs_hz)
    np.testing.assert_allclose(a.response.h, ref, rtol=1e-9)


def test_mfb_bandpass_edges_match_f0_over_q():
    v = {"R1": 15e3, "R2": 680.0, "R3": 150e3, "C1": 10e-9, "C2": 10e-9}
    a = analyse_marked([_stage("mfb-bandpass", v)])
    s = a.stages[0]
    r1, r2, r3, c1, c2 = v.values()
    # the multiple-feedback band-pass transfer function (handbook formula):
    # H(s) = -(s / (R1 C1)) / (s^2 + s (C1 + C2) / (R3 C1 C2) + (1/R1 + 1/R2) / (R3 C1 C2))
    den = [1.0, (c1 + c2) / (r3 * c1 * c2), (1 / r1 + 1 / r2) / (r3 * c1 * c2)]
    ref = _h([-1.0 / (r1 * c1), 0.0], den, a.response.freqs_hz)  # scipy.signal.freqs
    np.testing.assert_allclose(a.response.h, ref, rtol=1e-9)
    w0 = math.sqrt(den[2])
    assert s.f0_hz == pytest.approx(w0 / TWO_PI, rel=1e-12)
    assert s.q == pytest.approx(w0 / den[1], rel=1e-12)
    assert s.gain == pytest.approx(r3 * c2 / (r1 * (c1 + c2)), rel=1e-12)
    # a second-order band-pass section: half-power bandwidth f0 / Q and f_lo f_hi = f0^2
    # (handbook formulas, exact for the second-order section)
    lo, hi = a.response.band_hz
    assert hi - lo == pytest.approx(s.f0_hz / s.q, rel=1e-7)
    assert lo * hi == pytest.approx(s.f0_hz**2, rel=1e-7)
    assert a.response.reference_db == pytest.approx(20 * math.log10(s.gain), abs=1e-7)


def test_butterworth_cascade_against_scipy_butter():
    fc = 1000.0
    stages = []
    for topo, target in plan_stages("lowpass", response="butterworth", order=3, fc_hz=fc):
        values = topo.synthesize(target)
        parts = tuple(
            MarkedPart(p.name, p.kind, values[p.name], 0.01, False) for p in topo.positions
        )
        stages.append(MarkedStage(topo.key, parts))
    a = analyse_marked(stages)
    # scipy.signal.butter(3, wc, analog=True): the Butterworth low-pass of -3 dB at wc
    num, den = signal.butter(3, TWO_PI * fc, analog=True)
    np.testing.assert_allclose(a.response.h, _h(num, den, a.response.freqs_hz), rtol=1e-6)
    assert a.response.corner_hz == pytest.approx(fc, rel=1e-6)
    assert a.response.band_hz is None


def test_sallen_key_highpass_butterworth_corner():
    # C1 = C2 = C and R2 = 2 R1 give Q = sqrt(R2/R1)/2 = 1/sqrt(2) (handbook formula of the
    # unity-gain Sallen-Key high-pass, Q = sqrt(R1 R2 C1 C2) / (R1 (C1 + C2))), so the
    # -3 dB point is f0 = 1 / (2 pi C sqrt(R1 R2)) (Butterworth, handbook)
    v = {"R1": 10e3, "R2": 20e3, "C1": 10e-9, "C2": 10e-9}
    a = analyse_marked([_stage("sallen-key-highpass", v)])
    f0 = 1.0 / (TWO_PI * 10e-9 * math.sqrt(10e3 * 20e3))
    assert a.stages[0].q == pytest.approx(1 / math.sqrt(2), rel=1e-12)
    assert a.response.corner_hz == pytest.approx(f0, rel=1e-6)


def test_tolerance_extremes_of_a_first_order_stage():
    # inverting low-pass: f0 = 1 / (2 pi R2 C1), gain R2 / R1 (handbook formulas), each
    # monotone in every part, so the extremes sit at the corners of the tolerance box
    st = parse_stage("inverting-lowpass", ["R1=10k/1%", "R2=100k/1%", "C1=1n/2%"])
    s = analyse_marked([st]).stages[0]
    f0 = 1.0 / (TWO_PI * 100e3 * 1e-9)
    assert s.f0_hz == pytest.approx(f0, rel=1e-12)
    assert s.corners.f0 == pytest.approx((f0 / (1.01 * 1.02), f0 / (0.99 * 0.98)), rel=1e-12)
    assert s.corners.gain == pytest.approx((10 * 0.99 / 1.01, 10 * 1.01 / 0.99), rel=1e-12)
    assert s.corners.exhaustive and s.assumed == ()
    # relative sensitivity of f0 to R2 and C1 is -1, to R1 it is 0 (from f0 = 1/(2 pi R2 C1))
    sens = {name: f for name, f, _, _ in s.corners.sensitivities}
    assert sens == pytest.approx({"R1": 0.0, "R2": -1.0, "C1": -1.0}, abs=1e-6)


def test_assumed_tolerances_are_listed():
    st = parse_stage("non-inverting-lowpass", ["R1=10k", "C1=15n/1%"])
    s = analyse_marked([st]).stages[0]
    assert s.assumed == ("R1",)
    f0 = 1.0 / (TWO_PI * 10e3 * 15e-9)  # f0 = 1 / (2 pi R C), handbook
    # R1 at the stock file's default 5 %, C1 at 1 %
    assert s.corners.f0 == pytest.approx((f0 / (1.05 * 1.01), f0 / (0.95 * 0.99)), rel=1e-12)


def test_gbw_shift_moves_a_high_gain_stage_down():
    # inverting low-pass with gain 100 and a slow op amp: the closed loop bandwidth of an
    # inverting amplifier is GBW / (1 + |G|) (common practice), here 99 kHz, close
    # enough to the 10 kHz corner to pull it down and lower the gain; the stage must say so
    st = parse_stage("inverting-lowpass", ["R1=1k", "R2=100k", "C1=159p"])
    s = analyse_marked([st], gbw_hz=10e6).stages[0]
    assert s.opamp is not None
    assert s.opamp.shift[0] < -0.001 and s.opamp.shift[2] < 0
    # the rule's noise gain is the circuit's at f0: |1 + Zf / R1| with Zf = R2 || C1 and
    # w R2 C1 = 1 there, so |1 + (R2 / R1) / (1 + j)| = |1 + 100 / (1 + j)| (hand calculation)
    ng = abs(1 + 100 / (1 + 1j))
    assert s.opamp.gbw_needed_hz == pytest.approx(100 * ng * s.f0_hz, rel=1e-9)
    ideal = analyse_marked([st]).stages[0]
    assert ideal.opamp is None and s.f0_hz == ideal.f0_hz


def test_unstable_stage_refuses_gbw():
    # Sallen-Key low-pass gain network K = 1 + RB/RA = 4 with equal parts: Q = 1/(3 - K)
    # goes negative above K = 3 (handbook formula)
    st = parse_stage(
        "sallen-key-lowpass-gain",
        ["R1=10k", "R2=10k", "C1=10n", "C2=10n", "RA=10k", "RB=30k"],
    )
    with pytest.raises(DesignError, match="not stable"):
        analyse_marked([st], gbw_hz=1e6)
