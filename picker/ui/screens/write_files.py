"""Dialog: write the chosen design to files (``w`` on pane 4).

Three names, filled in with defaults that say what the design is: the saved design
(TOML, what ``picker bom`` and ``picker netlist`` read), its BOM as CSV and its SPICE
netlist. A blank name is not written. Enter checks every name (``picker.ui.outputs``);
a refusal is shown with its reason and the dialog stays. Files that exist already are
named in a yes/no question before anything is written. Dismisses with the lines of
words saying what was written, or None.
"""

from __future__ import annotations

from pathlib import Path

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, Static

from picker.ui import outputs
from picker.ui.pick_targets import answers
from picker.ui.widgets.common import FocusRows, KeysFooter, MessageBox, Plain, say
from stock.errors import PickerError

LABELS = {"design": "design", "bom": "BOM CSV", "netlist": "netlist"}


class WriteFilesScreen(FocusRows, ModalScreen[list[str] | None]):
    BINDINGS = [
        Binding("enter", "write", "write the files", priority=True),
        Binding("ctrl+g,escape", "cancel", "cancel", key_display="^g"),
    ]

    def __init__(self, candidate, rank: int, targets, stock) -> None:
        super().__init__()
        self.candidate = candidate
        self.rank = rank
        self.targets = targets
        self.stock = stock
        self.written: list[str] | None = None

    def compose(self) -> ComposeResult:
        names = outputs.default_names(self.targets)
        with Vertical(id="write-dialog", classes="dialog"):
            what = f" ({answers(self.targets)})" if self.targets is not None else ""
            yield Plain(
                f"Write candidate {self.rank}{what} to files\n(enter: write; ^g: cancel)",
                classes="dialog-title",
            )
            for kind, label in LABELS.items():
                with Horizontal(classes="field-row"):
                    yield Label(label, classes="field-label")
                    yield Input(names[kind], id=f"w-{kind}", compact=True)
            yield Plain(
                f"relative names are in {Path.cwd()}; a blank name is not written",
                id="write-where",
            )
            with MessageBox(id="write-status-box"):  # a refusal can quote long paths
                yield Plain("", id="write-status")
        yield KeysFooter()

    def on_mount(self) -> None:
        self.query_one("#w-design", Input).focus()

    def _names(self) -> dict[str, str]:
        return {kind: self.query_one(f"#w-{kind}", Input).value for kind in LABELS}

    def _say(self, text: str) -> None:
        status = self.query_one("#write-status", Static)
        status.update(text)
        status.scroll_visible(animate=False)  # the dialog scrolls when it is long

    def action_write(self) -> None:
        try:
            planned = outputs.check(self._names(), self.stock)
        except PickerError as exc:
            self._say(say("refused", str(exc)))
            return
        there = [o for o in planned if o.exists]
        if not there:
            self._write(planned)
            return
        from picker.ui.screens.confirm import ConfirmScreen

        listing = "\n".join(f"{outputs.KINDS[o.kind][0]}: {o.path}" for o in there)
        files = ", ".join(str(o.path) for o in there)

        def answered(yes: bool | None) -> None:
            if yes:
                self._write(planned)
            else:
                self._say(f"nothing written: {files} kept as it is")

        self.app.push_screen(
            ConfirmScreen(
                f"Replace {files}? The old contents are lost.",
                listing,
                yes=f"y: yes, replace {there[0].path}"
                if len(there) == 1
                else f"y: yes, replace these {len(there)} files",
                no="n: no, keep them",
            ),
            answered,
        )

    def _write(self, planned) -> None:
        try:
            done = outputs.write(
                planned, candidate=self.candidate, targets=self.targets, stock=self.stock
            )
        except PickerError as exc:
            self._say(say("refused", str(exc)))
            return
        self.written = done
        self.dismiss(done)

    def action_cancel(self) -> None:
        self.dismiss(None)
