"""The status line of ``picker design`` (picker.commands.design_progress): shown on a
terminal once the work passes the delay, erased at the end, never on a pipe."""

from __future__ import annotations

import io

from rich.console import Console

from picker.commands.design_progress import StatusLine, describe, status_line
from picker.search.progress import Progress


def _terminal():
    buf = io.StringIO()
    return buf, Console(file=buf, force_terminal=True, width=100, color_system=None)


def test_a_quick_search_draws_nothing():
    buf, console = _terminal()
    with StatusLine(console=console) as line:
        line.update(Progress(1, "stage values", 0.2))
    assert line.shown == 0 and buf.getvalue() == ""


def test_a_long_search_draws_the_stage_phase_time_and_best_then_erases_it():
    buf, console = _terminal()
    with StatusLine(console=console) as line:
        line.update(Progress(2, "stage values", 0.7))
        line.update(Progress(0, "joint allocation", 1.4, 0.00123, 9))
    out = buf.getvalue()
    assert line.shown == 2
    assert "stage 2, stage values, 0.7 s" in out
    assert (
        "all stages, joint allocation, 1.4 s; best so far 0.123 % worst error with 9 pieces" in out
    )
    assert out.endswith("\x1b[2K") or "\x1b[2K" in out.splitlines()[-1]  # erased at the end


def test_a_pipe_gets_nothing():
    pipe = io.StringIO()  # not a terminal
    with StatusLine(stream=pipe) as line:
        line.update(Progress(1, "stage values", 5.0))
    assert not line.enabled and pipe.getvalue() == ""


def test_json_turns_it_off():
    assert not status_line(json=True).enabled


def test_describe_without_a_candidate_yet():
    assert describe(Progress(1, "stage values", 3.25)) == "searching: stage 1, stage values, 3.2 s"
