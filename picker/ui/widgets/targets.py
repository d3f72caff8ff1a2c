"""The targets pane: what the filter must do and the limits of the search.

Each field is read as it is typed (``picker.ui.targets_form``); a field that cannot be
read shows why beside it. Whenever every field reads, the pane posts
``TargetsPane.Changed`` with the new ``Targets``; the screen debounces and searches.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, VerticalScroll
from textual.message import Message
from textual.widgets import Checkbox, Input, Label, Select, Static

from picker.ui.targets_form import (
    FAMILIES,
    RANKS,
    RESPONSE_TYPES,
    RESPONSES,
    TEXT_FIELDS,
    FormError,
    Targets,
    read_field,
    read_targets,
)
from picker.ui.widgets.common import Tick, put, say
from stock.errors import PickerError

HINTS = {
    "order": "1 to 8",
    "fc": "corner (band-pass: centre): 1k, 2.5 kHz",
    "gain": "passband gain, a magnitude",
    "q": "blank: from response; number: one stage",
    "ripple": "Chebyshev only",
    "r_min": "smallest resistance of a position",
    "r_max": "largest resistance",
    "c_min": "smallest capacitance",
    "c_max": "largest capacitance",
    "goal": "precision goal: worst error of f0, Q, gain",
    "time": "time limit; blank: search to the end",
}


class TargetsPane(VerticalScroll):
    """The form. ``targets`` holds the last complete reading, or None."""

    class Changed(Message):
        def __init__(self, targets: Targets) -> None:
            self.targets = targets
            super().__init__()

    class Invalid(Message):
        """Some field cannot be read: the matches shown no longer answer the form."""

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.targets: Targets | None = None

    def compose(self) -> ComposeResult:
        def choice(name: str, label: str, options, hint: str):
            with Horizontal(classes="field-row"):
                yield Label(label, classes="field-label")
                yield Select(
                    [(o, o) for o in options],
                    value=options[0],
                    allow_blank=False,
                    id=f"t-{name}",
                    compact=True,
                )
                yield Static(hint, classes="field-message", markup=False)

        yield from choice("type", "type", RESPONSE_TYPES, "what passes")
        yield from choice("response", "response", RESPONSES, "shape of the passband")
        for name, (label, default) in TEXT_FIELDS.items():
            if name == "r_min":
                yield from choice(
                    "family", "circuit", FAMILIES, "topology family; any: the search picks"
                )
            if name == "goal":
                yield from choice(
                    "rank", "rank by", RANKS, "pieces: fewest within the goal; error: smallest"
                )
            with Horizontal(classes="field-row"):
                yield Label(label, classes="field-label")
                yield Input(default, id=f"t-{name}", compact=True)
                yield Static(HINTS[name], id=f"m-{name}", classes="field-message", markup=False)
        with Horizontal(classes="field-row"):
            yield Tick(
                "single pieces only (no series/parallel pairs)", id="t-singles", compact=True
            )
        with Horizontal(classes="field-row"):
            yield Tick(
                "allow polarized capacitors (mind polarity and bias)",
                id="t-polarized",
                compact=True,
            )
        yield Static("", id="t-status", markup=False)
        yield Static("", id="t-outcome", markup=False)

    def on_mount(self) -> None:
        self.call_after_refresh(self._read_all)

    def _texts(self) -> dict[str, str]:
        return {name: self.query_one(f"#t-{name}", Input).value for name in TEXT_FIELDS}

    def _read_all(self) -> None:
        status = self.query_one("#t-status", Static)
        try:
            targets = read_targets(
                self._texts(),
                response_type=str(self.query_one("#t-type", Select).value),
                response=str(self.query_one("#t-response", Select).value),
                family=str(self.query_one("#t-family", Select).value),
                singles=self.query_one("#t-singles", Checkbox).value,
                allow_polarized=self.query_one("#t-polarized", Checkbox).value,
                rank=str(self.query_one("#t-rank", Select).value),
            )
        except FormError as exc:
            for name, text in exc.errors.items():
                put(self.query_one(f"#m-{name}", Static), say("error", text))
            put(status, say("waiting", "fix the fields marked error"))
            if self.targets is not None:
                self.targets = None
                self.post_message(self.Invalid())
            return
        except Exception as exc:  # a parser of the core missing or broken
            put(status, say("error", f"cannot read the form: {exc}"))
            return
        put(status, "")
        if targets != self.targets:
            self.targets = targets
            self.post_message(self.Changed(targets))

    def show_outcome(self, text: str) -> None:
        """The search's outcome (or why there is no design), under the form."""
        put(self.query_one("#t-outcome", Static), f"search: {text}" if text else "")

    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        name = (event.input.id or "").removeprefix("t-")
        if name not in TEXT_FIELDS:
            return
        message = self.query_one(f"#m-{name}", Static)
        try:
            read_field(name, event.value)
        except PickerError as exc:
            put(message, say("error", str(exc)))
        except Exception as exc:
            put(message, say("error", f"cannot check: {exc}"))
        else:
            put(message, HINTS[name])
        self._read_all()

    @on(Select.Changed)
    @on(Checkbox.Changed)
    def _chosen(self) -> None:
        self._read_all()

    @on(Input.Submitted)
    def _next_field(self) -> None:
        self.screen.focus_next()
