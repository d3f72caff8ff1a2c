"""Second-order multiple-feedback (MFB) band-pass, inverting.

    in --R1--+--C2--+--(-)OA--+-- out      C1: from the junction a to the output
             |      |   (+) gnd           R3: from the inverting input to the output
             R2     +----R3---+            R2: from the junction a to ground
             |
            gnd

    H(s) = -(s / (R1 C1)) / (s^2 + s (C1 + C2) / (R3 C1 C2) + (1/R1 + 1/R2) / (R3 C1 C2))
    f0 = sqrt((1/R1 + 1/R2) / (R3 C1 C2)) / (2 pi)      (centre frequency)
    Q = 2 pi f0 R3 C1 C2 / (C1 + C2),   |gain at f0| = R3 C2 / (R1 (C1 + C2))

References
----------
.. [1] Standard multiple-feedback (Delyiannis-Friend) band-pass section; transfer function
       re-derived from the node equations (from memory).
"""

from __future__ import annotations

from picker.errors import DesignError
from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class MfbBandpass(Topology):
    key = "mfb-bandpass"
    family = "mfb"
    response_type = "bandpass"
    order = 2
    sets_gain = True
    inverting = True
    positions = (
        PositionSpec("R1", "resistor", "input resistor"),
        PositionSpec("R2", "resistor", "resistor to ground"),
        PositionSpec("R3", "resistor", "feedback resistor"),
        PositionSpec("C1", "capacitor", "feedback capacitor"),
        PositionSpec("C2", "capacitor", "capacitor to the inverting input"),
    )

    def characteristics(self, values):
        r1, r2, r3, c1, c2 = (al.value(values, n) for n in ("R1", "R2", "R3", "C1", "C2"))
        rp = r1 * r2 / (r1 + r2)
        f0, q = al.second_order(r3 * c1 * c2 * rp, (c1 + c2) * rp)
        return f0, q, r3 * c2 / (r1 * (c1 + c2))

    def synthesize(self, target, *, c=10e-9):
        """Ideal values. Free choice: ``c`` = C1 = C2 in farads (default 10 nF); then
        R3 = 2 Q / (w0 c), R1 = Q / (K w0 c), R2 = Q / ((2 Q^2 - K) w0 c) (derived here).
        Needs |gain| < 2 Q^2."""
        w0 = al.target_w0(target, self.key)
        q = al.target_q(target, self.key)
        k = al.target_gain(target, self.key)
        c = al.choice("c", c, self.key)
        if k >= 2.0 * q * q:
            raise DesignError(
                f"{self.key}: centre gain {k:g} must be below 2 Q^2 = "
                f"{2.0 * q * q:.4g} for Q = {q:g}; lower the gain or raise Q"
            )
        return {
            "R1": q / (k * w0 * c),
            "R2": q / ((2.0 * q * q - k) * w0 * c),
            "R3": 2.0 * q / (w0 * c),
            "C1": c,
            "C2": c,
        }

    def netlist(self, values):
        return [
            Element("R", "R1", ("in", "a"), float(values["R1"])),
            Element("R", "R2", ("a", "0"), float(values["R2"])),
            Element("C", "C1", ("a", "out"), float(values["C1"])),
            Element("C", "C2", ("a", "n"), float(values["C2"])),
            Element("R", "R3", ("n", "out"), float(values["R3"])),
            Element("OA", "U1", ("0", "n", "out")),
        ]


register(MfbBandpass())
