"""The targets form in a real terminal at 80x24, keys sent in bursts (one send-keys call
each, so the app reads them in one go): the order from a specification, a budget input,
the rank mode."""

from __future__ import annotations

import pytest
from test_tmux import picker_command, terminal  # noqa: F401 (the fixture)

pytestmark = pytest.mark.tmux


def field_line(screen: str, label: str) -> str:
    return next(line for line in screen.splitlines() if line.strip().startswith(label))


def test_a_burst_fills_the_stopband_and_the_order_follows(terminal, stock_copy):  # noqa: F811
    terminal.start(picker_command(stock_copy), {})
    terminal.wait_for("^q quit")
    terminal.keys("2")
    terminal.wait_for("what passes")
    # from the type list: two tabs to order, blank it, on over fc and gain to the
    # stopband and the attenuation
    terminal.keys("Tab", "Tab", "C-u", "Tab", "Tab", "Tab", "4", "k", "Tab", "4", "0")
    # Butterworth, 40 dB at 4 fc: order 4, 48.2 dB there (scipy.signal.buttord)
    screen = terminal.wait_for("from the stopband: order 4:")
    terminal.wait_for("48.2 dB")
    assert field_line(screen, "stopband").split()[:2] == ["stopband", "4k"]
    assert field_line(screen, "atten dB").split()[:3] == ["atten", "dB", "▌40"]
    terminal.wait_for("order 4 butterworth lowpass")  # the search ran for order 4
    # a burst down the form to the peak output (the form scrolls to keep it in view)
    terminal.keys(*["Tab"] * 16, "5")
    screen = terminal.wait_for("out peak V ▌5 ")
    assert "peak output; blank: slew unchecked" in field_line(screen, "out peak V")
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")


def test_an_open_list_has_a_border_under_no_color(terminal, stock_copy):  # noqa: F811
    """Without colour the open dropdown must still be set apart: box characters."""
    terminal.start(picker_command(stock_copy), {"NO_COLOR": "1"})
    terminal.wait_for("^q quit")
    terminal.keys("2")
    terminal.wait_for("what passes")
    terminal.keys("Enter")  # the type list has the focus: open it
    terminal.wait_for("╭")
    terminal.wait_for("╰")
    terminal.keys("Escape")
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")


def test_escape_in_a_targets_field_puts_it_back_and_digits_are_keys_again(
    terminal,  # noqa: F811
    stock_copy,
):
    """The targets pane has no table: Escape leaves the field for the pane's status
    box (marked with the focus bar), so a digit typed next changes pane, not the fc."""
    terminal.start(picker_command(stock_copy), {})
    terminal.wait_for("^q quit")
    terminal.keys("2")
    terminal.wait_for("what passes")
    terminal.keys("Tab", "Tab", "Tab", "End", "5")  # type list, response, order, fc
    terminal.wait_for("fc ▌1k5 ")
    terminal.keys("Escape")
    terminal.wait_for("▌search: ")  # the focus bar is on the status box now
    screen = terminal.wait_for("fc  1k ")  # the text it had, no bar beside it
    assert "1k5" not in screen
    terminal.keys("3")
    terminal.wait_for("[3 matches]")
    terminal.keys("2")
    screen = terminal.wait_for("[2 targets]")
    assert field_line(screen, "fc").split()[:2] == ["fc", "1k"]
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")
