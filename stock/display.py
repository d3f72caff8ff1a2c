"""Values as a builder reads them in tables and schematics (CLI and terminal UI alike).

A pair's combined value is shown to four significant figures (``1k785`` for
1785.39 ohm, ``10n03``): the pieces' tolerances make further digits meaningless, and
the pieces themselves are listed beside it. The reading of a measured piece and a
nominal value are shown by :func:`stock.values.format_rkm` in full.
"""

from __future__ import annotations

import math

from stock.values import format_rkm

DIGITS = 4  # significant figures of a combined value


def format_rkm_display(value: float, kind: str, digits: int = DIGITS) -> str:
    """RKM text of ``value`` rounded to ``digits`` significant figures: ``1k785``,
    ``18k59``, ``4n8``. Not finite or not above 0: as :func:`format_rkm` shows it."""
    if not math.isfinite(value) or value <= 0:
        return format_rkm(value, kind)
    return format_rkm(float(f"{value:.{digits}g}"), kind)
