"""Fuzz the loaders (hypothesis): whole stock files, saved designs and build records made
of TOML pieces of every type (huge and tiny numbers, dates, times, booleans, nested arrays
and inline tables, text with control characters, stray brackets, CR and NUL bytes) give
either a result or the project's own error, never another exception, and every message
line stays short. Example counts are modest so the suite stays fast; the counts of a
longer run are in docs/reliability.md."""

from __future__ import annotations

import string

import tomli_w
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from picker.export.design_file import design_document, design_from_document
from stock import tomlread
from stock.errors import PickerError
from stock.file import loads
from stock.ledger import read_record
from stock.load import _load_bytes
from tests.picker.export.helpers import REQUEST, STOCK_TEXT, lowpass_candidate

KEYS = [
    "value", "qty", "tolerance", "tempco", "power", "location", "note", "measured", "meter",
    "dielectric", "polarized", "voltage", "name", "gbw", "slew", "channels", "supply", "ib",
    "format", "colour", '"qty"', "a.b",
]  # fmt: skip
HEADERS = ["[[resistor]]", "[[capacitor]]", "[[opamp]]", "[stock]", "[drawer]", "[resistor]"]

_text = st.text(
    alphabet=st.sampled_from(string.printable + "µΩ\x00\x1b\x07\u2028é\ufeff"), max_size=40
)


def _literal(depth: int = 0):
    """A TOML value's text: a number, a date, a string, an array or an inline table."""
    leaves = st.one_of(
        st.integers(min_value=-(10**30), max_value=10**30).map(str),
        st.sampled_from(["1e3", "1e400", "-0.0", "nan", "+inf", "0x10", "0o17", "0b101",
                         "1_000", "9" * 400, "9" * 4400, "1.5", ".5", "5."]),
        st.sampled_from(["true", "false", "1979-05-27", "07:32:00", "1979-05-27T07:32:00Z",
                         "1979-05-27 07:32:00.999", "2026-02-30"]),
        _text.map(lambda s: '"' + s.replace("\\", "\\\\").replace('"', '\\"') + '"'),
        _text.map(lambda s: "'" + s.replace("'", "").replace("\n", "") + "'"),
        st.sampled_from(['"4k7"', '"10n"', '"1%"', '"50V"', '"3MHz"', '"13V/us"', '"C0G"']),
        _text,  # raw text: usually not TOML at all
    )  # fmt: skip
    if depth >= 3:
        return leaves
    inner = _literal(depth + 1)
    return st.one_of(
        leaves,
        st.lists(inner, max_size=4).map(lambda xs: "[" + ", ".join(xs) + "]"),
        st.lists(st.tuples(st.sampled_from(KEYS), inner), max_size=3).map(
            lambda kv: "{" + ", ".join(f"{k} = {v}" for k, v in kv) + "}"
        ),
        st.integers(min_value=1, max_value=3000).map(lambda n: "[" * n + "]" * n),
        st.integers(min_value=1, max_value=1500).map(lambda n: "{a = " * n + "1" + "}" * n),
    )


_line = st.one_of(
    st.sampled_from(HEADERS),
    st.tuples(st.sampled_from(KEYS), _literal()).map(lambda kv: f"{kv[0]} = {kv[1]}"),
    _text,
    st.just(""),
    st.just("# a comment"),
)
_ends = st.sampled_from(["\n", "\r\n", "\r"])
stock_texts = st.lists(st.tuples(_line, _ends), max_size=30).map(
    lambda rows: "".join(a + b for a, b in rows)
)


def _short_lines(exc: PickerError) -> None:
    for line in str(exc).splitlines():
        assert len(line) < 700, line[:200]


@settings(max_examples=150, deadline=None)
@given(stock_texts)
def test_stock_text_gives_a_stock_or_a_stock_error(text):
    try:
        loads(text, source="fuzz.toml")
    except PickerError as exc:
        _short_lines(exc)


@settings(max_examples=60, deadline=None)
@given(st.binary(max_size=300), st.sampled_from([b"", STOCK_TEXT.encode()]))
def test_stock_bytes_gives_a_stock_or_a_stock_error(data, base):
    try:
        _load_bytes(base + data, "fuzz.toml", None)
    except PickerError as exc:
        _short_lines(exc)


def _design_text() -> str:
    stock = loads(STOCK_TEXT)
    doc = design_document(candidate=lowpass_candidate(stock), request=REQUEST, stock=stock)
    return tomli_w.dumps(doc)


DESIGN_ROWS = _design_text().split("\n")
RECORD_ROWS = tomli_w.dumps(
    {
        "format": 1,
        "number": 1,
        "time": "2026-12-02T08:00:00Z",
        "state": "done",
        "stock": "/bench/inventory.toml",
        "sha256_before": "a" * 64,
        "sha256_after": "b" * 64,
        "summary": ["resistor 4k7 from A3: take 2"],
    }
).split("\n")


def _mutated(rows):
    """A valid file with some lines replaced, their values changed, or lines put in."""
    edit = st.tuples(
        st.integers(min_value=0, max_value=len(rows) - 1),
        st.sampled_from(["value", "line", "insert", "drop"]),
        _literal(),
        _line,
    )

    def apply(edits):
        out = list(rows)
        for i, how, literal, line in edits:
            i = min(i, len(out) - 1)
            if how == "value" and " = " in out[i]:
                out[i] = out[i].split(" = ")[0] + " = " + literal
            elif how == "line":
                out[i] = line
            elif how == "insert":
                out.insert(i, line)
            elif len(out) > 1:
                del out[i]
        return "\n".join(out)

    return st.lists(edit, min_size=1, max_size=4).map(apply)


@settings(max_examples=120, deadline=None)
@given(_mutated(DESIGN_ROWS))
def test_design_text_gives_a_design_or_a_design_error(text):
    try:
        doc = tomlread.parse(text)
    except tomlread.TomlProblem:
        return  # load_design turns this into a DesignError (the corpus checks the words)
    try:
        design_from_document(doc, source="fuzz.toml", text=text)
    except PickerError as exc:
        _short_lines(exc)


@settings(
    max_examples=80, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(_mutated(RECORD_ROWS))
def test_build_record_gives_a_record_or_an_edit_error(tmp_path, text):
    path = tmp_path / "build-0001.toml"
    path.write_text(text, encoding="utf-8", newline="")
    try:
        read_record(path, 1)
    except PickerError as exc:
        _short_lines(exc)
