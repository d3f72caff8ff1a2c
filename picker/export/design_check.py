"""Checks of a saved design document, key by key (the layout is in ``design_file``).

Every error is a DesignError that names the file, the line (when the file's text is at
hand) and the dotted key (``candidate.stage[0].position[1].part[0].kind``), and quotes
the bad value as written (at most about 80 characters).
"""

from __future__ import annotations

import math
from pathlib import Path
from types import MappingProxyType

from picker.errors import DesignError
from picker.export.design_file import (
    ARRANGEMENTS,
    FORMAT,
    KEPT,
    KINDS,
    SavedDesign,
    SavedOpAmp,
    SavedPart,
    SavedPosition,
    SavedStage,
)
from picker.parts import StageTarget, combine
from stock.tomlread import KeyLines
from stock.values import shown, type_word


def check_document(
    doc: dict, *, source: str = "<design>", path=None, lines: KeyLines | None = None
) -> SavedDesign:
    """Check a parsed design document (see ``design_file``) and build the SavedDesign.

    ``lines`` (of the file's text) lets each message name the line and quote the value
    as written there.
    """
    r = _Reader(source, lines)
    if "candidate" not in doc and "format" not in doc:
        stock_like = any(k in doc for k in ("resistor", "capacitor", "opamp", "stock"))
        raise DesignError(
            f"{source}: not a design saved by picker ("
            + ("it looks like a stock file; " if stock_like else "")
            + "save one with: picker design ... --save DESIGN.toml)"
        )
    fmt = r.get(doc, "format", int, "")
    if fmt != FORMAT:
        raise r.fail(
            "format",
            f"this picker reads design format {FORMAT}, the file says {r.shown('format', fmt)}",
        )
    request = r.get(doc, "request", dict, "", default={})
    stock_t = r.get(doc, "stock", dict, "", default={})
    stock_path = r.get(stock_t, "path", str, "stock.", default=None)
    stock_sha = r.get(stock_t, "sha256", str, "stock.", default=None)
    cand = r.get(doc, "candidate", dict, "")
    score = r.number(cand, "score", "candidate.")
    pieces = r.get(cand, "pieces", int, "candidate.")
    warnings = r.get(cand, "warnings", list, "candidate.", default=[])
    opamp = None
    if "opamp" in cand:
        opamp = _read_opamp(r, r.get(cand, "opamp", dict, "candidate."))
    stage_list = r.get(cand, "stage", list, "candidate.")
    if not stage_list:
        raise r.fail("candidate.stage", "a design needs at least one stage")
    stages = tuple(_read_stage(r, st, f"candidate.stage[{i}].") for i, st in enumerate(stage_list))
    counted = sum(len(p.parts) for st in stages for p in st.positions)
    if counted != pieces:
        raise r.fail("candidate.pieces", f"says {pieces} but the stages hold {counted} pieces")
    seen: dict[tuple, str] = {}
    for i, st in enumerate(stages):
        for pos in st.positions:
            for part in pos.parts:
                if part.measured is None:
                    continue
                key = (part.kind, part.index, part.measured)
                where = f"stage {i + 1} {pos.name}"
                if key in seen:
                    raise DesignError(
                        f"{source}: measured piece {part.measured} of "
                        f"{part.kind} line {part.index} is used twice "
                        f"({seen[key]} and {where})"
                    )
                seen[key] = where
    return SavedDesign(
        path=None if path is None else Path(path),
        request=MappingProxyType(dict(request)),
        score=score,
        pieces=pieces,
        stages=stages,
        opamp=opamp,
        warnings=tuple(str(w) for w in warnings),
        stock_path=None if stock_path is None else Path(stock_path),
        stock_sha256=stock_sha,
        saved=r.get(doc, "saved", str, "", default=None),
        format=fmt,
    )


def _read_opamp(r: _Reader, t: dict) -> SavedOpAmp:
    pre = "candidate.opamp."
    gbw = r.positive(t, "gbw_hz", pre, "must be above zero")
    return SavedOpAmp(
        index=r.index(t, "index", pre),
        name=r.get(t, "name", str, pre),
        gbw_hz=gbw,
        line=r.get(t, "line", int, pre, default=0),
        channels=max(1, r.get(t, "channels", int, pre, default=1)),
        location=r.get(t, "location", str, pre, default=None),
        supply=r.number(t, "supply", pre, default=None),
    )


