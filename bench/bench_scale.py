"""Cost of ``picker design`` on larger stocks: wall time and peak memory of whole commands.

Run by hand (not a test):

    .venv/bin/python bench/bench_scale.py                  # every case, 120 s cap each
    .venv/bin/python bench/bench_scale.py --only sk --timeout 60

Each case runs as its own process under ``/usr/bin/time -v`` (wall clock and "Maximum
resident set size"), with a time cap (``timeout``) and an address-space cap
(``ulimit -v``) so that a runaway case is reported as such instead of swamping the
machine. Stocks come from ``bench/make_stock.py`` (E-series values, IEC 60063). Where a
case has a goal for the search alone, the search is also timed inside one process
(``picker.search.search``, the call the command makes). Prints one Markdown table.
"""

from __future__ import annotations

import argparse
import os
import re
import shlex
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))

from bench.make_stock import generate  # noqa: E402

SAMPLE = ROOT / "sample_inventory.toml"
PICKER = [sys.executable, "-m", "picker"]

# (key, what, stock, design arguments, goal in words)
CASES = [
    (
        "inv1",
        "1st-order inverting 30 Hz gain 200",
        "1000",
        "lowpass --fc 30 --order 1 --topology inverting --gain 200",
        "<= 0.5 s whole command",
    ),
    ("sk", "2nd-order Sallen-Key 1 kHz", "1000", "lowpass --fc 1k --order 2", "<= 1 s search, 2 s"),
    (
        "skerr",
        "2nd-order Sallen-Key 1 kHz, --rank error",
        "1000",
        "lowpass --fc 1k --order 2 --rank error --json --trials 200",
        "within the time limit",
    ),
    ("skg2", "Sallen-Key gain 2", "sample", "lowpass --fc 1k --order 2 --gain 2", "<= 1 s"),
    ("bw8", "8th-order Butterworth 1 kHz", "sample", "lowpass --fc 1k --order 8", "<= 2 s"),
    ("bw8-300", "8th-order Butterworth 1 kHz", "300", "lowpass --fc 1k --order 8", "<= 3 s"),
    (
        "cap250",
        "2nd-order, sample + 250 capacitor lines",
        "sample+250c",
        "lowpass --fc 1k --order 2",
        "(issue: > 5 min)",
    ),
    (
        "r3000",
        "2nd-order, 3,000 resistor lines, no capacitors",
        "r3000",
        "lowpass --fc 1k --order 2",
        "clean refusal, <= 500 MB",
    ),
    (
        "mem-skq50",
        "Sallen-Key Q 50 gain 2",
        "5000",
        "lowpass --fc 1k --q 50 --gain 2",
        "<= 500 MB",
    ),
    (
        "mem-mfb",
        "MFB low-pass gain 10",
        "5000",
        "lowpass --fc 1k --order 2 --topology mfb --gain 10",
        "<= 500 MB",
    ),
    (
        "mem-bp",
        "MFB band-pass Q 50 gain 2",
        "5000",
        "bandpass --fc 1k --q 50 --gain 2",
        "<= 500 MB",
    ),
    (
        "mem-hp",
        "Sallen-Key high-pass gain 3",
        "5000",
        "highpass --fc 300 --order 2 --gain 3",
        "<= 500 MB",
    ),
]


def make_stocks(tmp: Path) -> dict[str, Path]:
    out = {"sample": SAMPLE}
    for n in ("300", "1000", "5000"):
        p = tmp / f"stock{n}.toml"
        p.write_text(generate(int(n)), encoding="utf-8")
        out[n] = p
    p = tmp / "r3000.toml"
    p.write_text(generate(3000, resistors_only=True), encoding="utf-8")
    out["r3000"] = p
    # the sample bench with 250 more capacitor lines (a second capacitor cabinet)
    extra = generate(250, cap_share=1.0).split("[[capacitor]]", 1)[1].split("[[opamp]]")[0]
    p = tmp / "sample_250c.toml"
    p.write_text(SAMPLE.read_text(encoding="utf-8") + "\n[[capacitor]]" + extra, encoding="utf-8")
    out["sample+250c"] = p
    return out


