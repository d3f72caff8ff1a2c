"""The reach check of the search for people (picker.search.reach.check_reach) has slack,
says what the parts reach, and tells a limit of the stock from one of the bounds.

The worked example: an inverting first-order low-pass (R1 in, R2 with C1 across it)
from a stock of exactly 560k, 2k7 and 10n: f0 = 1/(2 pi R2 C1) = 1/(2 pi 560e3 10e-9)
= 28.4205 Hz and gain R2/R1 = 560k/2k7 = 207.4 (hand calculation, 1/(2 pi R C)).
"""

from __future__ import annotations

import math

import pytest

from picker.errors import NoDesignError
from picker.filters import plan_stages
from picker.search import search
from stock.file import load

STOCK = """\
[[resistor]]
value = "560k"
qty = 1
tolerance = "1%"
location = "A1"

[[resistor]]
value = "2k7"
qty = 1
tolerance = "1%"
location = "A2"

[[capacitor]]
value = "10n"
qty = 1
tolerance = "5%"
dielectric = "C0G"
location = "B1"
"""

F0 = 1 / (2 * math.pi * 560e3 * 10e-9)  # hand calculation, 1/(2 pi R C) = 28.4205 Hz


@pytest.fixture
def stock(tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_text(STOCK, encoding="utf-8")
    return load(path)


def design(stock, fc, **kw):
    stages = plan_stages("lowpass", order=1, fc_hz=fc, gain=560e3 / 2.7e3, family="inverting")
    return search(stock, stages, singles=True, for_people=True, **kw)


def test_the_worked_example_is_in_reach(stock):
    assert abs(F0 - 28.4205) < 1e-4  # hand calculation
    result = design(stock, 28.42)  # 28.42 Hz is 0.0018 % below what the parts give
    best = result.candidates[0].stages[0]
    assert best.achieved.f0_hz == pytest.approx(F0, rel=1e-12)
    assert best.achieved.gain == pytest.approx(207.407, rel=1e-5)  # 560k / 2k7


def test_a_target_a_little_past_the_reach_is_searched(stock):
    result = design(stock, 28.0)  # 1.5 % below: the best candidate shows its error
    assert result.candidates[0].score == pytest.approx(F0 / 28.0 - 1, rel=1e-6)


def test_far_out_of_reach_names_the_reach_and_the_stock_as_the_limit(stock):
    with pytest.raises(NoDesignError) as info:
        design(stock, 10.0)
    text = str(info.value)
    assert "28.421 Hz" in text  # what the parts reach, said
    assert "the stock's own" in text and "raise --r-max" not in text


def test_a_limit_set_by_the_bounds_says_which_bound(stock):
    from picker.search import Bounds

    with pytest.raises(NoDesignError) as info:
        design(stock, 28.42, bounds=Bounds(r_max=100e3))
    text = str(info.value)
    assert "outside the value bounds" in text and "raise --r-max" in text
