"""Pane 4 at 80x24: what is on screen first, scrolling, and the build dialog's lines."""

from __future__ import annotations

from test_flows import SIZE, choose_first, settle

from picker.ui.app import PickerApp

# two look-alike lines beside those of tests/ui/data/small_stock.toml: the same values
# in the same drawers as its 10n and 22n, another dielectric and rating
LOOK_ALIKES = """
[[capacitor]]
value = "10n"
qty = 8
tolerance = "5%"
dielectric = "X7R"
voltage = "16V"
location = "C1"

[[capacitor]]
value = "22n"
qty = 4
tolerance = "5%"
dielectric = "C0G"
voltage = "100V"
location = "C2"
"""


def _words(c) -> str:
    volts = f"{c.voltage:g} V" if c.voltage else "voltage not given"  # the 22n film line
    return f"line {c.line}, {c.dielectric}, {volts}"


def _inside(widget, pane) -> bool:
    """The widget's whole region is inside the part of the pane now on screen."""
    region, view = widget.region, pane.region
    return region.height > 0 and view.y <= region.y and region.bottom <= view.bottom


async def test_the_schematic_and_the_budget_headline_show_without_scrolling(stock_copy):
    from picker.ui.widgets.chosen import ChosenPane

    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await choose_first(pilot, app)
        pane = app.screen.query_one(ChosenPane)
        headline = pane.query_one("#c-headline")
        assert "Yield" in str(headline.render())
        assert pane.scroll_y == 0
        assert _inside(pane.query_one("#c-title"), pane)
        assert _inside(headline, pane)
        assert _inside(pane.query_one("#c-schematic"), pane)
        assert pane.max_scroll_y > 0  # the rest is below
        await pilot.press("space")  # a page down
        await pilot.pause()
        assert pane.scroll_y > 0
        page = pane.scroll_y
        await pilot.press("k")
        await pilot.pause()
        assert pane.scroll_y == page - 1
        await pilot.press("j", "j")
        await pilot.pause()
        assert pane.scroll_y == page + 1
        await pilot.press("pagedown", "end")
        await pilot.pause()
        assert pane.scroll_y == pane.max_scroll_y
        # a new pick starts at the top again
        await pilot.press("3", "down", "enter")
        await settle(pilot, app, 0.2)
        assert pane.rank == 2 and pane.scroll_y == 0


async def test_the_build_dialog_names_the_line_of_a_piece_whose_drawer_holds_a_look_alike(
    stock_copy,
):
    from picker.ui.screens.confirm import ConfirmScreen
    from picker.ui.widgets.chosen import ChosenPane

    with stock_copy.open("a", encoding="utf-8") as f:
        f.write(LOOK_ALIKES)
    text = stock_copy.read_text(encoding="utf-8").splitlines()
    headers = [n for n, line in enumerate(text, 1) if line == "[[capacitor]]"]
    assert len(headers) == 5
    app = PickerApp(stock_copy)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await choose_first(pilot, app)
        pane = app.screen.query_one(ChosenPane)
        await pilot.press("b")
        await pilot.pause()
        assert isinstance(app.screen, ConfirmScreen)
        listing = app.screen.body
        stock = pane.stock
        rows = [line for line in listing.splitlines() if "x capacitor" in line]
        assert rows, listing
        # every capacitor taken comes from a drawer with a look-alike: each is named
        lines = listing.splitlines()
        for k, line in enumerate(lines):
            if "x capacitor" not in line:
                continue
            note = lines[k + 1]
            value = line.split("x capacitor ")[1].split()[0]  # "10n" or "22n"
            mine = [c for c in stock.capacitors if note.strip().startswith(f"from line {c.line},")]
            assert len(mine) == 1, note
            (me,) = mine
            assert me.line in headers
            other = next(
                c
                for c in stock.capacitors
                if c.location == me.location and c.index != me.index and c.value == me.value
            )
            words_me, words_other = _words(me), _words(other)
            assert note.strip() == (
                f"from {words_me}; not from {words_other} (same value, same drawer)"
            ), note
            assert {"10n": 10e-9, "22n": 22e-9}[value] == me.value
        await pilot.press("n")
        await pilot.pause()
    # a drawer without look-alikes gets no such line (the resistors here)
    assert all("from line" not in line for line in lines if "x resistor" in line)
