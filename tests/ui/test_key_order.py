"""Keys that arrive together (one terminal read) are applied in the order typed.

A burst is put into the app's queue in one go, as the driver does with one read of
the terminal, and nothing is awaited between the keys; the expected field contents
are what typing the same keys one by one gives (the Input's own editing keys).
"""

from __future__ import annotations

from textual import events
from textual.widgets import Input

from picker.ui.app import PickerApp

SIZE = (80, 24)


def burst(app, *keys: str) -> None:
    """Post the keys as one terminal read would: all at once, nothing in between."""
    for key in keys:
        app.post_message(events.Key(key, key if len(key) == 1 else None))


async def until(pilot, condition, what: str) -> None:
    for _ in range(400):
        if condition():
            return
        await pilot.pause(0.01)
    raise AssertionError(f"never came true: {what}")


async def in_targets(pilot, app) -> Input:
    await until(pilot, lambda: getattr(app.screen, "started", False), "start-up done")
    await pilot.press("2")
    await until(pilot, lambda: app.screen.query("#t-fc"), "the targets pane mounted")
    fc = app.screen.query_one("#t-fc", Input)
    fc.focus()
    await pilot.pause()
    return fc


async def test_edits_and_typing_in_one_burst_keep_their_order(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        fc = await in_targets(pilot, app)
        burst(app, "ctrl+u", "1", "k", "backspace", "backspace", "2", "k", "tab")
        await until(pilot, lambda: app.focused is not fc, "tab moved the focus on")
        assert fc.value == "2k"


async def test_an_edit_before_a_pane_switch_is_applied_to_the_field(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        fc = await in_targets(pilot, app)
        burst(app, "end", "backspace", "ctrl+n")
        await until(pilot, lambda: app.screen.query_one("#panes").current == "matches", "ctrl+n")
        assert fc.value == "1"
        await pilot.press("2")
        fc.focus()
        await pilot.pause()
        burst(app, "ctrl+u", "ctrl+n")
        await until(pilot, lambda: app.screen.query_one("#panes").current == "matches", "ctrl+n")
        assert fc.value == ""


async def test_a_key_after_a_pane_switch_goes_to_the_new_pane(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        fc = await in_targets(pilot, app)
        # ctrl+n four times comes back to the targets pane, focus on its first field;
        # the digit after it must not be typed into fc, where the focus was before
        burst(app, "ctrl+n", "ctrl+n", "ctrl+n", "ctrl+n", "x")
        await until(pilot, lambda: app.screen.query_one("#panes").current == "targets", "back")
        await until(pilot, lambda: app.focused is not fc, "the focus left fc")
        await pilot.pause(0.1)
        assert fc.value == "1k"


async def test_focus_is_marked_and_f_keys_switch_panes_from_inside_a_field(stock_copy):
    from textual.widgets import Label

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        fc = await in_targets(pilot, app)
        row = fc.parent
        assert row.has_class("-focused")
        assert row.query_one(Label).styles.text_style.reverse  # the label in reverse
        assert fc.styles.border_left[0] == "outer"  # the bar at its left
        others = [r for r in app.screen.query(".field-row.-focused") if r is not row]
        assert others == []  # one row only
        burst(app, "end", "f3")  # a pane key from inside the field types nothing
        await until(pilot, lambda: app.screen.query_one("#panes").current == "matches", "f3")
        assert fc.value == "1k"
        assert not row.has_class("-focused")
        burst(app, "f2")
        await until(pilot, lambda: app.screen.query_one("#panes").current == "targets", "f2")
        assert fc.value == "1k"


async def test_keys_typed_right_after_a_dialog_opens_go_into_it(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await until(pilot, lambda: getattr(app.screen, "started", False), "start-up done")
        burst(app, "a", "4", "x", "7", "tab", "3")  # the add-line dialog, value, qty
        await until(pilot, lambda: app.screen.query("#add-qty"), "the dialog")
        await until(pilot, lambda: app.screen.query_one("#add-qty", Input).value, "qty")
        assert app.screen.query_one("#add-value", Input).value == "4x7"
        assert app.screen.query_one("#add-qty", Input).value == "3"
