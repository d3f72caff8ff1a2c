"""Pilot tests of the keys every pane shares (docs/ui.md): Home/End on tables."""

from __future__ import annotations

from test_flows import SIZE, settle
from textual.widgets import DataTable, Input

from picker.ui.app import PickerApp
from picker.ui.widgets.common import RowTable


async def test_home_and_end_go_to_first_and_last_row_of_the_drawers(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        table = app.screen.query_one("#stock-table", DataTable)
        table.focus()
        await pilot.pause()
        assert table.row_count == 8  # 8 lines in the test stock file
        await pilot.press("end")
        assert table.cursor_row == 7
        await pilot.press("home")
        assert table.cursor_row == 0


async def test_every_pane_table_is_the_shared_one(stock_copy):
    """One table class for drawers and matches, so Home/End act the same on each."""
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        tables = list(app.screen.query(DataTable))
        assert {t.id for t in tables} >= {"stock-table", "m-table"}
        assert all(isinstance(t, RowTable) for t in tables)


async def test_escape_in_the_quantity_field_restores_it_and_goes_back_to_the_table(stock_copy):
    """Escape cancels: the text the field had on focus comes back, nothing is written."""
    before = stock_copy.read_text(encoding="utf-8")
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("e", *"-3")
        qty = app.screen.query_one("#qty", Input)
        assert qty.value == "-3"
        await pilot.press("escape")
        assert qty.value == ""
        assert isinstance(app.focused, DataTable) and app.focused.id == "stock-table"
        await pilot.press("e", *"+1", "ctrl+g")  # the same with ctrl+g
        assert qty.value == ""
        assert isinstance(app.focused, DataTable)
    assert stock_copy.read_text(encoding="utf-8") == before


async def test_escape_in_the_find_field_restores_the_words_it_had(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        table = app.screen.query_one("#stock-table", DataTable)
        await pilot.press("slash", *"c0g", "enter")  # kept: enter applies the words
        await pilot.pause()
        assert table.row_count == 1
        await pilot.press("slash", "backspace", "backspace", "backspace", *"4k7")
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen.query_one("#find", Input).value == "c0g"
        assert table.row_count == 1 and str(table.get_row_at(0)[1]) == "10n"
        assert app.focused is table


async def test_footer_keeps_help_and_quit_on_a_60_by_18_screen(stock_copy):
    """A narrow terminal still shows how to get help and how to leave."""
    from textual.widgets._footer import FooterKey

    app = PickerApp(stock_copy)
    async with app.run_test(size=(60, 18)) as pilot:
        await settle(pilot, app)
        shown = {
            key.key_display
            for key in app.screen.query(FooterKey)
            if key.region.width and key.region.right <= 60
        }
        assert {"?", "^q"} <= shown


async def test_escape_merged_with_the_next_key_is_escape_then_that_key(stock_copy):
    """tmux (its escape-time) and slow links send Escape and a fast next key as one
    sequence, ESC then the key, which arrives as alt+key (ESC 3 used to become a pound
    sign in the field). The line splits it back: the edit is cancelled, then the key
    acts where the focus went, as when typed slowly."""
    from textual import events

    from picker.ui.key_order import _split

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("slash", *"4k7", "alt+end")  # not one character: left alone
        await pilot.press("alt+3")
        await pilot.pause()
        assert app.screen.query_one("#find", Input).value == ""  # restored, no "£" or "3"
        # 3 acted as a key once the field was left: pane 3, the matches table
        assert app.focused is app.screen.query_one("#m-table", DataTable)
    split = _split(events.Key("alt+3", None))
    assert [k.key for k in split] == ["escape", "3"]
    assert [k.key for k in _split(events.Key("alt+shift+a", None))] == ["escape", "A"]
    assert [k.key for k in _split(events.Key("alt+up", None))] == ["alt+up"]


def test_escape_and_a_digit_are_not_read_as_an_option_character():
    from textual._ansi_sequences import ANSI_SEQUENCES_KEYS

    import picker.ui.key_order  # noqa: F401 (the import removes the entries)

    assert "\x1b3" not in ANSI_SEQUENCES_KEYS
    assert ANSI_SEQUENCES_KEYS["\x1b[A"]  # the arrow keys' sequences stay
