"""First-order non-inverting low-pass: an RC low-pass into a voltage follower.

    in --R1--+--(+)OA--+-- out          H(s) = 1 / (1 + s R1 C1)
             C1        |                f0 = 1 / (2 pi R1 C1),  gain 1 (set by the follower)
             |   (-)---+
            gnd

References
----------
.. [1] Passive RC section buffered by a unity-gain follower (common practice; from memory).
"""

from __future__ import annotations

from typing import ClassVar

from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class NonInvertingLowpass(Topology):
    key = "non-inverting-lowpass"
    family = "non-inverting"
    response_type = "lowpass"
    order = 1
    sets_gain = False
    inverting = False
    positions: ClassVar[tuple[PositionSpec, ...]] = (
        PositionSpec("R1", "resistor", "series resistor"),
        PositionSpec("C1", "capacitor", "capacitor to ground"),
    )

    def _k(self, values):
        return al.unity_like(al.value(values, "R1"))

    def characteristics(self, values):
        r1, c1 = al.value(values, "R1"), al.value(values, "C1")
        return al.first_order_hz(r1 * c1), None, self._k(values)

    def _rc(self, target, c):
        w0 = al.target_w0(target, self.key)
        c = al.choice("c", c, self.key)
        return {"R1": 1.0 / (w0 * c), "C1": c}

    def synthesize(self, target, *, c=10e-9):
        """Ideal values. Free choice: ``c`` = C1 in farads (default 10 nF).
        The target's gain is ignored: a follower has gain 1."""
        return self._rc(target, c)

    def _core(self, values):
        return [
            Element("R", "R1", ("in", "p"), float(values["R1"])),
            Element("C", "C1", ("p", "0"), float(values["C1"])),
        ]

    def netlist(self, values):
        return self._core(values) + [Element("OA", "U1", ("p", "out", "out"))]


register(NonInvertingLowpass())
