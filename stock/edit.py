"""Safe in-place edits of the owner's stock file (docs/stock-file.md, "Editing").

Every write:

1. takes an exclusive ``fcntl.flock`` on the stock file itself
   (``stock.durable.lock_exclusive``) and keeps it across read-modify-write. The
   rename at the end puts a new inode at the path, so after the lock is granted the
   holder checks that the path still names the inode it locked; if not (another
   writer replaced it meanwhile) it drops the lock and locks the new file. No lock
   file is left in the owner's folder.
2. reads the bytes through the locked descriptor and refuses (``StockEditError``, file
   untouched) if their sha256 is not the one the caller read (``expect_sha256``);
3. changes only what it must and keeps every other byte (``stock.splice``): a qty
   change rewrites just its digits, measured readings are removed within their own
   entry, a line added goes after the last line of its kind; the result must load to
   the stock planned;
4. writes a temporary file in the same folder with the mode, owner (where allowed) and
   extended attributes of the original, fsyncs it, renames it over the original and
   fsyncs the folder (``stock.durable``), so a crash leaves the old file or the new
   one, never a partial file.

A symbolic link is followed: the file it points to is replaced, the link stays. A
writer killed mid-write can leave its temporary file (``.<name>.XXXXXXXX.tmp``) beside
the stock file; the next write removes it.
"""

from __future__ import annotations

import hashlib
import os
import re
import stat
from collections.abc import Callable
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path

from stock.durable import (
    describe_os_error,
    lock_exclusive,
    open_regular,
    read_fd,
    remove_stale_temps,
    sync_folder,
    write_atomic,
)
from stock.errors import PartlyDoneError, StockEditError, StockFileError
from stock.fields import MAX_COUNT
from stock.load import KINDS, loads
from stock.splice import insert_entry, splice
from stock.values import format_rkm

_BOM = "\ufeff"


class StockChangedError(StockEditError):
    """The file's sha256 is not the one expected: someone changed it since it was read."""


class WrittenButUnsynced(PartlyDoneError):
    """The new file is in place but the folder fsync failed: it may not survive a crash."""

    def __init__(self, message: str, *, after_sha256: str):
        super().__init__(message)
        self.after_sha256 = after_sha256


@dataclass(frozen=True)
class QtyChange:
    """Change the qty of stock line ``index`` of ``kind`` by ``delta``.

    ``remove_measured`` lists indices into that line's ``measured`` list whose pieces
    are consumed; they are deleted from the file (count them in ``delta`` too).
    """

    kind: str
    index: int
    delta: int
    remove_measured: tuple[int, ...] = ()


@dataclass(frozen=True)
class EditResult:
    path: Path
    before: bytes
    after: bytes
    before_sha256: str
    after_sha256: str

    @property
    def changed(self) -> bool:
        return self.before != self.after


