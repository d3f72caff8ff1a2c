"""Value texts: RKM code (IEC 60062), SI prefixes (SI brochure), units, %, ppm, V, Hz, V/us."""

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from stock.errors import ValueParseError
from stock.values import (
    format_rkm,
    format_si,
    parse_current,
    parse_frequency,
    parse_percent,
    parse_power,
    parse_ppm,
    parse_slew,
    parse_value,
    parse_voltage,
)

# RKM code examples in the style of IEC 60062:2016 clause 4 (letter in place of the
# decimal point; R for ohms, K/k kilo, M mega; p, n, µ, m for capacitance), from memory.
RKM = [
    ("R47", 0.47),
    ("4R7", 4.7),
    ("47R", 47.0),
    ("470R", 470.0),
    ("4K7", 4.7e3),
    ("4k7", 4.7e3),
    ("47K", 47e3),
    ("1M0", 1e6),
    ("10M", 10e6),
    ("0R1", 0.1),
    ("R10", 0.1),
    ("1G0", 1e9),
    ("2T2", 2.2e12),
    ("p68", 0.68e-12),
    ("6p8", 6.8e-12),
    ("100p", 100e-12),
    ("1n0", 1e-9),
    ("1F5", 1.5),
    ("2n2", 2.2e-9),
    ("4u7", 4.7e-6),
    ("3µ3", 3.3e-6),
    ("1m0", 1e-3),
]


@pytest.mark.parametrize("text, expected", RKM)
def test_rkm_code(text, expected):
    assert parse_value(text) == pytest.approx(expected, rel=1e-12)


# SI prefixes (BIPM SI brochure, 9th ed., table 7): case matters, m milli, M mega;
# "meg" is mega as in SPICE (common practice).
SI = [
    ("4.7k", 4.7e3),
    ("2.2n", 2.2e-9),
    ("100p", 1e-10),
    ("1meg", 1e6),
    ("1MEG", 1e6),
    ("1e-9", 1e-9),
    ("1E3", 1e3),
    ("4.7 kΩ", 4.7e3),
    ("4.7kΩ", 4.7e3),
    ("10 uF", 10e-6),
    ("100nF", 100e-9),
    ("4.7kohm", 4.7e3),
    ("4.7 kOhms", 4.7e3),
    ("10µF", 10e-6),
    ("10μF", 10e-6),
    ("1m", 1e-3),
    ("1M", 1e6),
    ("15f", 15e-15),
    ("1F", 1.0),
    ("470", 470.0),
    (".5k", 500.0),
    ("  22k  ", 22e3),
    ("1.5 M", 1.5e6),
    ("-4k7", -4.7e3),
    (4700, 4700.0),
    (2.2e-9, 2.2e-9),
]


@pytest.mark.parametrize("text, expected", SI)
def test_si_notation(text, expected):
    assert parse_value(text) == pytest.approx(expected, rel=1e-12)


# Lower-case "f" for farads after a prefix, as bags are often labelled (common practice);
# alone it is still the femto prefix (BIPM SI brochure, 9th ed., table 7).
@pytest.mark.parametrize(
    "text, expected",
    [
        ("2.2 nf", 2.2e-9),
        ("100nf", 100e-9),
        ("4.7uf", 4.7e-6),
        ("10 µf", 10e-6),
        ("2n2f", 2.2e-9),
        ("15f", 15e-15),
    ],
)
def test_lower_case_farad_after_a_prefix(text, expected):
    assert parse_value(text, kind="capacitor") == pytest.approx(expected, rel=1e-12)


def test_lower_case_farad_is_not_a_resistor():
    with pytest.raises(ValueParseError, match="in farads, not a resistor"):
        parse_value("4.7nf", kind="resistor")


def test_values_round_once():
    # the decimal is scaled exactly, so "2n2" is the same float as the literal 2.2e-9
    assert parse_value("2n2") == 2.2e-9
    assert parse_value("10 uF") == 10e-6


@pytest.mark.parametrize(
    "text",
    [
        "",
        "  ",
        "4x7",
        "k",
        "4k7k",
        "1.2.3k",
        "abc",
        "4 k 7",
        "2N2",
        "10 uH",
        "1e400",
        "nan",
        "inf",
        "4k7Fx",
        "--1k",
        "4F7Ω",
        "1,5k",
        True,
        None,
        [1],
    ],
)
def test_bad_values_say_what_is_accepted(text):
    with pytest.raises(ValueParseError) as info:
        parse_value(text)
    msg = str(info.value)
    assert "4k7" in msg and "4.7k" in msg  # says what is accepted
    if isinstance(text, str) and text.strip():
        assert text in msg  # quotes the bad text


def test_kind_mismatch_units():
    with pytest.raises(ValueParseError, match="farads"):
        parse_value("10uF", kind="resistor")
    with pytest.raises(ValueParseError, match="ohms"):
        parse_value("4k7Ω", kind="capacitor")
    with pytest.raises(ValueParseError, match="ohms"):
        parse_value("4R7", kind="capacitor")
    assert parse_value("10n", kind="capacitor") == 10e-9


