"""Look-alike candidates are one row with a note (docs/search.md).

Interchangeable positions come from each topology's own characteristics: for the
unity-gain Sallen-Key low-pass f0 = 1/(2 pi sqrt(R1 R2 C1 C2)) and
Q = sqrt(R1 R2 C1 C2) / (C2 (R1 + R2)) (handbook form of the unity-gain stage) are
symmetric in R1 and R2 and not in C1 and C2; with gain K the R1 C1 (1 - K) term
breaks the symmetry. The grouping is checked against the plain search's list.
"""

from __future__ import annotations

from picker.filters import get_topology
from picker.parts import StageTarget
from picker.search import search
from picker.search.alike import group, look, swappable
from stock.model import Capacitor, Resistor, Stock


def test_swappable_positions_from_the_formulas():
    assert swappable("sallen-key-lowpass") == (("R1", "R2"),)
    assert ("R1", "R2") not in swappable("sallen-key-lowpass-gain")
    assert ("C1", "C2") not in swappable("sallen-key-lowpass")
    # high-pass unity gain: f0 symmetric in C1, C2 and Q = sqrt(..)/(R1 (C1 + C2))
    assert ("C1", "C2") in swappable("sallen-key-highpass")


STOCK = Stock(
    resistors=(
        Resistor(value=1.8e3, qty=1, tolerance=0.01, location="A4", index=0, line=1),
        Resistor(value=3e3, qty=1, tolerance=0.01, location="A5", index=1, line=2),
    ),
    capacitors=(
        Capacitor(value=100e-9, qty=1, tolerance=0.05, location="film box", index=0, line=3),
        Capacitor(value=100e-9, qty=1, tolerance=0.05, location="D4", index=1, line=4),
        Capacitor(value=47e-9, qty=1, tolerance=0.05, location="film box", index=2, line=5),
    ),
)
STAGES = [(get_topology("sallen-key-lowpass"), StageTarget(1000.0, 2**-0.5))]


def test_swaps_and_drawers_are_one_row_with_notes():
    plain = search(STOCK, STAGES, rank="error", singles=True, top=20, tradeoff=False)
    # 1k8 and 3k in R1/R2 either way, the 100n from either drawer: 4 builds of one design
    first = plain.candidates[0]
    same = [c for c in plain.candidates if look(c) == look(first)]
    assert len(same) == 4
    kept = group(plain.candidates)
    assert kept[0].stages == first.stages  # rank 1 is kept as it was
    notes = kept[0].alike
    assert "R1 and R2 may be swapped" in notes
    c1 = dict(first.stages[0].positions)["C1"]
    other = "D4" if c1.parts[0].location == "film box" else "film box"
    assert f"C1 also from drawer {other}" in notes
    # every candidate of the plain list is represented by one kept row of its look
    looks = [look(c) for c in kept]
    assert len(set(looks)) == len(looks)
    assert {look(c) for c in plain.candidates} == set(looks)
    # order: the kept rows come in the order of their first member
    firsts = []
    for c in plain.candidates:
        if look(c) not in firsts:
            firsts.append(look(c))
    assert looks == firsts


def test_the_shells_get_one_row_and_the_note():
    people = search(STOCK, STAGES, rank="error", singles=True, top=5, for_people=True)
    looks = [look(c) for c in people.candidates]
    assert len(set(looks)) == len(looks)
    assert "R1 and R2 may be swapped" in people.candidates[0].alike


def test_no_note_when_nothing_alike():
    plain = search(STOCK, STAGES, rank="error", singles=True, top=20, tradeoff=False)
    lone = [c for c in group(plain.candidates) if not c.alike]
    for c in lone:
        assert sum(look(o) == look(c) for o in plain.candidates) == 1


def test_the_cli_table_and_json_carry_the_note():
    import io

    from rich.console import Console

    from picker.report.design import DesignReport, design_json

    people = search(STOCK, STAGES, rank="error", singles=True, top=5, for_people=True)
    console = Console(file=io.StringIO(), width=100)
    console.print(DesignReport(people))
    assert "(R1 and R2 may be swapped)" in console.file.getvalue()
    assert "R1 and R2 may be swapped" in design_json(people)["candidates"][0]["alike"]
