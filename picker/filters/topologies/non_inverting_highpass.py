"""First-order non-inverting high-pass: a CR high-pass into a voltage follower.

    in --C1--+--(+)OA--+-- out          H(s) = s R1 C1 / (1 + s R1 C1)
             R1  (-)---+                f0 = 1 / (2 pi R1 C1),  gain 1 (set by the follower)
             |
            gnd

References
----------
.. [1] Passive CR section buffered by a unity-gain follower (common practice; from memory).
"""

from __future__ import annotations

from typing import ClassVar

from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class NonInvertingHighpass(Topology):
    key = "non-inverting-highpass"
    family = "non-inverting"
    response_type = "highpass"
    order = 1
    sets_gain = False
    inverting = False
    positions: ClassVar[tuple[PositionSpec, ...]] = (
        PositionSpec("C1", "capacitor", "series capacitor"),
        PositionSpec("R1", "resistor", "resistor to ground"),
    )

    def _k(self, values):
        return al.unity_like(al.value(values, "R1"))

    def characteristics(self, values):
        r1, c1 = al.value(values, "R1"), al.value(values, "C1")
        return al.first_order_hz(r1 * c1), None, self._k(values)

    def _cr(self, target, c):
        w0 = al.target_w0(target, self.key)
        c = al.choice("c", c, self.key)
        return {"C1": c, "R1": 1.0 / (w0 * c)}

    def synthesize(self, target, *, c=10e-9):
        """Ideal values. Free choice: ``c`` = C1 in farads (default 10 nF).
        The target's gain is ignored: a follower has gain 1."""
        return self._cr(target, c)

    def _core(self, values):
        return [
            Element("C", "C1", ("in", "p"), float(values["C1"])),
            Element("R", "R1", ("p", "0"), float(values["R1"])),
        ]

    def netlist(self, values):
        return self._core(values) + [Element("OA", "U1", ("p", "out", "out"))]


register(NonInvertingHighpass())
