"""Build records beside the stock file: kept bytes, states, numbering, atomic files."""

from __future__ import annotations

import hashlib

import pytest

from stock import ledger
from stock.errors import StockEditError

BEFORE = b'# my drawers\r\n[[resistor]]\r\nvalue = "4k7"  \r\nqty = 3\r\n\xc2\xb5 ok\r\n'


@pytest.fixture
def stock_path(tmp_path):
    p = tmp_path / "inventory.toml"
    p.write_bytes(BEFORE)
    return p


def test_folder_beside_the_stock_file(stock_path):
    assert ledger.ledger_dir(stock_path) == stock_path.parent / ".inventory.toml.builds"
    assert ledger.records(stock_path) == []
    assert ledger.last_build(stock_path) is None


def test_begin_keeps_exact_bytes_and_a_pending_record(stock_path, tmp_path):
    rec = ledger.begin(
        stock_path, BEFORE, design=tmp_path / "d.toml", summary=["resistor 4k7 from A1: take 2"]
    )
    assert rec.number == 1 and rec.state == "pending"
    assert rec.before_path.read_bytes() == BEFORE  # CRLF, spaces, UTF-8 kept
    assert rec.sha256_before == hashlib.sha256(BEFORE).hexdigest()
    assert ledger.before_bytes(rec) == BEFORE
    (back,) = ledger.records(stock_path)
    assert back == rec
    assert back.design == str((tmp_path / "d.toml").resolve())
    assert back.summary == ("resistor 4k7 from A1: take 2",)


def test_finish_undone_and_last_build(stock_path):
    first = ledger.finish(ledger.begin(stock_path, BEFORE), "aa" * 32)
    second = ledger.finish(ledger.begin(stock_path, b"later\n"), "bb" * 32)
    assert (first.number, second.number) == (1, 2)
    assert ledger.last_build(stock_path) == second
    ledger.mark_undone(second)
    assert ledger.last_build(stock_path) == first
    states = [(r.number, r.state) for r in ledger.records(stock_path)]
    assert states == [(1, "done"), (2, "undone")]
    assert ledger.records(stock_path)[1].undone_time is not None
    ledger.mark_undone(first)
    assert ledger.last_build(stock_path) is None


def test_discard_removes_both_files_and_numbers_move_on(stock_path):
    rec = ledger.begin(stock_path, BEFORE)
    ledger.discard(rec)
    assert not rec.path.exists() and not rec.before_path.exists()
    assert ledger.records(stock_path) == []
    a = ledger.begin(stock_path, BEFORE)
    b = ledger.begin(stock_path, BEFORE)
    assert (a.number, b.number) == (1, 2)


def test_a_claimed_number_is_never_reused(stock_path):
    folder = ledger.ledger_dir(stock_path)
    folder.mkdir()
    (folder / "build-0001.before").write_bytes(b"claimed by another build in progress")
    rec = ledger.begin(stock_path, BEFORE)
    assert rec.number == 2


def test_tampered_copy_is_refused(stock_path):
    rec = ledger.finish(ledger.begin(stock_path, BEFORE), "aa" * 32)
    rec.before_path.write_bytes(BEFORE + b"x")
    with pytest.raises(StockEditError, match="does not match its record build-0001.toml"):
        ledger.before_bytes(rec)


def test_unreadable_record_named(stock_path):
    rec = ledger.begin(stock_path, BEFORE)
    rec.path.write_text("state = = 1\n", encoding="utf-8")
    with pytest.raises(
        StockEditError, match="build-0001.toml:1: unreadable build record: TOML syntax"
    ):
        ledger.records(stock_path)


def test_no_temporary_files_left(stock_path):
    ledger.finish(ledger.begin(stock_path, BEFORE), "aa" * 32)
    names = sorted(p.name for p in ledger.ledger_dir(stock_path).iterdir())
    assert names == ["build-0001.before", "build-0001.toml"]
