"""The help screen: the keys, and the cautions for work on live equipment."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

from picker.ui.widgets.common import KeysFooter

KEYS = """\
Anywhere
  ctrl+q      quit
  ctrl+n      next pane (also from inside a text field)
  F1 F2 F3 F4 go to a pane: drawers, targets, matches, chosen
              (also from inside a text field)
  1 2 3 4     the same outside text fields (inside one they are text)
  ?           this help (outside text fields)
  The field with the focus has a bar at its left and its label is
  shown in reverse.
  tab         next field or table; shift+tab goes back
  home/end    first/last row of a table
  escape      in a text field: undo the edit, out of the field to the
              pane's table (targets: to the status box under the
              form; ctrl+g too); in a dialog: no / back
  m           repair mode: a stage as built, substitutes for a part

1 drawers: the stock file
  /           find: words or a value (4.7k finds the 4k7 line);
              enter goes back to the table
  up/down     choose a line; enter or e: type its new quantity
  quantity    12 sets 12, +3 adds three, -2 takes two away;
              enter writes the file
  a           add a line: a form; enter writes it, ctrl+g cancels
  r           read the file again (after you edit it by hand)

2 targets: every change starts a new search after a short pause
  lists       (type, response, circuit) enter opens, up/down, enter
  space       ticks or unticks a box

  rank by     pieces: fewest pieces within the goal; error: smallest;
              yield: highest Monte Carlo yield inside the window
  stopband    with atten dB (order blank): the order that gives it
  time s      a time limit: the best found by then (blank: no limit)
  window ..   the error budget's inputs: window, temp C, supply V,
              out peak V (as the CLI's --window, --temp, --supply ..)
3 matches     up/down, then enter: look closer (opens pane 4)
  s           stop the running search: its best so far is shown
  p           what to buy to improve these matches (as --suggest 3);
              s stops it
4 chosen      b: build it (asks first); u: undo the last build
              v: its step response and group delay
              w: write it to files: saved design, BOM CSV, netlist
              space/page down, j/k or up/down: the rest of the pane
Dialogs       y yes, n no; a form: ctrl+g cancels (escape too)

Every write to the stock file is locked and atomic, and refused
when the file changed since it was read; comments and layout stay.
"""

CAUTIONS = """\
Safety: repairs happen on mains-powered and high-voltage equipment.
 - Isolate the equipment from the mains and lock it off before you
   work on it; use an isolating transformer for live measurements.
 - Discharge capacitors, and check with a meter, before you touch a
   board: supply and filter capacitors hold a charge long after the
   power is removed.
 - Use parts rated for the job (voltage, power, temperature); a
   replacement must be rated at least as well as the part it replaces.
 - Give capacitors voltage margin over the highest voltage they will
   see, and mind the polarity of electrolytic and tantalum parts:
   reversed, they fail, sometimes violently.
 - This tool checks arithmetic, not safety. Follow your local
   electrical codes, and leave mains and high-voltage work to
   licensed practice where the rules require it.
"""


class HelpScreen(ModalScreen[None]):
    BINDINGS = [
        Binding("question_mark,q,escape", "close", "close help", key_display="? / q"),
    ]

    def compose(self) -> ComposeResult:
        with VerticalScroll(id="help-body", classes="dialog"):
            text = Text()
            text.append("picker: keys   (up/down, page up/down: scroll)\n", style="bold")
            text.append(KEYS)
            text.append("\n")
            text.append(CAUTIONS, style="bold")
            yield Static(text)
        yield KeysFooter()

    def on_mount(self) -> None:
        self.query_one("#help-body").focus()

    def action_close(self) -> None:
        self.dismiss(None)
