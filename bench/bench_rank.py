"""The three rankings side by side on the sample bench (run by hand:
``.venv/bin/python bench/bench_rank.py``).

For each design: rank 1's pieces, worst error, Monte Carlo yield (10,000 trials,
uniform, window +/-5 % on f0, Q and gain: the error budget's defaults) and the wall
time of the search, for ``--rank pieces`` (goal 0.5 %), ``error`` and ``yield``, each
with the command line's time limit (10 s) and its look-alike policy. The yield of the
``pieces`` and ``error`` rank 1 is the budget's Monte Carlo on that candidate.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from picker.budget import budget  # noqa: E402
from picker.filters import plan_stages  # noqa: E402
from picker.search import search  # noqa: E402
from picker.search.yieldrank import search as by_yield  # noqa: E402
from stock.file import load  # noqa: E402

SAMPLE = Path(__file__).resolve().parent.parent / "picker" / "data" / "sample_inventory.toml"
TRIALS = 10_000
WINDOW = 0.05
LIMIT = 10.0

DESIGNS = [
    (
        "1st-order inverting 30 Hz gain 200",
        dict(response_type="lowpass", order=1, fc_hz=30.0, gain=200.0, family="inverting"),
    ),
    ("2nd-order Butterworth 1 kHz", dict(response_type="lowpass", order=2, fc_hz=1000.0)),
    (
        "3rd-order Chebyshev HP 300 Hz 1 dB",
        dict(response_type="highpass", order=3, fc_hz=300.0, response="chebyshev", ripple_db=1.0),
    ),
    ("band-pass 1 kHz Q 5", dict(response_type="bandpass", fc_hz=1000.0, q=5.0, order=None)),
    ("8th-order Butterworth 1 kHz", dict(response_type="lowpass", order=8, fc_hz=1000.0)),
]


def run(stock, stages, mode):
    start = time.monotonic()
    kw = dict(top=1, for_people=True, tradeoff=False, time_limit=LIMIT)
    if mode == "yield":
        result = by_yield(stock, stages, window=WINDOW, trials=TRIALS, **kw)
        elapsed = time.monotonic() - start
        return result.candidates[0], result.yields[0].value, elapsed, result
    result = search(stock, stages, rank=mode, **kw)
    elapsed = time.monotonic() - start
    first = result.candidates[0]
    mc = budget(first, trials=TRIALS, window=WINDOW, seed=0).monte_carlo
    return first, mc.yield_, elapsed, result


def main() -> None:
    stock = load(SAMPLE)
    print(f"sample bench: {SAMPLE.name}; yield: {TRIALS} trials, window +/-{WINDOW:.0%}")
    head = f"{'design':36} {'mode':6} {'pieces':>6} {'worst error':>12} {'yield':>7}"
    print(head + f" {'time':>7}  proven")
    for name, spec in DESIGNS:
        spec = dict(spec)
        rtype = spec.pop("response_type")
        stages = plan_stages(rtype, **spec)
        for mode in ("pieces", "error", "yield"):
            first, y, elapsed, result = run(stock, stages, mode)
            proven = getattr(result, "proven", None)
            print(
                f"{name:36} {mode:6} {first.pieces:6d} {100 * first.score:11.4f}% "
                f"{100 * y:6.1f}% {elapsed:6.2f}s  {proven}",
                flush=True,
            )


if __name__ == "__main__":
    main()