def _read_target(r: _Reader, t: dict, pre: str) -> StageTarget:
    f0 = r.positive(t, "f0_hz", pre, "must be above zero")
    return StageTarget(
        f0_hz=f0, q=r.number(t, "q", pre, default=None), gain=r.number(t, "gain", pre, default=None)
    )


def _check_topology(r: _Reader, topology: str, names: list[str], pre: str) -> None:
    """The stage's circuit must be one picker knows, with exactly its positions."""
    from picker.filters import REGISTRY

    topo = REGISTRY.get(topology)
    if topo is None:
        raise r.fail(
            pre + "topology",
            f"{r.shown(pre + 'topology', topology)} is not a circuit this "
            f"picker knows ({', '.join(sorted(REGISTRY))})",
        )
    want = topo.position_names()
    if sorted(names) != sorted(want):
        raise r.fail(
            pre + "position",
            f"{topology} has positions "
            f"{', '.join(want)}, the file gives {', '.join(names) or 'none'}",
        )


def _read_stage(r: _Reader, st, pre: str) -> SavedStage:
    if not isinstance(st, dict):
        raise r.fail(pre[:-1], "expected a table")
    topology = r.get(st, "topology", str, pre)
    target = _read_target(r, r.get(st, "target", dict, pre), pre + "target.")
    achieved = _read_target(r, r.get(st, "achieved", dict, pre), pre + "achieved.")
    plist = r.get(st, "position", list, pre)
    positions = tuple(_read_position(r, p, f"{pre}position[{j}].") for j, p in enumerate(plist))
    names = [p.name for p in positions]
    for n in names:
        if names.count(n) > 1:
            raise r.fail(pre + "position", f"{shown(n)} appears twice")
    _check_topology(r, topology, names, pre)
    return SavedStage(topology=topology, target=target, achieved=achieved, positions=positions)


def _read_position(r: _Reader, p, pre: str) -> SavedPosition:
    if not isinstance(p, dict):
        raise r.fail(pre[:-1], "expected a table")
    name = r.get(p, "name", str, pre)
    arrangement = r.get(p, "arrangement", str, pre)
    if arrangement == KEPT:
        return _read_kept(r, p, name, pre)
    if arrangement not in ARRANGEMENTS:
        raise r.fail(
            pre + "arrangement",
            f"{r.shown(pre + 'arrangement', arrangement)} is not one of "
            + ", ".join(ARRANGEMENTS + (KEPT,)),
        )
    plist = r.get(p, "part", list, pre)
    parts = tuple(_read_part(r, x, f"{pre}part[{k}].") for k, x in enumerate(plist))
    want = 1 if arrangement == "single" else 2
    if len(parts) != want:
        raise r.fail(
            pre + "part", f"a {arrangement} position holds {want} piece(s), found {len(parts)}"
        )
    if len({x.kind for x in parts}) != 1:
        raise r.fail(pre + "part", "the pieces of one position differ in kind")
    value = r.number(p, "value", pre)
    combined = combine(parts[0].kind, arrangement, [x.value for x in parts])
    if not math.isclose(value, combined, rel_tol=1e-6):
        raise r.fail(
            pre + "value",
            f"{r.shown(pre + 'value', value)} does not match its pieces ({combined!r})",
        )
    return SavedPosition(name=name, arrangement=arrangement, value=value, parts=parts)


def _read_kept(r: _Reader, p: dict, name: str, pre: str) -> SavedPosition:
    """A position whose part stays in the circuit (a repair): kind and value, no pieces."""
    if p.get("part"):
        raise r.fail(pre + "part", "a kept position takes no piece from the stock")
    kind = r.get(p, "kind", str, pre)
    if kind not in KINDS:
        raise r.fail(pre + "kind", f"{r.shown(pre + 'kind', kind)} is not resistor or capacitor")
    value = r.positive(p, "value", pre)
    tol = r.fraction(p, "tolerance", pre, default=None)
    return SavedPosition(
        name=name, arrangement=KEPT, value=value, parts=(), kept_kind=kind, kept_tolerance=tol
    )


