"""Loading format 1 (docs/stock-file.md): every error and warning names file, line and key."""

import hashlib
import os
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stock.errors import StockFileError
from stock.fields import KEYS
from stock.file import file_sha256, load, loads

ROOT = Path(__file__).resolve().parents[2]

GOOD = """\
[stock]
name = "test bench"
format = 1

[[resistor]]
value = "4k7"
qty = 20
tolerance = "1%"
tempco = "100ppm"
power = "0.25W"
location = "A3"
note = "metal film"
measured = ["4.693k"]

[[capacitor]]
value = "10n"
qty = 8
tolerance = "5%"
dielectric = "c0g"
voltage = "50V"
location = "C1"

[[capacitor]]
value = "100u"
qty = 2
dielectric = "Electrolytic"
voltage = "16V"

[[opamp]]
name = "dual JFET-input"
gbw = "3MHz"
slew = "13V/us"
channels = 2
supply = "30V"
ib = "30pA"
qty = 4
location = "IC tray"
"""


def test_good_file():
    s = loads(GOOD, source="good.toml")
    assert s.name == "test bench" and s.warnings == ()
    (r,) = s.resistors
    # values per docs/stock-file.md: 4k7 = 4700 ohm, 1% = 0.01, 100 ppm = 1e-4 per K
    assert (r.value, r.qty, r.tolerance, r.tolerance_assumed) == (4700.0, 20, 0.01, False)
    assert r.tempco == pytest.approx(1e-4) and r.power == 0.25 and r.location == "A3"
    assert r.measured == (4693.0,) and r.meter == 0.01 and r.nominal_qty == 19
    assert r.line == 5 and r.index == 0
    c0, c1 = s.capacitors
    assert c0.dielectric == "C0G" and c0.polarized is False and c0.voltage == 50.0
    assert c0.line == 15 and c1.index == 1
    # docs/stock-file.md: electrolytic is polarized by default, tolerance default 10% assumed
    assert c1.dielectric == "electrolytic" and c1.polarized is True
    assert c1.tolerance == 0.10 and c1.tolerance_assumed is True
    (o,) = s.opamps
    assert (o.gbw, o.slew, o.channels, o.supply) == (3e6, 13e6, 2, 30.0)
    assert o.ib == pytest.approx(30e-12)
    assert s.sha256 == hashlib.sha256(GOOD.encode()).hexdigest()


def test_load_sets_path_and_hash(tmp_path):
    p = tmp_path / "inv.toml"
    p.write_text(GOOD, encoding="utf-8")
    s = load(p)
    assert s.path == p and s.sha256 == file_sha256(p)


def test_defaults_and_polarized_override():
    s = loads(
        '[[resistor]]\nvalue = 470\nqty = 3\n[[capacitor]]\nvalue = "1u"\nqty = 1\n'
        'dielectric = "tantalum"\npolarized = false\n'
    )
    assert s.resistors[0].value == 470.0 and s.resistors[0].tolerance == 0.05
    assert s.resistors[0].tolerance_assumed
    assert s.capacitors[0].polarized is False


