"""``picker stock check|list|adjust`` (docs/cli.md): output, exit codes, no traceback,
and a light start (no numpy, scipy or textual for ``adjust``)."""

import json
import subprocess
import sys
from pathlib import Path

import pytest

from picker.cli import main
from picker.commands.common import bundled_sample_path, resolve_stock_path
from stock.file import load
from tests.helpers import ROOT, SAMPLE, copy_sample


@pytest.fixture
def inv(tmp_path):
    return copy_sample(tmp_path, "inv.toml")


def test_check_ok(inv, capsys):
    assert main(["stock", "check", str(inv)]) == 0
    out = capsys.readouterr().out
    assert "ok, 57 resistor, 32 capacitor and 3 op amp lines, 0 warnings" in out


def test_check_warnings_exit_0(tmp_path, capsys):
    p = tmp_path / "w.toml"
    p.write_text('[[resistor]]\nvalue = "1k"\nqty = 2\ncolour = "brown"\n', encoding="utf-8")
    assert main(["stock", "check", str(p)]) == 0
    out = capsys.readouterr().out
    assert f"warning: {p}:4: resistor colour: unknown key" in out and "1 warning" in out


def test_check_errors_exit_2_one_per_line(tmp_path, capsys):
    p = tmp_path / "bad.toml"
    p.write_text(
        '[[resistor]]\nvalue = "4x7"\nqty = -1\n[[capacitor]]\nvalue = "10"\nqty = 1\n',
        encoding="utf-8",
    )
    assert main(["stock", "check", str(p)]) == 2
    err = capsys.readouterr().err.splitlines()
    assert [line.split(": ")[1] for line in err] == [f"{p}:2", f"{p}:3", f"{p}:5"]
    assert "Traceback" not in "".join(err)


def test_check_via_subprocess_no_traceback(tmp_path):
    p = tmp_path / "bad.toml"
    p.write_bytes(b'[[resistor]]\nvalue = "1k\xff"\n')
    r = subprocess.run(
        [sys.executable, "-m", "picker", "stock", "check", str(p)],
        capture_output=True,
        text=True,
        cwd=ROOT,
    )
    assert r.returncode == 2 and "not UTF-8" in r.stderr and "Traceback" not in r.stderr


def test_list_table(inv, capsys):
    assert main(["stock", "list", str(inv), "--kind", "capacitor"]) == 0
    out = capsys.readouterr().out
    assert "Capacitors (32 lines)" in out and "Resistors" not in out
    for text in (
        "2n2",
        "4n7",
        "100u",
        "electrolytic (polarized)",
        "film box",
        "10%*",
        "tolerance assumed",
    ):
        assert text in out


