"""``picker analyse`` / ``picker substitute`` from the command line: exit codes, JSON, help
with the safety cautions, and a saved repair taken through bom, netlist, build and undo
on a copy of the sample stock."""

from __future__ import annotations

import json
import math
import shutil
import subprocess
import tomllib
from pathlib import Path

import pytest

from picker.cli import main
from picker.filters import REGISTRY

ROOT = Path(__file__).resolve().parents[3]
SK = ["sallen-key-lowpass", "R1=10k", "R2=10k", "C1=22n", "C2=10n"]


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture
def bench(tmp_path, monkeypatch):
    """A copy of the bundled sample stock as ./inventory.toml in a fresh folder."""
    path = tmp_path / "inventory.toml"
    shutil.copyfile(ROOT / "sample_inventory.toml", path)
    monkeypatch.chdir(tmp_path)
    return path


def test_list_names_every_topology_with_positions(capsys):
    code, out, _ = run(capsys, "analyse", "--list")
    assert code == 0
    for key, topo in REGISTRY.items():
        assert f"{key}: " in out
        for p in topo.positions:
            assert f"    {p.name:<3} {p.kind}" in out


@pytest.mark.parametrize(
    "argv, words",
    [
        (["analyse", "sallen-key-notch", "R1=1k"], ["unknown topology", "mfb-bandpass"]),
        (["analyse", *SK[:4], "C3=1n"], ["no position 'C3'", "C2 (capacitor to ground)"]),
        (["analyse", *SK[:4]], ["no value for C2"]),
        (["analyse", *SK[:4], "C2=ten"], ["C2=ten", "cannot read value"]),
        (["analyse", *SK, "--gbw", "fast"], ["cannot read a frequency 'fast'"]),
        (["analyse"], ["give one of", "--list"]),
        (["analyse", *SK, "--stage", " ".join(SK)], ["give one of"]),
        (["analyse", "--stage", "mfb-lowpass R1=1k"], ["no value for"]),
        (["analyse", "--design", "missing.toml"], ["missing.toml", "cannot read"]),
        (["substitute", *SK, "--part", "C9"], ["no position 'C9' (--part)"]),
        (["substitute", *SK, "--part", "C1", "--free", "C1"], ["already being refilled"]),
        (["substitute", *SK, "--part", "C1", "--top", "0"], ["--top 0"]),
    ],
)
def test_bad_input_exits_2_with_the_reason(capsys, bench, argv, words):
    code, out, err = run(capsys, *argv)
    assert code == 2, err
    assert "Traceback" not in err
    for w in words:
        assert w in err


def test_analyze_spelling_and_json(capsys):
    code, out, _ = run(capsys, "analyze", *SK, "--gbw", "1MHz", "--json")
    assert code == 0
    data = json.loads(out)
    (stage,) = data["stages"]
    # f0 = 1 / (2 pi sqrt(R1 R2 C1 C2)) (handbook formula of the Sallen-Key low-pass)
    assert stage["f0_hz"] == pytest.approx(1 / (2 * math.pi * math.sqrt(1e8 * 22e-9 * 10e-9)))
    assert stage["opamp"]["gbw_hz"] == 1e6
    assert [p["tolerance_assumed"] for p in stage["pieces"]] == [True] * 4
    r = data["response"]
    assert len(r["freqs_hz"]) == len(r["magnitude_db"]) == len(r["phase_deg"]) > 100
    assert any("Discharge" in c for c in data["safety"])


def test_report_carries_the_cautions_and_a_plot(capsys):
    code, out, _ = run(capsys, "analyse", *SK)
    assert code == 0
    assert "magnitude, dB" in out and "phase, degrees" in out and "1 kHz" in out
    for words in ("Unplug", "Discharge", "meter", "voltage rating", "polarized", "Local codes"):
        assert words in out
    assert "tolerance assumed for R1, R2, C1, C2" in out


