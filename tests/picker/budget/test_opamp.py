"""Op-amp effects: finite GBW through nodal analysis, slew-rate limit, input impedance."""

from __future__ import annotations

import math

import numpy as np
import pytest

from picker.budget import budget
from picker.budget.opamp import effective, input_impedance
from picker.filters import REGISTRY, get_topology
from picker.parts import StageTarget
from tests.picker.budget.helpers import candidate, opamp, stage


def _target(topo):
    q = None if topo.order == 1 else (3.0 if topo.response_type == "bandpass" else 0.9)
    return StageTarget(1000.0, q, 2.0 if topo.sets_gain else None)


@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_ideal_op_amp_recovers_the_analytic_characteristics(key):
    """Nodal analysis with the ideal op amp (nullor) against each topology's own formula."""
    topo = get_topology(key)
    values = topo.synthesize(_target(topo))
    f0, q, gain = topo.characteristics(values)
    got = effective(topo, values, float(f0), None)
    assert got[0] == pytest.approx(float(f0), rel=1e-8)
    assert got[2] == pytest.approx(abs(float(gain)), rel=1e-8)
    if q is None:
        assert got[1] is None
    else:
        assert got[1] == pytest.approx(float(q), rel=1e-8)


@pytest.mark.parametrize(
    "key",
    [
        "sallen-key-lowpass",
        "mfb-lowpass",
        "sallen-key-highpass-gain",
        "mfb-bandpass",
        "inverting-lowpass",
    ],
)
def test_huge_gbw_gives_no_shift(key):
    """The ideal op amp is the limit of the single-pole model as GBW grows; only the model's
    finite DC gain A0 = 2e5 (picker.analysis) remains: about noise gain / A0, below 1e-4
    even for the band-pass, whose noise gain at f0 is about 2 Q^2 = 18 (from memory)."""
    topo = get_topology(key)
    choice = stage(key, topo.synthesize(_target(topo)))
    o = budget(candidate(choice, opamp=opamp(gbw=1e13)), trials=10).stages[0].opamp
    assert all(abs(s) < 1e-4 for s in o.shift if s is not None)


def test_shift_falls_as_one_over_gbw_and_sallen_key_q_rises():
    """First-order effect of a single pole: the error scales with f0/GBW (from memory); the
    unity Sallen-Key's Q rises with a slower op amp (known Q enhancement, from memory)."""
    topo = get_topology("sallen-key-lowpass")
    choice = stage(topo.key, topo.synthesize(StageTarget(10e3, 2.0)))
    shifts = [
        budget(candidate(choice, opamp=opamp(gbw=g)), trials=10).stages[0].opamp.shift
        for g in (1e6, 1e7)
    ]  # well above the A0 floor of ~1e-5
    assert shifts[0][1] > 0 and shifts[1][1] > 0
    assert shifts[0][1] / shifts[1][1] == pytest.approx(10.0, rel=0.1)
    assert abs(shifts[0][0]) / abs(shifts[1][0]) == pytest.approx(10.0, rel=0.1)


A0 = 2e5  # the single-pole model's DC gain in picker.analysis


def test_follower_keeps_the_rc_pole_and_loses_gain_as_the_closed_form_says():
    """RC into a follower: the follower does not load the RC, so its pole stays put; the
    follower's own gain is A/(1 + A) with A = A0/(1 + s/wp), A0 wp = 2 pi GBW, i.e.
    A0 / (1 + A0 + j f / fp) (derived here from the model)."""
    topo = get_topology("non-inverting-lowpass")
    choice = stage(topo.key, {"R1": 10e3, "C1": 1e-9})
    f0 = choice.achieved.f0_hz
    gbw = 1e6
    o = budget(candidate(choice, opamp=opamp(gbw=gbw)), trials=10).stages[0].opamp
    fp = gbw / A0
    assert o.shift[0] == pytest.approx(0.0, abs=1e-9)
    assert o.real[2] == pytest.approx(abs(A0 / (1 + A0 + 1j * f0 / fp)), rel=1e-9)


