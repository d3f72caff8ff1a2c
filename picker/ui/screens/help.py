"""The help screen: the keys, and the cautions for work on live equipment."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Footer, Static

KEYS = """\
Anywhere
  ctrl+q        quit
  ctrl+n        next pane (works inside text fields too)
  1 2 3 4       go to a pane: drawers, targets, matches, chosen (outside text fields)
  ?             this help (outside text fields)
  tab/shift+tab move between fields and tables

1 drawers (the stock file)
  /             find: type words or a value (4.7k finds the 4k7 line); enter: to the table
  up/down       choose a line;  enter or e: set its quantity
  quantity      12 sets 12, +3 adds three, -2 takes two away; enter writes the file
  a             add a line (a dialog; enter writes it, ctrl+g or escape cancels)
  r             read the file again (after editing it by hand)

2 targets       every change starts a new search after a short pause
  type, response, circuit: up/down or enter opens the list, enter chooses
  space         tick or untick a box

3 matches       up/down and enter: look closer at a candidate (goes to pane 4)
4 chosen        b: build it (asks first)   u: undo the last build (asks first)
  Dialogs: y yes, n no; ctrl+g or escape cancels a form.

Every write to the stock file is locked, atomic and refused when the file changed
since it was read; comments and layout are kept.
"""

CAUTIONS = """\
Safety. Repairs happen on mains-powered and high-voltage equipment.
  - Isolate the equipment from the mains and lock it off before you work on it;
    use an isolating transformer for live measurements.
  - Discharge capacitors (and check with a meter) before you touch a board:
    supply and filter capacitors hold a charge long after power is removed.
  - Use parts rated for the job: voltage, power, temperature; a replacement must
    be at least as well rated as the part it replaces.
  - Give capacitors voltage margin over the highest voltage they will see, and
    mind the polarity of electrolytic and tantalum capacitors: reversed, they fail,
    sometimes violently.
  - This tool checks arithmetic, not safety. Follow your local electrical codes and
    leave mains and high-voltage work to licensed practice where the rules require it.
"""


class HelpScreen(ModalScreen[None]):
    BINDINGS = [
        Binding("question_mark,q,escape", "close", "close help", key_display="? / q"),
    ]

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="help-body", classes="dialog"):
            text = Text()
            text.append("picker: keys\n", style="bold")
            text.append(KEYS)
            text.append("\n")
            text.append(CAUTIONS, style="bold")
            yield Static(text)
        yield Footer()

    def on_mount(self) -> None:
        self.query_one("#help-body").focus()

    def action_close(self) -> None:
        self.dismiss(None)
