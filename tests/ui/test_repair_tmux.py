"""The repair screen in a real terminal: tmux at 80x24, keys only.

Open it with m, accept the cautions, type the marked values of a unity-gain Sallen-Key
low-pass (R1 = R2 = 10k, C1 = 22n, C2 = 10n), choose C1 as the failed part and see the
substitutes from the small stock: the exact 22n from drawer C2 first. Each key waits for
what it should show before the next is sent.
"""

from __future__ import annotations

import pytest
from test_tmux import Terminal, picker_command, terminal  # noqa: F401 (the fixture)

pytestmark = pytest.mark.tmux
REVERSE = "\x1b[7m"
BAR = "\u258c"  # the bar left of the focused field


def test_enter_values_and_see_substitutes(terminal, stock_copy):  # noqa: F811
    # NO_COLOR: the focused field shows in the reverse attribute (docs/ui.md), which
    # the test waits for before it types into a field
    terminal.start(picker_command(stock_copy), {"TERM": "screen-256color", "NO_COLOR": "1"})
    terminal.wait_for("^q quit")
    # the stock is read: the count beside the find field (the field's own hint also
    # shows "4k7", so that would not tell)
    terminal.wait_for("8 of 8 lines")
    terminal.keys("m")
    terminal.wait_for("read these cautions first")
    terminal.wait_for("Discharge capacitors")
    terminal.keys("y")
    terminal.wait_for("^g back")  # the dialog is gone (its footer said y yes, n no)
    terminal.keys("Tab")  # from the circuit to R1
    for name, value, shown in (
        ("R1", "10k", "ok: R1=10k/5% assumed"),
        ("R2", "10k", "ok: R2=10k/5% assumed"),
        ("C1", "22n", "ok: C1=22n/10% assumed"),
        ("C2", "10n", "ok: C2=10n/10% assumed"),
    ):
        terminal.wait_for(f"{name} {BAR}{REVERSE}", escapes=True)  # the field has the focus
        terminal.keys("-l", value)
        terminal.wait_for(shown)
        terminal.keys("Tab")
    terminal.wait_for(f"GBW {BAR}{REVERSE}", escapes=True)
    terminal.keys("Tab")  # past the GBW field to the failed part
    terminal.wait_for(f"failed {BAR}{REVERSE}", escapes=True)
    terminal.keys("Enter")
    terminal.wait_for("Dismiss menu")  # the list is open (its key in the footer)
    terminal.keys("Down", "Down", "Down")  # none, R1, R2, C1
    terminal.keys("Enter")
    screen = terminal.wait_for("C1 22n [C2]")
    assert "substitutes for C1" in screen
    assert "C1 20n = 10n || 10n [C1]" in screen  # the second option, 4.88 % off
    assert "+4.88 %" in screen
    terminal.keys("C-g")
    terminal.wait_for("[1 drawers]")
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")
