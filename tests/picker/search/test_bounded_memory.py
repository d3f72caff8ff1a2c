"""The machinery that keeps a large search's memory bounded gives what one plain pass
gives (issue 11; docs/search.md, "Cost"): value blocks sorted bucket by bucket, the
merged array and its canonical indices, the extents found without the pair space, a
join whose wide rows are split, and branch and bound that drops ties of look-alike
rows. The exact answers are checked against plain exhaustive search (``brute.py``)
on stocks where one value sits in several drawers, so rows tie by the hundred, with
the pruning thresholds made tiny so every cut is taken."""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import picker.search.valueblocks as blocks_mod
from picker.filters import get_topology
from picker.parts import StageTarget
from picker.search import join
from picker.search.plans import plan_for, windows
from picker.search.space import Bounds, Values, build_space, extents
from stock.model import Capacitor, Resistor, Stock
from tests.picker.search.helpers import E6, E12, check_against_brute, stocks

ROOT = Path(__file__).resolve().parents[3]
WIDE = Bounds(r_min=0.0, r_max=math.inf, c_min=0.0, c_max=math.inf)


def _generated(lines: int) -> Stock:
    sys.path.insert(0, str(ROOT))
    try:
        from bench.make_stock import generate
    finally:
        sys.path.remove(str(ROOT))
    from stock.load import loads

    return loads(generate(lines))


def _columns(v):
    return [v.value, v.pieces, v.unit_a, v.unit_b, v.code]


def test_blocks_sorted_bucket_by_bucket_equal_one_sort(monkeypatch):
    stock = _generated(300)
    whole = build_space(stock)  # under CHUNK pairs per kind: one bucket
    assert len(whole.blocks["resistor"][1]) < blocks_mod.CHUNK
    monkeypatch.setattr(blocks_mod, "CHUNK", 1 << 11)
    monkeypatch.setattr(blocks_mod, "SAMPLE_EVERY", 4)
    bucketed = build_space(stock)  # dozens of buckets, and pair blocks of 2,048
    for kind in ("resistor", "capacitor"):
        for a, b in zip(whole.blocks[kind], bucketed.blocks[kind], strict=True):
            for x, y in zip(_columns(a), _columns(b), strict=True):
                np.testing.assert_array_equal(x, y)


