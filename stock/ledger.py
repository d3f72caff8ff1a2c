"""Build records beside a stock file, so that a build can be undone byte for byte.

The records of ``inventory.toml`` live in the folder ``.inventory.toml.builds`` beside it.
Build number N is two files:

``build-0001.before``
    the stock file's exact bytes before the build (copy it back by hand in a pinch);
``build-0001.toml``
    what happened: time (UTC), the stock file and design paths (and the design's
    sha256), the sha256 of the stock before and after, one line per change, and the
    state: ``pending`` from before the stock file is replaced until the build is
    recorded as made, ``done`` once made, ``undone`` once undone.

A pending record already holds the sha256 the stock file will have after the build, and
it is durable (file and folder fsynced) before the stock file is replaced: whatever
stops a build, the next command can tell from the stock file's sha256 whether the build
reached it (complete the record) or not (drop it), and a retry sees the build.

Every file is written whole to a temporary file in the same folder and fsynced
(``stock.durable``); a record is renamed into place, a ``.before`` copy is hard-linked
to its name, which fails if the name exists: that claims the build number. Writers hold
an exclusive lock on the folder itself (``locked``), so the temporary files a killed
writer left are removed by the next one. The rules and their tests are in
docs/reliability.md. This module knows nothing of filters: it stores bytes and lines of
text given by its caller (``picker.building``).
"""

from __future__ import annotations

import hashlib
import os
import re
import time
from collections.abc import Iterator
from contextlib import contextmanager, suppress
from dataclasses import dataclass, field, replace
from pathlib import Path

import tomli_w

from stock import tomlread
from stock.durable import (
    describe_os_error,
    lock_exclusive,
    read_bounded,
    remove_stale_temps,
    sync_folder,
    write_atomic,
    write_temp,
)
from stock.errors import StockEditError, StockFileError
from stock.load import decode
from stock.values import shown, type_word

FORMAT = 1
STATES = ("pending", "done", "undone")
_NAME = re.compile(r"^build-(\d{4,})\.toml$")
_BEFORE = re.compile(r"^build-(\d{4,})\.before$")
_SHA = re.compile(r"^[0-9a-f]{64}$")


@dataclass(frozen=True)
class BuildRecord:
    number: int
    time: str  # UTC, ISO 8601
    state: str  # "pending" | "done" | "undone"
    stock: str  # absolute path of the stock file
    sha256_before: str
    sha256_after: str | None = None
    design: str | None = None
    summary: tuple[str, ...] = ()
    undone_time: str | None = None
    design_sha256: str | None = None
    path: Path = field(kw_only=True)  # the record's .toml file

    @property
    def before_path(self) -> Path:
        assert self.path is not None
        return self.path.with_suffix(".before")


def ledger_dir(stock_path) -> Path:
    """The folder holding the build records of ``stock_path``."""
    p = Path(stock_path).resolve()
    return p.parent / f".{p.name}.builds"


def _now() -> str:
    return time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime())


def _fail(what: str, exc: OSError) -> StockEditError:
    return StockEditError(f"{what}: {describe_os_error(exc)}; nothing was changed")


@contextmanager
def locked(stock_path) -> Iterator[Path]:
    """Hold the exclusive lock on the build records folder (made if need be); yield it.

    Every writer of the folder holds this lock, so on entry the temporary files of a
    killed writer are removed. Raises StockEditError (nothing changed) when the folder
    cannot be made or locked.
    """
    folder = ledger_dir(stock_path)
    if not folder.is_dir():
        try:
            folder.mkdir()
            sync_folder(folder.parent)
        except FileExistsError:
            pass
        except OSError as exc:
            raise _fail(f"{folder}: cannot make the build records folder", exc) from None
    try:
        fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError as exc:
        raise _fail(f"{folder}: cannot open the build records folder", exc) from None
    try:
        lock_exclusive(fd)
        remove_stale_temps(folder)
        _remove_orphan_copies(folder)
        yield folder
    finally:
        os.close(fd)  # also releases the lock


