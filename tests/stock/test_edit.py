"""Safe in-place edits (docs/stock-file.md, "Editing"): only the number changes, locks hold
across processes, a killed writer leaves the old or the new file, never a broken one."""

import difflib
import os
import random
import signal
import stat
import subprocess
import sys
import textwrap
import time

import pytest

from stock.errors import StockEditError
from stock.file import (
    QtyChange,
    StockChangedError,
    add_line,
    apply_changes,
    file_sha256,
    load,
    replace_bytes,
)
from tests.helpers import ROOT, SAMPLE, write_stock

TEXT = """\
# my drawers   (comment kept)
[stock]
name = 'bench'          # single quotes kept

[[resistor]]
value   = "4k7"   # aligned
qty     =   20    # bag of twenty
tolerance = "1%"
measured = [ "4.693k",   "4.71k" ]   # two picked

[[capacitor]]
value = "10n"
qty = 8
dielectric = "C0G"
"""


@pytest.fixture
def stockfile(tmp_path):
    p = write_stock(tmp_path, TEXT, "inv.toml")
    p.chmod(0o640)
    return p


def changed_lines(before: bytes, after: bytes):
    a, b = before.decode().splitlines(True), after.decode().splitlines(True)
    return [(x, y) for x, y in zip(a, b, strict=False) if x != y], len(a) - len(b)


def test_only_the_number_changes(stockfile):
    s = load(stockfile)
    res = apply_changes(stockfile, [QtyChange("resistor", 0, -3)], expect_sha256=s.sha256)
    assert res.before == TEXT.encode() and res.after == stockfile.read_bytes()
    diff, dlen = changed_lines(res.before, res.after)
    assert dlen == 0
    assert diff == [("qty     =   20    # bag of twenty\n", "qty     =   17    # bag of twenty\n")]
    # byte for byte: the edit replaced exactly the two digits of the number
    sm = difflib.SequenceMatcher(a=res.before, b=res.after, autojunk=False)
    edits = [op for op in sm.get_opcodes() if op[0] != "equal"]
    assert len(edits) == 1
    _, i1, i2, j1, j2 = edits[0]
    assert (res.before[i1:i2], res.after[j1:j2]) == (b"20", b"17")
    assert load(stockfile).resistors[0].qty == 17
    assert res.before_sha256 == s.sha256 and res.after_sha256 == file_sha256(stockfile)


def test_qty_up_to_the_cap_is_written(stockfile):
    apply_changes(stockfile, [QtyChange("capacitor", 0, 1_000_000 - 8)])
    assert load(stockfile).capacitors[0].qty == 1_000_000


def test_mode_kept_and_no_temp_left(stockfile):
    apply_changes(stockfile, [QtyChange("capacitor", 0, 2)])
    assert stat.S_IMODE(stockfile.stat().st_mode) == 0o640
    assert sorted(p.name for p in stockfile.parent.iterdir()) == ["inv.toml"]


def test_measured_pieces_removed(stockfile):
    res = apply_changes(stockfile, [QtyChange("resistor", 0, -1, remove_measured=(0,))])
    diff, _ = changed_lines(res.before, res.after)
    assert [d[1] for d in diff] == [
        "qty     =   19    # bag of twenty\n",
        'measured = ["4.71k" ]   # two picked\n',
    ]
    assert load(stockfile).resistors[0].measured == (4710.0,)


@pytest.mark.parametrize(
    "changes, match",
    [
        ([QtyChange("resistor", 0, -21)], "below zero"),
        ([QtyChange("resistor", 0, -15), QtyChange("resistor", 0, -6)], "below zero"),
        ([QtyChange("resistor", 1, -1)], "no resistor number 1"),
        ([QtyChange("resistor", -1, -1)], "no resistor number -1"),
        ([QtyChange("opamp", 0, 1)], "no opamp number 0"),
        ([QtyChange("diode", 0, 1)], "unknown kind 'diode'"),
        ([QtyChange("resistor", 0, -19)], "measured pieces"),
        ([QtyChange("resistor", 0, -1, remove_measured=(2,))], "cannot remove"),
        ([QtyChange("resistor", 0, -2, remove_measured=(1, 1))], "cannot remove"),
        ([QtyChange("capacitor", 0, -1), QtyChange("resistor", 0, -99)], "below zero"),
        # TOML integers are 64-bit (TOML v1.0.0, "Integer"); a count past the project's cap
        # (stock.fields.MAX_COUNT) is refused so the file stays loadable
        ([QtyChange("resistor", 0, 10**23)], "more than the 1,000,000"),
        ([QtyChange("capacitor", 0, 1_000_000 - 8 + 1)], "more than the 1,000,000"),
    ],
)
def test_refused_edits_leave_file_untouched(stockfile, changes, match):
    before = stockfile.read_bytes()
    with pytest.raises(StockEditError, match=match):
        apply_changes(stockfile, changes)
    assert stockfile.read_bytes() == before


