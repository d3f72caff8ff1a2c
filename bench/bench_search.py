"""Speed of picker.search (run by hand: ``.venv/bin/python bench/bench_search.py``).

Invented stocks of E-series values (IEC 60063). Reports wall time and peak memory
(tracemalloc) of the exact search, and, where plain enumeration is feasible, its time
and whether both agree on the best score. Targets on a 2-core machine: first order
from a 1,000-line stock <= 100 ms; one Sallen-Key stage from a 300-line stock <= 0.5 s;
an 8th-order cascade <= 2 s; peak memory <= 300 MB.
"""

from __future__ import annotations

import sys
import time
import tracemalloc
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import numpy as np  # noqa: E402

from picker.filters import get_topology, plan_stages  # noqa: E402
from picker.parts import StageTarget  # noqa: E402
from picker.search import search  # noqa: E402
from stock.eseries import series  # noqa: E402
from stock.model import Capacitor, OpAmp, Resistor, Stock  # noqa: E402


def make_stock(n_res: int, n_cap: int, seed: int = 1) -> Stock:
    rng = np.random.default_rng(seed)
    e96 = series("E96")
    e12 = series("E12")
    res = [m * 10.0**e for e in range(1, 7) for m in e96]
    caps = [m * 10.0**e for e in range(-11, -4) for m in e12]
    rv = rng.choice(res, n_res, replace=len(res) < n_res)
    cv = rng.choice(caps, n_cap, replace=len(caps) < n_cap)
    return Stock(
        resistors=tuple(
            Resistor(float(v), int(rng.integers(1, 20)), 0.01, location=f"R{i // 20}", index=i)
            for i, v in enumerate(rv)
        ),
        capacitors=tuple(
            Capacitor(float(v), int(rng.integers(1, 10)), 0.05, location=f"C{i // 20}", index=i)
            for i, v in enumerate(cv)
        ),
        opamps=(OpAmp("quad general purpose", 10e6, 4, channels=4),),
    )


def measure(label, fn):
    """Wall time of a plain run, then peak traced memory of a second run (tracemalloc
    slows numpy allocation, so it is kept out of the timed run)."""
    t0 = time.perf_counter()
    out = fn()
    dt = time.perf_counter() - t0
    peak = float("nan")
    if dt < 20:
        tracemalloc.start()
        fn()
        peak = tracemalloc.get_traced_memory()[1] / 2**20
        tracemalloc.stop()
    print(f"{label:<62} {dt * 1000:9.1f} ms  peak {peak:7.1f} MB", flush=True)
    return out, dt


def main() -> None:
    cases = [
        (
            "first order inverting, 1,000-line stock (700 R, 300 C)",
            (700, 300),
            plan_stages("lowpass", order=1, fc_hz=1234.0, gain=2.0),
        ),
        (
            "first order follower, 1,000-line stock",
            (700, 300),
            plan_stages("lowpass", order=1, fc_hz=1234.0, family="sallen-key"),
        ),
        (
            "Sallen-Key stage, 300-line stock (240 R, 60 C)",
            (240, 60),
            plan_stages("lowpass", order=2, fc_hz=1234.0),
        ),
        (
            "MFB low-pass stage, 300-line stock",
            (240, 60),
            plan_stages("lowpass", order=2, fc_hz=1234.0, family="mfb", gain=2.0),
        ),
        (
            "8th-order Butterworth Sallen-Key, 300-line stock",
            (240, 60),
            plan_stages("lowpass", order=8, fc_hz=1234.0),
        ),
        (
            "8th-order Butterworth Sallen-Key, 100-line stock",
            (70, 30),
            plan_stages("lowpass", order=8, fc_hz=1234.0),
        ),
    ]
    for label, (nr, nc), stages in cases:
        stock = make_stock(nr, nc)
        measure(
            label + " (top 5)",
            lambda stock=stock, stages=stages: search(stock, stages, top=5, tradeoff=False),
        )
        if "8th" not in label or nr < 100:
            measure(
                label + " (+ trade-off)",
                lambda stock=stock, stages=stages: search(stock, stages, top=5),
            )
    # against plain enumeration where it is feasible
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))
    from picker.search import Bounds
    from tests.picker.search.brute import brute

    for label, topo, target, (nr, nc) in [
        (
            "brute vs search: inverting first order, 25 R + 12 C lines",
            "inverting-lowpass",
            StageTarget(1234.0, None, 2.0),
            (25, 12),
        ),
        (
            "brute vs search: Sallen-Key, 8 R + 6 C lines",
            "sallen-key-lowpass",
            StageTarget(1234.0, 0.7071),
            (8, 6),
        ),
    ]:
        stock = make_stock(nr, nc, seed=3)
        stages = [(get_topology(topo), target)]
        (bs, *_), t_brute = measure(
            label + " [brute]", lambda stock=stock, stages=stages: brute(stock, stages, Bounds())
        )
        res, t_fast = measure(
            label + " [search]",
            lambda stock=stock, stages=stages: search(stock, stages, top=1, tradeoff=False),
        )
        print(
            f"    ratio {t_brute / t_fast:8.1f}x   best brute {bs.min():.6e}   "
            f"search {res.candidates[0].score:.6e}   agree "
            f"{bool(np.isclose(bs.min(), res.candidates[0].score, rtol=1e-9))}"
        )


if __name__ == "__main__":
    main()
