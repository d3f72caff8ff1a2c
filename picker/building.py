"""Build a saved design from the stock, and undo the last build (docs/outputs.md).

The plan lives here; the writing (``do_build``, ``undo_preview``, ``undo_last``,
``settle``) in ``picker.build_write``, re-exported below.

Shared by the CLI (``picker build``, ``picker undo``) and the terminal UI.

``plan_build`` checks, changing nothing, that the stock still holds every line the
design names: the same index *and* the same nominal value and location (a reordered
or edited file is refused), the measured readings it takes, and enough pieces. It
returns the quantity changes and the pick list for the confirmation. ``do_build``
makes the changes with the safe edit of ``stock.file`` and records the build in
``stock.ledger``; ``undo_last`` puts the bytes from before the last build back, but
only while the file is exactly as that build left it.

A build takes the design's resistor and capacitor pieces and its op-amp packages (one
channel per stage, ``ceil(stages / channels)`` packages, channels from the stock line, not
the design file), so the stock count stays right. What holds when a build or an undo is
stopped or fails part way is in docs/reliability.md.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path

from picker.errors import NoDesignError
from picker.export import SavedDesign, pick_count, pick_list
from picker.export.bom import designator
from stock.errors import StockEditError

VOLTAGE_MARGIN = 1.5  # capacitor rating at least 1.5x the supply (common practice derating)
SAFETY_NOTE = (
    "Build with the power off and capacitors discharged; on mains or high-voltage "
    "equipment local codes and licensed practice come first."
)


@dataclass(frozen=True)
class BuildPlan:
    stock_path: Path | None
    stock_sha256: str | None  # of the stock the plan was checked against
    changes: tuple  # of stock.file.QtyChange, one per stock line
    picks: tuple  # of picker.export.PickGroup, by drawer
    count: int  # physical items to take (pieces + op-amp packages)
    summary: tuple[str, ...]  # one line per change, for the ledger and the prompt
    cautions: tuple[str, ...] = ()  # polarity, voltage rating
    warnings: tuple[str, ...] = ()  # stock changed since the design was saved ...
    design_path: Path | None = None


def _fmt(value: float, kind: str) -> str:
    from stock.values import format_rkm

    return format_rkm(value, kind)


def _describe_line(kind: str, line) -> str:
    value = line.name if kind == "opamp" else _fmt(line.value, kind)
    where = f" in {line.location}" if line.location else " (no location)"
    word = "op amp" if kind == "opamp" else kind
    return f"{word} line {line.index} ({value}{where}, file line {line.line})"


def plan_build(design: SavedDesign, stock) -> BuildPlan:
    """Check ``design`` against ``stock`` and return the changes a build makes.

    Raises
    ------
    StockEditError
        A line the design names is gone or is no longer the same line (index, nominal
        value or location differ, or a measured reading is gone): the stock file was
        reordered or edited since the design was saved. Save the design again.
    NoDesignError
        The lines are there but hold too few pieces.
    """
    from stock.file import QtyChange

    src = design.path or "the design"
    problems: list[str] = []
    short: list[str] = []
    changes, summary, cautions = [], [], []
    for (kind, index), use in _tally(design):
        line = _same_line(src, kind, index, use["part"], stock, problems)
        if line is None:
            continue
        taken = _measured_taken(src, kind, index, use, line, problems)
        n_nominal = use["count"] - len(taken)
        if use["count"] > line.qty or n_nominal > line.nominal_qty:
            short.append(
                f"{_wanted(kind, index, use['part'])} (file line {line.line}): the "
                f"design takes {use['count']} ({n_nominal} unmeasured), the stock has "
                f"{line.qty} ({line.nominal_qty} unmeasured)"
            )
        changes.append(QtyChange(kind, index, -use["count"], tuple(sorted(taken))))
        summary.append(
            f"{kind} {_fmt(line.value, kind)} from {line.location or '(no location)'}"
            f": take {use['count']} for {', '.join(use['names'])}"
            f" (qty {line.qty} -> {line.qty - use['count']})"
        )
        cautions += _cautions(kind, line, use["names"], design)
    if design.opamp is not None:
        line = _same_opamp(src, design.opamp, stock, problems)
        if line is not None:
            # the stock line says how many op amps a package holds; a design file could lie
            need = math.ceil(len(design.stages) / max(1, line.channels))
            if need > line.qty:
                short.append(
                    f"op amp line {line.index} ({line.name!r}) (file line "
                    f"{line.line}): the design takes {need}, the stock has {line.qty}"
                )
            changes.append(QtyChange("opamp", line.index, -need))
            summary.append(
                f"op amp {line.name} from {line.location or '(no location)'}: take "
                f"{need} (qty {line.qty} -> {line.qty - need})"
            )
    if problems:
        same_stock = bool(design.stock_sha256) and design.stock_sha256 == stock.sha256
        why = (
            "the stock file is the very one the design was saved from, so the design file "
            "was edited after it was saved: save it again with picker design ... --save"
            if same_stock
            else "the stock file changed since the design was saved (lines reordered or edited, "
            "or pieces taken by a build): run the design again and save it anew"
        )
        raise StockEditError(
            "the stock no longer matches the design; nothing was changed:\n  "
            + "\n  ".join(problems)
            + "\n"
            + why
        )
    if short:
        raise NoDesignError(
            "the stock cannot supply this build; nothing was changed:\n  " + "\n  ".join(short)
        )
    warnings = []
    if design.stock_sha256 and stock.sha256 and design.stock_sha256 != stock.sha256:
        warnings.append(
            "the stock file changed since the design was saved; every line the "
            "design names still matches"
        )
    if (
        design.stock_path
        and stock.path
        and Path(design.stock_path).resolve() != Path(stock.path).resolve()
    ):
        warnings.append(
            f"the design was saved against {design.stock_path}, this build takes from {stock.path}"
        )
    if cautions:
        cautions.append(SAFETY_NOTE)
    picks = pick_list(design)
    return BuildPlan(
        stock_path=None if stock.path is None else Path(stock.path),
        stock_sha256=stock.sha256,
        changes=tuple(changes),
        picks=picks,
        count=pick_count(picks),
        summary=tuple(summary),
        cautions=tuple(cautions),
        warnings=tuple(warnings),
        design_path=design.path,
    )


_KIND_ORDER = {"resistor": 0, "capacitor": 1}


def _tally(design: SavedDesign):
    """Pieces per stock line: ((kind, index), {part, count, measured parts, names}), sorted."""
    uses: dict[tuple[str, int], dict] = {}
    for s, pos, k, part in design.parts():
        u = uses.setdefault(
            (part.kind, part.index), {"part": part, "count": 0, "measured": [], "names": []}
        )
        u["count"] += 1
        u["names"].append(
            designator(pos.name, pos.arrangement, k)
            + (f" (stage {s})" if len(design.stages) > 1 else "")
        )
        if part.measured is not None:
            u["measured"].append(part)
    return sorted(uses.items(), key=lambda kv: (_KIND_ORDER[kv[0][0]], kv[0][1]))


def _wanted(kind: str, index: int, part) -> str:
    return f"{kind} line {index} ({_fmt(part.nominal, kind)} in {part.location or '-'})"


def _same_line(src, kind: str, index: int, part, stock, problems: list[str]):
    """The stock line the part names if it is still the same line, else None (noted)."""
    lines = stock.lines(kind)
    want = _wanted(kind, index, part)
    if index >= len(lines):
        problems.append(f"{src} names {want}, but the stock has only {len(lines)} {kind} lines")
        return None
    line = lines[index]
    if not math.isclose(line.value, part.nominal, rel_tol=1e-9) or line.location != part.location:
        problems.append(
            f"{src} names {want}, but the stock now has {_describe_line(kind, line)} there"
        )
        return None
    return line


def _measured_taken(src, kind: str, index: int, use: dict, line, problems) -> list[int]:
    """Indices of the measured readings the design takes; a reading no longer there is noted."""
    taken = []
    for mp in use["measured"]:
        if mp.measured >= len(line.measured) or not math.isclose(
            line.measured[mp.measured], mp.value, rel_tol=1e-9
        ):
            problems.append(
                f"{src} takes the measured piece {mp.measured} "
                f"({_fmt(mp.value, kind)}) of {_wanted(kind, index, use['part'])}, "
                f"but the stock no longer lists that reading there"
            )
        taken.append(mp.measured)
    return taken


def _same_opamp(src, oa, stock, problems: list[str]):
    lines = stock.opamps
    want = f"op amp line {oa.index} ({oa.name!r} in {oa.location or '-'})"
    if oa.index >= len(lines):
        problems.append(f"{src} names {want}, but the stock has only {len(lines)} op amp lines")
        return None
    line = lines[oa.index]
    if line.name != oa.name or line.location != oa.location:
        problems.append(
            f"{src} names {want}, but the stock now has {_describe_line('opamp', line)} there"
        )
        return None
    return line


def _cautions(kind: str, line, names: list[str], design: SavedDesign) -> list[str]:
    if kind != "capacitor":
        return []
    out = []
    which = ", ".join(names)
    if line.polarized:
        out.append(
            f"{which}: polarized {line.dielectric or 'capacitor'}; fit it the right way "
            f"round (+ to the more positive node), reversed it can fail hot"
        )
    supply = None if design.opamp is None else design.opamp.supply
    if line.voltage is not None and supply is not None and line.voltage < VOLTAGE_MARGIN * supply:
        out.append(
            f"{which}: rated {line.voltage:g} V, less than {VOLTAGE_MARGIN:g}x the op "
            f"amp's {supply:g} V supply limit; check it against your actual supply"
        )
    return out


from picker.build_write import (  # noqa: E402  (the plan above is what they take)
    UndoPreview,
    before_build,
    do_build,
    settle,
    undo_last,
    undo_preview,
)

__all__ = [
    "SAFETY_NOTE",
    "BuildPlan",
    "UndoPreview",
    "before_build",
    "do_build",
    "plan_build",
    "settle",
    "undo_last",
    "undo_preview",
]
