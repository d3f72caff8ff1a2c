"""Build a saved design out of a real stock file, then undo it (docs/stock-file.md, docs/outputs.md)."""

from __future__ import annotations

import hashlib
from dataclasses import replace

import pytest

from picker.building import do_build, plan_build, undo_last, undo_preview
from picker.cli import main
from picker.errors import NoDesignError
from picker.export import load_design, save_design
from picker.parts import Arrangement, Piece
from stock import ledger
from stock.errors import StockEditError
from stock.file import load
from tests.picker.export.helpers import REQUEST, lowpass_candidate, two_stage_candidate


def _design(tmp_path, stock_file, make=lowpass_candidate):
    stock = load(stock_file)
    path = tmp_path / "design.toml"
    save_design(path, candidate=make(stock), request=REQUEST, stock=stock)
    return load_design(path)


def _sha(path):
    return hashlib.sha256(path.read_bytes()).hexdigest()


def test_build_takes_exactly_the_pieces_then_undo_restores_bytes(tmp_path, stock_file):
    original = stock_file.read_bytes()
    design = _design(tmp_path, stock_file, two_stage_candidate)
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


def test_build_beyond_stock_refused_file_unchanged(tmp_path, stock_file):
    design = _design(tmp_path, stock_file)
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

    design = _design(tmp_path, stock_file, two_nominal_910)
    # 910R line: qty 2, one of them measured, so one unmeasured piece only
    with pytest.raises(NoDesignError, match=r"takes 2 \(2 unmeasured\).*has 2 \(1 unmeasured\)"):
        plan_build(design, load(stock_file))


def test_reordered_stock_refused(tmp_path, stock_file):
    design = _design(tmp_path, stock_file)
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
    design = _design(tmp_path, stock_file)
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


def test_undo_of_a_folder_or_missing_file_says_so(tmp_path, capsys):
    assert main(["undo", "--stock", str(tmp_path), "--yes"]) == 2
    assert f"{tmp_path}: is a folder, not a file; name the stock file" in capsys.readouterr().err
    assert main(["undo", "--stock", str(tmp_path / "gone.toml"), "--yes"]) == 2
    assert "gone.toml: does not exist" in capsys.readouterr().err
    assert list(tmp_path.iterdir()) == []  # no ledger folder made


def test_unrelated_edit_warns_and_builds(tmp_path, stock_file):
    design = _design(tmp_path, stock_file)
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


def test_edit_between_plan_and_build_refused(tmp_path, stock_file):
    design = _design(tmp_path, stock_file)
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

    design = _design(tmp_path, stock_file, takes_second_reading)
    plan = plan_build(design, load(stock_file))
    assert [c for c in plan.changes if c.index == 1 and c.kind == "resistor"][
        0
    ].remove_measured == (1,)
    do_build(stock_file, plan)
    line = load(stock_file).resistors[1]
    assert line.qty == 3 and line.measured == (905.0, 912.0)


def test_measured_reading_gone_refused(tmp_path, stock_file):
    design = _design(tmp_path, stock_file)
    text = stock_file.read_text(encoding="utf-8").replace('["908.5"]', '["911"]')
    stock_file.write_text(text, encoding="utf-8")
    with pytest.raises(StockEditError, match=r"measured piece 0 \(908R5\).*no longer lists"):
        plan_build(design, load(stock_file))


def test_undo_refused_after_a_later_edit(tmp_path, stock_file):
    design = _design(tmp_path, stock_file)
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


def test_cautions_for_polarized_and_low_voltage_parts(tmp_path, stock_file):
    def with_electrolytic(stock):
        cand = lowpass_candidate(stock)
        stage = cand.stages[0]
        c = Arrangement("single", (Piece(stock.capacitors[1], 100e-6, 0.1),))
        return replace(cand, stages=(replace(stage, positions=stage.positions[:2] + (("C1", c),)),))

    design = _design(tmp_path, stock_file, with_electrolytic)
    cautions = plan_build(design, load(stock_file)).cautions
    assert any("C1: polarized electrolytic" in c for c in cautions)
    # 16 V rating against a 30 V op-amp supply limit, margin 1.5x (common practice)
    assert any("rated 16 V, less than 1.5x the op amp's 30 V" in c for c in cautions)
    assert "licensed practice" in cautions[-1]
    assert plan_build(_design(tmp_path, stock_file), load(stock_file)).cautions == ()


