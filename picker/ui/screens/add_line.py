"""Dialog: a new line of stock, written with the safe edit after the last line of its kind.

Each field is checked as it is typed and the message stands beside it; enter in any
field writes the line when every field reads. The text typed is what goes into the
file (the owner's own notation), quantities as integers.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Label, OptionList, Select, Static

from picker.ui import backend
from picker.ui.widgets.common import FocusRows, KeysFooter, MessageBox, Plain, put, say
from stock.errors import PickerError, ValueParseError

# field -> (label, kinds it belongs to, placeholder)
FIELDS = {
    "value": ("value", ("resistor", "capacitor"), "4k7, 10n, 4.7 uF"),
    "name": ("name", ("opamp",), "your name for it"),
    "gbw": ("GBW", ("opamp",), "3MHz"),
    "qty": ("qty", ("resistor", "capacitor", "opamp"), "whole number"),
    "tolerance": ("tolerance", ("resistor", "capacitor"), "1%  (blank: default)"),
    "dielectric": ("dielectric", ("capacitor",), "C0G, X7R, film ..."),
    "voltage": ("voltage", ("capacitor",), "50V"),
    "channels": ("channels", ("opamp",), "per package (blank: 1)"),
    "location": ("drawer", ("resistor", "capacitor", "opamp"), "A3"),
    "note": ("note", ("resistor", "capacitor", "opamp"), "free text"),
}
REQUIRED = {"value", "name", "gbw", "qty"}


def check(kind: str, field: str, text: str):
    """Value of one field as the file will hold it, or raise ValueParseError."""
    text = text.strip()
    if not text:
        if field in REQUIRED:
            raise ValueParseError(f"{FIELDS[field][0]} is required")
        return None
    from stock import values

    if field == "value":
        values.parse_value(text, kind=kind)
    elif field == "gbw":
        values.parse_frequency(text)
    elif field == "tolerance":
        values.parse_percent(text)
    elif field == "voltage":
        values.parse_voltage(text)
    elif field == "dielectric":
        from stock.model import DIELECTRICS

        names = {d.lower(): d for d in DIELECTRICS}
        if text.lower() not in names:
            raise ValueParseError(f"dielectric '{text}': write one of {', '.join(DIELECTRICS)}")
        return names[text.lower()]
    elif field in ("qty", "channels"):
        if not text.isdigit() or (field == "channels" and int(text) < 1):
            raise ValueParseError(
                f"{field} '{text}': write a whole number"
                + (" from 1" if field == "channels" else ", 0 or more")
            )
        return int(text)
    return text


class AddLineScreen(FocusRows, ModalScreen[str | None]):
    """Returns a note on success (the screen then reads the file again), else None."""

    BINDINGS = [
        Binding("enter", "write", "write the line", priority=True),
        Binding("ctrl+g,escape", "cancel", "cancel", key_display="^g"),
    ]

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        # enter belongs to a list while the focus is on it (it opens and chooses)
        return not (action == "write" and isinstance(self.focused, (Select, OptionList)))

    def __init__(self, path, sha256: str | None) -> None:
        super().__init__()
        self.path = path
        self.sha256 = sha256

    def compose(self) -> ComposeResult:
        with Vertical(id="add-dialog", classes="dialog"):
            yield Plain(
                "A new line in the stock file  (enter in any field: write it)",
                classes="dialog-title",
            )
            with Horizontal(classes="field-row"):
                yield Label("kind", classes="field-label")
                yield Select(
                    [("resistor", "resistor"), ("capacitor", "capacitor"), ("op amp", "opamp")],
                    value="resistor",
                    allow_blank=False,
                    id="add-kind",
                    compact=True,
                )
            for name, (label, _kinds, hint) in FIELDS.items():
                with Horizontal(classes="field-row", id=f"row-{name}"):
                    yield Label(label, classes="field-label")
                    yield Input(placeholder=hint, id=f"add-{name}", compact=True)
                    yield Plain("", id=f"msg-{name}", classes="field-message")
            with MessageBox(id="add-status-box"):  # a refusal can quote long paths
                yield Plain("", id="add-status")
        yield KeysFooter()

    def on_mount(self) -> None:
        self._show_fields()
        self.query_one("#add-value", Input).focus()

    @property
    def kind(self) -> str:
        return str(self.query_one("#add-kind", Select).value)

    def _show_fields(self) -> None:
        for name, (_label, kinds, _hint) in FIELDS.items():
            self.query_one(f"#row-{name}").display = self.kind in kinds

    @on(Select.Changed, "#add-kind")
    def _kind_changed(self) -> None:
        self._show_fields()
        for name in FIELDS:
            self._check_one(name)

    def _check_one(self, name: str) -> tuple[bool, object]:
        text = self.query_one(f"#add-{name}", Input).value
        message = self.query_one(f"#msg-{name}", Static)
        try:
            value = check(self.kind, name, text)
        except PickerError as exc:
            put(message, say("error", str(exc)) if text.strip() else "")
            return False, None
        put(message, "ok" if text.strip() else "")
        return True, value

    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        name = (event.input.id or "").removeprefix("add-")
        if name in FIELDS:
            self._check_one(name)

    def action_write(self) -> None:
        self._submit()

    def _submit(self) -> None:
        fields, bad = {}, []
        for name, (label, kinds, _hint) in FIELDS.items():
            if self.kind not in kinds:
                continue
            ok, value = self._check_one(name)
            if not ok:
                bad.append(label)
                if not self.query_one(f"#add-{name}", Input).value.strip():
                    put(
                        self.query_one(f"#msg-{name}", Static), say("error", f"{label} is required")
                    )
            elif value is not None:
                fields[name] = value
        status = self.query_one("#add-status", Static)
        status.scroll_visible(animate=False)  # the dialog scrolls when it is long
        if bad:
            put(status, say("error", "fix " + ", ".join(bad) + " first"))
            return
        try:
            backend.add_line(self.path, self.kind, fields, expect_sha256=self.sha256)
        except PickerError as exc:
            put(status, say("error", str(exc)))
            return
        what = fields.get("value") or fields.get("name")
        self.dismiss(
            f"added: {self.kind} {what}, qty {fields['qty']}"
            + (f" in {fields['location']}" if "location" in fields else "")
        )

    def action_cancel(self) -> None:
        self.dismiss(None)
