"""The smallest order that meets a specification: corner, stopband edge, attenuation.

Conventions (docs/outputs.md, "Order from a specification"):

* ``fc_hz`` means what it means everywhere in picker: the -3 dB (half-power) point of a
  Butterworth or Bessel response, the edge of the ripple band of a Chebyshev one, where
  the loss is the ripple.
* The attenuation at the stopband edge is counted from the passband peak (the DC gain
  of a Butterworth or Bessel low-pass; for an even-order Chebyshev the peak, ``ripple``
  above its DC gain), as scipy.signal's ``buttord`` and ``cheb1ord`` count it.
* A high-pass is the mirror image (s -> 1/s): its stopband lies below fc and the ratio
  is fc / fs instead of fs / fc.
* A band-pass is one second-order stage whose order is fixed; the specification sets
  its Q instead: the smallest Q that loses at least the attenuation asked at the
  stopband frequency (on either side of the centre).

The orders come from the response itself, evaluated at the stopband edge for each order
in turn; for Butterworth and Chebyshev the closed forms below give the same orders and
let a message name an order above the designable ones.

References
----------
.. [1] Butterworth |H(jw)|^2 = 1 / (1 + w^2n) with w in units of the -3 dB frequency;
       Chebyshev type I |H(jw)|^2 = 1 / (1 + eps^2 T_n(w)^2), T_n(w) = cosh(n acosh w)
       for w >= 1 and eps^2 = 10^(ripple/10) - 1 (standard; from memory).
.. [2] Second-order band-pass |H(jx)| / |H(j1)| = 1 / sqrt(1 + Q^2 (x - 1/x)^2), x the
       frequency over the centre frequency (standard; from memory).
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

from picker.errors import DesignError

HALF_POWER_DB = 10.0 * math.log10(2.0)  # the loss at fc of Butterworth and Bessel: 3.0103 dB
MAX_ATTENUATION_DB = 300.0
BESSEL_SEARCH_LIMIT = 20  # a message names Bessel orders up to this one


@dataclass(frozen=True)
class SpecOrder:
    """What the specification chose, and what that choice gives at the stopband edge."""

    response_type: str  # "lowpass" | "highpass" | "bandpass"
    response: str  # "butterworth" | "bessel" | "chebyshev" ("" for a band-pass)
    order: int  # 2 for a band-pass
    q: float | None  # the band-pass Q chosen; None otherwise
    fc_hz: float
    stopband_hz: float
    asked_db: float
    achieved_db: float  # attenuation at the stopband edge, dB below the passband peak

    def line(self) -> str:
        """One line for the report: ``order 5: 43.1 dB at 10 kHz, 40 dB asked``."""
        from stock.values import format_si

        what = f"Q {self.q:.3g}" if self.q is not None else f"order {self.order}"
        return (
            f"{what}: {self.achieved_db:.1f} dB at {format_si(self.stopband_hz, 'Hz')}, "
            f"{self.asked_db:g} dB asked"
        )

    def as_json(self) -> dict:
        return {
            "response_type": self.response_type,
            "response": self.response or None,
            "order": self.order,
            "q": self.q,
            "fc_hz": self.fc_hz,
            "stopband_hz": self.stopband_hz,
            "attenuation_asked_db": self.asked_db,
            "attenuation_db": self.achieved_db,
        }


def loss_db(response: str, order: int, ratio: float, ripple_db: float = 1.0) -> float:
    """Loss in dB below the passband peak of the low-pass prototype at ``ratio`` times fc.

    Butterworth and Chebyshev from their closed forms [1]_ (any order), Bessel from its
    poles (picker.filters.prototypes, scaled to -3 dB at fc).
    """
    if response == "butterworth":
        return 10.0 * math.log10(1.0 + ratio ** (2 * order))
    if response == "chebyshev":
        from picker.filters.prototypes import ripple_eps

        eps = ripple_eps(ripple_db)
        t = (
            math.cosh(order * math.acosh(ratio))
            if ratio >= 1
            else math.cos(order * math.acos(ratio))
        )
        return 10.0 * math.log10(1.0 + (eps * t) ** 2)
    if response == "bessel":
        mag = 1.0
        for p in _bessel_poles(order):
            mag *= abs(-p / (1j * ratio - p))
        return -20.0 * math.log10(mag)
    from picker.filters.prototypes import RESPONSES

    raise DesignError(f"response must be one of {', '.join(RESPONSES)}; got {response!r}")


@functools.lru_cache(maxsize=32)
def _bessel_poles(order: int) -> tuple[complex, ...]:
    """Poles of the Bessel prototype (-3 dB at 1 rad/s), kept: finding them takes a while."""
    from picker.filters.prototypes import bessel_poles

    return tuple(complex(p) for p in bessel_poles(order))


def needed_order(response: str, ratio: float, asked_db: float, ripple_db: float = 1.0) -> int:
    """Smallest order (from 1) with at least ``asked_db`` at ``ratio`` (> 1) times fc.

    May exceed the designable orders; for Bessel a result above
    ``BESSEL_SEARCH_LIMIT`` means "more than that".
    """
    if response == "bessel":
        for n in range(1, BESSEL_SEARCH_LIMIT + 1):
            if loss_db("bessel", n, ratio) >= asked_db:
                return n
        return BESSEL_SEARCH_LIMIT + 1
    # closed-form estimate [1], then the response itself decides the last step
    d = 10.0 ** (asked_db / 10.0) - 1.0
    if response == "butterworth":
        guess = math.log10(d) / (2.0 * math.log10(ratio)) if d > 1 else 1.0
    elif response == "chebyshev":
        from picker.filters.prototypes import ripple_eps

        x = math.sqrt(d) / ripple_eps(ripple_db)
        guess = math.acosh(x) / math.acosh(ratio) if x > 1 else 1.0
    else:
        loss_db(response, 1, ratio)  # raises DesignError naming the responses
        raise AssertionError("not reached")
    n = max(1, math.ceil(guess))
    while n > 1 and loss_db(response, n - 1, ratio, ripple_db) >= asked_db:
        n -= 1
    while loss_db(response, n, ratio, ripple_db) < asked_db:
        n += 1
    return n


def _check(fc_hz: float, stopband_hz: float, asked_db: float) -> None:
    for name, x in (("--fc", fc_hz), ("--stopband", stopband_hz)):
        if not (math.isfinite(x) and x > 0):
            raise DesignError(f"{name} must be a positive frequency, got {x!r}")
    if not (math.isfinite(asked_db) and 0 < asked_db <= MAX_ATTENUATION_DB):
        raise DesignError(
            f"--attenuation {asked_db!r}: give the loss wanted at the stopband in dB, "
            f"above 0 and at most {MAX_ATTENUATION_DB:g}"
        )


def order_from_spec(
    response_type: str,
    *,
    response: str,
    fc_hz: float,
    stopband_hz: float,
    attenuation_db: float,
    ripple_db: float = 1.0,
    max_order: int | None = None,
) -> SpecOrder:
    """The smallest order of ``response`` giving at least ``attenuation_db`` at the stopband.

    Raises DesignError (the command line's exit 2) when the stopband lies on the wrong
    side of fc, or when the order needed is above ``max_order`` (default: the highest
    order picker designs); the message names the order it would take and what the
    highest order gives there.
    """
    from picker.filters.prototypes import MAX_ORDER, RESPONSES
    from stock.values import format_si

    top = MAX_ORDER if max_order is None else max_order
    asked = attenuation_db
    _check(fc_hz, stopband_hz, asked)
    at = format_si(stopband_hz, "Hz")
    corner = format_si(fc_hz, "Hz")
    if response_type == "bandpass":
        return _bandpass_q(fc_hz, stopband_hz, asked)
    if response_type not in ("lowpass", "highpass"):
        raise DesignError(
            f"filter type must be lowpass, highpass or bandpass; got {response_type!r}"
        )
    if response not in RESPONSES:
        raise DesignError(f"response must be one of {', '.join(RESPONSES)}; got {response!r}")
    if response_type == "lowpass" and stopband_hz <= fc_hz:
        raise DesignError(
            f"--stopband {at} is not above the corner {corner}: a low-pass attenuates "
            f"above its corner, so its stopband must lie above fc"
        )
    if response_type == "highpass" and stopband_hz >= fc_hz:
        raise DesignError(
            f"--stopband {at} is not below the corner {corner}: a high-pass attenuates "
            f"below its corner, so its stopband must lie below fc"
        )
    ratio = stopband_hz / fc_hz if response_type == "lowpass" else fc_hz / stopband_hz
    n = needed_order(response, ratio, asked, ripple_db)
    if n > top:
        if response == "bessel" and n > BESSEL_SEARCH_LIMIT:
            takes = f"more than order {BESSEL_SEARCH_LIMIT}"
        else:
            takes = f"order {n}"
        best = loss_db(response, top, ratio, ripple_db)
        others = [
            f"{r} order {m}"
            for r in RESPONSES
            if r != response and (m := needed_order(r, ratio, asked, ripple_db)) <= top
        ]
        hint = (
            f"; {' or '.join(others)} would do it"
            if others
            else "; ask less attenuation or put the stopband further from fc"
        )
        raise DesignError(
            f"{asked:g} dB at {at} from a {response} {response_type} with fc {corner} "
            f"takes {takes}; picker designs up to order {top}, which gives "
            f"{best:.1f} dB there{hint}"
        )
    return SpecOrder(
        response_type=response_type,
        response=response,
        order=n,
        q=None,
        fc_hz=fc_hz,
        stopband_hz=stopband_hz,
        asked_db=asked,
        achieved_db=loss_db(response, n, ratio, ripple_db),
    )


def bandpass_attenuation_db(q: float, x: float) -> float:
    """Loss of a second-order band-pass below its centre gain at ``x`` times f0 [2]_."""
    return 10.0 * math.log10(1.0 + (q * (x - 1.0 / x)) ** 2)


def _bandpass_q(f0_hz: float, stopband_hz: float, asked: float) -> SpecOrder:
    from stock.values import format_si

    x = stopband_hz / f0_hz
    if abs(math.log(x)) < 1e-9:
        raise DesignError(
            f"--stopband {format_si(stopband_hz, 'Hz')} is the centre frequency itself; "
            "a band-pass passes its centre: put the stopband above or below it"
        )
    q = math.sqrt(10.0 ** (asked / 10.0) - 1.0) / abs(x - 1.0 / x)
    return SpecOrder(
        response_type="bandpass",
        response="",
        order=2,
        q=q,
        fc_hz=f0_hz,
        stopband_hz=stopband_hz,
        asked_db=asked,
        achieved_db=bandpass_attenuation_db(q, x),
    )
