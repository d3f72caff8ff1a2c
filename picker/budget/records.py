"""Frozen records of an error budget, and their JSON form (docs/cli.md, docs/search.md)."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from picker.budget.montecarlo import MonteCarloResult
from picker.budget.opamp import OpampResult
from picker.budget.temperature import TemperatureResult
from picker.budget.tolerance import ToleranceResult
from picker.parts import StageTarget


def _num(x):
    """JSON-ready float (None for None, NaN or infinity)."""
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


def _rng(r):
    return None if r is None else [_num(r[0]), _num(r[1])]


@dataclass(frozen=True)
class StageBudget:
    index: int  # 0-based position in the cascade
    topology: str
    response_type: str
    order: int
    target: StageTarget
    achieved: StageTarget
    value_error: tuple[float, float | None, float | None]  # relative (f0, q, gain)
    tolerance: ToleranceResult
    temperature: TemperatureResult
    opamp: OpampResult | None
    input_impedance: tuple[float, float] | None  # (lowest ohm, at Hz), stage 1


@dataclass(frozen=True)
class Budget:
    stages: tuple[StageBudget, ...]
    monte_carlo: MonteCarloResult
    warnings: tuple[str, ...]
    opamp_name: str | None
    supply: float | None
    vout_peak: float | None

    # JSON -----------------------------------------------------------------------
    def stage_json(self, i: int) -> dict:
        """The per-stage ``budget`` object of the design JSON (docs/search.md).

        Keys: ``tolerance`` (corner ranges, how found), ``temperature`` (ranges over the
        span, the figure used per piece), ``opamp`` (ideal vs finite GBW, slew), plus
        ``value_error`` (achieved / target - 1), ``sensitivity`` (d ln y / d ln x per
        position) and, for stage 1, ``input_impedance``.
        """
        s = self.stages[i]
        t, tp = s.tolerance, s.temperature
        tol = {
            "f0": _rng(t.f0),
            "gain": _rng(t.gain),
            "q": _rng(t.q),
            "corners": t.corners,
            "exhaustive": t.exhaustive,
            "method": t.method,
        }
        temp = {
            "span_c": [_num(tp.span_c[0]), _num(tp.span_c[1])],
            "reference_c": 25.0,
            "f0": _rng(tp.f0),
            "gain": _rng(tp.gain),
            "q": _rng(tp.q),
            "parts": {
                d.label: {
                    "change": [_num(d.lo), _num(d.hi)],
                    "figure": d.figure,
                    "assumed": d.assumed,
                }
                for d in tp.pieces
            },
        }
        oa: dict[str, Any]
        if s.opamp is None:
            oa = {"model": "ideal", "note": "no op amp chosen: finite-GBW effects not computed"}
        else:
            o = s.opamp
            oa = {
                "model": "single-pole",
                "name": o.name,
                "gbw_hz": _num(o.gbw_hz),
                "ideal": dict(zip(("f0", "q", "gain"), map(_num, o.ideal), strict=False)),
                "with_gbw": dict(zip(("f0", "q", "gain"), map(_num, o.real), strict=False)),
                "shift": dict(zip(("f0", "q", "gain"), map(_num, o.shift), strict=False)),
                "gbw_needed_hz": _num(o.gbw_needed_hz),
                "noise_gain": _num(o.noise_gain),
                "slew_v_per_s": _num(o.slew),
                "vout_peak": _num(o.vout_peak),
                "full_power_hz": _num(o.full_power_hz),
            }
        out = {
            "tolerance": tol,
            "temperature": temp,
            "opamp": oa,
            "value_error": {
                "f0": _num(s.value_error[0]),
                "q": _num(s.value_error[1]),
                "gain": _num(s.value_error[2]),
            },
            "sensitivity": {
                name: {"f0": _num(a), "q": _num(b), "gain": _num(c)}
                for name, a, b, c in t.sensitivities
            },
        }
        if s.input_impedance is not None:
            out["input_impedance"] = {
                "lowest_ohm": _num(s.input_impedance[0]),
                "at_hz": _num(s.input_impedance[1]),
            }
        return out

    def candidate_json(self) -> dict:
        """The candidate-level ``budget`` object of the design JSON, docs/search.md."""
        return {"monte_carlo": self.monte_carlo.to_json()}

    def to_json(self) -> dict:
        return {
            "stages": [self.stage_json(i) for i in range(len(self.stages))],
            **self.candidate_json(),
            "warnings": list(self.warnings),
        }
