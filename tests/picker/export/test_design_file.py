"""Saved design: written whole, read back equal, bad files refused with file and key named."""

from __future__ import annotations

import os
import stat
import tomllib
from pathlib import Path

import pytest

from picker.errors import DesignError
from picker.export import load_design, save_design
from stock.file import load
from tests.picker.export.helpers import (
    REQUEST,
    STOCK_TEXT,
    lowpass_candidate,
    stock_records,
    two_stage_candidate,
)


def _saved(tmp_path, candidate=None, name="design.toml"):
    stock = stock_records(path=tmp_path / "inventory.toml", sha="ab" * 32)
    path = tmp_path / name
    save_design(path, candidate=candidate or lowpass_candidate(stock), request=REQUEST, stock=stock)
    return path, stock


def test_round_trip_keeps_every_part(tmp_path):
    path, stock = _saved(tmp_path)
    cand = lowpass_candidate(stock)
    d = load_design(path)
    assert d.path == path
    assert d.score == pytest.approx(cand.score, rel=1e-15)
    assert d.pieces == 5
    assert d.stock_path == (tmp_path / "inventory.toml").resolve()
    assert d.stock_path.is_absolute()
    assert d.stock_sha256 == "ab" * 32
    assert d.opamp.name == "dual JFET-input" and d.opamp.gbw_hz == 3e6
    assert d.opamp.index == 0 and d.opamp.channels == 2 and d.opamp.location == "IC tray"
    (stage,) = d.stages
    (orig,) = cand.stages
    assert stage.topology == "inverting-lowpass"
    assert stage.target == orig.target and stage.achieved == orig.achieved
    assert [p.name for p in stage.positions] == ["R1", "R2", "C1"]
    for pos, (_name, arr) in zip(stage.positions, orig.positions, strict=False):
        assert pos.arrangement == arr.arrangement
        assert pos.value == arr.value
        for part, piece in zip(pos.parts, arr.parts, strict=False):
            assert (part.kind, part.index, part.line) == (
                piece.kind,
                piece.line.index,
                piece.line.line,
            )
            assert part.nominal == piece.line.value and part.value == piece.value
            assert part.measured == piece.measured and part.tolerance == piece.tolerance
            assert part.location == piece.location
    r2b = stage.positions[1].parts[1]
    assert (r2b.measured, r2b.value, r2b.nominal) == (0, 908.5, 910.0)


def test_request_kept_as_given_without_nones(tmp_path):
    path, _ = _saved(tmp_path)
    d = load_design(path)
    assert d.request["type"] == "lowpass" and d.request["fc_hz"] == 1000.0
    assert d.request["bounds"] == {"r_min": 1e3, "r_max": 1e6}
    assert "q" not in d.request and "ripple_db" not in d.request  # None is left out
    with pytest.raises(TypeError):
        d.request["type"] = "highpass"  # read-only


def test_file_is_plain_toml_with_format_version(tmp_path):
    path, _ = _saved(tmp_path)
    doc = tomllib.loads(path.read_text(encoding="utf-8"))
    assert doc["format"] == 1
    assert doc["candidate"]["stage"][0]["position"][1]["part"][1]["measured"] == 0
    assert "measured" not in doc["candidate"]["stage"][0]["position"][0]["part"][0]


def test_overwrite_keeps_mode_and_leaves_no_temp_file(tmp_path):
    path, stock = _saved(tmp_path)
    os.chmod(path, 0o640)
    save_design(path, candidate=two_stage_candidate(stock), request=REQUEST, stock=stock)
    assert stat.S_IMODE(path.stat().st_mode) == 0o640
    assert len(load_design(path).stages) == 2
    assert sorted(p.name for p in tmp_path.iterdir()) == ["design.toml"]


def _edit(path, old, new):
    text = path.read_text(encoding="utf-8")
    assert old in text
    path.write_text(text.replace(old, new, 1), encoding="utf-8")


@pytest.mark.parametrize(
    "old, new, words",
    [
        (
            'arrangement = "series"',
            'arrangement = "stacked"',
            "candidate.stage[0].position[0].arrangement: 'stacked' is not one of",
        ),
        (
            'kind = "resistor"',
            'kind = "inductor"',
            "candidate.stage[0].position[0].part[0].kind: 'inductor'",
        ),
        ("pieces = 5", "pieces = 4", "candidate.pieces: says 4 but the stages hold 5"),
        ("pieces = 5", 'pieces = "five"', "candidate.pieces: expected a whole number, got 'five'"),
        ("format = 1", "format = 7", "format: this picker reads design format 1"),
        (
            "value = 7970.0",
            "value = 8000.0",
            "candidate.stage[0].position[0].value: '8000.0' does not match",
        ),
        ("tolerance = 0.05", "tolerance = 5.0", "part[1].tolerance: '5.0' is not a fraction"),
        ('topology = "inverting-lowpass"\n', "\n", "candidate.stage[0].topology: missing"),
        (
            "[candidate.stage.target]\nf0_hz = 1000.0",
            "[candidate.stage.target]\nf0_hz = -1.0",
            "candidate.stage[0].target.f0_hz: must be above zero",
        ),
        ("measured = 0", "measured = -1", "part[1].measured: must be 0 .. 10,000,000, got '-1'"),
        # a circuit picker does not know could be built and billed but never checked
        (
            'topology = "inverting-lowpass"',
            'topology = "twin-t"',
            "candidate.stage[0].topology: 'twin-t' is not a circuit this picker knows",
        ),
        (
            'topology = "inverting-lowpass"',
            'topology = "mfb-lowpass"',
            "candidate.stage[0].position: mfb-lowpass has positions",
        ),
        (
            'name = "C1"',
            'name = "C9"',
            "inverting-lowpass has positions R1, R2, C1, the file gives",
        ),
    ],
)
def test_bad_files_name_file_and_key(tmp_path, old, new, words):
    path, _ = _saved(tmp_path)
    _edit(path, old, new)
    with pytest.raises(DesignError) as info:
        load_design(path)
    assert str(path) in str(info.value)
    assert words in str(info.value)


