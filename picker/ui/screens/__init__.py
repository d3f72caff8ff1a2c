"""Screens and dialogs of the terminal UI."""
