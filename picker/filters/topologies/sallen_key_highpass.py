"""Second-order Sallen-Key high-pass, unity gain (op amp as a follower).

    in --C1--+--C2--+--(+)OA--+-- out
             |      R2   (-)--+            R1: from the C1-C2 junction to the output
             R1     |                      R2: from the (+) input to ground
             |     gnd
            out

    H(s) = K s^2 R1 R2 C1 C2 / (s^2 R1 R2 C1 C2 + s (R1 (C1 + C2) + R2 C2 (1 - K)) + 1),  K = 1
    f0 = 1 / (2 pi sqrt(R1 R2 C1 C2)),  Q = sqrt(R1 R2 C1 C2) / (R1 (C1 + C2) + R2 C2 (1 - K))

References
----------
.. [1] Sallen and Key, IRE Trans. Circuit Theory, 1955; the standard result, re-derived
       from the node equations (from memory).
"""

from __future__ import annotations

import math
from typing import ClassVar

from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class SallenKeyHighpass(Topology):
    key = "sallen-key-highpass"
    family = "sallen-key"
    response_type = "highpass"
    order = 2
    sets_gain = False
    inverting = False
    positions: ClassVar[tuple[PositionSpec, ...]] = (
        PositionSpec("C1", "capacitor", "input capacitor"),
        PositionSpec("C2", "capacitor", "second capacitor"),
        PositionSpec("R1", "resistor", "feedback resistor"),
        PositionSpec("R2", "resistor", "resistor to ground"),
    )

    def _k(self, values):
        return al.unity_like(al.value(values, "R1"))

    def characteristics(self, values):
        r1, r2, c1, c2 = (al.value(values, n) for n in ("R1", "R2", "C1", "C2"))
        k = self._k(values)
        f0, q = al.second_order(r1 * r2 * c1 * c2, r1 * (c1 + c2) + r2 * c2 * (1.0 - k))
        return f0, q, k

    def _design(self, target, c, ratio, k):
        w0 = al.target_w0(target, self.key)
        q = al.target_q(target, self.key)
        c = al.choice("c", c, self.key)
        m = al.choice("ratio", ratio, self.key)
        # c (m + 1) R1^2 - S R1 + (1 - K) c P = 0 with C2 = c, C1 = m c, R1 R2 = P
        p, s, a = 1.0 / (w0 * w0 * m * c * c), 1.0 / (w0 * q), c * (m + 1.0)
        r1 = (s + math.sqrt(s * s - 4.0 * a * (1.0 - k) * c * p)) / (2.0 * a)
        return {"C1": m * c, "C2": c, "R1": r1, "R2": p / r1}

    def synthesize(self, target, *, c=10e-9, ratio=1.0):
        """Ideal values. Free choices: ``c`` = C2 in farads (default 10 nF) and ``ratio`` =
        C1/C2 (default 1, equal capacitors; then R2/R1 = 4 Q^2)."""
        return self._design(target, c, ratio, 1.0)

    def _core(self, values):
        return [
            Element("C", "C1", ("in", "a"), float(values["C1"])),
            Element("C", "C2", ("a", "p"), float(values["C2"])),
            Element("R", "R1", ("a", "out"), float(values["R1"])),
            Element("R", "R2", ("p", "0"), float(values["R2"])),
        ]

    def netlist(self, values):
        return self._core(values) + [Element("OA", "U1", ("p", "out", "out"))]


register(SallenKeyHighpass())
