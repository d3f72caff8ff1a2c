"""Refill a failed position (and any freed ones) of a marked stage from the stock.

The stage as marked defines the intended f0, Q and gain (``Topology.characteristics`` of
the marked values). The failed position and the ``free`` ones take any realizable value
of the stock (a single piece, or two in series or parallel: ``picker.search.space``);
every other position keeps its marked value and takes nothing from the stock. Options
are ranked by the worst relative error of f0, Q and gain against the intended ones
(gain only where the topology sets it; a follower's gain is 1 whatever the parts),
then fewer pieces, then tighter tolerance.

Exactness: the kept positions become value arrays of one entry that use no stock unit,
and the search of one stage (``picker.search.stage.StageProblem``) is exact over the
arrays it is given with the stock's quantities honoured across positions (its proof is
in that module's docstring). Its windows are bounded by the smallest and largest value
on offer per kind, so those limits are widened here to take in the kept values.
See docs/repair.md.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from picker.errors import DesignError, NoDesignError
from picker.parts import Arrangement, Candidate, StageChoice, StageTarget
from picker.repair.analyse import board_piece
from picker.repair.marked import MarkedStage, position_name, topology_of
from picker.search.space import SINGLE, Bounds, Values, build_space

SPARE = 3  # rows asked for per option shown, so that look-alikes can be dropped
ANY = Bounds(r_min=0.0, r_max=math.inf, c_min=0.0, c_max=math.inf)


@dataclass(frozen=True)
class Option:
    """One way to refill the stage, with what it gives."""

    score: float  # worst relative error over f0, Q (and gain where set)
    errors: tuple[float, float | None, float]  # achieved / intended - 1
    achieved: StageTarget
    refilled: tuple[tuple[str, Arrangement], ...]  # the positions taken from the stock
    pieces: int  # pieces taken from the stock
    candidate: Candidate  # the whole stage, kept positions as pieces on the board


@dataclass(frozen=True)
class Substitution:
    stage: MarkedStage
    intended: StageTarget
    refill: tuple[str, ...]  # the failed position first, then the freed ones
    options: tuple[Option, ...]
    allow_polarized: bool
    singles: bool


def refill_names(stage: MarkedStage, part: str, free: Sequence[str] = ()) -> tuple[str, ...]:
    """The failed position and the freed ones, checked and canonical; each once."""
    topo = topology_of(stage.topology)
    names = [position_name(topo, part, option="--part")]
    for f in free:
        name = position_name(topo, f, option="--free")
        if name in names:
            raise DesignError(f"--free {f}: {name} is already being refilled")
        names.append(name)
    return tuple(names)


def _fixed(value: float) -> Values:
    """One value that uses no stock unit (unit id -1) and no piece."""
    return Values(
        value=np.array([float(value)]),
        pieces=np.zeros(1, np.int64),
        unit_a=np.full(1, -1, np.int64),
        unit_b=np.full(1, -1, np.int64),
        code=np.full(1, SINGLE, np.int64),
        tol_max=np.zeros(1),
        tol_sum=np.zeros(1),
    )


def intended_target(stage: MarkedStage) -> StageTarget:
    """f0, Q and gain of the stage as marked; DesignError when they are not usable."""
    topo = topology_of(stage.topology)
    f0, q, gain = (
        None if x is None else float(np.asarray(x)) for x in topo.characteristics(stage.values())
    )
    if f0 is None or not (math.isfinite(f0) and f0 > 0):
        raise DesignError(f"{topo.key}: the marked values give no finite f0")
    if q is not None and not (math.isfinite(q) and q > 0):
        raise DesignError(
            f"{topo.key}: the marked values give Q = {q:g}, an unstable stage; "
            "check the values read off the board"
        )
    assert gain is not None
    return StageTarget(f0, q, gain)


def substitute(
    stage: MarkedStage,
    stock,
    *,
    part: str,
    free: Sequence[str] = (),
    allow_polarized: bool = False,
    singles: bool = False,
    top: int = 5,
) -> Substitution:
    """The ``top`` best refills of ``part`` (and ``free``) from ``stock``, best first.

    Raises NoDesignError naming what is missing when no refill exists.
    """
    from picker.search.api import distinct
    from picker.search.stage import StageProblem

    if top < 1:
        raise DesignError(f"--top {top}: give at least 1")
    topo = topology_of(stage.topology)
    refill = refill_names(stage, part, free)
    target = intended_target(stage)
    space = build_space(stock, singles=singles, allow_polarized=allow_polarized, bounds=ANY)
    need = {"resistor": 0, "capacitor": 0}
    for name in refill:
        need[topo.kind_of(name)] += 1
    for kind, n in need.items():
        if n and space.usable[kind] < n:
            extra = " (polarized ones need --allow-polarized)" if kind == "capacitor" else ""
            raise NoDesignError(
                f"refilling {', '.join(refill)} needs {n} {kind}(s) from the stock; "
                f"it has {space.usable[kind]} usable{extra}"
            )
    arrays = {
        p.name: space.values[p.kind] if p.name in refill else _fixed(stage.part(p.name).value)
        for p in topo.positions
    }
    problem = StageProblem(topo, target, space, arrays, label="repair")
    for kind in ("resistor", "capacitor"):  # the windows must bound the kept values too
        kept = [stage.part(p.name).value for p in topo.positions if p.kind == kind]
        lo, hi = problem.limits[kind]
        problem.limits[kind] = (min([lo, *kept]), max([hi, *kept]))
    want = top * SPARE
    while True:  # look-alikes (same values, same drawers) are shown once: ask for more
        rows, _ = problem.best(want)
        if len(rows) == 0:
            raise NoDesignError(
                f"no parts on hand can refill {', '.join(refill)} with the quantities in stock"
            )
        options = [_option(stage, topo, target, space, refill, rows, i) for i in range(len(rows))]
        keep = {id(c) for c in distinct([o.candidate for o in options])}
        shown = tuple(o for o in options if id(o.candidate) in keep)[:top]
        if len(shown) >= top or len(rows) < want:
            return Substitution(stage, target, refill, shown, allow_polarized, singles)
        want *= 4


def _option(stage, topo, target, space, refill, rows, i) -> Option:
    positions = []
    for p in topo.positions:
        if p.name in refill:
            index = int(space.canonical(p.kind)[int(rows.idx[p.name][i])])
            positions.append((p.name, space.arrangement(p.kind, index)))
        else:
            m = stage.part(p.name)
            positions.append(
                (p.name, Arrangement("single", (board_piece(m.kind, m.value, m.tolerance),)))
            )
    values = {name: arr.value for name, arr in positions}
    f0, q, gain = (
        None if x is None else float(np.asarray(x)) for x in topo.characteristics(values)
    )
    assert f0 is not None and gain is not None
    achieved = StageTarget(f0, q, abs(gain))
    errors = (
        f0 / target.f0_hz - 1.0,
        None if q is None or target.q is None else q / target.q - 1.0,
        abs(gain) / target.gain - 1.0,
    )
    pieces = int(rows.pieces[i])
    choice = StageChoice(topo.key, target, achieved, tuple(positions))
    candidate = Candidate(score=float(rows.score[i]), pieces=pieces, stages=(choice,))
    refilled = tuple((n, a) for n, a in positions if n in refill)
    return Option(float(rows.score[i]), errors, achieved, refilled, pieces, candidate)


def request_table(sub: Substitution, *, pick: int) -> dict:
    """The ``[request]`` of a saved repair: what was marked and what was refilled."""
    from stock.values import format_rkm

    topo = topology_of(sub.stage.topology)
    return {
        "mode": "repair",
        "type": topo.response_type,
        "topology": topo.key,
        "marked": {
            p.name: f"{format_rkm(p.value, p.kind)}/{p.tolerance * 100:g}%" for p in sub.stage.parts
        },
        "part": sub.refill[0],
        "free": list(sub.refill[1:]),
        "allow_polarized": sub.allow_polarized,
        "singles": sub.singles,
        "pick": pick,
    }


def save_option(path, sub: Substitution, stock, *, pick: int = 1) -> None:
    """Write option ``pick`` (from 1) as a saved design that bom, build and undo accept."""
    from picker.export import save_design

    if not 1 <= pick <= len(sub.options):
        raise DesignError(f"--pick {pick}: choose 1..{len(sub.options)} (the options shown)")
    option = sub.options[pick - 1]
    save_design(
        path, candidate=option.candidate, request=request_table(sub, pick=pick), stock=stock
    )
