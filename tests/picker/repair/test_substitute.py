"""``picker.repair.substitute`` against plain exhaustive enumeration on small random stocks.

The enumeration is ``tests.picker.search.brute`` (written without picker.search): every
single piece and every series or parallel pair of the stock for each refilled position,
every combination of them, quantities counted per supply unit across positions, scored
by the worst relative error of f0, Q and gain (``Topology.characteristics``).
"""

from __future__ import annotations

import dataclasses
import itertools
import math

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from picker.errors import DesignError, NoDesignError
from picker.filters import REGISTRY
from picker.repair.marked import MarkedPart, MarkedStage
from picker.repair.substitute import ANY, substitute
from picker.search.space import Bounds
from stock.model import Capacitor, Resistor, Stock
from tests.picker.search.brute import options, stage_score, units_of
from tests.picker.search.helpers import stocks


def _drawers(draw, stock: Stock) -> Stock:
    """Lines spread over two drawers, so that look-alike options (same values, same
    drawer) occur and must be shown once."""
    rs = tuple(
        dataclasses.replace(r, location=draw(st.sampled_from(("A", "B")))) for r in stock.resistors
    )
    cs = tuple(
        dataclasses.replace(c, location=draw(st.sampled_from(("A", "B")))) for c in stock.capacitors
    )
    return Stock(resistors=rs, capacitors=cs)


def brute_refills(stock, stage, refill, *, allow_polarized=False, singles=False):
    """Every feasible refill: [(score, signature)], unsorted; signature as people see it."""
    topo = REGISTRY[stage.topology]
    units = units_of(stock, allow_polarized)
    counts = [u[3] for u in units]
    target_values = stage.values()
    f0, q, gain = topo.characteristics(target_values)
    from picker.parts import StageTarget

    target = StageTarget(float(f0), None if q is None else float(q), float(gain))
    per = [options(units, topo.kind_of(n), ANY, singles) for n in refill]
    out = []
    for combo in itertools.product(*per):
        use = {}
        for o in combo:
            for u, m in o[4].items():
                use[u] = use.get(u, 0) + m
        if any(m > counts[u] for u, m in use.items()):
            continue
        values = dict(target_values)
        sig = []
        for name, o in zip(refill, combo, strict=True):
            values[name] = o[0]
            sig.append((name, o[0], tuple(sorted(use_key(stock, units, o[4])))))
        out.append((float(stage_score(topo, target, values)), tuple(sig)))
    return out


def use_key(stock, units, use):
    """The pieces of one option as (value, drawer), as a person building it sees them."""
    keys = []
    for u, m in use.items():
        kind, n, _ = units[u][4]
        keys += [(units[u][1], stock.lines(kind)[n].location or "")] * m
    return keys


def marked_near(draw, topo, stock):
    """Marked values: stock values nudged by a random factor (so errors are not all 0)."""
    parts = []
    for p in topo.positions:
        lines = stock.resistors if p.kind == "resistor" else stock.capacitors
        base = draw(st.sampled_from([line.value for line in lines]))
        factor = draw(st.sampled_from((1.0, 0.9, 1.1, 1.5, 2.0)))
        parts.append(MarkedPart(p.name, p.kind, base * factor, 0.05, True))
    return MarkedStage(topo.key, tuple(parts))


@st.composite
def problems(draw):
    stock = _drawers(draw, draw(stocks(r=(2, 4), c=(2, 4), qty_max=2)))
    topo = REGISTRY[draw(st.sampled_from(sorted(REGISTRY)))]
    stage = marked_near(draw, topo, stock)
    names = list(topo.position_names())
    n = draw(st.integers(1, min(2, len(names))))
    refill = tuple(draw(st.permutations(names))[:n])
    return stock, stage, refill, draw(st.booleans())


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(problems())
def test_ranking_matches_exhaustive_enumeration(problem):
    stock, stage, refill, allow_polarized = problem
    _, q, _ = REGISTRY[stage.topology].characteristics(stage.values())
    if q is not None and not 0 < q < math.inf:  # unstable as marked: refused, exit 2
        with pytest.raises(DesignError, match="unstable"):
            substitute(stage, stock, part=refill[0], free=refill[1:])
        return
    rows = brute_refills(stock, stage, refill, allow_polarized=allow_polarized)
    top = 4
    if not rows:
        with pytest.raises(NoDesignError):
            substitute(
                stage, stock, part=refill[0], free=refill[1:], allow_polarized=allow_polarized
            )
        return
    rows.sort(key=lambda r: r[0])
    seen, want = set(), []
    for score, sig in rows:  # look-alikes (same values, same drawers) count once
        if sig not in seen:
            seen.add(sig)
            want.append(score)
    sub = substitute(
        stage, stock, part=refill[0], free=refill[1:], allow_polarized=allow_polarized, top=top
    )
    got = [o.score for o in sub.options]
    assert len(got) == min(top, len(want))
    np.testing.assert_allclose(got, want[: len(got)], rtol=1e-9, atol=1e-15)
    for o in sub.options:
        check_option(o, stock, stage, refill, allow_polarized)


