"""Preferred-number series E3 ... E192 for resistors and capacitors (IEC 60063).

The tables are the published ones, not a formula: E3 to E24 are the historic
irregular values (2.7, 3.0, 3.3 ... 9.1 differ from ``round(10**(i/24), 1)``), and the
E48, E96 and E192 tables carry the one irregular entry 9.20 of E192 (the formula
gives 9.19). E96 is every second value of E192 and E48 every fourth.

References
----------
.. [1] IEC 60063:2015, Preferred number series for resistors and capacitors,
   tables 1 (E3 ... E24) and 2 (E48, E96, E192).
"""

from __future__ import annotations

import bisect
import math

_E24 = (
    1.0,
    1.1,
    1.2,
    1.3,
    1.5,
    1.6,
    1.8,
    2.0,
    2.2,
    2.4,
    2.7,
    3.0,
    3.3,
    3.6,
    3.9,
    4.3,
    4.7,
    5.1,
    5.6,
    6.2,
    6.8,
    7.5,
    8.2,
    9.1,
)

# E192, three significant digits, IEC 60063 table 2 (hundredths of the decade).
_E192_CODES = """
100 101 102 104 105 106 107 109 110 111 113 114 115 117 118 120 121 123 124 126 127 129
130 132 133 135 137 138 140 142 143 145 147 149 150 152 154 156 158 160 162 164 165 167
169 172 174 176 178 180 182 184 187 189 191 193 196 198 200 203 205 208 210 213 215 218
221 223 226 229 232 234 237 240 243 246 249 252 255 258 261 264 267 271 274 277 280 284
287 291 294 298 301 305 309 312 316 320 324 328 332 336 340 344 348 352 357 361 365 370
374 379 383 388 392 397 402 407 412 417 422 427 432 437 442 448 453 459 464 470 475 481
487 493 499 505 511 517 523 530 536 542 549 556 562 569 576 583 590 597 604 612 619 626
634 642 649 657 665 673 681 690 698 706 715 723 732 741 750 759 768 777 787 796 806 816
825 835 845 856 866 876 887 898 909 920 931 942 953 965 976 988
"""
_E192 = tuple(int(c) / 100 for c in _E192_CODES.split())

SERIES: dict[str, tuple[float, ...]] = {
    "E3": (1.0, 2.2, 4.7),
    "E6": (1.0, 1.5, 2.2, 3.3, 4.7, 6.8),
    "E12": _E24[::2],
    "E24": _E24,
    "E48": _E192[::4],
    "E96": _E192[::2],
    "E192": _E192,
}
ORDER = ("E3", "E6", "E12", "E24", "E48", "E96", "E192")


def series(name: str) -> tuple[float, ...]:
    """The mantissas of series ``name`` (``"E12"``, case-insensitive), in [1, 10), ascending."""
    key = str(name).upper()
    if key not in SERIES:
        from stock.errors import ValueParseError

        raise ValueParseError(f"unknown series '{name}'; use one of {', '.join(ORDER)}")
    return SERIES[key]


def _decade(value: float) -> tuple[float, int]:
    if not (value > 0 and math.isfinite(value)):
        from stock.errors import ValueParseError

        raise ValueParseError(f"'{value}' has no preferred value: it must be a positive number")
    exp = math.floor(math.log10(value))
    mant = value / 10.0**exp
    if mant >= 10.0:  # log10 rounding at an exact power of ten
        mant, exp = mant / 10.0, exp + 1
    elif mant < 1.0:
        mant, exp = mant * 10.0, exp - 1
    return mant, exp


def nearest(value: float, name: str) -> float:
    """The member of series ``name`` closest to ``value`` on a log scale, in any decade.

    Closeness is the ratio (|log(candidate / value)|), the way the series is spaced;
    the next decade's 1.0 is a candidate for values just below 10.

    Examples
    --------
    ``nearest(37.4e3, "E12")`` -> 39000.0; ``nearest(9.6, "E24")`` -> 10.0.
    """
    mants = series(name)
    mant, exp = _decade(value)
    i = bisect.bisect_left(mants, mant)
    cands = []
    if i < len(mants):
        cands.append(mants[i])
    else:
        cands.append(10.0)
    if i > 0:
        cands.append(mants[i - 1])
    best = min(cands, key=lambda m: abs(math.log(m / mant)))
    return float(f"{best * 10.0**exp:.12g}")


def series_of(value: float, *, rel_tol: float = 1e-6) -> str | None:
    """The smallest series (E3, E6 ... E192, in that order) that contains ``value``, or None.

    ``series_of(4700)`` -> ``"E3"``; ``series_of(3.0e-9)`` -> ``"E24"``;
    ``series_of(4870)`` -> ``"E48"``; ``series_of(4750)`` -> ``"E96"``;
    ``series_of(4.8e3)`` -> None.
    """
    try:
        mant, _ = _decade(value)
    except Exception:
        return None
    for name in ORDER:
        for m in SERIES[name]:
            if abs(m - mant) <= rel_tol * m or abs(m * 10 - mant) <= rel_tol * mant:
                return name
    return None


__all__ = ["ORDER", "SERIES", "nearest", "series", "series_of"]