def test_sallen_key_poles_against_a_hand_derived_cubic():
    """Unity Sallen-Key low-pass with out = beta * V(b), beta = A/(1 + A),
    A = A0/(1 + s/wp). Node equations give the denominator (derived here)
        P(s) = (1 + A0 + s/wp)(1 + s (R1 + R2) C2 + s^2 R1 R2 C1 C2) + s R1 C1 (1 + s/wp);
    its two roots nearest w0 are the stage's poles with the real op amp."""
    r1, r2, c1, c2 = 10e3, 10e3, 22e-9, 10e-9
    topo = get_topology("sallen-key-lowpass")
    choice = stage(topo.key, {"R1": r1, "R2": r2, "C1": c1, "C2": c2})
    gbw = 200e3
    wp = 2 * np.pi * gbw / A0
    o = budget(candidate(choice, opamp=opamp(gbw=gbw)), trials=10).stages[0].opamp
    quad = np.poly1d([r1 * r2 * c1 * c2, (r1 + r2) * c2, 1.0])
    p = np.poly1d([1 / wp, 1 + A0]) * quad + np.poly1d([r1 * c1 / wp, r1 * c1, 0.0])
    roots = sorted(p.roots, key=abs)[:2]
    w0 = math.sqrt((roots[0] * roots[1]).real)
    q = w0 / -(roots[0] + roots[1]).real
    assert o.real[0] == pytest.approx(w0 / (2 * math.pi), rel=1e-9)
    assert o.real[1] == pytest.approx(q, rel=1e-9)
    assert o.shift[1] > 0.002  # a slow op amp raises this stage's Q


def test_slow_op_amp_warns_with_the_rule():
    topo = get_topology("sallen-key-lowpass")
    choice = stage(topo.key, topo.synthesize(StageTarget(1000.0, 0.7071)))
    slow = budget(candidate(choice, opamp=opamp(gbw=10e3)), trials=10)
    # a unity follower's noise gain is 1 (common practice): the rule asks 100 x 1 x f0
    assert slow.stages[0].opamp.noise_gain == pytest.approx(1.0, rel=1e-9)
    assert slow.stages[0].opamp.gbw_needed_hz == pytest.approx(100 * 1000.0, rel=1e-9)
    assert any("op amp too slow" in w for w in slow.warnings)
    fast = budget(candidate(choice, opamp=opamp(gbw=3e6)), trials=10)
    assert not any("too slow" in w for w in fast.warnings)


@pytest.mark.parametrize(
    "key, f0, warns",
    [
        ("sallen-key-lowpass", 10e3, True),  # f_p = 7.96 kHz below f0
        ("sallen-key-lowpass", 1e3, False),
        ("sallen-key-highpass", 1e3, True),  # a high-pass needs about 10 x f0
        ("sallen-key-highpass", 500.0, False),
    ],
)
def test_slew_rate_limit(key, f0, warns):
    """Full-power bandwidth f_p = SR / (2 pi V_p): 0.5 V/us at 10 V peak is 7.96 kHz."""
    topo = get_topology(key)
    choice = stage(key, topo.synthesize(StageTarget(f0, 0.7071)))
    b = budget(candidate(choice, opamp=opamp(gbw=100e6, slew=0.5e6)), trials=10, vout_peak=10.0)
    assert b.stages[0].opamp.full_power_hz == pytest.approx(0.5e6 / (2 * math.pi * 10.0))
    assert any("slew-rate limit" in w for w in b.warnings) is warns


def test_no_op_amp_or_no_peak_says_what_was_not_checked():
    topo = get_topology("sallen-key-lowpass")
    choice = stage(topo.key, topo.synthesize(StageTarget(1000.0, 0.7071)))
    b = budget(candidate(choice), trials=10)
    assert b.stages[0].opamp is None and b.stage_json(0)["opamp"]["model"] == "ideal"
    assert any("No op amp chosen" in w for w in b.warnings)
    b = budget(candidate(choice, opamp=opamp()), trials=10)
    assert any("slew-rate limit is not checked" in w for w in b.warnings)


