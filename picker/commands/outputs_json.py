"""The ``--json`` objects of ``picker bom``, ``build`` and ``undo`` (shapes: docs/outputs.md).

Plain data only: strings, numbers, lists; owner text exactly as written in the file.
"""

from __future__ import annotations

import sys


def print_json(doc: dict) -> None:
    import json

    json.dump(doc, sys.stdout, indent=2, ensure_ascii=False)
    sys.stdout.write("\n")


def json_needs_yes(args, what: str) -> None:
    if args.json and not args.yes:
        from picker.errors import DesignError

        raise DesignError(
            f"{what} --json answers for a script, which cannot be asked: add --yes "
            "(nothing was changed)"
        )


def _bom_row_json(r) -> dict:
    return {
        "kind": r.kind,
        "value": r.value,
        "nominal": r.nominal,
        "tolerance": r.tolerance or None,
        "location": r.location,
        "count": r.count,
        "positions": r.positions,
        "measured": list(r.measured),
        "line_index": r.index,
    }


def bom_json(design) -> dict:
    """``picker bom --json``: the grouped BOM, the pick list and the per-reference rows."""
    from dataclasses import asdict

    from picker.commands.outputs_cmd import design_heading
    from picker.export import bom_rows, pick_list
    from picker.export.bom import reference_rows

    return {
        "design": str(design.path) if design.path else None,
        "heading": design_heading(design),
        "stock": str(design.stock_path) if design.stock_path else None,
        "bom": [_bom_row_json(r) for r in bom_rows(design)],
        "pick_list": [
            {"location": g.location, "rows": [_bom_row_json(r) for r in g.rows]}
            for g in pick_list(design)
        ],
        "references": [asdict(r) for r in reference_rows(design)],
    }


def build_json(stock_path, plan, result) -> dict:
    """``picker build --json --yes``: what was taken, from which file, how to undo it."""
    return {
        "stock": str(stock_path),
        "design": str(plan.design_path) if plan.design_path else None,
        "taken": plan.count,
        "changes": list(plan.summary),
        "pick_list": [
            {"location": g.location, "rows": [_bom_row_json(r) for r in g.rows]} for g in plan.picks
        ],
        "warnings": list(plan.warnings),
        "cautions": list(plan.cautions),
        "sha256_after": getattr(result, "after_sha256", None),
        "undo": f"picker undo --stock {stock_path}",
    }


def undo_json(stock_path, record, *, already_undone: bool = False) -> dict:
    """``picker undo --json --yes``: which build was undone (``already_undone``: an undo
    had been stopped before it could record itself; only the record changed now)."""
    return {
        "stock": str(stock_path),
        "undone_build": record.number,
        "already_undone": already_undone,
        "build_time": record.time,
        "design": record.design,
        "changes": list(record.summary),
        "sha256_restored": record.sha256_before,
    }
