"""What the real op amp does to a stage: finite gain-bandwidth, slew rate, input impedance.

The stage's netlist is solved by nodal analysis (``picker.analysis.nodal_response``)
once with the ideal op amp and once with the single-pole model of the chosen op amp
(open-loop gain A(s) = GBW / (j f), the usual dominant-pole model). The effective f0, Q
and gain are then fitted from each response near f0, so the shift is what the finite
gain-bandwidth does to the same parts.

Fit: 1/H is a polynomial in x = j f / f0 with real coefficients for every first- and
second-order section (low-pass 2nd: 1/H = (1 + x/Q + x^2) / K, and alike), so a linear
least-squares fit of those coefficients over 0.5..2 f0 gives f0, Q and K exactly for an
ideal section and the best second-order (first-order) description otherwise.

References
----------
.. [1] Single-pole (dominant pole) op-amp model A(s) = wt / s, wt = 2 pi GBW (common
       practice; from memory).
.. [2] Full-power bandwidth f_p = SR / (2 pi V_peak): the highest frequency a sine of
       peak V_peak reaches without slew limiting (common practice; from memory).
.. [3] Rule of thumb GBW >= 100 x noise gain x Q x f0 for a stage whose op amp should not
       move f0 or Q noticeably (common practice, from memory; noise gain 1 + |G| for an
       inverting stage, G for a non-inverting one, Q = 1 for a first-order stage).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

FIT_SPAN = (0.5, 2.0)
FIT_POINTS = 41
GBW_RULE_FACTOR = 100.0
ZIN_SPAN = (0.01, 100.0)
ZIN_POINTS = 61

_EXPONENTS = {("lowpass", 2): (0, 1, 2), ("highpass", 2): (0, -1, -2),
              ("bandpass", 2): (1, 0, -1), ("lowpass", 1): (0, 1), ("highpass", 1): (0, -1)}


@dataclass(frozen=True)
class OpampResult:
    name: str
    gbw_hz: float
    ideal: tuple[float, float | None, float]        # fitted (f0_hz, q, gain), ideal op amp
    real: tuple[float, float | None, float]         # fitted with the finite GBW
    shift: tuple[float, float | None, float]        # relative: real / ideal - 1
    gbw_needed_hz: float                            # rule [3]
    slew: float | None                              # V/s
    vout_peak: float | None                         # V
    full_power_hz: float | None                     # rule [2], None without slew or vout_peak


def fit_section(freqs_hz, h, response_type: str, order: int, f0_guess_hz: float):
    """(f0_hz, q or None, |gain|) of a section fitted to the response ``h`` (see module)."""
    exps = _EXPONENTS[(response_type, order)]
    x = 1j * np.asarray(freqs_hz, dtype=float) / f0_guess_hz
    a = np.stack([x ** k for k in exps], axis=1)
    y = 1.0 / np.asarray(h, dtype=complex)
    c, *_ = np.linalg.lstsq(np.concatenate([a.real, a.imag]),
                            np.concatenate([y.real, y.imag]), rcond=None)
    cf = dict(zip(exps, c))
    k = 1.0 / abs(cf[0])
    if order == 1:
        r = cf[0] / cf[1] if response_type == "lowpass" else cf[-1] / cf[0]
        return float(r * f0_guess_hz), None, float(k)
    if response_type == "lowpass":
        r = np.sqrt(cf[0] / cf[2])
        q = cf[0] / (cf[1] * r)
    elif response_type == "highpass":
        r = np.sqrt(cf[-2] / cf[0])
        q = r * cf[0] / cf[-1]
    else:
        r = np.sqrt(cf[-1] / cf[1])
        q = np.sqrt(cf[1] * cf[-1]) / abs(cf[0])
    return float(r * f0_guess_hz), float(q), float(k)


def _response(elements, freqs, gbw_hz):
    from picker.analysis import nodal_response
    return nodal_response(elements, freqs, gbw_hz=gbw_hz)


def fitted(topology, values: dict[str, float], f0_hz: float, gbw_hz: float | None):
    """Fit of the stage's nodal response near ``f0_hz``, ideal op amp when gbw_hz is None."""
    freqs = np.geomspace(f0_hz * FIT_SPAN[0], f0_hz * FIT_SPAN[1], FIT_POINTS)
    h = _response(topology.netlist(values), freqs, gbw_hz)
    return fit_section(freqs, h, topology.response_type, topology.order, f0_hz)


def gbw_needed(topology, f0_hz: float, q: float | None, gain: float) -> float:
    """Rule [3]: the gain-bandwidth below which the op amp is too slow for the stage."""
    noise_gain = 1.0 + abs(gain) if topology.inverting else max(1.0, abs(gain))
    return GBW_RULE_FACTOR * noise_gain * (1.0 if q is None else q) * f0_hz


def opamp_effects(topology, values, nominal, opamp, *, vout_peak=None) -> OpampResult:
    """Shift of f0, Q and gain by the op amp's finite GBW, and its slew-rate limit."""
    f0, q, gain = nominal
    ideal = fitted(topology, values, f0, None)
    real = fitted(topology, values, f0, float(opamp.gbw))
    shift = tuple(None if (a is None or b is None) else b / a - 1.0 for a, b in zip(ideal, real))
    fp = None
    if opamp.slew is not None and vout_peak is not None and vout_peak > 0:
        fp = float(opamp.slew) / (2.0 * np.pi * float(vout_peak))
    return OpampResult(name=opamp.name, gbw_hz=float(opamp.gbw), ideal=ideal, real=real,
                       shift=shift, gbw_needed_hz=gbw_needed(topology, f0, q, gain),
                       slew=opamp.slew, vout_peak=vout_peak, full_power_hz=fp)


def input_impedance(topology, values, f0_hz: float, gbw_hz: float | None = None):
    """Lowest |Z_in| of the stage over 0.01..100 f0, and the frequency where it occurs.

    A sense resistor Rs is put between the source and the stage's input; with H the
    stage's response and H' the response through Rs, the divider gives exactly
    Z_in = Rs H' / (H - H'). Rs is the geometric mean of the stage's resistors.
    """
    from picker.filters.base import Element
    elements = topology.netlist(values)
    res = [e.value for e in elements if e.kind == "R"] or [1e4]
    rs = float(np.exp(np.mean(np.log(res))))
    moved = [replace(e, nodes=tuple("zin_sense" if n == "in" else n for n in e.nodes))
             for e in elements]
    moved.append(Element("R", "Rsense", ("in", "zin_sense"), rs))
    freqs = np.geomspace(f0_hz * ZIN_SPAN[0], f0_hz * ZIN_SPAN[1], ZIN_POINTS)
    h = _response(elements, freqs, gbw_hz)
    hs = _response(moved, freqs, gbw_hz)
    diff = h - hs
    ok = (np.abs(h) > 1e-9 * np.abs(h).max()) & (np.abs(diff) > 1e-12 * np.abs(h))
    if not ok.any():
        return float("inf"), float("nan")
    z = np.abs(rs * hs[ok] / diff[ok])
    i = int(np.argmin(z))
    return float(z[i]), float(freqs[ok][i])
