"""Normalised analog low-pass prototypes: poles and second-order sections.

Every prototype here has its reference frequency at 1 rad/s: the -3 dB point for
Butterworth and Bessel, the edge of the ripple band for Chebyshev type I.

References
----------
.. [1] Butterworth poles p_k = exp(j pi (2k + n - 1) / (2n)), k = 1..n (standard; from memory).
.. [2] Chebyshev type I poles p_k = -sinh(mu) sin(t_k) + j cosh(mu) cos(t_k),
       t_k = pi (2k - 1) / (2n), mu = asinh(1/eps) / n, eps = sqrt(10^(rp/10) - 1)
       (standard; from memory).
.. [3] Bessel (Thomson) filters: poles are the roots of the reverse Bessel polynomial
       theta_n(s) = sum_k (2n - k)! / (2^(n-k) k! (n-k)!) s^k (unit group delay at DC),
       rescaled here so that |H(j1)| = 1/sqrt(2) (standard; from memory).
"""

from __future__ import annotations

import math

import numpy as np

from picker.errors import DesignError

RESPONSES = ("butterworth", "bessel", "chebyshev")
MAX_ORDER = 8


def check_order(order) -> int:
    if isinstance(order, bool) or not isinstance(order, int) or not 1 <= order <= MAX_ORDER:
        raise DesignError(f"order must be a whole number from 1 to {MAX_ORDER}, got {order!r}")
    return order


def ripple_eps(ripple_db: float) -> float:
    if not (math.isfinite(ripple_db) and 0.0 < ripple_db <= 10.0):
        raise DesignError(
            f"Chebyshev ripple must be above 0 dB and at most 10 dB, got {ripple_db!r}"
        )
    return math.sqrt(10.0 ** (ripple_db / 10.0) - 1.0)


def butterworth_poles(order: int) -> np.ndarray:
    k = np.arange(1, order + 1)
    return np.exp(1j * np.pi * (2 * k + order - 1) / (2 * order))


def chebyshev_poles(order: int, ripple_db: float) -> np.ndarray:
    mu = math.asinh(1.0 / ripple_eps(ripple_db)) / order
    t = np.pi * (2 * np.arange(1, order + 1) - 1) / (2 * order)
    return -math.sinh(mu) * np.sin(t) + 1j * math.cosh(mu) * np.cos(t)


def bessel_polynomial(order: int) -> np.ndarray:
    """Coefficients of theta_n(s), highest power first (for ``np.roots``)."""
    n = order
    coeffs = [
        math.factorial(2 * n - k) // (2 ** (n - k) * math.factorial(k) * math.factorial(n - k))
        for k in range(n + 1)
    ]
    return np.array(coeffs[::-1], dtype=float)


def _bessel_3db(poly: np.ndarray) -> float:
    """Angular frequency where |theta(0) / theta(jw)| = 1/sqrt(2), by bisection (monotonic)."""
    lo, hi = 1e-3, 1e3
    target = 2.0 * poly[-1] ** 2
    for _ in range(200):
        mid = math.sqrt(lo * hi)
        if abs(np.polyval(poly, 1j * mid)) ** 2 < target:
            lo = mid
        else:
            hi = mid
    return math.sqrt(lo * hi)


def bessel_poles(order: int) -> np.ndarray:
    poly = bessel_polynomial(order)
    return np.roots(poly) / _bessel_3db(poly)


def prototype_poles(response: str, order: int, ripple_db: float = 1.0) -> np.ndarray:
    """Poles of the normalised low-pass prototype (reference frequency 1 rad/s)."""
    check_order(order)
    if response == "butterworth":
        return butterworth_poles(order)
    if response == "chebyshev":
        return chebyshev_poles(order, ripple_db)
    if response == "bessel":
        return bessel_poles(order)
    raise DesignError(f"response must be one of {', '.join(RESPONSES)}; got {response!r}")


def sections(poles: np.ndarray) -> list[tuple[float, float | None]]:
    """Group poles into sections (w0, Q): a real pole gives (|p|, None), a conjugate pair
    gives (|p|, |p| / (-2 Re p)). Sorted by Q, lowest first, the real pole first."""
    upper = [p for p in poles if p.imag > 1e-9 * abs(p)]
    real = [p for p in poles if abs(p.imag) <= 1e-9 * abs(p)]
    out: list[tuple[float, float | None]] = [(float(abs(p)), None) for p in real]
    pairs = sorted((float(abs(p)), float(abs(p) / (-2.0 * p.real))) for p in upper)
    pairs.sort(key=lambda wq: wq[1])  # stable: equal Q stay in order of w0
    out += pairs
    return out


def normalised_magnitude(
    response: str, order: int, w: np.ndarray, ripple_db: float = 1.0
) -> np.ndarray:
    """|H(jw)| of the low-pass prototype with its passband peak at 1 (DC for all but
    even-order Chebyshev, whose DC sits at -ripple)."""
    poles = prototype_poles(response, order, ripple_db)
    s = 1j * np.asarray(w, dtype=float)[..., None]
    h = np.prod(-poles / (s - poles), axis=-1)
    mag = np.abs(h)
    if response == "chebyshev" and order % 2 == 0:
        mag = mag / math.sqrt(1.0 + ripple_eps(ripple_db) ** 2)
    return mag
