"""Fixtures of the UI tests: a private copy of a small stock file, a fixed environment."""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

DATA = Path(__file__).parent / "data"


@pytest.fixture(autouse=True)
def _plain_environment(monkeypatch):
    """Snapshots and colour must not depend on the caller's NO_COLOR or colour settings."""
    monkeypatch.delenv("NO_COLOR", raising=False)
    monkeypatch.delenv("TEXTUAL_COLOR_SYSTEM", raising=False)


@pytest.fixture
def stock_copy(tmp_path) -> Path:
    """A copy of tests/ui/data/small_stock.toml the test may change."""
    path = tmp_path / "inventory.toml"
    shutil.copyfile(DATA / "small_stock.toml", path)
    return path
