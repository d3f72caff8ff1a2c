"""Stage planning against scipy.signal's analog designs, plus the planning conventions."""

import math

import numpy as np
import pytest
import scipy.signal as ss
from scipy.optimize import brentq

from picker.errors import DesignError
from picker.filters import get_topology, minimum_order, plan_stages

FC = 1234.5


def _scipy_sections(response, order, btype, rp=1.0):
    """(f0_hz, q) per stage from scipy's analog zpk; reference: scipy.signal butter /
    bessel(norm="mag") / cheby1 with analog=True."""
    wc = 2 * math.pi * FC
    if response == "butterworth":
        _, p, _ = ss.butter(order, wc, btype, analog=True, output="zpk")
    elif response == "bessel":
        _, p, _ = ss.bessel(order, wc, btype, analog=True, output="zpk", norm="mag")
    else:
        _, p, _ = ss.cheby1(order, rp, wc, btype, analog=True, output="zpk")
    out = []
    for z in p:
        if abs(z.imag) <= 1e-9 * abs(z):
            out.append((abs(z) / (2 * math.pi), None))
        elif z.imag > 0:
            out.append((abs(z) / (2 * math.pi), abs(z) / (-2 * z.real)))
    return sorted(out, key=lambda fq: (fq[1] or 0.0, fq[0]))


@pytest.mark.parametrize("response", ["butterworth", "bessel", "chebyshev"])
@pytest.mark.parametrize("btype", ["lowpass", "highpass"])
@pytest.mark.parametrize("order", range(1, 9))
def test_stage_f0_q_match_scipy(response, btype, order):
    stages = plan_stages(btype, response=response, order=order, fc_hz=FC, ripple_db=1.0)
    got = sorted(((t.f0_hz, t.q) for _, t in stages), key=lambda fq: (fq[1] or 0.0, fq[0]))
    want = _scipy_sections(response, order, btype)
    assert len(got) == len(want) == (order + 1) // 2
    for (f, q), (fw, qw) in zip(got, want, strict=True):
        assert f == pytest.approx(fw, rel=1e-7)
        assert (q is None) == (qw is None)
        if q is not None:
            assert q == pytest.approx(qw, rel=1e-7)
    for topo, target in stages:
        assert topo.response_type == btype
        assert topo.order == (1 if target.q is None else 2)


@pytest.mark.parametrize("order", range(2, 9))
def test_stages_run_lowest_q_first(order):
    # ordering convention: lowest Q first, first-order stage first (common practice)
    stages = plan_stages("lowpass", response="chebyshev", order=order, fc_hz=FC)
    qs = [t.q if t.q is not None else 0.0 for _, t in stages]
    assert qs == sorted(qs)
    if order % 2:
        assert stages[0][1].q is None


@pytest.mark.parametrize(
    "order, family, keys",
    [
        (1, None, ["inverting-lowpass"]),
        (1, "non-inverting", ["non-inverting-lowpass"]),
        (2, None, ["sallen-key-lowpass"]),
        (3, None, ["non-inverting-lowpass", "sallen-key-lowpass"]),
        (3, "mfb", ["inverting-lowpass", "mfb-lowpass"]),
        (4, "mfb", ["mfb-lowpass", "mfb-lowpass"]),
    ],
)
def test_default_and_chosen_families(order, family, keys):
    stages = plan_stages("lowpass", order=order, fc_hz=FC, family=family)
    assert [t.key for t, _ in stages] == keys


def test_unity_gain_targets():
    stages = plan_stages("lowpass", order=3, fc_hz=FC)
    assert [t.gain for _, t in stages] == [None, None]
    stages = plan_stages("lowpass", order=3, fc_hz=FC, family="mfb")
    assert [t.gain for _, t in stages] == [1.0, 1.0]


@pytest.mark.parametrize("btype", ["lowpass", "highpass"])
def test_gain_goes_into_first_stage(btype):
    stages = plan_stages(btype, order=5, fc_hz=FC, gain=4.0)
    assert [t.key for t, _ in stages] == [
        f"non-inverting-{btype}-gain",
        f"sallen-key-{btype}",
        f"sallen-key-{btype}",
    ]
    assert [t.gain for _, t in stages] == [4.0, None, None]
    stages = plan_stages(btype, order=4, fc_hz=FC, gain=0.5, family="mfb")
    assert [t.gain for _, t in stages] == [0.5, 1.0]
    stages = plan_stages(btype, order=4, fc_hz=FC, gain=10.0)
    assert [t.key for t, _ in stages] == [f"sallen-key-{btype}-gain", f"sallen-key-{btype}"]


