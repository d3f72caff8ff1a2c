"""Durability helper shared by every atomic write (stock edits, build ledger, saved designs)."""

from __future__ import annotations

import os


def sync_folder(folder) -> None:
    """fsync ``folder`` so that a rename inside it survives a crash.

    Called after the new file is already in place under its name, so a folder that
    cannot be opened or synced (some file systems refuse) is not an error.
    """
    try:
        dfd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return
    try:
        os.fsync(dfd)
    except OSError:
        pass
    finally:
        os.close(dfd)
