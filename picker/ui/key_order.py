"""Every key applied in the order typed, one at a time (DEVELOPERS.md, Terminal UI).

Textual handles a key in several hops: the app runs its priority bindings at once,
then forwards the key to the focused widget's message queue; a key the widget does
not take bubbles up through the queue of each ancestor and comes back to the app,
which then runs the ordinary bindings (an Input's BackSpace and ctrl+u are such
bindings). The next key in the same terminal read does not wait for those hops: a
priority binding (ctrl+n) runs while the BackSpace before it is still on its way up
and then finds the focus elsewhere, and a printable key typed after a BackSpace is
inserted before the BackSpace is applied. Even a change of focus waits in the app's
queue behind keys already read, so a digit after ctrl+n still lands in the old field.

``InOrderApp`` makes key handling strictly sequential: keys (and pastes) wait in the
app's own line; the next one starts only after the one before is finished, and after
whatever the app was asked to do while handling it (a focus change is one of those),
and after the set-up of a screen it opened (the dialog's first field takes the keys):

- a priority binding that ran finishes the key;
- a widget that stops the key finishes it once that widget's handler returns;
- a key that bubbles back to the app finishes once the app's bindings have run;
- a key no widget accepts (disabled, closing) finishes at once.

A key that none of these finishes (its widget removed while the key waited in its
queue) is let go after ``LOST_KEY_S`` so that the keyboard never locks up.
"""

from __future__ import annotations

from collections import deque
from typing import TYPE_CHECKING, cast

from textual import events
from textual._context import active_message_pump
from textual.app import App

if TYPE_CHECKING:
    from textual.message_pump import MessagePump
    from textual.timer import Timer

LOST_KEY_S = 2.0


def _escape_then_key() -> None:
    """Let Escape followed at once by a key reach the app as ``alt+`` that key.

    A terminal multiplexer (tmux waits ``escape-time`` for more) or a slow link sends
    Escape and a fast next key as one sequence, ESC then the key; Textual reads ESC
    with a digit as a macOS Option character (ESC 3 as a pound sign), so "7, Escape, 3"
    in a field wrote "7£". With those entries gone the parser gives ``alt+3``, which
    the key line splits back into Escape and 3 (:func:`_split`)."""
    from textual import _ansi_sequences

    table = cast("dict[str, object]", _ansi_sequences.ANSI_SEQUENCES_KEYS)
    for seq, value in list(table.items()):
        if len(seq) == 2 and seq[0] == "\x1b" and isinstance(value, str) and len(value) == 1:
            del table[seq]


_escape_then_key()


def _split(event: events.Key) -> list[events.Key]:
    """``alt+X`` (X one character) as the two keys typed, Escape and X: the app binds
    no alt key, and Escape followed fast by a key arrives so (see above)."""
    rest = event.key[4:] if event.key.startswith("alt+") else ""
    char = rest[6:].upper() if rest.startswith("shift+") else rest
    if len(char) != 1:
        return [event]
    return [events.Key("escape", "\x1b"), events.Key(char, char)]


class _Ordered:
    """What the in-order copies of a key and a paste add: they report being stopped."""

    __slots__ = ()
    _line: KeyLine

    def stop(self, stop: bool = True):
        result = super().stop(stop)  # type: ignore[misc]
        if stop:
            self._line.stopped(self)  # type: ignore[arg-type]
        return result


class OrderedKey(_Ordered, events.Key):
    __slots__ = ("_line",)


class OrderedPaste(_Ordered, events.Paste):
    __slots__ = ("_line",)


# handled by the same methods as the events they copy (on_key, _on_paste, key bindings)
OrderedKey.handler_name = events.Key.handler_name
OrderedPaste.handler_name = events.Paste.handler_name

Ordered = OrderedKey | OrderedPaste


class KeyLine:
    """The keys waiting, the one being handled, and how each one is finished."""

    def __init__(self, app: InOrderApp) -> None:
        self.app = app
        self.waiting: deque[Ordered] = deque()
        self.current: Ordered | None = None
        self.releasing = False
        self._timer: Timer | None = None
        self._screen: object = None  # the screen when the last key was started

    @property
    def busy(self) -> bool:
        return self.current is not None or self.releasing

    def copy(self, event: events.Key | events.Paste) -> Ordered:
        ordered: Ordered
        if isinstance(event, events.Key):
            ordered = OrderedKey(event.key, event.character)
        else:
            ordered = OrderedPaste(event.text)
        ordered._line = self
        ordered._sender = None  # from the terminal, as the driver's own events are
        return ordered

    def stopped(self, event: Ordered) -> None:
        """A handler stopped the key: finish it once that handler has returned."""
        if event is not self.current:
            return
        pump: MessagePump = active_message_pump.get(self.app)
        if pump is self.app or not pump.call_later(self.finish, event):
            self.app.call_later(self.finish, event)

    def finish(self, event: Ordered) -> None:
        """The key is handled: the next starts after what the app was asked to do."""
        if event is not self.current:
            return
        self.current = None
        if self._timer is not None:
            self._timer.stop()
            self._timer = None
        self.releasing = True
        self.app.call_later(self._release)

    async def _release(self) -> None:
        screen = self.app.screen
        if screen is not self._screen:
            # the key opened or closed a screen: what that screen does as it starts or
            # resumes (its on_mount gives a field the focus) comes first, so go once
            # through its queue and then the app's
            self._screen = screen
            if screen.call_later(self.app.call_later, self._release):
                return
        self.releasing = False
        await self.start_next()

    async def start_next(self) -> None:
        app = self.app
        while not self.busy and self.waiting:
            event = self.waiting.popleft()
            self.current = event
            self._screen = app.screen
            self._timer = app.set_timer(LOST_KEY_S, lambda e=event: self.finish(e))
            if isinstance(event, events.Key):
                screen = app.screen
                if (
                    screen.maximized is not None
                    and event.key == "escape"
                    and app.escape_to_minimize
                ):
                    screen.minimize()
                    self.finish(event)
                    continue
                if await app._check_bindings(event.key, priority=True):
                    self.finish(event)
                    continue
            target = app.focused or app.screen
            event._set_forwarded()
            if not target.post_message(event):
                self.finish(event)


class InOrderApp(App):
    """An app that applies keys and pastes strictly in the order they arrive."""

    def __init__(self, *args, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self._key_line = KeyLine(self)

    async def on_event(self, event: events.Event) -> None:
        line = self._key_line
        if isinstance(event, (OrderedKey, OrderedPaste)):
            # back from the focused widget: the app's own bindings, then the next key
            await super().on_event(event)
            line.finish(event)
        elif isinstance(event, (events.Key, events.Paste)) and not event.is_forwarded:
            if isinstance(event, events.Key) and not self.app_focus:
                self.app_focus = True
            for part in _split(event) if isinstance(event, events.Key) else [event]:
                line.waiting.append(line.copy(part))
            await line.start_next()
        else:
            await super().on_event(event)
