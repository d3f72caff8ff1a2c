"""Second-order Sallen-Key high-pass with gain K = 1 + RB/RA.

Same network as ``sallen-key-highpass``; RA from the inverting input to ground, RB from
the output to the inverting input. With K = 1 + RB/RA:

    f0 = 1 / (2 pi sqrt(R1 R2 C1 C2)),  Q = sqrt(R1 R2 C1 C2) / (R1 (C1 + C2) + R2 C2 (1 - K))

References
----------
.. [1] Sallen and Key, IRE Trans. Circuit Theory, 1955; standard result (from memory).
"""

from __future__ import annotations

from picker.filters import _algebra as al
from picker.filters.base import register
from picker.filters.topologies.sallen_key_highpass import SallenKeyHighpass


class SallenKeyHighpassGain(al.GainNetwork, SallenKeyHighpass):
    key = "sallen-key-highpass-gain"
    positions = SallenKeyHighpass.positions + al.GainNetwork.GAIN_POSITIONS

    def synthesize(self, target, *, c=10e-9, ratio=1.0, ra=10e3):
        """Ideal values. Free choices: ``c`` = C2 (default 10 nF), ``ratio`` = C1/C2
        (default 1), ``ra`` = RA (default 10 k). Always realisable for K > 1."""
        k = al.target_gain(target, self.key, above_one=True)
        return {**self._design(target, c, ratio, k), **self._gain_network(k, ra)}


register(SallenKeyHighpassGain())
