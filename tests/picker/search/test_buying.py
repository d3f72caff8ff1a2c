"""What to buy: each suggestion's "after" is what ``picker design`` gives on a copy of the
stock file with the purchase really added, the best single purchase is the best over
every value of the series (brute force: every assignment of every trial stock), and bad
options exit 2."""

from __future__ import annotations

import inspect
import json

import numpy as np
import pytest

from picker.cli import main
from picker.filters import plan_stages
from picker.search import Bounds, search
from picker.search.buying import Purchase, suggest, with_purchases
from picker.search.buyvalues import bracket, rank_key, series_in
from stock.eseries import series
from stock.load import load
from stock.model import Capacitor, Resistor, Stock
from tests.picker.search.brute import brute

# an invented little bench: few values, so that purchases matter
SMALL = """\
[[resistor]]
value = "10k"
qty = 4
tolerance = "1%"
location = "A1"

[[resistor]]
value = "33k"
qty = 2
tolerance = "1%"
location = "A2"

[[capacitor]]
value = "10n"
qty = 3
tolerance = "5%"
location = "C1"

[[capacitor]]
value = "47n"
qty = 2
tolerance = "5%"
location = "C2"
"""

# no time limit that a loaded machine could reach: the results must not depend on timing
DESIGN = ("design", "lowpass", "--fc", "1k", "--time-limit", "3600", "--order", "2")


def _cli(capsys, path, *extra):
    code = main(["--stock", str(path), *DESIGN, *extra])
    out, err = capsys.readouterr()
    return code, out, err


def _toml_line(kind: str, value: float, qty: int, tolerance: float, **_) -> str:
    return f'\n[[{kind}]]\nvalue = "{value!r}"\nqty = {qty}\ntolerance = "{100 * tolerance:g}%"\n'


