"""Progress of a running search, and the clock that stops it (docs/search.md, "Cost").

``search(..., progress=callback)`` calls ``callback(Progress(...))`` from the thread that
runs the search, at most every :data:`INTERVAL` seconds, while it works. A shell draws
it (the CLI's status line, the terminal UI's status bar); nothing here draws anything.

``search(..., time_limit=S, should_stop=callable)``: the search polls the :class:`Clock`
between blocks of work; once ``S`` seconds have passed or ``should_stop()`` returns
true it stops and returns the best found so far, marked ``proven=False`` with a proved
lower bound (see :mod:`picker.search.api`).
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable
from dataclasses import dataclass

INTERVAL = 0.1  # seconds between two progress reports


@dataclass(frozen=True)
class Progress:
    """One report of a running search.

    ``stage``: the stage being searched, from 1, or 0 for work on all stages at once
    (the joint allocation, the trade-off). ``phase``: what it does, in words
    (``"stage values"``, ``"joint allocation"``, ``"trade-off"``). ``best_score``: the
    worst error of the best candidate found so far (None before the first);
    ``best_pieces``: its piece count.
    """

    stage: int
    phase: str
    elapsed_s: float
    best_score: float | None = None
    best_pieces: int | None = None


class Stopped(Exception):
    """Raised inside the search when its clock runs out; the search catches it."""


class Clock:
    """Deadline, stop request and progress reports of one search.

    ``check()`` is cheap enough to call between blocks of vectorised work: it reads the
    time, and raises :class:`Stopped` once the deadline has passed or ``should_stop()``
    is true. ``sub(seconds)`` is a clock with an earlier deadline for one part of the
    work (the trade-off's own budget) that reports to the same callback.
    """

    def __init__(
        self,
        time_limit: float | None = None,
        *,
        progress: Callable[[Progress], object] | None = None,
        should_stop: Callable[[], bool] | None = None,
        start: float | None = None,
        deadline: float | None = None,
    ):
        self.start = time.monotonic() if start is None else start
        if deadline is None:
            deadline = math.inf if time_limit is None else self.start + max(0.0, time_limit)
        self.deadline = deadline
        self.progress = progress
        self.should_stop = should_stop
        self.stage = 0
        self.phase = "starting"
        self.best_score: float | None = None
        self.best_pieces: int | None = None
        self.stopped = False
        self._last = -math.inf

    def elapsed(self) -> float:
        return time.monotonic() - self.start

    def remaining(self) -> float:
        return self.deadline - time.monotonic()

    def sub(self, seconds: float) -> Clock:
        """A clock for part of the work: stops at ``seconds`` from now or at this one's end."""
        child = Clock(
            progress=self.progress,
            should_stop=self.should_stop,
            start=self.start,
            deadline=min(self.deadline, time.monotonic() + max(0.0, seconds)),
        )
        child.stage, child.phase = self.stage, self.phase
        child.best_score, child.best_pieces = self.best_score, self.best_pieces
        return child

    def at(self, stage: int, phase: str) -> None:
        """Say what the search is doing now (reported with the next check)."""
        self.stage, self.phase = stage, phase
        self.check()

    def found(self, score: float, pieces: int) -> None:
        """Record the best candidate so far (the caller decides what "best" is)."""
        self.best_score, self.best_pieces = float(score), int(pieces)

    def check(self) -> None:
        now = time.monotonic()
        if self.progress is not None and now - self._last >= INTERVAL:
            self._last = now
            self.progress(
                Progress(
                    self.stage, self.phase, now - self.start, self.best_score, self.best_pieces
                )
            )
        if self.stopped or now >= self.deadline or (self.should_stop and self.should_stop()):
            self.stopped = True
            raise Stopped
