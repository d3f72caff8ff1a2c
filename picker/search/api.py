"""``search``: ranked candidates and the parts/precision trade-off for a list of stages.

Joint exactness (DESIGN.md 5). Let ``t_s`` be the best score of stage ``s`` alone (with
its own quantities) and ``t = max_s t_s``; no combination scores below ``t``. Every
combination with joint score ``<= t`` is built from rows of the per-stage lists
``within(t)``, and :func:`picker.search.allocate.combine` searches those exhaustively
(with quantities shared) for the ``top`` best keys. If fewer than ``top`` feasible
combinations exist within ``t``, ``t`` is raised (x4, then to infinity, where the lists
are the whole space) and the search repeated. The first ``t`` that yields ``top``
combinations gives the exact ``top`` of the whole space, since any better combination
would score ``<= t`` and so be among those searched.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from picker.errors import NoDesignError
from picker.parts import Candidate, StageChoice, StageTarget
from picker.search.allocate import combine
from picker.search.opamp import choose_opamp
from picker.search.plans import WIDE
from picker.search.space import Bounds, Space, build_space
from picker.search.stage import StageProblem
from picker.search.tradeoff import StageClasses


@dataclass(frozen=True)
class SearchResult:
    """Candidates best first; trade-off as (total pieces, best score); notes for people."""

    candidates: list[Candidate]
    tradeoff: list[tuple[int, float]] = field(default_factory=list)
    notes: tuple[str, ...] = ()


def grow(t: float) -> float:
    """Next threshold: x4 (from at least 1e-9), infinity once windows stop helping."""
    return math.inf if t >= WIDE else max(4.0 * t, 1e-9)


def search(stock, stages, *, singles: bool = False, allow_polarized: bool = False,
           bounds: Bounds = Bounds(), top: int = 5, tradeoff: bool = True) -> SearchResult:
    """Best ``top`` candidates from ``stock`` for ``stages`` (from ``plan_stages``).

    Parameters
    ----------
    stock : stock.model.Stock
    stages : list of (Topology, StageTarget), in signal order
    singles : one piece per position only
    allow_polarized : let polarized capacitors fill positions
    bounds : allowed combined value per position
    top : number of candidates
    tradeoff : also compute the best score for each total piece count

    Raises
    ------
    NoDesignError
        naming what is missing when no candidate exists.
    """
    from picker.search.tradeoff import tradeoff as trade

    if not stages:
        raise NoDesignError("no stages to design")
    top = max(1, int(top))
    space = build_space(stock, singles=singles, allow_polarized=allow_polarized,
                        bounds=bounds)
    check_supply(space, stages, bounds)
    classes = [StageClasses(topo, target, space, singles=singles, label=f"stage {i + 1}")
               for i, (topo, target) in enumerate(stages)]
    notes: list[str] = []
    if len(stages) == 1:
        topo, target = stages[0]
        problem = StageProblem(topo, target, space,
                               {p.name: space.values[p.kind] for p in topo.positions})
        rows, _ = problem.best(top)
        found = [((float(rows.score[i]),), ((None, i),)) for i in range(min(top, len(rows)))]
        loaded = {(0, None): rows}
    else:
        found, loaded, note = best_combinations(classes, space, top=top)
        if note:
            notes.append(note)
    if not found:
        raise NoDesignError("no combination of the parts on hand fills every position of "
                            "every stage with the quantities in stock")
    opamp, warnings = choose_opamp(stock.opamps, stages)
    candidates = [build_candidate(stages, loaded, space, rows, key, opamp, warnings + notes)
                  for key, rows in found]
    curve = []
    if tradeoff:
        curve, skipped = trade(classes, space.counts)
        if skipped:
            notes.append("trade-off: piece counts " + ", ".join(map(str, skipped))
                         + " left out (the joint allocation hit its step limit there)")
    return SearchResult(candidates, curve, tuple(notes))


def best_combinations(classes, space: Space, *, top: int):
    """(``top`` joint combinations, the loaded class lists they index, note or None).

    Exact unless the allocation stopped at its step limit (then the note says so)."""
    t = max(min(c.best().values(), default=math.inf) for c in classes)
    while True:
        found, loaded, complete = combine([c.classes(t) for c in classes], space.counts,
                                          top=top)
        if not complete and found:
            return found, loaded, (
                "the stages compete for scarce pieces and the joint allocation stopped at "
                f"its step limit: these are the best combinations found, not proven optimal")
        if len(found) >= top or math.isinf(t):
            return found, loaded, None
        t = grow(t)


def build_candidate(stages, loaded, space, rows, key, opamp, warnings) -> Candidate:
    """The picker.parts record of one combination (the boundary conversion)."""
    choices = []
    pieces = 0
    for s, ((topo, target), (j, i)) in enumerate(zip(stages, rows)):
        stage_rows = loaded[(s, j)]
        pieces += int(stage_rows.pieces[i])
        positions = tuple((p.name, space.arrangement(p.kind, int(stage_rows.idx[p.name][i])))
                          for p in topo.positions)
        values = {name: arr.value for name, arr in positions}
        f0, q, gain = topo.characteristics(values)
        achieved = StageTarget(float(f0), None if q is None else float(q), float(gain))
        choices.append(StageChoice(topo.key, target, achieved, positions))
    return Candidate(score=float(key[0]), pieces=pieces, stages=tuple(choices),
                     opamp=opamp, warnings=tuple(warnings))


def check_supply(space: Space, stages, bounds: Bounds) -> None:
    """NoDesignError when a kind has no value in bounds or too few pieces for the positions."""
    from stock.values import format_rkm

    need = {"resistor": 0, "capacitor": 0}
    for topo, _ in stages:
        for p in topo.positions:
            need[p.kind] += 1
    for kind, n in need.items():
        if not n:
            continue
        lo, hi = bounds.of(kind)
        if len(space.values[kind]) == 0:
            raise NoDesignError(f"no {kind} between {format_rkm(lo, kind)} and "
                                f"{format_rkm(hi, kind)} in stock (singles or pairs; used-up"
                                + (" and polarized" if kind == "capacitor" else "")
                                + " lines do not count)")
        if space.usable[kind] < n:
            count = len(stages)
            raise NoDesignError(f"the {count} stage{'s' if count > 1 else ''} need {n} "
                                f"{kind}s, the stock has {space.usable[kind]} usable")
