"""Run the UI's heavy computations in a child process, one job at a time per lane.

Why a process: a search or a Monte Carlo run in a thread of the UI's own process
competes with the UI for the interpreter lock, and under load the screen stalls and
keys land late. A child process computes on its own; the UI's worker thread only
waits on a pipe. A newer job in the same lane kills the older one, so a change of
targets really restarts the search, and quitting never waits for a computation.

The children fork from a ``forkserver`` that has imported numpy and the core
once, so a job starts in milliseconds after the first.
"""

from __future__ import annotations

import multiprocessing as mp
import sys
import threading
from collections.abc import Callable

from stock.errors import PickerError

PRELOAD = [
    "numpy",
    "stock.file",
    "stock.values",
    "picker.filters",
    "picker.analysis",
    "picker.search.tradeoff",
    "picker.search",
    "picker.budget",
    "picker.ui.backend",
]
_context = None
_context_lock = threading.Lock()
_started = threading.Event()  # set once start() has run on the main thread
START_WAIT_S = 30.0


def context():
    global _context
    with _context_lock:
        if _context is None:
            ctx = mp.get_context("forkserver")
            ctx.set_forkserver_preload(PRELOAD)
            _context = ctx
        return _context


def start() -> None:
    """Start the fork server (idempotent); call it on the main thread.

    A running Textual app replaces ``sys.stdout``/``sys.stderr`` with captures that
    have no file descriptor, and starting the server needs one (it hands stderr to
    the resource tracker), so the real streams are put back for the moment it takes.
    The server then imports ``PRELOAD`` in its own process, in parallel with the UI.
    """
    context()
    from multiprocessing import forkserver

    saved = sys.stdout, sys.stderr
    sys.stdout, sys.stderr = sys.__stdout__, sys.__stderr__
    try:
        forkserver.ensure_running()
    finally:
        sys.stdout, sys.stderr = saved
    _started.set()


class Cancelled(Exception):
    """The job was replaced by a newer one (or the lane was shut) before it finished."""


class JobError(PickerError):
    """The job raised; the message is the child's, with the type name when unexpected."""


def _child(conn, fn: Callable, args: tuple, reports: bool = False) -> None:
    """Run ``fn(*args)`` and send back its result; with ``reports``, ``fn`` also gets
    ``progress=`` a callback that sends each record ahead of the result."""

    def progress(record) -> None:
        conn.send(("progress", record))

    try:
        result = ("ok", fn(*args, progress=progress) if reports else fn(*args))
    except PickerError as exc:
        result = ("picker", str(exc))
    except BaseException as exc:  # reported to the UI as text, never a traceback
        result = ("other", f"{type(exc).__name__}: {exc}")
    try:
        conn.send(result)
    except Exception as exc:  # an unpicklable result
        conn.send(("other", f"cannot send the result back: {exc}"))
    conn.close()


class Lane:
    """One job at a time; ``run`` blocks (call it from a worker thread)."""

    def __init__(self, name: str) -> None:
        self.name = name
        self._lock = threading.Lock()
        self._proc = None

    def run(self, fn: Callable, *args, on_progress: Callable | None = None):
        """``fn(*args)`` in a child process; its result, or JobError / Cancelled.

        ``on_progress``: ``fn`` takes ``progress=`` and each record it reports is
        handed to ``on_progress`` here, in the calling thread, in the order sent.
        """
        if not _started.wait(START_WAIT_S):
            raise JobError("the helper process for searches was not started")
        ctx = context()
        receive, send = ctx.Pipe(duplex=False)
        proc = ctx.Process(
            target=_child,
            args=(send, fn, args, on_progress is not None),
            daemon=True,
            name=f"picker-{self.name}",
        )
        with self._lock:
            self._kill(self._proc)
            self._proc = proc
            proc.start()
        send.close()
        try:
            while True:
                if receive.poll(0.05):
                    try:
                        kind, payload = receive.recv()
                    except EOFError:
                        raise Cancelled(self.name) from None
                    if kind == "progress":
                        if on_progress is not None:
                            on_progress(payload)
                        continue
                    break
                if not proc.is_alive() and not receive.poll(0):
                    raise Cancelled(self.name)
        finally:
            receive.close()
            proc.join(timeout=1.0)
            with self._lock:
                if self._proc is proc:
                    self._proc = None
        if kind == "ok":
            return payload
        raise JobError(payload)

    def cancel(self) -> None:
        with self._lock:
            self._kill(self._proc)

    @staticmethod
    def _kill(proc) -> None:
        if proc is not None and proc.is_alive():
            proc.kill()