def test_cli_build_needs_yes_without_a_terminal(tmp_path, stock_file, capsys):
    _design(tmp_path, stock_file)
    before = stock_file.read_bytes()
    code = main(["build", str(tmp_path / "design.toml"), "--stock", str(stock_file)])
    assert code == 2
    assert "pass --yes" in capsys.readouterr().err
    assert stock_file.read_bytes() == before


def test_cli_build_and_undo_with_yes(tmp_path, stock_file, capsys):
    _design(tmp_path, stock_file)
    before = stock_file.read_bytes()
    assert main(["build", str(tmp_path / "design.toml"), "--stock", str(stock_file), "--yes"]) == 0
    out = capsys.readouterr().out
    assert "A1, left" in out and "Took 6 parts" in out
    assert stock_file.read_bytes() != before
    assert main(["undo", "--stock", str(stock_file), "--yes"]) == 0
    assert "number 1" in capsys.readouterr().out
    assert stock_file.read_bytes() == before
    assert main(["undo", "--stock", str(stock_file), "--yes"]) == 2
    err = capsys.readouterr().err
    # the folder still holds the undone record: the message must not say it holds none
    assert "no build to undo (build 1 recorded in" in err and "already undone" in err
    assert "no records" not in err


def test_cli_build_short_stock_exit_1(tmp_path, stock_file, capsys):
    _design(tmp_path, stock_file)
    text = stock_file.read_text(encoding="utf-8").replace(
        'qty = 4\ntolerance = "1%"\nlocation = "A1, left"',
        'qty = 0\ntolerance = "1%"\nlocation = "A1, left"',
    )
    stock_file.write_text(text, encoding="utf-8")
    assert main(["build", str(tmp_path / "design.toml"), "--stock", str(stock_file), "--yes"]) == 1
    assert "cannot supply" in capsys.readouterr().err


def test_cli_bom_csv_and_netlist(tmp_path, stock_file, capsys):
    _design(tmp_path, stock_file)
    assert main(["bom", str(tmp_path / "design.toml"), "--csv"]) == 0
    out = capsys.readouterr().out
    assert out.startswith("kind,value,tolerance,location,count,positions,measured\r\n")
    assert main(["bom", str(tmp_path / "design.toml")]) == 0
    out = capsys.readouterr().out
    assert "Bill of materials" in out and "Pick list by drawer" in out
    assert out.startswith("lowpass butterworth, order 1, fc 1 kHz: 1 stage, 5 pieces")
    assert main(["netlist", str(tmp_path / "design.toml")]) == 0
    assert "V1 in 0 DC 0 AC 1" in capsys.readouterr().out
    assert main(["bom", str(tmp_path / "missing.toml")]) == 2
    assert "missing.toml: cannot read" in capsys.readouterr().err
    _design(tmp_path, stock_file, two_stage_candidate)
    assert main(["bom", str(tmp_path / "design.toml")]) == 0
    assert ": 2 stages, " in capsys.readouterr().out


def test_cli_build_never_lets_the_design_file_choose_the_stock(tmp_path, stock_file, capsys):
    _design(tmp_path, stock_file)
    before = stock_file.read_bytes()
    # with --yes (or without a terminal) the stock must be named; the message names it
    assert main(["build", str(tmp_path / "design.toml"), "--yes"]) == 2
    err = capsys.readouterr().err
    assert f"was saved from {stock_file.resolve()}; name the stock file" in err
    assert f"--stock {stock_file.resolve()}" in err
    assert stock_file.read_bytes() == before
    assert not ledger.ledger_dir(stock_file).exists()


