"""Build records beside a stock file, so that a build can be undone byte for byte.

The records of ``inventory.toml`` live in the folder ``.inventory.toml.builds`` beside it.
Build number N is two files:

``build-0001.before``
    the stock file's exact bytes before the build (copy it back by hand in a pinch);
``build-0001.toml``
    what happened: time (UTC), the stock file and design paths, the sha256 of the stock
    before and after, one line per change, and the state: ``pending`` while the edit is
    being made, ``done`` once made, ``undone`` once undone.

Every file is written whole to a temporary file in the same folder and fsynced; a record
is then renamed into place, and a ``.before`` copy is hard-linked to its name, which
fails if the name exists: that claims the build number, so two builds at once never
share one. This module knows nothing of filters: it stores bytes and
lines of text given by its caller (``picker.building``).
"""

from __future__ import annotations

import hashlib
import os
import re
import tempfile
import time
import tomllib
from dataclasses import dataclass, field, replace
from pathlib import Path

import tomli_w

from stock.durable import sync_folder
from stock.errors import StockEditError

FORMAT = 1
_NAME = re.compile(r"^build-(\d{4,})\.toml$")


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
    path: Path = field(kw_only=True)  # the record's .toml file

    @property
    def before_path(self) -> Path:
        return self.path.with_suffix(".before")


def ledger_dir(stock_path) -> Path:
    """The folder holding the build records of ``stock_path``."""
    p = Path(stock_path).resolve()
    return p.parent / f".{p.name}.builds"


def _now() -> str:
    return time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime())


def begin(stock_path, before: bytes, *, design=None, summary=()) -> BuildRecord:
    """Record a build about to be made: keep ``before`` and write a ``pending`` record."""
    folder = ledger_dir(stock_path)
    try:
        folder.mkdir(exist_ok=True)
    except OSError as exc:
        raise StockEditError(
            f"{folder}: cannot make the build records folder: {exc.strerror or exc}"
        ) from exc
    tmp = _write_temp(folder, "before", before)
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
                raise StockEditError(f"{before_path}: cannot write: {exc.strerror or exc}") from exc
            break
    finally:
        Path(tmp).unlink(missing_ok=True)
    try:
        record = BuildRecord(
            number=number,
            time=_now(),
            state="pending",
            stock=str(Path(stock_path).resolve()),
            sha256_before=hashlib.sha256(before).hexdigest(),
            design=None if design is None else str(Path(design).resolve()),
            summary=tuple(str(s) for s in summary),
            path=folder / f"build-{number:04d}.toml",
        )
        _write(record)
    except BaseException:
        before_path.unlink(missing_ok=True)
        raise
    return record


def finish(record: BuildRecord, sha256_after: str) -> BuildRecord:
    """Mark ``record`` done, with the stock file's sha256 after the build."""
    done = replace(record, state="done", sha256_after=sha256_after)
    _write(done)
    return done


def mark_undone(record: BuildRecord) -> BuildRecord:
    undone = replace(record, state="undone", undone_time=_now())
    _write(undone)
    return undone


def discard(record: BuildRecord) -> None:
    """Remove a record whose build did not happen."""
    record.path.unlink(missing_ok=True)
    record.before_path.unlink(missing_ok=True)


def records(stock_path) -> list[BuildRecord]:
    """Every build record of ``stock_path``, oldest first."""
    folder = ledger_dir(stock_path)
    if not folder.is_dir():
        return []
    found = []
    for entry in folder.iterdir():
        m = _NAME.match(entry.name)
        if m:
            found.append(_read(entry, int(m.group(1))))
    return sorted(found, key=lambda r: r.number)


def last_build(stock_path) -> BuildRecord | None:
    """The newest record not undone (``done`` or ``pending``), or None."""
    live = [r for r in records(stock_path) if r.state != "undone"]
    return live[-1] if live else None


def before_bytes(record: BuildRecord) -> bytes:
    """The kept bytes, checked against the recorded sha256."""
    try:
        data = record.before_path.read_bytes()
    except OSError as exc:
        raise StockEditError(
            f"{record.before_path}: cannot read the kept stock file: {exc.strerror or exc}"
        ) from exc
    if hashlib.sha256(data).hexdigest() != record.sha256_before:
        raise StockEditError(
            f"{record.before_path}: the kept copy does not match its record "
            f"{record.path.name} (sha256 differs); nothing was restored"
        )
    return data


def _write(record: BuildRecord) -> None:
    doc = {
        "format": FORMAT,
        "number": record.number,
        "time": record.time,
        "state": record.state,
        "stock": record.stock,
        "sha256_before": record.sha256_before,
    }
    if record.sha256_after is not None:
        doc["sha256_after"] = record.sha256_after
    if record.design is not None:
        doc["design"] = record.design
    if record.undone_time is not None:
        doc["undone_time"] = record.undone_time
    doc["summary"] = list(record.summary)
    _write_atomic(record.path, tomli_w.dumps(doc).encode("utf-8"))


def _read(path: Path, number: int) -> BuildRecord:
    try:
        doc = tomllib.loads(path.read_text(encoding="utf-8"))
        state = doc["state"]
        if state not in ("pending", "done", "undone"):
            raise ValueError(f"state {state!r}")
        return BuildRecord(
            number=number,
            time=str(doc["time"]),
            state=state,
            stock=str(doc["stock"]),
            sha256_before=str(doc["sha256_before"]),
            sha256_after=doc.get("sha256_after"),
            design=doc.get("design"),
            summary=tuple(str(s) for s in doc.get("summary", ())),
            undone_time=doc.get("undone_time"),
            path=path,
        )
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError, KeyError, ValueError) as exc:
        raise StockEditError(
            f"{path}: unreadable build record ({exc}); move it aside to go on"
        ) from exc


def _write_temp(folder: Path, label: str, data: bytes) -> str:
    """``data`` in a new fsynced temporary file in ``folder``; returns its path."""
    fd, tmp = tempfile.mkstemp(dir=folder, prefix=f".{label}.", suffix=".tmp")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return tmp


def _write_atomic(path: Path, data: bytes) -> None:
    tmp = _write_temp(path.parent, path.name, data)
    try:
        os.replace(tmp, path)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    sync_folder(path.parent)
