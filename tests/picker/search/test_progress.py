"""The search clock: deadline, stop request and progress reports (picker.search.progress)."""

from __future__ import annotations

import pytest

from picker.search.progress import Clock, Progress, Stopped


def test_a_spent_time_limit_stops_at_the_first_check():
    clock = Clock(0.0)
    with pytest.raises(Stopped):
        clock.check()
    assert clock.stopped


def test_no_limit_never_stops():
    clock = Clock(None)
    for _ in range(1000):
        clock.check()
    assert not clock.stopped


def test_a_stop_request_stops_and_reports_first():
    seen: list[Progress] = []
    asked = {"stop": False}
    clock = Clock(None, progress=seen.append, should_stop=lambda: asked["stop"])
    clock.found(0.0012, 4)
    clock.at(2, "stage values")
    assert seen and seen[-1].stage == 2 and seen[-1].phase == "stage values"
    assert (seen[-1].best_score, seen[-1].best_pieces) == (0.0012, 4)
    asked["stop"] = True
    with pytest.raises(Stopped):
        clock.check()


def test_a_sub_clock_ends_no_later_than_its_parent():
    parent = Clock(0.0)
    child = parent.sub(100.0)
    assert child.deadline <= parent.deadline
    with pytest.raises(Stopped):
        child.check()
