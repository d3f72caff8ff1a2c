"""BOM and pick list: counts against the design, CSV that parses back (RFC 4180)."""

from __future__ import annotations

import csv
import io
from collections import Counter

import pytest

from picker.export import (
    bom_csv,
    bom_rows,
    load_design,
    pick_count,
    pick_list,
    pick_list_lines,
    save_design,
)
from picker.export.bom import CSV_HEADER
from picker.parts import Piece
from tests.picker.export.helpers import (
    REQUEST,
    lowpass_candidate,
    stock_records,
)


@pytest.fixture
def two_stage(saved_two_stage):
    return saved_two_stage[:2]


def test_counts_match_the_candidate_pieces(two_stage):
    design, cand = two_stage
    rows = bom_rows(design)
    want = Counter(
        (p.kind, p.line.index) for st in cand.stages for _, arr in st.positions for p in arr.parts
    )
    got = {(r.kind, r.index): r.count for r in rows if r.kind != "opamp"}
    assert got == dict(want)
    assert sum(got.values()) == cand.pieces == 7
    (oa,) = [r for r in rows if r.kind == "opamp"]
    assert oa.count == 1  # two stages on one dual package: ceil(2 / 2)
    assert oa.positions == "stages 1, 2"


def test_rows_name_values_locations_positions(two_stage):
    design, _ = two_stage
    by_value = {r.value: r for r in bom_rows(design) if r.kind != "opamp"}
    # values in RKM code (IEC 60062)
    assert set(by_value) == {"470R", "910R", "7k5", "15k", "10n"}
    assert by_value["15k"].positions == "R2a (stage 1); R1 (stage 2)"
    assert by_value["15k"].count == 2 and by_value["15k"].location == "A1, left"
    assert by_value["10n"].positions == "C1 (stage 1); C1 (stage 2)"
    assert by_value["910R"].measured == ("908R5",)
    assert by_value["910R"].tolerance == "1%"
    assert by_value["470R"].tolerance == "5%"
    order = [r.value for r in bom_rows(design)]
    assert order == ["470R", "910R", "7k5", "15k", "10n", "dual JFET-input"]


def test_single_stage_positions_have_no_stage_suffix(tmp_path):
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    save_design(
        tmp_path / "d.toml", candidate=lowpass_candidate(stock), request=REQUEST, stock=stock
    )
    rows = bom_rows(load_design(tmp_path / "d.toml"))
    assert [r.positions for r in rows] == ["R1b", "R2b", "R1a", "R2a", "C1", "stage 1"]


def test_csv_parses_back_rfc4180(two_stage):
    design, _ = two_stage
    text = bom_csv(design)
    # RFC 4180 section 2: CRLF line breaks, a field with a comma is enclosed in quotes
    assert text.endswith("\r\n") and "\n" not in text.replace("\r\n", "")
    assert '"A1, left"' in text
    parsed = list(csv.reader(io.StringIO(text, newline="")))
    assert tuple(parsed[0]) == CSV_HEADER
    body = parsed[1:]
    rows = bom_rows(design)
    assert len(body) == len(rows)
    for fields, row in zip(body, rows, strict=False):
        rec = dict(zip(CSV_HEADER, fields, strict=False))
        assert rec["kind"] == row.kind and rec["value"] == row.value
        assert rec["location"] == (row.location or "")
        assert int(rec["count"]) == row.count and rec["positions"] == row.positions
    rec = dict(zip(CSV_HEADER, body[3], strict=False))
    assert rec["location"] == "A1, left" and rec["positions"] == "R2a (stage 1); R1 (stage 2)"


def test_pick_list_groups_by_drawer_in_natural_order(two_stage):
    design, cand = two_stage
    groups = pick_list(design)
    assert [g.label for g in groups] == ["A1, left", "A2", "A10", "C1", "IC tray"]
    a2 = groups[1]
    assert [r.value for r in a2.rows] == ["470R", "910R"]
    assert pick_count(groups) == cand.pieces + 1
    text = "\n".join(pick_list_lines(groups))
    assert "A2:\n  take 1 x resistor 470R 5%  for R1b (stage 1)" in text
    assert "measured 908R5" in text


def test_pick_list_without_location_last(tmp_path):
    from dataclasses import replace

    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    stock = replace(
        stock, capacitors=(replace(stock.capacitors[0], location=None),) + stock.capacitors[1:]
    )
    save_design(
        tmp_path / "d.toml", candidate=lowpass_candidate(stock), request=REQUEST, stock=stock
    )
    groups = pick_list(load_design(tmp_path / "d.toml"))
    assert groups[-1].location is None and groups[-1].label == "(no location)"
    assert groups[-1].rows[0].value == "10n"


def test_measured_only_row_shows_the_line_tolerance(tmp_path):
    from dataclasses import replace

    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    r910 = replace(stock.resistors[1], tolerance=0.05, meter=0.005)
    stock = replace(stock, resistors=(stock.resistors[0], r910) + stock.resistors[2:])
    cand = lowpass_candidate(stock)  # takes the measured 910R piece only
    stage = cand.stages[0]
    r2 = stage.positions[1][1]
    pieces = (r2.parts[0], replace(r2.parts[1], line=r910, tolerance=0.005))
    stage = replace(
        stage, positions=(stage.positions[0], ("R2", replace(r2, parts=pieces)), stage.positions[2])
    )
    save_design(
        tmp_path / "d.toml", candidate=replace(cand, stages=(stage,)), request=REQUEST, stock=stock
    )
    design = load_design(tmp_path / "d.toml")
    (row,) = [r for r in bom_rows(design) if r.value == "910R"]
    assert row.tolerance == "5%" and row.measured == ("908R5",)
    assert design.stages[0].positions[1].parts[1].tolerance == 0.005


def test_measured_piece_has_its_own_row_beside_its_position(tmp_path):
    # one 910R line (qty 2, one piece measured at 908.5 ohm): R1b takes a plain piece,
    # R2b the measured one; the reading must stand beside R2b only
    from dataclasses import replace

    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    r910 = stock.resistors[1]
    cand = lowpass_candidate(stock)
    stage = cand.stages[0]
    r1 = stage.positions[0][1]
    plain = Piece(r910, 910.0, 0.01)
    stage = replace(
        stage, positions=(("R1", replace(r1, parts=(r1.parts[0], plain))),) + stage.positions[1:]
    )
    save_design(
        tmp_path / "d.toml", candidate=replace(cand, stages=(stage,)), request=REQUEST, stock=stock
    )
    design = load_design(tmp_path / "d.toml")
    rows = [(r.positions, r.count, r.measured) for r in bom_rows(design) if r.value == "910R"]
    assert rows == [("R1b", 1, ()), ("R2b", 1, ("908R5",))]
    csv_lines = bom_csv(design).splitlines()
    assert "resistor,910R,1%,A2,1,R1b," in csv_lines
    assert "resistor,910R,1%,A2,1,R2b,908R5" in csv_lines
