"""Overall -3 dB frequencies of a cascade from the stage characteristics, over arrays.

Each stage is the analytic first- or second-order section of its type, written with
x = j f / f0 (f0 the stage's pole or centre frequency, gain its passband magnitude):

    low-pass  1st  g / (1 + x)            2nd  g / (x^2 + x/Q + 1)
    high-pass 1st  g x / (1 + x)          2nd  g x^2 / (x^2 + x/Q + 1)
    band-pass 2nd  g (x/Q) / (x^2 + x/Q + 1)

References
----------
.. [1] Standard first- and second-order normalised sections, H(s) with s/w0 (common
       practice; from memory).  The -3 dB level is |H|^2 = |H_ref|^2 / 2.
"""

from __future__ import annotations

import numpy as np

HALF_POWER_DB = -10.0 * np.log10(2.0)  # -3.0103 dB
TRIAL_POINTS = 121
REFINE_STEPS = 2


def _kind(chars) -> str:
    types = {topology.response_type for topology, *_ in chars}
    return types.pop() if len(types) == 1 and types <= {"lowpass", "highpass"} else "band"


def magnitude_db(chars, freqs: np.ndarray) -> np.ndarray:
    """|H| in dB of the cascade, shape ``(trials, len(freqs))``; ``freqs`` is one grid for
    all trials, or an array ``(trials, k)`` of frequencies per trial.

    Real arithmetic on |H|^2 with u = f / f0 (|x|^2 = u^2, |x^2 + x/Q + 1|^2 =
    (1 - u^2)^2 + (u/Q)^2), multiplied over the stages, one logarithm at the end.
    """
    freqs = np.asarray(freqs, dtype=float)
    f = freqs[None, :] if freqs.ndim == 1 else freqs
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return _magnitude_db(chars, f)


def _magnitude_db(chars, f):
    total = None
    for topology, f0, q, gain in chars:
        u2 = (f / np.asarray(f0, dtype=float)[:, None]) ** 2
        g2 = np.asarray(gain, dtype=float)[:, None] ** 2
        if topology.order == 1:
            num = u2 if topology.response_type == "highpass" else 1.0
            h2 = g2 * num / (1.0 + u2)
        else:
            iq2 = 1.0 / np.asarray(q, dtype=float)[:, None] ** 2
            num = {"lowpass": 1.0, "highpass": u2 * u2, "bandpass": u2 * iq2}[
                topology.response_type
            ]
            h2 = g2 * num / ((1.0 - u2) ** 2 + u2 * iq2)
        total = h2 if total is None else total * h2
    return 10.0 * np.log10(total)


def _crossing(chars, freqs, db, i_lo, i_hi, level, *, iters=REFINE_STEPS):
    """Frequency where the cascade's dB equals ``level`` between grid columns i_lo, i_hi.

    Linear interpolation in log f, then ``iters`` steps of regula falsi on the exact
    magnitude (each keeps the bracket), all trials at once.
    """
    rows = np.arange(db.shape[0])
    la, lb = np.log(freqs[i_lo]), np.log(freqs[i_hi])
    da, dbb = db[rows, i_lo] - level, db[rows, i_hi] - level
    for step in range(iters + 1):
        frac = np.clip(-da / np.where(dbb == da, 1.0, dbb - da), 0.0, 1.0)
        lc = la + (lb - la) * frac
        if step == iters:
            return np.exp(lc)
        dc = magnitude_db(chars, np.exp(lc)[:, None])[:, 0] - level
        same = np.sign(dc) == np.sign(da)
        la, da = np.where(same, lc, la), np.where(same, dc, da)
        lb, dbb = np.where(same, lb, lc), np.where(same, dbb, dc)
    return np.exp(lc)


def _quantity(chars, freqs, kind):
    """(value, lower edge, upper edge) per trial; NaN where not found on the grid."""
    db = magnitude_db(chars, freqs)
    n = db.shape[0]
    nan = np.full(n, np.nan)
    if kind in ("lowpass", "highpass"):
        # passband maximum: the DC (HF) gain, or a ripple peak above it on the grid
        ref = np.maximum(
            sum(20.0 * np.log10(np.abs(np.asarray(c[3], dtype=float))) for c in chars),
            db.max(axis=1),
        )
    if kind == "lowpass":
        below = db < ref[:, None] + HALF_POWER_DB
        i = np.argmax(below, axis=1)
        ok = below.any(axis=1) & (i > 0)
        f = np.where(
            ok, _crossing(chars, freqs, db, np.maximum(i - 1, 0), i, ref + HALF_POWER_DB), nan
        )
        return f, f, f
    if kind == "highpass":
        above = db >= ref[:, None] + HALF_POWER_DB
        i = np.argmax(above, axis=1)
        ok = above.any(axis=1) & (i > 0)
        f = np.where(
            ok, _crossing(chars, freqs, db, np.maximum(i - 1, 0), i, ref + HALF_POWER_DB), nan
        )
        return f, f, f
    peak = db.max(axis=1)
    level = peak + HALF_POWER_DB
    above = db >= level[:, None]
    first = np.argmax(above, axis=1)
    last = db.shape[1] - 1 - np.argmax(above[:, ::-1], axis=1)
    ok = (first > 0) & (last < db.shape[1] - 1)
    lo = np.where(ok, _crossing(chars, freqs, db, np.maximum(first - 1, 0), first, level), nan)
    hi = np.where(
        ok, _crossing(chars, freqs, db, last, np.minimum(last + 1, db.shape[1] - 1), level), nan
    )
    return np.sqrt(lo * hi), lo, hi


def cascade_frequency(chars, *, around: tuple[float, float] | None = None):
    """One frequency per trial for the cascade ``chars`` = [(topology, f0, q, gain), ...].

    Low-pass or high-pass cascades: the -3 dB corner relative to the passband maximum (the
    product of the stage gains, or the top of an even-order Chebyshev ripple). Anything
    else: sqrt(f_lo f_hi) of the outer -3 dB edges around the peak. ``around`` = (lower
    edge, upper edge) of the nominal design narrows the grid to a factor 2 outside them
    (trials beyond that give NaN); without it a wide grid spans the stage f0 values by a
    factor 30. Each crossing is interpolated in log f and refined by regula falsi on the
    exact magnitude (``_crossing``).

    Returns ``(values, lower edges, upper edges, quantity)``; ``quantity`` names what was
    measured (for low- and high-pass all three arrays are the corner).
    """
    kind = _kind(chars)
    if around is None:
        f0s = np.concatenate([np.ravel(c[1]) for c in chars])
        freqs = np.geomspace(f0s.min() / 30.0, f0s.max() * 30.0, 4001)
    else:
        lo, hi = around
        points = max(TRIAL_POINTS, int(np.ceil(np.log(4.0 * hi / lo) / np.log(1.0116))))
        freqs = np.geomspace(lo / 2.0, hi * 2.0, min(points, 600))
    value, lo_edge, hi_edge = _quantity(chars, freqs, kind)
    quantity = {
        "lowpass": "-3 dB corner of the cascade",
        "highpass": "-3 dB corner of the cascade",
        "band": "centre sqrt(f_lo f_hi) of the cascade's -3 dB edges",
    }[kind]
    return value, lo_edge, hi_edge, quantity
