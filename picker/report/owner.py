"""Owner text (locations, notes, names, paths) is data: shown exactly as written.

Two helpers, one for each kind of output:

    visible("shelf [top]\\x1b[2J")  -> 'shelf [top]\\\\x1b[2J'    plain str, controls escaped
    owner_text("shelf [top]")       -> rich.text.Text, never read as console markup

Rich reads ``[bold]`` or ``[/]`` in a plain string as markup (a style, or an error for
an unmatched tag); a ``Text`` is never parsed. Control characters (C0 such as ESC and
BEL, DEL, C1 such as CSI 0x9b, and the Unicode bidi overrides and line separators)
would reach the terminal raw and could move the cursor, retitle the window (OSC) or
hide text; they are shown as Python-style escapes instead (``\\x1b``, ``\\u202e``).
A tab and a newline are shown escaped too, so one value stays on one line of a table.

``visible`` imports nothing; ``owner_text`` imports rich when called.
"""

from __future__ import annotations

# Unicode formatting controls that reorder or hide text (bidi embeddings, overrides,
# isolates) and the line and paragraph separators
_UNICODE_CONTROLS = frozenset(
    [*range(0x202A, 0x202F), *range(0x2066, 0x206A), 0x200E, 0x200F, 0x061C, 0x2028, 0x2029]
)


def _escape(ch: str) -> str:
    n = ord(ch)
    if n < 0x20 or 0x7F <= n <= 0x9F:
        return {"\t": "\\t", "\n": "\\n", "\r": "\\r"}.get(ch, f"\\x{n:02x}")
    if n in _UNICODE_CONTROLS:
        return f"\\u{n:04x}"
    return ch


def visible(text: object) -> str:
    """``text`` as a str with every control character shown as an escape (see above)."""
    s = "" if text is None else str(text)
    if s.isprintable() and s.isascii():
        return s
    return "".join(_escape(ch) for ch in s)


def owner_text(text: object, style: str = ""):
    """A ``rich.text.Text`` of ``text`` exactly as written: no markup, controls escaped."""
    from rich.text import Text

    return Text(visible(text), style=style)


__all__ = ["owner_text", "visible"]