def test_single_stage_with_q_and_bandpass():
    [(topo, target)] = plan_stages("highpass", fc_hz=FC, q=2.5, gain=2.0)
    assert topo.key == "sallen-key-highpass-gain"
    assert (target.f0_hz, target.q, target.gain) == (FC, 2.5, 2.0)
    [(topo, target)] = plan_stages("bandpass", fc_hz=FC, q=5.0, order=None)
    assert topo is get_topology("mfb-bandpass")
    assert (target.f0_hz, target.q, target.gain) == (FC, 5.0, 1.0)


@pytest.mark.parametrize(
    "kwargs, match",
    [
        (dict(response_type="lowpass", order=3, family="inverting"), "'inverting' is first order"),
        (dict(response_type="lowpass", order=2, gain=0.5), "gain 0.5 is below 1"),
        (dict(response_type="bandpass", order=2), "band-pass needs its Q"),
        (dict(response_type="bandpass", order=4, q=2.0), "order must be 2 or omitted, got 4"),
        (dict(response_type="bandpass", q=2.0, family="sallen-key"), "MFB stage only"),
        (dict(response_type="notch"), "'notch'"),
        (dict(response_type="lowpass", fc_hz=-5.0), "fc_hz .* got -5.0"),
        (dict(response_type="lowpass", family="twin-t"), "'twin-t'"),
        (dict(response_type="lowpass", order=12), "got 12"),
    ],
)
def test_bad_input_names_the_constraint(kwargs, match):
    kwargs.setdefault("fc_hz", FC)
    with pytest.raises(DesignError, match=match):
        plan_stages(**kwargs)


@pytest.mark.parametrize(
    "btype, fp, fs",
    [("lowpass", 1000.0, 3000.0), ("lowpass", 1000.0, 1500.0), ("highpass", 2000.0, 500.0)],
)
@pytest.mark.parametrize("ap, a_s", [(3.0, 40.0), (1.0, 30.0), (0.5, 20.0)])
def test_minimum_order_matches_scipy_ord(btype, fp, fs, ap, a_s):
    # reference: scipy.signal.buttord / cheb1ord with analog=True
    wp, ws = 2 * math.pi * fp, 2 * math.pi * fs
    nb, _ = ss.buttord(wp, ws, ap, a_s, analog=True)
    nc, _ = ss.cheb1ord(wp, ws, ap, a_s, analog=True)
    for response, n in (("butterworth", nb), ("chebyshev", nc)):
        if n > 8:
            with pytest.raises(DesignError, match=f"need order {n}"):
                minimum_order(response, fp, ap, fs, a_s, btype)
        else:
            assert minimum_order(response, fp, ap, fs, a_s, btype) == n


def _bessel_meets(n, ap, a_s, ratio):
    """Independent check on scipy.signal.besselap(norm="mag"): place the corner so the loss
    at the passband edge is exactly ap, then look at the loss ratio times further out."""
    z, p, k = ss.besselap(n, norm="mag")

    def loss(w):
        _, h = ss.freqs_zpk(z, p, k, [w])
        return -20 * np.log10(abs(h[0]))

    wp = brentq(lambda w: loss(w) - ap, 1e-4, 1e3)
    return loss(wp * ratio) >= a_s


def test_bessel_minimum_order_beyond_eight():
    with pytest.raises(DesignError, match="need order 9"):
        minimum_order("bessel", 1000.0, 0.5, 5000.0, 30.0)


@pytest.mark.parametrize(
    "ap, a_s, ratio", [(3.0, 20.0, 3.0), (1.0, 40.0, 6.0), (0.5, 30.0, 8.0), (3.0, 60.0, 8.0)]
)
def test_bessel_minimum_order_by_evaluation(ap, a_s, ratio):
    n = minimum_order("bessel", 1000.0, ap, 1000.0 * ratio, a_s)
    assert _bessel_meets(n, ap, a_s, ratio)
    if n > 1:
        assert not _bessel_meets(n - 1, ap, a_s, ratio)


def test_minimum_order_bad_edges():
    with pytest.raises(DesignError, match="must lie beyond the passband edge"):
        minimum_order("butterworth", 1000.0, 3.0, 800.0, 40.0, "lowpass")
    with pytest.raises(DesignError, match="must exceed the passband loss"):
        minimum_order("butterworth", 1000.0, 3.0, 2000.0, 2.0)
