"""Dialog: a yes/no question over a listing (the parts of a build, the undo)."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

from picker.ui.widgets.common import KeysFooter, Plain


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
            with VerticalScroll(id="confirm-body"):
                yield Plain(self.question, classes="dialog-title")
                yield (Plain(self.body) if isinstance(self.body, str) else Static(self.body))
            yield Plain(f"{self.yes}     {self.no}", id="confirm-keys")
        yield KeysFooter()

    def on_mount(self) -> None:
        self.query_one("#confirm-body").focus()

    def action_answer(self, yes: bool) -> None:
        self.dismiss(yes)
