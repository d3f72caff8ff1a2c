"""Fixtures of the export and build tests."""

from __future__ import annotations

import pytest

from picker.export import load_design, save_design
from tests.picker.export.helpers import REQUEST, STOCK_TEXT, stock_records, two_stage_candidate


@pytest.fixture
def stock_file(tmp_path):
    path = tmp_path / "inventory.toml"
    path.write_bytes(STOCK_TEXT.encode("utf-8"))
    return path


@pytest.fixture
def saved_two_stage(tmp_path):
    """(SavedDesign, Candidate, path) of the helpers' two-stage design, saved and read back."""
    stock = stock_records(path=tmp_path / "inventory.toml", sha="00" * 32)
    cand = two_stage_candidate(stock)
    path = tmp_path / "d.toml"
    save_design(path, candidate=cand, request=REQUEST, stock=stock)
    return load_design(path), cand, path
