"""Reading a computed response: dB, phase, corner frequency, ripple, stage estimates."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from picker.errors import DesignError
from picker.filters.base import Element


def magnitude_db(h) -> np.ndarray:
    """20 log10 |H|."""
    with np.errstate(divide="ignore"):
        return 20.0 * np.log10(np.abs(np.asarray(h)))


def phase_deg(h) -> np.ndarray:
    """Phase of H in degrees, unwrapped along the frequency axis."""
    return np.degrees(np.unwrap(np.angle(np.asarray(h))))


def _reference_db(mag_db: np.ndarray, reference) -> float:
    if reference == "auto":
        return float(max(mag_db[0], mag_db[-1]))
    if reference == "peak":
        return float(np.max(mag_db))
    return float(20.0 * np.log10(reference))


HALF_POWER_DB = -10.0 * np.log10(2.0)  # "-3 dB" exactly: half the power, |H| = 1/sqrt(2)


def corner_hz(freqs_hz, h, *, level_db: float = HALF_POWER_DB, reference="auto") -> float:
    """Frequency where |H| first falls ``level_db`` (negative; default the half-power level
    -3.0103 dB) below the passband reference,
    searching from the passband end of the grid (the end with the larger magnitude: low
    end for a low-pass, high end for a high-pass). ``reference``: "auto" (that end's
    magnitude), "peak" (the largest magnitude) or a magnitude. Interpolated linearly in dB
    against log frequency. DesignError when there is no crossing on the grid.
    """
    f = np.asarray(freqs_hz, dtype=float)
    mag = magnitude_db(h)
    rel = mag - _reference_db(mag, reference)
    if mag[-1] > mag[0]:
        f, rel = f[::-1], rel[::-1]
    below = np.nonzero(rel < level_db)[0]
    if len(below) == 0 or below[0] == 0:
        raise DesignError(f"no {level_db:g} dB crossing between {f.min():g} and {f.max():g} Hz")
    i = below[0]
    x0, x1 = np.log(f[i - 1]), np.log(f[i])
    y0, y1 = rel[i - 1], rel[i]
    return float(np.exp(x0 + (level_db - y0) * (x1 - x0) / (y1 - y0)))


def passband_ripple_db(freqs_hz, h, f_lo_hz: float, f_hi_hz: float) -> float:
    """Peak-to-peak variation of |H| in dB over the grid points in [f_lo_hz, f_hi_hz]."""
    f = np.asarray(freqs_hz, dtype=float)
    band = (f >= f_lo_hz) & (f <= f_hi_hz)
    if not band.any():
        raise DesignError(f"no grid frequency between {f_lo_hz:g} and {f_hi_hz:g} Hz")
    mag = magnitude_db(h)[band]
    return float(mag.max() - mag.min())


def estimate_stage(
    elements: Sequence[Element], order: int, response_type: str, *, gbw_hz: float | None = None
) -> tuple[float, float | None, float]:
    """(f0_hz, q, |gain|) of one stage read from its netlist: the ``order`` poles of
    smallest magnitude give f0 and Q (a finite-GBW op amp adds poles far above them);
    the gain is |H| divided by the ideal shape of those poles at a reference frequency:
    DC (low-pass), f0 (band-pass), or for a high-pass the geometric mean of w0 and the
    next pole (100 w0 when there is none). An estimate for finite GBW; exact when ideal.
    """
    from picker.analysis.nodal import nodal_response, poles

    p = poles(elements, gbw_hz=gbw_hz)
    if len(p) < order:
        raise DesignError(f"netlist has {len(p)} poles; a stage of order {order} needs {order}")
    dom, rest = p[:order], p[order:]
    if order == 1:
        w0, q = float(abs(dom[0])), None
    else:
        w0 = float(np.sqrt(abs(dom[0] * dom[1])))
        q = float(w0 / -np.real(dom[0] + dom[1]))
    if response_type == "lowpass":
        wr = 0.0
    elif response_type == "bandpass":
        wr = w0
    else:
        wr = float(np.sqrt(w0 * abs(rest[0]))) if len(rest) else 100.0 * w0
    s = 1j * wr
    if order == 1:
        shape = (
            (1.0 if response_type == "lowpass" else s)
            / (s + w0)
            * (w0 if response_type == "lowpass" else 1.0)
        )
    else:
        assert q is not None  # set from the two dominant poles above
        num = {"lowpass": w0 * w0, "highpass": s * s, "bandpass": s * w0 / q}[response_type]
        shape = num / (s * s + s * w0 / q + w0 * w0)
    h = nodal_response(elements, [wr / (2.0 * np.pi)], gbw_hz=gbw_hz)[0]
    return w0 / (2.0 * np.pi), q, float(abs(h) / abs(shape))
