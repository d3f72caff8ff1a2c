"""Owner text in a real terminal (tmux): no raw control character of the stock file
reaches the screen; only the app's own SGR codes (ECMA-48 ``ESC [ ... m``) are there."""

from __future__ import annotations

import re

import pytest

from tests.ui.test_owner_text import STOCK
from tests.ui.test_tmux import picker_command, terminal  # noqa: F401  (the fixture)

pytestmark = pytest.mark.tmux


def test_owner_controls_show_escaped_in_a_real_terminal(terminal, tmp_path):  # noqa: F811
    path = tmp_path / "inventory.toml"
    path.write_text(STOCK, encoding="utf-8")
    terminal.start(picker_command(path), {"TERM": "screen-256color"})
    terminal.wait_for("4 of 4 lines")
    terminal.wait_for("shelf [top]")
    painted = terminal.wait_for("\\x1b]0;evil\\x07", escapes=True)  # the note, escaped
    assert "[bold]x[/]" in painted and "\\x1b[31mred" in painted
    # every ESC on the screen starts one of the app's SGR codes; the file's OSC (a
    # window title) and its SGR (red) came through as text only
    rest = re.sub(r"\x1b\[[0-9;:]*m", "", painted)
    assert "\x1b" not in rest and "\x07" not in rest
    assert "evil" not in terminal.tmux("display-message", "-p", "#{pane_title}")
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")
