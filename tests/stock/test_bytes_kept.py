"""Edits keep every byte they do not concern, and the file's extended attributes
(docs/stock-file.md, "Editing")."""

from __future__ import annotations

import difflib
import errno
import os

import pytest

from stock.errors import StockEditError
from stock.file import QtyChange, add_line, apply_changes, load
from stock.load import LineMap
from stock.splice import _refuse_if_moved, same_base

# two kinds interleaved, a hex count, readings on one line and over several: a round trip
# of the whole file through tomlkit moves the [[capacitor]] table (seen with tomlkit 0.15.2)
TEXT = """\
# drawers
[[resistor]]
value = "1k"
qty = 0x10   # hex count
measured = ["1.001k", "0.998k"]  # two read

[[capacitor]]
value = "10n"
qty = 4

[[resistor]]
value = "2k2"
qty = 1_003
measured = [
  "2.19k",   # first
  "2.21k",
]
"""


def _changed(before: bytes, after: bytes) -> list[str]:
    a, b = before.decode().splitlines(), after.decode().splitlines()
    return [line for line in difflib.unified_diff(a, b, lineterm="", n=0) if line[:1] in "+-"][2:]


@pytest.mark.parametrize(
    "change, diff",
    [
        (QtyChange("resistor", 0, -2), ["-qty = 0x10   # hex count", "+qty = 0x0e   # hex count"]),
        (QtyChange("resistor", 1, +7), ["-qty = 1_003", "+qty = 1_010"]),
        (
            QtyChange("resistor", 0, -1, (1,)),
            [
                "-qty = 0x10   # hex count",
                '-measured = ["1.001k", "0.998k"]  # two read',
                "+qty = 0x0f   # hex count",
                '+measured = ["1.001k"]  # two read',
            ],
        ),
        (
            QtyChange("resistor", 1, -1, (0,)),
            ["-qty = 1_003", "+qty = 1_002", '-  "2.19k",   # first'],
        ),
    ],
)
def test_only_the_changed_lines_differ(tmp_path, change, diff):
    p = tmp_path / "inv.toml"
    p.write_text(TEXT, encoding="utf-8")
    res = apply_changes(p, [change])
    assert sorted(_changed(res.before, res.after)) == sorted(diff)
    s = load(p)
    assert [r.qty for r in s.resistors] == [
        16 + (change.delta if change.index == 0 else 0),
        1003 + (change.delta if change.index == 1 else 0),
    ]
    assert s.capacitors[0].line == 7  # the capacitor table did not move


def test_same_base():
    assert same_base("0x10", 14) == "0x0e"
    assert same_base("0XFF", 10) == "0X0A"
    assert same_base("0o17", 8) == "0o10"
    assert same_base("0b1010", 3) == "0b0011"
    assert same_base("+12", 9) == "+9"
    assert same_base("1_000", 999) == "999" and same_base("1_000", 1200) == "1_200"


def test_a_round_trip_that_moves_other_lines_is_refused():
    before = TEXT
    moved = TEXT.replace('[[capacitor]]\nvalue = "10n"\nqty = 4\n\n', "") + (
        '[[capacitor]]\nvalue = "10n"\nqty = 4\n'
    )
    lmap = LineMap(before)
    with pytest.raises(StockEditError, match="would rewrite parts of the file it does not"):
        _refuse_if_moved(before, moved, lmap, [("resistor", 1)], "inv.toml")


def _xattrs_supported(path) -> bool:
    try:
        os.setxattr(path, "user.picker.test", b"1")
    except (AttributeError, OSError) as exc:
        if isinstance(exc, AttributeError) or exc.errno in (errno.ENOTSUP, errno.EPERM):
            return False
        raise
    return True


def test_extended_attributes_kept(tmp_path):
    p = tmp_path / "inv.toml"
    p.write_text(TEXT, encoding="utf-8")
    if not _xattrs_supported(p):
        pytest.skip(f"no user extended attributes on the file system of {tmp_path}")
    os.setxattr(p, "user.origin", b"bench notebook, page 12")
    apply_changes(p, [QtyChange("resistor", 0, -1, (0,))])
    assert os.getxattr(p, "user.origin") == b"bench notebook, page 12"
    assert os.getxattr(p, "user.picker.test") == b"1"
    assert load(p).resistors[0].measured == (998.0,)


# -- a new line goes after the last line of its own kind (docs/stock-file.md, "Editing") --

ADD = {"value": "3k3", "qty": 2}
ADDED = '[[resistor]]\nvalue = "3k3"\nqty = 2\n'


def _add(tmp_path, text: str, kind: str = "resistor", fields=None, newline: str = "\n") -> bytes:
    p = tmp_path / "inv.toml"
    p.write_bytes(text.replace("\n", newline).encode("utf-8"))
    before = p.read_bytes()
    res = add_line(p, kind, dict(fields or ADD))
    assert res.before == before and p.read_bytes() == res.after
    return res.after


def test_a_new_resistor_goes_after_the_last_resistor_not_at_the_end(tmp_path):
    after = _add(tmp_path, TEXT).decode()
    # TEXT's last resistor ends with the "]" of its readings, before the end of the file
    assert after == TEXT + "\n" + ADDED
    text = TEXT + '\n# op amps from here on\n[[opamp]]\nname = "quad"\ngbw = "1MHz"\nqty = 1\n'
    after = _add(tmp_path, text).decode()
    at = text.index("]\n\n# op amps") + 2
    assert after == text[:at] + "\n" + ADDED + text[at:]  # the comment stays with the op amps
    s = load(tmp_path / "inv.toml")
    assert [r.value for r in s.resistors][-1] == 3300.0 and s.opamps[0].name == "quad"


def test_a_new_capacitor_goes_between_two_resistor_tables(tmp_path):
    cap = {"value": "1n", "qty": 3, "dielectric": "C0G"}
    after = _add(tmp_path, TEXT, "capacitor", cap).decode()
    at = TEXT.index("qty = 4\n") + len("qty = 4\n")
    new = '\n[[capacitor]]\nvalue = "1n"\nqty = 3\ndielectric = "C0G"\n'
    assert after == TEXT[:at] + new + TEXT[at:]
    assert [c.value for c in load(tmp_path / "inv.toml").capacitors] == [10e-9, 1e-9]


def test_crlf_and_a_multi_line_string_are_kept(tmp_path):
    text = (
        '[[resistor]]\nvalue = "1k"\nqty = 1\nnote = """bought at the fair\n'
        '# not a comment: inside the string"""\n\n# capacitors\n[[capacitor]]\n'
        'value = "10n"\nqty = 4\n'
    )
    after = _add(tmp_path, text, newline="\r\n")
    crlf = text.replace("\n", "\r\n")
    at = crlf.index('string"""\r\n') + len('string"""\r\n')
    assert after.decode() == crlf[:at] + "\r\n" + ADDED.replace("\n", "\r\n") + crlf[at:]
    assert load(tmp_path / "inv.toml").resistors[0].note.endswith("inside the string")


def test_no_line_of_its_kind_yet_goes_at_the_end(tmp_path):
    text = '[[capacitor]]\nvalue = "10n"\nqty = 4'  # no newline at the end either
    after = _add(tmp_path, text).decode()
    assert after == text + "\n\n" + ADDED
