"""Benchmark the stock file: load of a generated 10,000-line stock, one safe edit of it, and the
wall time of ``picker stock adjust`` as a whole process.

Run by hand:  .venv/bin/python bench/bench_stock.py [--lines 10000] [--runs 20]
Prints medians and spreads; not a test.
"""

from __future__ import annotations

import argparse
import random
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from stock.eseries import series  # noqa: E402
from stock.file import QtyChange, apply_changes, load  # noqa: E402
from stock.values import format_rkm  # noqa: E402


def generate(n_lines: int, seed: int = 1) -> str:
    """A stock file of ``n_lines`` entries: about 70 % resistors, 28 % capacitors, 2 % op amps."""
    rng = random.Random(seed)
    e96 = series("E96")
    out = ["# generated for bench/bench_stock.py", "[stock]", 'name = "bench"', "format = 1", ""]
    for i in range(n_lines):
        r = rng.random()
        loc = f"{chr(65 + i % 26)}{i // 26}"
        if r < 0.70:
            v = e96[rng.randrange(96)] * 10 ** rng.randrange(1, 7)
            out += [
                "[[resistor]]",
                f'value = "{format_rkm(v, "resistor")}"',
                f"qty = {rng.randrange(1, 200)}   # bag",
                'tolerance = "1%"',
                'tempco = "50ppm"',
                f'location = "{loc}"',
            ]
            if rng.random() < 0.05:
                out.append(f'measured = ["{format_rkm(v * 1.002, "resistor")}"]')
        elif r < 0.98:
            v = e96[rng.randrange(96)] * 10.0 ** rng.randrange(-12, -5)
            out += [
                "[[capacitor]]",
                f'value = "{format_rkm(v, "capacitor")}"',
                f"qty = {rng.randrange(1, 50)}",
                'tolerance = "5%"',
                'dielectric = "C0G"',
                'voltage = "50V"',
                f'location = "{loc}"',
            ]
        else:
            out += [
                "[[opamp]]",
                f'name = "op amp {i}"',
                'gbw = "3MHz"',
                'slew = "13V/us"',
                "channels = 2",
                f"qty = {rng.randrange(1, 9)}",
                f'location = "{loc}"',
            ]
        out.append("")
    return "\n".join(out)


def timed(fn, runs: int) -> list[float]:
    times = []
    for _ in range(runs):
        t = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t)
    return times


def show(label: str, times: list[float]) -> None:
    ms = sorted(t * 1e3 for t in times)
    print(
        f"{label:<48} median {statistics.median(ms):8.1f} ms   min {ms[0]:8.1f}   "
        f"max {ms[-1]:8.1f}   (n={len(ms)})"
    )


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--lines", type=int, default=10_000)
    ap.add_argument("--runs", type=int, default=20)
    args = ap.parse_args()
    with tempfile.TemporaryDirectory() as d:
        big = Path(d) / "big.toml"
        big.write_text(generate(args.lines), encoding="utf-8")
        text_lines = big.read_text(encoding="utf-8").count("\n")
        s = load(big)
        print(
            f"generated {args.lines} stock lines ({text_lines} text lines, "
            f"{big.stat().st_size / 1e3:.0f} kB): {len(s.resistors)} resistor, "
            f"{len(s.capacitors)} capacitor, {len(s.opamps)} op amp lines"
        )
        import stock.load as loader

        def cold_load():
            loader._CACHE.clear()  # measure the parse, not the cache of unchanged bytes
            load(big)

        show(f"load() of {args.lines} stock lines", timed(cold_load, args.runs))
        show(
            f"apply_changes() one qty in {args.lines} lines",
            timed(
                lambda: apply_changes(big, [QtyChange("resistor", 5, 1)]), max(3, args.runs // 4)
            ),
        )

        small = Path(d) / "inventory.toml"
        small.write_bytes((ROOT / "sample_inventory.toml").read_bytes())
        cmd = [
            sys.executable,
            "-m",
            "picker",
            "stock",
            "adjust",
            "--stock",
            str(small),
            "--kind",
            "resistor",
            "--value",
            "2k2",
            "--by",
        ]

        def run(by):
            subprocess.run(cmd + [by], check=True, capture_output=True, cwd=ROOT)

        flip = iter(["-1", "1"] * args.runs)
        show(
            "process: picker stock adjust (sample, 800 lines)",
            timed(lambda: run(next(flip)), args.runs),
        )
        show(
            "process: python -c pass (interpreter floor)",
            timed(lambda: subprocess.run([sys.executable, "-c", "pass"], check=True), args.runs),
        )
        cmd_big = [
            sys.executable,
            "-m",
            "picker",
            "stock",
            "adjust",
            "--stock",
            str(big),
            "--kind",
            "opamp",
            "--value",
            s.opamps[0].name,
            "--by",
            "1",
        ]
        show(
            f"process: picker stock adjust ({args.lines} lines)",
            timed(
                lambda: subprocess.run(cmd_big, check=True, capture_output=True, cwd=ROOT),
                max(3, args.runs // 4),
            ),
        )


if __name__ == "__main__":
    main()
