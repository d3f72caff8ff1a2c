"""A pick never silently answers other targets than the form's (docs in DEVELOPERS.md)."""

from __future__ import annotations

from dataclasses import replace

from test_flows import SIZE, choose_first, settle
from textual.widgets import Input

from picker.ui.app import PickerApp
from picker.ui.pick_targets import answers, differences
from picker.ui.targets_form import Targets


def test_answers_names_type_response_order_fc_gain():
    t = Targets(response_type="highpass", response="bessel", order=4, fc_hz=2500.0, gain=2.0)
    assert answers(t) == "highpass bessel, order 4, fc 2500 Hz, gain 2"


def test_differences_name_each_changed_field_by_its_form_label():
    was = Targets()
    now = replace(was, fc_hz=1500.0, r_min=2200.0, singles=True)
    assert differences(was, now) == [
        "fc 1000 Hz -> 1500 Hz",
        "R min 1k -> 2k2",
        "single pieces only not ticked -> ticked",
    ]
    assert differences(was, was) == []
    assert differences(was, None) == ["the targets form has a field marked error (pane 2)"]


async def test_a_pick_for_earlier_targets_is_marked_and_the_build_names_the_difference(
    stock_copy,
):
    from picker.ui.screens.confirm import ConfirmScreen
    from picker.ui.widgets.chosen import ChosenPane

    before = stock_copy.read_bytes()
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await choose_first(pilot, app)  # chosen for a 1.2 kHz low-pass
        pane = app.screen.query_one(ChosenPane)
        title = str(pane.query_one("#c-title").render())
        assert "lowpass butterworth, order 2, fc 1200 Hz, gain 1" in title
        assert str(pane.query_one("#c-stale").render()) == ""
        await pilot.press("f2")
        fc = app.screen.query_one("#t-fc", Input)
        fc.focus()
        await pilot.press("ctrl+u", *"1.5k")
        await settle(pilot, app, 0.5)
        await pilot.press("f4")
        stale = str(pane.query_one("#c-stale").render())
        assert stale.startswith("[old]") and "fc 1200 Hz -> 1500 Hz" in stale
        await pilot.press("b")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        assert "fc 1200 Hz -> 1500 Hz" in app.screen.question
        assert "earlier targets" in app.screen.question
        await pilot.press("n")
        await pilot.pause()
        assert stock_copy.read_bytes() == before


async def test_enter_on_rows_of_earlier_targets_does_not_open_them(stock_copy, monkeypatch):
    from picker.ui.screens.main import MainScreen

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await choose_first(pilot, app)
        opened = app.screen.query_one("#chosen").candidate
        # from now on a search is never started: the rows stay those of 1.2 kHz
        monkeypatch.setattr(MainScreen, "_start_search", lambda self: None)
        await pilot.press("f2")
        app.screen.query_one("#t-fc", Input).focus()
        await pilot.press("ctrl+u", *"1.5k", "f3", "down", "enter")
        await pilot.pause(0.1)
        assert app.screen.query_one("#panes").current == "matches"
        assert app.screen.query_one("#chosen").candidate is opened  # not replaced
        status = str(app.screen.query_one("#m-status").render())
        assert status.startswith("[old]") and "1200 Hz" in status


def test_a_changed_budget_input_or_stopband_is_named_by_its_field():
    from picker.ui.pick_targets import differences
    from picker.ui.targets_form import Targets

    was = Targets()
    now = Targets(supply=12.0, temp=(-20.0, 85.0), stopband_hz=4000.0, attenuation_db=40.0)
    assert differences(was, now) == [
        "stopband blank -> 4000 Hz",
        "atten dB blank -> 40",
        "temp C 0..70 -> -20..85",
        "supply V blank -> 12",
    ]