def test_merged_values_are_the_documented_order_and_map_back():
    stock = _generated(120)
    space = build_space(stock)
    for kind in ("resistor", "capacitor"):
        one, two = space.blocks[kind]
        assert (one.pieces == 1).all() and (two.pieces == 2).all()
        merged = space.values[kind]
        # the order of docs/search.md: value, pieces, worst tolerance, tolerance sum,
        # code, first unit, second unit, over singles and pairs together
        cat = {
            f: np.concatenate([getattr(one, f), getattr(two, f)])
            for f in ("value", "pieces", "unit_a", "unit_b", "code")
        }
        every = np.arange(len(one) + len(two))
        both = Values(**cat, unit_tol=one.unit_tol)
        order = np.lexsort(
            (
                both.unit_b,
                both.unit_a,
                both.code,
                both.tol_sum_at(every),
                both.tol_max_at(every),
                both.pieces,
                both.value,
            )
        )
        np.testing.assert_array_equal(merged.value, both.value[order])
        np.testing.assert_array_equal(merged.unit_a, both.unit_a[order])
        np.testing.assert_array_equal(merged.unit_b, both.unit_b[order])
        np.testing.assert_array_equal(space.canonical(kind), order)
        for i in range(0, len(merged), max(1, len(merged) // 200)):
            arr = space.arrangement(kind, int(space.canonical(kind)[i]))
            assert arr.value == pytest.approx(float(merged.value[i]), rel=1e-12)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(stocks(r=(1, 6), c=(1, 6)), st.booleans())
def test_extents_without_the_pair_space_equal_those_of_the_unbounded_space(stock, singles):
    ext = extents(stock, singles=singles)
    space = build_space(stock, singles=singles, bounds=WIDE)
    for kind in ("resistor", "capacitor"):
        got, want = ext.extent(kind), space.extent(kind)
        if want is None:
            assert got is None
        else:
            assert got == pytest.approx(want, rel=1e-12)


def test_a_wide_row_is_split_into_blocks_with_the_same_rows(monkeypatch):
    stock = _generated(30)
    space = build_space(stock)
    topo = get_topology("sallen-key-lowpass")
    target = StageTarget(1e3, 0.7071)
    arrays = {p.name: space.with_pieces(p.kind, 2)[0] for p in topo.positions}
    limits = {k: space.extent(k) for k in ("resistor", "capacitor")}
    ctx = windows(target, 0.02, limits)  # rows with more picks than a block of 16
    group = plan_for(topo).groups[0]
    splits = []
    split_row = join._split_row
    monkeypatch.setattr(join, "_split_row", lambda *a: splits.append(1) or split_row(*a))

    def rows(block):
        out = []
        for r in join.group_rows(group, arrays, ctx, block=block):
            assert all(i.size <= block for i in r.values())
            out.append(np.stack([r[s.position] for s in group.steps], axis=1))
        got = np.concatenate(out)
        return got[np.lexsort(got.T[::-1])]

    big = rows(join.BLOCK)
    assert not splits
    small = rows(16)
    assert splits  # the case is wide enough to split
    np.testing.assert_array_equal(small, big)


@st.composite
def look_alike_stocks(draw):
    """One value in several drawers (same or different tolerance): rows tie by the
    hundred, as in a real cabinet of repeated bags (E12/E6 values, IEC 60063)."""
    rs, cs = [], []
    for _ in range(2):
        value = draw(st.sampled_from(E12)) * 10.0 ** draw(st.integers(3, 4))
        for _ in range(draw(st.integers(2, 3))):
            rs.append(
                Resistor(
                    value=value,
                    qty=draw(st.integers(1, 3)),
                    tolerance=draw(st.sampled_from((0.01, 0.01, 0.05))),
                    index=len(rs),
                    line=len(rs) + 1,
                )
            )
    for _ in range(draw(st.integers(1, 2))):
        value = draw(st.sampled_from(E6)) * 10.0 ** draw(st.integers(-9, -8))
        for _ in range(2):
            cs.append(
                Capacitor(
                    value=value,
                    qty=draw(st.integers(1, 3)),
                    tolerance=0.05,
                    dielectric="C0G",
                    index=len(cs),
                    line=100 + len(cs),
                )
            )
    return Stock(resistors=tuple(rs), capacitors=tuple(cs))


@pytest.fixture
def tiny_cuts(monkeypatch):
    """Every cut taken at once: rows pruned past 4 held, classes cut to 1 row."""
    import picker.search.ranking as ranking
    import picker.search.stage as stage
    import picker.search.tradeoff as tradeoff

    monkeypatch.setattr(stage, "PRUNE_ROWS", 4)
    monkeypatch.setattr(ranking, "TRUNCATE", 1)
    monkeypatch.setattr(tradeoff, "TRUNCATE", 1)


TIES = settings(
    max_examples=20,
    deadline=None,
    suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture],
)


@TIES
@given(look_alike_stocks(), st.floats(300.0, 5e3), st.sampled_from(("error", "pieces")))
def test_look_alike_ties_one_stage_against_brute(tiny_cuts, stock, f0, rank):
    stages = [(get_topology("sallen-key-lowpass"), StageTarget(f0, 0.7071))]
    check_against_brute(stock, stages, top=3, rank=rank, max_error=0.02)


@TIES
@given(look_alike_stocks(), st.floats(300.0, 5e3), st.sampled_from(("error", "pieces")))
def test_look_alike_ties_two_stages_against_brute(tiny_cuts, stock, f0, rank):
    stages = [
        (get_topology("inverting-lowpass"), StageTarget(f0, None, 1.0)),
        (get_topology("inverting-lowpass"), StageTarget(f0 * 1.5, None, 2.2)),
    ]
    # singles: six positions of pairs would be billions of assignments for brute force
    check_against_brute(stock, stages, top=3, rank=rank, max_error=0.02, singles=True)


@TIES
@given(stocks(r=(2, 4), c=(2, 4), qty_max=2), st.floats(200.0, 20e3), st.floats(1.2, 3.0))
def test_scarce_pieces_two_stages_with_every_class_cut_against_brute(tiny_cuts, stock, f0, ratio):
    """Two stages drawing on the same few pieces (quantities 0..2), every class cut to
    its best row: a combination often needs a row that was cut, so the rule that
    accepts a cut list (ranking._beats_cut) decides the answer."""
    topo = get_topology("non-inverting-lowpass")
    stages = [(topo, StageTarget(f0)), (topo, StageTarget(f0 * ratio))]
    check_against_brute(stock, stages, top=3)
    check_against_brute(stock, stages, top=3, rank="pieces", max_error=0.02)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(stocks(r=(1, 5), c=(1, 5)), st.floats(1.0, 1e7), st.booleans())
def test_nearest_in_the_blocks_equals_the_neighbours_in_the_merged_array(stock, x, singles):
    space = build_space(stock, singles=singles)
    for kind in ("resistor", "capacitor"):
        x_kind = x if kind == "resistor" else x * 1e-13
        merged = space.values[kind]
        want = set()
        if len(merged):
            i = int(np.searchsorted(merged.value, x_kind))
            for k in {max(i - 1, 0), min(i, len(merged) - 1)}:
                want.add((float(merged.value[k]), int(merged.pieces[k])))
        assert set(space.nearest(kind, x_kind)) == want
