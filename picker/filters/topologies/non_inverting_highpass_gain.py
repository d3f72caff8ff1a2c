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
from picker.filters.base import register
from picker.filters.topologies.non_inverting_highpass import NonInvertingHighpass


class NonInvertingHighpassGain(al.GainNetwork, NonInvertingHighpass):
    key = "non-inverting-highpass-gain"
    positions = NonInvertingHighpass.positions + al.GainNetwork.GAIN_POSITIONS

    def synthesize(self, target, *, c=10e-9, ra=10e3):
        """Ideal values. Free choices: ``c`` = C1 (default 10 nF), ``ra`` = RA (default 10 k)."""
        gain = al.target_gain(target, self.key, above_one=True)
        return {**self._cr(target, c), **self._gain_network(gain, ra)}


register(NonInvertingHighpassGain())
