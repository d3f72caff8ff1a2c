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

HALF_POWER_DB = -10.0 * np.log10(2.0)      # -3.0103 dB
TRIAL_POINTS = 121


def _kind(chars) -> str:
    types = {topology.response_type for topology, *_ in chars}
    return types.pop() if len(types) == 1 and types <= {"lowpass", "highpass"} else "band"


def magnitude_db(chars, freqs: np.ndarray) -> np.ndarray:
    """|H| in dB of the cascade, shape ``(trials, len(freqs))``."""
    total = None
    for topology, f0, q, gain in chars:
        x = 1j * freqs[None, :] / np.asarray(f0, dtype=float)[:, None]
        g = np.asarray(gain, dtype=float)[:, None]
        if topology.order == 1:
            num = x if topology.response_type == "highpass" else 1.0
            h = g * num / (1.0 + x)
        else:
            qq = np.asarray(q, dtype=float)[:, None]
            num = {"lowpass": 1.0, "highpass": x * x, "bandpass": x / qq}[topology.response_type]
            h = g * num / (x * x + x / qq + 1.0)
        db = 20.0 * np.log10(np.abs(h))
        total = db if total is None else total + db
    return total


def _crossing(freqs, db, i_lo, i_hi, level):
    """log-f interpolation of ``level`` between grid columns i_lo and i_hi per row."""
    rows = np.arange(db.shape[0])
    d0, d1 = db[rows, i_lo], db[rows, i_hi]
    l0, l1 = np.log(freqs[i_lo]), np.log(freqs[i_hi])
    frac = (level - d0) / np.where(d1 == d0, 1.0, d1 - d0)
    return np.exp(l0 + (l1 - l0) * frac)


def _quantity(chars, freqs, kind):
    """(value, lower edge, upper edge) per trial; NaN where not found on the grid."""
    db = magnitude_db(chars, freqs)
    n = db.shape[0]
    nan = np.full(n, np.nan)
    if kind == "lowpass":
        ref = sum(20.0 * np.log10(np.abs(np.asarray(c[3], dtype=float))) for c in chars)
        below = db < ref[:, None] + HALF_POWER_DB
        i = np.argmax(below, axis=1)
        ok = below.any(axis=1) & (i > 0)
        f = np.where(ok, _crossing(freqs, db, np.maximum(i - 1, 0), i, ref + HALF_POWER_DB), nan)
        return f, f, f
    if kind == "highpass":
        ref = sum(20.0 * np.log10(np.abs(np.asarray(c[3], dtype=float))) for c in chars)
        above = db >= ref[:, None] + HALF_POWER_DB
        i = np.argmax(above, axis=1)
        ok = above.any(axis=1) & (i > 0)
        f = np.where(ok, _crossing(freqs, db, np.maximum(i - 1, 0), i, ref + HALF_POWER_DB), nan)
        return f, f, f
    peak = db.max(axis=1)
    level = peak + HALF_POWER_DB
    above = db >= level[:, None]
    first = np.argmax(above, axis=1)
    last = db.shape[1] - 1 - np.argmax(above[:, ::-1], axis=1)
    ok = (first > 0) & (last < db.shape[1] - 1)
    lo = np.where(ok, _crossing(freqs, db, np.maximum(first - 1, 0), first, level), nan)
    hi = np.where(ok, _crossing(freqs, db, last, np.minimum(last + 1, db.shape[1] - 1), level),
                  nan)
    return np.sqrt(lo * hi), lo, hi


def cascade_frequency(chars, *, around: tuple[float, float] | None = None):
    """One frequency per trial for the cascade ``chars`` = [(topology, f0, q, gain), ...].

    Low-pass or high-pass cascades: the -3 dB corner relative to the passband gain (the
    product of the stage gains). Anything else: sqrt(f_lo f_hi) of the outer -3 dB edges
    around the peak. ``around`` = (lower edge, upper edge) of the nominal design narrows
    the grid to a factor 2 outside them (trials beyond that give NaN); without it a wide
    grid spans the stage f0 values by a factor 30.

    Returns ``(values, quantity)``; ``quantity`` names what was measured.
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
    quantity = {"lowpass": "-3 dB corner of the cascade", "highpass": "-3 dB corner of the cascade",
                "band": "centre sqrt(f_lo f_hi) of the cascade's -3 dB edges"}[kind]
    return value, lo_edge, hi_edge, quantity
