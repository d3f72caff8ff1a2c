"""Saved designs with kept positions (a repair): written, read back, checked, refused."""

from __future__ import annotations

import pytest

from picker.errors import DesignError
from picker.export import design_from_candidate
from picker.export.design_file import design_document, design_from_document
from picker.repair.marked import parse_stage
from picker.repair.substitute import substitute
from stock.model import Capacitor, Resistor, Stock


def _design_doc():
    stock = Stock(
        resistors=(Resistor(10e3, 4, location="A1", index=0, line=3),),
        capacitors=(Capacitor(22e-9, 2, location="film box", index=0, line=9),),
    )
    stage = parse_stage("sallen-key-lowpass", ["R1=10k", "R2=10k/1%", "C1=22n", "C2=10n"])
    sub = substitute(stage, stock, part="C1", top=1)
    cand = sub.options[0].candidate
    return stock, cand, design_document(candidate=cand, request={"mode": "repair"}, stock=stock)


def test_round_trip_keeps_values_and_takes_only_the_refill():
    stock, cand, doc = _design_doc()
    design = design_from_candidate(candidate=cand, request={}, stock=stock)
    (st,) = design.stages
    kept = {p.name: p for p in st.positions if p.arrangement == "kept"}
    assert sorted(kept) == ["C2", "R1", "R2"]
    assert kept["R2"].kind == "resistor" and kept["R2"].value == 10e3
    assert kept["R2"].kept_tolerance == pytest.approx(0.01)
    assert kept["C2"].kind == "capacitor" and kept["C2"].parts == ()
    assert [(pos.name, part.location) for _, pos, _, part in design.parts()] == [("C1", "film box")]
    assert design.pieces == 1


@pytest.mark.parametrize(
    "change, words",
    [
        (lambda p: p.update(kind="inductor"), "is not resistor or capacitor"),
        (lambda p: p.update(value=-1.0), "must be a positive number"),
        (lambda p: p.update(tolerance=2.0), "is not a fraction"),
        (lambda p: p.pop("kind"), "kind: missing"),
        (lambda p: p.update(part=[{"kind": "resistor"}]), "takes no piece from the stock"),
    ],
)
def test_bad_kept_position_is_refused_naming_the_key(change, words):
    _, _, doc = _design_doc()
    pos = doc["candidate"]["stage"][0]["position"][0]
    assert pos["arrangement"] == "kept"
    change(pos)
    with pytest.raises(DesignError) as info:
        design_from_document(doc, source="fix.toml")
    assert "fix.toml: candidate.stage[0].position[0]." in str(info.value)
    assert words in str(info.value)


def test_unknown_arrangement_lists_kept_too():
    _, _, doc = _design_doc()
    doc["candidate"]["stage"][0]["position"][0]["arrangement"] = "glued"
    with pytest.raises(DesignError, match="single, series, parallel, kept"):
        design_from_document(doc, source="fix.toml")
