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
from picker.filters.base import register
from picker.filters.topologies.non_inverting_lowpass import NonInvertingLowpass


class NonInvertingLowpassGain(al.GainNetwork, NonInvertingLowpass):
    key = "non-inverting-lowpass-gain"
    positions = NonInvertingLowpass.positions + al.GainNetwork.GAIN_POSITIONS

    def synthesize(self, target, *, c=10e-9, ra=10e3):
        """Ideal values. Free choices: ``c`` = C1 (default 10 nF), ``ra`` = RA (default 10 k)."""
        gain = al.target_gain(target, self.key, above_one=True)
        return {**self._rc(target, c), **self._gain_network(gain, ra)}


register(NonInvertingLowpassGain())
