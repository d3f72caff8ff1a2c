"""Time from process start to the first paint of the terminal UI, in a real tmux.

Run by hand:  .venv/bin/python bench/ui_startup.py [--runs 5] [--stock FILE]

The shell inside tmux writes the clock just before it execs ``python -m picker``;
this script polls ``capture-pane`` every 5 ms until the drawers pane shows its first
line of stock, and reports the difference. Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import argparse
import os
import shlex
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
POLL_S = float(os.environ.get("POLL_S", "0.005"))


def one_run(stock: Path, marker: str) -> tuple[float, float]:
    name = f"picker-bench-{os.getpid()}-{time.monotonic_ns()}"
    base = ["tmux", "-L", name, "-f", "/dev/null"]
    with tempfile.TemporaryDirectory() as tmp:
        stamp = Path(tmp) / "t0"
        command = (f"date +%s.%N > {shlex.quote(str(stamp))}; exec env -u COLUMNS -u LINES "
                   f"{shlex.quote(sys.executable)} -m picker --stock {shlex.quote(str(stock))}")
        env = {k: v for k, v in os.environ.items() if k not in ("COLUMNS", "LINES")}
        subprocess.run(base + ["new-session", "-d", "-x", "80", "-y", "24", command],
                       check=True, env=env)
        try:
            bar = footer = None
            deadline = time.time() + 20
            while time.time() < deadline and (footer is None or bar is None):
                shown = subprocess.run(base + ["capture-pane", "-p"], capture_output=True,
                                       text=True).stdout
                now = time.time()
                if bar is None and "[1 drawers]" in shown:
                    bar = now
                if footer is None and marker in shown and "e quantity" in shown:
                    footer = now
                time.sleep(POLL_S)
            t0 = float(stamp.read_text())
        finally:
            subprocess.run(base + ["kill-server"], capture_output=True)
    if bar is None or footer is None:
        raise SystemExit(f"the UI did not paint within 20 s; the screen was:\n{shown}")
    return bar - t0, footer - t0


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=5)
    parser.add_argument("--stock", default=str(ROOT / "sample_inventory.toml"))
    parser.add_argument("--marker", default="100R", help="text of the first stock row")
    args = parser.parse_args()
    if shutil.which("tmux") is None:
        raise SystemExit("tmux is not installed")
    runs = [one_run(Path(args.stock), args.marker) for _ in range(args.runs)]
    for label, k in (("first paint (pane bar)", 0), ("stock table and footer", 1)):
        values = [r[k] for r in runs]
        print(f"{label:24s} median {statistics.median(values) * 1000:6.0f} ms   "
              f"min {min(values) * 1000:6.0f}   max {max(values) * 1000:6.0f}   "
              f"({len(values)} runs)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
