"""Filter maths: prototypes, topologies (one module each), stage planning.

    from picker.filters import get_topology, plan_stages, REGISTRY
"""

from picker.errors import DesignError
from picker.filters import topologies  # noqa: F401  (registers every topology)
from picker.filters.base import REGISTRY, Element, PositionSpec, Topology, register
from picker.filters.planning import minimum_order, plan_stages
from picker.filters.prototypes import prototype_poles, sections


def get_topology(key: str) -> Topology:
    """The registered topology ``key``; DesignError naming the known keys otherwise."""
    try:
        return REGISTRY[key]
    except KeyError:
        raise DesignError(f"unknown topology {key!r}; known: {', '.join(sorted(REGISTRY))}"
                          ) from None


__all__ = ["REGISTRY", "Element", "PositionSpec", "Topology", "get_topology", "minimum_order",
           "plan_stages", "prototype_poles", "register", "sections"]
