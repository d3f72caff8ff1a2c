"""Nodal analysis against closed forms evaluated by scipy.signal, and its error handling."""

import math

import numpy as np
import pytest
import scipy.signal as ss

from picker.analysis import (
    build_system,
    cascade_response,
    estimate_stage,
    group_delay_s,
    magnitude_db,
    nodal_response,
    phase_deg,
    poles,
)
from picker.errors import DesignError
from picker.filters import REGISTRY, plan_stages
from picker.filters.base import Element
from picker.parts import StageTarget

F = np.logspace(0, 6, 601)


def rc_lowpass(r=1e3, c=100e-9):
    return [Element("R", "R1", ("in", "out"), r), Element("C", "C1", ("out", "0"), c)]


def section_ba(topo, values):
    """(b, a) in s (rad/s) of the standard section with the topology's analytic f0/Q/gain;
    sign from the topology's inverting flag (standard section forms; from memory)."""
    f0, q, k = (
        np.asarray(x, dtype=float) if x is not None else None for x in topo.characteristics(values)
    )
    w0 = 2 * math.pi * float(f0)
    k = float(k) * (-1.0 if topo.inverting else 1.0)
    if topo.order == 1:
        return ([k * w0] if topo.response_type == "lowpass" else [k, 0.0]), [1.0, w0]
    q = float(q)
    a = [1.0, w0 / q, w0 * w0]
    b = {"lowpass": [k * w0 * w0], "highpass": [k, 0.0, 0.0], "bandpass": [k * w0 / q, 0.0]}[
        topo.response_type
    ]
    return b, a


def test_rc_lowpass_closed_form():
    # H = 1 / (1 + j w R C) (common practice)
    h = nodal_response(rc_lowpass(), F)
    np.testing.assert_allclose(h, 1.0 / (1.0 + 2j * np.pi * F * 1e-4), rtol=1e-12)


@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_each_topology_matches_scipy_freqs_of_its_section(key):
    # reference: scipy.signal.freqs of the section built from the analytic f0, Q, gain
    topo = REGISTRY[key]
    target = StageTarget(2200.0, None if topo.order == 1 else 1.7, 3.0 if topo.sets_gain else None)
    values = topo.synthesize(target)
    b, a = section_ba(topo, values)
    _, want = ss.freqs(b, a, worN=2 * np.pi * F)
    got = nodal_response(topo.netlist(values), F)
    np.testing.assert_allclose(got, want, rtol=1e-9, atol=1e-12 * np.max(np.abs(want)))


def test_follower_with_single_pole_op_amp():
    # A(s) = A0 / (1 + s/wp), follower H = A / (1 + A) (standard feedback result; from memory)
    gbw, a0 = 1e6, 2e5
    elements = [Element("R", "R1", ("in", "p"), 1.0), Element("OA", "U1", ("p", "out", "out"))]
    f = np.logspace(2, 8, 61)
    s = 2j * np.pi * f
    amp = a0 / (1 + s * a0 / (2 * np.pi * gbw))
    np.testing.assert_allclose(nodal_response(elements, f, gbw_hz=gbw), amp / (1 + amp), rtol=1e-9)


def test_inverting_amplifier_bandwidth_is_gbw_over_noise_gain():
    # closed-loop -3 dB at about GBW / (1 + R2/R1) (common practice)
    elements = [
        Element("R", "R1", ("in", "n"), 1e3),
        Element("R", "R2", ("n", "out"), 10e3),
        Element("OA", "U1", ("0", "n", "out")),
    ]
    f = np.array([1.0, 1e6 / 11])
    h = nodal_response(elements, f, gbw_hz=1e6)
    assert abs(h[0]) == pytest.approx(10.0, rel=1e-3)
    assert magnitude_db(h[1:])[0] - magnitude_db(h[:1])[0] == pytest.approx(-3.01, abs=0.02)