def test_input_impedance_of_inverting_and_rc_input():
    """Inverting stage: the input sees R1 into a virtual ground, Z_in = R1 at every
    frequency. RC low-pass into a follower: Z_in = R1 + 1/(j w C1), lowest at the top of
    the grid, 100 f0, where |Z_in| = R1 sqrt(1 + 1e-4) (circuit theory, from memory)."""
    inv = get_topology("inverting-lowpass")
    values = {"R1": 4.7e3, "R2": 10e3, "C1": 10e-9}
    z, _ = input_impedance(inv, values, float(inv.characteristics(values)[0]))
    assert z == pytest.approx(4.7e3, rel=1e-6)
    rc = get_topology("non-inverting-lowpass")
    values = {"R1": 10e3, "C1": 10e-9}
    f0 = float(rc.characteristics(values)[0])
    z, at = input_impedance(rc, values, f0)
    assert at == pytest.approx(100 * f0)
    assert z == pytest.approx(10e3 * math.sqrt(1 + 1e-4), rel=1e-6)


# The stage of the reliability report: stage 3 (Q 1.932) of a 6th-order Butterworth MFB
# low-pass at 5 kHz, gain 2, as the search built it from the sample bench: R1 = R2 = 47k,
# R3 = 4k3 || 4k7, C1 = 100p || 220p, C2 = 15n || 15n; op amp of 3 MHz GBW.
MFB3 = {"R1": 47e3, "R2": 47e3, "R3": 4.3e3 * 4.7e3 / 9e3, "C1": 320e-12, "C2": 30e-9}


def _mfb_noise_gain_by_hand(v, f):
    """Node equations of the MFB low-pass solved by hand, source Vn at the + input and the
    stage input grounded, ideal op amp (V- = Vn): at node n, (Va - Vn)/R3 = (Vn - Vo) s C1;
    at node a, Va (1/R1 + 1/R2 + 1/R3 + s C2) = Vo/R2 + Vn/R3. With k = s C1 R3 and
    Y = 1/R1 + 1/R2 + 1/R3 + s C2: Vo/Vn = ((1 + k) Y - 1/R3) / (1/R2 + k Y)."""
    s = 2j * math.pi * f
    k = s * v["C1"] * v["R3"]
    y = 1 / v["R1"] + 1 / v["R2"] + 1 / v["R3"] + s * v["C2"]
    return abs(((1 + k) * y - 1 / v["R3"]) / (1 / v["R2"] + k * y))


def test_noise_gain_comes_from_the_circuit():
    from picker.budget.opamp import noise_gain

    topo = get_topology("mfb-lowpass")
    f0 = float(topo.characteristics(MFB3)[0])
    ng = noise_gain(topo, MFB3, f0)
    assert ng == pytest.approx(_mfb_noise_gain_by_hand(MFB3, f0), rel=1e-9)  # hand calculation
    assert ng > 50  # where 1 + |G| says 2
    # inverting amplifier: 1 + R2/R1 at DC (common practice)
    inv = get_topology("inverting-lowpass")
    assert noise_gain(inv, {"R1": 10e3, "R2": 47e3, "C1": 1e-15}, 1.0) == pytest.approx(
        1 + 4.7, rel=1e-9
    )


def test_mfb_shift_past_one_percent_warns():
    """The report's case: the stage passed the 1 + |G| rule (100 x 2 x 1.93 x 5 kHz =
    1.93 MHz < 3 MHz) yet its f0 moves by -3.5 %; the warning now comes from the shift."""
    topo = get_topology("mfb-lowpass")
    choice = stage(topo.key, MFB3)
    b = budget(candidate(choice, opamp=opamp(gbw=3e6)), trials=10)
    o = b.stages[0].opamp
    assert o.shift[0] == pytest.approx(-0.035, abs=0.001)
    warn = [w for w in b.warnings if "op amp too slow" in w]
    assert warn and "f0 by -3.5%" in warn[0] and "noise gain at f0 is" in warn[0]
    fast = budget(candidate(choice, opamp=opamp(gbw=30e6)), trials=10)
    assert not any("too slow" in w for w in fast.warnings)  # -0.35 %: within 1 %
