"""Options with a size or a range are refused past it with a clear message (exit 2), before
any search starts: --trials, --top, --q, --seed (docs/cli.md)."""

from __future__ import annotations

import pytest

from picker.cli import main
from picker.targets import Q_RANGE, TOP_MAX, TRIALS_MAX


def run(capsys, *argv):
    try:
        code = main(["--stock", "sample_inventory.toml", "design", *argv])
    except SystemExit as exc:
        code = exc.code
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture(autouse=True)
def _at_root(monkeypatch):
    from pathlib import Path

    monkeypatch.chdir(Path(__file__).resolve().parents[2])


@pytest.mark.parametrize(
    "argv, says",
    [
        (("lowpass", "--fc", "1k", "--trials", str(10**6 + 1)), "--trials 1000001"),
        (("lowpass", "--fc", "1k", "--trials", "0"), "--trials 0"),
        (("lowpass", "--fc", "1k", "--top", "101"), "--top 101"),
        (("lowpass", "--fc", "1k", "--top", "0"), "--top 0"),
        (("lowpass", "--fc", "1k", "--q", "100.5"), "--q '100.5': must be from 0.01 to 100"),
        (("bandpass", "--fc", "1k", "--q", "1e6"), "--q '1e6': must be from 0.01 to 100"),
        (("lowpass", "--fc", "1k", "--seed", "-1"), "--seed -1"),
    ],
)
def test_out_of_range_options_are_refused(capsys, argv, says):
    code, out, err = run(capsys, *argv)
    assert code == 2, err
    assert says in err
    assert "Traceback" not in err and out == ""


def test_the_limits_are_those_the_issue_names():
    # issue 11: --trials at most 10^6, --top at most 100, --q at most 100
    assert TRIALS_MAX == 10**6 and TOP_MAX == 100 and Q_RANGE[1] == 100.0


def test_q_at_the_limit_is_accepted():
    from picker.targets import read_q

    assert read_q("100") == 100.0 and read_q("0.01") == 0.01
