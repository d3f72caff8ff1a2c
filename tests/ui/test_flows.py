"""Pilot tests of the UI flows at 80x24, on a private copy of a small stock file."""

from __future__ import annotations

from textual.widgets import DataTable, Input

from picker.ui.app import PickerApp
from picker.ui.widgets.drawers import DrawersPane

SIZE = (80, 24)


async def settle(pilot, app, seconds: float = 0.05) -> None:
    await pilot.pause(seconds)
    await app.workers.wait_for_complete()
    await pilot.pause()


async def test_filter_stock(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        table = app.screen.query_one("#stock-table", DataTable)
        assert table.row_count == 8          # 4 resistors, 3 capacitors, 1 op amp in the file
        await pilot.press("slash")
        await pilot.press(*"4.7k")           # another spelling of the 4k7 line
        await pilot.pause()
        assert table.row_count == 1
        assert table.get_row_at(0)[1] == "4k7"
        for _ in range(4):
            await pilot.press("backspace")
        await pilot.press(*"c0g")            # a word of a cell, any case
        await pilot.pause()
        assert table.row_count == 1
        assert table.get_row_at(0)[1] == "10n"


async def test_edit_quantity_changes_exactly_that_number(stock_copy):
    before = stock_copy.read_text(encoding="utf-8")
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("down")            # second line: 10k, qty 20
        await pilot.press("e")
        assert isinstance(app.focused, Input) and app.focused.id == "qty"
        await pilot.press(*"-3", "enter")
        await settle(pilot, app)
        table = app.screen.query_one("#stock-table", DataTable)
        assert table.get_row_at(1)[1:3] == ["10k", "17"]
    after = stock_copy.read_text(encoding="utf-8")
    # exactly one line differs, and it is the 10k line's qty going from 20 to 17
    diff = [(a, b) for a, b in zip(before.splitlines(), after.splitlines()) if a != b]
    assert diff == [("qty = 20", "qty = 17")]
    assert len(before.splitlines()) == len(after.splitlines())


async def test_bad_quantity_is_refused_in_place(stock_copy):
    before = stock_copy.read_bytes()
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("e", *"-11", "enter")      # 4k7 has 10
        message = str(app.screen.query_one("#qty-message").render())
        assert "only 10 on hand" in message and message.startswith("error:")
        await pilot.press(*["backspace"] * 3, *"2x")
        message = str(app.screen.query_one("#qty-message").render())
        assert "'2x'" in message
    assert stock_copy.read_bytes() == before


async def test_add_line_validates_in_place_then_appends(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("a")
        await pilot.pause()
        dialog = app.screen
        await pilot.press(*"4x7")
        await pilot.pause()
        message = str(dialog.query_one("#msg-value").render())
        assert message.startswith("error:") and "4x7" in message
        await pilot.press(*["backspace"] * 3, *"6k8", "tab", *"5", "tab", *"1%")
        await pilot.press("tab", *"B2", "enter")
        await settle(pilot, app)
        assert not isinstance(app.screen, type(dialog))
        pane = app.screen.query_one(DrawersPane)
        assert [r.cells[1] for r in pane.rows if r.kind == "resistor"][-1] == "6k8"
    text = stock_copy.read_text(encoding="utf-8")
    assert text.rstrip().endswith('location = "B2"')
    assert 'value = "6k8"' in text


async def test_help_lists_keys_and_cautions(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("question_mark")
        await pilot.pause()
        from picker.ui.screens.help import CAUTIONS, KEYS, HelpScreen
        assert isinstance(app.screen, HelpScreen)
        for words in ("Discharge capacitors", "Isolate", "rated", "polarity",
                      "local electrical codes", "licensed"):
            assert words in CAUTIONS
        assert "ctrl+q" in KEYS
        await pilot.press("q")
        await pilot.pause()
        assert not isinstance(app.screen, HelpScreen)


async def test_pane_keys_and_letters_inside_fields(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        assert app.screen.query_one("#panes").current == "targets"
        fc = app.screen.query_one("#t-fc", Input)
        fc.focus()
        await pilot.press("end", "1")         # a digit in a field types, it does not switch
        assert fc.value == "1k1"
        assert app.screen.query_one("#panes").current == "targets"
        await pilot.press("ctrl+n")           # works from inside the field
        assert app.screen.query_one("#panes").current == "matches"
