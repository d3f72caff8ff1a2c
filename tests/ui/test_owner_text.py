"""Owner text (drawers, notes, names, dielectrics, the file name) shows exactly as written.

Rich reads ``[bold]x[/]`` in a plain string as markup and a lone ``[/]`` as an error;
a raw ESC or BEL from the file would reach the terminal and could retitle the window
(OSC 0) or recolour the screen (SGR). The expected texts below are the file's own
text, controls written as Python escapes (picker.report.owner.visible).
"""

from __future__ import annotations

from textual.geometry import Region
from textual.widgets import DataTable

from picker.report.owner import owner_lines, owner_text, visible
from picker.ui.app import PickerApp
from tests.ui.test_flows import SIZE, settle

OSC = "\x1b]0;evil\x07"  # sets the window title in xterm-like terminals (ECMA-48 OSC)
SGR = "\x1b[31m"  # red foreground (ECMA-48 SGR)

STOCK = """\
# Invented bench whose owner text holds markup-like brackets and control characters.
[[resistor]]
value = "4k7"
qty = 10
tolerance = "1%"
location = "shelf [top]"
note = "[bold]x[/]"

[[resistor]]
value = "10k"
qty = 20
tolerance = "1%"
location = "[/]"
note = "\\u001b]0;evil\\u0007"

[[capacitor]]
value = "10n"
qty = 8
tolerance = "5%"
dielectric = "film"
location = "\\u001b[31mred"
note = "cr\\rhere"

[[opamp]]
name = "amp [bold]x[/]"
gbw = "1MHz"
qty = 2
location = "bin [/]"
"""


def test_visible_escapes_controls_and_keeps_brackets():
    assert visible("shelf [top]") == "shelf [top]"
    assert visible(OSC) == "\\x1b]0;evil\\x07"
    assert visible(SGR + "red") == "\\x1b[31mred"
    assert visible("a\rb") == "a\\rb"
    assert visible(visible(OSC)) == visible(OSC)  # a second pass changes nothing


def test_owner_text_is_never_markup():
    assert owner_text("[bold]x[/]").plain == "[bold]x[/]"
    assert owner_text("[bold]x[/]").spans == []
    assert owner_lines("A3 [/]\n" + OSC).plain == "A3 [/]\n\\x1b]0;evil\\x07"


def _plain_cells(table: DataTable) -> list[list[str]]:
    return [[str(c) for c in table.get_row_at(i)] for i in range(table.row_count)]


async def test_drawers_table_shows_owner_text_exactly(tmp_path):
    path = tmp_path / "bench [bold]x.toml"  # a file name can hold markup too ("/" cannot be in it)
    path.write_text(STOCK, encoding="utf-8")
    app = PickerApp(path)
    async with app.run_test(size=(160, 30)) as pilot:
        await settle(pilot, app, search=False)
        table = app.screen.query_one("#stock-table", DataTable)
        rows = _plain_cells(table)
        assert len(rows) == 4
        drawers = [r[4] for r in rows]
        abouts = [r[5] for r in rows]
        assert drawers == ["shelf [top]", "[/]", "\\x1b[31mred", "bin [/]"]
        assert abouts[0] == "[bold]x[/]"
        assert abouts[1] == "\\x1b]0;evil\\x07"
        assert "film" in abouts[2] and "cr\\rhere" in abouts[2]
        assert abouts[3].startswith("amp [bold]x[/]")
        # what the table paints: the same text, no raw control character
        lines = [
            "".join(seg.text for seg in strip)
            for strip in table.render_lines(Region(0, 0, *table.size))
        ]
        painted = "\n".join(lines)
        assert "shelf [top]" in painted and "[bold]x[/]" in painted
        assert "\x1b" not in painted and "\x07" not in painted and "\r" not in painted
        # the line under the cursor is quoted below the table, also exactly
        message = str(app.screen.query_one("#qty-message").render())
        assert "in shelf [top] (now 10)" in message
        await pilot.press("down")
        await pilot.pause()
        message = str(app.screen.query_one("#qty-message").render())
        assert "in [/] (now 20)" in message
        # the title bar names the file as it is called
        bar = str(app.screen.query_one("#pane-bar").render())
        assert "bench [bold]x.toml" in bar


async def test_filter_finds_owner_text_with_brackets(tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_text(STOCK, encoding="utf-8")
    app = PickerApp(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app, search=False)
        table = app.screen.query_one("#stock-table", DataTable)
        await pilot.press("slash", *"[top]")
        await pilot.pause()
        assert table.row_count == 1
        assert str(table.get_row_at(0)[4]) == "shelf [top]"


async def test_a_refusal_quoting_owner_text_shows_it_exactly(tmp_path):
    """The loader's refusal quotes the bad value; the status shows it as written."""
    path = tmp_path / "inventory.toml"
    path.write_text(STOCK.replace('"film"', '"[bold]x[/] \\u001b[31m"'), encoding="utf-8")
    app = PickerApp(path)
    async with app.run_test(size=(160, 30)) as pilot:
        await settle(pilot, app, search=False)
        status = str(app.screen.query_one("#drawers-status").render())
        assert "'[bold]x[/] \\x1b[31m'" in status
        assert "\x1b" not in status
