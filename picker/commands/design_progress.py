"""The live status line of ``picker design`` on stderr (docs/search.md, "Cost").

While a search works, :class:`StatusLine` draws one line on stderr: the stage, what the
search is doing, the time so far and the best candidate found so far. It draws only
when stderr is a terminal, only once the work has taken :data:`DELAY` seconds (a quick
answer shows no flicker), never under ``--json``, and it erases itself when the search
ends, so the report that follows starts on a clean line. Records come from
:class:`picker.search.progress.Clock` through ``search(..., progress=...)``.
"""

from __future__ import annotations

import sys
from typing import IO, Any

DELAY = 0.5  # seconds of work before the line appears


def describe(record) -> str:
    """One line in words for a :class:`picker.search.progress.Progress` record."""
    where = f"stage {record.stage}" if record.stage else "all stages"
    line = f"searching: {where}, {record.phase}, {record.elapsed_s:.1f} s"
    if record.best_score is not None:
        line += f"; best so far {record.best_score * 100:.3g} % worst error"
        if record.best_pieces is not None:
            line += f" with {record.best_pieces} pieces"
    return line


class StatusLine:
    """Context manager; its :meth:`update` is the ``progress`` callback of a search.

    ``enabled``: None decides from the stream (a terminal: yes); False never draws.
    ``stream``: where to draw (default stderr); ``console``: a rich Console to use
    instead (tests)."""

    def __init__(
        self,
        *,
        enabled: bool | None = None,
        stream: IO[str] | None = None,
        console: Any = None,
        delay: float = DELAY,
    ):
        self.stream = sys.stderr if stream is None else stream
        if enabled is None:
            enabled = console is not None or _is_terminal(self.stream)
        self.enabled = bool(enabled)
        self.console = console
        self.delay = delay
        self.live: Any = None
        self.shown = 0  # lines drawn (tests read it)

    def __enter__(self) -> StatusLine:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def update(self, record) -> None:
        if not self.enabled or record.elapsed_s < self.delay:
            return
        from rich.text import Text

        text = Text(describe(record), style="dim", no_wrap=True, overflow="ellipsis")
        if self.live is None:
            from rich.console import Console
            from rich.live import Live

            console = self.console or Console(file=self.stream, stderr=self.stream is sys.stderr)
            self.live = Live(text, console=console, auto_refresh=False, transient=True)
            self.live.start()
        self.live.update(text, refresh=True)
        self.shown += 1

    def close(self) -> None:
        if self.live is not None:
            self.live.stop()
            self.live = None


def _is_terminal(stream) -> bool:
    try:
        return bool(stream.isatty())
    except (AttributeError, ValueError, OSError):
        return False


def status_line(*, json: bool = False) -> StatusLine:
    """The status line for one ``picker design`` run: off under ``--json`` or a pipe."""
    return StatusLine(enabled=False if json else None)
