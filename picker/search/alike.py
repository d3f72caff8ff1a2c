"""Look-alike candidates: one row for candidates a person builds the same way (docs/search.md).

Two candidates are look-alikes when, stage by stage, every position holds the same
arrangement of the same values, up to

- the drawers the pieces come from (two lines of one value in two drawers), and
- a swap of two positions that are interchangeable in that topology: swapping their
  values leaves f0, Q and gain the same for every value (R1 and R2 of a unity-gain
  Sallen-Key low-pass). :func:`swappable` finds these pairs from the topology's own
  ``characteristics`` at random values, so no topology needs a list of its own.

:func:`group` keeps the best-ranked member of each group and gives it notes saying
what the others change ("R1 and R2 may be swapped", "C1 also from drawer D4"), in
``Candidate.alike``; the shells show them in the candidates table.
"""

from __future__ import annotations

import dataclasses
import functools
import itertools

import numpy as np

from picker.parts import Candidate

SAMPLES = 16  # random value sets a swap must leave unchanged


@functools.cache
def swappable(topology_key: str) -> tuple[tuple[str, str], ...]:
    """Pairs of same-kind positions of ``topology_key`` whose swap changes no
    characteristic (relative 1e-12 at ``SAMPLES`` random log-uniform values)."""
    from picker.filters import get_topology

    topo = get_topology(topology_key)
    rng = np.random.default_rng(0)
    span = {"resistor": (2.0, 6.0), "capacitor": (-10.0, -6.0)}
    values = {p.name: 10.0 ** rng.uniform(*span[p.kind], size=SAMPLES) for p in topo.positions}
    ref = topo.characteristics(values)
    pairs = []
    for a, b in itertools.combinations(topo.positions, 2):
        if a.kind != b.kind:
            continue
        swapped = dict(values)
        swapped[a.name], swapped[b.name] = values[b.name], values[a.name]
        if _same(ref, topo.characteristics(swapped)):
            pairs.append((a.name, b.name))
    return tuple(pairs)


def _same(x, y) -> bool:
    for u, v in zip(x, y, strict=True):
        if (u is None) != (v is None):
            return False
        if u is not None and not np.allclose(
            np.asarray(u, float), np.asarray(v, float), rtol=1e-12, atol=0.0
        ):
            return False
    return True


def _content(arr) -> tuple:
    """What a position holds, drawers aside: arrangement and the pieces' values."""
    return (arr.arrangement, tuple(sorted(p.value for p in arr.parts)))


def _classes(topology_key: str, names: list[str]) -> list[list[str]]:
    """Positions in classes of interchangeable ones (closure of the swappable pairs)."""
    parent = {n: n for n in names}

    def root(n):
        while parent[n] != n:
            n = parent[n]
        return n

    for a, b in swappable(topology_key):
        parent[root(a)] = root(b)
    out: dict[str, list[str]] = {}
    for n in names:
        out.setdefault(root(n), []).append(n)
    return list(out.values())


def look(candidate: Candidate) -> tuple:
    """The key two look-alikes share: per stage, the contents of its positions, those
    of each class of interchangeable positions sorted."""
    key = []
    for stage in candidate.stages:
        held = {name: _content(arr) for name, arr in stage.positions}
        names = [name for name, _ in stage.positions]
        for cls in _classes(stage.topology, names):
            contents = sorted(held[n] for n in cls)
            for n, c in zip(cls, contents, strict=True):
                held[n] = c
        key.append((stage.topology, tuple(held[n] for n in names)))
    return tuple(key)


def group(candidates: list[Candidate], stages=None) -> list[Candidate]:
    """Candidates in order, each group of look-alikes once: its first (best-ranked)
    member, with ``alike`` notes naming what the others change. ``stages`` is unused
    (the signature the yield ranking calls)."""
    groups: dict[tuple, list[Candidate]] = {}
    for c in candidates:
        groups.setdefault(look(c), []).append(c)
    return [
        dataclasses.replace(members[0], alike=notes(members[0], members[1:]))
        for members in groups.values()
    ]


def _drawers(arr) -> str:
    return " + ".join(p.location or "no drawer" for p in arr.parts)


def notes(first: Candidate, others: list[Candidate]) -> tuple[str, ...]:
    """What the look-alikes ``others`` change against ``first``, in words."""
    out: list[str] = []
    many = len(first.stages) > 1
    for s, stage in enumerate(first.stages):
        prefix = f"stage {s + 1}: " if many else ""
        mine = dict(stage.positions)
        swaps: list[str] = []
        extra: dict[str, list[str]] = {}
        for other in others:
            theirs = dict(other.stages[s].positions)
            for a, b in swappable(stage.topology):
                ca, cb = _content(mine[a]), _content(mine[b])
                if ca != cb and _content(theirs[a]) == cb and _content(theirs[b]) == ca:
                    text = f"{a} and {b} may be swapped"
                    if text not in swaps:
                        swaps.append(text)
            for name, arr in theirs.items():
                # the position of ``first`` holding the same content
                same = [n for n, m in mine.items() if _content(m) == _content(arr)]
                where = name if name in same else (same[0] if same else None)
                if where is None:
                    continue
                d = _drawers(arr)
                if d != _drawers(mine[where]) and d not in extra.setdefault(where, []):
                    extra[where].append(d)
        out += [prefix + t for t in swaps]
        for name, _ in stage.positions:
            if extra.get(name):
                word = (
                    "drawer" if len(extra[name]) == 1 and "+" not in extra[name][0] else "drawers"
                )
                out.append(f"{prefix}{name} also from {word} {', '.join(extra[name])}")
    return tuple(out)
