"""Exact stock-constrained search (docs/search.md).

    from picker.search import search, Bounds, SearchResult

Modules: ``space`` (units, realizable values), ``plans`` (necessary windows per
topology), ``join`` (windowed enumeration), ``stage`` (one stage, exact within a
threshold), ``allocate`` (joint allocation with shared quantities), ``tradeoff``
(best score per piece count), ``opamp`` (op amp choice), ``api`` (``search``).
"""

from picker.search.api import SearchResult, search
from picker.search.space import Bounds

__all__ = ["Bounds", "SearchResult", "search"]
