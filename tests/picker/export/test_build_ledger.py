"""A build writes the stock and its record; undo restores the bytes the build found
(docs/stock-file.md, docs/outputs.md)."""

from __future__ import annotations

import hashlib
from dataclasses import replace

import pytest

from picker.building import do_build, plan_build, undo_last, undo_preview
from picker.parts import Arrangement, Piece
from stock import ledger
from stock.errors import StockEditError
from stock.file import load
from tests.picker.export.helpers import lowpass_candidate, saved_design, two_stage_candidate


def _sha(path):
    return hashlib.sha256(path.read_bytes()).hexdigest()


def test_build_takes_exactly_the_pieces_then_undo_restores_bytes(tmp_path, stock_file):
    original = stock_file.read_bytes()
    design = saved_design(tmp_path, stock_file, two_stage_candidate)
    plan = plan_build(design, load(stock_file))
    assert plan.count == 7 + 1  # seven pieces, one dual op amp
    assert plan.warnings == ()
    result = do_build(stock_file, plan)
    assert result.before == original
    after = load(stock_file)
    # 15k: R2a + stage 2 R1; 910R: the measured piece; 7k5, 470R: one each; 10n: two
    assert [r.qty for r in after.resistors] == [4 - 2, 2 - 1, 3 - 1, 5 - 1]
    assert after.resistors[1].measured == ()
    assert [c.qty for c in after.capacitors] == [3 - 2, 1]
    assert after.opamps[0].qty == 2 - 1
    text = stock_file.read_text(encoding="utf-8")
    assert "# bench drawers (invented sample)" in text and 'location = "A1, left"' in text
    (rec,) = ledger.records(stock_file)
    assert rec.state == "done" and rec.sha256_after == _sha(stock_file)
    assert rec.design == str(design.path.resolve())
    assert any("take 2" in line and "15k" in line for line in rec.summary)

    assert undo_preview(stock_file).number == 1
    undo_last(stock_file)
    assert stock_file.read_bytes() == original
    assert ledger.records(stock_file)[0].state == "undone"
    with pytest.raises(StockEditError, match="no build to undo"):
        undo_last(stock_file)


def test_edit_between_plan_and_build_refused(tmp_path, stock_file):
    design = saved_design(tmp_path, stock_file)
    plan = plan_build(design, load(stock_file))
    stock_file.write_bytes(stock_file.read_bytes() + b"\n# a note added meanwhile\n")
    before = stock_file.read_bytes()
    with pytest.raises(StockEditError, match="changed since the build was checked"):
        do_build(stock_file, plan)
    assert stock_file.read_bytes() == before
    assert ledger.records(stock_file) == []


def test_measured_piece_consumed_removes_the_right_reading(tmp_path, stock_file):
    text = stock_file.read_text(encoding="utf-8").replace(
        'qty = 2\ntolerance = "1%"\nlocation = "A2"\nmeasured = ["908.5"]',
        'qty = 4\ntolerance = "1%"\nlocation = "A2"\nmeasured = ["905", "908.5", "912"]',
    )
    stock_file.write_text(text, encoding="utf-8")

    def takes_second_reading(stock):
        cand = lowpass_candidate(stock)
        stage = cand.stages[0]
        r15k, r910 = stock.resistors[0], stock.resistors[1]
        pair = Arrangement("series", (Piece(r15k, 15e3, 0.01), Piece(r910, 908.5, 0.01, 1)))
        positions = (stage.positions[0], ("R2", pair), stage.positions[2])
        return replace(cand, stages=(replace(stage, positions=positions),))

    design = saved_design(tmp_path, stock_file, takes_second_reading)
    plan = plan_build(design, load(stock_file))
    assert [c for c in plan.changes if c.index == 1 and c.kind == "resistor"][
        0
    ].remove_measured == (1,)
    do_build(stock_file, plan)
    line = load(stock_file).resistors[1]
    assert line.qty == 3 and line.measured == (905.0, 912.0)


def test_undo_refused_after_a_later_edit(tmp_path, stock_file):
    design = saved_design(tmp_path, stock_file)
    do_build(stock_file, plan_build(design, load(stock_file)))
    stock_file.write_bytes(stock_file.read_bytes() + b"# later\n")
    later = stock_file.read_bytes()
    with pytest.raises(StockEditError, match="changed since build 1.*build-0001.before"):
        undo_last(stock_file)
    assert stock_file.read_bytes() == later


def test_interrupted_build_that_never_wrote_is_dropped(tmp_path, stock_file):
    ledger.begin(stock_file, stock_file.read_bytes())  # pending, file untouched
    with pytest.raises(StockEditError, match="no build to undo"):
        undo_last(stock_file)
    assert ledger.records(stock_file) == []


def _no_measured(stock):
    cand = lowpass_candidate(stock)
    stage = cand.stages[0]
    r2 = Arrangement("single", (Piece(stock.resistors[0], 15e3, 0.01),))
    positions = (stage.positions[0], ("R2", r2), stage.positions[2])
    return replace(cand, pieces=4, stages=(replace(stage, positions=positions),))


def test_two_builds_undone_in_turn(tmp_path, stock_file):
    original = stock_file.read_bytes()
    design = saved_design(tmp_path, stock_file, _no_measured)
    do_build(stock_file, plan_build(design, load(stock_file)))
    middle = stock_file.read_bytes()
    # the same design onto the file as its last build left it reads as a retry: say "again"
    do_build(stock_file, plan_build(design, load(stock_file)), again=True)
    assert load(stock_file).resistors[2].qty == 3 - 2
    assert [r.number for r in ledger.records(stock_file)] == [1, 2]
    undo_last(stock_file)
    assert stock_file.read_bytes() == middle
    undo_last(stock_file)
    assert stock_file.read_bytes() == original
