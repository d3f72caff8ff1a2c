"""Order from a specification against scipy.signal (buttord, cheb1ord and the responses
of butter, cheby1 and bessel evaluated with freqs)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import signal

from picker.errors import DesignError
from picker.filters.spec_order import (
    HALF_POWER_DB,
    bandpass_attenuation_db,
    order_from_spec,
)

TWO_PI = 2 * math.pi
RNG = np.random.default_rng(20261202)


def random_specs(n):
    """Corner, stopband ratio and attenuation, seeded; kept away from the edges of the
    designable range by the tests that use them."""
    for _ in range(n):
        fc = 10 ** RNG.uniform(1, 5)
        ratio = 10 ** RNG.uniform(0.05, 1.5)
        atten = RNG.uniform(5, 90)
        yield fc, ratio, atten


def _loss_scipy(b, a, f_hz):
    """dB below the peak of |H| (the peak taken on a fine grid of the passband)."""
    _, h = signal.freqs(b, a, worN=[TWO_PI * f_hz])
    return -20 * math.log10(abs(h[0]))


@pytest.mark.parametrize("kind", ["lowpass", "highpass"])
def test_butterworth_order_is_scipy_buttord(kind):
    checked = 0
    for fc, ratio, atten in random_specs(300):
        fs = fc * ratio if kind == "lowpass" else fc / ratio
        # scipy.signal.buttord, analog: passband edge fc with 3.0103 dB loss (fc is the
        # -3 dB point), stopband edge fs with atten dB
        n_ref, _ = signal.buttord(TWO_PI * fc, TWO_PI * fs, HALF_POWER_DB, atten, analog=True)
        try:
            got = order_from_spec(
                kind, response="butterworth", fc_hz=fc, stopband_hz=fs, attenuation_db=atten
            )
        except DesignError as exc:
            assert n_ref > 8 and f"order {n_ref}" in str(exc)
            continue
        assert got.order == n_ref
        # the attenuation reported is the one scipy.signal.butter's response has there
        b, a = signal.butter(got.order, TWO_PI * fc, btype=kind, analog=True)
        assert got.achieved_db == pytest.approx(_loss_scipy(b, a, fs), abs=1e-6)
        assert got.achieved_db >= atten
        checked += 1
    assert checked > 100


@pytest.mark.parametrize("ripple", [0.1, 0.5, 1.0, 3.0])
@pytest.mark.parametrize("kind", ["lowpass", "highpass"])
def test_chebyshev_order_is_scipy_cheb1ord(kind, ripple):
    checked = 0
    for fc, ratio, atten in random_specs(120):
        fs = fc * ratio if kind == "lowpass" else fc / ratio
        # scipy.signal.cheb1ord, analog: passband edge fc with loss = ripple
        n_ref, _ = signal.cheb1ord(TWO_PI * fc, TWO_PI * fs, ripple, atten, analog=True)
        try:
            got = order_from_spec(
                kind,
                response="chebyshev",
                fc_hz=fc,
                stopband_hz=fs,
                attenuation_db=atten,
                ripple_db=ripple,
            )
        except DesignError as exc:
            assert n_ref > 8 and f"order {n_ref}" in str(exc)
            continue
        assert got.order == n_ref
        # scipy.signal.cheby1's response, whose passband peak is 0 dB
        b, a = signal.cheby1(got.order, ripple, TWO_PI * fc, btype=kind, analog=True)
        assert got.achieved_db == pytest.approx(_loss_scipy(b, a, fs), abs=1e-6)
        checked += 1
    assert checked > 40


@pytest.mark.parametrize("kind", ["lowpass", "highpass"])
def test_bessel_order_from_scipy_bessel_response(kind):
    checked = 0
    for fc, ratio, atten in random_specs(60):
        fs = fc * ratio if kind == "lowpass" else fc / ratio
        # direct evaluation: scipy.signal.bessel(norm="mag") puts -3 dB at fc; the order is
        # the smallest whose loss at fs reaches atten
        losses = []
        for n in range(1, 9):
            b, a = signal.bessel(n, TWO_PI * fc, btype=kind, analog=True, norm="mag")
            losses.append(_loss_scipy(b, a, fs))
        wanted = next((n for n, loss in enumerate(losses, 1) if loss >= atten), None)
        if wanted is not None and min(abs(loss - atten) for loss in losses) < 1e-6:
            continue  # on a boundary: rounding may go either way
        try:
            got = order_from_spec(
                kind, response="bessel", fc_hz=fc, stopband_hz=fs, attenuation_db=atten
            )
        except DesignError as exc:
            assert wanted is None and "order" in str(exc)
            continue
        assert got.order == wanted
        assert got.achieved_db == pytest.approx(losses[wanted - 1], abs=1e-6)
        checked += 1
    assert checked > 15


def test_report_line_reads_as_asked():
    # scipy.signal.buttord(2 pi 1e3, 2 pi 4e3, 3.0103, 40, analog=True) gives N = 4;
    # butter(4) loses 10 log10(1 + 4^8) = 48.2 dB at 4 kHz
    got = order_from_spec(
        "lowpass", response="butterworth", fc_hz=1e3, stopband_hz=4e3, attenuation_db=40
    )
    assert got.line() == "order 4: 48.2 dB at 4 kHz, 40 dB asked"


@pytest.mark.parametrize(
    "kind, fs, words",
    [
        ("lowpass", 900.0, "not above the corner"),
        ("lowpass", 1000.0, "not above the corner"),
        ("highpass", 1100.0, "not below the corner"),
    ],
)
def test_stopband_on_the_wrong_side_is_refused(kind, fs, words):
    with pytest.raises(DesignError, match=words):
        order_from_spec(kind, response="butterworth", fc_hz=1e3, stopband_hz=fs, attenuation_db=40)


def test_too_high_an_order_names_the_order_it_would_take():
    # scipy.signal.buttord(2 pi 1e3, 2 pi 1.5e3, 3.0103, 60, analog=True) gives N = 18
    n_ref, _ = signal.buttord(TWO_PI * 1e3, TWO_PI * 1.5e3, HALF_POWER_DB, 60, analog=True)
    assert n_ref == 18
    with pytest.raises(DesignError) as exc:
        order_from_spec(
            "lowpass", response="butterworth", fc_hz=1e3, stopband_hz=1.5e3, attenuation_db=60
        )
    text = str(exc.value)
    assert "takes order 18" in text and "up to order 8" in text
    # order 8 there: 10 log10(1 + 1.5^16) = 28.2 dB (closed form of the Butterworth response)
    assert "28.2 dB" in text


def test_too_high_an_order_suggests_a_response_that_does_it():
    # scipy.signal.cheb1ord(2 pi 1e3, 2 pi 2e3, 1, 60, analog=True) gives N = 7, buttord 10
    assert signal.cheb1ord(TWO_PI * 1e3, TWO_PI * 2e3, 1.0, 60, analog=True)[0] == 7
    with pytest.raises(DesignError, match="chebyshev order 7 would do it"):
        order_from_spec(
            "lowpass", response="butterworth", fc_hz=1e3, stopband_hz=2e3, attenuation_db=60
        )


@pytest.mark.parametrize("atten", [0.0, -3.0, float("nan"), float("inf"), 1e6])
def test_bad_attenuation_is_refused(atten):
    with pytest.raises(DesignError, match="--attenuation"):
        order_from_spec(
            "lowpass", response="butterworth", fc_hz=1e3, stopband_hz=2e3, attenuation_db=atten
        )


@pytest.mark.parametrize("fs, atten", [(3e3, 20.0), (250.0, 30.0), (1.2e3, 6.0)])
def test_bandpass_spec_sets_the_q(fs, atten):
    got = order_from_spec(
        "bandpass", response="butterworth", fc_hz=1e3, stopband_hz=fs, attenuation_db=atten
    )
    assert got.order == 2 and got.q is not None
    # scipy.signal.freqs of the second-order band-pass (s w0/Q) / (s^2 + s w0/Q + w0^2),
    # whose centre gain is 1: the loss at fs is exactly the attenuation asked
    w0 = TWO_PI * 1e3
    loss = _loss_scipy([w0 / got.q, 0.0], [1.0, w0 / got.q, w0 * w0], fs)
    assert loss == pytest.approx(atten, abs=1e-9)
    assert bandpass_attenuation_db(got.q, fs / 1e3) == pytest.approx(atten)
    assert got.line().startswith("Q ")


def test_bandpass_stopband_at_the_centre_is_refused():
    with pytest.raises(DesignError, match="centre"):
        order_from_spec(
            "bandpass", response="butterworth", fc_hz=1e3, stopband_hz=1e3, attenuation_db=20
        )
