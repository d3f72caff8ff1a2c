"""``picker [--stock FILE]``: the terminal UI."""

from __future__ import annotations


def run(args) -> int:
    from picker.commands.common import resolve_stock_path
    from picker.ui.app import PickerApp

    path, note = resolve_stock_path(getattr(args, "stock", None))
    app = PickerApp(path, note=note)
    app.run(mouse=bool(getattr(args, "mouse", False)))
    return int(app.return_code or 0)
