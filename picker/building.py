"""Build a saved design from the stock, and undo the last build (DESIGN.md sections 3, 9).

Shared by the CLI (``picker build``, ``picker undo``) and the terminal UI.

``plan_build`` checks, changing nothing, that the stock still holds every line the
design names: the same index *and* the same nominal value and location (a reordered
or edited file is refused), the measured readings it takes, and enough pieces. It
returns the quantity changes and the pick list for the confirmation. ``do_build``
makes the changes with the safe edit of ``stock.file`` and records the build in
``stock.ledger``; ``undo_last`` puts the bytes from before the last build back, but
only while the file is exactly as that build left it.

A build takes the design's resistor and capacitor pieces and its op-amp packages (one
channel per stage, ``ceil(stages / channels)`` packages), so the stock count stays right.
"""

from __future__ import annotations

import hashlib
import math
from dataclasses import dataclass
from pathlib import Path

from picker.errors import NoDesignError
from picker.export import SavedDesign, opamp_packages, pick_count, pick_list
from picker.export.bom import designator
from stock import ledger
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
            need = opamp_packages(design)
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


def _sha(data: bytes) -> str:
    return hashlib.sha256(data).hexdigest()


def do_build(stock_path, plan: BuildPlan, *, expect_sha256=None):
    """Take the plan's pieces out of the stock file and record the build for undo.

    ``expect_sha256`` defaults to the sha256 of the stock the plan was checked against:
    a file changed since then is refused (StockEditError, nothing changed).
    Returns the ``stock.file.EditResult``.
    """
    from stock.file import apply_changes

    path = Path(stock_path)
    try:
        before = path.read_bytes()
    except OSError as exc:
        raise StockEditError(f"{path}: cannot read the stock file: {exc.strerror or exc}") from exc
    sha = _sha(before)
    want = expect_sha256 if expect_sha256 is not None else plan.stock_sha256
    if want is not None and sha != want:
        raise StockEditError(
            f"{path}: the stock file changed since the build was checked; "
            f"nothing was changed; run the build again"
        )
    record = ledger.begin(path, before, design=plan.design_path, summary=plan.summary)
    try:
        result = apply_changes(path, list(plan.changes), expect_sha256=sha)
    except BaseException:
        ledger.discard(record)
        raise
    ledger.finish(record, result.after_sha256)
    return result


def undo_preview(stock_path) -> ledger.BuildRecord:
    """The build ``undo_last`` would undo, checked; raises StockEditError if it cannot."""
    path = Path(stock_path)
    if not path.is_file():
        why = "is a directory" if path.is_dir() else "does not exist"
        raise StockEditError(
            f"{path}: {why}; name the stock file the build changed, e.g. --stock inventory.toml"
        )
    while True:
        record = ledger.last_build(path)
        if record is None:
            raise StockEditError(
                f"{path}: no build to undo (no records in {ledger.ledger_dir(path)})"
            )
        try:
            current = _sha(path.read_bytes())
        except OSError as exc:
            raise StockEditError(
                f"{path}: cannot read the stock file: {exc.strerror or exc}"
            ) from exc
        if record.state == "pending":
            if current == record.sha256_before:
                ledger.discard(record)  # the build never reached the file
                continue
            raise StockEditError(
                f"{path}: build {record.number} ({record.time}) was interrupted and the file "
                f"has changed since; undo will not guess. The file as it was before that build "
                f"is kept in {record.before_path}: compare it and copy it back by hand if right"
            )
        if current != record.sha256_after:
            raise StockEditError(
                f"{path}: the stock file changed since build {record.number} ({record.time}); "
                f"undo restores only a file exactly as the build left it, so nothing was "
                f"changed. The file as it was before that build is kept in "
                f"{record.before_path}; redo your later edits by hand, or copy it back"
            )
        return record


def undo_last(stock_path):
    """Put back the stock file's bytes from before the last build; returns the EditResult."""
    from stock.file import replace_bytes

    record = undo_preview(stock_path)
    data = ledger.before_bytes(record)
    result = replace_bytes(Path(stock_path), data, expect_sha256=record.sha256_after)
    ledger.mark_undone(record)
    return result
