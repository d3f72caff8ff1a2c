"""Owner text (locations, notes, names, paths) is data: shown exactly as written.

Two helpers, one for each kind of output:

    visible("shelf [top]\\x1b[2J")  -> 'shelf [top]\\\\x1b[2J'    plain str, controls escaped
    owner_text("shelf [top]")       -> rich.text.Text, never read as console markup
    owner_lines("a\\nb [/]")         -> the same, one escaped line per line of text

Rich reads ``[bold]`` or ``[/]`` in a plain string as markup (a style, or an error for
an unmatched tag); a ``Text`` is never parsed. Control characters (C0 such as ESC and
BEL, DEL, C1 such as CSI 0x9b, and the Unicode bidi overrides and line separators)
would reach the terminal raw and could move the cursor, retitle the window (OSC) or
hide text; every character that is not printable is shown as a Python escape instead
(``\\x1b``, ``\\u202e``).
A tab and a newline are shown escaped too, so one value stays on one line of a table;
``owner_lines`` keeps the newlines of a listing that quotes owner text (a dialog body).

``visible`` imports no rich; ``owner_text`` imports rich when called.
"""

from __future__ import annotations


def visible(text: object) -> str:
    """``text`` as a str with every control character shown as an escape (see above);
    the same escapes as the messages of ``stock`` (``stock.values.printable``)."""
    from stock.values import printable

    return printable("" if text is None else str(text))


def owner_text(text: object, style: str = ""):
    """A ``rich.text.Text`` of ``text`` exactly as written: no markup, controls escaped."""
    from rich.text import Text

    return Text(visible(text), style=style)


def owner_lines(text: object, style: str = ""):
    """``owner_text`` of each line of ``text``, joined by newlines (kept as line breaks)."""
    from rich.text import Text

    lines = ("" if text is None else str(text)).split("\n")
    return Text("\n".join(visible(line) for line in lines), style=style)


__all__ = ["owner_lines", "owner_text", "visible"]
