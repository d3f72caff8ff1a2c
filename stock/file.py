"""The stock file: load with line numbers and safe in-place edits.

This module is the public face; the work is done in ``stock.load`` (reading and
validation, ``stock.fields`` for one entry) and ``stock.edit`` (locked, atomic,
round-trip edits).
"""

from stock.edit import (
    EditResult,
    QtyChange,
    StockChangedError,
    WrittenButUnsynced,
    add_line,
    apply_changes,
    replace_bytes,
)
from stock.load import decode, file_sha256, load, loads

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
