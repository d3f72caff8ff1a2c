"""Load a stock file, format 1 (docs/stock-file.md), with every problem located.

The values come from the standard library's TOML reader (fast, strict); a line scan
of the same text finds the line of each entry's header and of each key inside it, so
that every message reads ``file:line: kind key: what is wrong, what is accepted``.
All errors are collected, then raised together in one ``StockFileError``; warnings
(unknown keys or tables, a value and location listed twice, an empty stock) go into
``Stock.warnings``.
"""

from __future__ import annotations

import bisect
import hashlib
import re
from collections import OrderedDict
from dataclasses import replace
from pathlib import Path

from stock import tomlread
from stock import values as V
from stock.durable import read_bounded, why_not_read
from stock.errors import StockFileError
from stock.fields import EntryChecker
from stock.model import Stock

KINDS = ("resistor", "capacitor", "opamp")
STOCK_KEYS = ("name", "format")

_KEY = r'(?:[A-Za-z0-9_-]+|"[^"\n]*"|\'[^\'\n]*\')'
_AOT_RE = re.compile(rf"^\s*\[\[\s*({_KEY}(?:\s*\.\s*{_KEY})*)\s*\]\]")
_TABLE_RE = re.compile(rf"^\s*\[\s*({_KEY}(?:\s*\.\s*{_KEY})*)\s*\]")
_KEYLINE_RE = re.compile(rf"^\s*({_KEY})\s*(?:\.|=)")


def _unquote(key: str) -> str:
    key = key.strip()
    if len(key) >= 2 and key[0] == key[-1] and key[0] in "\"'":
        return key[1:-1]
    return key


class _Keys:
    """Line of each key in one section, scanned only when first asked (messages are rare)."""

    __slots__ = ("_map", "_start", "_lines")

    def __init__(self, linemap: LineMap, start: int):
        self._map, self._start = linemap, start
        self._lines: dict[str, int] | None = None

    def get(self, key: str, default: int | None = None) -> int | None:
        if self._lines is None:
            self._lines = self._map._scan_keys(self._start)
        return self._lines.get(key, default)


class LineMap:
    """Where things are: header line of each [[kind]] entry, and the line of each key in it.

    A plain scan of the text for table headers; multi-line strings are skipped. Key
    lines are scanned per section on demand. If the scan does not agree with the
    parsed document (inline arrays, unusual layouts) lookups fall back to the nearest
    line known, and finally to 0 (no line).
    """

    def __init__(self, text: str):
        self.rows = text.split("\n")  # TOML lines end in \n
        self._multi = '"""' in text or "'''" in text
        self.entries: dict[str, list[int]] = {k: [] for k in KINDS}
        self.tables: dict[str, int] = {}
        self._next: dict[int, int] = {}  # header line -> next header line
        stock_header = 0
        previous = 0
        for n, raw in tomlread.code_rows(self.rows, multi=self._multi):
            if raw.lstrip()[:1] == "[":
                m = _AOT_RE.match(raw) or _TABLE_RE.match(raw)
                if m:
                    aot = raw.lstrip().startswith("[[")
                    name = _unquote(m[1].split(".")[0])
                    self.tables.setdefault(name, n)
                    if aot and name in self.entries and "." not in m[1]:
                        self.entries[name].append(n)
                    if not aot and m[1].strip() == "stock" and not stock_header:
                        stock_header = n
                    self._next[previous] = n
                    previous = n
        self._next[previous] = len(self.rows) + 1
        self.top_keys = _Keys(self, 0)
        self.stock_keys: _Keys | dict[str, int] = _Keys(self, stock_header) if stock_header else {}

    def _scan_keys(self, start: int) -> dict[str, int]:
        keys: dict[str, int] = {}
        stop = self._next.get(start, start + 1)
        for n, raw in tomlread.code_rows(self.rows, start + 1, stop, multi=self._multi):
            m = _KEYLINE_RE.match(raw)
            if m:
                keys.setdefault(_unquote(m[1]), n)
        return keys

    def next_header(self, line: int) -> int:
        """The line of the first table header after ``line``, or one past the last line."""
        heads = sorted(self._next.values())
        i = bisect.bisect_right(heads, line)
        return heads[i] if i < len(heads) else len(self.rows) + 1

    def written(self, line: int) -> str | None:
        """The value's text as written on ``key = value`` line ``line`` (1-based), or None."""
        if not 0 < line <= len(self.rows):
            return None
        return tomlread.written_value(self.rows[line - 1])

    def entry(self, kind: str, index: int, count: int):
        """``(header line, key lines)`` of entry ``index`` of ``kind``; key lines has ``get``."""
        found = self.entries.get(kind, [])
        if len(found) == count and index < len(found):
            return found[index], _Keys(self, found[index])
        return self.tables.get(kind) or self.top_keys.get(kind, 0), {}