def test_group_delay_against_phase_derivative_and_dc_value():
    topo = REGISTRY["sallen-key-lowpass"]
    values = topo.synthesize(StageTarget(1000.0, 0.7071))
    elements = topo.netlist(values)
    f = np.logspace(1, 4, 3001)
    tau = group_delay_s(elements, f)
    numeric = -np.gradient(np.radians(phase_deg(nodal_response(elements, f))), 2 * np.pi * f)
    np.testing.assert_allclose(tau[5:-5], numeric[5:-5], rtol=2e-4)
    # second-order low-pass: group delay at DC = 1 / (Q w0) (from memory)
    dc = group_delay_s(elements, [0.0])[0]
    assert dc == pytest.approx(1.0 / (0.7071 * 2 * math.pi * 1000.0), rel=1e-9)


def test_phase_is_unwrapped_for_an_eighth_order_cascade():
    stages = plan_stages("lowpass", order=8, fc_hz=1000.0)
    h = cascade_response([t.netlist(t.synthesize(s)) for t, s in stages], np.logspace(0, 6, 2000))
    ph = phase_deg(h)
    assert ph[-1] == pytest.approx(-720.0, abs=1.0)  # 8 poles: -90 degrees each
    assert np.all(np.abs(np.diff(ph)) < 10.0)


@pytest.mark.parametrize("response", ["butterworth", "bessel", "chebyshev"])
def test_poles_of_planned_stages_match_scipy(response):
    # reference: scipy.signal butter/bessel(norm="mag")/cheby1 analog zpk poles
    wc = 2 * math.pi * 500.0
    design = {
        "butterworth": lambda: ss.butter(6, wc, analog=True, output="zpk"),
        "bessel": lambda: ss.bessel(6, wc, analog=True, output="zpk", norm="mag"),
        "chebyshev": lambda: ss.cheby1(6, 1.0, wc, analog=True, output="zpk"),
    }
    _, want, _ = design[response]()
    got = np.concatenate(
        [
            poles(t.netlist(t.synthesize(s)))
            for t, s in plan_stages(
                "lowpass", response=response, order=6, fc_hz=500.0, family="mfb"
            )
        ]
    )
    key = lambda z: (round(z.real, 3), z.imag)  # noqa: E731
    np.testing.assert_allclose(sorted(got, key=key), sorted(want, key=key), rtol=1e-8)


@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_estimate_stage_ideal_equals_analytic(key):
    topo = REGISTRY[key]
    values = topo.synthesize(
        StageTarget(900.0, None if topo.order == 1 else 2.2, 2.0 if topo.sets_gain else None)
    )
    f0, q, k = topo.characteristics(values)
    ef0, eq, ek = estimate_stage(topo.netlist(values), topo.order, topo.response_type)
    assert ef0 == pytest.approx(float(f0), rel=1e-8)
    assert ek == pytest.approx(float(k), rel=1e-8)
    assert (eq is None) == (q is None)
    if q is not None:
        assert eq == pytest.approx(float(q), rel=1e-8)
    # a very fast op amp changes almost nothing
    gf0, _, gk = estimate_stage(topo.netlist(values), topo.order, topo.response_type, gbw_hz=1e12)
    assert gf0 == pytest.approx(float(f0), rel=1e-4)
    assert gk == pytest.approx(float(k), rel=1e-4)


def test_descriptor_matrices_shape():
    system = build_system(rc_lowpass())
    assert system.G.shape == system.C.shape == (3, 3)  # in, out, source current
    assert system.nodes == ("in", "out")


@pytest.mark.parametrize(
    "elements, match",
    [
        ([Element("R", "R1", ("in", "x"), 1e3)], "no node 'out'"),
        ([Element("R", "R1", ("in", "out"), -1.0)], "R1 has value -1.0"),
        ([Element("L", "L1", ("in", "out"), 1e-3)], "unknown kind 'L'"),
        ([Element("C", "C1", ("in", "out"), 1e-9)], "cannot be solved"),
    ],
)
def test_bad_netlists(elements, match):
    with pytest.raises(DesignError, match=match):
        nodal_response(elements, [0.0, 100.0])


def test_bad_frequencies_and_gbw():
    with pytest.raises(DesignError, match="frequencies must be"):
        nodal_response(rc_lowpass(), [-1.0])
    with pytest.raises(DesignError, match="gain-bandwidth must be a positive"):
        nodal_response(rc_lowpass(), [1.0], gbw_hz=0.0)
