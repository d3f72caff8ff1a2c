"""What a stage (or a cascade of stages) does as built: f0, Q, gain, response, corners.

The numbers come from the project's own pieces, so they are the same the design side
reports: f0, Q and gain from the topology's closed forms (``Topology.characteristics``),
the response from nodal analysis of the topology's netlist (``picker.analysis``), the
tolerance extremes and sensitivities from ``picker.budget.tolerance`` (every piece on its
own at the ends of its tolerance band) and the op amp's gain-bandwidth shift from
``picker.budget.opamp`` (single-pole op amp, dominant poles). No rich, no textual here.
See docs/repair.md.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import ClassVar

import numpy as np

from picker.budget.pieces import Slot, StagePieces, evaluate
from picker.errors import DesignError
from picker.parts import Piece
from picker.repair.marked import MarkedStage, topology_of
from stock.model import Capacitor, OpAmp, Resistor

ON_BOARD = "on the board"  # the location shown for a piece that is in the circuit already
POINTS_PER_DECADE = 40
SPAN = 100.0  # the response is drawn from f0 / SPAN to f0 x SPAN


@dataclass(frozen=True)
class Corners:
    """Extremes of f0 (Hz), Q and gain with every piece at the ends of its tolerance."""

    f0: tuple[float, float]
    q: tuple[float, float] | None
    gain: tuple[float, float]
    method: str
    exhaustive: bool
    sensitivities: tuple[tuple[str, float, float | None, float], ...]  # d ln y / d ln x


@dataclass(frozen=True)
class OpampShift:
    """What an op amp of ``gbw_hz`` does to the stage (``picker.budget.opamp``)."""

    gbw_hz: float
    ideal: tuple[float, float | None, float]
    real: tuple[float, float | None, float]
    shift: tuple[float, float | None, float]  # real / ideal - 1
    gbw_needed_hz: float  # the common-practice rule of the budget


@dataclass(frozen=True)
class StageAnalysis:
    topology: str
    response_type: str
    order: int
    sets_gain: bool
    inverting: bool
    pieces: StagePieces
    assumed: tuple[str, ...]  # labels of the pieces whose tolerance was assumed
    f0_hz: float
    q: float | None
    gain: float  # magnitude; passband (centre for a band-pass)
    corners: Corners
    opamp: OpampShift | None
    values: dict[str, float]


@dataclass(frozen=True)
class Response:
    freqs_hz: np.ndarray
    h: np.ndarray  # complex
    magnitude_db: np.ndarray
    phase_deg: np.ndarray
    corner_hz: float | None  # -3 dB (half power) below the passband level
    band_hz: tuple[float, float] | None  # -3 dB below the peak on each side, band shapes
    reference_db: float  # the level the corner is measured from


@dataclass(frozen=True)
class Analysis:
    stages: tuple[StageAnalysis, ...]
    response: Response
    gbw_hz: float | None


@dataclass(frozen=True)
class BoardResistor(Resistor):
    """A resistor in the circuit already, not a stock line (a saved design keeps it)."""

    on_board: ClassVar[bool] = True


@dataclass(frozen=True)
class BoardCapacitor(Capacitor):
    """A capacitor in the circuit already, not a stock line (a saved design keeps it)."""

    on_board: ClassVar[bool] = True


def board_piece(kind: str, value: float, tolerance: float) -> Piece:
    """A piece that is in the circuit already (not from the stock): location "on the board"."""
    cls = BoardResistor if kind == "resistor" else BoardCapacitor
    line = cls(value, 1, tolerance=tolerance, tolerance_assumed=False, location=ON_BOARD)
    return Piece(line=line, value=float(value), tolerance=float(tolerance))


def marked_pieces(stage: MarkedStage) -> tuple[StagePieces, tuple[str, ...]]:
    """One board piece per position of a marked stage, and the names with an assumed tolerance."""
    slots, pieces = [], []
    for i, p in enumerate(stage.parts):
        slots.append(Slot(p.name, p.kind, "single", (i,)))
        pieces.append(board_piece(p.kind, p.value, p.tolerance))
    labels = tuple(p.name for p in stage.parts)
    assumed = tuple(p.name for p in stage.parts if p.assumed)
    return StagePieces(tuple(slots), tuple(pieces), labels), assumed


def analyse_stage(
    topology_key: str,
    sp: StagePieces,
    *,
    assumed: Sequence[str] = (),
    gbw_hz: float | None = None,
    seed: int = 0,
) -> StageAnalysis:
    """f0, Q, gain, tolerance extremes and the op-amp shift of one stage."""
    from picker.budget.opamp import opamp_effects
    from picker.budget.tolerance import tolerance

    topo = topology_of(topology_key)
    nominal = sp.positions(sp.nominal)
    values = {k: float(v) for k, v in nominal.items()}
    f0_a, q_a, gain_a = evaluate(topo, nominal)
    f0, gain = float(f0_a[()]), float(gain_a[()])
    q = None if q_a is None else float(q_a[()])
    tol = tolerance(topo, sp, sets_gain=True, seed=seed)
    corners = Corners(
        f0=tol.f0,
        q=tol.q,
        gain=tol.gain if tol.gain is not None else (gain, gain),
        method=tol.method,
        exhaustive=tol.exhaustive,
        sensitivities=tol.sensitivities,
    )
    shift = None
    if gbw_hz is not None:
        if q is not None and not (0 < q < math.inf):
            raise DesignError(
                f"{topo.key}: Q is {q:g}, the stage is not stable as marked; "
                "the op-amp shift is not defined (leave out --gbw)"
            )
        oa = opamp_effects(topo, values, (f0, q, gain), OpAmp("given op amp", float(gbw_hz), 1))
        shift = OpampShift(oa.gbw_hz, oa.ideal, oa.real, oa.shift, oa.gbw_needed_hz)
    return StageAnalysis(
        topology=topo.key,
        response_type=topo.response_type,
        order=topo.order,
        sets_gain=topo.sets_gain,
        inverting=topo.inverting,
        pieces=sp,
        assumed=tuple(assumed),
        f0_hz=f0,
        q=q,
        gain=gain,
        corners=corners,
        opamp=shift,
        values=values,
    )


def frequency_grid(f0s: Sequence[float], points_per_decade: int = POINTS_PER_DECADE) -> np.ndarray:
    """Log grid from the lowest f0 / SPAN to the highest f0 x SPAN, whole decades."""
    lo = 10.0 ** math.floor(math.log10(min(f0s) / SPAN))
    hi = 10.0 ** math.ceil(math.log10(max(f0s) * SPAN))
    n = int(round(math.log10(hi / lo) * points_per_decade)) + 1
    return np.geomspace(lo, hi, n)


def read_response(freqs_hz: np.ndarray, h: np.ndarray, evaluate=None) -> Response:
    """dB, phase and the -3 dB points of a computed response.

    A shape whose peak stands more than 3 dB above both ends of the grid is a band
    (band-pass, or a low-pass and a high-pass in cascade): its two half-power points
    below the peak are given. Otherwise the corner is the half-power point below the
    passband end of the grid (``picker.analysis.corner_hz``). ``evaluate`` (frequencies
    in hertz -> complex H), when given, refines the peak and each crossing between its
    two grid neighbours (``scipy.optimize``), so they do not depend on the grid.
    """
    from picker.analysis import HALF_POWER_DB, corner_hz, magnitude_db, phase_deg

    mag = magnitude_db(h)
    peak = int(np.argmax(mag))
    band = None
    corner = None

    def refine(f_est: float, level_db: float) -> float:
        if evaluate is None:
            return f_est
        return _crossing(evaluate, freqs_hz, f_est, level_db)

    if mag[peak] - max(mag[0], mag[-1]) > -HALF_POWER_DB:
        ref = _peak_db(evaluate, freqs_hz, mag, peak)
        try:
            lo = corner_hz(freqs_hz[: peak + 1], h[: peak + 1], reference=10 ** (ref / 20))
            hi = corner_hz(freqs_hz[peak:], h[peak:], reference=10 ** (ref / 20))
            band = (refine(lo, ref + HALF_POWER_DB), refine(hi, ref + HALF_POWER_DB))
        except DesignError:
            band = None
    else:
        ref = float(max(mag[0], mag[-1]))
        try:
            corner = refine(corner_hz(freqs_hz, h), ref + HALF_POWER_DB)
        except DesignError:
            corner = None
    return Response(freqs_hz, h, mag, phase_deg(h), corner, band, ref)


def _db(evaluate, f_hz: float) -> float:
    return float(20.0 * np.log10(np.abs(evaluate(np.array([f_hz]))[0])))


def _peak_db(evaluate, freqs_hz: np.ndarray, mag: np.ndarray, i: int) -> float:
    """The largest magnitude in dB near grid point ``i`` (refined when ``evaluate`` given)."""
    if evaluate is None or i == 0 or i == len(freqs_hz) - 1:
        return float(mag[i])
    from scipy.optimize import minimize_scalar

    a, b = np.log10(freqs_hz[i - 1]), np.log10(freqs_hz[i + 1])
    res = minimize_scalar(
        lambda x: -_db(evaluate, 10.0**x), bounds=(a, b), method="bounded",
        options={"xatol": 1e-10},
    )  # fmt: skip
    return float(max(mag[i], -res.fun))


def _crossing(evaluate, freqs_hz: np.ndarray, f_est: float, level_db: float) -> float:
    """The frequency near ``f_est`` where the magnitude equals ``level_db`` exactly."""
    from scipy.optimize import brentq

    j = int(np.clip(np.searchsorted(freqs_hz, f_est), 1, len(freqs_hz) - 1))
    a, b = np.log10(freqs_hz[j - 1]), np.log10(freqs_hz[j])

    def g(x):
        return _db(evaluate, 10.0**x) - level_db

    if g(a) * g(b) > 0:
        return f_est
    return float(10.0 ** brentq(g, a, b, xtol=1e-13))


def analyse(
    stages: Sequence[tuple[str, StagePieces, Sequence[str]]],
    *,
    gbw_hz: float | None = None,
) -> Analysis:
    """Every stage on its own, and the overall response of the cascade in signal order.

    ``stages``: (topology key, pieces, labels with an assumed tolerance) per stage. The
    stages do not load each other (each is driven by an op amp output).
    """
    from picker.analysis import cascade_response

    if not stages:
        raise DesignError("nothing to analyse: give a topology and its values, or --stage")
    if gbw_hz is not None and not (math.isfinite(gbw_hz) and gbw_hz > 0):
        raise DesignError(f"--gbw: must be a positive frequency, got {gbw_hz!r}")
    results = tuple(
        analyse_stage(key, sp, assumed=assumed, gbw_hz=gbw_hz, seed=i)
        for i, (key, sp, assumed) in enumerate(stages)
    )
    f0s = [r.f0_hz for r in results]
    if not all(math.isfinite(f) and f > 0 for f in f0s):
        raise DesignError("a stage has no finite f0 with these values")
    freqs = frequency_grid(f0s)
    nets = [topology_of(r.topology).netlist(r.values) for r in results]
    h = cascade_response(nets, freqs, gbw_hz=gbw_hz)

    def evaluate(f):
        return cascade_response(nets, f, gbw_hz=gbw_hz)

    return Analysis(results, read_response(freqs, h, evaluate), gbw_hz)


def analyse_marked(stages: Sequence[MarkedStage], *, gbw_hz: float | None = None) -> Analysis:
    """``analyse`` of stages as marked (one board piece per position)."""
    items = []
    for st in stages:
        sp, assumed = marked_pieces(st)
        items.append((st.topology, sp, assumed))
    return analyse(items, gbw_hz=gbw_hz)


def design_pieces(design) -> list[tuple[str, StagePieces, tuple[str, ...]]]:
    """The stages of a saved design (``picker.export.SavedDesign``) as analysable pieces."""
    out: list[tuple[str, StagePieces, tuple[str, ...]]] = []
    for stage in design.stages:
        slots: list[Slot] = []
        pieces: list[Piece] = []
        labels: list[str] = []
        for pos in stage.positions:
            parts = pos.parts
            if not parts:  # a piece left in the circuit by a repair
                tol = pos.kept_tolerance if pos.kept_tolerance is not None else 0.0
                pieces_here = [board_piece(pos.kind, pos.value, tol)]
                arrangement = "single"
            else:
                pieces_here = [board_piece(p.kind, p.value, p.tolerance) for p in parts]
                arrangement = pos.arrangement
            cols = []
            for j, piece in enumerate(pieces_here):
                cols.append(len(pieces))
                pieces.append(piece)
                labels.append(pos.name if len(pieces_here) == 1 else f"{pos.name}{'ab'[j]}")
            slots.append(Slot(pos.name, pos.kind, arrangement, tuple(cols)))
        sp = StagePieces(tuple(slots), tuple(pieces), tuple(labels))
        out.append((stage.topology, sp, ()))
    return out
