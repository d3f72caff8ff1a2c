"""The corpus of malformed files (tests/data/malformed/): each is refused with its message.

``stock/`` holds stock files, ``design/`` saved designs, ``record/`` build records; beside
each ``NAME.toml`` its ``NAME.expected`` holds the whole message, the file named relative
to its folder. Every class of hostile input of docs/stock-file.md has a file here: dates,
times and booleans where numbers belong, numbers past float range or Python's digit
limit, nesting thousands deep, bare CR line ends, huge bad values (quoted to about 80
characters), values quoted as written (``1e3``), control characters shown escaped.
Regenerate a message by hand after reading it: the point is that a person can act on it.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from picker.export import load_design
from stock.errors import PickerError
from stock.file import load
from stock.ledger import read_record

CORPUS = Path(__file__).resolve().parents[1] / "data" / "malformed"
LOADERS = {"stock": load, "design": load_design, "record": lambda p: read_record(p, 1)}
CASES = sorted(CORPUS.glob("*/*.toml"))


def test_the_corpus_is_there():
    counts = {kind: len(list((CORPUS / kind).glob("*.toml"))) for kind in LOADERS}
    assert counts["stock"] >= 40 and counts["design"] >= 10 and counts["record"] >= 10
    assert all(p.with_suffix(".expected").is_file() for p in CASES)


@pytest.mark.parametrize("path", CASES, ids=lambda p: f"{p.parent.name}/{p.stem}")
def test_refused_with_its_message(path, monkeypatch):
    monkeypatch.chdir(path.parent)
    with pytest.raises(PickerError) as info:
        LOADERS[path.parent.name](Path(path.name))
    message = str(info.value)
    assert message == path.with_suffix(".expected").read_text(encoding="utf-8").rstrip("\n")
    assert len(message) < 600  # a huge bad value is quoted short
    assert "\x1b" not in message and "\x07" not in message and "\r" not in message