def test_same_measured_piece_twice_refused(tmp_path):
    path, _ = _saved(tmp_path)
    text = path.read_text(encoding="utf-8")
    # make R1b the same measured 910R piece that R2b already is
    text = text.replace(
        "index = 3\nline = 24\nnominal = 470.0\nvalue = 470.0\n",
        "index = 1\nline = 11\nnominal = 910.0\nvalue = 908.5\nmeasured = 0\n",
    )
    text = text.replace("value = 7970.0", "value = 8408.5")
    path.write_text(text, encoding="utf-8")
    with pytest.raises(DesignError, match="measured piece 0 of resistor line 1 is used twice"):
        load_design(path)


def test_not_toml_not_utf8_missing(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text("format = = 1\n", encoding="utf-8")
    with pytest.raises(DesignError, match="bad.toml:1: TOML syntax: Invalid value"):
        load_design(bad)
    bad.write_bytes(b"format = 1\n\xff\n")
    with pytest.raises(DesignError, match="bad.toml:2: not UTF-8"):
        load_design(bad)
    with pytest.raises(DesignError, match="nothere.toml: cannot read"):
        load_design(tmp_path / "nothere.toml")


def test_stock_file_given_as_design_says_so(tmp_path):
    # a user passing the stock file where a design goes (picker bom inventory.toml)
    sample = Path(__file__).resolve().parents[3] / "sample_inventory.toml"
    with pytest.raises(
        DesignError,
        match="not a design saved by picker .it looks like a "
        "stock file; save one with: picker design",
    ):
        load_design(sample)
    empty = tmp_path / "empty.toml"
    empty.write_text("", encoding="utf-8")
    with pytest.raises(DesignError, match=r"empty.toml: not a design saved by picker \(save"):
        load_design(empty)


def test_request_values_made_plain(tmp_path):
    from dataclasses import dataclass

    import numpy as np

    @dataclass(frozen=True)
    class Limits:
        r_min: float = 1e3
        r_max: float | None = None

    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    request = {
        "type": "lowpass",
        "bounds": Limits(),
        "temp": (0.0, 70.0),
        "fc_hz": np.float64(1000.0),
        "path": tmp_path,
        "gain": float("inf"),
    }
    save_design(
        tmp_path / "d.toml", candidate=lowpass_candidate(stock), request=request, stock=stock
    )
    req = load_design(tmp_path / "d.toml").request
    assert req["bounds"] == {"r_min": 1e3}
    assert req["temp"] == [0.0, 70.0] and req["fc_hz"] == 1000.0
    assert req["path"] == str(tmp_path) and req["gain"] == "inf"


def test_save_never_replaces_the_stock_a_folder_or_a_foreign_file(tmp_path):
    # `picker design ... --save inventory.toml` must not overwrite the stock file
    stock_file = tmp_path / "inventory.toml"
    stock_file.write_text(STOCK_TEXT, encoding="utf-8")
    stock = load(stock_file)
    before = stock_file.read_bytes()
    cand = lowpass_candidate(stock)
    with pytest.raises(DesignError, match="is the stock file the design came from"):
        save_design(stock_file, candidate=cand, request=REQUEST, stock=stock)
    assert stock_file.read_bytes() == before
    with pytest.raises(DesignError, match="is a folder, not a file name"):
        save_design(tmp_path, candidate=cand, request=REQUEST, stock=stock)
    notes = tmp_path / "notes.toml"
    notes.write_text('title = "my notes"\n', encoding="utf-8")
    with pytest.raises(DesignError, match="exists and is not a design saved by picker"):
        save_design(notes, candidate=cand, request=REQUEST, stock=stock)
    assert notes.read_text(encoding="utf-8") == 'title = "my notes"\n'
    assert sorted(p.name for p in tmp_path.iterdir()) == ["inventory.toml", "notes.toml"]


def test_failed_rename_is_a_design_error_and_leaves_no_temp(tmp_path, monkeypatch):
    path, stock = _saved(tmp_path)
    before = path.read_bytes()

    def refuse(src, dst):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(os, "replace", refuse)
    with pytest.raises(DesignError, match="cannot write the design: No space left"):
        save_design(path, candidate=two_stage_candidate(stock), request=REQUEST, stock=stock)
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["design.toml"]
