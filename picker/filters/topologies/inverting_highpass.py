"""First-order inverting high-pass: C1 in series with R1 at the input, R2 as feedback.

    in --C1--R1--+--(-)OA--+-- out      H(s) = -(R2/R1) s R1 C1 / (1 + s R1 C1)
                 +---R2----+            f0 = 1 / (2 pi R1 C1),  |gain| = R2 / R1 (high frequency)
                                        (+) input to ground

References
----------
.. [1] Standard inverting amplifier with a series input capacitor (common practice; derived
       here from the virtual-ground node equation, from memory).
"""

from __future__ import annotations

from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class InvertingHighpass(Topology):
    key = "inverting-highpass"
    family = "inverting"
    response_type = "highpass"
    order = 1
    sets_gain = True
    inverting = True
    positions = (
        PositionSpec("C1", "capacitor", "input capacitor"),
        PositionSpec("R1", "resistor", "input resistor"),
        PositionSpec("R2", "resistor", "feedback resistor"),
    )

    def characteristics(self, values):
        r1, r2, c1 = (al.value(values, n) for n in ("R1", "R2", "C1"))
        return al.first_order_hz(r1 * c1), None, r2 / r1

    def synthesize(self, target, *, c=10e-9):
        """Ideal values. Free choice: ``c`` = C1 in farads (default 10 nF)."""
        w0 = al.target_w0(target, self.key)
        gain = al.target_gain(target, self.key)
        c = al.choice("c", c, self.key)
        r1 = 1.0 / (w0 * c)
        return {"C1": c, "R1": r1, "R2": r1 * gain}

    def netlist(self, values):
        return [
            Element("C", "C1", ("in", "a"), float(values["C1"])),
            Element("R", "R1", ("a", "n"), float(values["R1"])),
            Element("R", "R2", ("n", "out"), float(values["R2"])),
            Element("OA", "U1", ("0", "n", "out")),
        ]


register(InvertingHighpass())