def _sha(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


@contextmanager
def locked(path):
    """Exclusive lock on the file at ``path``; yields ``(fd, real_path, stat)``.

    The file is opened without blocking and must be a regular file (a FIFO, a device
    or a folder is refused at once, see ``stock.durable.open_regular``).
    """
    real = Path(os.path.realpath(path))
    while True:
        try:
            fd = open_regular(real)
        except OSError as exc:
            raise StockEditError(
                f"{path}: cannot open the stock file: {describe_os_error(exc)}"
            ) from None
        try:
            lock_exclusive(fd)
            st = os.fstat(fd)
            try:
                now = os.stat(real)
            except FileNotFoundError:
                raise StockEditError(
                    f"{path}: the stock file was removed while waiting for the lock"
                ) from None
            if (now.st_dev, now.st_ino) == (st.st_dev, st.st_ino):
                yield fd, real, st
                return
        finally:
            os.close(fd)  # also releases the lock


def _write_atomic(real: Path, data: bytes, fd: int, st: os.stat_result) -> None:
    # a live writer writes its temporary file only while it holds the lock on the
    # current file, which we hold: any file of that naming is a killed writer's
    remove_stale_temps(real.parent, real.name)
    write_atomic(real, data, mode=st.st_mode, like=fd, sync=False)


BeforeReplace = Callable[[bytes, bytes], None]


SAMPLE_NAME = "sample_inventory.toml"


def is_sample(path) -> bool:
    """The sample stock shipped with picker: the package's copy (``picker/data/``) or the
    one at the root of a picker source tree (beside ``picker/data/``). Never written."""
    try:
        real = Path(os.path.realpath(path))
    except (OSError, ValueError):
        return False
    if real.name != SAMPLE_NAME:
        return False
    if real.parent.name == "data" and real.parent.parent.name == "picker":
        return True
    return (real.parent / "picker" / "data" / SAMPLE_NAME).is_file()


def refuse_sample(path) -> None:
    """StockEditError for the sample stock (``is_sample``), which no command changes."""
    if is_sample(path):
        raise StockEditError(
            f"{path}: is picker's sample stock, which picker never changes; copy it "
            "(cp sample_inventory.toml inventory.toml) and use the copy"
        )


def _edit(path, transform, expect_sha256: str | None, before_replace=None) -> EditResult:
    """Lock, read, ``transform``, write atomically.

    ``before_replace(before, after)`` runs under the lock once the new bytes are known
    and before anything is written (the build ledger records the build there, so the
    record is durable before the stock file changes); if it raises, nothing is written.
    An error after the rename (the folder fsync) raises ``WrittenButUnsynced``.
    """
    refuse_sample(path)
    with locked(path) as (fd, real, st):
        before = read_fd(fd, name=str(path))
        before_sha = _sha(before)
        if expect_sha256 is not None and before_sha != expect_sha256:
            raise StockChangedError(
                f"{path}: the stock file changed since it was read (sha256 {before_sha[:12]}, "
                f"expected {expect_sha256[:12]}); nothing was written: load it again and retry"
            )
        after = transform(before)
        if after != before:
            # a file its owner made read-only stays unchanged, even for root
            if not st.st_mode & stat.S_IWUSR or not os.access(real, os.W_OK):
                raise StockEditError(f"{path}: the stock file is read-only; nothing was written")
            if before_replace is not None:
                before_replace(before, after)
            try:
                _write_atomic(real, after, fd, st)
            except OSError as exc:
                raise StockEditError(
                    f"{path}: cannot write the stock file ({describe_os_error(exc)}); "
                    "it is unchanged"
                ) from None
            try:
                sync_folder(real.parent)  # make the rename itself durable
            except OSError as exc:
                raise WrittenButUnsynced(
                    f"{path}: the stock file was written, but its folder could not be "
                    f"synced ({describe_os_error(exc)}); a power cut now could bring "
                    "the old file back",
                    after_sha256=_sha(after),
                ) from None
        return EditResult(
            path=Path(path),
            before=before,
            after=after,
            before_sha256=before_sha,
            after_sha256=_sha(after),
        )


def _text_of(data: bytes, path) -> tuple[str, str]:
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise StockEditError(f"{path}: not UTF-8 text; nothing was written") from None
    if text.startswith(_BOM):
        return _BOM, text[1:]
    return "", text


def _check_loads(text: str, path, what: str):
    try:
        return loads(text, source=str(path))
    except StockFileError as exc:
        raise StockEditError(
            "\n".join([f"{path}: {what}; nothing was written:"] + exc.problems)
        ) from None


def _describe(item) -> str:
    name = item.name if item.kind == "opamp" else format_rkm(item.value, item.kind)
    where = f" in {item.location}" if item.location else ""
    return f"{item.kind} {name}{where} (line {item.line})"


def apply_changes(
    path,
    changes,
    *,
    expect_sha256: str | None = None,
    before_replace: BeforeReplace | None = None,
) -> EditResult:
    """Apply every ``QtyChange`` or none of them.

    Every byte outside the changed entries stays as it was (``stock.splice``): a qty is
    rewritten in its own digits and base, measured readings are removed by a round trip
    of the entry's own lines; the result must load to exactly the stock planned, else
    the edit is refused.

    Raises
    ------
    StockEditError
        A qty would go below zero or below the measured pieces left, an index or a
        measured index is out of range, the file changed since it was read
        (``expect_sha256``), or the file does not load; the file is untouched.
    """
    changes = list(changes)

    def transform(before: bytes) -> bytes:
        bom, text = _text_of(before, path)
        stock = _check_loads(text, path, "the stock file has problems")
        plan = _plan(stock, changes, path)
        return (bom + splice(text, stock, plan, str(path))).encode("utf-8")

    return _edit(path, transform, expect_sha256, before_replace)


def _plan(stock, changes, path) -> dict:
    """``{(kind, index): (new_qty, removed measured indices)}``, every change checked."""
    merged: dict[tuple[str, int], list] = {}
    for ch in changes:
        if ch.kind not in KINDS:
            raise StockEditError(
                f"{path}: unknown kind '{ch.kind}'; use one of "
                f"{', '.join(KINDS)}; nothing was written"
            )
        lines = stock.lines(ch.kind)
        if not isinstance(ch.index, int) or not 0 <= ch.index < len(lines):
            raise StockEditError(
                f"{path}: there is no {ch.kind} number {ch.index} (the file "
                f"has {len(lines)}); nothing was written"
            )
        slot = merged.setdefault((ch.kind, ch.index), [0, []])
        slot[0] += int(ch.delta)
        slot[1].extend(ch.remove_measured)
    plan = {}
    for (kind, index), (delta, removed) in merged.items():
        item = stock.lines(kind)[index]
        measured = getattr(item, "measured", ())
        if len(set(removed)) != len(removed) or any(
            not isinstance(i, int) or not 0 <= i < len(measured) for i in removed
        ):
            raise StockEditError(
                f"{path}: {_describe(item)} has {len(measured)} measured "
                f"pieces; cannot remove {sorted(removed)}; nothing was written"
            )
        new_qty = item.qty + delta
        if new_qty < 0:
            raise StockEditError(
                f"{path}: {_describe(item)} has qty {item.qty}; taking "
                f"{-delta} would go below zero; nothing was written"
            )
        if new_qty > MAX_COUNT:
            raise StockEditError(
                f"{path}: {_describe(item)} has qty {item.qty}; adding "
                f"{delta} would make {new_qty}, more than the "
                f"{MAX_COUNT:,} pieces a line may hold; nothing was written"
            )
        left = len(measured) - len(removed)
        if new_qty < left:
            raise StockEditError(
                f"{path}: {_describe(item)} would keep {left} measured "
                f"pieces with qty {new_qty}; remove measured pieces too; "
                "nothing was written"
            )
        plan[(kind, index)] = (new_qty, tuple(sorted(removed)))
    return plan


def _toml_line(path, key, value) -> str:
    import tomlkit

    if not isinstance(key, str) or not re.fullmatch(r"[A-Za-z0-9_-]+", key):
        raise StockEditError(
            f"{path}: '{key}' is not a key a stock line can have; nothing was written"
        )
    try:
        return f"{key} = {tomlkit.item(value).as_string()}"
    except Exception:  # tomlkit raises several types for values TOML cannot hold
        raise StockEditError(
            f"{path}: {key} = {value!r} cannot be written to TOML; nothing was written"
        ) from None


def add_line(path, kind: str, fields: dict, *, expect_sha256: str | None = None) -> EditResult:
    """Add a new ``[[kind]]`` table with ``fields`` after the last one of its kind
    (at the end of the file when there is none; ``stock.splice.insert_entry``).

    The bytes already in the file stay as they are; the new entry must load without
    errors (same rules as the loader), else ``StockEditError`` and nothing is written.
    """
    if kind not in KINDS:
        raise StockEditError(f"{path}: unknown kind '{kind}'; use one of {', '.join(KINDS)}")
    fields = dict(fields)

    def transform(before: bytes) -> bytes:
        bom, text = _text_of(before, path)
        stock = _check_loads(text, path, "the stock file has problems")
        body = [f"[[{kind}]]"] + [_toml_line(path, k, v) for k, v in fields.items()]
        after_text = insert_entry(text, kind, body, stock, str(path))
        new = _check_loads(after_text, path, f"the new {kind} line is not valid")
        if len(new.lines(kind)) != len(stock.lines(kind)) + 1:
            raise StockEditError(
                f"{path}: the new {kind} line could not be appended (is "
                f"{kind} written as an inline array?); nothing was written"
            )
        return (bom + after_text).encode("utf-8")

    return _edit(path, transform, expect_sha256)


def replace_bytes(
    path, content: bytes, *, expect_sha256: str, before_replace: BeforeReplace | None = None
) -> EditResult:
    """Put ``content`` back as the whole file (undo), with the same lock and atomic write."""
    content = bytes(content)
    return _edit(path, lambda before: content, expect_sha256, before_replace)


__all__ = [
    "EditResult",
    "QtyChange",
    "StockChangedError",
    "WrittenButUnsynced",
    "add_line",
    "apply_changes",
    "is_sample",
    "locked",
    "refuse_sample",
    "replace_bytes",
]
