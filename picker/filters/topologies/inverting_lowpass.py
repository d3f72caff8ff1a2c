"""First-order inverting low-pass: R1 in, R2 with C1 across it in the feedback path.

    in --R1--+--(-)OA--+-- out          H(s) = -(R2/R1) / (1 + s R2 C1)
             +--R2-----+                f0 = 1 / (2 pi R2 C1),  |gain| = R2 / R1
             +--C1-----+                (+) input to ground

References
----------
.. [1] Standard inverting amplifier with a feedback capacitor (common practice; derived
       here from the virtual-ground node equation, from memory).
"""

from __future__ import annotations

from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class InvertingLowpass(Topology):
    key = "inverting-lowpass"
    family = "inverting"
    response_type = "lowpass"
    order = 1
    sets_gain = True
    inverting = True
    positions = (
        PositionSpec("R1", "resistor", "input resistor"),
        PositionSpec("R2", "resistor", "feedback resistor"),
        PositionSpec("C1", "capacitor", "feedback capacitor"),
    )

    def characteristics(self, values):
        r1, r2, c1 = (al.value(values, n) for n in ("R1", "R2", "C1"))
        return al.first_order_hz(r2 * c1), None, r2 / r1

    def synthesize(self, target, *, c=10e-9):
        """Ideal values. Free choice: ``c`` = C1 in farads (default 10 nF)."""
        w0 = al.target_w0(target, self.key)
        gain = al.target_gain(target, self.key)
        c = al.choice("c", c, self.key)
        r2 = 1.0 / (w0 * c)
        return {"R1": r2 / gain, "R2": r2, "C1": c}

    def netlist(self, values):
        return [
            Element("R", "R1", ("in", "n"), float(values["R1"])),
            Element("R", "R2", ("n", "out"), float(values["R2"])),
            Element("C", "C1", ("n", "out"), float(values["C1"])),
            Element("OA", "U1", ("0", "n", "out")),
        ]


register(InvertingLowpass())
