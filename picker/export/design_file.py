"""Saved design: one TOML file written whole, read back and checked (docs/outputs.md).

Layout of the file, format 1 (keys with no value are left out: TOML has no null)::

    format = 1
    saved = "2026-12-02T02:30:00Z"          # UTC, when it was written

    [request]                               # the targets and options as the caller gave them
    type = "lowpass"
    fc_hz = 1000.0
    ...                                     # also rank, max_error: how rank 1 was chosen

    [stock]                                 # the stock the parts were chosen from
    path = "/home/bench/inventory.toml"     # absolute
    sha256 = "..."                          # of the file's bytes at the time

    [candidate]
    score = 0.0012                          # worst relative error over every target
    pieces = 3
    warnings = ["..."]

    [candidate.opamp]                       # the stock op amp chosen, when there is one
    index = 0                               # position among the file's [[opamp]] tables
    line = 31                               # line of its header, for messages
    name = "dual JFET-input"
    gbw_hz = 3000000.0
    channels = 2
    location = "IC tray"
    supply = 30.0                           # maximum total supply, volt, when known

    [[candidate.stage]]
    topology = "inverting-lowpass"          # registry key of picker.filters

    [candidate.stage.target]                # what the stage must do: f0_hz, q, gain
    f0_hz = 1000.0
    gain = 2.0

    [candidate.stage.achieved]              # what these parts give
    f0_hz = 1001.2
    gain = 2.0

    [[candidate.stage.position]]
    name = "R1"                             # reference designator of the topology
    arrangement = "single"                  # single | series | parallel
    value = 4700.0                          # combined value, ohm or farad

    [[candidate.stage.position.part]]       # one per physical piece
    kind = "resistor"
    index = 3                               # position among the file's [[resistor]] tables
    line = 14                               # line of its header when saved
    nominal = 4700.0                        # the line's nominal value
    value = 4693.0                          # the piece's value (the reading when measured)
    measured = 0                            # index into the line's `measured` list; absent if not
    tolerance = 0.01                        # the piece's: the meter's accuracy when measured
    line_tolerance = 0.01                   # the stock line's own tolerance
    location = "A3"
    # capacitors also: dielectric, polarized (when true), voltage (rating, volt)

    [[candidate.stage.position]]            # a repair: the part already in the circuit stays
    name = "R2"
    arrangement = "kept"                    # no piece is taken from the stock for it
    kind = "resistor"
    value = 10000.0
    tolerance = 0.05                        # of the part on the board, when known

A position is written as kept when its pieces are in the circuit already (their line has
``on_board = True``: ``picker.repair``); bom, pick list and build take nothing for it,
the netlist still holds it. See docs/repair.md.

A stock line is named by kind and index *and* checked by nominal value and location
when the design is built, so a reordered stock file is caught (picker.building).
"""

from __future__ import annotations

import dataclasses
import math
import os
import stat
import time
from collections.abc import Mapping
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import tomli_w

from picker.errors import DesignError
from picker.parts import Candidate, StageTarget
from stock import durable, tomlread
from stock.durable import describe_os_error, kind_of, read_bounded
from stock.errors import StockFileError
from stock.load import decode

FORMAT = 1
KINDS = ("resistor", "capacitor")
ARRANGEMENTS = ("single", "series", "parallel")
KEPT = "kept"  # a position whose part stays in the circuit (a repair): no pieces


@dataclass(frozen=True)
class SavedPart:
    """One physical piece of a saved design, named by its stock line."""

    kind: str  # "resistor" | "capacitor"
    index: int  # position among the stock file's tables of that kind
    line: int  # header line in the stock file when saved (0 if unknown)
    nominal: float  # the stock line's nominal value
    value: float  # the piece's value: nominal, or the reading when measured
    tolerance: float
    measured: int | None = None
    location: str | None = None
    dielectric: str | None = None
    polarized: bool = False
    voltage: float | None = None
    line_tolerance: float | None = None  # the stock line's tolerance (a measured piece's
    # own is the meter's accuracy)


