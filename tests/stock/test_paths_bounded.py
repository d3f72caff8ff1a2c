"""Paths are never read without bound (docs/reliability.md): a FIFO, a device, a folder or
a file over 50 MB given as stock, design, --save target or build record is refused at
once with the reason. Run as a user would, in a child process with a time limit, so a
read that blocks fails the test instead of hanging it."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from stock.durable import MAX_BYTES
from tests.picker.export.helpers import STOCK_TEXT


def picker(*args, cwd) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "picker", *map(str, args)],
        capture_output=True,
        text=True,
        cwd=cwd,
        stdin=subprocess.DEVNULL,
        timeout=120,  # a guard against a hang, not a wait: each run takes about a second
    )


@pytest.fixture
def fifo(tmp_path) -> Path:
    path = tmp_path / "pipe.toml"
    os.mkfifo(path)
    return path


@pytest.fixture
def huge(tmp_path) -> Path:
    path = tmp_path / "huge.toml"
    with open(path, "wb") as fh:
        fh.truncate(MAX_BYTES + 1)  # sparse: no disk used
    return path


def _refused(proc, why: str):
    assert proc.returncode == 2, proc.stderr
    assert why in proc.stderr and "Traceback" not in proc.stderr


@pytest.mark.parametrize("which", ["fifo", "huge", "folder", "device"])
def test_stock_check_refuses_at_once(tmp_path, fifo, huge, which):
    path = {"fifo": fifo, "huge": huge, "folder": tmp_path, "device": Path("/dev/zero")}[which]
    why = {
        "fifo": "is a FIFO (named pipe), not a file",
        "huge": "MB, more than the 50 MB picker reads",
        "folder": "is a folder, not a file",
        "device": "is a device, not a file",
    }[which]
    _refused(picker("stock", "check", path, cwd=tmp_path), why)


def test_adjust_bom_and_save_refuse_a_fifo(tmp_path, fifo):
    adjust = picker(
        "stock",
        "adjust",
        "--stock",
        fifo,
        "--kind",
        "r",
        "--value",
        "1k",
        "--by",
        "1",
        cwd=tmp_path,
    )
    _refused(adjust, "is a FIFO (named pipe), not a file")
    _refused(picker("bom", fifo, cwd=tmp_path), "is a FIFO (named pipe), not a file")
    stock = tmp_path / "inventory.toml"
    stock.write_text(STOCK_TEXT, encoding="utf-8")
    save = picker(
        "design", "lowpass", "--fc", "1k", "--order", "1", "--stock", stock, "--save", fifo,
        cwd=tmp_path,
    )  # fmt: skip
    _refused(save, "is a FIFO (named pipe), not a file")


def test_a_fifo_among_the_build_records_is_refused(tmp_path):
    stock = tmp_path / "inventory.toml"
    stock.write_text(STOCK_TEXT, encoding="utf-8")
    records = tmp_path / ".inventory.toml.builds"
    records.mkdir()
    os.mkfifo(records / "build-0001.toml")
    _refused(picker("undo", "--stock", stock, "--yes", cwd=tmp_path), "is a FIFO (named pipe)")
