"""Shared algebra of the topology modules: value access, target checks, second-order helpers.

Every second-order stage here has a denominator of the form ``b0 s^2 + b1 s + 1``, so
``w0 = 1/sqrt(b0)`` and ``Q = sqrt(b0)/b1`` (standard second-order section; from memory).
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from typing import TYPE_CHECKING

from picker.errors import DesignError
from picker.filters.base import Element, PositionSpec, Topology
from picker.parts import StageTarget

if TYPE_CHECKING:
    import numpy as np

# numpy is imported inside the functions that evaluate, so that reading a topology's
# netlist (``picker netlist``) does not load it

TWO_PI = 2.0 * math.pi


def value(values: Mapping[str, np.ndarray | float], name: str) -> np.ndarray:
    """``values[name]`` as a float array; a missing position is a DesignError."""
    try:
        raw = values[name]
    except KeyError:
        raise DesignError(
            f"component value for position {name!r} is missing "
            f"(given: {', '.join(sorted(values)) or 'none'})"
        ) from None
    import numpy as np

    return np.asarray(raw, dtype=float)


def unity_like(x):
    """Gain 1 shaped like ``x`` (a float for scalar input, not a 0-d array)."""
    return x * 0.0 + 1.0


def second_order(b0, b1):
    """(f0_hz, q) of ``b0 s^2 + b1 s + 1``; q <= 0 or inf marks an unstable or lossless stage."""
    import numpy as np

    with np.errstate(divide="ignore", invalid="ignore"):
        root = np.sqrt(b0)
        return 1.0 / (TWO_PI * root), root / b1


def first_order_hz(tau):
    """Corner frequency in hertz of ``1 + s tau``."""
    import numpy as np

    with np.errstate(divide="ignore"):
        return 1.0 / (TWO_PI * tau)


def target_w0(target: StageTarget, key: str) -> float:
    """Angular frequency of the target, checked to be a positive finite f0."""
    f0 = target.f0_hz
    if not (isinstance(f0, (int, float)) and math.isfinite(f0) and f0 > 0):
        raise DesignError(f"{key}: f0 must be a positive frequency in hertz, got {f0!r}")
    return TWO_PI * float(f0)


def target_q(target: StageTarget, key: str) -> float:
    q = target.q
    if q is None or not (math.isfinite(q) and q > 0):
        raise DesignError(f"{key}: a second-order stage needs a positive finite Q, got {q!r}")
    return float(q)


def target_gain(target: StageTarget, key: str, *, above_one: bool = False) -> float:
    """The target's gain magnitude (None -> 1). ``above_one``: a 1 + RB/RA network needs > 1."""
    gain = 1.0 if target.gain is None else target.gain
    if not (math.isfinite(gain) and gain > 0):
        raise DesignError(f"{key}: gain must be a positive magnitude, got {target.gain!r}")
    if above_one and gain <= 1.0:
        raise DesignError(
            f"{key}: the gain network 1 + RB/RA needs a gain above 1, got "
            f"{target.gain!r}; use the unity-gain variant for a gain of 1"
        )
    return float(gain)


def choice(name: str, given: float, key: str) -> float:
    """A free design choice (capacitor value, ratio, resistor), checked positive and finite."""
    if not (isinstance(given, (int, float)) and math.isfinite(given) and given > 0):
        raise DesignError(f"{key}: choice {name}={given!r} must be a positive finite number")
    return float(given)


def gain_network(gain: float, ra: float) -> dict[str, float]:
    """RA (inverting input to ground) and RB (output to inverting input) for 1 + RB/RA."""
    return {"RA": ra, "RB": ra * (gain - 1.0)}


def gain_elements(values: Mapping[str, float], node: str):
    """Netlist of the RA/RB gain network around the inverting input ``node``."""
    return [
        Element("R", "RA", (node, "0"), float(values["RA"])),
        Element("R", "RB", ("out", node), float(values["RB"])),
    ]


class GainNetwork(Topology):
    """The "-gain" variant of a unity-gain stage: its follower becomes a non-inverting
    amplifier of gain K = 1 + RB/RA, RA from the inverting input to ground and RB from
    the output to it (gain 1 + Rf/Rg; common practice, from memory).

    Put it first among the bases, before the unity class, which keeps its formulas with
    ``_k(values)`` (the follower's 1) and its netlist ending in the follower ``U1``."""

    sets_gain = True
    GAIN_POSITIONS = (
        PositionSpec("RA", "resistor", "gain resistor to ground"),
        PositionSpec("RB", "resistor", "gain feedback resistor"),
    )

    def _k(self, values):
        return 1.0 + value(values, "RB") / value(values, "RA")

    def _gain_network(self, k: float, ra: float) -> dict[str, float]:
        return gain_network(k, choice("ra", ra, self.key))

    def netlist(self, values):
        *network, follower = super().netlist(values)
        return (
            network + gain_elements(values, "n") + [Element("OA", follower.name, ("p", "n", "out"))]
        )
