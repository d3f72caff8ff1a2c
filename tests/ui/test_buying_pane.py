"""`p` on the matches pane: what to buy, as `picker design --suggest 3` says, off the UI
thread, stoppable with `s`."""

from __future__ import annotations

import json

from test_flows import SIZE, search_from_targets, settle
from textual.widgets import Input

from picker.cli import main
from picker.ui.app import PickerApp


async def wait_for(pilot, condition, seconds: float = 120.0) -> None:
    """Wait on a real condition (the suggestions shown), not a fixed sleep."""
    for _ in range(int(seconds / 0.05)):
        if condition():
            return
        await pilot.pause(0.05)
    raise AssertionError("the condition did not come true")


def on_screen(widget) -> str:
    """The text the widget draws now, line by line."""
    strips = widget.render_lines(widget.region.reset_offset)
    return "\n".join(strip.text for strip in strips)


async def test_what_to_buy_shows_what_the_cli_suggests(stock_copy, capsys):
    from picker.ui.widgets.matches import MatchesPane

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await search_from_targets(pilot, app)  # a 1.2 kHz second-order low-pass
        await pilot.press("ctrl+n")
        pane = app.screen.query_one(MatchesPane)
        assert app.focused.id == "m-table"
        await pilot.press("p")
        await pilot.pause()
        assert pane.buying and "[busy] what to buy" in str(pane.query_one("#m-buy").render())
        await pilot.press("down")  # the screen answers keys meanwhile
        assert pane.query_one("#m-table").cursor_row == 1
        await wait_for(pilot, lambda: not pane.buying)
        buy = pane.buy
        shown = on_screen(pane.query_one("#m-buy"))
    assert buy is not None
    code = main(
        [
            "design",
            "lowpass",
            "--fc",
            "1.2k",
            "--suggest",
            "3",
            "--json",
            "--stock",
            str(stock_copy),
        ]
    )
    out, _err = capsys.readouterr()
    assert code == 0
    expected = json.loads(out)["suggestions"]
    assert [s.to_json() for s in buy.suggestions] == expected
    if expected:
        assert "What to buy" in shown and "rank 1 after" in shown
    else:
        assert "no purchase" in shown


async def test_s_stops_the_suggestion_search_and_new_rows_clear_it(stock_copy):
    from picker.ui.widgets.matches import MatchesPane

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await search_from_targets(pilot, app)
        app.screen.query_one("#t-order", Input).focus()
        # order 4: its suggestion search runs some 26 searches (seconds), far longer
        # than the moment between two keys of one burst
        await pilot.press("ctrl+u", "4")
        await settle(pilot, app, 0.5)
        assert app.screen.result_targets.order == 4
        await pilot.press("ctrl+n")
        pane = app.screen.query_one(MatchesPane)
        await pilot.press("p", "s")
        await pilot.pause()
        # stopped at once: the pane says so and a result that comes later is not shown
        assert not pane.buying and pane.buy is None
        assert "stopped" in str(pane.query_one("#m-buy").render())
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert pane.buy is None and "stopped" in str(pane.query_one("#m-buy").render())
        # s with no suggestion search running is the screen's: stop the search
        await pilot.press("p")
        await pilot.pause()
        assert pane.buying
        await pilot.press("2")
        fc = app.screen.query_one("#t-fc", Input)
        fc.focus()
        await pilot.press("ctrl+u", *"1.5k")  # new targets: new rows, the old suggestions go
        await settle(pilot, app, 0.5)
        assert not pane.buying and pane.buy is None
        assert not pane.query_one("#m-buy").display