@pytest.mark.parametrize("cmd", ["analyse", "substitute"])
def test_help_carries_the_cautions(capsys, cmd):
    with pytest.raises(SystemExit) as info:
        main([cmd, "--help"])
    assert info.value.code == 0
    out = capsys.readouterr().out
    for words in ("isolate it from the mains", "Discharge capacitors", "verify with a meter"):
        assert words in out
    assert "polarized" in out and "licensed practice" in out and "examples:" in out


def test_cascade_by_stage_options(capsys):
    code, out, _ = run(
        capsys,
        "analyse",
        "--stage",
        " ".join(SK),
        "--stage",
        "non-inverting-lowpass R1=10k C1=15n",
        "--json",
    )
    assert code == 0
    data = json.loads(out)
    assert [s["topology"] for s in data["stages"]] == [
        "sallen-key-lowpass",
        "non-inverting-lowpass",
    ]
    assert data["response"]["corner_hz"] < min(s["f0_hz"] for s in data["stages"])


def test_nothing_in_stock_exits_1(capsys, tmp_path):
    stock = tmp_path / "r.toml"
    stock.write_text('[[resistor]]\nvalue = "10k"\nqty = 3\n', encoding="utf-8")
    code, _, err = run(capsys, "substitute", *SK, "--part", "C1", "--stock", stock)
    assert code == 1 and "needs 1 capacitor" in err


def test_saved_repair_goes_through_bom_netlist_build_and_undo(capsys, bench, tmp_path):
    before = bench.read_bytes()
    code, out, err = run(capsys, "substitute", *SK, "--part", "C1", "--save", "fix.toml")
    assert code == 0, err
    assert "saved option 1 to fix.toml" in err and "film box" in out
    doc = tomllib.loads((tmp_path / "fix.toml").read_text(encoding="utf-8"))
    positions = {p["name"]: p for p in doc["candidate"]["stage"][0]["position"]}
    assert [positions[n]["arrangement"] for n in ("R1", "R2", "C2")] == ["kept"] * 3
    assert "part" not in positions["R1"] and doc["request"]["mode"] == "repair"
    taken = positions["C1"]["part"]
    assert doc["candidate"]["pieces"] == len(taken) == 1

    code, out, err = run(capsys, "bom", "fix.toml")
    assert code == 0, err
    assert "C1" in out and "R1" not in out.split("Bill of materials")[1]
    code, out, err = run(capsys, "netlist", "fix.toml")
    assert code == 0, err
    assert "R1_S1 in s1_a 10000" in out and "stays in the circuit" in out
    if shutil.which("ngspice"):  # the netlist runs as is (ngspice, Debian package)
        proc = subprocess.run(
            ["ngspice", "-b"], input=out, capture_output=True, text=True, timeout=60
        )
        assert proc.returncode == 0 and "error" not in proc.stdout.lower()

    # analysing the saved design gives the marked stage's f0 back (C1 was refilled exactly)
    code, out, err = run(capsys, "analyse", "fix.toml", "--json")
    assert code == 0, err
    want = doc["candidate"]["stage"][0]["target"]["f0_hz"]
    assert json.loads(out)["stages"][0]["f0_hz"] == pytest.approx(want, rel=1e-12)

    # a design file never chooses what gets written: with --yes the stock is named
    code, out, err = run(capsys, "build", "fix.toml", "--yes", "--stock", str(bench))
    assert code == 0, err
    after = bench.read_text(encoding="utf-8")
    line = taken[0]["line"]
    old_qty = _qty_after(before.decode("utf-8"), line)
    assert _qty_after(after, line) == old_qty - 1  # one 22n out of its own line, nothing else
    old_lines, new_lines = before.decode("utf-8").splitlines(), after.splitlines()
    assert sum(a != b for a, b in zip(old_lines, new_lines, strict=True)) == 1
    code, _, err = run(capsys, "undo", "--yes")
    assert code == 0, err
    assert bench.read_bytes() == before


def _qty_after(text: str, header_line: int) -> int:
    for line in text.splitlines()[header_line:]:
        if line.startswith("qty"):
            return int(line.split("=")[1])
    raise AssertionError("no qty")
