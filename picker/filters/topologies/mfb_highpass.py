"""Second-order multiple-feedback (MFB) high-pass, inverting.

    in --C1--+--C2--+--(-)OA--+-- out      C3: from the junction a to the output
             |      |   (+) gnd           R2: from the inverting input to the output
             R1     +----R2---+            R1: from the junction a to ground
             |
            gnd

    H(s) = -(C1/C3) s^2 / (s^2 + s (C1 + C2 + C3) / (R2 C2 C3) + 1 / (R1 R2 C2 C3))
    f0 = 1 / (2 pi sqrt(R1 R2 C2 C3)),  Q = sqrt(R1 R2 C2 C3) / (R1 (C1 + C2 + C3)),
    |gain| = C1 / C3 (high frequency)

References
----------
.. [1] Standard multiple-feedback high-pass section; transfer function re-derived from
       the node equations (from memory).
"""

from __future__ import annotations

from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class MfbHighpass(Topology):
    key = "mfb-highpass"
    family = "mfb"
    response_type = "highpass"
    order = 2
    sets_gain = True
    inverting = True
    positions = (
        PositionSpec("C1", "capacitor", "input capacitor"),
        PositionSpec("C2", "capacitor", "capacitor to the inverting input"),
        PositionSpec("C3", "capacitor", "feedback capacitor"),
        PositionSpec("R1", "resistor", "resistor to ground"),
        PositionSpec("R2", "resistor", "feedback resistor"),
    )

    def characteristics(self, values):
        r1, r2, c1, c2, c3 = (al.value(values, n) for n in ("R1", "R2", "C1", "C2", "C3"))
        f0, q = al.second_order(r1 * r2 * c2 * c3, r1 * (c1 + c2 + c3))
        return f0, q, c1 / c3

    def synthesize(self, target, *, c=10e-9):
        """Ideal values. Free choice: ``c`` = C1 = C2 in farads (default 10 nF); then
        C3 = c/|gain|, R2 = (2K + 1) Q / (w0 c), R1 = K / ((2K + 1) Q w0 c) (derived here).
        Realisable for every Q > 0 and gain > 0."""
        w0 = al.target_w0(target, self.key)
        q = al.target_q(target, self.key)
        k = al.target_gain(target, self.key)
        c = al.choice("c", c, self.key)
        return {
            "C1": c,
            "C2": c,
            "C3": c / k,
            "R1": k / ((2.0 * k + 1.0) * q * w0 * c),
            "R2": (2.0 * k + 1.0) * q / (w0 * c),
        }

    def netlist(self, values):
        return [
            Element("C", "C1", ("in", "a"), float(values["C1"])),
            Element("C", "C2", ("a", "n"), float(values["C2"])),
            Element("C", "C3", ("a", "out"), float(values["C3"])),
            Element("R", "R1", ("a", "0"), float(values["R1"])),
            Element("R", "R2", ("n", "out"), float(values["R2"])),
            Element("OA", "U1", ("0", "n", "out")),
        ]


register(MfbHighpass())
