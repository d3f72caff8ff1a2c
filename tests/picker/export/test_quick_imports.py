"""`picker bom --csv` and `picker netlist` start without numpy, scipy or textual
(the quick commands of the project's rules; docs/outputs.md)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from picker.analysis import A0_DEFAULT
from picker.export import save_design
from picker.export.netlist import OPEN_LOOP_GAIN
from tests.picker.export.helpers import REQUEST, stock_records, two_stage_candidate

ROOT = Path(__file__).resolve().parents[3]


def test_netlist_gain_is_the_analysis_gain():
    # the netlist writes the constant out so as not to import picker.analysis (numpy)
    assert OPEN_LOOP_GAIN == A0_DEFAULT


@pytest.mark.parametrize(
    "argv",
    [["bom", "--csv"], ["bom", "--csv", "--per-reference"], ["netlist"]],
    ids=" ".join,
)
def test_quick_exports_import_no_numpy(tmp_path, argv):
    stock = stock_records(path=tmp_path / "inventory.toml", sha="00" * 32)
    design = tmp_path / "d.toml"
    save_design(design, candidate=two_stage_candidate(stock), request=REQUEST, stock=stock)
    args = [argv[0], str(design), *argv[1:]]
    code = (
        "import io, sys, contextlib; from picker.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        f"    rc = main({args!r})\n"
        "heavy = sorted({m.split('.')[0] for m in sys.modules} & {'numpy', 'scipy', 'textual'})\n"
        "print(rc, heavy)"
    )
    r = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    assert r.stdout.strip() == "0 []", (r.stdout, r.stderr)