def test_refuses_when_file_changed_since_read(stockfile):
    s = load(stockfile)
    stockfile.write_text(TEXT.replace("= 8", "= 9"), encoding="utf-8")
    before = stockfile.read_bytes()
    with pytest.raises(StockChangedError, match="changed since it was read"):
        apply_changes(stockfile, [QtyChange("resistor", 0, -1)], expect_sha256=s.sha256)
    with pytest.raises(StockEditError, match="changed since it was read"):
        replace_bytes(stockfile, b"x", expect_sha256=s.sha256)
    assert stockfile.read_bytes() == before


def test_refuses_broken_file(stockfile):
    stockfile.write_text(TEXT.replace('"10n"', '"10"'), encoding="utf-8")
    with pytest.raises(StockEditError, match="capacitor value"):
        apply_changes(stockfile, [QtyChange("resistor", 0, -1)])


def test_add_line_goes_after_its_kind_and_keeps_bytes(stockfile):
    res = add_line(
        stockfile,
        "resistor",
        {"value": "10k", "qty": 5, "tolerance": "1%", "location": "B4", "measured": ["9.99k"]},
    )
    # after the resistor's last line, before the blank line that leads to [[capacitor]]
    at = res.before.index(b"# two picked\n") + len(b"# two picked\n")
    assert (
        res.after
        == res.before[:at]
        + (
            b'\n[[resistor]]\nvalue = "10k"\nqty = 5\n'
            b'tolerance = "1%"\nlocation = "B4"\n'
            b'measured = ["9.99k"]\n'
        )
        + res.before[at:]
    )
    s = load(stockfile)
    assert [r.value for r in s.resistors] == [4700.0, 10000.0] and s.resistors[1].line == 11
    assert s.capacitors[0].line == 18  # moved down by the seven new lines, unchanged


@pytest.mark.parametrize(
    "fields, match",
    [
        ({"value": "10", "qty": 1}, "capacitor value"),
        ({"value": "1n"}, "capacitor qty"),
        ({"value": "1n", "qty": 1, "note": None}, "cannot be written"),
        ({"value": "1n", "qty": 1, "bad key": 1}, "not a key"),
        ({"value": "1n", "qty": 2**63 - 1}, "plausible count"),
    ],
)
def test_add_line_refuses_invalid(stockfile, fields, match):
    before = stockfile.read_bytes()
    with pytest.raises(StockEditError, match=match):
        add_line(stockfile, "capacitor", fields)
    assert stockfile.read_bytes() == before


def test_replace_bytes_undo(stockfile):
    s = load(stockfile)
    res = apply_changes(stockfile, [QtyChange("capacitor", 0, -8)], expect_sha256=s.sha256)
    undo = replace_bytes(stockfile, res.before, expect_sha256=res.after_sha256)
    assert stockfile.read_bytes() == TEXT.encode() and undo.after_sha256 == s.sha256
    assert stat.S_IMODE(stockfile.stat().st_mode) == 0o640