def _remove_orphan_copies(folder: Path) -> None:
    """A ``.before`` copy without its record is a build killed before its record was
    written (the stock file was not touched then): remove it. Under ``locked``."""
    try:
        names = set(os.listdir(folder))
    except OSError:
        return
    for name in names:
        if _BEFORE.match(name) and name[: -len(".before")] + ".toml" not in names:
            with suppress(OSError):
                os.unlink(folder / name)


def begin(
    stock_path,
    before: bytes,
    *,
    design=None,
    summary=(),
    sha256_after: str | None = None,
    design_sha256: str | None = None,
) -> BuildRecord:
    """Record a build about to be made: keep ``before``, write a durable ``pending`` record.

    ``sha256_after`` is what the stock file's sha256 will be once the build is made.
    Raises StockEditError, leaving no file of this build behind, if anything fails.
    """
    folder = ledger_dir(stock_path)
    try:
        folder.mkdir(exist_ok=True)
    except OSError as exc:
        raise _fail(f"{folder}: cannot make the build records folder", exc) from None
    try:
        tmp = write_temp(folder, "before", before, mode=0o600)
    except OSError as exc:
        raise _fail(f"{folder}: cannot keep a copy of the stock file", exc) from None
    number = max((r.number for r in records(stock_path)), default=0) + 1
    try:
        while True:
            before_path = folder / f"build-{number:04d}.before"
            try:
                os.link(tmp, before_path)  # atomic: whole content, fails if the name exists
            except FileExistsError:
                number += 1
                continue
            except OSError as exc:
                raise _fail(f"{before_path}: cannot write", exc) from None
            break
    finally:
        with suppress(OSError):
            os.unlink(tmp)
    record = BuildRecord(
        number=number,
        time=_now(),
        state="pending",
        stock=str(Path(stock_path).resolve()),
        sha256_before=hashlib.sha256(before).hexdigest(),
        sha256_after=sha256_after,
        design=None if design is None else str(Path(design).resolve()),
        design_sha256=design_sha256,
        summary=tuple(str(s) for s in summary),
        path=folder / f"build-{number:04d}.toml",
    )
    try:
        _write(record)  # its folder fsync also makes the .before link durable
    except BaseException as exc:
        with suppress(OSError):
            assert record.path is not None
            record.path.unlink(missing_ok=True)
            before_path.unlink(missing_ok=True)
        if isinstance(exc, OSError):
            raise _fail(f"{record.path}: cannot write the build record", exc) from None
        raise
    return record


def finish(record: BuildRecord, sha256_after: str) -> BuildRecord:
    """Mark ``record`` done, with the stock file's sha256 after the build (OSError if not)."""
    done = replace(record, state="done", sha256_after=sha256_after)
    _write(done)
    return done


def mark_undone(record: BuildRecord) -> BuildRecord:
    """Mark ``record`` undone (OSError if the record cannot be written)."""
    undone = replace(record, state="undone", undone_time=_now())
    _write(undone)
    return undone


def discard(record: BuildRecord) -> None:
    """Remove a record whose build did not happen (the record first: a ``.before`` alone
    is no build)."""
    assert record.path is not None
    record.path.unlink(missing_ok=True)
    record.before_path.unlink(missing_ok=True)
    sync_folder(record.path.parent)


def records(stock_path) -> list[BuildRecord]:
    """Every build record of ``stock_path``, oldest first."""
    folder = ledger_dir(stock_path)
    if not folder.is_dir():
        return []
    found = []
    for entry in folder.iterdir():
        m = _NAME.match(entry.name)
        if m:
            found.append(read_record(entry, int(m.group(1))))
    return sorted(found, key=lambda r: r.number)


def last_build(stock_path) -> BuildRecord | None:
    """The newest record not undone (``done`` or ``pending``), or None."""
    live = [r for r in records(stock_path) if r.state != "undone"]
    return live[-1] if live else None


def before_bytes(record: BuildRecord) -> bytes:
    """The kept bytes, checked against the recorded sha256."""
    try:
        data = read_bounded(record.before_path)
    except OSError as exc:
        raise StockEditError(
            f"{record.before_path}: cannot read the kept stock file: {describe_os_error(exc)}"
        ) from None
    if hashlib.sha256(data).hexdigest() != record.sha256_before:
        assert record.path is not None
        raise StockEditError(
            f"{record.before_path}: the kept copy does not match its record "
            f"{record.path.name} (sha256 differs); nothing was restored"
        )
    return data