# (file text, line the message must name, key it must name, text it must quote)
R = "[[resistor]]\n"
C = "[[capacitor]]\n"
BAD = [
    (R + 'value = "4x7"\nqty = 1\n', 2, "resistor value", "'4x7'"),
    (R + 'value = ""\nqty = 1\n', 2, "resistor value", "''"),
    (R + "qty = 1\n", 1, "resistor value", "missing"),
    (R + 'value = "-4k7"\nqty = 1\n', 2, "resistor value", "'-4k7'"),
    (R + 'value = "0.1m"\nqty = 1\n', 2, "resistor value", "'0.1m'"),
    (R + 'value = "2T"\nqty = 1\n', 2, "resistor value", "'2T'"),
    (C + 'value = "10"\nqty = 1\n', 2, "capacitor value", "'10'"),
    (C + "value = 10\nqty = 1\n", 2, "capacitor value", "'10'"),
    (C + 'value = "0.01p"\nqty = 1\n', 2, "capacitor value", "'0.01p'"),
    (C + 'value = "10uΩ"\nqty = 1\n', 2, "capacitor value", "'10uΩ'"),
    (R + 'value = "1k"\n', 1, "resistor qty", "missing"),
    (R + 'value = "1k"\nqty = -3\n', 3, "resistor qty", "'-3'"),
    (R + 'value = "1k"\nqty = 2.5\n', 3, "resistor qty", "'2.5'"),
    (R + 'value = "1k"\nqty = "20"\n', 3, "resistor qty", "'20'"),
    (R + 'value = "1k"\nqty = true\n', 3, "resistor qty", "true"),
    # TOML v1.0.0 "Integer": 64-bit; picker caps counts at 1,000,000 (stock.fields)
    (R + 'value = "1k"\nqty = 1000001\n', 3, "resistor qty", "'1000001'"),
    (R + 'value = "1k"\nqty = 999999999999999999999\n', 3, "resistor qty", "plausible"),
    (R + 'value = "1k"\nqty = "ten"\n', 3, "resistor qty", "a number without quotes"),
    ('[[opamp]]\ngbw = "3MHz"\nqty = 1\nchannels = 10000000\n', 4, "opamp channels", "plausible"),
    (R + 'value = "1k"\nqty = 1\ntolerance = "5"\n', 4, "resistor tolerance", "'5'"),
    (R + 'value = "1k"\nqty = 1\ntolerance = 0.05\n', 4, "resistor tolerance", "'0.05'"),
    (R + 'value = "1k"\nqty = 1\ntolerance = "150%"\n', 4, "resistor tolerance", "'150%'"),
    (R + 'value = "1k"\nqty = 1\ntempco = "lots"\n', 4, "resistor tempco", "'lots'"),
    (C + 'value = "1n"\nqty = 1\nvoltage = "fifty"\n', 4, "capacitor voltage", "'fifty'"),
    (C + 'value = "1n"\nqty = 1\nvoltage = "-5V"\n', 4, "capacitor voltage", "'-5V'"),
    (C + 'value = "1n"\nqty = 1\ndielectric = "X8Q"\n', 4, "capacitor dielectric", "'X8Q'"),
    (C + 'value = "1n"\nqty = 1\npolarized = "yes"\n', 4, "capacitor polarized", "'yes'"),
    (
        R + 'value = "1k"\nqty = 1\nmeasured = ["1.01k", "0.99k"]\n',
        4,
        "resistor measured",
        "2 measured",
    ),
    (R + 'value = "1k"\nqty = 3\nmeasured = ["1.01q"]\n', 4, "resistor measured", "'1.01q'"),
    (R + 'value = "1k"\nqty = 3\nmeasured = "1.01k"\n', 4, "resistor measured", "'1.01k'"),
    (R + 'value = "1k"\nqty = 3\nmeter = "x"\n', 4, "resistor meter", "'x'"),
    (R + 'value = "1k"\nqty = 3\nlocation = 7\n', 4, "resistor location", "'7'"),
    ('[[opamp]]\nname = "quad"\nqty = 1\n', 1, "opamp gbw", "missing"),
    ('[[opamp]]\ngbw = "3 parsecs"\nqty = 1\n', 2, "opamp gbw", "'3 parsecs'"),
    ('[[opamp]]\ngbw = "3Hz"\nqty = 1\n', 2, "opamp gbw", "'3Hz'"),
    ('[[opamp]]\ngbw = "3MHz"\nqty = 1\nslew = "fast"\n', 4, "opamp slew", "'fast'"),
    ('[[opamp]]\ngbw = "3MHz"\nqty = 1\nchannels = 0\n', 4, "opamp channels", "'0'"),
    ('[[opamp]]\ngbw = "3MHz"\n', 1, "opamp qty", "missing"),
    ("[stock]\nformat = 2\n", 2, "stock format", "'2'"),
    ('[resistor]\nvalue = "1k"\nqty = 1\n', 1, "resistor", "[[resistor]]"),
    ('[[resistor]]\nvalue = "1k"\nqty = 1\nqty = 2\n', 4, "TOML syntax", "'qty = 2'"),
    ("[[resistor]]\nvalue = 1k\n", 2, "TOML syntax", "'value = 1k'"),
    ('[[resistor]]\nvalue = "1k\nqty = 1\n', 2, "TOML syntax", "'value = \"1k'"),
    ('[[resistor]]\nnote = """open\nqty = 1\n\n', 3, "TOML syntax", "end of the file"),
    ('# inline\nresistor = [{value = "1k", qty = -1}]\n', 2, "resistor qty", "'-1'"),
    (
        '\n\n[[resistor]]\nvalue = "1k"\nqty = 1\n\n[[capacitor]]\nvalue = "1n"\nqty = 1\n'
        'voltage = "5 parsec"\n',
        10,
        "capacitor voltage",
        "'5 parsec'",
    ),
]


