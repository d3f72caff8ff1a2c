"""Prototype poles and sections against scipy.signal and handbook pole tables."""

import numpy as np
import pytest
import scipy.signal as ss

from picker.errors import DesignError
from picker.filters import prototypes


def _sorted(p):
    return np.array(sorted(np.asarray(p), key=lambda z: (round(z.real, 9), z.imag)))


@pytest.mark.parametrize("order", range(1, 9))
def test_butterworth_poles_match_scipy_buttap(order):
    # reference: scipy.signal.buttap (analog Butterworth prototype, -3 dB at 1 rad/s)
    _, p, _ = ss.buttap(order)
    np.testing.assert_allclose(
        _sorted(prototypes.butterworth_poles(order)), _sorted(p), rtol=0, atol=1e-12
    )


@pytest.mark.parametrize("order", range(1, 9))
@pytest.mark.parametrize("rp", [0.1, 0.5, 1.0, 3.0])
def test_chebyshev_poles_match_scipy_cheb1ap(order, rp):
    # reference: scipy.signal.cheb1ap (ripple-band edge at 1 rad/s)
    _, p, _ = ss.cheb1ap(order, rp)
    np.testing.assert_allclose(
        _sorted(prototypes.chebyshev_poles(order, rp)), _sorted(p), rtol=0, atol=1e-10
    )


@pytest.mark.parametrize("order", range(1, 9))
def test_bessel_poles_match_scipy_besselap_mag(order):
    # reference: scipy.signal.besselap(norm="mag"), -3 dB at 1 rad/s
    _, p, _ = ss.besselap(order, norm="mag")
    np.testing.assert_allclose(
        _sorted(prototypes.bessel_poles(order)), _sorted(p), rtol=0, atol=1e-8
    )


@pytest.mark.parametrize(
    "order, qs",
    [
        # Butterworth stage Q = 1 / (2 cos(angle)); handbook pole tables (from memory)
        (2, [0.7071]),
        (3, [None, 1.0]),
        (4, [0.5412, 1.3066]),
        (5, [None, 0.6180, 1.6180]),
        (6, [0.5176, 0.7071, 1.9319]),
        (8, [0.5098, 0.6013, 0.9000, 2.5629]),
    ],
)
def test_butterworth_stage_q_handbook(order, qs):
    got = prototypes.sections(prototypes.butterworth_poles(order))
    assert [q is None for _, q in got] == [q is None for q in qs]
    for (_, q), qe in zip(got, qs, strict=True):
        if qe is not None:
            assert q == pytest.approx(qe, abs=6e-5)
    np.testing.assert_allclose([w for w, _ in got], 1.0, rtol=1e-12)  # all on the unit circle


@pytest.mark.parametrize(
    "response, order, rp, expected",
    [
        # Bessel order 2: f0/fc 1.2720, Q 0.5774 (from memory; also sqrt(3)/1.3617 by hand)
        ("bessel", 2, 1.0, [(1.2720, 0.5774)]),
        # Bessel orders 3 and 4, Q per stage (handbook table, from memory); f0 from scipy besselap
        ("bessel", 3, 1.0, [(1.3227, None), (1.4476, 0.6910)]),
        ("bessel", 4, 1.0, [(1.4302, 0.5219), (1.6034, 0.8055)]),
        # Chebyshev 1 dB order 2: f0/fc 1.0500, Q 0.9565 (handbook table, from memory)
        ("chebyshev", 2, 1.0, [(1.0500, 0.9565)]),
    ],
)
def test_sections_handbook_values(response, order, rp, expected):
    got = prototypes.sections(prototypes.prototype_poles(response, order, rp))
    assert len(got) == len(expected)
    for (w, q), (we, qe) in zip(got, expected, strict=True):
        assert w == pytest.approx(we, abs=6e-5)
        assert (q is None) == (qe is None)
        if q is not None:
            assert q == pytest.approx(qe, abs=6e-5)


@pytest.mark.parametrize("response", ["butterworth", "bessel"])
@pytest.mark.parametrize("order", range(1, 9))
def test_prototype_is_3db_down_at_one(response, order):
    # definition of fc for these responses (docs/cli.md)
    mag = prototypes.normalised_magnitude(response, order, [1e-6, 1.0])
    assert mag[0] == pytest.approx(1.0, rel=1e-9)
    assert 20 * np.log10(mag[1]) == pytest.approx(-10 * np.log10(2), abs=1e-6)


@pytest.mark.parametrize(
    "bad, match",
    [
        (0, "order must be a whole number from 1 to 8, got 0"),
        (9, "got 9"),
        (2.0, "got 2.0"),
    ],
)
def test_bad_order(bad, match):
    with pytest.raises(DesignError, match=match):
        prototypes.prototype_poles("butterworth", bad)


def test_bad_response_and_ripple():
    with pytest.raises(DesignError, match="'elliptic'"):
        prototypes.prototype_poles("elliptic", 3)
    with pytest.raises(DesignError, match="ripple must be above 0 dB"):
        prototypes.prototype_poles("chebyshev", 3, 0.0)
