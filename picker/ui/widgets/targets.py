"""The targets pane: what the filter must do, the limits of the search, the budget's inputs.

Each field is read as it is typed (``picker.ui.targets_form``, the CLI's readers); a
field that cannot be read shows why beside it. Whenever every field reads, the pane
posts ``TargetsPane.Changed`` with the new ``Targets``; the screen debounces and
searches. The fields scroll (the focused one stays in view); under them, always in
view, the form's state and the search's (progress while it runs, then its outcome or
why there is no design), in a box that wraps them and scrolls when they are long
(never cut). Escape in a field puts its text back and moves the focus to that box:
the pane has no table, and there digits and letters are keys (1-4, s), not text.
"""

from __future__ import annotations

from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical, VerticalScroll
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
    read_targets,
)
from picker.ui.widgets.common import Field, MessageBox, Plain, Tick, put, say

HINTS = {
    "order": "1 to 8; blank: 2 or from the stopband",
    "fc": "corner (band-pass: centre): 1k, 2.5 kHz",
    "stopband": "attenuate here; with atten dB: the order",
    "attenuation": "loss wanted at the stopband, in dB",
    "gain": "passband gain, a magnitude",
    "q": "blank: from response; number: one stage",
    "ripple": "passband ripple in dB, Chebyshev only",
    "r_min": "smallest resistance of a position",
    "r_max": "largest resistance",
    "c_min": "smallest capacitance",
    "c_max": "largest capacitance",
    "goal": "worst error allowed: 0.5% or 0.005",
    "time": "time limit; blank: search to the end",
    "window": "yield window around f0, Q and gain",
    "temp": "temperature span LO..HI, degrees C",
    "supply": "total supply; blank: ratings unchecked",
    "vout": "peak output; blank: slew unchecked",
}
RANK_HINT = "fewest pieces in goal, least error, yield"
NO_SEARCH = "search: none yet (it starts once every field reads)"


class TargetsPane(Vertical):
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
                yield Plain(hint, classes="field-message")

        fields = VerticalScroll(id="t-fields")
        fields.can_focus = False  # the focus goes to the fields; the focused one scrolls in
        with fields:
            yield from choice("type", "type", RESPONSE_TYPES, "what passes")
            yield from choice("response", "response", RESPONSES, "shape of the passband")
            for name, (label, default) in TEXT_FIELDS.items():
                if name == "r_min":
                    yield from choice(
                        "family", "circuit", FAMILIES, "topology family; any: the search picks"
                    )
                if name == "goal":
                    yield from choice("rank", "rank by", RANKS, RANK_HINT)
                with Horizontal(classes="field-row"):
                    yield Label(label, classes="field-label")
                    yield Field(default, id=f"t-{name}", compact=True)
                    yield Plain(HINTS[name], id=f"m-{name}", classes="field-message")
                if name == "time":
                    for tick_id, text in (
                        ("t-singles", "single pieces only (no series/parallel pairs)"),
                        ("t-polarized", "allow polarized capacitors (mind polarity and bias)"),
                    ):
                        with Horizontal(classes="field-row"):
                            yield Tick(text, id=tick_id, compact=True)
        with MessageBox(id="t-report", landing=True):
            yield Plain("", id="t-status")
            yield Plain(NO_SEARCH, id="t-outcome")

    def on_mount(self) -> None:
        self.call_after_refresh(self._read_all)

    def _texts(self) -> dict[str, str]:
        return {name: self.query_one(f"#t-{name}", Input).value for name in TEXT_FIELDS}

    def _read_all(self) -> None:
        """Read every field; beside each, its error or its hint; post what changed."""
        status = self.query_one("#t-status", Static)
        errors: dict[str, str] = {}
        targets = None
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
            errors = exc.errors
        except Exception as exc:  # a reader of the core missing or broken
            put(status, say("error", f"cannot read the form: {type(exc).__name__}: {exc}"))
            status.display = True
            return
        hints = dict(HINTS)
        if targets is not None and targets.spec:
            where = "q" if targets.response_type == "bandpass" else "order"
            hints[where] = f"from the stopband: {targets.spec}"
        for name in TEXT_FIELDS:
            text = say("error", errors[name]) if name in errors else hints[name]
            put(self.query_one(f"#m-{name}", Static), text)
        if targets is None:
            put(status, say("waiting", "fix the fields marked error"))
            status.display = True
            if self.targets is not None:
                self.targets = None
                self.post_message(self.Invalid())
            return
        put(status, "")
        status.display = False  # no empty row under the form
        if targets != self.targets:
            self.targets = targets
            self.post_message(self.Changed(targets))

    def show_outcome(self, text: str) -> None:
        """The search's outcome (or why there is no design), under the form; the
        command line's option names in it become the form's labels."""
        from picker.targets import relabel
        from picker.ui.targets_form import LABELS

        shown = f"search: {relabel(text, LABELS)}" if text else NO_SEARCH
        put(self.query_one("#t-outcome", Static), shown)

    def show_progress(self, text: str) -> None:
        """While a search runs: its stage, phase, time and best so far (s stops it)."""
        shown = f"{text} (s outside a text field: stop)" if text else NO_SEARCH
        put(self.query_one("#t-outcome", Static), shown)

    @on(Input.Changed)
    def _typed(self, event: Input.Changed) -> None:
        if (event.input.id or "").removeprefix("t-") in TEXT_FIELDS:
            self._read_all()

    @on(Select.Changed)
    @on(Checkbox.Changed)
    def _chosen(self) -> None:
        self._read_all()

    @on(Input.Submitted)
    def _next_field(self) -> None:
        self.screen.focus_next()