@pytest.mark.parametrize("text, line, key, quoted", BAD)
def test_malformed_file_names_line_and_key(text, line, key, quoted):
    with pytest.raises(StockFileError) as info:
        loads(text, source="bad.toml")
    problems = info.value.problems
    assert len(problems) == 1, problems
    assert problems[0].startswith(f"bad.toml:{line}: {key}"), problems[0]
    assert quoted in problems[0]


def test_all_problems_collected():
    text = R + 'value = "4x7"\nqty = -1\n' + C + 'value = "10"\nqty = 1\ndielectric = "foo"\n'
    with pytest.raises(StockFileError) as info:
        loads(text, source="f.toml")
    assert [p.split(": ")[0] + ": " + p.split(": ")[1] for p in info.value.problems] == [
        "f.toml:2: resistor value",
        "f.toml:3: resistor qty",
        "f.toml:5: capacitor value",
        "f.toml:7: capacitor dielectric",
    ]


def test_not_utf8(tmp_path):
    p = tmp_path / "latin.toml"
    p.write_bytes(b'[[resistor]]\nvalue = "1k"\nnote = "caf\xe9"\nqty = 1\n')
    with pytest.raises(StockFileError, match=r"latin.toml:3: not UTF-8"):
        load(p)


def test_missing_file(tmp_path):
    with pytest.raises(StockFileError, match="nope.toml: cannot read"):
        load(tmp_path / "nope.toml")


def test_folder_and_unreadable_file(tmp_path, monkeypatch):
    with pytest.raises(StockFileError, match=f"{tmp_path}: is a folder, not a file"):
        load(tmp_path)
    p = tmp_path / "locked.toml"
    p.write_text('[[resistor]]\nvalue = "1k"\nqty = 1\n', encoding="utf-8")

    real_open = os.open

    def denied(path, flags, *args):
        if str(path).endswith("locked.toml"):
            raise PermissionError(13, "Permission denied", str(path))
        return real_open(path, flags, *args)

    # root reads a mode-000 file anyway, so the refusal of the OS is simulated
    monkeypatch.setattr(os, "open", denied)
    with pytest.raises(
        StockFileError, match="locked.toml: cannot read the stock file: Permission denied"
    ):
        load(p)


@pytest.mark.parametrize(
    "text, line, start",
    [
        (R + 'value = "1k"\nqty = 1\ncolour = "brown"\n', 4, "resistor colour: unknown key"),
        ("[drawer]\nx = 1\n" + R + 'value = "1k"\nqty = 1\n', 1, "unknown table 'drawer'"),
        ('[stock]\nowner = "me"\n' + R + 'value = "1k"\nqty = 1\n', 2, "stock owner: unknown key"),
        (
            R + 'value = "1k"\nqty = 1\nlocation = "A1"\n' + R + 'value = "1000"\nqty = 2\n'
            'location = "a1"\n',
            5,
            "resistor 1k in a1 is listed twice",
        ),
        (
            R + 'value = "2m2"\nqty = 3\n',
            2,
            "resistor value: '2m2' is 2.2 mΩ (m is milli); write M",
        ),
        (R + 'value = "1m"\nqty = 3\n', 2, "resistor value: '1m' is 1 mΩ"),
        (
            R + 'value = "1k"\nqty = 3\ntolerance = "1%"\nmeasured = ["1.2k"]\n',
            5,
            "resistor measured: '1.2k' is 20.0% from the nominal",
        ),
    ],
)
def test_warnings(text, line, start):
    s = loads(text, source="w.toml")
    assert len(s.warnings) == 1, s.warnings
    assert s.warnings[0].startswith(f"w.toml:{line}: {start}"), s.warnings[0]


