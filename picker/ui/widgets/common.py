"""Small pieces shared by the panes."""

from __future__ import annotations

from typing import TYPE_CHECKING

from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.widgets import (
    Checkbox,
    DataTable,
    Footer,
    Input,
    ListView,
    OptionList,
    Select,
    Static,
    TextArea,
)

if TYPE_CHECKING:
    from textual.widget import Widget

    _Mixin = Widget  # the checker sees what the mixin is always combined with
else:
    _Mixin = object


def plain_lines(text: str) -> str:
    """``text`` with every control character but the line breaks shown as an escape
    (``picker.report.owner.visible``, line by line): owner text quoted in a message can
    hold an ESC or an OSC sequence, which must never reach the terminal raw."""
    from picker.report.owner import visible

    return "\n".join(visible(line) for line in text.split("\n"))


def cell(text: object):
    """A table cell of ``text`` exactly as written: a rich Text (a DataTable reads
    ``[bold]`` in a plain str as markup), controls escaped."""
    from rich.text import Text

    if isinstance(text, Text):
        return text
    from picker.report.owner import owner_text

    return owner_text(text)


class Plain(Static):
    """A Static that never reads markup and shows control characters escaped: for any
    text that may quote the owner's (locations, notes, names, file names)."""

    def __init__(self, content="", **kwargs) -> None:
        kwargs["markup"] = False
        super().__init__(plain_lines(content) if isinstance(content, str) else content, **kwargs)

    def update(self, content="", *, layout: bool = True) -> None:
        super().update(plain_lines(content) if isinstance(content, str) else content, layout=layout)


class MessageBox(VerticalScroll):
    """Status lines that are never cut: they wrap, and past ``max-height`` (the style
    sheet's ``.message-box``) the box scrolls instead of dropping the rest.

    A box with more than it shows can take the focus (tab reaches it; up/down, page
    up/down scroll it) and marks the focus with the same bar as a field. A ``landing``
    box can always take the focus: it is where Escape leaves a pane's text field when
    the pane has no table (``Field``), a place where digits and letters are keys, not
    text.
    """

    def __init__(self, *children, landing: bool = False, **kwargs) -> None:
        super().__init__(*children, **kwargs)
        self.add_class("message-box")
        self.set_class(landing, "landing")

    def allow_focus(self) -> bool:
        return self.has_class("landing") or self.max_scroll_y > 0


class TypingAware(_Mixin):
    """Hide and disable single-letter keys while a text field has the focus.

    A text field takes printable keys for itself, so a binding on "e" or "/" cannot
    fire there; the footer should not offer it either. List those actions in
    ``LETTER_ACTIONS``.
    """

    LETTER_ACTIONS: frozenset[str] = frozenset()

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        return not (
            action in self.LETTER_ACTIONS and isinstance(self.screen.focused, (Input, TextArea))
        )


class FocusRows(_Mixin):
    """A screen whose field rows mark the focused one: class ``-focused`` on its row.

    The style sheet shows that row's label in reverse (seen in every colour mode and
    under NO_COLOR). CSS ``:focus-within`` restyles only the focused widget's own
    ancestors, not the label beside it, and a blur is not always told to a pane that
    was just hidden, so the screen's own ``focused`` is watched instead.
    """

    def on_mount(self) -> None:
        self.watch(self, "focused", _mark_rows)


def _mark_rows(old, new) -> None:
    for widget, focused in ((old, False), (new, True)):
        if widget is None:
            continue
        for node in widget.ancestors_with_self:
            if node.has_class("field-row"):
                node.set_class(focused, "-focused")
                break


def say(kind: str, text: str) -> str:
    """Message text whose meaning is in the words, not the colour: "error: ...", "ok: ..."."""
    return f"{kind}: {text}" if text else ""


class Tick(Checkbox):
    """A check box that shows its state as a mark: "[x]" ticked, "[ ]" not.

    Textual's own box shows the same "X" either way and tells the states apart by
    colour alone, which NO_COLOR and some terminals lose.
    """

    BUTTON_LEFT = "["
    BUTTON_RIGHT = "]"
    BUTTON_INNER = " "

    def watch_value(self) -> None:
        super().watch_value()
        self.BUTTON_INNER = "x" if self.value else " "
        self.refresh()


def put(static, content) -> None:
    """``static.update(content)`` only when the content changes.

    An update re-lays the screen out; on every keystroke that is the main cost of
    typing in a form, and most keystrokes leave the message beside a field as it was.
    """
    if getattr(static, "_picker_shown", None) != content:
        static._picker_shown = content
        static.update(content)


class RowTable(DataTable):
    """The one table every pane uses: a row cursor, and Home/End go to the first/last row.

    Textual's own table keeps Home/End for the leftmost/rightmost column (and moves
    rows only with ctrl+home/ctrl+end); a person reading a list of parts expects
    Home and End to jump within the list, so both spellings do that here.
    """

    BINDINGS = [
        Binding("home,ctrl+home", "scroll_top", "first row", show=False),
        Binding("end,ctrl+end", "scroll_bottom", "last row", show=False),
    ]

    def __init__(self, **kwargs) -> None:
        kwargs.setdefault("cursor_type", "row")
        super().__init__(**kwargs)


_LISTS = (DataTable, ListView, OptionList)


def _landing(widget: Widget) -> bool:
    """Can the focus go to ``widget`` when a field's edit is cancelled: a table or
    list of the pane, or a landing message box, shown and focusable now. The list
    inside a dropdown (a Select's own overlay) is hidden while the dropdown is shut:
    focus there is invisible and takes digits as a search, so it never counts."""
    if not (isinstance(widget, _LISTS) or widget.has_class("landing")) or not widget.focusable:
        return False
    for node in widget.ancestors_with_self:
        if isinstance(node, Select) or not node.display:
            return False
        if node is widget.screen:
            break
    return True


class Field(Input):
    """A text field where Escape (or ctrl+g) cancels the edit.

    The field gets back the text it had when it took the focus, without applying it
    (the field's own ``Changed`` message still tells the pane, as after any edit),
    and the focus goes to the nearest place of its pane where keys are not text: a
    table or list, or the pane's landing ``MessageBox`` (the targets pane has no
    table). A field with none around it (a dialog's form) lets the key go on to the
    screen, where Escape means "no/back".
    """

    BINDINGS = [Binding("escape,ctrl+g", "cancel_edit", "cancel edit", show=False)]

    _picker_before = ""

    def on_focus(self) -> None:
        self._picker_before = self.value

    def _pane_list(self) -> Widget | None:
        for node in self.ancestors:
            if node is self.screen:
                break
            for found in node.query("*"):
                if _landing(found):
                    return found
        return None

    def check_action(self, action: str, parameters: tuple[object, ...]) -> bool | None:
        if action == "cancel_edit":
            return self._pane_list() is not None
        return super().check_action(action, parameters)

    def action_cancel_edit(self) -> None:
        target = self._pane_list()
        self.value = self._picker_before
        if target is not None:
            target.focus()


_FIRST_KEYS = ("app.help", "help", "quit", "app.quit")


class KeysFooter(Footer):
    """The footer every screen uses: help (?) and quit (^q) come first.

    Textual lists the focused widget's keys first and the app's last, so on a narrow
    terminal (60 columns) the two keys a person needs most fell off the right edge.
    """

    def compose(self):
        keys = list(super().compose())
        first = [k for k in keys if getattr(k, "action", None) in _FIRST_KEYS]
        first.sort(key=lambda k: _FIRST_KEYS.index(k.action) // 2)
        yield from first + [k for k in keys if k not in first]
