"""Per-reference BOM against the design (one row per physical piece, named as the netlist
names it), and the --json of bom, build, undo and stock check."""

from __future__ import annotations

import csv
import hashlib
import io
import json
import re

import pytest

from picker.cli import main
from picker.export import save_design, spice_netlist
from picker.export.bom import CSV_PER_REFERENCE_HEADER, reference_csv, reference_rows
from stock.file import load
from tests.picker.export.helpers import REQUEST, two_stage_candidate


@pytest.fixture
def two_stage(saved_two_stage):
    return saved_two_stage


def test_one_row_per_piece_of_the_candidate(two_stage):
    design, cand, _ = two_stage
    rows = [r for r in reference_rows(design) if r.kind != "opamp"]
    want = []
    for s, stage in enumerate(cand.stages, start=1):
        for name, arr in stage.positions:
            for k, piece in enumerate(arr.parts):
                suffix = "" if arr.arrangement == "single" else "ab"[k]
                want.append((f"{name}_S{s}{suffix}", piece.line.location, piece.line.tolerance))
    assert [(r.reference, r.location) for r in rows] == [(w[0], w[1]) for w in want]
    assert len(rows) == cand.pieces == 7
    assert [r.tolerance for r in rows] == [f"{w[2] * 100:.3g}%" for w in want]
    by_ref = {r.reference: r for r in rows}
    # the helpers' design: R1 = 7k5 + 470R in series, R2 = 15k + the measured 910R piece
    assert by_ref["R1_S1a"].value == "7k5" and by_ref["R1_S1b"].value == "470R"
    assert by_ref["R2_S1b"].measured == "908R5" and by_ref["R2_S1b"].value == "910R"
    assert by_ref["R1_S2"].note == "" and by_ref["R1_S1a"].note == "series pair"


def test_references_are_the_netlist_names(two_stage):
    design, _, _ = two_stage
    netlist = spice_netlist(design)
    elements = {line.split()[0] for line in netlist.splitlines() if re.match(r"[RC]\w+_S\d", line)}
    refs = {r.reference for r in reference_rows(design) if r.kind != "opamp"}
    assert refs == elements
    opamps = {r.reference for r in reference_rows(design) if r.kind == "opamp"}
    assert {"X" + u for u in opamps} == {
        line.split()[0] for line in netlist.splitlines() if line.startswith("XU")
    }


def test_opamp_channels_and_packages(two_stage):
    design, _, _ = two_stage
    oa = [r for r in reference_rows(design) if r.kind == "opamp"]
    # a dual op amp (2 channels) carries both stages: package 1, channels 1 and 2
    assert [(r.reference, r.note) for r in oa] == [
        ("U1_S1", "package 1, channel 1 of 2"),
        ("U1_S2", "package 1, channel 2 of 2"),
    ]


def test_per_reference_csv_parses_back(two_stage):
    design, _, _ = two_stage
    text = reference_csv(design)
    assert text.endswith("\r\n")  # RFC 4180 section 2: CRLF line breaks
    parsed = list(csv.reader(io.StringIO(text, newline="")))
    assert tuple(parsed[0]) == CSV_PER_REFERENCE_HEADER
    rows = reference_rows(design)
    assert [p[0] for p in parsed[1:]] == [r.reference for r in rows]
    assert '"A1, left"' in text


def test_bom_command_per_reference_and_json(two_stage, capsys):
    design, cand, path = two_stage
    assert main(["bom", str(path), "--csv", "--per-reference"]) == 0
    assert capsys.readouterr().out == reference_csv(design)
    assert main(["bom", str(path), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert sum(r["count"] for r in doc["bom"] if r["kind"] != "opamp") == cand.pieces
    assert sum(len(g["rows"]) for g in doc["pick_list"]) == len(doc["bom"])
    assert [r["reference"] for r in doc["references"]] == [
        r.reference for r in reference_rows(design)
    ]
    assert main(["bom", str(path), "--per-reference"]) == 2
    assert "goes with --csv" in capsys.readouterr().err


def test_build_and_undo_json(tmp_path, stock_file, capsys):
    stock = load(stock_file)
    path = tmp_path / "design.toml"
    save_design(path, candidate=two_stage_candidate(stock), request=REQUEST, stock=stock)
    before = stock_file.read_bytes()
    assert main(["build", str(path), "--stock", str(stock_file), "--json"]) == 2
    assert "add --yes" in capsys.readouterr().err and stock_file.read_bytes() == before
    assert main(["build", str(path), "--stock", str(stock_file), "--json", "--yes"]) == 0
    doc = json.loads(capsys.readouterr().out)
    # 7 pieces and one dual op-amp package (ceil(2 stages / 2 channels))
    assert doc["taken"] == 8 and doc["stock"] == str(stock_file)
    assert doc["sha256_after"] == hashlib.sha256(stock_file.read_bytes()).hexdigest()
    assert main(["undo", "--stock", str(stock_file), "--json", "--yes"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["undone_build"] == 1 and stock_file.read_bytes() == before
    assert doc["sha256_restored"] == hashlib.sha256(before).hexdigest()


def test_stock_check_json(stock_file, tmp_path, capsys):
    assert main(["stock", "check", str(stock_file), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["ok"] is True and doc["lines"] == {"resistor": 4, "capacitor": 2, "opamp": 1}
    bad = tmp_path / "bad.toml"
    bad.write_text('[[resistor]]\nvalue = "10"\nqty = -1\n', encoding="utf-8")
    assert main(["stock", "check", str(bad), "--json"]) == 2
    doc = json.loads(capsys.readouterr().out)
    assert doc["ok"] is False and any(":3:" in e and "qty" in e for e in doc["errors"])


def test_version(capsys):
    from importlib.metadata import version

    with pytest.raises(SystemExit) as exc:
        main(["--version"])
    assert exc.value.code == 0
    assert capsys.readouterr().out == f"picker {version('picker')}\n"