def file_sha256(path) -> str:
    """Hex sha256 of the file's bytes (a FIFO, device, folder or huge file is refused)."""
    return hashlib.sha256(read_stock_bytes(path)).hexdigest()


def read_stock_bytes(path) -> bytes:
    """The stock file's bytes, read with a bound: StockFileError saying why not."""
    try:
        return read_bounded(path)
    except OSError as exc:
        raise StockFileError(f"{path}: {why_not_read(exc, 'stock file')}") from None


def load(path) -> Stock:
    """Read the stock file at ``path``.

    A path that is a folder, a FIFO, a device or a file over 50 MB is refused at once,
    without waiting on it (``stock.durable.read_bounded``).

    Raises
    ------
    StockFileError
        Listing every problem, one line each: ``file:line: kind key: ...``.
    """
    path = Path(path)
    return _load_bytes(read_stock_bytes(path), str(path), path)


def decode(data: bytes, src: str) -> str:
    """UTF-8 text of the file (a leading byte-order mark is dropped), or StockFileError."""
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as exc:
        line = data[: exc.start].count(b"\n") + 1
        col = exc.start - (data.rfind(b"\n", 0, exc.start) + 1) + 1
        raise StockFileError(
            f"{src}:{line}: not UTF-8 text (byte 0x{data[exc.start]:02x} at column {col}); "
            "save the file as UTF-8"
        ) from None
    return text[1:] if text.startswith("\ufeff") else text


# The same bytes under the same name always give the same (immutable) Stock: keep the last
# few, so that a safe edit re-reading the file it was just handed does not parse it again.
_CACHE: OrderedDict[tuple[str, str], Stock] = OrderedDict()
_CACHE_SIZE = 4


def _load_bytes(data: bytes, src: str, path: Path | None) -> Stock:
    sha = hashlib.sha256(data).hexdigest()
    stock = _CACHE.get((sha, src))
    if stock is None:
        text = decode(data, src)
        stock = _parse(text, src)
        _CACHE[(sha, src)] = stock
        while len(_CACHE) > _CACHE_SIZE:
            _CACHE.popitem(last=False)
    else:
        _CACHE.move_to_end((sha, src))
    return replace(stock, path=path, sha256=sha)


def loads(text: str, *, source: str = "<text>") -> Stock:
    """Read stock-file text; ``Stock.sha256`` is that of its UTF-8 bytes, ``path`` is None."""
    return _load_bytes(text.encode("utf-8"), source, None)


