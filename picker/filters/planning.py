"""From a response, order, corner and gain to a list of stages (topology, target).

Conventions (decided here; see also docs/cli.md):

* ``fc_hz`` is the -3 dB frequency for Butterworth and Bessel (as scipy.signal's
  ``bessel(norm="mag")``) and the edge of the ripple band for Chebyshev type I.
* High-pass stages come from the low-pass prototype by s -> 1/s: each section keeps its
  Q and its f0 becomes fc^2 / f0_lp, i.e. f0 = fc / w0_prototype.
* Stages run lowest Q first (common practice: the high-Q sections see a signal already
  filtered, so they clip less). A first-order stage, when there is one, comes first.
* ``gain`` is the magnitude of the cascade's DC gain (low-pass) or high-frequency gain
  (high-pass), i.e. the product of the stages' gains. For an even-order Chebyshev the
  passband peak is then ``gain * 10^(ripple_db/20)``; for a band-pass it is the gain at
  the centre frequency.
* The whole gain goes into the first stage that can set it; the other stages have unity
  gain. ``StageTarget.gain`` is None for a stage that does not set its gain (a follower or
  a unity Sallen-Key); otherwise the magnitude (1.0 for the unity stages of an MFB cascade).
"""

from __future__ import annotations

import math

import numpy as np

from picker.errors import DesignError
from picker.filters import prototypes
from picker.filters.base import REGISTRY, Topology
from picker.parts import StageTarget

TYPES = ("lowpass", "highpass", "bandpass")
FAMILIES = ("inverting", "non-inverting", "sallen-key", "mfb")
# (family, order of the stage) -> family of the module that builds it
_STAGE_FAMILY = {
    ("sallen-key", 1): "non-inverting",
    ("sallen-key", 2): "sallen-key",
    ("mfb", 1): "inverting",
    ("mfb", 2): "mfb",
    ("inverting", 1): "inverting",
    ("non-inverting", 1): "non-inverting",
}


def _positive(name: str, x) -> float:
    if isinstance(x, bool) or not isinstance(x, (int, float)) or not math.isfinite(x) or x <= 0:
        raise DesignError(f"{name} must be a positive finite number, got {x!r}")
    return float(x)


def _topology(family: str, order: int, response_type: str, with_gain: bool) -> Topology:
    stage_family = _STAGE_FAMILY[(family, order)]
    key = f"{stage_family}-{response_type}"
    if with_gain and stage_family in ("sallen-key", "non-inverting"):
        key += "-gain"
    return REGISTRY[key]


def _default_family(order: int) -> str:
    return "inverting" if order == 1 else "sallen-key"


def plan_stages(
    response_type: str,
    *,
    response: str = "butterworth",
    order: int | None = 2,
    fc_hz: float,
    gain: float = 1.0,
    ripple_db: float = 1.0,
    q: float | None = None,
    family: str | None = None,
) -> list[tuple[Topology, StageTarget]]:
    """Stage list for a filter.

    Parameters
    ----------
    response_type : "lowpass" | "highpass" | "bandpass"
    response : "butterworth" | "bessel" | "chebyshev" (ignored for band-pass)
    order : 1..8 (band-pass: 2 or None)
    fc_hz : corner in hertz (band-pass: centre frequency)
    gain : overall gain magnitude (see module notes for the reference point)
    ripple_db : Chebyshev passband ripple in dB
    q : band-pass Q (required there); for low-/high-pass a single second-order stage
        with this Q (order must then be 2 or None; ``response`` is not used)
    family : "sallen-key" | "mfb" | "inverting" | "non-inverting" | None (default:
        "inverting" for order 1, "sallen-key" otherwise, "mfb" for band-pass).
        With "sallen-key" an odd order's first-order stage is non-inverting; with "mfb"
        it is inverting. "inverting" and "non-inverting" are for order 1 only.

    Returns
    -------
    list of (Topology, StageTarget), in signal order.
    """
    if response_type not in TYPES:
        raise DesignError(f"filter type must be one of {', '.join(TYPES)}; got {response_type!r}")
    fc_hz = _positive("fc_hz (corner frequency)", fc_hz)
    gain = _positive("gain", gain)
    if family is not None and family not in FAMILIES:
        raise DesignError(f"topology family must be one of {', '.join(FAMILIES)}; got {family!r}")
    if response_type == "bandpass" or q is not None:
        return _single_second_order(response_type, order, fc_hz, gain, q, family)
    order = prototypes.check_order(2 if order is None else order)
    family = family or _default_family(order)
    if order > 1 and family in ("inverting", "non-inverting"):
        raise DesignError(
            f"topology {family!r} is first order only; order {order} needs 'sallen-key' or 'mfb'"
        )
    sections = prototypes.sections(prototypes.prototype_poles(response, order, ripple_db))
    return _assemble(response_type, sections, fc_hz, gain, family)


