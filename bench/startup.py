"""Start-up wall time of the quick (non-search) commands, best of N runs each.

Run by hand:  .venv/bin/python bench/startup.py [--runs 5] [--root DIR]

Each command runs as ``python -m picker ARGS`` in a fresh process (the way the
``picker`` script starts it), on the sample stock at the tree's root and on a design
saved from it once before the timings. ``--root`` times another checkout of the source
(e.g. main) with this interpreter. The goal: every command here under 0.2 s of wall
time. The CPU time (user + system) is printed beside it: on a loaded machine it moves
far less than the wall time. Not a test: the figures depend on the machine.
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

GOAL_S = 0.2


def commands(sample: Path, design: Path) -> list[list[str]]:
    return [
        ["--help"],
        ["--version"],
        ["stock", "check", str(sample)],
        ["stock", "list", str(sample)],
        ["bom", str(design), "--csv"],
        ["netlist", str(design)],
    ]


def run(root: Path, args: list[str]) -> tuple[float, float]:
    """(wall, cpu) seconds of one run; cpu is the child's user + system time, which a
    loaded machine disturbs far less than the wall time."""
    env = dict(os.environ, PYTHONPATH=str(root), NO_COLOR="1")
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    done = subprocess.run(
        [sys.executable, "-m", "picker", *args],
        cwd=root,
        env=env,
        stdout=subprocess.DEVNULL,
        stderr=subprocess.PIPE,
        text=True,
        check=False,
    )
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    if done.returncode != 0:
        sys.exit(f"picker {' '.join(args)}: exit {done.returncode}\n{done.stderr}")
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=5)
    parser.add_argument("--root", type=Path, default=Path(__file__).resolve().parent.parent)
    opts = parser.parse_args()
    root = opts.root.resolve()
    sample = root / "sample_inventory.toml"
    with tempfile.TemporaryDirectory() as tmp:
        design = Path(tmp) / "bench.design.toml"
        run(root, ["design", "lowpass", "--fc", "1k", "--order", "2", "--stock", str(sample),
                   "--save", str(design)])  # fmt: skip
        slow = 0
        for args in commands(sample, design):
            run(root, args)  # warm the file cache and the bytecode
            runs = [run(root, args) for _ in range(opts.runs)]
            best = min(wall for wall, _ in runs)
            cpu = min(c for _, c in runs)
            shown = " ".join(a if "/" not in a else Path(a).name for a in args)
            mark = "" if best < GOAL_S else f"  over {GOAL_S} s"
            slow += best >= GOAL_S
            print(f"{shown:36} wall {best:6.3f} s   cpu {cpu:6.3f} s{mark}")
    print(f"best of {opts.runs}; {slow} over the {GOAL_S} s goal (wall)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
