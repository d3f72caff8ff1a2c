"""Pilot tests of the keys every pane shares (docs/ui.md): Home/End on tables."""

from __future__ import annotations

from test_flows import SIZE, settle
from textual.widgets import DataTable

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
