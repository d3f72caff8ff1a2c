"""First-order non-inverting high-pass with gain: CR high-pass into a 1 + RB/RA amplifier.

    in --C1--+--(+)OA--+-- out          H(s) = (1 + RB/RA) s R1 C1 / (1 + s R1 C1)
             R1   (-)--+--RB--out       f0 = 1 / (2 pi R1 C1),  gain = 1 + RB/RA (high frequency)
             |     |
            gnd    RA -- gnd            RA: inverting input to ground; RB: output to inverting input

References
----------
.. [1] Non-inverting amplifier gain 1 + Rf/Rg (common practice; from memory).
"""

from __future__ import annotations

from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, register
from picker.filters.topologies.non_inverting_highpass import NonInvertingHighpass


class NonInvertingHighpassGain(NonInvertingHighpass):
    key = "non-inverting-highpass-gain"
    sets_gain = True
    positions = NonInvertingHighpass.positions + (
        PositionSpec("RA", "resistor", "gain resistor to ground"),
        PositionSpec("RB", "resistor", "gain feedback resistor"),
    )

    def _gain(self, values):
        return 1.0 + al.value(values, "RB") / al.value(values, "RA")

    def synthesize(self, target, *, c=10e-9, ra=10e3):
        """Ideal values. Free choices: ``c`` = C1 (default 10 nF), ``ra`` = RA (default 10 k)."""
        gain = al.target_gain(target, self.key, above_one=True)
        out = self._cr(target, c)
        out.update(al.gain_network(gain, al.choice("ra", ra, self.key)))
        return out

    def netlist(self, values):
        return (
            self._cr_elements(values)
            + al.gain_elements(values, "n")
            + [Element("OA", "U1", ("p", "n", "out"))]
        )


register(NonInvertingHighpassGain())
