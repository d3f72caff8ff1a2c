"""The stock file shown: one rich table per kind (``picker stock list``) and the plain
data of ``picker stock list --json``. Owner text (names, drawers, notes) is shown as
written (``picker.report.owner``)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from stock.units import format_percent

if TYPE_CHECKING:
    from rich.console import RenderableType


def _entry_json(item) -> dict:
    from dataclasses import asdict

    from stock.values import format_rkm

    d = asdict(item)
    d["kind"] = item.kind
    if item.kind != "opamp":
        d["text"] = format_rkm(item.value, item.kind)
        d["measured"] = list(item.measured)
        d["nominal_qty"] = item.nominal_qty
    return d


def stock_json(stock, kinds) -> dict:
    """Plain data for ``--json``: SI floats, fractions for tolerances."""
    out = {
        "path": str(stock.path) if stock.path else None,
        "sha256": stock.sha256,
        "name": stock.name,
        "warnings": list(stock.warnings),
    }
    for kind in kinds:
        out[kind + "s"] = [_entry_json(x) for x in stock.lines(kind)]
    return out


def tolerance_text(item) -> str:
    """A line's tolerance as a percentage, marked ``*`` where the file gives none."""
    return format_percent(item.tolerance) + ("*" if item.tolerance_assumed else "")


def _measured(item) -> str:
    from stock.values import format_rkm

    return " ".join(format_rkm(m, item.kind) for m in item.measured)


def fit_widths(table, width: int) -> None:
    """Give each column of ``table`` the width of its widest cell when the whole table fits
    in ``width`` columns, which is the layout rich would choose; rich then skips measuring
    every cell (a third of the time of ``picker stock list``). Narrower: left to rich.

    The table's layout is ``stock_tables``'s: no outer edge, one column of padding each
    side inside, one rule between columns."""
    from rich.cells import cell_len

    columns = table.columns
    widths = [
        max([cell_len(str(c.header))] + [cell_len(getattr(x, "plain", str(x))) for x in c._cells])
        for c in columns
    ]
    if sum(widths) + 3 * (len(columns) - 1) <= width:
        for column, w in zip(columns, widths, strict=True):
            column.width = w


def stock_tables(stock, kinds) -> list:
    """One rich table per kind, sorted by value; qty 0 lines dimmed as used up.

    Names, drawers, notes and the stock's name are owner text: each cell is a ``Text``
    (``picker.report.owner``), shown exactly as written."""
    from rich.table import Table
    from rich.text import Text

    from picker.report.owner import owner_text
    from stock.values import format_rkm, format_si

    out: list[RenderableType] = []
    assumed = False
    title = f"{stock.name}  ({stock.path})" if stock.name else str(stock.path)
    out.append(owner_text(title, style="bold"))
    for kind in kinds:
        lines = sorted(
            stock.lines(kind),
            key=lambda x: (
                x.name.lower() if kind == "opamp" else x.value,
                (x.location or "").lower(),
            ),
        )
        label = {"resistor": "Resistors", "capacitor": "Capacitors", "opamp": "Op amps"}[kind]
        table = Table(
            title=f"{label} ({len(lines)} lines)",
            title_justify="left",
            show_edge=False,
            pad_edge=False,
        )
        if kind == "resistor":
            cols = ["value", "tol", "tempco", "location", "qty", "measured", "note"]
        elif kind == "capacitor":
            cols = ["value", "dielectric", "tol", "volts", "location", "qty", "measured"]
        else:
            cols = ["name", "gbw", "slew", "ch", "supply", "location", "qty"]
        for col in cols:
            table.add_column(
                col,
                justify="right" if col in ("value", "qty", "tol", "volts", "gbw", "ch") else "left",
                overflow="fold",
            )
        for x in lines:
            if kind == "resistor":
                row = [
                    format_rkm(x.value, kind),
                    tolerance_text(x),
                    f"{x.tempco * 1e6:+.0f}ppm" if x.tempco is not None else "",
                    x.location or "",
                    str(x.qty),
                    _measured(x),
                    x.note or "",
                ]
            elif kind == "capacitor":
                diel = (x.dielectric or "") + (" (polarized)" if x.polarized else "")
                row = [
                    format_rkm(x.value, kind),
                    diel,
                    tolerance_text(x),
                    format_si(x.voltage, "V") if x.voltage else "",
                    x.location or "",
                    str(x.qty),
                    _measured(x),
                ]
            else:
                row = [
                    x.name,
                    format_si(x.gbw, "Hz"),
                    f"{x.slew / 1e6:.3g} V/us" if x.slew else "",
                    str(x.channels),
                    format_si(x.supply, "V") if x.supply else "",
                    x.location or "",
                    str(x.qty),
                ]
            if kind != "opamp" and x.tolerance_assumed:
                assumed = True
            table.add_row(*(owner_text(c) for c in row), style="dim" if x.qty == 0 else None)
        out.append(table)
    if assumed:
        out.append(
            Text(
                "* tolerance assumed: the file does not give one (5% for resistors, "
                "10% for capacitors)"
            )
        )
    if any(x.qty == 0 for k in kinds for x in stock.lines(k)):
        out.append(Text("lines with qty 0 are used up; they are never used in a design"))
    return out
