"""The SPICE text itself: names, nodes, the op-amp model numbers, the sweep."""

from __future__ import annotations

import math
import re

import pytest

from picker.export import load_design, save_design, spice_netlist
from picker.export.netlist import sweep_range
from tests.picker.export.helpers import REQUEST, stock_records, two_stage_candidate


@pytest.fixture
def text(tmp_path):
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    save_design(
        tmp_path / "d.toml", candidate=two_stage_candidate(stock), request=REQUEST, stock=stock
    )
    return spice_netlist(load_design(tmp_path / "d.toml"))


def _elements(text):
    return [
        ln.split()
        for ln in text.splitlines()[1:]
        if ln and not ln.startswith(("*", ".")) and not ln.startswith(("G1", "Rp", "Cp", "E1"))
    ]


def test_source_nodes_and_names(text):
    lines = text.splitlines()
    assert not lines[0].startswith("*") and "lowpass" in lines[0]  # SPICE title line
    assert "V1 in 0 DC 0 AC 1" in lines
    assert lines[-1] == ".end"
    els = _elements(text)
    names = [e[0] for e in els]
    assert len({n.upper() for n in names}) == len(names)  # SPICE ignores case
    assert {
        "R1_S1a",
        "R1_S1b",
        "R2_S1a",
        "R2_S1b",
        "C1_S1",
        "XU1_S1",
        "R1_S2",
        "C1_S2",
        "XU1_S2",
    } <= set(names)
    by = {e[0]: e for e in els}
    assert by["R1_S1a"][1:] == ["in", "s1_R1_mid", "7500"]  # series pair meets
    assert by["R1_S1b"][1:3] == ["s1_R1_mid", "s1_n"]
    assert by["R2_S1b"][3] == "908.5"  # the measured reading
    assert by["XU1_S1"][3] == "s1_out" and by["XU1_S2"][3] == "out"  # cascade
    assert by["R1_S2"][1] == "s1_out"
    assert "* R2_S1b = stage 1 R2b: 908R5 (measured piece 0), 1%, drawer A2" in text


def test_opamp_model_numbers(text):
    # single pole: A0 * fp = GBW with fp = 1 / (2 pi Rp Cp) and A0 = gm * Rp (common practice)
    rp = float(re.search(r"^Rp pole 0 (\S+)$", text, re.M).group(1))
    cp = float(re.search(r"^Cp pole 0 (\S+)$", text, re.M).group(1))
    gm = float(re.search(r"^G1 0 pole inp inn (\S+)$", text, re.M).group(1))
    a0 = gm * rp
    fp = 1 / (2 * math.pi * rp * cp)
    assert a0 == pytest.approx(2e5)
    assert a0 * fp == pytest.approx(3e6, rel=1e-6)


def test_sweep_spans_the_stages(text):
    m = re.search(r"^\.ac dec (\d+) (\S+) (\S+)$", text, re.M)
    lo, hi = float(m.group(2)), float(m.group(3))
    assert lo <= 1000 / 100 and hi >= 1061 * 100
    assert ".print ac vdb(out) vp(out)" in text


def test_sweep_range_whole_decades(tmp_path):
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    save_design(
        tmp_path / "d.toml", candidate=two_stage_candidate(stock), request=REQUEST, stock=stock
    )
    assert sweep_range(load_design(tmp_path / "d.toml")) == (10.0, 1e6)