def _single_second_order(response_type, order, fc_hz, gain, q, family):
    if order not in (None, 2):
        raise DesignError(
            f"a {response_type} with Q given is one second-order stage: "
            f"order must be 2 or omitted, got {order!r}"
        )
    if q is None:
        raise DesignError("a band-pass needs its Q (q > 0)")
    q = _positive("q", q)
    if response_type == "bandpass":
        if family not in (None, "mfb"):
            raise DesignError(f"band-pass is built as an MFB stage only; got topology {family!r}")
        return [(REGISTRY["mfb-bandpass"], StageTarget(fc_hz, q, gain))]
    family = family or "sallen-key"
    if family in ("inverting", "non-inverting"):
        raise DesignError(
            f"topology {family!r} is first order only; a stage with Q needs 'sallen-key' or 'mfb'"
        )
    return _assemble(response_type, [(1.0, q)], fc_hz, gain, family)


def _assemble(response_type, sections, fc_hz, gain, family):
    wants_gain = abs(gain - 1.0) > 1e-12
    if family in ("sallen-key", "non-inverting") and gain < 1.0 - 1e-12:
        raise DesignError(
            f"gain {gain:g} is below 1: {family} stages only amplify; "
            f"use topology 'mfb' or 'inverting' for an attenuating filter"
        )
    stages: list[tuple[Topology, StageTarget]] = []
    placed = False
    for w0, q in sections:
        f0 = fc_hz * w0 if response_type == "lowpass" else fc_hz / w0
        stage_order = 1 if q is None else 2
        topo = _topology(family, stage_order, response_type, wants_gain and not placed)
        if topo.sets_gain:
            stage_gain, placed = (1.0, placed) if placed else (gain, True)
        else:
            stage_gain = None
        stages.append((topo, StageTarget(f0_hz=f0, q=q, gain=stage_gain)))
    return stages


def minimum_order(
    response: str,
    passband_hz: float,
    max_loss_db: float,
    stopband_hz: float,
    min_atten_db: float,
    response_type: str = "lowpass",
) -> int:
    """Smallest order whose response loses at most ``max_loss_db`` up to the passband edge
    and at least ``min_atten_db`` beyond the stopband edge (band edges as in scipy.signal's
    ``buttord``/``cheb1ord``; Chebyshev with ``ripple_db = max_loss_db``).

    Butterworth: n >= log10((10^(As/10) - 1) / (10^(Ap/10) - 1)) / (2 log10(ws/wp)) [1];
    Chebyshev I: n >= acosh(sqrt((10^(As/10) - 1) / (10^(Ap/10) - 1))) / acosh(ws/wp) [1];
    Bessel has no closed form: orders 1..8 are tried on the computed response, with the
    corner placed so that the loss at the passband edge is exactly ``max_loss_db``.

    References
    ----------
    .. [1] Standard order estimates for Butterworth and Chebyshev filters (from memory).
    """
    fp = _positive("passband edge", passband_hz)
    fs = _positive("stopband edge", stopband_hz)
    ap = _positive("passband loss (dB)", max_loss_db)
    a_s = _positive("stopband attenuation (dB)", min_atten_db)
    if response_type not in ("lowpass", "highpass"):
        raise DesignError(f"minimum order is for lowpass or highpass, got {response_type!r}")
    ratio = fs / fp if response_type == "lowpass" else fp / fs
    if ratio <= 1.0:
        raise DesignError(
            f"the stopband edge {fs:g} Hz must lie beyond the passband edge "
            f"{fp:g} Hz for a {response_type}"
        )
    if a_s <= ap:
        raise DesignError(
            f"stopband attenuation {a_s:g} dB must exceed the passband loss {ap:g} dB"
        )
    d = (10.0 ** (a_s / 10.0) - 1.0) / (10.0 ** (ap / 10.0) - 1.0)
    if response == "butterworth":
        n = math.ceil(math.log10(d) / (2.0 * math.log10(ratio)) - 1e-12)
    elif response == "chebyshev":
        n = math.ceil(math.acosh(math.sqrt(d)) / math.acosh(ratio) - 1e-12)
    elif response == "bessel":
        n = _bessel_order(ap, a_s, ratio)
    else:
        raise DesignError(
            f"response must be one of {', '.join(prototypes.RESPONSES)}; got {response!r}"
        )
    if n > prototypes.MAX_ORDER:
        raise DesignError(
            f"these limits need order {n}; picker designs up to order {prototypes.MAX_ORDER}"
        )
    return max(n, 1)


def _loss_edge(poles, loss_db: float) -> float:
    """Normalised frequency where the Bessel prototype has lost ``loss_db`` (bisection on
    the monotonic magnitude)."""
    lo, hi = 1e-4, 1e4
    for _ in range(120):
        mid = math.sqrt(lo * hi)
        mag = abs(np.prod(-poles / (1j * mid - poles)))
        if -20.0 * math.log10(mag) < loss_db:
            lo = mid
        else:
            hi = mid
    return math.sqrt(lo * hi)


def _bessel_order(ap: float, a_s: float, ratio: float) -> int:
    for n in range(1, prototypes.MAX_ORDER + 1):
        poles = prototypes.bessel_poles(n)
        if _loss_edge(poles, a_s) / _loss_edge(poles, ap) <= ratio * (1.0 + 1e-12):
            return n
    return prototypes.MAX_ORDER + 1
