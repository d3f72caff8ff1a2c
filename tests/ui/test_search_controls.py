"""The search controls of the targets pane: rank mode, precision goal, time limit, stop."""

from __future__ import annotations

import threading

import pytest
from test_flows import SIZE, settle
from textual.widgets import Input

from picker.ui import backend
from picker.ui.app import PickerApp
from picker.ui.targets_form import read_field
from stock.errors import ValueParseError


@pytest.mark.parametrize(
    "name, text, value",
    # as the CLI's --max-error (docs/cli.md): a percentage or a fraction; blank: its default
    [("goal", "0.5%", 0.005), ("goal", "0.02", 0.02), ("goal", "", 0.005), ("time", "", None)],
)
def test_goal_reads_as_the_cli_and_time_blank_means_no_limit(name, text, value):
    got = read_field(name, text)
    assert got is None if value is None else got == pytest.approx(value)


@pytest.mark.parametrize(
    "name, text, words",
    [("goal", "0", "above 0"), ("goal", "fine", "'fine'"), ("time", "-1", "above 0")],
)
def test_bad_goal_or_time_is_refused_by_the_field_name(name, text, words):
    with pytest.raises(ValueParseError, match=words):
        read_field(name, text)


def test_a_stopped_search_returns_the_best_so_far_unproven(stock_copy):
    from picker.ui.targets_form import Targets

    stock = backend.load_stock(stock_copy)
    targets = Targets(order=4, fc_hz=1000.0)
    kind, full = backend.search_job(stock, targets)
    assert kind == "done" and full.proven
    stop = threading.Event()
    stop.set()  # stopped before it starts: nothing is proven (picker.search.api)
    kind, stopped = backend.search_job(stock, targets, stop)
    assert kind == "done" and not stopped.proven


async def test_s_stops_the_running_search_and_the_targets_pane_shows_the_outcome(
    stock_copy, monkeypatch
):
    from picker.ui.offload import Lane

    def held_run(self, fn, stock, targets, stop, on_progress=None):  # waits for the stop key
        assert stop.wait(30)
        return fn(stock, targets, stop)

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        monkeypatch.setattr(Lane, "run", held_run)
        await pilot.press("f2")
        app.screen.query_one("#t-fc", Input).focus()
        await pilot.press("ctrl+u", *"1.5k")
        for _ in range(400):
            if app.screen.busy:
                break
            await pilot.pause(0.01)
        assert "s: stop" in str(app.screen.query_one("#m-status").render())
        await pilot.press("f3", "s")
        await settle(pilot, app)
        status = str(app.screen.query_one("#m-status").render())
        assert status.startswith("stopped:") and "not proven" in status
        outcome = str(app.screen.query_one("#t-outcome").render())
        assert outcome.startswith("search: stopped:")
