"""Under a low address-space limit a large request ends cleanly: a design, or a refusal in
words (exit 1 or 2), never a MemoryError traceback (issue 11; docs/search.md, "Cost").

The limit is set with ``resource.setrlimit(RLIMIT_AS)`` in the child process only."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[3]
resource = pytest.importorskip("resource")

LIMIT = 1200 * 2**20  # bytes of address space: well above the interpreter and numpy


def _make_stock(path: Path, lines: int) -> None:
    sys.path.insert(0, str(ROOT))
    try:
        from bench.make_stock import generate
    finally:
        sys.path.remove(str(ROOT))
    path.write_text(generate(lines), encoding="utf-8")


def _run_limited(*argv: str) -> subprocess.CompletedProcess:
    def limit() -> None:
        resource.setrlimit(resource.RLIMIT_AS, (LIMIT, LIMIT))

    env = dict(os.environ, OPENBLAS_NUM_THREADS="1", OMP_NUM_THREADS="1")
    env.pop("PICKER_DEBUG", None)
    return subprocess.run(
        [sys.executable, "-m", "picker", *argv],
        capture_output=True,
        text=True,
        preexec_fn=limit,
        env=env,
        cwd=ROOT,
        timeout=600,
    )


def test_a_large_stock_under_a_low_memory_limit_ends_cleanly(tmp_path):
    stock = tmp_path / "cabinet.toml"
    _make_stock(stock, 5000)  # 3,500 resistor and 1,500 capacitor lines
    design = ("lowpass", "--fc", "1k", "--q", "50", "--gain", "2", "--singles")
    proc = _run_limited(
        "--stock",
        str(stock),
        "design",
        *design,
        "--json",
        "--trials",
        "100",
        "--top",
        "1",
        "--time-limit",
        "2",
    )
    assert proc.returncode in (0, 1), proc.stderr
    assert "Traceback" not in proc.stderr
    assert "internal error" not in proc.stderr
    if proc.returncode == 1:
        assert proc.stderr.startswith("picker: ")


def test_a_memory_error_is_a_refusal_in_words(monkeypatch, capsys):
    import picker.cli as cli

    def greedy(argv):
        raise MemoryError

    monkeypatch.setattr(cli, "_main", greedy)
    assert cli.main(["design", "lowpass", "--fc", "1k"]) == 1
    err = capsys.readouterr().err
    assert "needs more memory than the process may use" in err and "Traceback" not in err
