"""The drawers pane: the stock as a table, a filter, quantity edits and new lines.

Every change goes through the safe edit of ``stock.file`` (lock, round trip, atomic
replace, refused if the file changed since it was read); the pane then asks the
screen to read the file again by posting ``DrawersPane.StockChanged``.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import DataTable, Input, Label, Static

from picker.report.owner import owner_text
from picker.ui import backend
from picker.ui.stock_rows import ASSUMED_MARK, COLUMNS, Row, matches, qty_delta, rows_of
from picker.ui.widgets.common import (
    Field,
    MessageBox,
    Plain,
    RowTable,
    TypingAware,
    cell,
    put,
    say,
)
from stock.errors import PickerError


class DrawersPane(TypingAware, Vertical):
    """Table of stock lines with a find field and a quantity field under it."""

    BINDINGS = [
        Binding("slash", "find", "find", key_display="/"),
        Binding("e", "edit_qty", "quantity"),
        Binding("a", "add_line", "add line"),
        Binding("r", "reload", "reread file"),
    ]
    LETTER_ACTIONS = frozenset({"find", "edit_qty", "add_line", "reload"})

    class StockChanged(Message):
        """The file was written (or should be read again); ``note`` says what happened."""

        def __init__(self, note: str) -> None:
            self.note = note
            super().__init__()

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.stock = None
        self.rows: list[Row] = []
        self.shown: list[Row] = []

    def compose(self) -> ComposeResult:
        with Horizontal(classes="field-row"):
            yield Label("find", classes="field-label")
            yield Field(placeholder="4k7 C0G A3 ...", id="find", compact=True)
            yield Plain("", id="find-count")
        yield RowTable(id="stock-table", zebra_stripes=False)
        with Horizontal(classes="field-row"):
            yield Label("quantity", classes="field-label")
            yield Field(placeholder="12, +3 or -2", id="qty", compact=True)
            yield Plain("", id="qty-message")
        with MessageBox(id="drawers-box"):  # a file's faults can be many lines
            yield Plain("", id="drawers-status")

    def on_mount(self) -> None:
        put(self.query_one("#find-count", Static), "reading the stock file…")

    # data in ---------------------------------------------------------------------
    def show_stock(self, stock, note: str = "") -> None:
        """Fill the table from ``stock`` (a stock.model.Stock), keeping filter and cursor."""
        self.stock = stock
        self.rows = rows_of(stock, backend.format_value, backend.format_si)
        self._refill()
        status = [note] if note else []
        if any(row.cells[3].endswith(ASSUMED_MARK) for row in self.rows):
            status.append(f"{ASSUMED_MARK} tolerance not in the file: the default is assumed")
        status += [f"warning: {w}" for w in stock.warnings]
        put(self.query_one("#drawers-status", Static), "\n".join(status))
        self._describe_target()

    def show_error(self, text: str) -> None:
        self.stock = None
        self.rows = []
        self._refill()
        put(self.query_one("#find-count", Static), "no stock")
        put(
            self.query_one("#drawers-status", Static),
            say("error", text) + "\n(fix the file, then press r to read it again)",
        )

    def _refill(self) -> None:
        table = self.query_one(DataTable)
        keep = self.current_row()
        words = self.query_one("#find", Input).value
        parser = backend.parse_value
        self.shown = [row for row in self.rows if matches(row, words, parser)]
        # columns too, with widths measured here: left to itself the table can keep
        # the widths of the headings and cut "op amp" to "op a"
        table.clear(columns=True)
        for k, label in enumerate(COLUMNS):
            width = max([len(label)] + [cell(row.cells[k]).cell_len for row in self.rows])
            table.add_column(label, width=width)
        for row in self.shown:
            table.add_row(*(cell(c) for c in row.cells), key=f"{row.kind}:{row.index}")
        if keep is not None:
            for i, row in enumerate(self.shown):
                if (row.kind, row.index) == (keep.kind, keep.index):
                    table.move_cursor(row=i)
        put(
            self.query_one("#find-count", Static),
            f"{len(self.shown)} of {len(self.rows)} lines" if self.stock else "",
        )

    def current_row(self) -> Row | None:
        table = self.query_one(DataTable)
        if not self.shown or table.cursor_row is None:
            return None
        if 0 <= table.cursor_row < len(self.shown):
            return self.shown[table.cursor_row]
        return None

    def _describe_target(self) -> None:
        row = self.current_row()
        label = self.query_one("#qty-message", Static)
        if row is None:
            put(label, "")
        else:
            put(
                label,
                owner_text(f"for {row.cells[0]} {row.cells[1]} in {row.cells[4]} (now {row.qty})"),
            )

    # events ----------------------------------------------------------------------
    @on(Input.Changed, "#find")
    def _find_changed(self) -> None:
        self._refill()
        self._describe_target()

    @on(Input.Submitted, "#find")
    def _find_done(self) -> None:
        self.query_one(DataTable).focus()

    @on(DataTable.RowHighlighted)
    def _row_moved(self) -> None:
        self._describe_target()

    @on(DataTable.RowSelected)
    def _row_chosen(self) -> None:
        self.action_edit_qty()

    @on(Input.Changed, "#qty")
    def _qty_typed(self, event: Input.Changed) -> None:
        row = self.current_row()
        if row is None or not event.value.strip():
            self._describe_target()
            return
        try:
            delta = qty_delta(event.value, row.qty)
        except PickerError as exc:
            put(self.query_one("#qty-message", Static), say("error", str(exc)))
            return
        put(
            self.query_one("#qty-message", Static),
            f"enter: {row.qty} -> {row.qty + delta} for {row.cells[0]} {row.cells[1]}"
            f" in {row.cells[4]}",
        )

    @on(Input.Submitted, "#qty")
    def _qty_submitted(self, event: Input.Submitted) -> None:
        row = self.current_row()
        message = self.query_one("#qty-message", Static)
        if row is None or self.stock is None:
            put(message, say("error", "no line chosen: move the cursor in the table"))
            return
        try:
            delta = qty_delta(event.value, row.qty)
            if delta == 0:
                put(message, f"unchanged: {row.qty} on hand")
                return
            backend.change_qty(
                self.stock.path, row.kind, row.index, delta, expect_sha256=self.stock.sha256
            )
        except PickerError as exc:
            put(message, say("error", str(exc)))
            return
        event.input.value = ""
        self.post_message(
            self.StockChanged(
                f"saved: {row.cells[0]} {row.cells[1]} in {row.cells[4]}: "
                f"{row.qty} -> {row.qty + delta}"
            )
        )
        self.query_one(DataTable).focus()

    # actions ---------------------------------------------------------------------
    def action_find(self) -> None:
        self.query_one("#find", Input).focus()

    def action_edit_qty(self) -> None:
        self._describe_target()
        self.query_one("#qty", Input).focus()

    def action_reload(self) -> None:
        self.post_message(self.StockChanged("read the file again"))

    def action_add_line(self) -> None:
        if self.stock is None or self.stock.path is None:
            put(self.query_one("#drawers-status", Static), say("error", "no stock file is open"))
            return
        from picker.ui.screens.add_line import AddLineScreen

        def added(note: str | None) -> None:
            if note:
                self.post_message(self.StockChanged(note))

        self.app.push_screen(AddLineScreen(self.stock.path, self.stock.sha256), added)
