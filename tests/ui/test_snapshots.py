"""What the main screens look like at 80x24 (pytest-textual-snapshot SVGs).

Update after a deliberate change of the look with
``pytest tests/ui/test_snapshots.py --snapshot-update`` and review the SVGs.
Screens that show a measured time (the matches pane) are left out.
"""

from __future__ import annotations

from textual.widgets import Input

from picker.ui.app import PickerApp

SIZE = (80, 24)


async def settled(pilot) -> None:
    """Wait for the searches and budgets; stop cursors blinking so the picture is fixed."""
    app = pilot.app
    await pilot.pause(0.4)
    for _ in range(200):  # the panes mount a moment after the first paint
        if getattr(app.screen, "idle", True):
            break
        await pilot.pause(0.05)
    await app.workers.wait_for_complete()
    for _ in range(400):  # the stock file is read after the first paint: wait for its rows
        tables = app.screen.query("#stock-table")
        if not tables or tables.first().row_count:
            break
        await pilot.pause(0.05)
    await app.workers.wait_for_complete()
    for field in app.screen.query(Input):
        field.cursor_blink = False
    await pilot.pause()


def test_drawers_pane(snap_compare, stock_copy):
    assert snap_compare(PickerApp(stock_copy), terminal_size=SIZE, run_before=settled)


def test_targets_pane_with_a_bad_field(snap_compare, stock_copy):
    async def run_before(pilot):
        await settled(pilot)
        await pilot.press("2")
        pilot.app.screen.query_one("#t-gain", Input).focus()
        await pilot.press("ctrl+u", *"-3")
        await settled(pilot)

    assert snap_compare(PickerApp(stock_copy), terminal_size=SIZE, run_before=run_before)


def test_help_screen(snap_compare, stock_copy):
    async def run_before(pilot):
        await settled(pilot)
        await pilot.press("question_mark")
        await settled(pilot)

    assert snap_compare(PickerApp(stock_copy), terminal_size=SIZE, run_before=run_before)


def test_add_line_dialog(snap_compare, stock_copy):
    async def run_before(pilot):
        await settled(pilot)
        await pilot.press("a", *"4x7", "tab", *"3")
        await settled(pilot)

    assert snap_compare(PickerApp(stock_copy), terminal_size=SIZE, run_before=run_before)


def test_chosen_pane_and_build_confirmation(snap_compare, stock_copy):
    async def run_before(pilot):
        await settled(pilot)
        await pilot.press("ctrl+n", "ctrl+n")  # to the matches
        await settled(pilot)
        await pilot.press("enter")  # the best candidate
        await settled(pilot)
        await pilot.press("b")
        await settled(pilot)

    assert snap_compare(PickerApp(stock_copy), terminal_size=SIZE, run_before=run_before)