def _read_part(r: _Reader, x, pre: str) -> SavedPart:
    if not isinstance(x, dict):
        raise r.fail(pre[:-1], "expected a table")
    kind = r.get(x, "kind", str, pre)
    if kind not in KINDS:
        raise r.fail(pre + "kind", f"{r.shown(pre + 'kind', kind)} is not resistor or capacitor")
    values = {key: r.positive(x, key, pre) for key in ("nominal", "value")}
    tol = r.fraction(x, "tolerance", pre)
    line_tol = r.fraction(x, "line_tolerance", pre, default=None)
    measured = x.get("measured")
    if measured is not None:
        measured = r.index(x, "measured", pre)
    return SavedPart(
        kind=kind,
        index=r.index(x, "index", pre),
        line=r.get(x, "line", int, pre, default=0),
        nominal=values["nominal"],
        value=values["value"],
        tolerance=tol,
        measured=measured,
        location=r.get(x, "location", str, pre, default=None),
        dielectric=r.get(x, "dielectric", str, pre, default=None),
        polarized=r.get(x, "polarized", bool, pre, default=False),
        voltage=r.number(x, "voltage", pre, default=None),
        line_tolerance=line_tol,
    )


_MISSING = object()
MAX_INDEX = 10_000_000  # no stock file holds more lines (or readings) of one kind


class _Reader:
    """Typed look-ups whose errors name the file, the line and the dotted key."""

    def __init__(self, source: str, lines: KeyLines | None = None):
        self.source = source
        self.lines = lines

    def fail(self, dotted: str, msg: str) -> DesignError:
        """The error for key ``dotted`` (``candidate.stage[0].topology``): file:line: key: msg."""
        line = self.lines.line_of(dotted) if self.lines is not None else 0
        where = f"{self.source}:{line}" if line else self.source
        return DesignError(f"{where}: {dotted}: {msg}")

    def shown(self, dotted: str, value) -> str:
        """``value`` quoted as written in the file where its line holds it."""
        if not isinstance(value, str) and self.lines is not None:
            text = self.lines.written(dotted)
            if text is not None:
                return shown(text)
        return shown(value)

    def get(self, table: dict, key: str, typ, prefix: str, default=_MISSING):
        if key not in table:
            if default is _MISSING:
                raise self.fail(prefix + key, "missing")
            return default
        value = table[key]
        ok = isinstance(value, typ) and not (typ is int and isinstance(value, bool))
        if not ok:
            raise self.fail(
                prefix + key,
                f"expected {_TYPE_WORDS[typ]}, got {self.shown(prefix + key, value)} "
                f"({type_word(value)})",
            )
        return value

    def number(self, table: dict, key: str, prefix: str, default=_MISSING):
        if key not in table:
            if default is _MISSING:
                raise self.fail(prefix + key, "missing")
            return default
        value = table[key]
        x = None
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            try:
                x = float(value)
            except OverflowError:  # an integer past float range
                x = None
        if x is None or not math.isfinite(x):
            raise self.fail(
                prefix + key,
                f"expected a finite number, got {self.shown(prefix + key, value)} "
                f"({type_word(value)})",
            )
        return x

    def positive(self, table: dict, key: str, prefix: str, says="must be a positive number"):
        """``number`` that must be above zero; the refusal ``says`` so and quotes the value."""
        x = self.number(table, key, prefix)
        if not x > 0:
            raise self.fail(prefix + key, f"{says}, got {self.shown(prefix + key, x)}")
        return x

    def fraction(self, table: dict, key: str, prefix: str, default=_MISSING):
        """``number`` in [0, 1) (a tolerance), or ``default`` where the key is absent."""
        x = self.number(table, key, prefix, default)
        if key in table and not 0 <= x < 1:
            raise self.fail(
                prefix + key, f"{self.shown(prefix + key, x)} is not a fraction in [0, 1)"
            )
        return x

    def index(self, table: dict, key: str, prefix: str) -> int:
        value = self.get(table, key, int, prefix)
        if not 0 <= value <= MAX_INDEX:
            raise self.fail(
                prefix + key,
                f"must be 0 .. {MAX_INDEX:,}, got {self.shown(prefix + key, value)}",
            )
        return value


_TYPE_WORDS = {
    int: "a whole number",
    str: "text",
    dict: "a table",
    list: "an array",
    bool: "true or false",
    float: "a number",
}
