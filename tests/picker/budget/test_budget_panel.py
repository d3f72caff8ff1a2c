"""The budget panel renders inside 80 columns and says what the budget measured."""

from __future__ import annotations

import io

import pytest
from rich.console import Console

from picker.budget import budget
from picker.filters import plan_stages
from picker.report.budget_panel import BudgetPanel
from tests.picker.budget.helpers import candidate, opamp, stage


def render(renderable, width=80) -> str:
    console = Console(file=io.StringIO(), width=width, color_system=None)
    console.print(renderable)
    return console.file.getvalue()


def eighth_order(oa=None):
    stages = [
        stage(
            t.key,
            t.synthesize(tg),
            tol=0.01,
            ctol=0.05,
            target=tg,
            c_line={"dielectric": "X7R", "voltage": 10.0},
        )
        for t, tg in plan_stages("lowpass", order=8, fc_hz=1000.0, family="sallen-key")
    ]
    return candidate(*stages, opamp=oa)


@pytest.mark.parametrize("compact", [False, True])
@pytest.mark.parametrize("width", [80, 60])
@pytest.mark.parametrize("oa", [None, opamp()])
def test_panel_fits_the_width(compact, width, oa):
    b = budget(eighth_order(oa), trials=500, supply=15.0, vout_peak=5.0)
    text = render(BudgetPanel(b, compact=compact), width)
    lines = text.splitlines()
    assert max(len(line) for line in lines) <= width
    assert "…" not in text  # nothing cut short
    assert f"Yield {b.monte_carlo.yield_ * 100:.1f} %" in text
    for i in range(1, 5):
        assert f"Stage {i}: sallen-key-lowpass" in text
    assert ("-3 dB corner of the cascade" in text) is (not compact)
    assert "Class-2 ceramic" in text and "Voltage rating below 1.5" in text
    assert ("ideal op amp" in text) is (oa is None)


def test_one_stage_panel_shows_its_numbers():
    choice = stage(
        "sallen-key-lowpass",
        {"R1": 10e3, "R2": 10e3, "C1": 22e-9, "C2": 10e-9},
        tol=0.01,
        ctol=0.05,
    )
    b = budget(candidate(choice, opamp=opamp()), trials=1000)
    text = render(BudgetPanel(b))
    lo, hi = b.stages[0].tolerance.f0
    f0 = b.stages[0].target.f0_hz
    assert f"{(lo / f0 - 1) * 100:+.2f}..{(hi / f0 - 1) * 100:+.2f} %" in text
    assert "f0 of the stage, 1,000 trials" in text
    assert "GBW 3 MHz" in text
    assert max(len(line) for line in text.splitlines()) <= 80
