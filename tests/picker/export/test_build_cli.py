"""`picker build`, `picker undo` and the quick export commands as the CLI runs them
(docs/outputs.md)."""

from __future__ import annotations

from picker.cli import main
from picker.export import save_design
from stock import ledger
from stock.file import load
from tests.picker.export.helpers import (
    REQUEST,
    lowpass_candidate,
    saved_design,
    two_stage_candidate,
)


def test_undo_of_a_folder_or_missing_file_says_so(tmp_path, capsys):
    assert main(["undo", "--stock", str(tmp_path), "--yes"]) == 2
    assert f"{tmp_path}: is a folder, not a file; name the stock file" in capsys.readouterr().err
    assert main(["undo", "--stock", str(tmp_path / "gone.toml"), "--yes"]) == 2
    assert "gone.toml: does not exist" in capsys.readouterr().err
    assert list(tmp_path.iterdir()) == []  # no ledger folder made


def test_cli_build_needs_yes_without_a_terminal(tmp_path, stock_file, capsys):
    saved_design(tmp_path, stock_file)
    before = stock_file.read_bytes()
    code = main(["build", str(tmp_path / "design.toml"), "--stock", str(stock_file)])
    assert code == 2
    assert "pass --yes" in capsys.readouterr().err
    assert stock_file.read_bytes() == before


def test_cli_build_and_undo_with_yes(tmp_path, stock_file, capsys):
    saved_design(tmp_path, stock_file)
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
    saved_design(tmp_path, stock_file)
    text = stock_file.read_text(encoding="utf-8").replace(
        'qty = 4\ntolerance = "1%"\nlocation = "A1, left"',
        'qty = 0\ntolerance = "1%"\nlocation = "A1, left"',
    )
    stock_file.write_text(text, encoding="utf-8")
    assert main(["build", str(tmp_path / "design.toml"), "--stock", str(stock_file), "--yes"]) == 1
    assert "cannot supply" in capsys.readouterr().err


def test_cli_bom_csv_and_netlist(tmp_path, stock_file, capsys):
    saved_design(tmp_path, stock_file)
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
    saved_design(tmp_path, stock_file, two_stage_candidate)
    assert main(["bom", str(tmp_path / "design.toml")]) == 0
    assert ": 2 stages, " in capsys.readouterr().out


def test_cli_build_never_lets_the_design_file_choose_the_stock(tmp_path, stock_file, capsys):
    saved_design(tmp_path, stock_file)
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

    saved_design(tmp_path, stock_file)
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


def test_cli_build_without_any_stock_path(tmp_path, stock_file, capsys):
    from stock.file import loads

    stock = loads(stock_file.read_text(encoding="utf-8"))  # no path: read from text
    save_design(
        tmp_path / "nopath.toml", candidate=lowpass_candidate(stock), request=REQUEST, stock=stock
    )
    assert main(["build", str(tmp_path / "nopath.toml"), "--yes"]) == 2
    assert "names no stock file; pass --stock FILE" in capsys.readouterr().err


def test_cli_stock_before_the_subcommand(tmp_path, stock_file):
    saved_design(tmp_path, stock_file)
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
