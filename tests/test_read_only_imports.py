"""picker is POSIX-only: it locks the stock file with ``fcntl`` when it writes. The
read-only commands never import ``fcntl`` (README, "Platforms"): each one runs here in a
fresh interpreter in which ``import fcntl`` fails, as it would where there is none."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from picker.export import save_design
from tests.picker.export.helpers import REQUEST, stock_records, two_stage_candidate

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "sample_inventory.toml"

READ_ONLY = [
    ["stock", "check", "{stock}"],
    ["stock", "list", "{stock}"],
    ["stock", "check", "{stock}", "--json"],
    ["bom", "{design}", "--csv"],
    ["bom", "{design}"],
    ["netlist", "{design}"],
    ["--version"],
]


def _run_without_fcntl(args: list[str]) -> subprocess.CompletedProcess[str]:
    code = (
        "import io, sys, contextlib\n"
        "sys.modules['fcntl'] = None  # any `import fcntl` now raises ImportError\n"
        "from picker.cli import main\n"
        "out = io.StringIO()\n"
        "try:\n"
        "    with contextlib.redirect_stdout(out):\n"
        f"        rc = main({args!r})\n"
        "except SystemExit as exc:\n"
        "    rc = exc.code\n"
        "print(rc, 'fcntl' in sys.modules and sys.modules['fcntl'] is not None)\n"
    )
    return subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)


@pytest.mark.parametrize("argv", READ_ONLY, ids=" ".join)
def test_read_only_command_runs_without_fcntl(tmp_path, argv):
    stock = stock_records(path=tmp_path / "inventory.toml", sha="00" * 32)
    design = tmp_path / "d.toml"
    save_design(design, candidate=two_stage_candidate(stock), request=REQUEST, stock=stock)
    args = [a.format(stock=SAMPLE, design=design) for a in argv]
    done = _run_without_fcntl(args)
    assert done.stdout.strip().splitlines()[-1:] == ["0 False"], (done.stdout, done.stderr)


def test_a_write_still_needs_fcntl(tmp_path):
    """The check above can fail: a command that writes the stock does reach for fcntl."""
    owned = tmp_path / "inventory.toml"
    owned.write_bytes(SAMPLE.read_bytes())
    lines = owned.read_text(encoding="utf-8").splitlines()
    header = lines.index("[[resistor]]") + 1  # the first resistor's header line (1-based)
    value = next(line for line in lines[header:] if line.startswith("value")).split('"')[1]
    args = ["stock", "adjust", "--stock", str(owned), "--kind", "resistor"]
    args += ["--value", value, "--line", str(header), "--by", "1"]
    before = owned.read_bytes()
    done = _run_without_fcntl(args)
    # a clear refusal (exit 2, one line naming fcntl), the file untouched
    assert done.stdout.strip().splitlines()[-1:] == ["2 False"], (done.stdout, done.stderr)
    assert "only on POSIX systems" in done.stderr and "Traceback" not in done.stderr
    assert owned.read_bytes() == before