def test_after_is_what_the_design_gives_with_the_purchase(capsys, tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_text(SMALL, encoding="utf-8")
    code, out, _ = _cli(capsys, path, "--rank", "error", "--suggest", "3", "--json")
    assert code == 0
    doc = json.loads(out)
    best = doc["candidates"][0]
    sugg = doc["suggestions"]
    assert sugg, "this sparse stock leaves room for a purchase to help"
    assert path.read_text(encoding="utf-8") == SMALL  # the user's file is never written
    for s in sugg:
        assert s["before"] == {"pieces": best["pieces"], "score": best["score"]}
        copy = tmp_path / f"bought-{len(list(tmp_path.iterdir()))}.toml"
        text = SMALL + _toml_line(s["kind"], s["value"], s["qty"], s["tolerance"])
        for extra in s["also"]:
            text += _toml_line(extra["kind"], extra["value"], extra["qty"], extra["tolerance"])
        copy.write_text(text, encoding="utf-8")
        code, out, _ = _cli(capsys, copy, "--rank", "error", "--json")
        assert code == 0
        after = json.loads(out)["candidates"][0]
        assert s["after"] == {"pieces": after["pieces"], "score": after["score"]}
        assert s["after"]["score"] < s["before"]["score"]  # better under --rank error


def test_after_under_rank_pieces_on_the_sample_bench(capsys, tmp_path):
    # rank pieces (the default) on a copy of the invented sample bench, two stages: the
    # afters proven from the one-stage bounds must be what the design gives
    from picker.commands.common import bundled_sample_path

    text = bundled_sample_path().read_text(encoding="utf-8")
    path = tmp_path / "inventory.toml"
    path.write_text(text, encoding="utf-8")
    args = ("--order", "4", "--top", "1", "--json")
    code = main(["--stock", str(path), *DESIGN[:-2], *args, "--suggest", "2"])
    out, _ = capsys.readouterr()
    assert code == 0
    doc = json.loads(out)
    assert doc["suggestions"] and doc["suggestions_proven"]
    for k, s in enumerate(doc["suggestions"]):
        copy = tmp_path / f"bought-{k}.toml"
        extra = "".join(_toml_line(**a) for a in s["also"])
        copy.write_text(text + _toml_line(s["kind"], s["value"], s["qty"], s["tolerance"]) + extra)
        code = main(["--stock", str(copy), *DESIGN[:-2], *args])
        out, _ = capsys.readouterr()
        assert code == 0
        after = json.loads(out)["candidates"][0]
        assert s["after"] == {"pieces": after["pieces"], "score": after["score"]}


def test_report_has_the_section(capsys, tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_text(SMALL, encoding="utf-8")
    code, out, _ = _cli(capsys, path, "--rank", "error", "--suggest", "1")
    assert code == 0
    assert "What to buy" in out
    assert "rank 1 before" in out and "rank 1 after" in out


def _small_stock() -> Stock:
    return Stock(
        resistors=(
            Resistor(10e3, 3, tolerance=0.01, index=0),
            Resistor(39e3, 2, tolerance=0.01, index=1),
        ),
        capacitors=(
            Capacitor(10e-9, 2, tolerance=0.05, index=0),
            Capacitor(33e-9, 2, tolerance=0.05, index=1),
        ),
    )


def _brute_key(stock, stages, bounds, rank, goal, singles=False):
    score, pieces, _, _ = brute(stock, stages, bounds, singles=singles)
    if not len(score):
        return rank_key(rank, goal, None, None), None
    if rank == "pieces" and (score <= goal).any():
        inside = score <= goal
        p = int(pieces[inside].min())
        s = float(score[inside & (pieces == p)].min())
    else:
        s = float(score.min())
        p = int(pieces[score == s].min())
    return rank_key(rank, goal, p, s), (p, s)


RANKS = ["error"]
if "rank" in inspect.signature(search).parameters:
    RANKS.append("pieces")


def _better(rank, key, than):
    return key < than if rank == "pieces" else key[0] < than[0]


@pytest.mark.parametrize("rank", RANKS)
@pytest.mark.parametrize("order,singles", [(2, False), (4, True)])
def test_best_single_is_the_best_over_the_series(rank, order, singles):
    stock = _small_stock()
    bounds = Bounds(r_min=1e3, r_max=100e3, c_min=1e-9, c_max=100e-9)
    stages = plan_stages("lowpass", order=order, fc_hz=1000.0)
    goal = 0.005
    got = suggest(
        stock,
        stages,
        rank=rank,
        max_error=goal,
        series="E12",
        n=20,  # more than the 15 pairs of the pool: the best single is among them
        bounds=bounds,
        singles=singles,
        scope="all",
    )
    assert got.proven
    # E12 (IEC 60063) within the bounds: 1k .. 100k is 25 values, 1n .. 100n 25 values
    assert len(got.tried) == 50
    key0, _ = _brute_key(stock, stages, bounds, rank, goal, singles)
    best_key, best = key0, None
    for kind, value in got.tried:
        tol = 0.01 if kind == "resistor" else 0.05
        copy, _ = with_purchases(stock, [Purchase(kind, value, tol, 2 * 2 * order)])
        key, pq = _brute_key(copy, stages, bounds, rank, goal, singles)
        if _better(rank, key, best_key) or (best is not None and key < best_key):
            best_key, best = key, pq
    single = [s for s in got.suggestions if not s.also]
    if best is None:
        assert single == []
        return
    top = single[0]
    assert top.after[0] == best[0]
    assert top.after[1] == pytest.approx(best[1], rel=1e-9, abs=1e-15)


def test_no_design_says_what_to_buy(capsys, tmp_path):
    # no capacitor within the bounds at all: exit 1, and a purchase that makes a design
    text = SMALL.replace('value = "10n"', 'value = "10u"').replace('value = "47n"', 'value = "22u"')
    path = tmp_path / "inventory.toml"
    path.write_text(text, encoding="utf-8")
    code, out, err = _cli(
        capsys, path, "--rank", "error", "--suggest", "2", "--json", "--c-max", "1u"
    )
    assert code == 1
    assert "no capacitor" in err
    doc = json.loads(out)
    assert doc["candidates"] == []
    assert doc["suggestions"]
    for s in doc["suggestions"]:
        assert s["before"] is None
        kinds = {s["kind"]} | {a["kind"] for a in s["also"]}
        assert "capacitor" in kinds


@pytest.mark.parametrize(
    "extra",
    [
        ("--suggest", "0"),
        ("--suggest", "x"),
        ("--suggest", "2", "--buy-series", "E7"),
        ("--suggest", "2", "--buy-tolerance", "1"),
        ("--suggest", "2", "--buy-tolerance", "1%,2%,3%"),
        ("--suggest", "2", "--buy-tolerance", "0%"),
        ("--suggest", "2", "--rank", "yield"),
    ],
)
def test_bad_options_exit_2(capsys, tmp_path, extra):
    path = tmp_path / "inventory.toml"
    path.write_text(SMALL, encoding="utf-8")
    code, out, err = _cli(capsys, path, *extra)
    assert code == 2
    assert "Traceback" not in err and out == ""


def test_preferred_values():
    e24 = series("E24")
    # IEC 60063 E24: 36 and 39 are neighbours, 4.7 is a member
    assert bracket(37.4e3, e24) == (36e3, 39e3)
    assert bracket(4.7e-9, e24) == (4.7e-9, 4.7e-9)
    assert bracket(9.6, e24) == (9.1, 10.0)
    # E12 from 1k to 10k inclusive: 13 values (IEC 60063 table 1)
    assert len(series_in(series("E12"), 1e3, 10e3)) == 13


def test_the_stock_on_disk_is_untouched(tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_text(SMALL, encoding="utf-8")
    stock = load(path)
    copy, lines = with_purchases(stock, [Purchase("resistor", 20e3, 0.01, 2)])
    assert len(copy.resistors) == len(stock.resistors) + 1
    assert lines[0].index == len(stock.resistors)
    assert path.read_text(encoding="utf-8") == SMALL
    assert np.isclose(copy.resistors[-1].value, 20e3)


def test_the_time_limit_is_shared_by_every_trial():
    """All the trials share one time limit (docs/buying.md, "Time"): with it spent at
    once, no trial runs, the result says so and nothing unproven is offered."""
    stock = _small_stock()
    stages = plan_stages("lowpass", order=2, fc_hz=1000.0)
    got = suggest(stock, stages, rank="error", max_error=0.005, series="E12", n=3, time_limit=0.0)
    assert not got.proven
    assert got.suggestions == []
    assert any("time limit ended the trials" in note for note in got.notes)


def test_suggest_with_rank_yield_says_why_and_what_to_do(capsys, tmp_path):
    """The refusal of --suggest with --rank yield gives the reason and the way round it
    (docs/buying.md)."""
    path = tmp_path / "inventory.toml"
    path.write_text(SMALL, encoding="utf-8")
    code, out, err = _cli(capsys, path, "--suggest", "2", "--rank", "yield")
    assert code == 2 and out == ""
    assert "because" in err and "--rank error" in err
    assert "Traceback" not in err
