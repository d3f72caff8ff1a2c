"""The stock file: load with line numbers and safe in-place edits.

This module is the public face; the work is done in ``stock.load`` (reading and
validation, ``stock.fields`` for one entry) and ``stock.edit`` (locked, atomic,
round-trip edits). The edit names are imported on first use, so that a command that
only reads (``picker stock check``) does not import the writing machinery.
"""

from typing import TYPE_CHECKING

from stock.lazy import lazy_exports
from stock.load import decode, file_sha256, load, loads

if TYPE_CHECKING:
    from stock.edit import (
        EditResult,
        QtyChange,
        StockChangedError,
        WrittenButUnsynced,
        add_line,
        apply_changes,
        replace_bytes,
    )

_EDIT = "EditResult QtyChange StockChangedError WrittenButUnsynced add_line apply_changes"
__getattr__ = lazy_exports(__name__, dict.fromkeys((*_EDIT.split(), "replace_bytes"), "stock.edit"))

__all__ = [
    "EditResult",
    "QtyChange",
    "StockChangedError",
    "WrittenButUnsynced",
    "add_line",
    "apply_changes",
    "decode",
    "file_sha256",
    "load",
    "loads",
    "replace_bytes",
]
