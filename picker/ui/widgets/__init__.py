"""Panes and small widgets of the terminal UI."""