@pytest.mark.parametrize(
    "text, old, new",
    [
        # other layouts: an inline array, a hex count (its base kept), a quoted key
        (
            'resistor = [{value = "1k", qty = 3}, {value = "2k2", qty = 7}]  # inline\n',
            "qty = 3}",
            "qty = 2}",
        ),
        ('[[resistor]]\nvalue = "1k"\nqty = 0x03\n', "qty = 0x03", "qty = 0x02"),
        ('[[resistor]]\nvalue = "1k"\n"qty" = 3\n', '"qty" = 3', '"qty" = 2'),
        (
            '[[resistor]]\nvalue = "1k"\nnote = """\nqty = 3\n"""\nqty = 3\n',
            '"""\nqty = 3\n',
            '"""\nqty = 2\n',
        ),
    ],
)
def test_other_layouts_still_edit_only_the_number(tmp_path, text, old, new):
    p = tmp_path / "odd.toml"
    p.write_text(text, encoding="utf-8")
    res = apply_changes(p, [QtyChange("resistor", 0, -1)])
    assert load(p).resistors[0].qty == 2
    assert res.after.decode() == text[::-1].replace(old[::-1], new[::-1], 1)[::-1]


def test_crlf_bom_and_symlink(tmp_path):
    real = tmp_path / "real.toml"
    real.write_bytes(b"\xef\xbb\xbf" + TEXT.replace("\n", "\r\n").encode())
    link = tmp_path / "link.toml"
    link.symlink_to(real)
    apply_changes(link, [QtyChange("capacitor", 0, 1)])
    assert link.is_symlink()
    data = real.read_bytes()
    assert (
        data == b"\xef\xbb\xbf" + TEXT.replace("qty = 8", "qty = 9").replace("\n", "\r\n").encode()
    )


def test_sample_round_trip_all_lines(tmp_path):
    # every line of the bundled sample can be edited; only its qty line changes
    p = tmp_path / "s.toml"
    p.write_bytes(SAMPLE.read_bytes())
    s = load(p)
    changes = [
        QtyChange(k, i, 1)
        for k in ("resistor", "capacitor", "opamp")
        for i in range(len(s.lines(k)))
    ]
    res = apply_changes(p, changes, expect_sha256=s.sha256)
    diff, dlen = changed_lines(res.before, res.after)
    assert dlen == 0 and len(diff) == len(changes)
    assert all(a.startswith("qty = ") and b.startswith("qty = ") for a, b in diff)


WORKER = textwrap.dedent("""
    import sys
    from picker.cli import main
    path, n = sys.argv[1], int(sys.argv[2])
    codes = [main(["stock", "adjust", "--stock", path, "--kind", "resistor", "--value", "4k7",
                   "--by", "-1"]) for _ in range(n)]
    print(sum(c == 0 for c in codes))
""")


def test_two_processes_adjusting_at_once_lose_nothing(stockfile):
    stockfile.write_text(TEXT.replace("=   20", "=   200"), encoding="utf-8")
    n = 40
    procs = [
        subprocess.Popen(
            [sys.executable, "-c", WORKER, str(stockfile), str(n)],
            stdout=subprocess.PIPE,
            stderr=subprocess.PIPE,
            text=True,
            cwd=ROOT,
        )
        for _ in range(2)
    ]
    outs = [p.communicate(timeout=120) for p in procs]
    assert [int(o[0].split()[-1]) for o in outs] == [n, n], outs
    assert load(stockfile).resistors[0].qty == 200 - 2 * n
    assert sorted(p.name for p in stockfile.parent.iterdir()) == ["inv.toml"]


BURST = textwrap.dedent("""
    import sys
    from stock.file import QtyChange, apply_changes
    path = sys.argv[1]
    print("ready", flush=True)
    for i in range(100000):
        apply_changes(path, [QtyChange("resistor", 0, 1 if i % 2 else -1),
                             QtyChange("capacitor", 0, 1)])
""")


def test_sigkill_mid_burst_leaves_old_or_new_file(tmp_path):
    p = tmp_path / "inv.toml"
    p.write_bytes(SAMPLE.read_bytes())
    start = load(p)
    rng = random.Random(7)
    for _ in range(6):
        r0, c0 = load(p).resistors[0].qty, load(p).capacitors[0].qty
        proc = subprocess.Popen(
            [sys.executable, "-c", BURST, str(p)], stdout=subprocess.PIPE, cwd=ROOT
        )
        assert proc.stdout.readline().strip() == b"ready"
        time.sleep(rng.uniform(0.05, 0.4))
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait()
        proc.stdout.close()
        s = load(p)  # parses: never a partial file
        assert len(s.resistors) == len(start.resistors)
        # the burst alternates -1/+1 on one line and +1 on another, in one edit each time
        assert s.resistors[0].qty in (r0, r0 - 1) and s.capacitors[0].qty >= c0
        assert s.resistors[0].qty == r0 - (s.capacitors[0].qty - c0) % 2
        # only qty numbers differ from the original
        diff, dlen = changed_lines(SAMPLE.read_bytes(), p.read_bytes())
        assert dlen == 0 and all(a.startswith("qty = ") for a, _ in diff)