@pytest.mark.parametrize("text", ["", "# nothing yet\n", '[stock]\nname = "empty"\n'])
def test_empty_stock_warns(text):
    s = loads(text, source="e.toml")
    assert s.warnings == (
        "e.toml: the stock is empty: no [[resistor]], [[capacitor]] or [[opamp]] lines",
    )


def test_dielectric_spellings():
    # canonical spellings of docs/stock-file.md; NPO/COG with the letter O are common slips
    for given_, canon in (
        ("np0", "NP0"),
        ("NPO", "NP0"),
        ("COG", "C0G"),
        ("x7r", "X7R"),
        ("Polypropylene", "polypropylene"),
        ("FILM", "film"),
        ("Mica", "mica"),
    ):
        s = loads(C + f'value = "1n"\nqty = 1\ndielectric = "{given_}"\n')
        assert s.capacitors[0].dielectric == canon


def test_sample_loads_clean_and_copies_identical():
    top = ROOT / "sample_inventory.toml"
    bundled = ROOT / "picker" / "data" / "sample_inventory.toml"
    assert top.read_bytes() == bundled.read_bytes()
    s = load(top)
    assert s.warnings == () and s.name == "north bench cabinet"
    assert 40 <= len(s.resistors) <= 60
    assert any(r.qty == 0 for r in s.resistors) and any(r.measured for r in s.resistors)
    assert sum(1 for c in s.capacitors if c.polarized) == 2
    assert all(c.voltage for c in s.capacitors)
    # enough film/C0G of 1n, 2n2, 4n7 and 10n for fourth-order designs (two stages x 2 caps)
    for v in (1e-9, 2.2e-9, 4.7e-9, 10e-9):
        stable = [
            c
            for c in s.capacitors
            if abs(c.value / v - 1) < 1e-9 and c.dielectric in ("C0G", "polypropylene", "polyester")
        ]
        assert max(c.qty for c in stable) >= 4
    assert len(s.opamps) == 3


# every key the format knows, and one it does not
keys = st.sampled_from(sorted({k for known in KEYS.values() for k in known}) + ["colour"])
scalars = st.one_of(
    st.integers(-5, 10**6),
    st.floats(allow_nan=True),
    st.booleans(),
    st.text(max_size=8),
    st.sampled_from(["4k7", "10n", "1%", "50V", "3MHz", "13V/us", "C0G", "-1", "1e400"]),
    st.lists(st.sampled_from(["1k", "x", 3, "10n"]), max_size=3),
)


def _toml_value(v):
    import tomli_w

    return tomli_w.dumps({"k": v})[4:].strip()


@settings(max_examples=150, deadline=None)
@given(
    st.lists(
        st.tuples(
            st.sampled_from(["resistor", "capacitor", "opamp", "stock", "x"]),
            st.dictionaries(keys, scalars, max_size=6),
        ),
        max_size=4,
    )
)
def test_loader_fuzz_structured(entries):
    parts = []
    for kind, fields in entries:
        head = f"[{kind}]" if kind in ("stock", "x") else f"[[{kind}]]"
        body = "".join(f"{k} = {_toml_value(v)}\n" for k, v in fields.items())
        parts.append(f"{head}\n{body}")
    text = "\n".join(parts)
    try:
        loads(text, source="fuzz.toml")
    except StockFileError as exc:
        assert all(p.startswith("fuzz.toml:") for p in exc.problems)


@settings(max_examples=150, deadline=None)
@given(
    st.one_of(
        st.text(alphabet=st.sampled_from(list("[]=\"'#.\n abqtyvalue1kx")), max_size=60),
        st.text(max_size=40),
    )
)
def test_loader_fuzz_text(text):
    try:
        loads(text, source="fuzz.toml")
    except StockFileError as exc:
        assert exc.problems and all(p.startswith("fuzz.toml") for p in exc.problems)


@settings(max_examples=100, deadline=None)
@given(st.binary(max_size=40))
def test_loader_fuzz_bytes(tmp_path_factory, data):
    p = tmp_path_factory.mktemp("fz") / "b.toml"
    p.write_bytes(b'[[resistor]]\nvalue = "1k"\nqty = 1\n' + data)
    try:
        load(p)
    except StockFileError as exc:
        assert all(line.startswith(f"{p}:") for line in exc.problems)
