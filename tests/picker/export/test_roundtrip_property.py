"""Any candidate survives save -> load -> BOM/CSV: values, counts, awkward locations."""

from __future__ import annotations

import csv
import io
import tempfile
from pathlib import Path

from hypothesis import given, settings
from hypothesis import strategies as st

from picker.export import bom_csv, bom_rows, load_design, pick_count, pick_list, save_design
from picker.parts import Arrangement, Candidate, Piece, StageChoice, StageTarget
from stock.model import Capacitor, OpAmp, Resistor, Stock

locations = st.one_of(
    st.none(),
    st.text(alphabet=st.characters(blacklist_categories=("Cs", "Cc")), min_size=1, max_size=12),
)
resistor_values = st.floats(1.0, 1e7, allow_nan=False)
capacitor_values = st.floats(1e-12, 1e-4, allow_nan=False)


@st.composite
def designs(draw):
    rs = tuple(
        Resistor(
            draw(resistor_values),
            draw(st.integers(2, 9)),
            0.01,
            False,
            location=draw(locations),
            index=i,
            line=3 * i + 1,
        )
        for i in range(draw(st.integers(1, 4)))
    )
    cs = tuple(
        Capacitor(
            draw(capacitor_values),
            draw(st.integers(2, 9)),
            0.05,
            False,
            location=draw(locations),
            index=i,
            line=50 + 3 * i,
        )
        for i in range(draw(st.integers(1, 3)))
    )
    stages = []
    for _ in range(draw(st.integers(1, 3))):
        positions = []
        for name, pool in (("R1", rs), ("R2", rs), ("C1", cs)):
            arrangement = draw(st.sampled_from(["single", "series", "parallel"]))
            n = 1 if arrangement == "single" else 2
            parts = tuple(
                Piece(line, line.value, line.tolerance)
                for line in (draw(st.sampled_from(pool)) for _ in range(n))
            )
            positions.append((name, Arrangement(arrangement, parts)))
        stages.append(
            StageChoice(
                "inverting-lowpass",
                StageTarget(1e3, None, 2.0),
                StageTarget(1.01e3, None, 1.99),
                tuple(positions),
            )
        )
    oa = OpAmp(
        "quad general-purpose",
        1e6,
        3,
        channels=draw(st.sampled_from([1, 2, 4])),
        location=draw(locations),
        index=0,
        line=90,
    )
    pieces = sum(len(a.parts) for s in stages for _, a in s.positions)
    return Candidate(0.01, pieces, tuple(stages), oa), Stock(rs, cs, (oa,))


@settings(max_examples=60, deadline=None)
@given(designs())
def test_round_trip_and_bom(pair):
    cand, stock = pair
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "d.toml"
        save_design(path, candidate=cand, request={"type": "lowpass"}, stock=stock)
        design = load_design(path)
    for saved, orig in zip(design.stages, cand.stages, strict=False):
        assert [(p.name, p.arrangement, p.value) for p in saved.positions] == [
            (n, a.arrangement, a.value) for n, a in orig.positions
        ]
        assert [[x.location for x in p.parts] for p in saved.positions] == [
            [x.location for x in a.parts] for _, a in orig.positions
        ]
    rows = bom_rows(design)
    assert sum(r.count for r in rows if r.kind != "opamp") == cand.pieces
    assert pick_count(pick_list(design)) == sum(r.count for r in rows)
    parsed = list(csv.reader(io.StringIO(bom_csv(design), newline="")))
    assert len(parsed) == len(rows) + 1
    assert [f[3] for f in parsed[1:]] == [r.location or "" for r in rows]
    assert [int(f[4]) for f in parsed[1:]] == [r.count for r in rows]
