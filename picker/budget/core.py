"""``budget(candidate, ...)``: the whole error budget of one candidate (docs/budget.md)."""

from __future__ import annotations

import math

from picker.budget import checks
from picker.budget.montecarlo import monte_carlo
from picker.budget.opamp import SHIFT_LIMIT, input_impedance, opamp_effects, too_slow
from picker.budget.pieces import evaluate, stage_pieces, topology_of
from picker.budget.records import Budget, StageBudget
from picker.budget.temperature import temperature
from picker.budget.tolerance import tolerance
from picker.errors import DesignError
from picker.parts import Candidate
from stock.values import format_si

DISTRIBUTIONS = ("uniform", "normal")


def _window(window) -> dict[str, float]:
    if isinstance(window, dict):
        unknown = set(window) - {"f0", "q", "gain"}
        if unknown:
            raise DesignError(
                f"window {window!r}: unknown key(s) {sorted(unknown)}; use f0, q, gain"
            )
        out = {k: window.get(k, 0.05) for k in ("f0", "q", "gain")}
    else:
        out = {k: window for k in ("f0", "q", "gain")}
    for k, v in out.items():
        if (
            isinstance(v, bool)
            or not isinstance(v, int | float)
            or not (0 < v < 10)
            or not math.isfinite(v)
        ):
            raise DesignError(f"window {k}={v!r}: must be a fraction above 0 (0.05 = 5 %)")
    return {k: float(v) for k, v in out.items()}


def _check_args(trials, distribution, temp, supply, vout_peak, seed=0):
    if isinstance(trials, bool) or not isinstance(trials, int) or trials < 1:
        raise DesignError(f"trials {trials!r}: must be a whole number of at least 1")
    if isinstance(seed, bool) or not isinstance(seed, int) or seed < 0:
        raise DesignError(f"seed {seed!r}: must be a whole number of at least 0")
    if distribution not in DISTRIBUTIONS:
        raise DesignError(f"distribution {distribution!r}: use uniform or normal")
    try:
        lo, hi = (float(t) for t in temp)
    except (TypeError, ValueError):
        raise DesignError(f"temp {temp!r}: must be (low, high) in degrees C") from None
    if not (math.isfinite(lo) and math.isfinite(hi)) or lo > hi or lo < -273.15:
        raise DesignError(f"temp {temp!r}: must be (low, high) with low <= high, in degrees C")
    for name, v in (("supply", supply), ("vout_peak", vout_peak)):
        if v is not None and not (isinstance(v, int | float) and math.isfinite(v) and v > 0):
            raise DesignError(f"{name} {v!r}: must be a voltage above 0")
    return lo, hi


def _rel(a, b):
    return None if a is None or b is None else a / b - 1.0


