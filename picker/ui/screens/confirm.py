"""Dialog: a yes/no question over a listing (the parts of a build, the undo)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Footer, Static

from picker.report.owner import owner_lines, owner_text


class ConfirmScreen(ModalScreen[bool]):
    """Dismisses with True on "y", False on "n" (escape also says no)."""

    BINDINGS = [
        Binding("y", "answer(True)", "yes"),
        Binding("n,escape", "answer(False)", "no", key_display="n"),
    ]

    def __init__(self, question: str, body, *, yes: str = "y: yes", no: str = "n: no") -> None:
        super().__init__()
        self.question = question
        self.body = body
        self.yes = yes
        self.no = no

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog", id="confirm-dialog"):
            yield Static(owner_text(self.question), classes="dialog-title")
            with VerticalScroll(id="confirm-body"):
                yield (
                    Static(owner_lines(self.body))  # it quotes drawers, names, notes
                    if isinstance(self.body, str)
                    else Static(self.body)
                )
            yield Static(f"{self.yes}     {self.no}", id="confirm-keys", markup=False)
        yield Footer()

    def on_mount(self) -> None:
        self.query_one("#confirm-body").focus()

    def action_answer(self, yes: bool) -> None:
        self.dismiss(yes)
