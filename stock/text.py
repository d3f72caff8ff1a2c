"""Owner text in messages: shown as written, control characters escaped, long text cut.

printable(text)   controls (ESC, bidi overrides ...) as Python escapes
shown(text)       quoted for a message: 'shelf 3'
toml_text(value)  how TOML spells a parsed value: true, 1979-05-27, [1, 2]
type_word(value)  what a parsed value is, in words: "a date", "a list"
"""

from __future__ import annotations

import math


def printable(text: str) -> str:
    """``text`` with every character that is not printable (C0 and C1 controls such as ESC,
    DEL, bidi overrides, line separators) shown as a Python escape: ``\\x1b``, ``\\u202e``."""
    if text.isprintable():
        return text
    return "".join(
        c if c.isprintable() else c.encode("unicode_escape").decode("ascii") for c in text
    )


def shown(text, limit: int = 80) -> str:
    """``text`` in single quotes for a message, as the owner wrote it.

    Control characters (ESC, CR, tabs ...) are shown escaped (``\\x1b``), never sent
    raw; past ``limit`` characters the text is cut and its length said.
    """
    s = text if isinstance(text, str) else toml_text(text)
    out = printable(s)
    if len(out) <= limit:
        return f"'{out}'"
    return f"'{out[: limit - 1]}…' ({len(s):,} characters)"


def toml_text(value, limit: int = 200) -> str:
    """How TOML spells a parsed ``value``: ``true``, ``1979-05-27``, ``1000.0``, ``[1, 2]``.

    For messages about a value whose own text in the file is not at hand; long arrays
    and tables are cut near ``limit`` characters.
    """
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        if value.bit_length() > 10_000:  # str() refuses past Python's digit limit
            return f"<a whole number of about {int(value.bit_length() * 0.30103):,} digits>"
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return '"' + value.replace("\\", "\\\\").replace('"', '\\"') + '"'
    if hasattr(value, "isoformat"):  # date, time, datetime
        return value.isoformat()
    if isinstance(value, (list, tuple)):
        parts, size = [], 0
        for x in value:
            if size > limit:
                parts.append("…")
                break
            parts.append(toml_text(x, limit))
            size += len(parts[-1]) + 2
        return "[" + ", ".join(parts) + "]"
    if isinstance(value, dict):
        parts, size = [], 0
        for k, x in value.items():
            if size > limit:
                parts.append("…")
                break
            parts.append(f"{k} = {toml_text(x, limit)}")
            size += len(parts[-1]) + 2
        return "{" + ", ".join(parts) + "}"
    return str(value)


def type_word(value) -> str:
    """What a parsed TOML value is, in words: "a date", "true or false", "a list" ..."""
    import datetime as _dt

    if isinstance(value, bool):
        return "true or false"
    if isinstance(value, int):
        return "a whole number"
    if isinstance(value, float):
        return "a float"
    if isinstance(value, str):
        return "text"
    if isinstance(value, _dt.datetime):
        return "a date and time"
    if isinstance(value, _dt.date):
        return "a date"
    if isinstance(value, _dt.time):
        return "a time of day"
    if isinstance(value, (list, tuple)):
        return "a list"
    if isinstance(value, dict):
        return "a table"
    return type(value).__name__


__all__ = ["printable", "shown", "toml_text", "type_word"]
