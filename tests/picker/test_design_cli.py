"""``picker design``: JSON shape (docs/cli.md, docs/search.md), exit codes, the human report, saving."""

from __future__ import annotations

import io
import json
import math

import pytest
from rich.console import Console

from picker.cli import main
from picker.filters import get_topology
from tests.helpers import run_cli as run
from tests.helpers import write_stock

STOCK = """\
[[resistor]]
value = "10k"
qty = 4
tolerance = "1%"
location = "A1"

[[resistor]]
value = "15k"
qty = 2
location = "A2"

[[resistor]]
value = "22k"
qty = 3
tolerance = "1%"
location = "A3"
measured = ["21.9k"]

[[resistor]]
value = "4k7"
qty = 0
location = "A4"

[[capacitor]]
value = "10n"
qty = 4
tolerance = "5%"
dielectric = "C0G"
location = "C1"

[[capacitor]]
value = "22n"
qty = 2
dielectric = "film"
location = "C2"

[[capacitor]]
value = "10u"
qty = 5
dielectric = "electrolytic"
location = "E1"

[[opamp]]
name = "dual general purpose"
gbw = "3MHz"
channels = 2
qty = 2
location = "IC tray"
"""


@pytest.fixture
def stock_file(tmp_path):
    return write_stock(tmp_path, STOCK)


def test_json_has_the_documented_shape_and_consistent_numbers(capsys, stock_file):
    code, out, _ = run(
        capsys,
        "--stock",
        str(stock_file),
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--order",
        "2",
        "--json",
        "--trials",
        "200",
        "--top",
        "3",
        "--rank",
        "error",
    )
    assert code == 0
    doc = json.loads(out)
    assert set(doc) == {
        "candidates",
        "tradeoff",
        "rank",
        "max_error",
        "proven",
        "bound",
        "bound_of",
        "goal_met",
    }
    assert doc["rank"] == "error" and doc["proven"] is True and doc["bound"] is None
    cands = doc["candidates"]
    assert 1 <= len(cands) <= 3
    scores = [c["score"] for c in cands]
    assert scores == sorted(scores)
    for cand in cands:
        assert set(cand) == {"score", "pieces", "stages", "budget", "warnings", "alike"}
        worst, pieces = 0.0, 0
        for stage in cand["stages"]:
            assert set(stage) == {"topology", "order", "targets", "achieved", "positions", "budget"}
            topo = get_topology(stage["topology"])
            values = {}
            for ref, pos in stage["positions"].items():
                assert pos["arrangement"] in ("single", "series", "parallel")
                for part in pos["parts"]:
                    assert part["kind"] in ("resistor", "capacitor")
                    assert part["location"] != "E1"  # polarized: never by default
                    assert part["location"] != "A4"  # used up
                    pieces += 1
                values[ref] = pos["value"]
            f0, q, _ = topo.characteristics(values)
            assert math.isclose(stage["achieved"]["f0"], f0, rel_tol=1e-12)
            t = stage["targets"]
            # Butterworth second order: Q = 1/sqrt(2) (standard table value)
            assert math.isclose(t["q"], 2**-0.5, rel_tol=1e-9)
            worst = max(worst, abs(f0 / t["f0"] - 1), abs(q / t["q"] - 1))
        assert math.isclose(cand["score"], worst, rel_tol=1e-9, abs_tol=1e-15)
        assert cand["pieces"] == pieces
    for row in doc["tradeoff"]:
        assert set(row) == {"pieces", "score"}


def test_json_budget_present_when_the_budget_module_is(capsys, stock_file):
    pytest.importorskip("picker.budget")
    code, out, _ = run(
        capsys,
        "--stock",
        str(stock_file),
        "design",
        "highpass",
        "--fc",
        "500",
        "--order",
        "1",
        "--json",
        "--trials",
        "100",
        "--top",
        "1",
    )
    assert code == 0
    cand = json.loads(out)["candidates"][0]
    assert cand["budget"]["monte_carlo"]["trials"] == 100
    assert {"tolerance", "temperature", "opamp"} <= set(cand["stages"][0]["budget"])


