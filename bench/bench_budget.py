"""Benchmark: the error budget of an 8th-order low-pass (4 Sallen-Key stages).

    .venv/bin/python bench/bench_budget.py [--trials N] [--repeat K]

Times the Monte Carlo alone (10,000 trials by default, every piece drawn on its own,
the -3 dB corner of the cascade per trial) and the whole ``budget()`` (tolerance
corners, Q search, sensitivities, temperature, op amp by nodal analysis, checks).
Goal: Monte Carlo of 10,000 trials in at most 0.5 s. Run by hand; not a test.
"""

from __future__ import annotations

import argparse
import statistics
import time

from picker.budget import budget
from picker.budget.montecarlo import monte_carlo
from picker.budget.pieces import stage_pieces, topology_of
from picker.filters import plan_stages
from picker.parts import Arrangement, Candidate, Piece, StageChoice
from stock.model import Capacitor, OpAmp, Resistor


def _piece(kind, value, tol):
    line = (
        Resistor(value=value, qty=20, tolerance=tol, tolerance_assumed=False, tempco=100e-6)
        if kind == "resistor"
        else Capacitor(
            value=value,
            qty=20,
            tolerance=tol,
            tolerance_assumed=False,
            dielectric="C0G",
            voltage=50.0,
        )
    )
    return Piece(line, value, tol)


def eighth_order_candidate() -> Candidate:
    """Butterworth 8th order at 1 kHz; every R1 a series pair and every C1 a parallel pair,
    so each stage has 6 pieces (24 in all)."""
    stages = []
    for topo, target in plan_stages(
        "lowpass", response="butterworth", order=8, fc_hz=1000.0, family="sallen-key"
    ):
        values = topo.synthesize(target)
        positions = []
        for spec in topo.positions:
            v = values[spec.name]
            tol = 0.01 if spec.kind == "resistor" else 0.05
            if spec.name == "R1":
                arr = Arrangement(
                    "series", (_piece("resistor", 0.7 * v, tol), _piece("resistor", 0.3 * v, tol))
                )
            elif spec.name == "C1":
                arr = Arrangement(
                    "parallel",
                    (_piece("capacitor", 0.6 * v, tol), _piece("capacitor", 0.4 * v, tol)),
                )
            else:
                arr = Arrangement("single", (_piece(spec.kind, v, tol),))
            positions.append((spec.name, arr))
        stages.append(StageChoice(topo.key, target, target, tuple(positions)))
    return Candidate(
        score=0.0,
        pieces=24,
        stages=tuple(stages),
        opamp=OpAmp(name="dual JFET-input, 3 MHz", gbw=3e6, qty=2, slew=13e6),
    )


def _time(fn, repeat):
    fn()  # warm up (imports, caches)
    runs = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        runs.append(time.perf_counter() - t0)
    return out, runs


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--trials", type=int, default=10_000)
    ap.add_argument("--repeat", type=int, default=7)
    args = ap.parse_args()
    cand = eighth_order_candidate()
    layout = [(topology_of(s.topology), stage_pieces(s), s) for s in cand.stages]
    window = {"f0": 0.05, "q": 0.05, "gain": 0.05}
    mc, mc_runs = _time(
        lambda: monte_carlo(layout, trials=args.trials, distribution="uniform", window=window),
        args.repeat,
    )
    b, all_runs = _time(lambda: budget(cand, trials=args.trials, vout_peak=5.0), args.repeat)
    print(
        f"8th-order low-pass, 4 stages, {sum(len(sp.pieces) for _, sp, _ in layout)} pieces, "
        f"{args.trials:,} trials"
    )
    print(
        f"  Monte Carlo only: best {min(mc_runs):.3f} s, median "
        f"{statistics.median(mc_runs):.3f} s  (goal <= 0.5 s)"
    )
    print(
        f"  whole budget():   best {min(all_runs):.3f} s, median "
        f"{statistics.median(all_runs):.3f} s"
    )
    print(
        f"  yield {mc.yield_:.4f} +/- {mc.std_error:.4f}; histogram: {mc.histogram.quantity}, "
        f"{sum(mc.histogram.counts)} counted, {mc.histogram.outside} outside the grid"
    )
    print(
        f"  stage 4 tolerance f0 {b.stages[3].tolerance.f0[0]:.1f}.."
        f"{b.stages[3].tolerance.f0[1]:.1f} Hz over {b.stages[3].tolerance.corners} corners"
    )


if __name__ == "__main__":
    main()
