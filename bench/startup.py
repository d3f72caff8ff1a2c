"""Start-up time of the non-search commands, best of N runs each.

Run by hand:  .venv/bin/python bench/startup.py [--runs 5] [--root DIR] [--no-cache]

Each command runs as ``python -m picker ARGS`` in a fresh process (the way the
``picker`` script starts it), on a copy of the sample stock at the tree's root and on a
design saved from it once before the timings; a command that writes the stock (adjust,
build, undo) gets a fresh copy before each run. ``--root`` times another checkout of the
source (e.g. main) with this interpreter. The goal: every command here under 0.2 s.
The last rows (analyse, plot) compute a response as well as start: their figure is the
whole command, start-up and work, so an import they need shows there too.

Bytecode: an installed package has its ``.pyc`` files, so the children write and read
theirs in a temporary cache folder (``PYTHONPYCACHEPREFIX``), even where the caller's
environment says ``PYTHONDONTWRITEBYTECODE`` (which would time the compiler on every
run); ``--no-cache`` times that worst case, the first run after an edit. The CPU time
(user + system) is printed beside the wall time: on a loaded machine it moves far less.
Not a test: the figures depend on the machine.
"""

from __future__ import annotations

import argparse
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

GOAL_S = 0.2


def commands(stock: Path, design: Path) -> list[tuple[list[str], str]]:
    """``(arguments, what the run needs first)``: "" nothing, "fresh" a fresh stock copy,
    "built" a fresh copy with the design built onto it."""
    s, d = str(stock), str(design)
    return [
        (["--help"], ""),
        (["--version"], ""),
        (["stock", "check", s], ""),
        (["stock", "check", s, "--json"], ""),
        (["stock", "list", s], ""),
        (["stock", "list", s, "--json"], ""),
        (
            ["stock", "adjust", "--stock", s, "--kind", "resistor", "--value", "10k"]
            + ["--location", "B4", "--by", "-1"],
            "fresh",
        ),
        (["bom", d], ""),
        (["bom", d, "--csv"], ""),
        (["bom", d, "--csv", "--per-reference"], ""),
        (["bom", d, "--json"], ""),
        (["netlist", d], ""),
        (["build", d, "--stock", s, "--yes"], "fresh"),
        (["undo", "--stock", s, "--yes"], "built"),
        # the commands that compute (no search): analysis, response, figure
        (["analyse", "--list"], ""),
        (["analyse", "sallen-key-lowpass", "R1=10k", "R2=10k", "C1=22n", "C2=10n", "--json"], ""),
        (["analyse", "--design", d, "--no-plot"], ""),
        (["plot", d, "--csv"], ""),
        (["plot", d, "--svg", str(Path(design).with_suffix(".svg"))], ""),
    ]


def run(root: Path, args: list[str], cache: Path | None) -> tuple[float, float]:
    """(wall, cpu) seconds of one run; cpu is the child's user + system time, which a
    loaded machine disturbs far less than the wall time."""
    env = dict(os.environ, PYTHONPATH=str(root), NO_COLOR="1")
    if cache is not None:
        env.pop("PYTHONDONTWRITEBYTECODE", None)
        env["PYTHONPYCACHEPREFIX"] = str(cache)
    else:
        env["PYTHONDONTWRITEBYTECODE"] = "1"
        env.pop("PYTHONPYCACHEPREFIX", None)
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
    parser.add_argument("--no-cache", action="store_true", help="no bytecode cache (worst case)")
    opts = parser.parse_args()
    root = opts.root.resolve()
    sample = root / "sample_inventory.toml"
    with tempfile.TemporaryDirectory() as tmp:
        cache = None if opts.no_cache else Path(tmp) / "pycache"
        stock = Path(tmp) / "bench.stock.toml"
        design = Path(tmp) / "bench.design.toml"

        def fresh() -> None:
            shutil.copyfile(sample, stock)
            shutil.rmtree(Path(tmp) / f".{stock.name}.builds", ignore_errors=True)

        def built() -> None:
            fresh()
            run(root, ["build", str(design), "--stock", str(stock), "--yes"], cache)

        fresh()
        run(root, ["design", "lowpass", "--fc", "1k", "--order", "2", "--stock", str(stock),
                   "--save", str(design)], cache)  # fmt: skip
        setups: dict[str, Callable[[], None]] = {"fresh": fresh, "built": built}
        slow = 0
        for args, needs in commands(stock, design):
            setup = setups.get(needs, lambda: None)
            setup()
            run(root, args, cache)  # warm the file cache and the bytecode
            runs = []
            for _ in range(opts.runs):
                setup()
                runs.append(run(root, args, cache))
            best = min(wall for wall, _ in runs)
            cpu = min(c for _, c in runs)
            shown = " ".join(a if "/" not in a else Path(a).name for a in args)
            shown = shown.replace("bench.stock.toml", "S").replace("bench.design.toml", "D")
            shown = shown.replace("bench.design.svg", "D.svg")
            mark = "" if best < GOAL_S else f"  over {GOAL_S} s"
            slow += best >= GOAL_S
            print(f"{shown:52} wall {best:6.3f} s   cpu {cpu:6.3f} s{mark}")
    cached = "no bytecode cache" if opts.no_cache else "bytecode cached"
    print(f"best of {opts.runs}, {cached}; {slow} over the {GOAL_S} s goal (wall)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
