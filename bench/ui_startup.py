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


BASELINE = """\
from textual.app import App
from textual.widgets import Footer, Static
class Baseline(App):
    def compose(self):
        yield Static("[1 drawers] 100R")
        yield Footer()
    BINDINGS = [("e", "bell", "e quantity")]
Baseline().run(mouse=False)
"""


def one_run(stock: Path, marker: str, baseline: bool = False) -> tuple[float, float]:
    name = f"picker-bench-{os.getpid()}-{time.monotonic_ns()}"
    base = ["tmux", "-L", name, "-f", "/dev/null"]
    with tempfile.TemporaryDirectory() as tmp:
        stamp = Path(tmp) / "t0"
        if baseline:
            script = Path(tmp) / "baseline.py"
            script.write_text(BASELINE)
            what = shlex.quote(str(script))
        else:
            what = f"-m picker --stock {shlex.quote(str(stock))}"
        command = (
            f"date +%s.%N > {shlex.quote(str(stamp))}; exec env -u COLUMNS -u LINES "
            f"{shlex.quote(sys.executable)} {what}"
        )
        env = {k: v for k, v in os.environ.items() if k not in ("COLUMNS", "LINES")}
        subprocess.run(
            base + ["new-session", "-d", "-x", "80", "-y", "24", command], check=True, env=env
        )
        try:
            bar = footer = None
            deadline = time.time() + 20
            while time.time() < deadline and (footer is None or bar is None):
                shown = subprocess.run(
                    base + ["capture-pane", "-p"], capture_output=True, text=True
                ).stdout
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
    # alternate with a minimal Textual app run the same way, so the load of the
    # machine at the time shows in the numbers
    runs, base = [], []
    for _ in range(args.runs):
        runs.append(one_run(Path(args.stock), args.marker))
        base.append(one_run(Path(args.stock), "100R", baseline=True))
    for label, values in (
        ("first paint (pane bar)", [r[0] for r in runs]),
        ("stock table and footer", [r[1] for r in runs]),
        ("minimal Textual app", [r[1] for r in base]),
    ):
        print(
            f"{label:24s} median {statistics.median(values) * 1000:6.0f} ms   "
            f"min {min(values) * 1000:6.0f}   max {max(values) * 1000:6.0f}   "
            f"({len(values)} runs)"
        )
    print(f"load average: {os.getloadavg()[0]:.2f} on {os.cpu_count()} CPUs")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
