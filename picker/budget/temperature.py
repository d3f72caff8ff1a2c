"""Temperature drift of each stage over a span, from resistor tempcos and dielectric classes.

Reference temperature 25 C. Each piece gets a band of relative change over the span;
the stage's f0, Q and gain ranges are the extremes over every corner of those bands
(each piece drifting on its own: cautious, since pieces of one line usually track).

Figures (fractions; "linear" means per kelvin from 25 C, "class" means the whole
permitted change anywhere in the rated range, because the curve is not known):

==============  ======================  =============  =========================================
dielectric      figure                  rated range C  source
==============  ======================  =============  =========================================
C0G / NP0       linear 0 +/- 30 ppm/K   -55 .. 125     EIA-198 class 1 (C0G)
X7R             class +/-15 %           -55 .. 125     EIA-198 class 2 letter code X7R
X5R             class +/-15 %           -55 .. 85      EIA-198 class 2 letter code X5R
Y5V             class +22 / -82 %       -30 .. 85      EIA-198 class 2 letter code Y5V
polyester       linear about +400 ppm/K -55 .. 125     typical, common practice
polypropylene   linear about -200 ppm/K -55 .. 105     typical, common practice
film (unnamed)  linear +/-400 ppm/K     -55 .. 105     assumed as polyester, sign unknown
mica            linear +/-50 ppm/K      -55 .. 125     typical, common practice
electrolytic    class +/-20 %           -40 .. 105     wide; from memory
tantalum        class +/-10 %           -55 .. 125     from memory
(not given)     class +/-15 %           -55 .. 125     assumed as a class-2 ceramic (cautious)
resistor        linear +/- line tempco  -55 .. 155     stock line; else assumed 100 ppm/K
==============  ======================  =============  =========================================

References
----------
.. [1] EIA-198 (ceramic dielectric capacitors): class 1 C0G 0 +/- 30 ppm/K; class 2
       codes X (-55 C), Y (-30 C); 5 (+85 C), 7 (+125 C); R (+/-15 %), V (+22/-82 %).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from picker.budget.pieces import StagePieces
from picker.budget.tolerance import box_extremes

T_REF_C = 25.0
ASSUMED_RESISTOR_TEMPCO = 100e-6  # per K; common practice for general-purpose film resistors

# dielectric -> (model, lo, hi, rated_lo_c, rated_hi_c, words, assumed)
DIELECTRIC_FIGURES = {
    "C0G": ("linear", -30e-6, 30e-6, -55.0, 125.0, "0 +/- 30 ppm/K (EIA-198 class 1)", False),
    "NP0": ("linear", -30e-6, 30e-6, -55.0, 125.0, "0 +/- 30 ppm/K (EIA-198 class 1)", False),
    "X7R": ("class", -0.15, 0.15, -55.0, 125.0, "+/-15 % over -55..125 C (EIA-198 X7R)", False),
    "X5R": ("class", -0.15, 0.15, -55.0, 85.0, "+/-15 % over -55..85 C (EIA-198 X5R)", False),
    "Y5V": ("class", -0.82, 0.22, -30.0, 85.0, "+22/-82 % over -30..85 C (EIA-198 Y5V)", False),
    "polyester": (
        "linear",
        400e-6,
        400e-6,
        -55.0,
        125.0,
        "about +400 ppm/K (typical, common practice)",
        False,
    ),
    "polypropylene": (
        "linear",
        -200e-6,
        -200e-6,
        -55.0,
        105.0,
        "about -200 ppm/K (typical, common practice)",
        False,
    ),
    "film": (
        "linear",
        -400e-6,
        400e-6,
        -55.0,
        105.0,
        "+/-400 ppm/K assumed (film type not given; as polyester, sign unknown)",
        True,
    ),
    "mica": (
        "linear",
        -50e-6,
        50e-6,
        -55.0,
        125.0,
        "+/-50 ppm/K (typical, common practice)",
        False,
    ),
    "electrolytic": (
        "class",
        -0.20,
        0.20,
        -40.0,
        105.0,
        "about +/-20 % over -40..105 C (wide; from memory)",
        False,
    ),
    "tantalum": (
        "class",
        -0.10,
        0.10,
        -55.0,
        125.0,
        "about +/-10 % over -55..125 C (from memory)",
        False,
    ),
    None: (
        "class",
        -0.15,
        0.15,
        -55.0,
        125.0,
        "+/-15 % assumed (dielectric not given; treated as a class-2 ceramic)",
        True,
    ),
}


@dataclass(frozen=True)
class PieceDrift:
    label: str  # "R1", "C2a" ...
    lo: float  # relative change, fraction, lowest over the span
    hi: float
    figure: str  # the figure used, in words
    assumed: bool
    outside_rated: bool  # the span leaves the part's rated temperature range


@dataclass(frozen=True)
class TemperatureResult:
    span_c: tuple[float, float]
    f0: tuple[float, float]
    q: tuple[float, float] | None
    gain: tuple[float, float] | None
    pieces: tuple[PieceDrift, ...]


def linear_band(lo_per_k: float, hi_per_k: float, span_c: tuple[float, float]):
    """Extremes of a linear drift ``alpha * (T - 25 C)``, alpha in [lo, hi], over the span."""
    ends = [a * (t - T_REF_C) for a in (lo_per_k, hi_per_k) for t in span_c]
    if span_c[0] <= T_REF_C <= span_c[1]:
        ends.append(0.0)
    return min(ends), max(ends)


def piece_drift(label: str, piece, span_c: tuple[float, float]) -> PieceDrift:
    """Band of relative change of one piece over ``span_c`` (see the module table)."""
    line = piece.line
    if line.kind == "resistor":
        assumed = line.tempco is None
        tc = ASSUMED_RESISTOR_TEMPCO if assumed else abs(float(line.tempco))
        lo, hi = linear_band(-tc, tc, span_c)
        words = f"+/-{tc * 1e6:.0f} ppm/K" + (
            " assumed (common practice; the stock line gives none)" if assumed else " (stock line)"
        )
        return PieceDrift(label, lo, hi, words, assumed, span_c[0] < -55.0 or span_c[1] > 155.0)
    model, a, b, r_lo, r_hi, words, assumed = DIELECTRIC_FIGURES.get(
        line.dielectric, DIELECTRIC_FIGURES[None]
    )
    if model == "linear":
        lo, hi = linear_band(a, b, span_c)
    elif span_c[0] == span_c[1] == T_REF_C:
        lo, hi = 0.0, 0.0
    else:
        lo, hi = a, b
    return PieceDrift(label, lo, hi, words, assumed, span_c[0] < r_lo or span_c[1] > r_hi)


def temperature(
    topology, sp: StagePieces, span_c: tuple[float, float], *, sets_gain: bool
) -> TemperatureResult:
    """f0 (Hz), Q and gain ranges of one stage, nominal parts drifting over ``span_c``."""
    drifts = tuple(
        piece_drift(lbl, p, span_c) for lbl, p in zip(sp.labels, sp.pieces, strict=False)
    )
    nom = sp.nominal
    lo = nom * (1.0 + np.array([d.lo for d in drifts]))
    hi = nom * (1.0 + np.array([d.hi for d in drifts]))
    f0, q, gain, *_ = box_extremes(topology, sp, lo, hi)
    return TemperatureResult(
        span_c=span_c, f0=f0, q=q, gain=gain if sets_gain else None, pieces=drifts
    )
