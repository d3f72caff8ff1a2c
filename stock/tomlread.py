"""Reading TOML that anyone may have written: every failure is one located ``TomlProblem``.

The standard library's reader is strict and fast, but hostile text makes it raise more
than ``TOMLDecodeError``: ``RecursionError`` for arrays or inline tables thousands deep,
``ValueError`` for an integer beyond Python's digit limit. ``parse`` turns each of those
into a ``TomlProblem`` naming the line and quoting it (at most about 80 characters, see
``stock.values.shown``); it also refuses line ends of a bare carriage return (quoting the
one line, not the whole file) and documents nested deeper than ``MAX_DEPTH``, so a
round-trip editor (tomlkit) never meets them.

``KeyLines`` finds the line of any key of a parsed document (``candidate.stage[0].
position[1].part[0].kind``) by a scan of the headers and keys, and the value's text as
written there. The rules are in docs/stock-file.md and docs/reliability.md.
"""

from __future__ import annotations

import functools
import re
import sys
import tomllib

from stock.values import shown

MAX_DEPTH = 32  # tables and arrays within one another; a stock file needs 3, a design 8


class TomlProblem(Exception):
    """Text that is not TOML this project reads. ``line`` is 1-based, 0 when unknown."""

    def __init__(self, line: int, message: str):
        super().__init__(message)
        self.line = line
        self.message = message


_AT_LINE = re.compile(r"\(at line (\d+), column (\d+)\)")
_BARE_CR = re.compile(r"\r(?!\n)")


def parse(text: str) -> dict:
    """The document of ``text``; raises TomlProblem for anything it cannot be."""
    cr = _BARE_CR.search(text)
    if cr:
        line = text.count("\n", 0, cr.start()) + len(_BARE_CR.findall(text, 0, cr.start())) + 1
        start = max(text.rfind("\n", 0, cr.start()), text.rfind("\r", 0, cr.start())) + 1
        raise TomlProblem(
            line,
            "a line ends in a bare carriage return (CR, old Mac line ends) after "
            f"{shown(text[start : cr.start()])}; save the file with LF or CRLF line ends",
        )
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise _syntax(text, str(exc)) from None
    except RecursionError:
        raise _too_deep(text) from None
    except ValueError as exc:  # int() past sys.get_int_max_str_digits()
        raise _long_number(text, exc) from None
    if not _depth_within(doc, MAX_DEPTH):
        raise _too_deep(text)
    return doc


def _syntax(text: str, msg: str) -> TomlProblem:
    rows = text.split("\n")
    m = _AT_LINE.search(msg)
    if m:
        line, col = int(m[1]), int(m[2])
        detail = _AT_LINE.sub("", msg).strip() + f" (column {col})"
    else:  # "(at end of document)": name the last line that has text
        line = max((i + 1 for i, r in enumerate(rows) if r.strip()), default=1)
        col = 0
        detail = msg.replace("(at end of document)", "at the end of the file").strip()
    bad = rows[line - 1] if 0 < line <= len(rows) else ""
    quoted = f" in {excerpt(bad, col)}" if bad.strip() else ""
    return TomlProblem(line, f"TOML syntax: {detail}{quoted}")


