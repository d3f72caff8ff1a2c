"""The repair screen's form: the circuit, one value per position, the failed part.

Each field is read as it is typed (``picker.ui.screens.repair_jobs``); a field that
cannot be read says why beside it, naming the field. Whenever anything changes the form
posts ``RepairForm.Changed`` with its reading (``Reading``); the screen debounces it.
Choosing another circuit replaces the position rows with that circuit's positions.
"""

from __future__ import annotations

from dataclasses import dataclass

from textual import on
from textual.app import ComposeResult
from textual.containers import Horizontal, Vertical
from textual.message import Message
from textual.widgets import Checkbox, Input, Label, Select, Static

from picker.ui.screens import repair_jobs as jobs
from picker.ui.widgets.common import Field, Plain, Tick, put, say
from stock.errors import PickerError

DEFAULT_TOPOLOGY = "sallen-key-lowpass"
GBW_HINT = "optional: the op amp's, e.g. 1MHz"
FREE_HINT = "optional: others free to change, e.g. C2"


@dataclass(frozen=True)
class Reading:
    """The form as read: ``stage`` is None while a value field has an error."""

    topology: str
    stage: object | None  # picker.repair.marked.MarkedStage
    gbw_hz: float | None
    failed: str | None
    free: tuple[str, ...]
    singles: bool
    allow_polarized: bool
    errors: tuple[str, ...]  # one line per field that cannot be read, naming it


def value_hint(kind: str, role: str) -> str:
    example = "10k or 10k/1%" if kind == "resistor" else "22n or 22n/5%"
    return f"{role}: {example}"


class RepairForm(Vertical):
    DEFAULT_CSS = """
    RepairForm { height: auto; }
    RepairForm #r-values { height: auto; }
    RepairForm .field-row Select { width: 30; }
    """

    class Changed(Message):
        def __init__(self, reading: Reading) -> None:
            self.reading = reading
            super().__init__()

    def __init__(self, **kwargs) -> None:
        super().__init__(**kwargs)
        self.topology = DEFAULT_TOPOLOGY
        self.names: list[str] = []
        self.hints: dict[str, str] = {}
        self._swapping = False

    def compose(self) -> ComposeResult:
        keys = jobs.topology_keys()
        if self.topology not in keys:
            self.topology = keys[0]
        with Horizontal(classes="field-row"):
            yield Label("circuit", classes="field-label")
            yield Select(
                [(k, k) for k in keys],
                value=self.topology,
                allow_blank=False,
                id="r-topology",
                compact=True,
            )
            yield Plain("as picker analyse --list", classes="field-message")
        with Vertical(id="r-values"):
            yield from self._rows(self.topology)
        with Horizontal(classes="field-row"):
            yield Label("op amp GBW", classes="field-label")
            yield Field("", id="r-gbw", compact=True)
            yield Plain(GBW_HINT, id="r-gbw-msg", classes="field-message")
        with Horizontal(classes="field-row"):
            yield Label("failed", classes="field-label")
            yield Select(
                self._failed_options(),
                prompt="none: analyse only",
                allow_blank=True,
                id="r-failed",
                compact=True,
            )
            yield Plain("the position to refill from the stock", classes="field-message")
        with Horizontal(classes="field-row"):
            yield Label("free too", classes="field-label")
            yield Field("", id="r-free", compact=True)
            yield Plain(FREE_HINT, id="r-free-msg", classes="field-message")
        with Horizontal(classes="field-row"):
            yield Tick(
                "single pieces only (no series/parallel pairs)", id="r-singles", compact=True
            )
        with Horizontal(classes="field-row"):
            yield Tick(
                "allow polarized capacitors (mind polarity and bias)",
                id="r-polarized",
                compact=True,
            )

    def _rows(self, key: str) -> list[Horizontal]:
        rows = []
        self.names = []
        self.hints = {}
        for name, kind, role in jobs.positions(key):
            self.names.append(name)
            self.hints[name] = value_hint(kind, role)
            rows.append(
                Horizontal(
                    Label(name, classes="field-label"),
                    Field("", id=f"r-pos-{name}", compact=True),
                    Static(
                        self.hints[name],
                        id=f"r-msg-{name}",
                        classes="field-message",
                    ),
                    classes="field-row",
                )
            )
        return rows

    def _failed_options(self) -> list[tuple[str, str]]:
        return [(name, name) for name in self.names]

    # changes -----------------------------------------------------------------------
    @on(Select.Changed, "#r-topology")
    async def _topology_chosen(self, event: Select.Changed) -> None:
        key = str(event.value)
        if key == self.topology:
            return
        self.topology = key
        self._swapping = True
        values = self.query_one("#r-values", Vertical)
        await values.remove_children()
        await values.mount_all(self._rows(key))
        self.query_one("#r-failed", Select).set_options(self._failed_options())
        self._swapping = False
        self.read()

    @on(Input.Changed)
    @on(Checkbox.Changed)
    @on(Select.Changed, "#r-failed")
    def _typed(self) -> None:
        if not self._swapping:
            self.read()

    @on(Input.Submitted)
    def _next_field(self) -> None:
        self.screen.focus_next()

    def set_value(self, name: str, text: str) -> None:
        """Type ``text`` into the field of position ``name`` (tests, a saved repair)."""
        self.query_one(f"#r-pos-{name}", Input).value = text

    def read(self) -> Reading:
        """Read every field, mark the bad ones beside themselves, post Changed."""
        errors: list[str] = []
        parts = []
        for name in self.names:
            field = self.query(f"#r-pos-{name}")
            if not field:
                return self._post(errors, None, None, None, ())
            message = self.query_one(f"#r-msg-{name}", Static)
            text = field.first(Input).value
            try:
                parts.append(jobs.read_part(self.topology, name, text))
            except PickerError as exc:
                errors.append(str(exc))
                put(message, say("error", str(exc)) if text.strip() else self.hints[name])
            except Exception as exc:  # a parser of the core missing or broken
                errors.append(f"{name}: cannot check: {exc}")
                put(message, say("error", f"{name}: cannot check: {exc}"))
            else:
                put(message, say("ok", parts[-1].text()))
        stage = None
        if not errors:
            from picker.repair.marked import MarkedStage

            stage = MarkedStage(self.topology, tuple(parts))
        gbw = self._field("r-gbw", GBW_HINT, jobs.read_gbw, errors)
        failed_select = self.query_one("#r-failed", Select)
        failed = None if failed_select.is_blank() else str(failed_select.value)
        free = self._field(
            "r-free", FREE_HINT, lambda t: jobs.read_free(self.topology, t, failed), errors
        )
        return self._post(errors, stage, gbw, failed, free or ())

    def _field(self, wid: str, hint: str, reader, errors: list[str]):
        text = self.query_one(f"#{wid}", Input).value
        message = self.query_one(f"#{wid}-msg", Static)
        try:
            value = reader(text)
        except PickerError as exc:
            errors.append(str(exc))
            put(message, say("error", str(exc)))
            return None
        put(message, hint)
        return value

    def _post(self, errors, stage, gbw, failed, free) -> Reading:
        reading = Reading(
            topology=self.topology,
            stage=stage,
            gbw_hz=gbw,
            failed=failed,
            free=tuple(free),
            singles=self.query_one("#r-singles", Checkbox).value,
            allow_polarized=self.query_one("#r-polarized", Checkbox).value,
            errors=tuple(errors),
        )
        self.post_message(self.Changed(reading))
        return reading
