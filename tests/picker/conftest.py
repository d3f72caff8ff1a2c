"""Fixtures the CLI tests of tests/picker share."""

import pytest

from tests.helpers import SMALL_STOCK, write_stock


@pytest.fixture
def small(tmp_path):
    """A small stock file (``tests.helpers.SMALL_STOCK``) the test may change."""
    return write_stock(tmp_path, SMALL_STOCK)
