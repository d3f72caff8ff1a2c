"""Planning a build from a saved design: what it takes, what it refuses, what it warns of
(docs/stock-file.md, docs/outputs.md)."""

from __future__ import annotations

from dataclasses import replace

import pytest

from picker.building import do_build, plan_build
from picker.errors import NoDesignError
from picker.export import load_design
from picker.parts import Arrangement, Piece
from stock import ledger
from stock.errors import StockEditError
from stock.file import load
from tests.picker.export.helpers import lowpass_candidate, saved_design


def test_build_beyond_stock_refused_file_unchanged(tmp_path, stock_file):
    design = saved_design(tmp_path, stock_file)
    text = stock_file.read_text(encoding="utf-8").replace(
        'value = "7k5"\nqty = 3', 'value = "7k5"\nqty = 0'
    )
    stock_file.write_text(text, encoding="utf-8")
    before = stock_file.read_bytes()
    with pytest.raises(NoDesignError, match=r"resistor line 2 \(7k5 in A10\).*takes 1.*has 0"):
        plan_build(design, load(stock_file))
    assert stock_file.read_bytes() == before
    assert not ledger.ledger_dir(stock_file).exists()


def test_unmeasured_pieces_beyond_the_unmeasured_count_refused(tmp_path, stock_file):
    def two_nominal_910(stock):
        cand = lowpass_candidate(stock)
        r910 = stock.resistors[1]
        stage = cand.stages[0]
        pair = Arrangement("series", (Piece(r910, 910.0, 0.01), Piece(r910, 910.0, 0.01)))
        positions = (stage.positions[0], ("R2", pair), stage.positions[2])
        return replace(cand, stages=(replace(stage, positions=positions),))

    design = saved_design(tmp_path, stock_file, two_nominal_910)
    # 910R line: qty 2, one of them measured, so one unmeasured piece only
    with pytest.raises(NoDesignError, match=r"takes 2 \(2 unmeasured\).*has 2 \(1 unmeasured\)"):
        plan_build(design, load(stock_file))


def test_reordered_stock_refused(tmp_path, stock_file):
    design = saved_design(tmp_path, stock_file)
    text = stock_file.read_text(encoding="utf-8")
    a = text.index('[[resistor]]\nvalue = "7k5"')
    b = text.index('[[resistor]]\nvalue = "470R"')
    c = text.index("[[capacitor]]")
    text = text[:a] + text[b:c].rstrip("\n") + "\n\n" + text[a:b].rstrip("\n") + "\n\n" + text[c:]
    stock_file.write_text(text, encoding="utf-8")
    before = stock_file.read_bytes()
    with pytest.raises(StockEditError) as info:
        plan_build(design, load(stock_file))
    msg = str(info.value)
    assert "resistor line 2 (7k5 in A10), but the stock now has resistor line 2 (470R in A2" in msg
    assert "save it anew" in msg
    assert stock_file.read_bytes() == before


def test_hand_edited_design_blamed_not_the_stock(tmp_path, stock_file):
    # the stock is byte for byte the one saved (same sha256), so the design file changed
    design = saved_design(tmp_path, stock_file)
    path = tmp_path / "design.toml"
    text = path.read_text(encoding="utf-8")
    nominal = design.stages[0].positions[0].parts[0].nominal
    old = f"nominal = {nominal!r}"
    assert old in text
    path.write_text(text.replace(old, f"nominal = {nominal * 1.1!r}", 1), encoding="utf-8")
    with pytest.raises(StockEditError) as info:
        plan_build(load_design(path), load(stock_file))
    msg = str(info.value)
    assert "the design file was edited after it was saved" in msg
    assert "stock file changed" not in msg


def test_unrelated_edit_warns_and_builds(tmp_path, stock_file):
    design = saved_design(tmp_path, stock_file)
    text = stock_file.read_text(encoding="utf-8").replace(
        'value = "100u"\nqty = 1', 'value = "100u"\nqty = 6'
    )
    stock_file.write_text(text, encoding="utf-8")
    plan = plan_build(design, load(stock_file))
    assert plan.warnings == (
        "the stock file changed since the design was saved; every line "
        "the design names still matches",
    )
    do_build(stock_file, plan)
    assert load(stock_file).resistors[2].qty == 2


def test_measured_reading_gone_refused(tmp_path, stock_file):
    design = saved_design(tmp_path, stock_file)
    text = stock_file.read_text(encoding="utf-8").replace('["908.5"]', '["911"]')
    stock_file.write_text(text, encoding="utf-8")
    with pytest.raises(StockEditError, match=r"measured piece 0 \(908R5\).*no longer lists"):
        plan_build(design, load(stock_file))


def test_cautions_for_polarized_and_low_voltage_parts(tmp_path, stock_file):
    def with_electrolytic(stock):
        cand = lowpass_candidate(stock)
        stage = cand.stages[0]
        c = Arrangement("single", (Piece(stock.capacitors[1], 100e-6, 0.1),))
        return replace(cand, stages=(replace(stage, positions=stage.positions[:2] + (("C1", c),)),))

    design = saved_design(tmp_path, stock_file, with_electrolytic)
    cautions = plan_build(design, load(stock_file)).cautions
    assert any("C1: polarized electrolytic" in c for c in cautions)
    # 16 V rating against a 30 V op-amp supply limit, margin 1.5x (common practice)
    assert any("rated 16 V, less than 1.5x the op amp's 30 V" in c for c in cautions)
    assert "licensed practice" in cautions[-1]
    assert plan_build(saved_design(tmp_path, stock_file), load(stock_file)).cautions == ()


def test_same_measured_piece_cannot_be_built_twice(tmp_path, stock_file):
    design = saved_design(tmp_path, stock_file)
    do_build(stock_file, plan_build(design, load(stock_file)))
    with pytest.raises(StockEditError, match=r"measured piece 0 \(908R5\).*no longer lists"):
        plan_build(design, load(stock_file))


@pytest.mark.parametrize(
    "old, new, error, words",
    [
        (
            'channels = 2\nsupply = "30V"\nqty = 2',
            'channels = 2\nsupply = "30V"\nqty = 0',
            NoDesignError,
            r"op amp line 0 \('dual JFET-input'\).*takes 1, the stock has 0",
        ),
        (
            'name = "dual JFET-input"',
            'name = "dual bipolar"',
            StockEditError,
            r"names op amp line 0 \('dual JFET-input' in IC tray\), but the stock now has op amp "
            r"line 0 \(dual bipolar in IC tray",
        ),
    ],
)
def test_opamp_line_checked(tmp_path, stock_file, old, new, error, words):
    design = saved_design(tmp_path, stock_file)
    stock_file.write_text(
        stock_file.read_text(encoding="utf-8").replace(old, new), encoding="utf-8"
    )
    with pytest.raises(error, match=words):
        plan_build(design, load(stock_file))
