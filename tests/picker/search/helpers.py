"""Random small stocks and the checks shared by the search tests."""

from __future__ import annotations

from collections import Counter

import numpy as np
from hypothesis import strategies as st

from picker.errors import NoDesignError
from picker.search import Bounds, search
from stock.eseries import series
from stock.model import Capacitor, Resistor, Stock
from tests.picker.search.brute import brute, brute_tradeoff

BOUNDS = Bounds()
E12 = series("E12")  # IEC 60063 E12 mantissas
E6 = series("E6")


@st.composite
def resistor_lines(draw, n_min=3, n_max=6, qty_max=3):
    n = draw(st.integers(n_min, n_max))
    lines = []
    for i in range(n):
        value = draw(st.sampled_from(E12)) * 10.0 ** draw(st.integers(2, 5))
        qty = draw(st.integers(0, qty_max))
        measured = ()
        if qty and draw(st.booleans()) and draw(st.booleans()):
            measured = (value * draw(st.floats(0.97, 1.03)),)
        lines.append(
            Resistor(
                value=value,
                qty=qty,
                tolerance=draw(st.sampled_from((0.01, 0.05))),
                measured=measured,
                meter=0.005,
                index=i,
                line=i + 1,
            )
        )
    return tuple(lines)


@st.composite
def capacitor_lines(draw, n_min=3, n_max=6, qty_max=3):
    n = draw(st.integers(n_min, n_max))
    lines = []
    for i in range(n):
        value = draw(st.sampled_from(E6)) * 10.0 ** draw(st.integers(-10, -7))
        polarized = draw(st.integers(0, 5)) == 0
        lines.append(
            Capacitor(
                value=value,
                qty=draw(st.integers(0, qty_max)),
                tolerance=draw(st.sampled_from((0.02, 0.05, 0.1))),
                dielectric="electrolytic" if polarized else "C0G",
                polarized=polarized,
                index=i,
                line=100 + i,
            )
        )
    return tuple(lines)


def stocks(r=(3, 6), c=(3, 6), qty_max=3):
    return st.builds(
        lambda rs, cs: Stock(resistors=rs, capacitors=cs),
        resistor_lines(*r, qty_max=qty_max),
        capacitor_lines(*c, qty_max=qty_max),
    )


def brute_order(bs, bp, bt, bts, rank="error", max_error=0.005):
    """Indices of the brute-force assignments in rank order (docs/search.md): ``error``
    by (score, pieces, worst tolerance, tolerance sum); ``pieces`` those within
    ``max_error`` first by (pieces, score, ...), then the others as ``error``."""
    by_error = np.lexsort((bts, bt, bp, bs))
    if rank == "error":
        return by_error
    within = np.flatnonzero(bs <= max_error)
    first = within[np.lexsort((bts[within], bt[within], bs[within], bp[within]))]
    return np.concatenate([first, by_error[bs[by_error] > max_error]])


def check_against_brute(
    stock, stages, *, top=3, singles=False, allow_polarized=False, rank="error", max_error=0.005
):
    """Rank order, trade-off and every candidate's parts against plain enumeration."""
    bs, bp, bt, bts = brute(stock, stages, BOUNDS, singles=singles, allow_polarized=allow_polarized)
    kw = dict(
        singles=singles, allow_polarized=allow_polarized, top=top, rank=rank, max_error=max_error
    )
    if bs.size == 0:
        try:
            search(stock, stages, **kw)
        except NoDesignError:
            return None
        raise AssertionError("search found a design where exhaustive search found none")
    result = search(stock, stages, **kw)
    assert result.proven and result.bound is None
    order = brute_order(bs, bp, bt, bts, rank, max_error)[:top]
    got = np.array([c.score for c in result.candidates])
    assert got.size == order.size
    np.testing.assert_allclose(got, bs[order], rtol=1e-9, atol=1e-15)
    if rank == "pieces":  # pieces lead the key: the whole sequence is determined
        assert [c.pieces for c in result.candidates] == bp[order].tolist()
    if rank == "error" or not result.goal_met:
        assert result.candidates[0].pieces == bp[bs == got[0]].min()
    assert result.goal_met == (rank == "error" or bool(bs.min() <= max_error))
    curve = brute_tradeoff(bs, bp)
    assert [k for k, _ in result.tradeoff] == [k for k, _ in curve]
    np.testing.assert_allclose(
        [s for _, s in result.tradeoff], [s for _, s in curve], rtol=1e-9, atol=1e-15
    )
    for cand in result.candidates:
        check_candidate(cand, stock, stages, allow_polarized=allow_polarized)
    return result


def check_candidate(cand, stock, stages, *, allow_polarized=False):
    """Achieved values recomputed from the parts; quantities and exclusions honoured."""
    used = Counter()
    worst = 0.0
    assert len(cand.stages) == len(stages)
    pieces = 0
    for choice, (topo, target) in zip(cand.stages, stages, strict=False):
        assert choice.topology == topo.key
        values = {}
        for name, arr in choice.positions:
            assert arr.kind == topo.kind_of(name)
            lo, hi = BOUNDS.of(arr.kind)
            assert lo <= arr.value <= hi
            values[name] = arr.value
            for piece in arr.parts:
                line = piece.line
                assert line.qty > 0
                if piece.kind == "capacitor":
                    assert allow_polarized or not line.polarized
                if piece.measured is None:
                    assert piece.value == line.value and piece.tolerance == line.tolerance
                else:
                    assert piece.value == line.measured[piece.measured]
                used[(piece.kind, line.index, piece.measured)] += 1
                pieces += 1
        f0, q, g = topo.characteristics(values)
        assert np.isclose(choice.achieved.f0_hz, f0, rtol=1e-12)
        errs = [abs(f0 / target.f0_hz - 1)]
        if target.q is not None:
            assert np.isclose(choice.achieved.q, q, rtol=1e-12)
            errs.append(abs(q / target.q - 1))
        if target.gain is not None and topo.sets_gain:
            errs.append(abs(g / target.gain - 1))
        worst = max(worst, max(errs))
    assert np.isclose(cand.score, worst, rtol=1e-9, atol=1e-15)
    assert cand.pieces == pieces
    for (kind, index, measured), n in used.items():
        line = stock.lines(kind)[index]
        limit = 1 if measured is not None else line.qty - len(line.measured)
        assert n <= limit
