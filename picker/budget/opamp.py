"""What the real op amp does to a stage: finite gain-bandwidth, slew rate, input impedance.

The stage's netlist goes through nodal analysis (``picker.analysis``) once with the
ideal op amp and once with the single-pole model of the chosen op amp (open-loop gain
A(s) = A0 / (1 + s/wp), A0 wp = 2 pi GBW, as ``picker.analysis`` models it). The
effective f0 and Q come from the stage's dominant natural frequencies (the one or two
poles of the netlist nearest the analytic f0; the op amp adds one far pole of its own):
for a pair p1, p2, w0^2 = p1 p2 and w0 / Q = -(p1 + p2); for one real pole, w0 = -p.
The effective gain is the response magnitude |H(j f0')| divided by the normalised
section's magnitude at its own f0' (Q' for a second-order low- or high-pass, 1 for a
band-pass, 1/sqrt(2) for a first-order stage). With the ideal op amp all three equal the
analytic values; the shift is what the finite gain-bandwidth does to the same parts.

References
----------
.. [1] Single-pole (dominant pole) op-amp model A(s) = wt / s, wt = 2 pi GBW (common
       practice; from memory).
.. [2] Full-power bandwidth f_p = SR / (2 pi V_peak): the highest frequency a sine of
       peak V_peak reaches without slew limiting (common practice; from memory).
.. [3] Rule of thumb GBW >= 100 x noise gain x f0 for a stage whose op amp should not
       move f0 or Q noticeably (common practice, from memory). The noise gain is taken
       from the circuit, not from the signal gain: the gain from a source in series with
       the op amp's + input to the output, with the stage's input grounded, at f0
       (nodal analysis, ideal op amp). For an inverting amplifier that is 1 + |G|; for a
       multiple-feedback stage it peaks near f0 and can be 80 or more where 1 + |G| is 2.

The warning does not rest on the rule: the shift that the finite GBW gives (above) is
computed, and a stage is flagged when it moves f0, Q or gain by more than
``SHIFT_LIMIT`` (1 %, a fifth of the default 5 % yield window).
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

GBW_RULE_FACTOR = 100.0
SHIFT_LIMIT = 0.01
ZIN_SPAN = (0.01, 100.0)
ZIN_POINTS = 61


@dataclass(frozen=True)
class OpampResult:
    name: str
    gbw_hz: float
    ideal: tuple[float, float | None, float]  # (f0_hz, q, gain), ideal op amp
    real: tuple[float, float | None, float]  # the same with the finite GBW
    shift: tuple[float, float | None, float]  # relative: real / ideal - 1
    gbw_needed_hz: float  # rule [3], with the circuit's noise gain at f0
    slew: float | None  # V/s
    vout_peak: float | None  # V
    full_power_hz: float | None  # rule [2], None without slew or vout_peak
    noise_gain: float = 1.0  # |Vout / V+| at f0, the stage's input grounded (ideal op amp)


def _section_shape(response_type: str, order: int, q: float | None) -> float:
    """|H| / gain of the normalised section at its own f0 (see the module docstring)."""
    if order == 1:
        return 1.0 / np.sqrt(2.0)
    assert q is not None  # a second-order section has a Q
    return 1.0 if response_type == "bandpass" else float(q)


def effective(
    topology, values: dict[str, float], f0_hz: float, gbw_hz: float | None
) -> tuple[float, float | None, float]:
    """(f0_hz, q or None, |gain|) of the stage from its dominant poles and its response.

    ``f0_hz`` is the analytic f0, used to pick the dominant poles; ``gbw_hz`` None is the
    ideal op amp.
    """
    from picker.analysis import nodal_response, poles

    elements = topology.netlist(values)
    lam = np.asarray(poles(elements, gbw_hz=gbw_hz), dtype=complex)
    w0 = 2.0 * np.pi * f0_hz
    near = lam[np.argsort(np.abs(np.log(np.abs(lam) / w0)))][: topology.order]
    if topology.order == 1:
        f0, q = float(-near[0].real) / (2.0 * np.pi), None
    else:
        prod, total = (near[0] * near[1]).real, (near[0] + near[1]).real
        w = float(np.sqrt(prod))
        f0, q = w / (2.0 * np.pi), float(w / -total)
    h = nodal_response(elements, np.array([f0]), gbw_hz=gbw_hz)[0]
    return f0, q, float(abs(h) / _section_shape(topology.response_type, topology.order, q))


def _response(elements, freqs, gbw_hz):
    from picker.analysis import nodal_response

    return nodal_response(elements, freqs, gbw_hz=gbw_hz)


def noise_gain(topology, values: dict[str, float], f_hz: float) -> float:
    """|Vout / Vn| at ``f_hz`` for a source Vn in series with the op amp's + input, the
    stage's input grounded, ideal op amp (nodal analysis of the stage's own netlist)."""
    from picker.analysis import nodal_response

    moved = []
    for e in topology.netlist(values):
        nodes = tuple("0" if n == "in" else n for n in e.nodes)
        if e.kind == "OA":  # the + input is driven by the test source (node "in")
            nodes = ("in", *nodes[1:])
        moved.append(replace(e, nodes=nodes))
    return float(abs(nodal_response(moved, np.array([f_hz]), gbw_hz=None)[0]))


def gbw_needed(topology, f0_hz: float, q: float | None, gain: float, *, values=None) -> float:
    """Rule [3]: the gain-bandwidth below which the op amp is too slow for the stage.

    With ``values`` the noise gain is the circuit's at f0 (:func:`noise_gain`); without
    them (no parts chosen yet) the rough estimate 1 + |G| (inverting) or |G|,
    times Q, is used."""
    if values is not None:
        return GBW_RULE_FACTOR * noise_gain(topology, values, f0_hz) * f0_hz
    ng = 1.0 + abs(gain) if topology.inverting else max(1.0, abs(gain))
    return GBW_RULE_FACTOR * ng * (1.0 if q is None else q) * f0_hz


def too_slow(oa: OpampResult) -> bool:
    """True when the finite GBW moves f0, Q or gain by more than ``SHIFT_LIMIT``."""
    return any(x is not None and abs(x) > SHIFT_LIMIT for x in oa.shift)


def opamp_effects(topology, values, nominal, opamp, *, vout_peak=None) -> OpampResult:
    """Shift of f0, Q and gain by the op amp's finite GBW, and its slew-rate limit."""
    f0, q, gain = nominal
    ideal = effective(topology, values, f0, None)
    ng = noise_gain(topology, values, f0)
    real = effective(topology, values, f0, float(opamp.gbw))
    q_shift = None if ideal[1] is None or real[1] is None else real[1] / ideal[1] - 1.0
    shift = (real[0] / ideal[0] - 1.0, q_shift, real[2] / ideal[2] - 1.0)
    fp = None
    if opamp.slew is not None and vout_peak is not None and vout_peak > 0:
        fp = float(opamp.slew) / (2.0 * np.pi * float(vout_peak))
    return OpampResult(
        name=opamp.name,
        gbw_hz=float(opamp.gbw),
        ideal=ideal,
        real=real,
        shift=shift,
        gbw_needed_hz=GBW_RULE_FACTOR * ng * f0,
        noise_gain=ng,
        slew=opamp.slew,
        vout_peak=vout_peak,
        full_power_hz=fp,
    )


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
    moved = [
        replace(e, nodes=tuple("zin_sense" if n == "in" else n for n in e.nodes)) for e in elements
    ]
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
