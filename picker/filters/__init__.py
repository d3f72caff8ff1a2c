"""Filter maths: prototypes, topologies (one module each), stage planning.

    from picker.filters import get_topology, plan_stages, REGISTRY

Topologies and their positions (reference designators as usually drawn; the gain network
of every non-inverting "-gain" variant is RA from the inverting input to ground and RB
from the output to the inverting input, gain 1 + RB/RA):

    inverting-lowpass            R1 input, R2 feedback, C1 across R2        gain R2/R1
    inverting-highpass           C1 + R1 in series at the input, R2 feedback  gain R2/R1
    non-inverting-lowpass        R1 series, C1 to ground, follower           gain 1
    non-inverting-highpass       C1 series, R1 to ground, follower           gain 1
    sallen-key-lowpass           R1, R2 series; C1 feedback; C2 to ground    gain 1
    sallen-key-highpass          C1, C2 series; R1 feedback; R2 to ground    gain 1
    (each of the four above)-gain  + RA, RB                                  gain 1 + RB/RA
    mfb-lowpass                  R1 in, R2 feedback, R3 to (-), C1 (-) to out, C2 to ground
                                                                             gain R2/R1
    mfb-highpass                 C1 in, C2 to (-), C3 feedback, R1 to ground, R2 (-) to out
                                                                             gain C1/C3
    mfb-bandpass                 R1 in, R2 to ground, C1 feedback, C2 to (-), R3 (-) to out
                                                                 centre gain R3 C2/(R1 (C1+C2))

Every module's docstring draws its circuit and gives its formulas and their source.
The planning conventions (fc, high-pass transform, stage order, where the gain goes and
what it is referred to) are in :mod:`picker.filters.planning`.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

from picker.errors import DesignError
from picker.filters import topologies  # noqa: F401  (registers every topology)
from picker.filters.base import REGISTRY, Element, PositionSpec, Topology, register

if TYPE_CHECKING:
    from picker.filters.planning import minimum_order, plan_stages
    from picker.filters.prototypes import prototype_poles, sections

# planning and prototypes need numpy; they load on first use, so that reading a
# topology's netlist (``picker netlist``) starts without numpy
_LAZY = {
    "minimum_order": "picker.filters.planning",
    "plan_stages": "picker.filters.planning",
    "prototype_poles": "picker.filters.prototypes",
    "sections": "picker.filters.prototypes",
}


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'picker.filters' has no attribute {name!r}")
    import importlib

    return getattr(importlib.import_module(module), name)


def get_topology(key: str) -> Topology:
    """The registered topology ``key``; DesignError naming the known keys otherwise."""
    try:
        return REGISTRY[key]
    except KeyError:
        raise DesignError(
            f"unknown topology {key!r}; known: {', '.join(sorted(REGISTRY))}"
        ) from None


__all__ = [
    "REGISTRY",
    "Element",
    "PositionSpec",
    "Topology",
    "get_topology",
    "minimum_order",
    "plan_stages",
    "prototype_poles",
    "register",
    "sections",
]
