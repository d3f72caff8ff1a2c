"""The stock file: load with line numbers (``stock.load``) and safe in-place edits.

This module is the public face; the work is done in ``stock.load`` (reading and
validation, ``stock.fields`` for one entry) and ``stock.edit`` (locked, atomic,
round-trip edits).
"""

from stock.load import decode, file_sha256, load, loads

__all__ = ["decode", "file_sha256", "load", "loads"]