def test_cli_build_asks_naming_the_design_stock(tmp_path, stock_file, capsys, monkeypatch):
    from picker.commands import build_cmd

    _design(tmp_path, stock_file)
    asked = []

    def answer(question):
        asked.append(question)
        return "n" if len(asked) == 1 else "y"

    monkeypatch.setattr(build_cmd, "_interactive", lambda: True)
    monkeypatch.setattr("builtins.input", answer)
    before = stock_file.read_bytes()
    assert main(["build", str(tmp_path / "design.toml")]) == 0  # "n": nothing taken
    assert f"saved from {stock_file.resolve()}. Take the parts from that file?" in asked[0]
    assert stock_file.read_bytes() == before
    assert main(["build", str(tmp_path / "design.toml")]) == 0  # "y" to the file, then parts
    assert f"parts from {stock_file.resolve()}?" in asked[2]
    assert load(stock_file).resistors[2].qty == 2


def test_cli_never_writes_the_bundled_sample(tmp_path, capsys):
    from picker.commands.common import bundled_sample_path

    sample = bundled_sample_path()
    before = sample.read_bytes()
    assert main(["undo", "--stock", str(sample), "--yes"]) == 2
    assert "bundled sample" in capsys.readouterr().err
    assert sample.read_bytes() == before


def _no_measured(stock):
    cand = lowpass_candidate(stock)
    stage = cand.stages[0]
    r2 = Arrangement("single", (Piece(stock.resistors[0], 15e3, 0.01),))
    positions = (stage.positions[0], ("R2", r2), stage.positions[2])
    return replace(cand, pieces=4, stages=(replace(stage, positions=positions),))


def test_same_measured_piece_cannot_be_built_twice(tmp_path, stock_file):
    design = _design(tmp_path, stock_file)
    do_build(stock_file, plan_build(design, load(stock_file)))
    with pytest.raises(StockEditError, match=r"measured piece 0 \(908R5\).*no longer lists"):
        plan_build(design, load(stock_file))


def test_two_builds_undone_in_turn(tmp_path, stock_file):
    original = stock_file.read_bytes()
    design = _design(tmp_path, stock_file, _no_measured)
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


def test_cli_build_without_any_stock_path(tmp_path, stock_file, capsys):
    from stock.file import loads

    stock = loads(stock_file.read_text(encoding="utf-8"))  # no path: read from text
    save_design(
        tmp_path / "nopath.toml", candidate=lowpass_candidate(stock), request=REQUEST, stock=stock
    )
    assert main(["build", str(tmp_path / "nopath.toml"), "--yes"]) == 2
    assert "names no stock file; pass --stock FILE" in capsys.readouterr().err


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
    design = _design(tmp_path, stock_file)
    stock_file.write_text(
        stock_file.read_text(encoding="utf-8").replace(old, new), encoding="utf-8"
    )
    with pytest.raises(error, match=words):
        plan_build(design, load(stock_file))


def test_cli_stock_before_the_subcommand(tmp_path, stock_file):
    _design(tmp_path, stock_file)
    assert main(["--stock", str(stock_file), "build", str(tmp_path / "design.toml"), "--yes"]) == 0
    assert load(stock_file).resistors[2].qty == 2
    assert main(["--stock", str(stock_file), "undo", "--yes"]) == 0
    assert load(stock_file).resistors[2].qty == 3


def test_cli_build_from_a_design_saved_from_the_sample_says_so_at_once(tmp_path, capsys):
    """A design saved from the sample at the source tree's root (the README's run command
    opens it): without --stock, the refusal names the sample instead of suggesting
    --stock with it, a command that would be refused in turn."""
    from tests.helpers import SAMPLE

    design = tmp_path / "d.toml"
    save = ["design", "lowpass", "--fc", "1k", "--order", "1", "--stock", str(SAMPLE)]
    assert main([*save, "--save", str(design)]) == 0
    capsys.readouterr()
    before = SAMPLE.read_bytes()
    assert main(["build", str(design), "--yes"]) == 2
    err = capsys.readouterr().err
    assert "is the bundled sample, which picker does not change" in err
    assert "--stock with the copy" in err
    assert SAMPLE.read_bytes() == before
