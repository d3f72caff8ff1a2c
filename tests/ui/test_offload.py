"""The child-process lanes behind the UI's workers: a newer job kills the older."""

from __future__ import annotations

import threading
import time

import pytest

from picker.ui import offload
from picker.ui.offload import Cancelled, JobError, Lane


@pytest.fixture(scope="module", autouse=True)
def _server():
    offload.start()


def test_a_newer_job_kills_the_running_one():
    lane = Lane("test")
    outcome = {}

    def slow():
        try:
            lane.run(time.sleep, 60)
            outcome["slow"] = "finished"
        except Cancelled:
            outcome["slow"] = "cancelled"

    thread = threading.Thread(target=slow)
    thread.start()
    for _ in range(400):  # until the slow job's process is running
        proc = lane._proc
        if proc is not None and proc.is_alive():
            break
        time.sleep(0.025)
    t0 = time.monotonic()
    assert lane.run(abs, -3) == 3
    thread.join(timeout=20)
    assert outcome == {"slow": "cancelled"}
    assert time.monotonic() - t0 < 20  # nobody waited for the 60 s sleep


def test_errors_come_back_as_text_and_cancel_is_quiet():
    lane = Lane("test")
    with pytest.raises(JobError, match="ValueError: invalid literal"):
        lane.run(int, "x")
    lane.cancel()  # nothing running: no effect
    assert lane.run(max, [2, 7, 3]) == 7