def run_case(
    stock: Path, design: str, timeout: float, as_kb: int, tree: Path | None = None
) -> dict:
    """One whole command; ``tree``: run that checkout of picker instead (``--before``)."""
    cmd = PICKER + ["--stock", str(stock), "design"] + shlex.split(design)
    env = dict(os.environ, COLUMNS="100")
    if tree is not None:  # the child imports picker from ``tree``: first on the path
        env["PYTHONPATH"] = str(tree)
    shell = f"ulimit -v {as_kb}; exec /usr/bin/time -v timeout {timeout:g} " + " ".join(
        shlex.quote(c) for c in cmd
    )
    t0 = time.monotonic()
    proc = subprocess.run(
        ["bash", "-c", shell], capture_output=True, text=True, env=env, cwd=tree or ROOT
    )
    wall = time.monotonic() - t0
    err = proc.stderr
    rss = re.search(r"Maximum resident set size \(kbytes\): (\d+)", err)
    status = re.search(r"Exit status: (\d+)", err)
    code = int(status.group(1)) if status else proc.returncode
    body = err.split("\tCommand being timed")[0].strip().splitlines()
    if proc.stdout.lstrip().startswith("{"):
        import json

        try:
            out = json.loads(proc.stdout)
            body.append(f"proven {out.get('proven')}, bound {out.get('bound')}")
        except ValueError:
            pass
    return {
        "wall": wall,
        "rss_mb": int(rss.group(1)) / 1024 if rss else float("nan"),
        "code": code,
        "timed_out": code == 124,
        "memory_error": "MemoryError" in err,
        "last": body[-1][:90] if body else "",
    }


def _shown(r: dict, timeout: float) -> list[str]:
    wall = f">{timeout:g} s" if r["timed_out"] else f"{r['wall']:.2f} s"
    rss = f"{r['rss_mb']:.0f} MB" + (" (MemoryError)" if r["memory_error"] else "")
    return [wall, rss]


def search_time(stock: Path, design: str, timeout: float) -> str:
    """Seconds of ``picker.search.search`` alone, in a child process (same cap)."""
    code = f"""
import sys, time
sys.argv = ['picker', '--stock', {str(stock)!r}, 'design'] + {shlex.split(design)!r}
from picker.cli import build_parser
from picker.commands.design_cmd import parse_request
from picker.commands.common import load_stock
from picker.filters import plan_stages
from picker.search import Bounds, search
args = build_parser().parse_args(sys.argv[1:])
req = parse_request(args)
stock = load_stock(args.stock)
stages = plan_stages(req['type'], response=req['response'], order=req['order'],
    fc_hz=req['fc_hz'], gain=req['gain'], ripple_db=req['ripple_db'], q=req['q'],
    family=req['topology'])
kw = {{}}
if getattr(args, 'rank', None) in ('pieces', 'error'):
    import inspect
    if 'rank' in inspect.signature(search).parameters:
        kw['rank'] = args.rank
t = time.perf_counter()
search(stock, stages, singles=req['singles'], allow_polarized=req['allow_polarized'],
    bounds=Bounds(**req['bounds']), top=args.top, for_people=True, **kw)
print(f'{{time.perf_counter() - t:.3f}}')
"""
    try:
        proc = subprocess.run(
            [sys.executable, "-c", code], capture_output=True, text=True, timeout=timeout
        )
    except subprocess.TimeoutExpired:
        return f">{timeout:g} s"
    if proc.returncode:
        return f"exit {proc.returncode}"
    return f"{float(proc.stdout.strip().splitlines()[-1]):.2f} s"


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--timeout", type=float, default=120.0, help="seconds per case (120)")
    ap.add_argument("--as-gb", type=float, default=6.0, help="address-space cap per case (6)")
    ap.add_argument("--only", nargs="*", help="case keys to run (default all)")
    ap.add_argument("--search", action="store_true", help="also time the search alone")
    ap.add_argument(
        "--before",
        type=Path,
        help="a checkout of an earlier picker (git worktree add DIR REF): each case runs "
        "there too, just before, for a before/after table from one run",
    )
    args = ap.parse_args(argv)
    cases = [c for c in CASES if not args.only or c[0] in args.only]
    print(f"# bench_scale, {time.strftime('%Y-%m-%d %H:%M UTC', time.gmtime())}")
    print(f"# load average {os.getloadavg()[0]:.2f}, cap {args.timeout:g} s, {args.as_gb:g} GB AS")
    head = "| case | what | stock | wall | peak RSS | exit | search | goal | last line |"
    if args.before:
        head = "| case | what | stock | wall before | RSS before | exit before " + head[24:]
    print(head)
    print("|---" * (head.count("|") - 1) + "|")
    with tempfile.TemporaryDirectory() as d:
        stocks = make_stocks(Path(d))
        for key, what, stock, design, goal in cases:
            cap = int(args.as_gb * 1024 * 1024)
            before = ""
            if args.before:
                b = run_case(stocks[stock], design, args.timeout, cap, args.before)
                before = " | ".join(_shown(b, args.timeout) + [str(b["code"])]) + " | "
            r = run_case(stocks[stock], design, args.timeout, cap)
            wall, rss = _shown(r, args.timeout)
            st = search_time(stocks[stock], design, args.timeout) if args.search else ""
            last = r["last"].replace("|", "/")
            print(
                f"| {key} | {what} | {stock} | {before}{wall} | {rss} | {r['code']} | {st} "
                f"| {goal} | {last} |",
                flush=True,
            )
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
