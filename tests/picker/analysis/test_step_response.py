"""Step response by BDF2 on the MNA descriptor system against scipy.signal.step of the
same stage's closed-form transfer function."""

import math

import numpy as np
import pytest
import scipy.signal as ss

from picker.analysis import step_response
from picker.errors import DesignError
from picker.filters import REGISTRY
from picker.parts import StageTarget


def section_tf(topo, values):
    f0, q, k = topo.characteristics(values)
    w0 = 2 * math.pi * float(f0)
    k = float(k) * (-1.0 if topo.inverting else 1.0)
    if topo.order == 1:
        b = [k * w0] if topo.response_type == "lowpass" else [k, 0.0]
        return b, [1.0, w0]
    q = float(q)
    b = {"lowpass": [k * w0 * w0], "highpass": [k, 0.0, 0.0], "bandpass": [k * w0 / q, 0.0]}[
        topo.response_type
    ]
    return b, [1.0, w0 / q, w0 * w0]


@pytest.mark.parametrize("key", sorted(REGISTRY))
def test_step_matches_scipy_step(key):
    # reference: scipy.signal.step (exact for the closed form, via state space)
    topo = REGISTRY[key]
    values = topo.synthesize(
        StageTarget(1000.0, None if topo.order == 1 else 2.0, 1.5 if topo.sets_gain else None)
    )
    t = np.linspace(0.0, 5e-3, 5001)  # 1 us steps, 5 periods of f0
    got = step_response(topo.netlist(values), t)
    _, want = ss.step(section_tf(topo, values), T=t)
    assert got[0] == 0.0  # at rest just before the step
    scale = np.max(np.abs(want))
    # BDF2 is second-order accurate; the first two samples carry the start-up error
    np.testing.assert_allclose(got[3:], want[3:], atol=2e-4 * scale)  # measured 3.5e-5 worst


def test_step_of_lowpass_with_q_two_overshoots_as_expected():
    # second-order step overshoot exp(-pi / sqrt(4 Q^2 - 1)) (standard; from memory)
    topo = REGISTRY["sallen-key-lowpass"]
    values = topo.synthesize(StageTarget(1000.0, 2.0))
    t = np.linspace(0.0, 1e-2, 10001)
    y = step_response(topo.netlist(values), t)
    assert y.max() - 1.0 == pytest.approx(math.exp(-math.pi / math.sqrt(15.0)), rel=2e-3)
    assert y[-1] == pytest.approx(1.0, abs=1e-3)


def test_step_with_finite_gbw_settles_to_closed_loop_gain():
    topo = REGISTRY["non-inverting-lowpass-gain"]
    values = topo.synthesize(StageTarget(1000.0, None, 3.0))
    t = np.linspace(0.0, 5e-3, 2001)
    y = step_response(topo.netlist(values), t, gbw_hz=1e6)
    # DC gain with A0 = 2e5: G / (1 + G / A0) (standard feedback result; from memory)
    assert y[-1] == pytest.approx(3.0 / (1 + 3.0 / 2e5), rel=1e-4)


@pytest.mark.parametrize(
    "t, match",
    [
        ([0.0, 1.0], "at least 3 points"),
        ([0.0, 1.0, 3.0], "uniform and increasing"),
        ([0.0, -1.0, -2.0], "uniform and increasing"),
    ],
)
def test_bad_time_grid(t, match):
    topo = REGISTRY["non-inverting-lowpass"]
    with pytest.raises(DesignError, match=match):
        step_response(topo.netlist({"R1": 1e3, "C1": 1e-6}), t)
