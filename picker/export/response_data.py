"""The response of a saved design as data: what ``picker plot`` draws and writes as CSV.

* the magnitude (dB) and phase (degrees, unwrapped from the low end) of the whole
  cascade from the nodal analysis, the op amp's gain-bandwidth included when the design
  names one; 400 points from a hundredth of the lowest stage f0 to a hundred times the
  highest, equally spaced in log frequency;
* the tolerance band: at each frequency the lowest and the highest magnitude over the
  corners of every piece's tolerance (every corner of a stage up to 16 pieces, as in
  picker.budget.tolerance; the stages vary on their own, so the cascade's extremes are
  the sums of the stages' extremes in dB). The corners move the analytic sections
  (picker.budget.cascade), and the band is that deviation laid on the nodal curve;
* the target corner (the request's fc; band-pass: its centre) and the -3 dB point of
  the computed curve (band-pass: its peak).

Contracts: docs/outputs.md. numpy is needed here; only ``picker plot`` imports this.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from types import SimpleNamespace
from typing import Any

import numpy as np

from picker.errors import DesignError
from picker.export.design_file import SavedDesign

POINTS = 400
CSV_HEADER = ("frequency_hz", "magnitude_db", "phase_deg", "tolerance_low_db", "tolerance_high_db")


@dataclass(frozen=True)
class ResponseData:
    f_hz: np.ndarray
    magnitude_db: np.ndarray
    phase_deg: np.ndarray
    band_low_db: np.ndarray
    band_high_db: np.ndarray
    response_type: str  # "lowpass" | "highpass" | "bandpass"
    target_hz: float | None  # the request's fc (band-pass: centre); None if not recorded
    corner_hz: float | None  # -3 dB point of the curve (band-pass: the peak)
    corners_note: str  # how the band was found, in words


def _netlists(design: SavedDesign):
    from picker.filters import get_topology

    topologies = []
    for s, stage in enumerate(design.stages, start=1):
        try:
            topologies.append(get_topology(stage.topology))
        except DesignError as exc:
            raise DesignError(f"stage {s}: {exc}") from None
    nets = [t.netlist(st.values()) for t, st in zip(topologies, design.stages, strict=True)]
    return topologies, nets


def frequency_grid(design: SavedDesign, points: int = POINTS) -> np.ndarray:
    f0s = [st.achieved.f0_hz for st in design.stages] + [st.target.f0_hz for st in design.stages]
    return np.geomspace(min(f0s) / 100.0, max(f0s) * 100.0, points)


def nominal_response(design: SavedDesign, f_hz) -> np.ndarray:
    """Complex H of the whole design at ``f_hz`` (nodal analysis, the op amp's GBW in)."""
    from picker.analysis import cascade_response

    _, nets = _netlists(design)
    gbw = design.opamp.gbw_hz if design.opamp is not None else None
    return cascade_response(nets, np.asarray(f_hz, dtype=float), gbw)


def _stage_pieces(stage):
    """The budget's piece layout of a saved stage (same fields as a search StageChoice)."""
    from picker.budget.pieces import stage_pieces

    positions = []
    for p in stage.positions:
        if not p.parts:  # kept (a repair): the part on the board, with its tolerance if known
            piece = SimpleNamespace(value=p.value, tolerance=p.kept_tolerance or 0.0)
            p = SimpleNamespace(arrangement="single", kind=p.kind, parts=(piece,), name=p.name)
        positions.append((p.name, p))
    shaped: Any = SimpleNamespace(positions=tuple(positions))
    return stage_pieces(shaped)


def tolerance_band_db(design: SavedDesign, f_hz: np.ndarray) -> tuple[np.ndarray, np.ndarray, str]:
    """(low, high) deviation in dB from the nominal sections over the tolerance corners."""
    from picker.budget.cascade import magnitude_db
    from picker.budget.pieces import evaluate
    from picker.budget.tolerance import MAX_CORNER_PIECES, box_values, corner_matrix

    topologies, _ = _netlists(design)
    low = np.zeros(len(f_hz))
    high = np.zeros(len(f_hz))
    sampled = []
    rng = np.random.default_rng(0)
    for s, (topo, stage) in enumerate(zip(topologies, design.stages, strict=True), start=1):
        sp = _stage_pieces(stage)
        n = len(sp.pieces)
        if n <= MAX_CORNER_PIECES:
            signs = corner_matrix(n)
        else:
            signs = rng.choice([-1.0, 1.0], size=(2**MAX_CORNER_PIECES, n))
            sampled.append(s)
        nom, tol = sp.nominal, sp.tolerance
        values = box_values(nom * (1 - tol), nom * (1 + tol), signs)
        f0, q, gain = evaluate(topo, sp.positions(values))
        corners = magnitude_db([(topo, f0, q, gain)], f_hz)
        f0n, qn, gn = evaluate(topo, sp.positions(nom[None, :]))
        nominal = magnitude_db([(topo, f0n, qn, gn)], f_hz)[0]
        with np.errstate(invalid="ignore"):
            dev = corners - nominal[None, :]
        low += np.nanmin(dev, axis=0)
        high += np.nanmax(dev, axis=0)
    note = "every corner of each stage's piece tolerances"
    if sampled:
        which = ", ".join(map(str, sampled))
        note += f" (stage {which}: {2**MAX_CORNER_PIECES} seeded random corners)"
    return low, high, note


def response_data(design: SavedDesign, *, points: int = POINTS) -> ResponseData:
    """Everything ``picker plot`` shows of ``design`` (see the module docstring)."""
    from picker.analysis import corner_hz, magnitude_db, phase_deg

    topologies, _ = _netlists(design)
    kinds = {t.response_type for t in topologies}
    if len(kinds) != 1:
        raise DesignError(f"the stages mix {', '.join(sorted(kinds))}; one kind expected")
    kind = kinds.pop()
    f = frequency_grid(design, points)
    h = nominal_response(design, f)
    mag = magnitude_db(h)
    low, high, note = tolerance_band_db(design, f)
    corner: float | None
    if kind == "bandpass":
        corner = float(f[int(np.argmax(mag))])
    else:
        try:
            corner = corner_hz(f, h)
        except DesignError:
            corner = None
    target = design.request.get("fc_hz")
    target_hz = float(target) if isinstance(target, (int, float)) and target > 0 else None
    return ResponseData(
        f_hz=f,
        magnitude_db=mag,
        phase_deg=phase_deg(h),
        band_low_db=mag + low,
        band_high_db=mag + high,
        response_type=kind,
        target_hz=target_hz,
        corner_hz=corner,
        corners_note=note,
    )


def response_csv(data: ResponseData) -> str:
    """The curve as CSV (RFC 4180 line ends, a header row; numbers to 9 significant digits)."""
    from picker.export.bom import csv_text

    columns = (data.f_hz, data.magnitude_db, data.phase_deg, data.band_low_db, data.band_high_db)
    return csv_text(CSV_HEADER, ([_num(x) for x in row] for row in zip(*columns, strict=True)))


def _num(x: float) -> str:
    return f"{x:.9g}" if math.isfinite(x) else ""
