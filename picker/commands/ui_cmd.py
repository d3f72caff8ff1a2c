"""``picker [--stock FILE]``: the terminal UI."""

from __future__ import annotations

import os
import sys
import threading


def run(args) -> int:
    from picker.commands.common import resolve_stock_path
    from picker.ui.app import PickerApp

    path, note = resolve_stock_path(getattr(args, "stock", None))
    app = PickerApp(path, note=note)
    app.run(mouse=bool(getattr(args, "mouse", False)))
    code = int(app.return_code or 0)
    if any(t.is_alive() and t is not threading.main_thread() for t in threading.enumerate()):
        # A worker thread still waiting on a search or budget (their child processes
        # are killed when the screen closes; the threads only read results, and every
        # write to the stock file happens on the main thread and is finished). Leave
        # now rather than wait for them.
        sys.stdout.flush()
        sys.stderr.flush()
        os._exit(code)
    return code
