"""Faults at every file-system call of adjust, build and undo (docs/reliability.md).

A wrapper around ``os.write``, ``os.fsync``, ``os.replace``, ``os.rename``, ``os.link``,
``os.mkdir`` and the creating ``os.open`` counts the calls of one clean run; then for
every k it either raises ENOSPC (disk full) at call k, or kills the process there (a
forked child ends with ``os._exit`` before the call, so no cleanup runs, as under
kill -9). After each fault:

- the stock file is byte for byte the old one or the new one, never anything else;
- a clean error (the project's own) means nothing changed; ``PartlyDoneError`` means the
  stock file was written and its message says how to undo;
- the next command (a retry of the build, an undo, another adjust) brings the stock to
  a state it could have reached without the fault, never takes the parts twice, can
  always undo a build that reached the file, and leaves no temporary file behind.
"""

from __future__ import annotations

import errno
import os
from pathlib import Path

import pytest

from picker.building import do_build, plan_build, undo_last
from picker.cli import main
from picker.export import load_design, save_design
from stock import ledger
from stock.errors import PartlyDoneError, PickerError
from stock.file import QtyChange, apply_changes, load
from tests.picker.export.helpers import REQUEST, STOCK_TEXT, lowpass_candidate

WRAPPED = ("write", "fsync", "replace", "rename", "link", "mkdir", "open")
KILLED = 137
COUNTS: dict[str, int] = {}  # calls seen per operation, for the report


class Faults:
    """Count file-system calls; at call ``at`` raise ENOSPC or end the process."""

    def __init__(self, at: int | None = None, kill: bool = False):
        self.at, self.kill = at, kill
        self.calls: list[str] = []
        self._saved: dict[str, object] = {}

    def __enter__(self):
        for name in WRAPPED:
            real = getattr(os, name)
            self._saved[name] = real
            setattr(os, name, self._wrap(name, real))
        return self

    def __exit__(self, *exc):
        for name, real in self._saved.items():
            setattr(os, name, real)

    def _wrap(self, name, real):
        def wrapper(*args, **kw):
            if name == "open" and not (args[1] & os.O_CREAT):
                return real(*args, **kw)
            self.calls.append(name)
            if len(self.calls) == self.at:
                if self.kill:
                    os._exit(KILLED)
                raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
            return real(*args, **kw)

        return wrapper


def _in_child(action) -> int:
    """Run ``action`` in a forked child; its exit status (KILLED when the fault hit)."""
    pid = os.fork()
    if pid == 0:  # pragma: no cover - the child never returns into pytest
        code = 0
        try:
            action()
        except PickerError:
            code = 2
        except BaseException:
            code = 70
        finally:
            os._exit(code)
    _, status = os.waitpid(pid, 0)
    return os.waitstatus_to_exitcode(status)


def _temps(folder: Path) -> list[str]:
    """Temporary files, and kept copies without their record, left in either folder."""
    found = [p.name for p in folder.iterdir() if p.name.endswith(".tmp")]
    led = ledger.ledger_dir(folder / "inventory.toml")
    if led.is_dir():
        names = {p.name for p in led.iterdir()}
        found += [n for n in names if n.endswith(".tmp")]
        found += [n for n in names if n.endswith(".before") and n[:-7] + ".toml" not in names]
    return found


def _bench(root: Path):
    """A stock file and a saved design using 5 pieces (one a measured reading) and an op amp."""
    root.mkdir()
    stock_path = root / "inventory.toml"
    stock_path.write_bytes(STOCK_TEXT.encode("utf-8"))
    stock = load(stock_path)
    design_path = root / "design.toml"
    save_design(design_path, candidate=lowpass_candidate(stock), request=REQUEST, stock=stock)
    return stock_path, design_path


def _build(stock_path, design_path):
    design = load_design(design_path)
    return do_build(stock_path, plan_build(design, load(stock_path)))


def _clean_bytes(tmp_path, op):
    """Before and after bytes of a clean run of ``op``, and its file-system call count."""
    stock_path, design_path = _bench(tmp_path / "clean")
    if op == "undo":
        _build(stock_path, design_path)
    before = stock_path.read_bytes()
    with Faults() as f:
        _run(op, stock_path, design_path)
    COUNTS[op] = len(f.calls)
    return before, stock_path.read_bytes(), len(f.calls)


def _run(op, stock_path, design_path):
    if op == "adjust":
        apply_changes(stock_path, [QtyChange("resistor", 2, -1)])
    elif op == "build":
        _build(stock_path, design_path)
    else:
        undo_last(stock_path)


