"""Second-order Sallen-Key low-pass with gain K = 1 + RB/RA.

Same network as ``sallen-key-lowpass``; the op amp is a non-inverting amplifier with RA
from its inverting input to ground and RB from the output to the inverting input. The
formulas are those of the unity module with K = 1 + RB/RA:

    f0 = 1 / (2 pi sqrt(R1 R2 C1 C2)),  Q = sqrt(R1 R2 C1 C2) / (C2 (R1 + R2) + R1 C1 (1 - K))

A stage whose denominator term goes to zero or below (large K) is unstable: Q is then
infinite or negative.

References
----------
.. [1] Sallen and Key, IRE Trans. Circuit Theory, 1955; standard result (from memory).
"""

from __future__ import annotations

from picker.filters import _algebra as al
from picker.filters.base import register
from picker.filters.topologies.sallen_key_lowpass import SallenKeyLowpass


class SallenKeyLowpassGain(al.GainNetwork, SallenKeyLowpass):
    key = "sallen-key-lowpass-gain"
    positions = SallenKeyLowpass.positions + al.GainNetwork.GAIN_POSITIONS

    def synthesize(self, target, *, c=10e-9, ratio=None, ra=10e3):
        """Ideal values. Free choices: ``c`` = C2 (default 10 nF), ``ratio`` = C1/C2
        (default: the larger of 1 and the minimum 4 Q^2 / (1 + 4 Q^2 (K - 1))), ``ra`` = RA
        (default 10 k)."""
        k = al.target_gain(target, self.key, above_one=True)
        return {**self._design(target, c, ratio, k), **self._gain_network(k, ra)}


register(SallenKeyLowpassGain())
