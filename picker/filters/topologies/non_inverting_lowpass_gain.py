"""First-order non-inverting low-pass with gain: RC low-pass into a 1 + RB/RA amplifier.

    in --R1--+--(+)OA--+-- out          H(s) = (1 + RB/RA) / (1 + s R1 C1)
             C1   (-)--+--RB--out       f0 = 1 / (2 pi R1 C1),  gain = 1 + RB/RA
             |     |
            gnd    RA -- gnd            RA: inverting input to ground; RB: output to inverting input

References
----------
.. [1] Non-inverting amplifier gain 1 + Rf/Rg (common practice; from memory).
"""

from __future__ import annotations

from picker.filters import _algebra as al
from picker.filters.base import Element, PositionSpec, register
from picker.filters.topologies.non_inverting_lowpass import NonInvertingLowpass


class NonInvertingLowpassGain(NonInvertingLowpass):
    key = "non-inverting-lowpass-gain"
    sets_gain = True
    positions = NonInvertingLowpass.positions + (
        PositionSpec("RA", "resistor", "gain resistor to ground"),
        PositionSpec("RB", "resistor", "gain feedback resistor"),
    )

    def _gain(self, values):
        return 1.0 + al.value(values, "RB") / al.value(values, "RA")

    def synthesize(self, target, *, c=10e-9, ra=10e3):
        """Ideal values. Free choices: ``c`` = C1 (default 10 nF), ``ra`` = RA (default 10 k)."""
        gain = al.target_gain(target, self.key, above_one=True)
        out = self._rc(target, c)
        out.update(al.gain_network(gain, al.choice("ra", ra, self.key)))
        return out

    def netlist(self, values):
        return (
            self._rc_elements(values)
            + al.gain_elements(values, "n")
            + [Element("OA", "U1", ("p", "n", "out"))]
        )


register(NonInvertingLowpassGain())
