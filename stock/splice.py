"""Change the text of a stock file where the change is, and nowhere else.

``splice`` makes the qty and measured-piece changes of a checked plan (``stock.edit``)
so that every other byte of the file stays as it was:

1. a qty is rewritten in its own digits on its own line, in the base it was written in
   (``qty = 0x10`` becomes ``qty = 0x0e``; ``1_000`` keeps its underscores);
2. measured readings are removed by a round-trip TOML editor (tomlkit) run over the
   entry's own lines only (its ``[[...]]`` header up to the next header), so no other
   table can move;
3. an entry the line scan cannot place (an inline array of tables) goes through a round
   trip of the whole file, kept only if every line outside that entry is unchanged.

``insert_entry`` places a new ``[[kind]]`` entry (``stock.edit.add_line``) right after
the last entry of its own kind, before the blank lines and comments that lead to the
next table; with no entry of that kind yet, or where the scan cannot place it, the
entry goes at the end of the file. Every byte already there is kept either way.

The result must load to exactly the stock planned. When none of these is certain,
``StockEditError`` says so and nothing is written. Rules: docs/stock-file.md.
"""

from __future__ import annotations

import re
from dataclasses import replace

from stock import tomlread
from stock.errors import StockEditError, StockFileError
from stock.load import KINDS, LineMap, loads

_QTY_LINE = re.compile(
    r"^(?P<pre>[ \t]*(?:qty|\"qty\"|'qty')[ \t]*=[ \t]*)"
    r"(?P<num>\+?(?:0x[0-9A-Fa-f_]+|0o[0-7_]+|0b[01_]+|[0-9_]+))"
    r"(?P<post>[ \t]*(?:#.*)?\r?)$"
)


def same_base(old: str, new: int) -> str:
    """``new`` written as ``old`` is: base prefix, digit case and width, underscores, sign."""
    sign = "+" if old.startswith("+") else ""
    body = old.lstrip("+")
    for prefix, code in (("0x", "x"), ("0o", "o"), ("0b", "b")):
        if body[:2].lower() == prefix:
            digits = body[2:].replace("_", "")
            if code == "x" and any(c.isupper() for c in digits):
                code = "X"
            return f"{sign}{body[:2]}{format(new, code).zfill(len(digits))}"
    if "_" in body:
        return f"{sign}{new:_}"
    return f"{sign}{new}"


def _read_int(num: str) -> int:
    return int(num.replace("_", "").lstrip("+"), 0)


def splice(text: str, stock, plan: dict, source: str) -> str:
    """``text`` with the plan's changes made (see the module docstring); StockEditError if
    they cannot be made without touching other bytes. ``plan`` maps ``(kind, index)`` to
    ``(new qty, measured indices removed)``."""
    want = _planned(stock, plan)
    lmap = LineMap(text)
    rows = text.split("\n")
    whole: list[tuple[str, int]] = []  # entries the line scan could not place
    blocks: list[tuple[int, int, str, int, tuple]] = []
    for (kind, index), (new_qty, removed) in plan.items():
        item = stock.lines(kind)[index]
        header, keys = lmap.entry(kind, index, len(stock.lines(kind)))
        if header != item.line or not keys:
            whole.append((kind, index))
            continue
        n = keys.get("qty")
        m = _QTY_LINE.match(rows[n - 1]) if n else None
        spliced = m is not None and _read_int(m["num"]) == item.qty
        if m is not None and spliced and new_qty != item.qty:
            rows[n - 1] = f"{m['pre']}{same_base(m['num'], new_qty)}{m['post']}"
        if removed or not spliced:
            end = lmap.next_header(header)
            blocks.append((header, end, kind, -1 if spliced else new_qty, removed))
    for header, end, kind, new_qty, removed in sorted(blocks, reverse=True):
        block = "\n".join(rows[header - 1 : end - 1])
        rows[header - 1 : end - 1] = _edit_block(block, kind, new_qty, removed).split("\n")
    after = "\n".join(rows)
    if whole:
        after = _round_trip(after, {k: plan[k] for k in whole})
        _refuse_if_moved(text, after, lmap, whole, source)
    if _loads_as(after, source) != want:
        raise StockEditError(
            f"{source}: this edit cannot be made in place without changing other parts of "
            "the file (an unusual layout); change it by hand; nothing was written"
        )
    return after


def _planned(stock, plan) -> dict:
    out = {}
    for kind in KINDS:
        lines = []
        for i, x in enumerate(stock.lines(kind)):
            if (kind, i) in plan:
                new_qty, removed = plan[(kind, i)]
                x = replace(x, qty=new_qty)
                if removed:
                    kept = tuple(v for j, v in enumerate(x.measured) if j not in removed)
                    x = replace(x, measured=kept)
            lines.append(x)
        out[kind] = lines
    return out


