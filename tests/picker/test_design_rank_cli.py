"""``picker design --rank/--max-error/--time-limit`` (docs/search.md, docs/cli.md): the
mode, the goal and whether it was met in the report and in --json, the saved design's
record of them, and refusals of bad values."""

from __future__ import annotations

import json

import pytest

from picker import export
from picker.cli import main
from tests.picker.test_design_cli import run, stock_file  # noqa: F401 (fixture)

BASE = ("design", "lowpass", "--fc", "1k", "--order", "2", "--trials", "100")


def _json(capsys, stock_file, *extra):  # noqa: F811
    code, out, err = run(capsys, "--stock", str(stock_file), *BASE, "--json", *extra)
    assert code == 0, err
    return json.loads(out)


def test_pieces_is_the_default_and_its_rank_1_has_the_fewest_pieces_within_the_goal(
    capsys,
    stock_file,  # noqa: F811
):
    doc = _json(capsys, stock_file, "--top", "3", "--max-error", "20%")
    assert doc["rank"] == "pieces" and doc["max_error"] == pytest.approx(0.2)
    assert doc["proven"] is True and doc["bound"] is None
    first = doc["candidates"][0]
    assert doc["goal_met"] is (first["score"] <= 0.2)
    # the trade-off lists the best score per piece count: rank 1 has the fewest pieces
    # among the counts whose best is within the goal
    within = [row["pieces"] for row in doc["tradeoff"] if row["score"] <= 0.2]
    assert first["pieces"] == min(within)
    pieces = [c["pieces"] for c in doc["candidates"] if c["score"] <= 0.2]
    assert pieces == sorted(pieces)


def test_error_rank_is_today_s_order_and_never_worse_than_pieces(capsys, stock_file):  # noqa: F811
    by_error = _json(capsys, stock_file, "--rank", "error", "--top", "1")
    by_pieces = _json(capsys, stock_file, "--top", "1", "--max-error", "0.2")
    assert by_error["rank"] == "error" and by_error["goal_met"] is True
    assert by_error["candidates"][0]["score"] <= by_pieces["candidates"][0]["score"]
    assert by_error["candidates"][0]["score"] == min(r["score"] for r in by_error["tradeoff"])


def test_a_goal_out_of_reach_is_said_and_by_how_much(capsys, stock_file):  # noqa: F811
    code, out, _ = run(
        capsys, "--stock", str(stock_file), *BASE, "--max-error", "0.000001%", "--top", "1"
    )
    assert code == 0
    assert "goal missed by" in out
    doc = _json(capsys, stock_file, "--max-error", "0.000001%", "--top", "1")
    assert doc["goal_met"] is False
    assert any("precision goal" in w for w in doc["candidates"][0]["warnings"])


def test_the_report_names_the_mode_and_marks_rank_1_in_the_trade_off(capsys, stock_file):  # noqa: F811
    code, out, _ = run(capsys, "--stock", str(stock_file), *BASE, "--max-error", "20%")
    assert code == 0
    assert "ranked by fewest pieces within 20 % worst error" in out
    assert "rank 1 proven" in out
    assert "< rank 1" in out


def test_the_saved_design_records_the_ranking(capsys, stock_file, tmp_path):  # noqa: F811
    target = tmp_path / "d.toml"
    code, _, err = run(
        capsys, "--stock", str(stock_file), *BASE, "--max-error", "1%", "--save", str(target)
    )
    assert code == 0, err
    saved = export.load_design(target)
    assert saved.request["rank"] == "pieces"
    assert saved.request["max_error"] == pytest.approx(0.01)


@pytest.mark.parametrize(
    "option, value, says",
    [
        ("--max-error", "abc", "percentage"),
        ("--max-error", "0", "above 0"),
        ("--max-error", "150%", "at most 100"),
        ("--time-limit", "-1", "above 0"),
        ("--time-limit", "soon", "seconds"),
        ("--time-limit", "nan", "above 0"),
    ],
)
def test_bad_values_are_refused_with_exit_2(capsys, stock_file, option, value, says):  # noqa: F811
    code = main(["--stock", str(stock_file), *BASE, option, value])
    _, err = capsys.readouterr()
    assert code == 2
    assert says in err and option in err
    assert "Traceback" not in err
