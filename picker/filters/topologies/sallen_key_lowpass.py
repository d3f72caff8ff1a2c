"""Second-order Sallen-Key low-pass, unity gain (op amp as a follower).

    in --R1--+--R2--+--(+)OA--+-- out
             |      C2   (-)--+            C1: from the R1-R2 junction to the output
             C1     |                      C2: from the (+) input to ground
             |     gnd
            out

    H(s) = K / (s^2 R1 R2 C1 C2 + s (C2 (R1 + R2) + R1 C1 (1 - K)) + 1),   K = 1 here
    f0 = 1 / (2 pi sqrt(R1 R2 C1 C2)),  Q = sqrt(R1 R2 C1 C2) / (C2 (R1 + R2) + R1 C1 (1 - K))

References
----------
.. [1] Sallen and Key, "A practical method of designing RC active filters", IRE Trans.
       Circuit Theory, 1955; the transfer function above is the standard result, re-derived
       from the node equations (from memory).
"""

from __future__ import annotations

import math
from typing import ClassVar

from picker.errors import DesignError
from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, Topology, register


class SallenKeyLowpass(Topology):
    key = "sallen-key-lowpass"
    family = "sallen-key"
    response_type = "lowpass"
    order = 2
    sets_gain = False
    inverting = False
    positions: ClassVar[tuple[PositionSpec, ...]] = (
        PositionSpec("R1", "resistor", "input resistor"),
        PositionSpec("R2", "resistor", "second resistor"),
        PositionSpec("C1", "capacitor", "feedback capacitor"),
        PositionSpec("C2", "capacitor", "capacitor to ground"),
    )

    def _k(self, values):
        return al.unity_like(al.value(values, "R1"))

    def characteristics(self, values):
        r1, r2, c1, c2 = (al.value(values, n) for n in ("R1", "R2", "C1", "C2"))
        k = self._k(values)
        f0, q = al.second_order(r1 * r2 * c1 * c2, c2 * (r1 + r2) + r1 * c1 * (1.0 - k))
        return f0, q, k

    @staticmethod
    def min_ratio(q: float, k: float = 1.0) -> float:
        """Smallest C1/C2 with real resistors: 4 Q^2 / (1 + 4 Q^2 (K - 1)) (from the
        discriminant of the resistor quadratic; derived here)."""
        return 4.0 * q * q / (1.0 + 4.0 * q * q * (k - 1.0))

    def _design(self, target, c, ratio, k):
        w0 = al.target_w0(target, self.key)
        q = al.target_q(target, self.key)
        c = al.choice("c", c, self.key)
        m_min = self.min_ratio(q, k)
        m = max(1.0, m_min) if ratio is None else al.choice("ratio", ratio, self.key)
        if m < m_min * (1.0 - 1e-12):
            raise DesignError(
                f"{self.key}: capacitor ratio C1/C2 = {m:g} is below the "
                f"{m_min:.4g} that Q = {q:g} needs for real resistors"
            )
        # a R1^2 - S R1 + P = 0 from f0 and Q with C2 = c, C1 = m c
        a, s, p = 1.0 + m * (1.0 - k), 1.0 / (w0 * q * c), 1.0 / (w0 * w0 * m * c * c)
        r1 = 2.0 * p / (s + math.sqrt(max(s * s - 4.0 * a * p, 0.0)))
        return {"R1": r1, "R2": p / r1, "C1": m * c, "C2": c}

    def synthesize(self, target, *, c=10e-9, ratio=None):
        """Ideal values. Free choices: ``c`` = C2 in farads (default 10 nF) and ``ratio`` =
        C1/C2 (default: the larger of 1 and the minimum 4 Q^2, which gives R1 = R2).
        Of the two resistor solutions the one with the smaller R1 is returned."""
        return self._design(target, c, ratio, 1.0)

    def _core(self, values):
        return [
            Element("R", "R1", ("in", "a"), float(values["R1"])),
            Element("R", "R2", ("a", "p"), float(values["R2"])),
            Element("C", "C1", ("a", "out"), float(values["C1"])),
            Element("C", "C2", ("p", "0"), float(values["C2"])),
        ]

    def netlist(self, values):
        return self._core(values) + [Element("OA", "U1", ("p", "out", "out"))]


register(SallenKeyLowpass())
