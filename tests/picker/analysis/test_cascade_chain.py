"""Whole-filter netlists: chained stages against the product of stage responses, the
Bessel cascade's group delay against scipy.signal's poles, the cascade step response."""

import math

import numpy as np
import pytest
import scipy.signal as ss

from picker.analysis import (
    cascade_group_delay_s,
    cascade_response,
    chain,
    nodal_response,
    step_response,
)
from picker.filters import plan_stages


def nets(btype, response, order, **kw):
    return [
        t.netlist(t.synthesize(s))
        for t, s in plan_stages(btype, response=response, order=order, fc_hz=1000.0, **kw)
    ]


@pytest.mark.parametrize("gbw", [None, 1e6])
def test_chained_netlist_equals_product_of_stages(gbw):
    stages = nets("highpass", "chebyshev", 7, gain=2.0, family="mfb")
    f = np.logspace(1, 5, 400)
    np.testing.assert_allclose(
        nodal_response(chain(stages), f, gbw_hz=gbw),
        cascade_response(stages, f, gbw_hz=gbw),
        rtol=1e-9,
    )
    names = [e.name for e in chain(stages)]
    assert len(names) == len(set(names))


@pytest.mark.parametrize("order", [2, 4, 7])
def test_bessel_group_delay_against_scipy_poles(order):
    # reference: poles of scipy.signal.bessel(norm="mag", analog=True); an all-pole
    # filter's group delay is sum(-Re p / |j w - p|^2) (from memory)
    wc = 2 * math.pi * 1000.0
    _, p, _ = ss.bessel(order, wc, analog=True, output="zpk", norm="mag")
    f = np.logspace(1, 4, 300)
    w = 2 * math.pi * f[:, None]
    want = np.sum(-p.real / np.abs(1j * w - p) ** 2, axis=1)
    got = cascade_group_delay_s(nets("lowpass", "bessel", order), f)
    np.testing.assert_allclose(got, want, rtol=1e-8)
    # the point of a Bessel response: delay flat to within 2 % up to half of fc
    # (common practice)
    flat = f <= 500.0
    assert np.ptp(got[flat]) / got[0] < 0.02


def test_cascade_step_against_scipy_step():
    # reference: scipy.signal.step of scipy.signal.butter(5, analog=True)
    stages = nets("lowpass", "butterworth", 5)
    t = np.linspace(0.0, 5e-3, 5001)
    b, a = ss.butter(5, 2 * math.pi * 1000.0, analog=True)
    _, want = ss.step((b, a), T=t)
    got = step_response(chain(stages), t)
    np.testing.assert_allclose(got[3:], want[3:], atol=2e-4)