def _next_command(op, stock_path, design_path, before, after):
    """What the user runs next; then the stock must be where a clean run leaves it."""
    if op == "adjust":
        current = stock_path.read_bytes()
        apply_changes(stock_path, [QtyChange("resistor", 3, -1)])
        apply_changes(stock_path, [QtyChange("resistor", 3, +1)])
        assert stock_path.read_bytes() == current
    elif op == "build":
        # the retry: the same command again; the parts are taken exactly once
        code = main(["build", str(design_path), "--stock", str(stock_path), "--yes"])
        assert code in (0, 2)
        assert stock_path.read_bytes() == after
        live = [r for r in ledger.records(stock_path) if r.state != "undone"]
        assert [r.state for r in live] == ["done"]
        undo_last(stock_path)  # and it can be undone, byte for byte
        assert stock_path.read_bytes() == before
    else:
        recorded = [r.state for r in ledger.records(stock_path)]
        code = main(["undo", "--stock", str(stock_path), "--yes"])
        # 2 only when the undo had been recorded already: "no build to undo"
        assert code == (2 if recorded == ["undone"] else 0), recorded
        assert stock_path.read_bytes() == after
        assert [r.state for r in ledger.records(stock_path)] == ["undone"]
    assert _temps(stock_path.parent) == []


@pytest.mark.parametrize("op", ["adjust", "build", "undo"])
def test_disk_full_at_every_call(tmp_path, op, capsys):
    before, after, n = _clean_bytes(tmp_path, op)
    assert n >= 5  # the wrapper sees the writes (a real count, not zero)
    outcomes = {"clean error": 0, "partly done": 0, "done": 0}
    for k in range(1, n + 1):
        stock_path, design_path = _bench(tmp_path / f"k{k}")
        if op == "undo":
            _build(stock_path, design_path)
        try:
            with Faults(at=k):
                _run(op, stock_path, design_path)
        except PartlyDoneError as exc:
            outcomes["partly done"] += 1
            assert stock_path.read_bytes() == after, k
            said = {"adjust": "the stock file was written", "build": "picker undo --stock"}
            assert said.get(op, "back as it was before build 1") in str(exc), (k, str(exc))
        except PickerError as exc:
            outcomes["clean error"] += 1
            assert "No space left on device" in str(exc), (k, str(exc))
            assert stock_path.read_bytes() == before, (k, str(exc))
        else:
            outcomes["done"] += 1
            assert stock_path.read_bytes() == after, k
        _next_command(op, stock_path, design_path, before, after)
    capsys.readouterr()
    assert outcomes["clean error"] > 0
    if op != "adjust":
        assert outcomes["partly done"] > 0  # the record could not be marked after the write


@pytest.mark.parametrize("op", ["adjust", "build", "undo"])
def test_killed_at_every_call(tmp_path, op, capsys):
    before, after, n = _clean_bytes(tmp_path, op)
    seen = set()
    for k in range(1, n + 2):  # n + 1: the run completes
        stock_path, design_path = _bench(tmp_path / f"k{k}")
        if op == "undo":
            _build(stock_path, design_path)

        def action(stock_path=stock_path, design_path=design_path, k=k):
            with Faults(at=k, kill=True):
                _run(op, stock_path, design_path)

        code = _in_child(action)
        assert code == (0 if k == n + 1 else KILLED), k
        now = stock_path.read_bytes()
        assert now in (before, after), k  # never a partial file
        seen.add(now == after)
        _next_command(op, stock_path, design_path, before, after)
    capsys.readouterr()
    assert seen == {False, True}  # kills landed before and after the stock file changed


def test_a_pending_record_that_reached_the_file_is_completed_and_undone(tmp_path):
    stock_path, design_path = _bench(tmp_path / "b")
    before = stock_path.read_bytes()
    # kill right after the stock rename: the last replace is that of the done record
    calls = _count_build(tmp_path)
    k = [i for i, c in enumerate(calls, start=1) if c == "replace"][-1]
    assert _in_child(lambda: _kill_build(stock_path, design_path, k)) == KILLED
    (pending,) = ledger.records(stock_path)
    assert pending.state == "pending" and pending.sha256_after is not None
    undo_last(stock_path)  # the undo completes the record, then undoes it
    assert stock_path.read_bytes() == before


def _count_build(tmp_path):
    stock_path, design_path = _bench(tmp_path / f"count{len(list(tmp_path.iterdir()))}")
    with Faults() as f:
        _build(stock_path, design_path)
    return f.calls


def _kill_build(stock_path, design_path, k):
    with Faults(at=k, kill=True):
        _build(stock_path, design_path)


def test_exit_3_names_the_undo(tmp_path, capsys):
    stock_path, design_path = _bench(tmp_path / "b")
    calls = _count_build(tmp_path)
    k = [i for i, c in enumerate(calls, start=1) if c == "replace"][-1]  # the done record
    with Faults(at=k):
        code = main(["build", str(design_path), "--stock", str(stock_path), "--yes"])
    err = capsys.readouterr().err
    assert code == 3
    assert "the parts were taken" in err and f"picker undo --stock {stock_path}" in err
