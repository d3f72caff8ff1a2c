"""Plain JSON-able data of an analysis and of a substitution (``--json``; docs/repair.md).

Numbers are SI floats (hertz, ohm, farad); relative errors are fractions; a value that
does not apply is null. No rich, no textual.
"""

from __future__ import annotations

import math

from picker.repair.safety import CAUTIONS


def _num(x) -> float | None:
    if x is None:
        return None
    x = float(x)
    return x if math.isfinite(x) else None


def _pair(r) -> list | None:
    return None if r is None else [_num(r[0]), _num(r[1])]


def stage_json(s) -> dict:
    """One ``picker.repair.analyse.StageAnalysis``."""
    pieces = []
    for label, piece in zip(s.pieces.labels, s.pieces.pieces, strict=True):
        pieces.append(
            {
                "label": label,
                "kind": piece.kind,
                "value": piece.value,
                "tolerance": piece.tolerance,
                "tolerance_assumed": label in s.assumed,
            }
        )
    c = s.corners
    out = {
        "topology": s.topology,
        "response_type": s.response_type,
        "order": s.order,
        "sets_gain": s.sets_gain,
        "inverting": s.inverting,
        "values": dict(s.values),
        "pieces": pieces,
        "f0_hz": _num(s.f0_hz),
        "q": _num(s.q),
        "gain": _num(s.gain),
        "tolerance": {
            "f0_hz": _pair(c.f0),
            "q": _pair(c.q),
            "gain": _pair(c.gain),
            "method": c.method,
            "exhaustive": c.exhaustive,
            "sensitivities": {
                name: {"f0": _num(f), "q": _num(q), "gain": _num(g)}
                for name, f, q, g in c.sensitivities
            },
        },
        "opamp": None,
    }
    if s.opamp is not None:
        o = s.opamp
        out["opamp"] = {
            "gbw_hz": o.gbw_hz,
            "ideal": {"f0_hz": _num(o.ideal[0]), "q": _num(o.ideal[1]), "gain": _num(o.ideal[2])},
            "real": {"f0_hz": _num(o.real[0]), "q": _num(o.real[1]), "gain": _num(o.real[2])},
            "shift": {"f0": _num(o.shift[0]), "q": _num(o.shift[1]), "gain": _num(o.shift[2])},
            "gbw_needed_hz": _num(o.gbw_needed_hz),
        }
    return out


def analysis_json(a) -> dict:
    """One ``picker.repair.analyse.Analysis``: stages, overall response, cautions."""
    r = a.response
    return {
        "mode": "analyse",
        "gbw_hz": a.gbw_hz,
        "stages": [stage_json(s) for s in a.stages],
        "response": {
            "corner_hz": _num(r.corner_hz),
            "band_hz": _pair(r.band_hz),
            "reference_db": _num(r.reference_db),
            "freqs_hz": [float(f) for f in r.freqs_hz],
            "magnitude_db": [_num(m) for m in r.magnitude_db],
            "phase_deg": [_num(p) for p in r.phase_deg],
        },
        "safety": list(CAUTIONS),
    }


def _arrangement_json(arr) -> dict:
    return {
        "arrangement": arr.arrangement,
        "value": arr.value,
        "pieces": [
            {
                "kind": p.kind,
                "value": p.value,
                "tolerance": p.tolerance,
                "measured": p.measured,
                "location": p.location,
                "stock_line": p.line.line,
                "stock_index": p.line.index,
                "dielectric": getattr(p.line, "dielectric", None),
                "polarized": bool(getattr(p.line, "polarized", False)),
                "voltage": getattr(p.line, "voltage", None),
            }
            for p in arr.parts
        ],
    }


def substitution_json(sub) -> dict:
    """One ``picker.repair.substitute.Substitution``: intended values and ranked options."""
    t = sub.intended
    return {
        "mode": "substitute",
        "topology": sub.stage.topology,
        "marked": {
            p.name: {
                "value": p.value,
                "tolerance": p.tolerance,
                "tolerance_assumed": p.assumed,
                "kind": p.kind,
            }
            for p in sub.stage.parts
        },
        "refill": list(sub.refill),
        "intended": {"f0_hz": t.f0_hz, "q": t.q, "gain": t.gain},
        "allow_polarized": sub.allow_polarized,
        "options": [
            {
                "rank": i,
                "worst_error": o.score,
                "pieces": o.pieces,
                "achieved": {"f0_hz": o.achieved.f0_hz, "q": o.achieved.q, "gain": o.achieved.gain},
                "errors": {"f0": o.errors[0], "q": o.errors[1], "gain": o.errors[2]},
                "positions": {name: _arrangement_json(arr) for name, arr in o.refilled},
            }
            for i, o in enumerate(sub.options, start=1)
        ],
        "safety": list(CAUTIONS),
    }