@dataclass(frozen=True)
class SavedPosition:
    name: str  # reference designator, e.g. "R1"
    arrangement: str  # single | series | parallel | kept
    value: float  # combined value
    parts: tuple[SavedPart, ...]  # empty for a kept position
    kept_kind: str | None = None  # kept positions: the kind of the part in the circuit
    kept_tolerance: float | None = None  # kept positions: its tolerance, when known

    @property
    def kind(self) -> str:
        return self.parts[0].kind if self.parts else str(self.kept_kind)


@dataclass(frozen=True)
class SavedOpAmp:
    index: int
    name: str
    gbw_hz: float
    line: int = 0
    channels: int = 1
    location: str | None = None
    supply: float | None = None


@dataclass(frozen=True)
class SavedStage:
    topology: str
    target: StageTarget
    achieved: StageTarget
    positions: tuple[SavedPosition, ...]

    def values(self) -> dict[str, float]:
        return {p.name: p.value for p in self.positions}


@dataclass(frozen=True)
class SavedDesign:
    """A design read back from its file. ``request`` is read-only."""

    path: Path | None
    request: Mapping[str, Any]
    score: float
    pieces: int
    stages: tuple[SavedStage, ...]
    opamp: SavedOpAmp | None = None
    warnings: tuple[str, ...] = ()
    stock_path: Path | None = None
    stock_sha256: str | None = None
    saved: str | None = None
    format: int = FORMAT

    def parts(self):
        """Every piece as (stage number from 1, position, piece number in the position, part)."""
        for s, stage in enumerate(self.stages, start=1):
            for pos in stage.positions:
                for k, part in enumerate(pos.parts):
                    yield s, pos, k, part


# --------------------------------------------------------------------------- saving


def save_design(path, *, candidate: Candidate, request: dict, stock) -> None:
    """Write ``candidate`` and ``request`` to ``path`` as TOML, whole and atomically.

    Parameters
    ----------
    path : str or Path
        Where to write; an existing file is replaced (its mode is kept).
    candidate : Candidate
        The chosen design.
    request : dict
        Targets and options as given (type, response, order, fc_hz, gain, ...). None
        values are left out; tuples become arrays; dataclasses become tables.
    stock : Stock
        The stock the candidate was found in: its path and sha256 are recorded.
    """
    doc = design_document(candidate=candidate, request=request, stock=stock)
    path = Path(path)
    check_save_target(path, stock)
    write_atomic(path, tomli_w.dumps(doc).encode("utf-8"))


def check_save_target(path: Path, stock) -> None:
    """Refuse to replace a folder, a FIFO or device, the stock file or any file that is not
    a saved design. Nothing is read without bound: the old file goes through
    ``stock.durable.read_bounded``."""
    hint = "pick another name, e.g. d.toml; nothing was written"
    path = Path(path)
    if not check_output_target(path, stock, what="the design", hint=hint):
        return
    try:
        old = tomlread.parse(decode(read_bounded(path), str(path)))
    except (OSError, StockFileError, tomlread.TomlProblem):
        old = None
    if not (isinstance(old, dict) and "candidate" in old and "format" in old):
        raise DesignError(
            f"{path}: exists and is not a design saved by picker, so it is not replaced; {hint}"
        )


def check_output_target(path: Path, stock, *, what: str = "the design", hint: str) -> bool:
    """Refuse (DesignError naming the path, the reason and ``hint``) to write ``what``
    over a folder, a FIFO, a device or socket, or the stock file ``stock`` was read
    from. True when a regular file is there already (the caller decides about it),
    False when nothing is."""
    path = Path(path)
    try:
        st = os.stat(path)
    except FileNotFoundError:
        return False
    except OSError as exc:
        raise DesignError(f"{path}: cannot check it: {describe_os_error(exc)}; {hint}") from None
    if stat.S_ISDIR(st.st_mode):
        raise DesignError(f"{path}: is a folder, not a file name; {hint}")
    why = kind_of(st.st_mode)
    if why is not None:
        raise DesignError(f"{path}: {why}; {hint}")
    stock_path = getattr(stock, "path", None)
    try:
        same = stock_path is not None and path.samefile(stock_path)
    except OSError:
        same = False
    if same:
        raise DesignError(
            f"{path}: is the stock file the design came from; writing {what} there "
            f"would replace your stock; {hint}"
        )
    return True


