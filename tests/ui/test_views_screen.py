"""The views screen (key v): step response and group delay of the chosen candidate.

Check values: the second-order low-pass w0^2 / (s^2 + s w0/Q + w0^2) overshoots by
exp(-pi / sqrt(4 Q^2 - 1)) (the standard underdamped step response, common practice)
and delays by 1 / (Q w0) at DC; in general the DC group delay of b0 / a(s) is a1 / a0,
the ratio of the denominator's two lowest coefficients (the phase's slope at 0, closed
form). Bessel and Chebyshev shapes against scipy.signal (bessel, cheby1, step).
"""

from __future__ import annotations

import math
from types import SimpleNamespace

import numpy as np
import pytest
from test_flows import SIZE, choose_first, settle

from picker.ui.app import PickerApp
from picker.ui.screens.views import ViewsScreen, nice_step, time_unit, views_text


async def wait_done(pilot, screen) -> None:
    for _ in range(400):
        if screen.done:
            break
        await pilot.pause(0.05)
    assert screen.done, "the views were not computed"
    await pilot.pause()


async def test_views_of_the_chosen_candidate(stock_copy):
    from picker.analysis.step_delay import candidate_views

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await choose_first(pilot, app)
        candidate = app.screen.query_one("#chosen").candidate
        await pilot.press("v")
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, ViewsScreen) and screen.candidate is candidate
        await wait_done(pilot, screen)
        core = candidate_views(candidate, ("step", "delay"))
        assert screen.views.step.overshoot_pct == core.step.overshoot_pct
        assert screen.views.delay.dc_s == core.delay.dc_s
        (stage,) = candidate.stages
        q, w0 = stage.achieved.q, 2 * math.pi * stage.achieved.f0_hz
        # closed forms (module docstring); the 3 MHz op amp moves them by far less
        over = 100 * math.exp(-math.pi / math.sqrt(4 * q * q - 1))
        assert math.isclose(screen.views.step.overshoot_pct, over, abs_tol=0.05)
        assert math.isclose(screen.views.delay.dc_s, 1 / (q * w0), rel_tol=2e-3)
        from picker.repair.report import render

        panel = render(screen.query_one("#v-panel").content, width=80)
        assert "overshoot" in panel and "settles" in panel and "°" in panel
        plots = str(screen.query_one("#v-plots").render())
        assert "step response, V, against time" in plots and "group delay" in plots
        await pilot.press("q")
        await pilot.pause()
        assert type(app.screen).__name__ == "MainScreen"


async def test_views_need_a_chosen_candidate(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("4", "v")  # v works on pane 4, the chosen candidate's
        await pilot.pause()
        assert type(app.screen).__name__ == "MainScreen"
        assert any("choose a candidate first" in str(n.message) for n in app._notifications)


def ideal_candidate(response: str, order: int = 4, fc_hz: float = 1000.0):
    """Stages with the ideal values of ``plan_stages`` (no stock): what views need."""
    from picker.filters import plan_stages

    stages = []
    for topo, target in plan_stages("lowpass", response=response, order=order, fc_hz=fc_hz):
        values = topo.synthesize(target)
        stages.append(
            SimpleNamespace(topology=topo.key, achieved=target, values=lambda v=values: v)
        )
    return SimpleNamespace(stages=stages, opamp=None)


def scipy_reference(b, a, t_end: float):
    """Overshoot in percent and DC group delay a1/a0 of b/a, by scipy.signal.step."""
    from scipy import signal

    t = np.linspace(0.0, t_end, 40001)
    _, y = signal.step((b, a), T=t)
    return 100 * (y.max() / y[-1] - 1), a[-2] / a[-1]


def test_bessel_flat_and_chebyshev_ringing_against_scipy():
    from rich.console import Console
    from scipy import signal

    from picker.analysis.step_delay import candidate_views
    from picker.report.views import ViewsPanel

    wc = 2 * math.pi * 1000.0
    refs = {
        "bessel": signal.bessel(4, wc, analog=True, norm="mag"),
        "chebyshev": signal.cheby1(4, 1.0, wc, analog=True),  # 1 dB: plan_stages' default
    }
    shown = {}
    for response, (b, a) in refs.items():
        views = candidate_views(ideal_candidate(response), ("step", "delay"))
        over, dc = scipy_reference(b, a, t_end=0.02)
        assert math.isclose(views.step.overshoot_pct, over, abs_tol=0.05), response
        assert math.isclose(views.delay.dc_s, dc, rel_tol=1e-3), response
        console = Console(width=80, record=True, color_system=None)
        console.print(ViewsPanel(views))
        shown[response] = console.export_text() + "\n".join(views_text(views, 78))
    # at a glance: the Bessel's delay is flat and it barely overshoots (scipy: 0.84 %),
    # the Chebyshev's delay peaks well above its DC value and it rings
    assert "flat" in shown["bessel"] and "flat" not in shown["chebyshev"]
    assert "peak" in shown["chebyshev"] and "x the DC delay" in shown["chebyshev"]
    assert all(len(line) <= 80 for text in shown.values() for line in text.splitlines())


def test_axis_helpers():
    """1-2-5 steps cutting a span into about four (common practice for axis ticks)."""
    assert [nice_step(s) for s in (1.0, 4.0, 7.0, 0.03)] == pytest.approx([0.5, 1.0, 2.0, 0.01])
    assert time_unit(2.5e-3) == (1e-3, "ms") and time_unit(4e-7) == (1e-9, "ns")


async def test_views_say_they_are_busy_in_words(stock_copy):
    """The busy mark is text ("[busy]"), not markup that would vanish."""
    candidate = ideal_candidate("butterworth", order=2)
    screen = ViewsScreen(candidate)
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app, search=False)
        screen._compute = lambda candidate: None  # keep the busy state on screen
        await app.push_screen(screen)
        await pilot.pause()
        assert str(screen.query_one("#v-panel").render()).startswith("[busy] computing")