def check_option(o, stock, stage, refill, allow_polarized):
    """What the option says, recomputed from its parts; kept positions untouched."""
    topo = REGISTRY[stage.topology]
    values = dict(stage.values())
    assert [n for n, _ in o.refilled] == [n for n in topo.position_names() if n in refill]
    used: dict = {}
    for name, arr in o.refilled:
        values[name] = arr.value
        for piece in arr.parts:
            assert piece.line.qty > 0
            if piece.kind == "capacitor":
                assert allow_polarized or not piece.line.polarized
            key = (piece.kind, piece.line.index, piece.measured)
            used[key] = used.get(key, 0) + 1
    for (kind, index, measured), n in used.items():
        line = stock.lines(kind)[index]
        assert n <= (1 if measured is not None else line.qty - len(line.measured))
    f0, q, _ = topo.characteristics(values)
    assert o.achieved.f0_hz == pytest.approx(float(f0), rel=1e-12)
    assert o.pieces == sum(len(a.parts) for _, a in o.refilled)
    kept = [a for n, a in o.candidate.stages[0].positions if n not in refill]
    assert all(getattr(a.parts[0].line, "on_board", False) for a in kept)


def test_exact_part_in_stock_scores_zero():
    stock = Stock(
        resistors=(Resistor(10e3, 5, location="A1", index=0),),
        capacitors=(
            Capacitor(22e-9, 2, location="film box", index=0),
            Capacitor(10e-9, 1, location="D3", index=1),
        ),
    )
    stage = MarkedStage(
        "sallen-key-lowpass",
        (
            MarkedPart("R1", "resistor", 10e3, 0.05, True),
            MarkedPart("R2", "resistor", 10e3, 0.05, True),
            MarkedPart("C1", "capacitor", 22e-9, 0.1, True),
            MarkedPart("C2", "capacitor", 10e-9, 0.1, True),
        ),
    )
    sub = substitute(stage, stock, part="c1", top=3)
    best = sub.options[0]
    assert best.score == 0.0 and best.pieces == 1
    ((name, arr),) = best.refilled
    assert name == "C1" and arr.parts[0].location == "film box"
    # freeing C2 too: C1 22n and C2 10n are both on hand, the only exact pair
    both = substitute(stage, stock, part="C1", free=["C2"], top=3)
    assert both.options[0].score == 0.0 and both.options[0].pieces == 2
    # the second best refills never reuse the single 10n piece twice
    for o in both.options:
        tens = [p for _, a in o.refilled for p in a.parts if p.line.index == 1]
        assert len(tens) <= 1


def test_refusals():
    stock = Stock(resistors=(Resistor(10e3, 5, index=0),))
    stage = MarkedStage(
        "non-inverting-lowpass",
        (
            MarkedPart("R1", "resistor", 10e3, 0.05, True),
            MarkedPart("C1", "capacitor", 10e-9, 0.1, True),
        ),
    )
    with pytest.raises(NoDesignError, match="needs 1 capacitor"):
        substitute(stage, stock, part="C1")
    with pytest.raises(DesignError, match="no position 'C3'"):
        substitute(stage, stock, part="C3")
    with pytest.raises(DesignError, match="already being refilled"):
        substitute(stage, stock, part="R1", free=["r1"])
    polar = Stock(capacitors=(Capacitor(10e-9, 3, polarized=True, dielectric="electrolytic"),))
    with pytest.raises(NoDesignError, match="--allow-polarized"):
        substitute(stage, polar, part="C1")
    sub = substitute(stage, polar, part="C1", allow_polarized=True)
    assert sub.options[0].score == 0.0


def test_bounds_are_open():
    """A repair takes any value the stock has: a 100 ohm part is fine if the board had one."""
    assert ANY.of("resistor") == (0.0, math.inf) and isinstance(ANY, Bounds)
    stock = Stock(resistors=(Resistor(100.0, 2, index=0),), capacitors=())
    stage = MarkedStage(
        "inverting-lowpass",
        (
            MarkedPart("R1", "resistor", 100.0, 0.05, True),
            MarkedPart("R2", "resistor", 1e3, 0.05, True),
            MarkedPart("C1", "capacitor", 1e-6, 0.1, True),
        ),
    )
    sub = substitute(stage, stock, part="R1")
    assert sub.options[0].score == 0.0


def test_kept_values_outside_the_stock_range_are_searched():
    """The windows must bound the kept values too: here both resistors on the board (1 M)
    lie far above every resistor in stock, and only C2 is refilled."""
    stock = Stock(
        resistors=(Resistor(1e3, 5, index=0), Resistor(10e3, 5, index=1)),
        capacitors=tuple(
            Capacitor(v, 3, location="D", index=i) for i, v in enumerate((10e-12, 22e-12, 47e-12))
        ),
    )
    parts = (
        MarkedPart("R1", "resistor", 1e6, 0.05, True),
        MarkedPart("R2", "resistor", 1e6, 0.05, True),
        MarkedPart("C1", "capacitor", 47e-12, 0.1, True),
        MarkedPart("C2", "capacitor", 22e-12, 0.1, True),
    )
    sub = substitute(MarkedStage("sallen-key-lowpass", parts), stock, part="C2", top=1)
    assert sub.options[0].score == 0.0  # the 22p on hand is the marked value


def test_look_alikes_do_not_crowd_out_other_options():
    """Six 22n lines in one drawer are one option to a person; the next one must show."""
    caps = tuple(Capacitor(22e-9, 1, location="film box", index=i) for i in range(6))
    caps += (Capacitor(22e-9 * 1.01, 1, location="D9", index=6),)
    stock = Stock(resistors=(), capacitors=caps)
    parts = (
        MarkedPart("R1", "resistor", 10e3, 0.05, True),
        MarkedPart("C1", "capacitor", 22e-9, 0.1, True),
    )
    sub = substitute(
        MarkedStage("non-inverting-lowpass", parts), stock, part="C1", top=2, singles=True
    )
    assert [o.refilled[0][1].parts[0].location for o in sub.options] == ["film box", "D9"]