def design_document(*, candidate: Candidate, request: dict, stock) -> dict:
    """The TOML document of a saved design as a plain dict (see the module docstring)."""
    doc: dict[str, Any] = {
        "format": FORMAT,
        "saved": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime()),
        "request": _plain(dict(request)) or {},
    }
    stock_table: dict[str, Any] = {}
    if getattr(stock, "path", None) is not None:
        stock_table["path"] = str(Path(stock.path).resolve())
    if getattr(stock, "sha256", None):
        stock_table["sha256"] = stock.sha256
    doc["stock"] = stock_table
    cand: dict[str, Any] = {"score": float(candidate.score), "pieces": int(candidate.pieces)}
    if candidate.warnings:
        cand["warnings"] = [str(w) for w in candidate.warnings]
    if candidate.opamp is not None:
        oa = candidate.opamp
        cand["opamp"] = _drop_none(
            {
                "index": oa.index,
                "line": oa.line,
                "name": oa.name,
                "gbw_hz": float(oa.gbw),
                "channels": oa.channels,
                "location": oa.location,
                "supply": None if oa.supply is None else float(oa.supply),
            }
        )
    cand["stage"] = [_stage_table(st) for st in candidate.stages]
    doc["candidate"] = cand
    return doc


def _stage_table(stage) -> dict:
    positions = []
    for name, arr in stage.positions:
        if all(getattr(p.line, "on_board", False) for p in arr.parts):
            positions.append(
                {
                    "name": name,
                    "arrangement": KEPT,
                    "kind": arr.kind,
                    "value": float(arr.value),
                    "tolerance": float(max(p.tolerance for p in arr.parts)),
                }
            )
            continue
        parts = []
        for piece in arr.parts:
            line = piece.line
            parts.append(
                _drop_none(
                    {
                        "kind": line.kind,
                        "index": line.index,
                        "line": line.line,
                        "nominal": float(line.value),
                        "value": float(piece.value),
                        "measured": piece.measured,
                        "tolerance": float(piece.tolerance),
                        "line_tolerance": float(line.tolerance),
                        "location": line.location,
                        "dielectric": getattr(line, "dielectric", None),
                        "polarized": True if getattr(line, "polarized", False) else None,
                        "voltage": getattr(line, "voltage", None),
                    }
                )
            )
        positions.append(
            {"name": name, "arrangement": arr.arrangement, "value": float(arr.value), "part": parts}
        )
    return {
        "topology": stage.topology,
        "target": _target_table(stage.target),
        "achieved": _target_table(stage.achieved),
        "position": positions,
    }


def _target_table(t: StageTarget) -> dict:
    return _drop_none(
        {
            "f0_hz": float(t.f0_hz),
            "q": None if t.q is None else float(t.q),
            "gain": None if t.gain is None else float(t.gain),
        }
    )


def _drop_none(d: dict) -> dict:
    return {k: v for k, v in d.items() if v is not None}


def _plain(value):
    """``value`` as TOML-able data: None dropped, tuples as lists, dataclasses as tables."""
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        value = dataclasses.asdict(value)
    if isinstance(value, Mapping):
        out = {}
        for k, v in value.items():
            v = _plain(v)
            if v is not None:
                out[str(k)] = v
        return out
    if isinstance(value, (list, tuple)):
        return [x for x in (_plain(v) for v in value) if x is not None]
    if value is None or isinstance(value, (bool, int, str)):
        return value
    if isinstance(value, float):
        return value if math.isfinite(value) else str(value)
    if hasattr(value, "item"):  # numpy scalar
        return _plain(value.item())
    return str(value)


def write_atomic(path: Path, data: bytes, what: str = "the design") -> None:
    """Write ``data`` to ``path`` whole (``stock.durable.write_atomic``); DesignError if not."""
    try:
        durable.write_atomic(Path(path), data)
    except OSError as exc:
        raise DesignError(f"{path}: cannot write {what}: {describe_os_error(exc)}") from exc


# loading: picker/export/design_load.py (re-exported here)
from picker.export.design_load import (  # noqa: E402,F401
    design_from_candidate,
    design_from_document,
    load_design,
)