@pytest.mark.parametrize(
    "text, expected", [("1%", 0.01), ("0.5%", 0.005), ("±2 %", 0.02), ("+/-10%", 0.1), ("20%", 0.2)]
)
def test_percent(text, expected):
    assert parse_percent(text) == pytest.approx(expected)


@pytest.mark.parametrize("text", ["1", "5 percent", 0.05, "%", "1%%"])
def test_bad_percent(text):
    with pytest.raises(ValueParseError, match="1%"):
        parse_percent(text)


@pytest.mark.parametrize(
    "text, expected",
    [("50ppm", 50e-6), ("-750 ppm/K", -750e-6), ("100ppm/°C", 100e-6), ("±25 PPM", 25e-6)],
)
def test_ppm(text, expected):
    assert parse_ppm(text) == pytest.approx(expected)


@pytest.mark.parametrize(
    "parser, text, expected",
    [
        (parse_voltage, "50V", 50.0),
        (parse_voltage, "6.3 V", 6.3),
        (parse_voltage, "1kV", 1e3),
        (parse_voltage, "6V3", 6.3),
        (parse_voltage, 25, 25.0),
        (parse_frequency, "1k", 1e3),
        (parse_frequency, "1kHz", 1e3),
        (parse_frequency, "2.5 MHz", 2.5e6),
        (parse_frequency, "3MHz", 3e6),
        (parse_frequency, "10 hz", 10.0),
        (parse_current, "30pA", 30e-12),
        (parse_power, "0.25W", 0.25),
        (parse_power, "250mW", 0.25),
        (parse_slew, "13V/us", 13e6),
        (parse_slew, "0.5 V/µs", 0.5e6),
        (parse_slew, "13e6 V/s", 13e6),
        (parse_slew, "20 V/ms", 20e3),
    ],
)
def test_units(parser, text, expected):
    assert parser(text) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    "parser, text",
    [
        (parse_voltage, "50A"),
        (parse_frequency, "3 MHzz"),
        (parse_slew, "13"),
        (parse_slew, 13),
        (parse_voltage, "fifty"),
        (parse_frequency, "1 mhz x"),
    ],
)
def test_bad_units(parser, text):
    with pytest.raises(ValueParseError) as info:
        parser(text)
    assert str(text) in str(info.value)


# Table form: shortest RKM text (IEC 60062 letter placement; shortest form is our choice)
@pytest.mark.parametrize(
    "value, kind, text",
    [
        (4700, "resistor", "4k7"),
        (470, "resistor", "470R"),
        (1e6, "resistor", "1M"),
        (1.5e6, "resistor", "1M5"),
        (0.47, "resistor", "R47"),
        (4.7, "resistor", "4R7"),
        (100e3, "resistor", "100k"),
        (4870, "resistor", "4k87"),
        (4693.2, "resistor", "4k6932"),
        (10, "resistor", "10R"),
        (2.2e-9, "capacitor", "2n2"),
        (100e-12, "capacitor", "100p"),
        (4.7e-6, "capacitor", "4u7"),
        (1e-6, "capacitor", "1u"),
        (10e-9, "capacitor", "10n"),
        (0.68e-12, "capacitor", "680f"),
        (1e-3, "capacitor", "1m"),
        (999.9999999999, "resistor", "1k"),
    ],
)
def test_format_rkm(value, kind, text):
    assert format_rkm(value, kind) == text


@pytest.mark.parametrize(
    "value, unit, text",
    [
        (1591.5, "Hz", "1.59 kHz"),
        (4700, "Ω", "4.7 kΩ"),
        (10e-9, "F", "10 nF"),
        (4.7e-6, "F", "4.7 µF"),
        (0, "Hz", "0 Hz"),
        (999.96, "", "1 k"),
        (47, "", "47"),
        (-2.2e3, "V", "-2.2 kV"),
        (1e6, "Hz", "1 MHz"),
    ],
)
def test_format_si(value, unit, text):
    assert format_si(value, unit) == text


positive = st.floats(min_value=1e-14, max_value=1e13, allow_nan=False, allow_infinity=False)


@settings(max_examples=200, deadline=None)
@given(positive, st.sampled_from(["resistor", "capacitor"]))
def test_rkm_round_trip(value, kind):
    # what the table prints reads back to the same value (6 significant digits kept)
    text = format_rkm(value, kind)
    assert parse_value(text, kind=kind) == pytest.approx(value, rel=1e-5)


@settings(max_examples=200, deadline=None)
@given(st.text(max_size=16))
def test_parser_fuzz_raises_only_our_error(text):
    for parser in (
        parse_value,
        parse_percent,
        parse_ppm,
        parse_voltage,
        parse_frequency,
        parse_slew,
        parse_current,
    ):
        try:
            x = parser(text)
        except ValueParseError:
            continue
        assert math.isfinite(x)


@settings(max_examples=100, deadline=None)
@given(st.from_regex(r"\A[0-9]{0,3}[.]?[0-9]{0,3}[RkKMGTpnumµ]?[0-9]{0,3} ?(Ω|ohm|F)?\Z"))
def test_parser_fuzz_value_shaped(text):
    try:
        x = parse_value(text)
    except ValueParseError as exc:
        assert text in str(exc)
    else:
        assert math.isfinite(x) and x >= 0
