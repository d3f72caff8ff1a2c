"""The writing half of a build: take the parts, keep the record, undo (docs/reliability.md).

``do_build`` takes a checked ``picker.building.BuildPlan`` out of the stock file and keeps
a build record in ``stock.ledger``; ``undo_last`` puts the bytes from before the last build
back, but only while the file is exactly as that build left it. Both hold the records
folder's lock throughout; the record of a build is durable before the stock file is
replaced, and ``settle`` finishes what a stopped build left pending, so a build stopped
at any point can be undone and a retry never takes the parts twice.
"""

from __future__ import annotations

import hashlib
import os
from contextlib import suppress
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from stock import ledger
from stock.durable import kind_of, read_bounded, why_not_read
from stock.errors import PartlyDoneError, StockEditError

if TYPE_CHECKING:
    from picker.building import BuildPlan  # noqa: F401  (annotations)


def _sha(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def _read(path: Path) -> bytes:
    try:
        return read_bounded(path)
    except OSError as exc:
        raise StockEditError(f"{path}: {why_not_read(exc, 'stock file')}") from None


def _design_sha(design_path) -> str | None:
    if design_path is None:
        return None
    try:
        return _sha(read_bounded(design_path))
    except OSError:
        return None


def settle(stock_path, current_sha: str) -> list[str]:
    """Finish what an interrupted build left pending; returns one note per record settled.

    A pending record whose recorded after-sha256 is the stock file's now reached the
    file: it is marked done (undo can take it back). One whose before-sha256 is the
    file's now never reached it: it is dropped. Call under ``ledger.locked``.
    """
    notes = []
    for record in ledger.records(stock_path):
        if record.state != "pending":
            continue
        if record.sha256_after is not None and current_sha == record.sha256_after:
            _or_fail(lambda r=record: ledger.finish(r, current_sha), "complete", record)
            notes.append(
                f"build {record.number} ({record.time}) had been stopped after it changed "
                "the stock file; it is now recorded as done (picker undo takes it back)"
            )
        elif current_sha == record.sha256_before:
            _or_fail(lambda r=record: ledger.discard(r), "drop", record)
            notes.append(
                f"build {record.number} ({record.time}) had been stopped before it changed "
                "the stock file; its record is dropped"
            )
    return notes


def _or_fail(action, verb: str, record) -> None:
    try:
        action()
    except OSError as exc:
        raise StockEditError(
            f"{record.path}: cannot {verb} the record of interrupted build "
            f"{record.number} ({exc.strerror or exc}); nothing was changed"
        ) from None


def do_build(stock_path, plan: BuildPlan, *, expect_sha256=None, again: bool = False):
    """Take the plan's pieces out of the stock file and record the build for undo.

    ``expect_sha256`` defaults to the sha256 of the stock the plan was checked against:
    a file changed since then is refused (StockEditError, nothing changed). The record
    is durable before the stock file is replaced (``ledger.begin`` runs under the stock
    file's lock, from ``apply_changes``), so a build stopped at any point can be undone
    or is settled by the next command (``settle``). Unless ``again``, a build of the same
    design file onto the stock file exactly as its last build left it is refused as a
    retry, so that the parts are never taken twice.

    Raises
    ------
    StockEditError
        Nothing was changed.
    PartlyDoneError
        The stock file was changed but the record could not be marked done (exit 3);
        the message says how to undo.

    Returns the ``stock.file.EditResult``.
    """
    from stock.edit import refuse_sample
    from stock.file import WrittenButUnsynced, apply_changes

    path = Path(stock_path)
    refuse_sample(path)
    with ledger.locked(path):
        before = _read(path)
        sha = _sha(before)
        settle(path, sha)
        want = expect_sha256 if expect_sha256 is not None else plan.stock_sha256
        if want is not None and sha != want:
            raise StockEditError(
                f"{path}: the stock file changed since the build was checked; "
                f"nothing was changed; run the build again"
            )
        design_sha = _design_sha(plan.design_path)
        if not again:
            _refuse_retry(path, plan.design_path, sha, design_sha)
        made: list = []

        def record_it(old: bytes, new: bytes) -> None:
            made.append(
                ledger.begin(
                    path,
                    old,
                    design=plan.design_path,
                    summary=plan.summary,
                    sha256_after=_sha(new),
                    design_sha256=design_sha,
                )
            )

        try:
            result = apply_changes(
                path, list(plan.changes), expect_sha256=sha, before_replace=record_it
            )
        except WrittenButUnsynced as exc:
            _finish_or_say(path, made[0], exc.after_sha256, str(exc))
            raise _taken(path, made[0], str(exc)) from None
        except BaseException:
            if made:
                with suppress(OSError):
                    ledger.discard(made[0])
            raise
        _finish_or_say(path, made[0], result.after_sha256, None)
        return result


def _taken(path: Path, record, why: str) -> PartlyDoneError:
    return PartlyDoneError(
        f"the parts were taken: {path} was written (build {record.number}), but {why}.\n"
        f"Undo it with: picker undo --stock {path}   (the build record is kept in "
        f"{record.path.parent}; the next picker command completes it)"
    )


def _finish_or_say(path: Path, record, after_sha: str, why: str | None) -> None:
    try:
        ledger.finish(record, after_sha)
    except OSError as exc:
        raise _taken(
            path,
            record,
            f"its record could not be marked done ({exc.strerror or exc})"
            + (f"; also: {why}" if why else ""),
        ) from None


def before_build(stock_path, design_path, *, again: bool = False) -> list[str]:
    """Before a build is planned: settle a stopped build and refuse a retry (unless
    ``again``), so the message says "already built" rather than that the stock no longer
    holds the parts. Returns the notes of ``settle``."""
    path = Path(stock_path)
    if not ledger.ledger_dir(path).is_dir():
        return []
    with ledger.locked(path):
        sha = _sha(_read(path))
        notes = settle(path, sha)
        if not again:
            _refuse_retry(path, design_path, sha, _design_sha(design_path))
    return notes


def _refuse_retry(path: Path, design_path, sha: str, design_sha: str | None) -> None:
    if design_path is None or design_sha is None:
        return
    last = ledger.last_build(path)
    if (
        last is not None
        and last.state == "done"
        and last.sha256_after == sha
        and last.design == str(Path(design_path).resolve())
        and last.design_sha256 == design_sha
    ):
        raise StockEditError(
            f"{path}: build {last.number} ({last.time}) already took the parts of "
            f"{design_path}, and the stock file is exactly as it left it: nothing was "
            "taken again. To build the design a second time, add --again; to put the "
            f"parts back, picker undo --stock {path}"
        )


@dataclass(frozen=True)
class UndoPreview:
    """What ``undo_last`` would do: undo ``record``, or only note that it is undone already
    (``already_undone``: an undo was stopped after it restored the file)."""

    record: ledger.BuildRecord
    already_undone: bool = False
    notes: tuple[str, ...] = ()

    def __getattr__(self, name):  # the record's fields read through (number, time ...)
        return getattr(self.record, name)


def undo_preview(stock_path) -> UndoPreview:
    """The build ``undo_last`` would undo, checked; raises StockEditError if it cannot.

    Settles interrupted builds first (``settle``), so it needs the records folder lock.
    """
    path = Path(stock_path)
    try:
        kind = kind_of(os.stat(path).st_mode)
    except FileNotFoundError:
        kind = "does not exist"
    except OSError as exc:
        kind = f"cannot be read ({exc.strerror or exc})"
    if kind is not None:
        raise StockEditError(
            f"{path}: {kind}; name the stock file the build changed, e.g. --stock inventory.toml"
        )
    from stock.edit import refuse_sample

    refuse_sample(path)
    if not ledger.ledger_dir(path).is_dir():
        raise StockEditError(f"{path}: no build to undo (no records in {ledger.ledger_dir(path)})")
    with ledger.locked(path):
        return _preview(path)


def _preview(path: Path) -> UndoPreview:
    current = _sha(_read(path))
    notes = tuple(settle(path, current))
    record = ledger.last_build(path)
    if record is None:
        undone = [r.number for r in ledger.records(path)]
        if not undone:
            raise StockEditError(
                f"{path}: no build to undo (no records in {ledger.ledger_dir(path)})"
            )
        which = f"build {undone[0]}" if len(undone) == 1 else f"all {len(undone)} builds"
        raise StockEditError(
            f"{path}: no build to undo ({which} recorded in {ledger.ledger_dir(path)} "
            "already undone)"
        )
    if record.state == "pending":
        raise StockEditError(
            f"{path}: build {record.number} ({record.time}) was interrupted and the file "
            f"has changed since; undo will not guess. The file as it was before that build "
            f"is kept in {record.before_path}: compare it and copy it back by hand if right"
        )
    if current == record.sha256_before and current != record.sha256_after:
        return UndoPreview(record, already_undone=True, notes=notes)
    if current != record.sha256_after:
        raise StockEditError(
            f"{path}: the stock file changed since build {record.number} ({record.time}); "
            f"undo restores only a file exactly as the build left it, so nothing was "
            f"changed. The file as it was before that build is kept in "
            f"{record.before_path}; redo your later edits by hand, or copy it back"
        )
    return UndoPreview(record, notes=notes)


def undo_last(stock_path):
    """Put back the stock file's bytes from before the last build.

    Returns the EditResult, or None when the last build was undone already (an undo
    stopped after restoring the file): then only its record is marked undone.

    Raises
    ------
    StockEditError
        Nothing was changed.
    PartlyDoneError
        The file was restored but the record could not be marked undone (exit 3); the
        next picker command recognises the undo as done.
    """
    from stock.edit import refuse_sample
    from stock.file import WrittenButUnsynced, replace_bytes

    path = Path(stock_path)
    refuse_sample(path)
    with ledger.locked(path):
        preview = _preview(path)
        record = preview.record
        if preview.already_undone:
            _mark_undone_or_say(path, record, None)
            return None
        data = ledger.before_bytes(record)
        try:
            result = replace_bytes(path, data, expect_sha256=record.sha256_after)
        except WrittenButUnsynced as exc:
            _mark_undone_or_say(path, record, str(exc))
            raise PartlyDoneError(
                f"{path} is back as it was before build {record.number}, but {exc}"
            ) from None
        _mark_undone_or_say(path, record, None)
        return result


def _mark_undone_or_say(path: Path, record, why: str | None) -> None:
    try:
        ledger.mark_undone(record)
    except OSError as exc:
        raise PartlyDoneError(
            f"{path} is back as it was before build {record.number}, but its record "
            f"could not be marked undone ({exc.strerror or exc})"
            + (f"; also: {why}" if why else "")
            + "; the next picker command sees that the build is undone"
        ) from None
