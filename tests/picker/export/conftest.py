"""Fixtures of the export and build tests."""

from __future__ import annotations

import pytest

from tests.picker.export.helpers import STOCK_TEXT


@pytest.fixture
def stock_file(tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_bytes(STOCK_TEXT.encode("utf-8"))
    return path
