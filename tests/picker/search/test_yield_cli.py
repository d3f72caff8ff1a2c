"""``picker design --rank yield``: the JSON carries each candidate's yield and how it
was found, the budget's Monte Carlo agrees with it, and the report shows the table."""

from __future__ import annotations

import json

from picker.cli import main
from tests.picker.test_design_cli import STOCK

ARGS = ("design", "lowpass", "--fc", "1k", "--order", "2", "--trials", "2000", "--top", "3")


def _run(capsys, tmp_path, *extra):
    path = tmp_path / "inventory.toml"
    path.write_text(STOCK, encoding="utf-8")
    code = main(["--stock", str(path), *ARGS, "--rank", "yield", *extra])
    out, _ = capsys.readouterr()
    return code, out


def test_json_yield_per_candidate(capsys, tmp_path):
    code, out = _run(capsys, tmp_path, "--json", "--window", "3%")
    assert code == 0
    doc = json.loads(out)
    cands = doc["candidates"]
    assert cands
    for cand in cands:
        got = cand["yield"]
        assert got["method"] in ("monte carlo", "estimate")
        assert 0.0 <= got["value"] <= 1.0
        if got["method"] == "monte carlo":
            # the same seed, trials and window as the budget: the same yield
            assert got["value"] == cand["budget"]["monte_carlo"]["yield"]
            assert got["trials"] == 2000
    assert cands[0]["yield"]["method"] == "monte carlo"


def test_report_shows_the_yield_table(capsys, tmp_path):
    code, out = _run(capsys, tmp_path)
    assert code == 0
    assert "yield inside the window (rank by yield)" in out
    assert "rank 1 by error: yield" in out