def _parse(text: str, src: str) -> Stock:
    try:
        doc = tomlread.parse(text)
    except tomlread.TomlProblem as exc:
        raise StockFileError(f"{src}:{exc.line or 1}: {exc.message}") from None
    lines = LineMap(text)
    errors: list[str] = []
    warnings: list[str] = []
    name = _check_stock_table(doc.get("stock"), src, lines, errors, warnings)
    for key, val in doc.items():
        if key == "stock" or key in KINDS:
            continue
        where = lines.tables.get(key) or lines.top_keys.get(key, 0)
        what = "table" if isinstance(val, (dict, list)) else "key"
        warnings.append(
            f"{src}:{where}: unknown {what} '{key}' ignored; this file format knows "
            "[stock], [[resistor]], [[capacitor]] and [[opamp]]"
        )
    parsed: dict[str, list] = {k: [] for k in KINDS}
    for kind in KINDS:
        entries = doc.get(kind)
        if entries is None:
            continue
        if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
            where = lines.tables.get(kind) or lines.top_keys.get(kind, 0)
            errors.append(
                f"{src}:{where}: {kind}: write each line of stock as [[{kind}]] "
                f"(double brackets) followed by its keys"
            )
            continue
        for index, entry in enumerate(entries):
            header, keylines = lines.entry(kind, index, len(entries))
            checker = EntryChecker(kind, index, entry, src, header, keylines, lines.written)
            item = checker.build()
            errors.extend(checker.errors)
            warnings.extend(checker.warnings)
            if item is not None:
                parsed[kind].append(item)
    _duplicates(parsed, src, warnings)
    if errors:
        raise StockFileError(errors)
    if not any(parsed.values()):
        warnings.append(
            f"{src}: the stock is empty: no [[resistor]], [[capacitor]] or [[opamp]] lines"
        )
    return Stock(
        resistors=tuple(parsed["resistor"]),
        capacitors=tuple(parsed["capacitor"]),
        opamps=tuple(parsed["opamp"]),
        name=name,
        warnings=tuple(warnings),
    )


def _check_stock_table(table, src, lines: LineMap, errors, warnings) -> str | None:
    if table is None:
        return None
    where = lines.tables.get("stock", 0)
    if not isinstance(table, dict):
        errors.append(f"{src}:{where}: stock: must be a table [stock] with name and format")
        return None
    name = table.get("name")
    if name is not None and not isinstance(name, str):
        errors.append(
            f"{src}:{lines.stock_keys.get('name', where)}: stock name: "
            f"{_written(lines, 'name', name)} must be text in quotes"
        )
        name = None
    fmt = table.get("format", 1)
    if fmt != 1 or isinstance(fmt, bool):
        errors.append(
            f"{src}:{lines.stock_keys.get('format', where)}: stock format: "
            f"{_written(lines, 'format', fmt)} is not a format this version reads; "
            "it reads format = 1"
        )
    for key in table:
        if key not in STOCK_KEYS:
            warnings.append(
                f"{src}:{lines.stock_keys.get(key, where)}: stock {key}: unknown "
                "key ignored; [stock] knows name and format"
            )
    return name


def _written(lines: LineMap, key: str, raw) -> str:
    """A [stock] value quoted as written in the file where its line is known."""
    text = None if isinstance(raw, str) else lines.written(lines.stock_keys.get(key) or 0)
    return V.shown(raw if text is None else text)


def _duplicates(parsed, src, warnings) -> None:
    for kind, items in parsed.items():
        seen: dict[tuple, int] = {}
        for item in items:
            ident = item.name.strip().lower() if kind == "opamp" else f"{item.value:.9g}"
            # a capacitor of another dielectric in the same box is a different part
            extra = getattr(item, "dielectric", None) or ""
            key = (ident, (item.location or "").strip().lower(), extra)
            if key in seen:
                shown = item.name if kind == "opamp" else V.format_rkm(item.value, kind)
                where = f"in {item.location}" if item.location else "with no location"
                warnings.append(
                    f"{src}:{item.line}: {kind} {shown} {where} is listed twice "
                    f"(lines {seen[key]} and {item.line}); each line is counted "
                    "on its own"
                )
            else:
                seen[key] = item.line


__all__ = ["KINDS", "LineMap", "decode", "file_sha256", "load", "loads", "read_stock_bytes"]
