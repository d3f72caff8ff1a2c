"""Status and error lines wrap and are never cut at 80x24 (docs/ui.md, "Focus marks and
colours"): a long message (a fault quoting a stock file path of 120 characters, a no-design
reason naming several fields) can be read whole, with the keys alone, in every pane and
dialog that shows one. Escape in a targets field leaves it for the pane's status box.
(Pilot tests.)"""

from __future__ import annotations

from pathlib import Path

from test_flows import SIZE, settle, targets_field
from textual.geometry import Region
from textual.widgets import Input

from picker.ui.app import PickerApp
from picker.ui.screens.confirm import ConfirmScreen

# a path of 121 characters, as a bench stock file deep in a project tree can have
DEEP = "bench-stock-of-the-filter-lab/"


def deep_path(tmp_path: Path) -> Path:
    path = tmp_path
    while len(str(path / "drawers.toml")) < 121:
        path = path / DEEP
    return path / "drawers.toml"


def words(text: str) -> str:
    """The text with every space and line break taken out: wrapping moves line breaks,
    so a message shown whole has the same letters in the same order."""
    return "".join(text.split())


def drawn(widget) -> str:
    """Everything the widget draws in its own region (the whole of it, also the rows a
    scrolling box around it does not show at the moment)."""
    lines = widget.render_lines(Region(0, 0, *widget.size))
    return "\n".join(line.text for line in lines)


def on_screen(app) -> str:
    update = app.screen._compositor.render_full_update()
    return "\n".join("".join(strip.text for strip in line) for line in update.strips)


async def read_box_to_the_end(pilot, app, box) -> str:
    """Tab to ``box`` (it must take the focus when it has more than it shows), then page
    down to its end; the text seen on the way."""
    for _ in range(40):
        if app.focused is box:
            break
        await pilot.press("tab")
    assert app.focused is box, "tab never reached the box: its end cannot be read"
    seen = [on_screen(app)]
    for _ in range(40):
        if box.scroll_y >= box.max_scroll_y:
            break
        await pilot.press("pagedown")
        await pilot.pause()
        seen.append(on_screen(app))
    assert box.scroll_y >= box.max_scroll_y
    return "\n".join(seen)


async def test_a_stock_file_with_many_faults_shows_every_one_whole(tmp_path):
    stock = deep_path(tmp_path)
    stock.parent.mkdir(parents=True)
    stock.write_text(
        "".join(
            f'[[resistor]]\nvalue = "4k7x{i}"\nqty = 3\nlocation = "A{i}"\n\n' for i in range(14)
        )
    )
    app = PickerApp(stock)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app, search=False)
        status = app.screen.query_one("#drawers-status")
        text = drawn(status)
        for i in range(14):  # each fault names the file, its line and the value
            assert words(f"{stock}:{2 + 5 * i}: resistor value: cannot read value '4k7x{i}'") in (
                words(text)
            )
        assert "press r to read it again" in text  # the last line, after all 14
        seen = await read_box_to_the_end(pilot, app, app.screen.query_one("#drawers-box"))
        assert "'4k7x13'" in seen and "press r to read it again" in seen


LONG_REASON = (
    "no design: no pair of resistors between R min 1k and R max 1.2k and no pair of "
    "capacitors between C min 100p and C max 120p gives fc 3.3k with gain 10 and Q 5 "
    "within the goal 0.1%; widen R min, R max, C min or C max, raise the goal or the "
    "time s, or untick single pieces only. The stock file "
)


async def test_the_targets_outcome_shows_a_long_no_design_reason_whole(stock_copy, tmp_path):
    reason = LONG_REASON * 2 + str(deep_path(tmp_path)) + " holds 8 lines."
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("2")
        pane = app.screen.query_one("#targets")
        pane.show_outcome(reason)
        await pilot.pause()
        outcome = app.screen.query_one("#t-outcome")
        assert words(f"search: {reason}") == words(drawn(outcome))  # nothing cut
        box = app.screen.query_one("#t-report")
        assert box.max_scroll_y > 0  # more than the box shows: it scrolls
        box.focus()
        await pilot.pause()
        await pilot.press("end")
        await pilot.pause()
        assert "holds 8 lines." in on_screen(app)  # the end, reached with a key


