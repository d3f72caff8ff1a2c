"""What the parts on hand can reach, checked before a search (docs/search.md).

``check_supply``: every kind has values within the bounds and enough pieces for the
positions. ``check_reach`` (the shells' policy): a stage whose f0 lies outside what the
values on hand can reach is refused at once, naming the reach, with a small slack.
"""

from __future__ import annotations

import math

from picker.errors import NoDesignError
from picker.search.space import Bounds, Space


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
        if space.size(kind) == 0:
            raise NoDesignError(
                f"no {kind} between {format_rkm(lo, kind)} and "
                f"{format_rkm(hi, kind)} in stock (singles or pairs; used-up"
                + (" and polarized" if kind == "capacitor" else "")
                + " lines do not count)"
            )
        if space.usable[kind] < n:
            count = len(stages)
            raise NoDesignError(
                f"the {count} stage{'s' if count > 1 else ''} "
                f"need{'' if count > 1 else 's'} {n} "
                f"{kind}s, the stock has {space.usable[kind]} usable"
            )


REACH_SLACK = 0.05  # a target this far (relative) past the reach is still searched


def _reach(topo, space) -> tuple[float, float]:
    """(lowest, highest) f0 of ``topo`` over the corners of the box of values in ``space``
    (anything with ``extent(kind)``: a :class:`Space`, or :class:`Extents`)."""
    import itertools

    import numpy as np

    names = [p.name for p in topo.positions]
    ends = []
    for p in topo.positions:
        ext = space.extent(p.kind)
        if ext is None:
            return math.nan, math.nan
        ends.append(ext)
    corners = np.array(list(itertools.product(*ends)))
    f0, _, _ = topo.characteristics({n: corners[:, i] for i, n in enumerate(names)})
    f0 = np.asarray(f0, float)
    return float(np.nanmin(f0)), float(np.nanmax(f0))


def check_reach(space: Space, stages, *, wider=None) -> None:
    """NoDesignError when a stage's f0 lies well outside what the values on hand can reach.

    Every topology's f0 falls as any of its R or C grows (f0 = 1/(2 pi sqrt(product)))
    or does not depend on it, so the reachable f0 range is spanned by the corners of
    the box [smallest, largest value on hand] per position; all corners are evaluated,
    so no monotonicity in a particular direction is assumed. Without this check a
    target far out of reach would send the search through its whole space.

    A target up to ``REACH_SLACK`` past the reach is searched all the same (the best
    candidate then shows its error): a stock of exactly 560k, 2k7 and 10n reaches
    1/(2 pi 560k 10n) = 28.4205 Hz, and 28.42 Hz must not be refused. ``wider`` (a
    callable giving the extents without the value bounds, :func:`extents`) tells a reach set by the
    bounds, which a wider --r-max or --c-max lifts, from one set by the stock itself.
    """
    from stock.values import format_rkm, format_si

    for s, (topo, target) in enumerate(stages, start=1):
        lo, hi = _reach(topo, space)
        f = target.f0_hz
        if lo * (1.0 - REACH_SLACK) <= f <= hi * (1.0 + REACH_SLACK):
            continue
        kinds = sorted({p.kind for p in topo.positions})
        have = "; ".join(
            f"{kind}s {format_rkm(ext[0], kind)} .. {format_rkm(ext[1], kind)}"
            for kind in kinds
            if (ext := space.extent(kind)) is not None
        )
        low = f < lo
        edge = lo if low else hi
        head = (
            f"stage {s} ({topo.key}) needs f0 {format_si(f, 'Hz', digits=5)}, "
            f"{'lower' if low else 'higher'} than the parts on hand reach: "
            f"{format_si(lo, 'Hz', digits=5)} .. {format_si(hi, 'Hz', digits=5)} "
            f"with {have}"
        )
        if wider is not None:
            wide = wider()
            wlo, whi = _reach(topo, wide)
            moved = [
                k
                for k in kinds
                if (w := wide.extent(k)) is not None
                and (e := space.extent(k)) is not None
                and (w[1] > e[1] if low else w[0] < e[0])
            ]
            wedge = wlo if low else whi
            covers = f >= wlo * (1.0 - REACH_SLACK) if low else f <= whi * (1.0 + REACH_SLACK)
            if moved and covers:
                opts = "/".join(f"--{k[0]}-{'max' if low else 'min'}" for k in moved)
                raise NoDesignError(
                    f"{head}; the stock has {'larger' if low else 'smaller'} parts outside "
                    f"the value bounds (they reach {format_si(wedge, 'Hz', digits=5)}): "
                    f"{'raise' if low else 'lower'} {opts}"
                )
            if moved and (wedge < edge if low else wedge > edge):
                head += (
                    f"; without the value bounds the stock reaches "
                    f"{format_si(wedge, 'Hz', digits=5)}, still short"
                )
            raise NoDesignError(
                f"{head}; that limit is the stock's own (its "
                f"{'largest' if low else 'smallest'} parts, pairs included): it needs "
                f"{'larger' if low else 'smaller'} "
                + " or ".join(f"{k}s" for k in kinds)
                + " than it has"
            )
        hint = (
            "larger parts (raise --r-max/--c-max)"
            if low
            else "smaller parts (lower --r-min/--c-min)"
        )
        raise NoDesignError(f"{head}; it needs {hint}")
