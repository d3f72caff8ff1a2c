"""Readers of the quantities beside component values: percent, ppm, voltage, frequency,
plain numbers, current, power, slew rate. Each takes the text as written in the stock file
or on the command line (or a bare number where that is allowed) and returns SI base units;
percent and ppm come back as fractions (``1%`` -> 0.01, ``50ppm`` -> 50e-6). The number
reading itself (SI prefixes, RKM letters, exact scaling) is ``stock.values``'s.
"""

from __future__ import annotations

import re

from stock.errors import ValueParseError
from stock.text import shown, type_word
from stock.values import (
    _NUM,
    _PREFIX,
    _RKM_PREFIX,
    PREFIXES,
    _bare_number,
    _memo_text,
    _prefix_exp,
    _scaled,
)


def format_percent(fraction: float, digits: int = 3) -> str:
    """A fraction as the percentage a stock file writes: 0.01 -> ``1%``, 0.005 -> ``0.5%``
    (``digits`` significant digits); what ``parse_percent`` reads back."""
    return f"{fraction * 100:.{digits}g}%"


def _without_plus_minus(text: str) -> str:
    """``text`` stripped, and without a leading ``±`` or ``+/-`` (a tolerance as printed)."""
    s = text.strip()
    for pm in ("±", "+/-"):
        if s.startswith(pm):
            s = s[len(pm) :].strip()
    return s


def _parse_with_unit(text, unit_re: str, what: str, example: str, *, bare_ok: bool = True) -> float:
    """Number, optional SI prefix, then the unit (matched by ``unit_re``)."""
    help_ = f"write {what} like {example}"
    if isinstance(text, bool) or not isinstance(text, (int, float, str)):
        raise ValueParseError(f"{shown(text)} is {type_word(text)}, not {what}; {help_}")
    if isinstance(text, (int, float)):
        if not bare_ok:
            raise ValueParseError(f"{shown(text)} has no unit; {help_}")
        return _bare_number(text)
    s = _without_plus_minus(text)
    m = re.fullmatch(rf"([+-]?)({_NUM})\s*({_PREFIX})?\s*({unit_re})?", s)
    if m:
        sign, digits, exp, unit = m[1], m[2], _prefix_exp(m[3]), m[4]
    else:  # RKM style, the prefix letter as the decimal point: 1k5 = 1.5 k (IEC 60062)
        m = re.fullmatch(rf"([+-]?)([0-9]*)({_RKM_PREFIX})([0-9]+)\s*({unit_re})?", s)
        if not m:
            raise ValueParseError(f"cannot read {what} {shown(text)}; {help_}")
        sign, digits, exp, unit = m[1], f"{m[2] or '0'}.{m[4]}", PREFIXES[m[3]], m[5]
    if not unit and not bare_ok:
        raise ValueParseError(f"{shown(text)} has no unit; {help_}")
    return _scaled(digits, exp, sign, text)


@_memo_text
def parse_percent(text) -> float:
    """``"1%"``, ``"±0.5 %"`` -> fraction (0.01, 0.005). The percent sign is required."""
    help_ = "write a percentage like '1%' or '0.5%'"
    if isinstance(text, str):
        s = _without_plus_minus(text)
        m = re.fullmatch(rf"({_NUM})\s*%", s)
        if m:
            return _scaled(m[1], -2, "", text)
        raise ValueParseError(f"cannot read percentage {shown(text)}; {help_}")
    raise ValueParseError(
        f"{shown(text)} is {type_word(text)}, not a percentage; {help_} (with the %"
        " sign, in quotes)"
    )


@_memo_text
def parse_ppm(text) -> float:
    """``"50ppm"``, ``"-750 ppm/K"``, ``"100ppm/°C"`` -> fraction per kelvin (50e-6)."""
    help_ = "write a temperature coefficient like '100ppm' or '-750ppm/K'"
    if isinstance(text, str):
        s = _without_plus_minus(text)
        m = re.fullmatch(rf"([+-]?)({_NUM})\s*ppm\s*(?:/\s*(?:K|°C|C|°K))?", s, re.IGNORECASE)
        if m:
            return _scaled(m[2], -6, m[1], text)
        raise ValueParseError(f"cannot read temperature coefficient {shown(text)}; {help_}")
    raise ValueParseError(
        f"{shown(text)} is {type_word(text)}, not a temperature coefficient; {help_} (in quotes)"
    )


@_memo_text
def parse_voltage(text) -> float:
    """``"50V"``, ``"6.3 V"``, ``"1kV"``, ``"6V3"`` (RKM) or a bare number -> volt."""
    if isinstance(text, str):
        m = re.fullmatch(r"\s*([0-9]+)V([0-9]+)\s*", text)
        if m:  # RKM style as printed on capacitors, 6V3 = 6.3 V (common practice)
            return float(f"{m[1]}.{m[2]}")
    return _parse_with_unit(text, "[Vv]", "a voltage", "'50V' or '6.3V'")


@_memo_text
def parse_frequency(text) -> float:
    """``"1k"``, ``"1kHz"``, ``"2.5 MHz"`` or a bare number -> hertz."""
    return _parse_with_unit(text, "[Hh][Zz]", "a frequency", "'1kHz', '2.5 MHz' or '1k'")


@_memo_text
def parse_number(text) -> float:
    """A plain number with an optional SI prefix or RKM letter, no unit: ``"2"``,
    ``"0.707"``, ``"1k"``, ``"1k5"`` (1500), ``"1e3"``."""
    return _parse_with_unit(text, "(?!)", "a number", "'2', '0.707', '1k' or '1k5'")


@_memo_text
def parse_current(text) -> float:
    """``"30pA"``, ``"1 nA"`` or a bare number -> ampere."""
    return _parse_with_unit(text, "A", "a current", "'30pA' or '2nA'")


@_memo_text
def parse_power(text) -> float:
    """``"0.25W"``, ``"250mW"`` or a bare number -> watt."""
    return _parse_with_unit(text, "W", "a power", "'0.25W' or '250mW'")


@_memo_text
def parse_slew(text) -> float:
    """``"13V/us"``, ``"0.5 V/µs"``, ``"13e6 V/s"`` -> volt per second. The unit is required."""
    help_ = "write a slew rate like '13V/us' or '0.5 V/µs'"
    if isinstance(text, str):
        s = text.strip()
        m = re.fullmatch(rf"({_NUM})\s*({_PREFIX})?\s*V\s*/\s*([munµμ]?)s", s)
        if m:
            per = {"": 0, "m": -3, "u": -6, "µ": -6, "μ": -6, "n": -9}[m[3]]
            return _scaled(m[1], _prefix_exp(m[2]) - per, "", text)
        raise ValueParseError(f"cannot read slew rate {shown(text)}; {help_}")
    raise ValueParseError(
        f"{shown(text)} is {type_word(text)}, not a slew rate; {help_} (with its unit, in quotes)"
    )


__all__ = [
    "format_percent",
    "parse_current",
    "parse_frequency",
    "parse_number",
    "parse_percent",
    "parse_power",
    "parse_ppm",
    "parse_slew",
    "parse_voltage",
]