def _loads_as(text: str, source: str) -> dict | None:
    try:
        new = loads(text, source=source)
    except StockFileError:
        return None
    return {kind: list(new.lines(kind)) for kind in KINDS}


def _edit_block(block: str, kind: str, new_qty: int, removed: tuple) -> str:
    """One entry's own lines, edited by tomlkit (qty when ``new_qty`` >= 0, readings)."""
    import tomlkit

    doc = tomlkit.parse(block)
    table = doc[kind][0]
    if new_qty >= 0 and table["qty"] != new_qty:
        table["qty"] = new_qty
    if removed:
        arr = table["measured"]
        for i in sorted(removed, reverse=True):
            del arr[i]
    return tomlkit.dumps(doc)


def _round_trip(text: str, plan) -> str:
    import tomlkit

    doc = tomlkit.parse(text)
    for (kind, index), (new_qty, removed) in plan.items():
        table = doc[kind][index]
        if table["qty"] != new_qty:
            table["qty"] = new_qty
        for i in sorted(removed, reverse=True):
            del table["measured"][i]
    return tomlkit.dumps(doc)


def _refuse_if_moved(before: str, after: str, lmap: LineMap, whole, source: str) -> None:
    """StockEditError unless every changed line lies where those kinds are written."""
    allowed: set[int] = set()  # 0-based line numbers of the text before
    for kind, _ in whole:
        start = lmap.tables.get(kind) or lmap.top_keys.get(kind, 0)
        if start:
            allowed.update(range(start - 1, lmap.next_header(start) - 1))
    import difflib  # only on this rare path (an entry the line scan cannot place)

    a, b = before.split("\n"), after.split("\n")
    for tag, i1, i2, _, _ in difflib.SequenceMatcher(None, a, b, autojunk=False).get_opcodes():
        if tag == "equal":
            continue
        span = set(range(i1, i2)) if i2 > i1 else {i1}
        if not span <= allowed:
            raise StockEditError(
                f"{source}:{min(span) + 1}: this edit would rewrite parts of the file it "
                "does not concern (the changed entry is written in a layout picker cannot "
                "edit in place); change it by hand; nothing was written"
            )


def insert_entry(text: str, kind: str, body: list[str], stock, source: str) -> str:
    """``text`` with the entry ``body`` (its lines, header first) after the last
    ``[[kind]]`` entry (see the module docstring); ``stock`` is ``text`` loaded."""
    nl = "\r\n" if "\r\n" in text else "\n"
    block = nl.join(body) + nl
    lmap = LineMap(text)
    heads = lmap.entries.get(kind, [])
    if heads and len(heads) == len(stock.lines(kind)):
        last = _last_code_row(lmap, heads[-1])
        if last < len(lmap.rows):  # the row has its newline: insert after it
            at = sum(len(row) + 1 for row in lmap.rows[:last])
            after = text[:at] + nl + block + text[at:]
            if _one_more(text, after, kind, len(heads), source):
                return after
    lead = nl if text and not text.endswith(("\n", "\r")) else ""
    if text.strip():
        lead += nl
    return text + lead + block


def _last_code_row(lmap: LineMap, header: int) -> int:
    """The last row of the entry at ``header`` that holds TOML (not blank, not a
    comment), a multi-line value's closing row included."""
    last = header
    for n, raw in tomlread.code_rows(lmap.rows, header, lmap.next_header(header)):
        if raw.strip() and not raw.lstrip().startswith("#"):
            last = n
        # a multi-line value's closing row is skipped by code_rows: count it too
        closing = tomlread.opens_multiline(raw)
        if closing:
            for m in range(n + 1, lmap.next_header(header)):
                last = m
                if lmap.rows[m - 1].count(closing) % 2 == 1:
                    break
    return last


def _one_more(before: str, after: str, kind: str, count: int, source: str) -> bool:
    """True when ``after`` loads to the stock of ``before`` with one more ``kind``
    line at the end of its kind and nothing else changed (line numbers aside)."""
    try:
        old, new = loads(before, source=source), loads(after, source=source)
    except StockFileError:
        return False

    def bare(items) -> list:
        return [replace(x, line=0) for x in items]

    for k in KINDS:
        want = bare(old.lines(k))
        got = bare(new.lines(k))
        if k == kind:
            if len(got) != count + 1:
                return False
            got = got[:-1]
        if got != want:
            return False
    return True


__all__ = ["insert_entry", "same_base", "splice"]
