"""Time of ``picker design ... --suggest 3`` on the sample bench (docs/buying.md).

    python bench/bench_buy.py            # 2nd- and 8th-order Butterworth 1 kHz low-pass
    python bench/bench_buy.py --rank error --time-limit 120

Each case runs the real command in a child process under ``/usr/bin/time -v`` (when it
is there) and prints the wall time, the peak memory, the time of the same design without
``--suggest``, and the suggestions. Run by hand; the figures go into issue notes.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import shutil
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
SAMPLE = ROOT / "picker" / "data" / "sample_inventory.toml"
CASES = {
    "2nd-order Butterworth 1 kHz": ["lowpass", "--fc", "1k", "--order", "2"],
    "8th-order Butterworth 1 kHz": ["lowpass", "--fc", "1k", "--order", "8"],
}


def run(args: list[str]) -> tuple[float, float | None, dict]:
    """(wall seconds, peak MB or None, the JSON printed)."""
    cmd = [sys.executable, "-m", "picker", "--stock", str(SAMPLE), "design", *args, "--json"]
    timer = shutil.which("time") or ("/usr/bin/time" if os.path.exists("/usr/bin/time") else None)
    if timer:
        cmd = [timer, "-v", *cmd]
    start = time.perf_counter()
    proc = subprocess.run(cmd, capture_output=True, text=True, cwd=ROOT, check=False)
    wall = time.perf_counter() - start
    peak = None
    m = re.search(r"Maximum resident set size \(kbytes\): (\d+)", proc.stderr)
    if m:
        peak = int(m[1]) / 1024.0
    if proc.returncode not in (0, 1):
        raise SystemExit(f"picker exited {proc.returncode}: {proc.stderr[-2000:]}")
    return wall, peak, json.loads(proc.stdout)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--rank", default=None, help="passed on to picker design")
    ap.add_argument("--suggest", default="3")
    ap.add_argument("--time-limit", default=None, help="passed on to picker design")
    opts = ap.parse_args()
    extra = ["--rank", opts.rank] if opts.rank else []
    if opts.time_limit:
        extra += ["--time-limit", opts.time_limit]
    for name, args in CASES.items():
        plain, _, _ = run([*args, *extra, "--top", "1"])
        wall, peak, doc = run([*args, *extra, "--top", "1", "--suggest", opts.suggest])
        mem = f"{peak:.0f} MB" if peak is not None else "n/a"
        print(f"{name}: --suggest {opts.suggest} {wall:.1f} s (peak {mem}); without {plain:.1f} s")
        print(f"  proven over the values tried: {doc.get('suggestions_proven')}")
        print(f"  tried: {doc.get('suggestions_tried')}")
        for s in doc.get("suggestions", []):
            also = "".join(f" + {a['value']:g} ({a['kind']})" for a in s["also"])
            print(
                f"  buy {s['qty']} x {s['value']:g} {s['kind']} at {100 * s['tolerance']:g}%"
                f"{also}: {s['before']} -> {s['after']}"
            )
        for note in doc.get("suggestions_notes", []):
            print(f"  note: {note}")


if __name__ == "__main__":
    main()