def excerpt(row: str, col: int = 0, width: int = 80) -> str:
    """``row`` quoted for a message; a long one cut to ``width`` characters around ``col``."""
    row = row.rstrip("\r").strip()
    if len(row) <= width or col <= width // 2:
        return shown(row, width)
    start = max(0, min(col - width // 2, len(row) - width))
    return "'…" + shown(row[start:], width)[1:]


def _too_deep(text: str) -> TomlProblem:
    line = _deep_line(text, MAX_DEPTH)
    return TomlProblem(
        line,
        f"arrays or tables nested more than {MAX_DEPTH} deep"
        + (f" in {excerpt(text.split(chr(10))[line - 1])}" if line else "")
        + "; no file picker reads nests that deep",
    )


def _long_number(text: str, exc: ValueError) -> TomlProblem:
    limit = sys.get_int_max_str_digits() if hasattr(sys, "get_int_max_str_digits") else 4300
    m = re.search(r"[0-9A-Fa-f_]{" + str(max(1, limit)) + ",}", text)
    if not m:
        return TomlProblem(0, f"a value TOML cannot hold ({exc})")
    line = text.count("\n", 0, m.start()) + 1
    key = _patterns()[2].match(text.split("\n")[line - 1])
    what = f"{'.'.join(split_key(key[1]))}: " if key else ""
    return TomlProblem(
        line,
        f"{what}a number of {len(m[0]):,} digits ({shown(m[0][:12] + '…')}); no value "
        "picker reads needs more than a few",
    )


def _depth_within(doc, limit: int) -> bool:
    stack = [(doc, 1)]
    while stack:
        value, depth = stack.pop()
        if depth > limit:
            return False
        items = value.values() if isinstance(value, dict) else value
        stack.extend((x, depth + 1) for x in items if isinstance(x, (dict, list)))
    return True


def _deep_line(text: str, limit: int) -> int:
    """Line where brackets outside strings and comments first nest past ``limit``; 0 if none."""
    depth, line, i, n = 0, 1, 0, len(text)
    while i < n:
        c = text[i]
        if c == "\n":
            line += 1
        elif c == "#":
            j = text.find("\n", i)
            i = n if j < 0 else j
            continue
        elif c in "\"'":
            triple = text.startswith(c * 3, i)
            close = c * 3 if triple else c
            j = i + len(close)
            while j < n and not text.startswith(close, j):
                if c == '"' and text[j] == "\\":
                    j += 1
                elif text[j] == "\n" and not triple:
                    break
                j += 1
            line += text.count("\n", i, j)
            i = j + len(close)
            continue
        elif c in "[{":
            depth += 1
            if depth > limit:
                return line
        elif c in "]}":
            depth = max(0, depth - 1)
        i += 1
    return 0


# ----------------------------------------------------------------- where keys are

_KEY = r'(?:[A-Za-z0-9_-]+|"(?:[^"\\\n]|\\.)*"|\'[^\'\n]*\')'
_DOTTED = rf"{_KEY}(?:\s*\.\s*{_KEY})*"


@functools.cache
def _patterns() -> tuple[re.Pattern[str], re.Pattern[str], re.Pattern[str], re.Pattern[str]]:
    """The line-scan patterns ``(array-of-tables header, table header, key line, key
    part)``, compiled on first use: a stock file's load never needs them (its own scan is
    ``stock.load.LineMap``), and compiling them costs start-up time."""
    return (
        re.compile(rf"^\s*\[\[\s*({_DOTTED})\s*\]\]"),
        re.compile(rf"^\s*\[\s*({_DOTTED})\s*\]"),
        re.compile(rf"^\s*({_DOTTED})\s*=\s*"),
        re.compile(_KEY),
    )


def split_key(dotted: str) -> list[str]:
    """``a."b.c".d`` -> ``["a", "b.c", "d"]``."""
    out = []
    for m in _patterns()[3].finditer(dotted):
        k = m[0]
        out.append(k[1:-1] if k[:1] in "\"'" else k)
    return out


def opens_multiline(raw: str) -> str | None:
    """The delimiter of a multi-line string left open at the end of ``raw``, or None."""
    for delim in ('"""', "'''"):
        if raw.count(delim) % 2 == 1:
            return delim
    return None


def code_rows(rows: list[str], start: int = 1, stop: int | None = None, *, multi: bool = True):
    """``(line number, text)`` of the rows ``start`` .. ``stop - 1`` (1-based) that are
    not inside a multi-line string; ``multi=False`` when the text has none (faster)."""
    in_multi: str | None = None
    for n in range(start, len(rows) + 1 if stop is None else stop):
        raw = rows[n - 1]
        if in_multi:
            if raw.count(in_multi) % 2 == 1:
                in_multi = None
            continue
        yield n, raw
        if multi:
            in_multi = opens_multiline(raw)


def written_value(row: str) -> str | None:
    """The value's text on a ``key = value`` line as written, comment cut; None if unsure.

    None for a value that goes on past the line (a multi-line array or string).
    """
    m = _patterns()[2].match(row)
    if not m:
        return None
    rest = row[m.end() :].rstrip("\r")
    quote, depth, i = None, 0, 0
    while i < len(rest):
        c = rest[i]
        if quote:
            if c == "\\" and quote == '"':
                i += 2
                continue
            if c == quote:
                quote = None
        elif c in "\"'":
            if rest.startswith(c * 3, i):
                return None
            quote = c
        elif c in "[{":
            depth += 1
        elif c in "]}":
            depth -= 1
        elif c == "#":
            break
        i += 1
    if quote or depth:
        return None
    return rest[:i].strip() or None


def parse_path(dotted: str) -> tuple:
    """``candidate.stage[0].kind`` -> ``("candidate", "stage", 0, "kind")``."""
    out: list = []
    for part in dotted.split("."):
        m = re.fullmatch(r"([^\[\]]*)((?:\[\d+\])*)", part)
        if not m:
            out.append(part)
            continue
        if m[1]:
            out.append(m[1])
        out.extend(int(i) for i in re.findall(r"\[(\d+)\]", m[2]))
    return tuple(out)


class KeyLines:
    """Line of every header and key of a TOML text, by concrete path.

    ``[[candidate.stage]]`` number 0 is ``("candidate", "stage", 0)``, a key below it
    ``("candidate", "stage", 0, "topology")``. Keys inside inline tables and arrays are
    not scanned: a look-up falls back to the nearest enclosing key that was.
    """

    def __init__(self, text: str):
        self.rows = text.split("\n")
        self.lines: dict[tuple, int] = {}
        aot: dict[tuple, int] = {}
        current: tuple = ()
        aot_re, table_re, keyline_re, _ = _patterns()
        for n, raw in code_rows(self.rows):
            head = aot_re.match(raw)
            found = head or table_re.match(raw)
            if found:
                parts = split_key(found[1])
                path = self._resolve(parts[:-1] if head else parts, aot)
                if head:
                    arr = path + (parts[-1],)
                    aot[arr] = aot.get(arr, 0) + 1
                    self.lines.setdefault(arr, n)
                    path = arr + (aot[arr] - 1,)
                current = path
                self.lines.setdefault(path, n)
                continue
            m = keyline_re.match(raw)
            if m:
                self.lines.setdefault(current + tuple(split_key(m[1])), n)

    @staticmethod
    def _resolve(parts, aot) -> tuple:
        path: tuple = ()
        for p in parts:
            path += (p,)
            if path in aot:
                path += (aot[path] - 1,)
        return path

    def line_of(self, path) -> int:
        """Line of ``path`` (a tuple or a dotted text) or of its nearest scanned parent; 0."""
        if isinstance(path, str):
            path = parse_path(path)
        path = tuple(path)
        while path:
            if path in self.lines:
                return self.lines[path]
            path = path[:-1]
        return 0

    def written(self, path) -> str | None:
        """The value's text as written on the line of ``path``, when that line holds it."""
        if isinstance(path, str):
            path = parse_path(path)
        line = self.lines.get(tuple(path))
        if not line:
            return None
        return written_value(self.rows[line - 1])


__all__ = [
    "MAX_DEPTH",
    "KeyLines",
    "code_rows",
    "TomlProblem",
    "excerpt",
    "opens_multiline",
    "parse",
    "parse_path",
    "split_key",
    "written_value",
]
