"""Second-order multiple-feedback (MFB) low-pass, inverting.

    in --R1--+--R3--+--(-)OA--+-- out      R2: from the junction a to the output
             |      |   (+) gnd           C1: from the inverting input to the output
             C2     +----C1---+            C2: from the junction a to ground
             |
            gnd

    H(s) = -(R2/R1) / (s^2 R2 R3 C1 C2 + s C1 (R2 + R3 + R2 R3 / R1) + 1)
    f0 = 1 / (2 pi sqrt(R2 R3 C1 C2)),  Q = sqrt(R2 R3 C1 C2) / (C1 (R2 + R3 + R2 R3 / R1)),
    |gain| = R2 / R1

References
----------
.. [1] Standard multiple-feedback (infinite-gain, Rauch) low-pass section; transfer function
       re-derived from the node equations (from memory).
"""

from __future__ import annotations

import math

from picker.errors import DesignError
from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class MfbLowpass(Topology):
    key = "mfb-lowpass"
    family = "mfb"
    response_type = "lowpass"
    order = 2
    sets_gain = True
    inverting = True
    positions = (
        PositionSpec("R1", "resistor", "input resistor"),
        PositionSpec("R2", "resistor", "feedback resistor"),
        PositionSpec("R3", "resistor", "resistor to the inverting input"),
        PositionSpec("C1", "capacitor", "feedback capacitor"),
        PositionSpec("C2", "capacitor", "capacitor to ground"),
    )

    def characteristics(self, values):
        r1, r2, r3, c1, c2 = (al.value(values, n) for n in ("R1", "R2", "R3", "C1", "C2"))
        f0, q = al.second_order(r2 * r3 * c1 * c2, c1 * (r2 + r3 + r2 * r3 / r1))
        return f0, q, r2 / r1

    @staticmethod
    def min_ratio(q: float, gain: float) -> float:
        """Smallest C2/C1 with real resistors: 4 Q^2 (1 + |gain|) (derived here)."""
        return 4.0 * q * q * (1.0 + gain)

    def synthesize(self, target, *, c=10e-9, ratio=None):
        """Ideal values. Free choices: ``c`` = C1 in farads (default 10 nF) and ``ratio`` =
        C2/C1 (default: the minimum 4 Q^2 (1 + |gain|)). Of the two resistor solutions the
        one with the larger R2 is returned."""
        w0 = al.target_w0(target, self.key)
        q = al.target_q(target, self.key)
        k = al.target_gain(target, self.key)
        c = al.choice("c", c, self.key)
        m_min = self.min_ratio(q, k)
        m = m_min if ratio is None else al.choice("ratio", ratio, self.key)
        if m < m_min * (1.0 - 1e-12):
            raise DesignError(
                f"{self.key}: capacitor ratio C2/C1 = {m:g} is below the "
                f"{m_min:.4g} that Q = {q:g} and gain {k:g} need"
            )
        # R2^2 - S R2 + (1 + K) P = 0 with C1 = c, C2 = m c, R2 R3 = P
        s, p = 1.0 / (w0 * q * c), 1.0 / (w0 * w0 * m * c * c)
        r2 = (s + math.sqrt(max(s * s - 4.0 * (1.0 + k) * p, 0.0))) / 2.0
        return {"R1": r2 / k, "R2": r2, "R3": p / r2, "C1": c, "C2": m * c}

    def netlist(self, values):
        return [
            Element("R", "R1", ("in", "a"), float(values["R1"])),
            Element("R", "R2", ("a", "out"), float(values["R2"])),
            Element("R", "R3", ("a", "n"), float(values["R3"])),
            Element("C", "C1", ("n", "out"), float(values["C1"])),
            Element("C", "C2", ("a", "0"), float(values["C2"])),
            Element("OA", "U1", ("0", "n", "out")),
        ]


register(MfbLowpass())
