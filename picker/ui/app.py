"""The terminal UI of picker: ``picker [--stock FILE]``.

Keyboard only (mouse off unless ``--mouse``), usable at 80x24, in tmux and over SSH.
With NO_COLOR set the app takes the ANSI theme, which sends no colour codes at all;
meaning is always carried by words and marks as well.
"""

from __future__ import annotations

import os
from pathlib import Path

from textual.binding import Binding

from picker.ui.key_order import InOrderApp
from picker.ui.screens.main import MainScreen


class PickerApp(InOrderApp):
    CSS_PATH = "picker.tcss"
    TITLE = "picker"
    ENABLE_COMMAND_PALETTE = False
    HORIZONTAL_BREAKPOINTS = [(0, "-narrow"), (120, "-wide")]
    BINDINGS = [
        Binding("ctrl+q", "quit", "quit", key_display="^q", priority=True),
    ]

    def __init__(self, stock_path: Path | None, *, note: str | None = None) -> None:
        # NO_COLOR: the terminal's own colours (ansi_color) and the ANSI theme, so that
        # Textual strips every colour instead of painting greys (TERMINAL.md)
        no_color = "NO_COLOR" in os.environ
        super().__init__(ansi_color=no_color)
        self.stock_path = stock_path
        self.note = note
        if no_color:
            self.theme = "ansi-dark"

    def on_mount(self) -> None:
        self.push_screen(MainScreen(self.stock_path, self.note))

    async def action_quit(self) -> None:
        for screen in self.screen_stack:
            if isinstance(screen, MainScreen) and screen.mounting:
                screen.quit_wanted = True  # it quits once its panes are in place
                return
        self.exit()

    def action_help(self) -> None:
        from picker.ui.screens.help import HelpScreen

        if not isinstance(self.screen, HelpScreen):
            self.push_screen(HelpScreen())
