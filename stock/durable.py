"""Files read with a bound and written atomically: the one copy every writer uses.

Readers (stock file, saved design, build records) go through ``read_bounded``: it opens
with ``O_NONBLOCK`` and checks ``fstat`` before reading a byte, so a FIFO, a device or a
folder is refused at once (never waited on) and so is a file larger than ``MAX_BYTES``.

Writers (stock edits, the build ledger, saved designs) go through ``write_temp`` and
``write_atomic``: the data goes to a temporary file ``.<name>.XXXXXXXX.tmp`` in the same
folder, gets the mode (and owner and extended attributes, where allowed) it should have,
is fsynced, and is renamed over the target; the folder is fsynced after the rename.
A crash leaves the old file or the new one, never a partial one, and at worst a stale
temporary file, which ``remove_stale_temps`` deletes when its caller knows no live
writer can own it. The rules and their tests are in docs/reliability.md.
"""

from __future__ import annotations

import errno
import os
import re
import stat
from contextlib import suppress
from pathlib import Path

MAX_BYTES = 50 * 1024 * 1024  # no stock file, design or build record comes near 50 MB

# errors of fsync on a folder that mean "this file system does not do that", not a fault
_FOLDER_SYNC_UNSUPPORTED = {errno.EINVAL, errno.ENOTSUP, errno.EOPNOTSUPP, errno.EBADF}
_TEMP_NAME = re.compile(r"^\..+\.[A-Za-z0-9_]{8}\.tmp$")


class NotAFileError(OSError):
    """The path names a folder, a FIFO, a device or a socket, or a file over the size limit."""


def kind_of(mode: int) -> str | None:
    """What a non-regular file is, in words; None for a regular file."""
    if stat.S_ISREG(mode):
        return None
    if stat.S_ISDIR(mode):
        return "is a folder, not a file"
    if stat.S_ISFIFO(mode):
        return "is a FIFO (named pipe), not a file; picker reads only regular files"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "is a device, not a file; picker reads only regular files"
    if stat.S_ISSOCK(mode):
        return "is a socket, not a file; picker reads only regular files"
    return "is not a regular file"


def _too_big(size: int, limit: int) -> str:
    return (
        f"is {size / 1e6:.1f} MB, more than the {limit // (1024 * 1024)} MB picker reads; "
        "is it the right file?"
    )


def why_not_read(exc: OSError, what: str) -> str:
    """``is a folder, not a file`` for a refused path, else ``cannot read the WHAT: reason``."""
    if isinstance(exc, NotAFileError):
        return describe_os_error(exc)
    return f"cannot read the {what}: {describe_os_error(exc)}"


def open_regular(path, flags: int = os.O_RDONLY, *, limit: int = MAX_BYTES) -> int:
    """Open ``path`` without blocking and return the descriptor of a regular file.

    Raises NotAFileError (whose ``strerror`` says why) for a folder, a FIFO, a device, a
    socket or a file over ``limit`` bytes, and OSError as ``os.open`` does otherwise.
    """
    nonblock = getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_NOCTTY", 0)
    fd = os.open(path, flags | nonblock | getattr(os, "O_CLOEXEC", 0))
    try:
        st = os.fstat(fd)
        why = kind_of(st.st_mode)
        if why is None and st.st_size > limit:
            why = _too_big(st.st_size, limit)
        if why is not None:
            raise NotAFileError(errno.EINVAL, why, str(path))
    except BaseException:
        os.close(fd)
        raise
    return fd


def read_fd(fd: int, *, limit: int = MAX_BYTES, name: str = "") -> bytes:
    """Every byte of the open file from its start, at most ``limit`` (it may grow meanwhile)."""
    os.lseek(fd, 0, os.SEEK_SET)
    chunks: list[bytes] = []
    total = 0
    while True:
        chunk = os.read(fd, 1 << 20)
        if not chunk:
            return b"".join(chunks)
        total += len(chunk)
        if total > limit:
            raise NotAFileError(errno.EFBIG, _too_big(total, limit), name)
        chunks.append(chunk)


def read_bounded(path, *, limit: int = MAX_BYTES) -> bytes:
    """The bytes of the regular file at ``path`` (see ``open_regular`` for what is refused)."""
    fd = open_regular(path, limit=limit)
    try:
        return read_fd(fd, limit=limit, name=str(path))
    finally:
        os.close(fd)


def describe_os_error(exc: OSError) -> str:
    """The reason of an OSError in words, without Python's decoration."""
    return exc.strerror or str(exc)