def test_no_design_exits_1_and_says_what_is_missing(capsys, stock_file):
    code, out, err = run(
        capsys,
        "--stock",
        str(stock_file),
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--r-min",
        "2M",
        "--r-max",
        "3M",
    )
    assert code == 1
    assert "no resistor between 2M and 3M" in err
    assert "Traceback" not in err


def test_too_few_capacitors_exits_1(capsys, tmp_path):
    path = tmp_path / "s.toml"
    path.write_text(
        '[[resistor]]\nvalue = "10k"\nqty = 20\n[[capacitor]]\nvalue = "10n"\nqty = 3\n',
        encoding="utf-8",
    )
    code, _, err = run(
        capsys, "--stock", str(path), "design", "lowpass", "--fc", "1k", "--order", "4"
    )
    assert code == 1
    assert "the 2 stages need 4 capacitors, the stock has 3 usable" in err


@pytest.mark.parametrize(
    "argv, quoted",
    [
        (["--fc", "abc"], "abc"),
        (["--fc", "1k", "--temp", "70..0"], "70..0"),
        (["--fc", "1k", "--r-min", "10k", "--r-max", "1k"], "--r-min"),
        (["--fc", "1k", "--c-min", "1x"], "1x"),
    ],
)
def test_bad_input_exits_2(capsys, stock_file, argv, quoted):
    code, _, err = run(capsys, "--stock", str(stock_file), "design", "lowpass", *argv)
    assert code == 2
    assert quoted in err


def test_report_fits_80_columns_and_shows_parts_and_drawers(capsys, stock_file, monkeypatch):
    monkeypatch.setenv("COLUMNS", "80")
    code, out, _ = run(
        capsys,
        "--stock",
        str(stock_file),
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--order",
        "2",
        "--trials",
        "100",
    )
    assert code == 0
    assert max(len(line) for line in out.splitlines()) <= 80
    assert "candidates, best first" in out
    assert "parts vs precision" in out
    assert "C1" in out and "R2" in out and "@A" in out


def test_subcommand_stock_option_and_note_for_the_sample(capsys, tmp_path, monkeypatch):
    monkeypatch.delenv("PICKER_STOCK", raising=False)
    monkeypatch.chdir(tmp_path)
    code, out, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "2k",
        "--order",
        "1",
        "--json",
        "--trials",
        "50",
        "--top",
        "1",
    )
    assert code == 0
    assert "bundled sample" in err
    assert json.loads(out)["candidates"]


def test_save_writes_a_design_file(capsys, stock_file, tmp_path):
    export = pytest.importorskip("picker.export")
    target = tmp_path / "design.toml"
    code, _, err = run(
        capsys,
        "design",
        "lowpass",
        "--fc",
        "1k",
        "--order",
        "1",
        "--stock",
        str(stock_file),
        "--save",
        str(target),
        "--pick",
        "2",
        "--trials",
        "50",
    )
    assert code == 0, err
    saved = export.load_design(target)
    assert saved is not None and target.stat().st_size > 0


def test_schematic_names_every_position_with_value_and_drawer(stock_file):
    from picker.filters import plan_stages
    from picker.report import schematic
    from picker.search import search
    from stock.file import load

    stages = plan_stages("lowpass", order=2, fc_hz=1000.0, family="mfb", gain=2.0)
    cand = search(load(stock_file), stages, top=1).candidates[0]
    console = Console(file=io.StringIO(), width=80)
    console.print(schematic(cand))
    text = console.file.getvalue()
    for name, arr in cand.stages[0].positions:
        assert name in text
        for part in arr.parts:
            assert part.location in text
    assert "op amp" in text


def test_bad_save_target_is_refused_before_the_search(tmp_path, monkeypatch):
    """--save onto the stock file itself is refused at once, with nothing searched."""
    import shutil
    from pathlib import Path

    import picker.search as search_mod

    stock = tmp_path / "inventory.toml"
    shutil.copy(Path(__file__).resolve().parents[2] / "sample_inventory.toml", stock)
    before = stock.read_bytes()

    def no_search(*a, **k):  # the search must not even start
        raise AssertionError("searched before checking --save")

    monkeypatch.setattr(search_mod, "search", no_search)
    code = main(["design", "lowpass", "--fc", "1k", "--stock", str(stock), "--save", str(stock)])
    assert code == 2
    assert stock.read_bytes() == before