def budget(
    candidate: Candidate,
    *,
    trials: int = 10000,
    distribution: str = "uniform",
    window=0.05,
    temp=(0.0, 70.0),
    supply: float | None = None,
    vout_peak: float | None = None,
    seed: int = 0,
) -> Budget:
    """Error budget of ``candidate``: value error, tolerance corners, Monte Carlo yield,
    temperature drift, op-amp effects and practical warnings.

    Parameters
    ----------
    candidate : Candidate
    trials : int
        Monte Carlo trials (default 10,000).
    distribution : {"uniform", "normal"}
        Each piece uniform within its tolerance, or normal with tolerance = 3 sigma.
    window : float or dict
        Relative window around each stage's TARGET f0, Q and gain for the yield; one
        fraction for all three, or ``{"f0": .., "q": .., "gain": ..}`` (missing keys 0.05).
    temp : (float, float)
        Temperature span in degrees C (reference 25 C).
    supply : float, optional
        Total supply in volts, for capacitor voltage ratings and the op amp's maximum.
    vout_peak : float, optional
        Peak output in volts, for the slew-rate limit.
    seed : int
        Seed of ``numpy.random.default_rng``.
    """
    win = _window(window)
    span = _check_args(trials, distribution, temp, supply, vout_peak, seed)
    if not candidate.stages:
        raise DesignError("candidate has no stages")
    opamp = candidate.opamp
    layout, records, warnings = [], [], []
    for i, choice in enumerate(candidate.stages):
        topo = topology_of(choice.topology)
        sp = stage_pieces(choice)
        missing = set(topo.position_names()) - {s.name for s in sp.slots}
        if missing:
            raise DesignError(
                f"stage {i + 1} ({choice.topology}): positions {sorted(missing)} are not filled"
            )
        layout.append((topo, sp, choice))
        values = {k: float(v) for k, v in sp.positions(sp.nominal).items()}
        f0_a, q_a, gain_a = evaluate(topo, values)
        f0, gain = float(f0_a[()]), float(gain_a[()])
        q = None if q_a is None else float(q_a[()])
        tol = tolerance(topo, sp, sets_gain=topo.sets_gain, seed=seed + i)
        if tol.q is not None and not (0 < tol.q[0] <= tol.q[1] < math.inf):
            warnings.append(
                f"Stage {i + 1}: within the parts' tolerance the stage can become "
                f"unstable (Q reaches {tol.q[0]:.3g}..{tol.q[1]:.3g}; a negative "
                "or unbounded Q oscillates); lower the gain or use closer parts."
            )
        if not tol.exhaustive:
            warnings.append(f"Stage {i + 1}: {tol.method}; the tolerance range may be narrow.")
        tp = temperature(topo, sp, span, sets_gain=topo.sets_gain)
        outside = [d.label for d in tp.pieces if d.outside_rated]
        if outside:
            warnings.append(
                f"Stage {i + 1}: {span[0]:g}..{span[1]:g} C leaves the rated "
                f"temperature range of {', '.join(outside)}."
            )
        oa = None
        if opamp is not None:
            oa = opamp_effects(topo, values, (f0, q, gain), opamp, vout_peak=vout_peak)
            warnings.extend(_opamp_warnings(i, topo, oa, f0))
        zin = None
        if i == 0:
            zin = input_impedance(topo, values, f0, None if opamp is None else opamp.gbw)
        t, a = choice.target, choice.achieved
        records.append(
            StageBudget(
                index=i,
                topology=choice.topology,
                response_type=topo.response_type,
                order=topo.order,
                target=t,
                achieved=a,
                value_error=(_rel(a.f0_hz, t.f0_hz), _rel(a.q, t.q), _rel(a.gain, t.gain)),
                tolerance=tol,
                temperature=tp,
                opamp=oa,
                input_impedance=zin,
            )
        )
    mc = monte_carlo(layout, trials=trials, distribution=distribution, window=win, seed=seed)
    sps = [sp for _, sp, _ in layout]
    warnings.extend(checks.part_checks(sps, opamp=opamp, supply=supply))
    if opamp is None:
        warnings.append("No op amp chosen: the op amp is taken as ideal (no GBW or slew check).")
    elif vout_peak is None:
        warnings.append("No peak output voltage given: the slew-rate limit is not checked.")
    if records[0].input_impedance is not None:
        warnings.append(checks.input_note(*records[0].input_impedance))
    caution = checks.caution(sps, supply=supply)
    if caution:
        warnings.append(caution)
    return Budget(
        stages=tuple(records),
        monte_carlo=mc,
        warnings=tuple(warnings),
        opamp_name=None if opamp is None else opamp.name,
        supply=supply,
        vout_peak=vout_peak,
    )


def _opamp_warnings(i, topo, oa, f0) -> list[str]:
    out = []
    if too_slow(oa):
        moved = [f"f0 by {oa.shift[0]:+.1%}"]
        if oa.shift[1] is not None:
            moved.append(f"Q by {oa.shift[1]:+.1%}")
        moved.append(f"gain by {oa.shift[2]:+.1%}")
        worst = max(abs(x) for x in oa.shift if x is not None)
        out.append(
            f"Stage {i + 1}: op amp too slow: its GBW {format_si(oa.gbw_hz, 'Hz')} moves "
            + ", ".join(moved)
            + f" (more than {SHIFT_LIMIT:.0%}; the stage's noise gain at f0 is "
            f"{oa.noise_gain:.3g}, from the circuit); an op amp of about "
            f"{format_si(oa.gbw_hz * worst / SHIFT_LIMIT, 'Hz')} GBW or more keeps it "
            f"within {SHIFT_LIMIT:.0%} (the shift falls about as 1/GBW)."
        )
    fp = oa.full_power_hz
    if fp is not None:
        need = f0 if topo.response_type != "highpass" else 10.0 * f0
        if fp < need:
            edge = (
                "f0"
                if topo.response_type != "highpass"
                else "10 x f0 (a high-pass passes everything above f0)"
            )
            out.append(
                f"Stage {i + 1}: slew-rate limit: full-power bandwidth SR/(2 pi Vp) = "
                f"{format_si(fp, 'Hz')} at {format_si(oa.vout_peak, 'V')} peak is below "
                f"{edge} = {format_si(need, 'Hz')}."
            )
    return out
