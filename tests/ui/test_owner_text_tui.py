"""Owner text is data in the terminal UI too: a location, note or stock name holding
rich markup (``[bold]x[/]``, ``shelf [top]``) shows exactly as written in every table
cell, and control characters (an OSC title sequence, an SGR colour) show escaped, never
raw (docs/ui.md, "Owner text"; the CLI's rule, picker.report.owner)."""

from __future__ import annotations

from test_flows import SIZE, settle
from textual.widgets import DataTable

from picker.ui.app import PickerApp
from picker.ui.widgets.common import Plain, cell

MARKUP = "shelf [top] [bold]x[/]"
TITLE = "\x1b]0;evil\x07"  # OSC 0: would retitle the terminal window
RED = "\x1b[31mred"  # SGR: would colour what follows

STOCK = f"""\
[stock]
name = "bench [b]one[/b]"

[[resistor]]
value = "10k"
qty = 20
tolerance = "1%"
location = "{MARKUP}"
note = "\\u001b]0;evil\\u0007"

[[resistor]]
value = "22k"
qty = 6
tolerance = "1%"
location = "\\u001b[31mred"

[[capacitor]]
value = "10n"
qty = 8
tolerance = "5%"
location = "C1"
"""


def test_cells_keep_markup_as_text_and_escape_controls():
    assert cell(MARKUP).plain == MARKUP  # a rich Text: never parsed as markup
    assert cell(TITLE).plain == "\\x1b]0;evil\\x07"
    assert "\x1b" not in cell(RED).plain


async def test_drawers_show_owner_text_exactly(tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_text(STOCK)
    app = PickerApp(path)
    async with app.run_test(size=(120, 30)) as pilot:
        await settle(pilot, app)
        table = app.screen.query_one("#stock-table", DataTable)
        rows = [[str(c) for c in table.get_row_at(i)] for i in range(table.row_count)]
        shown = " ".join(" ".join(r) for r in rows)
        assert MARKUP in shown  # brackets and all, not "shelf  x"
        assert "\\x1b[31mred" in shown and "\x1b" not in shown
        assert "\\x1b]0;evil\\x07" in shown or all("evil" not in r for r in rows)
        for static in app.screen.query(Plain):  # no message quotes a raw control
            assert "\x1b" not in str(static.render())


async def test_plain_escapes_what_it_is_given(tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_text(STOCK)
    app = PickerApp(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        plain = app.screen.query(Plain).first()
        plain.update(f"quoted: {TITLE} and {MARKUP}\nsecond line")
        await pilot.pause()
        text = str(plain.render())
        assert "\x1b" not in text and "\\x1b]0;evil\\x07" in text
        assert MARKUP in text and "second line" in text