def _write(record: BuildRecord) -> None:
    doc: dict = {
        "format": FORMAT,
        "number": record.number,
        "time": record.time,
        "state": record.state,
        "stock": record.stock,
        "sha256_before": record.sha256_before,
    }
    optional = {
        "sha256_after": record.sha256_after,
        "design": record.design,
        "design_sha256": record.design_sha256,
        "undone_time": record.undone_time,
    }
    doc.update({k: v for k, v in optional.items() if v is not None})
    doc["summary"] = list(record.summary)
    assert record.path is not None
    write_atomic(record.path, tomli_w.dumps(doc).encode("utf-8"), mode=0o600)


# (key, required, check, what is accepted)
_FIELDS = (
    ("format", True, lambda v: v == FORMAT and type(v) is int, f"format = {FORMAT}"),
    ("number", True, lambda v: type(v) is int, "the build number of the file's name"),
    ("time", True, lambda v: isinstance(v, str), 'a time in quotes, "2026-12-02T08:00:00Z"'),
    ("state", True, lambda v: v in STATES, "one of " + ", ".join(f'"{s}"' for s in STATES)),
    ("stock", True, lambda v: isinstance(v, str), "the stock file's path in quotes"),
    ("sha256_before", True, lambda v: isinstance(v, str) and _SHA.match(v), "64 hex digits"),
    ("sha256_after", False, lambda v: isinstance(v, str) and _SHA.match(v), "64 hex digits"),
    ("design", False, lambda v: isinstance(v, str), "the design's path in quotes"),
    ("design_sha256", False, lambda v: isinstance(v, str) and _SHA.match(v), "64 hex digits"),
    ("undone_time", False, lambda v: isinstance(v, str), "a time in quotes"),
    (
        "summary",
        False,
        lambda v: isinstance(v, list) and all(isinstance(s, str) for s in v),
        "a list of text lines",
    ),
)


def read_record(path: Path, number: int) -> BuildRecord:
    """Read and check one record; StockEditError naming file:line, key and the bad text."""
    hint = "move it aside to go on"
    try:
        text = decode(read_bounded(path), str(path))
        doc = tomlread.parse(text)
    except OSError as exc:
        raise StockEditError(
            f"{path}: unreadable build record ({describe_os_error(exc)}); {hint}"
        ) from None
    except tomlread.TomlProblem as exc:
        where = f"{path}:{exc.line}" if exc.line else str(path)
        raise StockEditError(f"{where}: unreadable build record: {exc.message}; {hint}") from None
    except StockFileError as exc:  # not UTF-8
        raise StockEditError(f"unreadable build record: {exc}; {hint}") from None
    lines = tomlread.KeyLines(text)
    for key, required, ok, accepted in _FIELDS:
        if key not in doc:
            if required:
                raise StockEditError(f"{path}: build record {key}: missing; {hint}")
            continue
        value = doc[key]
        if not ok(value):
            written = None if isinstance(value, str) else lines.written((key,))
            raise StockEditError(
                f"{path}:{lines.line_of((key,))}: build record {key}: "
                f"{shown(value if written is None else written)} ({type_word(value)}) "
                f"is not {accepted}; {hint}"
            )
    if doc["number"] != number:
        raise StockEditError(
            f"{path}:{lines.line_of(('number',))}: build record number: says "
            f"{doc['number']} but the file is named for build {number}; {hint}"
        )
    return BuildRecord(
        number=number,
        time=doc["time"],
        state=doc["state"],
        stock=doc["stock"],
        sha256_before=doc["sha256_before"],
        sha256_after=doc.get("sha256_after"),
        design=doc.get("design"),
        design_sha256=doc.get("design_sha256"),
        summary=tuple(doc.get("summary", ())),
        undone_time=doc.get("undone_time"),
        path=path,
    )


__all__ = [
    "FORMAT",
    "BuildRecord",
    "before_bytes",
    "begin",
    "discard",
    "finish",
    "last_build",
    "ledger_dir",
    "locked",
    "mark_undone",
    "read_record",
    "records",
]