def test_list_json(inv, capsys):
    assert main(["stock", "list", str(inv), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["name"] == "north bench cabinet" and data["sha256"] == load(inv).sha256
    r = next(x for x in data["resistors"] if x["text"] == "10k" and x["location"] == "B4")
    assert r["value"] == 10000.0 and r["measured"] == [9987.0, 10012.0, 9995.0]
    assert r["meter"] == 0.005 and r["nominal_qty"] == r["qty"] - 3
    assert {o["name"] for o in data["opamps"]} >= {"dual JFET-input, 3 MHz"}


def test_adjust_changes_one_number(inv, capsys):
    before = inv.read_bytes()
    assert (
        main(
            [
                "stock",
                "adjust",
                "--stock",
                str(inv),
                "--kind",
                "resistor",
                "--value",
                "4.7k",
                "--location",
                "b1",
                "--by",
                "-1",
            ]
        )
        == 0
    )
    assert capsys.readouterr().out.strip() == "resistor 4k7 in B1: qty 40 -> 39"
    after = inv.read_bytes()
    diff = [(a, b) for a, b in zip(before.splitlines(), after.splitlines(), strict=False) if a != b]
    assert diff == [(b"qty = 40", b"qty = 39")]


def test_adjust_top_level_stock_option(inv, capsys):
    assert (
        main(
            [
                "--stock",
                str(inv),
                "stock",
                "adjust",
                "--kind",
                "capacitor",
                "--value",
                "100u",
                "--by",
                "3",
            ]
        )
        == 0
    )
    assert capsys.readouterr().out.strip() == "capacitor 100u in D6: qty 10 -> 13"


@pytest.mark.parametrize(
    "argv, message",
    [
        (
            ["--kind", "resistor", "--value", "4k7", "--by", "-1"],
            "2 lines match resistor 4k7; add --location",
        ),
        (["--kind", "resistor", "--value", "2k4", "--by", "-1"], "would go below zero"),
        (
            ["--kind", "resistor", "--value", "10k", "--location", "B4", "--by", "-78"],
            "3 measured pieces",
        ),
        (["--kind", "resistor", "--value", "4k8", "--by", "1"], "no resistor 4k8"),
        (["--kind", "capacitor", "--value", "4x", "--by", "1"], "--value: unknown unit 'x'"),
        (["--kind", "opamp", "--value", "octal", "--by", "1"], "the op amps in it: 'dual JFET"),
        # docs/stock-file.md: "10" for a capacitor is 10 F, implausible (0.1 pF .. 1 F)
        (["--kind", "capacitor", "--value", "10", "--by", "1"], "'10' is 10 F, not a plausible"),
        (
            ["--kind", "resistor", "--value", "4k7", "--location", "B1", "--by", "2000000"],
            "more than the 1,000,000",
        ),
        (
            ["--kind", "resistor", "--value", "4k7", "--line", "1", "--by", "1"],
            "no resistor 4k7 at line 1",
        ),
    ],
)
def test_adjust_refusals(inv, capsys, argv, message):
    before = inv.read_bytes()
    assert main(["stock", "adjust", "--stock", str(inv)] + argv) == 2
    err = capsys.readouterr().err
    assert message in err and "Traceback" not in err
    assert inv.read_bytes() == before


def test_adjust_ambiguous_lists_lines(inv, capsys):
    main(
        [
            "stock",
            "adjust",
            "--stock",
            str(inv),
            "--kind",
            "resistor",
            "--value",
            "1k",
            "--by",
            "-1",
        ]
    )
    err = capsys.readouterr().err.splitlines()
    lines = {r.line for r in load(inv).resistors if r.value == 1000.0}
    assert len(err) == 3 and {int(e.split("line ")[1].split(":")[0]) for e in err[1:]} == lines


def test_adjust_same_value_and_drawer_picked_by_line(inv, capsys):
    # the sample's film box holds a polypropylene and a polyester 10n line
    argv = [
        "stock",
        "adjust",
        "--stock",
        str(inv),
        "--kind",
        "capacitor",
        "--value",
        "10n",
        "--location",
        "film box",
        "--by",
        "-1",
    ]
    assert main(argv) == 2
    err = capsys.readouterr().err
    assert "add --line to say which" in err
    assert "(polypropylene, 2.5% tolerance)" in err and "(polyester, 5% tolerance)" in err
    polyester = next(
        c for c in load(inv).capacitors if c.value == 1e-8 and c.dielectric == "polyester"
    )
    assert main(argv + ["--line", str(polyester.line)]) == 0
    after = {c.line: c.qty for c in load(inv).capacitors}
    assert after[polyester.line] == polyester.qty - 1
    assert sum(after.values()) == sum(c.qty for c in load(SAMPLE).capacitors) - 1


def test_adjust_line_of_the_qty_as_well_as_of_the_header(inv, capsys):
    argv = ["stock", "adjust", "--stock", str(inv), "--kind", "capacitor", "--value", "10n"]
    argv += ["--location", "film box", "--by", "-1"]
    polyester = next(
        c for c in load(inv).capacitors if c.value == 1e-8 and c.dielectric == "polyester"
    )
    rows = inv.read_text(encoding="utf-8").split("\n")
    qty_line = next(
        n for n in range(polyester.line + 1, len(rows) + 1) if rows[n - 1].startswith("qty")
    )
    assert qty_line > polyester.line
    assert main(argv + ["--line", str(qty_line)]) == 0
    assert {c.line: c.qty for c in load(inv).capacitors}[polyester.line] == polyester.qty - 1
    # a line of another entry picks that entry, which is not this value: refused
    first = load(inv).resistors[0]
    assert main(argv + ["--line", str(first.line + 1)]) == 2
    assert f"at line {first.line + 1}" in capsys.readouterr().err


def test_adjust_refuses_bundled_sample(monkeypatch, tmp_path, capsys):
    monkeypatch.delenv("PICKER_STOCK", raising=False)
    monkeypatch.chdir(tmp_path)
    before = bundled_sample_path().read_bytes()
    assert main(["stock", "adjust", "--kind", "resistor", "--value", "2k2", "--by", "-1"]) == 2
    assert "bundled sample is not changed" in capsys.readouterr().err
    assert bundled_sample_path().read_bytes() == before


@pytest.mark.parametrize(
    "argv",
    [
        ["stock", "adjust", "--kind", "resistor", "--value", "1k", "--by", "x"],
        ["stock", "adjust", "--kind", "diode", "--value", "1k", "--by", "1"],
        ["stock", "adjust", "--kind", "resistor", "--value", "1k"],
        ["stock"],
    ],
)
def test_usage_errors_exit_2(argv, capsys):
    with pytest.raises(SystemExit) as info:
        main(argv)
    assert info.value.code == 2


def test_resolve_stock_path(monkeypatch, tmp_path):
    monkeypatch.chdir(tmp_path)
    monkeypatch.delenv("PICKER_STOCK", raising=False)
    path, note = resolve_stock_path(None)
    assert path == bundled_sample_path() and "bundled sample" in note
    assert path.read_bytes() == SAMPLE.read_bytes()
    (tmp_path / "inventory.toml").write_text("", encoding="utf-8")
    assert resolve_stock_path(None)[0] == Path("inventory.toml")
    monkeypatch.setenv("PICKER_STOCK", "/x/env.toml")
    assert resolve_stock_path(None)[0] == Path("/x/env.toml")
    assert resolve_stock_path("mine.toml") == (Path("mine.toml"), None)


def test_adjust_imports_nothing_heavy(inv):
    code = (
        "import sys; from picker.cli import main; "
        f"rc = main(['stock', 'adjust', '--stock', {str(inv)!r}, '--kind', 'resistor', "
        "'--value', '2k2', '--by', '-1']); "
        "heavy = sorted(m for m in sys.modules if m.split('.')[0] in "
        "('numpy', 'scipy', 'textual', 'rich')); print(rc, heavy)"
    )
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert r.stdout.strip().endswith("0 []"), (r.stdout, r.stderr)
    t = subprocess.run(
        [
            sys.executable,
            "-X",
            "importtime",
            "-m",
            "picker",
            "stock",
            "adjust",
            "--stock",
            str(inv),
            "--kind",
            "resistor",
            "--value",
            "2k2",
            "--by",
            "1",
        ],
        capture_output=True,
        text=True,
        cwd=ROOT,
    )
    assert t.returncode == 0
    imported = {
        line.split("|")[-1].strip().split(".")[0]
        for line in t.stderr.splitlines()
        if line.startswith("import time:")
    }
    assert "tomllib" in imported and "stock" in imported  # the list is real
    assert not imported & {"numpy", "scipy", "textual", "rich"}