async def test_escape_in_a_targets_field_lands_on_the_status_box(stock_copy):
    """No table in the targets pane: the focus goes to its status box (marked with the
    bar), so a digit typed next is a key (pane 3), not a character in the field."""
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        fc = await targets_field(pilot, app, "fc")
        await pilot.press("end", "5")
        assert fc.value == "1k5"
        await pilot.press("escape")
        await pilot.pause()
        assert fc.value == "1k"  # the text it had when it took the focus
        assert app.focused is app.screen.query_one("#t-report")
        assert "▌search" in on_screen(app)  # the focus bar is on the box ("search(ing):")
        await pilot.press("3")
        await pilot.pause()
        assert app.screen.current == "matches"
        assert fc.value == "1k"
        # ctrl+g does the same (Escape alone can be slow through tmux)
        await pilot.press("2")
        fc.focus()
        await pilot.press("end", "7", "ctrl+g")
        await pilot.pause()
        assert fc.value == "1k" and app.focused is app.screen.query_one("#t-report")


async def test_escape_in_a_repair_field_goes_to_the_options_table(stock_copy):
    """The repair form's dropdowns hold hidden lists; Escape must not focus one of them."""
    from test_repair_screen import open_repair

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_repair(pilot, app)
        field = screen.query_one("#r-pos-R1", Input)
        field.focus()
        await pilot.press("1", "0", "k", "escape")
        await pilot.pause()
        assert field.value == ""
        assert app.focused is screen.query_one("#r-options")


async def test_the_repair_status_line_is_never_cut(stock_copy, tmp_path):
    from test_repair_screen import open_repair

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_repair(pilot, app)
        note = f"error: cannot read the stock file again: {deep_path(tmp_path)}:12: " + (
            LONG_REASON * 2
        )
        screen._status(note)
        await pilot.pause()
        assert words(drawn(screen.query_one("#r-status"))) == words(note)
        await read_box_to_the_end(pilot, app, screen.query_one("#r-status-box"))
        last = on_screen(app).splitlines()[-2]  # the box's last row, above the footer
        assert "untick single pieces only. The stock file" in last  # the end, by keys


async def test_a_long_question_keeps_its_answer_keys_in_view(stock_copy):
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app, search=False)
        question = "Build candidate 1? It answers earlier targets: " + LONG_REASON * 2
        listing = "\n".join(f"R{i} 10k from drawer A{i}" for i in range(1, 21))
        answers = []
        app.push_screen(ConfirmScreen(question, listing, yes="y: yes", no="n: no"), answers.append)
        await pilot.pause()
        assert "y: yes     n: no" in on_screen(app)  # the answer keys, not pushed off
        seen = [on_screen(app)]
        for _ in range(10):
            await pilot.press("pagedown")
            await pilot.pause()
            seen.append(on_screen(app))
        text = "\n".join(seen)
        assert "R20 10k from drawer A20" in text  # the listing, to its end
        body = app.screen.query_one("#confirm-body")
        assert words(question) in words(drawn(body.query_one(".dialog-title")))
        await pilot.press("n")
        assert answers == [False]


async def test_a_long_refusal_in_the_write_dialog_is_read_whole(stock_copy, tmp_path):
    from test_flows import choose_first, search_from_targets

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await search_from_targets(pilot, app)
        await choose_first(pilot, app)
        await pilot.press("w")
        await pilot.pause()
        design = app.screen.query_one("#w-design", Input)
        # a name in a folder that does not exist: refused, naming the whole path
        design.value = str(deep_path(tmp_path).with_name("design.toml"))
        await pilot.press("enter")
        await pilot.pause()
        status = app.screen.query_one("#write-status")
        shown = drawn(status)
        assert shown.startswith("refused:")
        assert words(str(deep_path(tmp_path).parent)) in words(shown)
        box = app.screen.query_one("#write-status-box")
        assert box.region.height > 0 and box.region.bottom <= SIZE[1] - 1  # above the footer