def test_read_only_file_refused(stockfile):
    stockfile.chmod(0o444)
    with pytest.raises(StockEditError, match="read-only"):
        apply_changes(stockfile, [QtyChange("resistor", 0, -1)])
    assert stockfile.read_bytes() == TEXT.encode()


def test_write_failure_leaves_file_and_no_temp(stockfile, monkeypatch):
    import stock.edit as edit

    def full_disk(fd, data):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(edit.os, "write", full_disk)
    with pytest.raises(StockEditError, match="No space left"):
        apply_changes(stockfile, [QtyChange("resistor", 0, -1)])
    monkeypatch.undo()
    assert stockfile.read_bytes() == TEXT.encode()
    assert sorted(p.name for p in stockfile.parent.iterdir()) == ["inv.toml"]


from hypothesis import HealthCheck, given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402

_SAMPLE_STOCK = load(SAMPLE)
_change = st.sampled_from(["resistor", "capacitor", "opamp"]).flatmap(
    lambda k: st.builds(
        QtyChange, st.just(k), st.integers(-1, len(_SAMPLE_STOCK.lines(k))), st.integers(-30, 5)
    )
)


@settings(
    max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture]
)
@given(st.lists(_change, min_size=1, max_size=4))
def test_edit_fuzz_all_or_nothing(tmp_path, changes):
    # a change set either applies in full (exactly the planned qty, only qty lines differ)
    # or is refused with the file untouched
    p = tmp_path / "f.toml"
    p.write_bytes(SAMPLE.read_bytes())
    try:
        res = apply_changes(p, changes, expect_sha256=_SAMPLE_STOCK.sha256)
    except StockEditError:
        assert p.read_bytes() == SAMPLE.read_bytes()
        return
    after = load(p)
    for kind in ("resistor", "capacitor", "opamp"):
        for i, line in enumerate(_SAMPLE_STOCK.lines(kind)):
            delta = sum(c.delta for c in changes if c.kind == kind and c.index == i)
            assert after.lines(kind)[i].qty == line.qty + delta
    diff, dlen = changed_lines(res.before, res.after)
    assert dlen == 0 and all(a.startswith("qty = ") for a, _ in diff)


HALF = textwrap.dedent("""
    import os, sys, time
    import stock.edit as edit
    real_write = os.write

    def half_write(fd, data):
        n = real_write(fd, bytes(data[:len(data) // 2]))
        print("half", flush=True)
        time.sleep(60)
        return n

    edit.os.write = half_write
    edit.apply_changes(sys.argv[1], [edit.QtyChange("resistor", 0, -5)])
""")


def test_sigkill_while_writing_the_temp_file_keeps_the_old_file(stockfile):
    # deterministic: the writer is stopped with half the new file written, then killed
    proc = subprocess.Popen(
        [sys.executable, "-c", HALF, str(stockfile)], stdout=subprocess.PIPE, cwd=ROOT
    )
    assert proc.stdout.readline().strip() == b"half"
    os.kill(proc.pid, signal.SIGKILL)
    proc.wait()
    proc.stdout.close()
    assert stockfile.read_bytes() == TEXT.encode()
    assert load(stockfile).resistors[0].qty == 20
    left = [p.name for p in stockfile.parent.iterdir() if p.name != "inv.toml"]
    assert len(left) == 1 and left[0].startswith(".inv.toml.") and left[0].endswith(".tmp")
    # the next edit works (the dead writer's lock went with it) and removes its temp file
    apply_changes(stockfile, [QtyChange("resistor", 0, -1)])
    assert load(stockfile).resistors[0].qty == 19
    assert sorted(p.name for p in stockfile.parent.iterdir()) == ["inv.toml"]
