"""End to end in a real terminal: picker in a private tmux server at 80x24.

The app is started through the real command line (``python -m picker --stock FILE``),
keys go in with ``send-keys`` and the screen comes back with ``capture-pane``; the
command ends with ``echo EXITED:$?`` so the exit status shows on the screen.
"""

from __future__ import annotations

import os
import re
import shlex
import shutil
import subprocess
import sys
import time

import pytest

pytestmark = pytest.mark.tmux

TMUX = shutil.which("tmux")
# A guard against a hang, not a pause: every wait returns as soon as its condition
# holds (a tmux command answers in milliseconds). It is long because the whole
# machine can stall: in the soak runs (bench/tmux_soak.sh) two tmux commands took
# over 10 s while other tests filled the memory (/proc/pressure/memory "full" avg300
# at 37%, every task stalled), and each such run took 8-10 minutes instead of 35 s.
HANG_GUARD_S = 120.0


class Terminal:
    def __init__(self, name: str):
        self.base = [TMUX, "-L", name, "-f", "/dev/null"]

    def tmux(self, *args: str) -> str:
        return subprocess.run(
            self.base + list(args), check=True, capture_output=True, text=True, timeout=HANG_GUARD_S
        ).stdout

    def start(self, command: str, env: dict[str, str]) -> None:
        clean = {k: v for k, v in os.environ.items() if k not in ("COLUMNS", "LINES")}
        clean.update(env)
        subprocess.run(
            self.base + ["new-session", "-d", "-x", "80", "-y", "24", command],
            check=True,
            env=clean,
            timeout=HANG_GUARD_S,
        )

    def screen(self, *, escapes: bool = False) -> str:
        return self.tmux("capture-pane", "-p", *(["-e"] if escapes else []))

    def wait_for(self, text: str, timeout: float = HANG_GUARD_S, *, escapes: bool = False) -> str:
        end = time.monotonic() + timeout
        while True:
            shown = self.screen(escapes=escapes)
            if text in shown:
                return shown
            if time.monotonic() > end:
                raise AssertionError(f"{text!r} did not appear; the screen was:\n{shown}")
            time.sleep(0.1)

    def keys(self, *keys: str) -> None:
        self.tmux("send-keys", *keys)

    def stop(self) -> None:
        subprocess.run(self.base + ["kill-server"], capture_output=True, timeout=HANG_GUARD_S)


@pytest.fixture
def terminal():
    if TMUX is None:
        pytest.skip("tmux is not installed: the end-to-end run in a real terminal is skipped")
    term = Terminal(f"picker-test-{os.getpid()}-{time.monotonic_ns()}")
    yield term
    term.stop()


def picker_command(stock) -> str:
    # `env -u`: stale COLUMNS/LINES would freeze the app's size (TERMINAL.md)
    return (
        f"env -u COLUMNS -u LINES {shlex.quote(sys.executable)} -m picker --stock "
        f"{shlex.quote(str(stock))}; echo EXITED:$?; sleep 30"
    )


def test_type_a_target_and_quit(terminal, stock_copy):
    # 16 colours, as a plain TERM=screen terminal gets them (TERMINAL.md)
    terminal.start(picker_command(stock_copy), {"TEXTUAL_COLOR_SYSTEM": "standard"})
    # frames paint in pieces; the line count shows only once the file is read
    for text in ("e quantity", "8 of 8 lines", "[1 drawers]"):
        terminal.wait_for(text)
    painted = terminal.screen(escapes=True)
    assert "38;5;" not in painted and "38;2;" not in painted  # no 256 or true colour
    terminal.keys("2")
    terminal.wait_for("[2 targets]")
    terminal.wait_for("what passes")
    # focus starts on the type list; three tabs reach fc; ctrl+u clears the field
    terminal.keys("Tab", "Tab", "Tab", "C-u")
    terminal.wait_for("fc is empty")
    terminal.keys("-l", "2.5k")
    screen = terminal.wait_for("fc ▌2.5k ")  # the bar marks the focused field
    terminal.wait_for("corner (band-pass")  # the hint is back: the field reads
    terminal.keys("-l", "Hz!")
    screen = terminal.wait_for("'2.5kHz!'")  # the bad text is quoted beside the field
    fc_line = next(line for line in screen.splitlines() if line.strip().startswith("fc"))
    assert "error:" in fc_line
    terminal.keys("BSpace")
    terminal.keys("C-n")
    screen = terminal.wait_for("[3 matches]")
    terminal.wait_for("2500 Hz")  # the search (or its message) names the target
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")


def test_no_color_sends_no_colour_codes(terminal, stock_copy):
    terminal.start(picker_command(stock_copy), {"TERM": "screen-256color", "NO_COLOR": "1"})
    terminal.wait_for("^q quit")
    terminal.keys("2")
    terminal.wait_for("[2 targets]")
    # the tab bar paints before the form: wait for the focus mark, then read the screen
    terminal.wait_for("\x1b[7m", escapes=True)  # the focused field, in the reverse attribute
    painted = terminal.screen(escapes=True)
    # SGR parameters 30-37, 38, 39?, 40-47, 48, 90-97, 100-107 set colours
    colours = [
        m
        for m in re.findall(r"\x1b\[([0-9;]*)m", painted)
        for p in m.split(";")
        if p and (30 <= int(p) <= 38 or 40 <= int(p) <= 48 or 90 <= int(p) <= 107)
    ]
    assert colours == [], f"colour codes under NO_COLOR: {colours[:5]}"
    assert "\x1b[7m" in painted  # the focus is marked in the reverse attribute instead
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")


def test_a_burst_of_edits_and_pane_keys_keeps_its_order(terminal, stock_copy):
    # every burst goes in ONE send-keys call, so the app reads it in one go
    terminal.start(picker_command(stock_copy), {})
    terminal.wait_for("^q quit")
    terminal.keys("2")
    terminal.wait_for("what passes")
    terminal.keys("Tab", "Tab", "Tab", "C-u", "1", "k", "BSpace", "BSpace", "2", "k", "Tab")
    screen = terminal.wait_for("fc  2k ")  # tab left it: no focus bar
    assert "2k2k" not in screen and "fc  1k" not in screen
    # on gain now: BackSpace then ctrl+n must clear gain before the pane changes
    terminal.keys("BSpace", "C-n")
    terminal.wait_for("[3 matches]")
    terminal.keys("2")
    screen = terminal.wait_for("[2 targets]")
    gain_line = next(line for line in screen.splitlines() if line.strip().startswith("gain"))
    assert gain_line.split()[:2] == ["gain", "passband"], gain_line  # the field is empty
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")


def test_quit_right_after_the_first_paint_exits_0(terminal, stock_copy):
    terminal.start(picker_command(stock_copy), {})
    terminal.wait_for("[1 drawers]")
    terminal.keys("C-q")
    terminal.wait_for("EXITED:0")