def lock_exclusive(fd: int) -> None:
    """Wait for an exclusive advisory lock on ``fd`` (released when it is closed).

    picker is POSIX-only: the lock is ``fcntl.flock``. ``fcntl`` is imported here, when a
    write takes its lock, so the read-only commands never import it; where there is none
    the write is refused before anything is changed.
    """
    try:
        import fcntl
    except ImportError:
        from stock.errors import StockEditError

        raise StockEditError(
            "picker changes files only on POSIX systems (it locks them with fcntl, "
            "which this Python does not have); reading and designing work everywhere else"
        ) from None
    fcntl.flock(fd, fcntl.LOCK_EX)


def sync_folder(folder) -> None:
    """fsync ``folder`` so that a rename or link inside it survives a crash.

    A file system that cannot sync folders (EINVAL and the like) is not an error; an
    I/O error or a full disk is, since then the rename may not last.
    """
    try:
        dfd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return  # a folder we cannot open (no read permission) cannot be synced by anyone
    try:
        os.fsync(dfd)
    except OSError as exc:
        if exc.errno not in _FOLDER_SYNC_UNSUPPORTED:
            raise
    finally:
        os.close(dfd)


def _copy_xattrs(src, dst_fd: int) -> None:
    """Copy the extended attributes of ``src`` (a path or descriptor) to ``dst_fd``.

    Attributes the platform or file system does not support, or that this user may not
    set (``security.*``, ``trusted.*``), are left out: the file is still written.
    """
    listx = getattr(os, "listxattr", None)
    if listx is None:
        return
    try:
        names = listx(src)
    except OSError:
        return
    for name in names:
        with suppress(OSError):
            os.setxattr(dst_fd, name, os.getxattr(src, name))


def write_temp(
    folder: Path, prefix: str, data: bytes, *, mode: int | None = None, like: int | None = None
) -> str:
    """``data`` in a new fsynced temporary file ``.<prefix>.XXXXXXXX.tmp`` in ``folder``.

    ``mode`` sets its permission bits (default: 0o666 less the umask, as a new file
    gets); ``like`` is an open descriptor of the file it will replace, whose owner and
    extended attributes it takes where allowed. Returns the path; on any failure the
    temporary file is removed and the error raised.
    """
    import tempfile  # here: the commands that only read never load it (random, shutil ...)

    fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{prefix}.", suffix=".tmp")
    try:
        try:
            view = memoryview(data)
            while view:
                view = view[os.write(fd, view) :]
            if mode is None:
                umask = os.umask(0)
                os.umask(umask)
                mode = 0o666 & ~umask
            os.fchmod(fd, mode & 0o7777)
            if like is not None:
                st = os.fstat(like)
                with suppress(OSError):  # not the owner: the file becomes ours, mode kept
                    os.fchown(fd, st.st_uid, st.st_gid)
                _copy_xattrs(like, fd)
            os.fsync(fd)
        finally:
            os.close(fd)
    except BaseException:
        with suppress(OSError):
            os.unlink(tmp)
        raise
    return tmp


def write_atomic(
    path: Path,
    data: bytes,
    *,
    mode: int | None = None,
    like: int | None = None,
    sync: bool = True,
) -> None:
    """Replace ``path`` by ``data`` whole: temporary file, fsync, rename, fsync of the folder.

    ``mode`` and ``like`` as for ``write_temp``; without ``mode`` an existing file's
    mode is kept. Raises OSError with the target unchanged if anything before the
    rename fails; an error from the folder fsync comes after the rename (``sync=False``
    leaves that fsync to the caller, who can then tell the two apart).
    """
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    if mode is None:
        with suppress(OSError):
            mode = os.stat(path).st_mode
    tmp = write_temp(folder, path.name, data, mode=mode, like=like)
    try:
        os.replace(tmp, path)
    except BaseException:
        with suppress(OSError):
            os.unlink(tmp)
        raise
    if sync:
        sync_folder(folder)


def remove_stale_temps(folder: Path, prefix: str | None = None) -> int:
    """Delete temporary files of ``write_temp``'s naming in ``folder``; returns how many.

    With ``prefix`` only those of that target name (``.<prefix>.XXXXXXXX.tmp``). The
    caller must hold the lock that every writer of those files holds, so that none of
    them is a live writer's.
    """
    try:
        names = os.listdir(folder)
    except OSError:
        return 0
    lead = f".{prefix}." if prefix is not None else "."
    removed = 0
    for name in names:
        if not name.startswith(lead) or not _TEMP_NAME.match(name):
            continue
        if prefix is not None and len(name) != len(lead) + 12:
            continue
        with suppress(OSError):
            os.unlink(Path(folder) / name)
            removed += 1
    return removed


__all__ = [
    "MAX_BYTES",
    "NotAFileError",
    "describe_os_error",
    "kind_of",
    "why_not_read",
    "open_regular",
    "read_bounded",
    "read_fd",
    "remove_stale_temps",
    "sync_folder",
    "write_atomic",
    "write_temp",
]
