"""Read and write component values: RKM code, SI prefixes, units, percent, ppm.

The readers of other quantities (percent, ppm, voltage, frequency ...) are in
``stock.units``, the helpers that quote owner text in messages in ``stock.text``; both
are importable from here as before.

Accepted value texts (docs/stock-file.md):

- RKM code as in IEC 60062 [1]_: the multiplier letter stands where the decimal point
  would be: ``4k7`` (4.7 k), ``R47`` (0.47), ``0R1`` (0.1), ``1M0`` (1 M), ``2n2``,
  ``4u7``, ``p47``, ``1F5``. ``R`` and ``F`` are the unit multipliers for ohms and
  farads; ``K`` is read as kilo.
- SI prefix notation: ``4.7k``, ``2.2n``, ``100p``, ``1meg``, ``1e-9``, ``470R``.
- An optional unit after an optional space: ``4.7 kΩ``, ``4.7kohm``, ``10 uF``,
  ``100nF``. ``µ`` (micro sign), ``μ`` (Greek mu) and ``u`` all mean micro.
- SI prefixes are case-sensitive: ``m`` is milli, ``M`` is mega, ``meg`` (any case)
  is mega as in SPICE, ``f`` is femto and ``F`` is the farad.

All results are floats in SI base units (ohm, farad, volt, hertz, volt per second);
percent and ppm come back as fractions (``1%`` -> 0.01, ``50ppm`` -> 50e-6).

References
----------
.. [1] IEC 60062:2016, Marking codes for resistors and capacitors, clause 4 (RKM code).
.. [2] BIPM, The International System of Units (SI brochure), 9th ed., table 7 (prefixes).
"""

from __future__ import annotations

import functools
import math
import re
from decimal import Decimal
from typing import TYPE_CHECKING

from stock.errors import ValueParseError
from stock.lazy import lazy_exports
from stock.text import printable, shown, toml_text, type_word

if TYPE_CHECKING:
    from stock.units import (
        parse_current,
        parse_frequency,
        parse_number,
        parse_percent,
        parse_power,
        parse_ppm,
        parse_slew,
        parse_voltage,
    )

# prefix -> power of ten; values are built as decimals so that "2n2" is exactly float("2.2e-9")
PREFIXES = {
    "f": -15,
    "p": -12,
    "n": -9,
    "u": -6,
    "µ": -6,
    "μ": -6,
    "m": -3,
    "k": 3,
    "K": 3,
    "M": 6,
    "G": 9,
    "T": 12,
}
_NUM = r"(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?"
_PREFIX = r"(?:[mM][eE][gG]|[fpnuµμmkKMGT])"
_OHM = r"(?:Ω|Ω|[oO][hH][mM][sS]?|R)"
_RKM_LETTER = r"[RFfpnuµμmkKMGT]"
_RKM_PREFIX = r"[fpnuµμmkKMGT]"  # RKM letters that are SI prefixes (not the R or F unit)

_SI_RE = re.compile(
    rf"^(?P<sign>[+-]?)(?P<num>{_NUM})\s*(?P<prefix>{_PREFIX})?"
    r"\s*(?P<unit>[^\s0-9]*)$"
)
_RKM_RE = re.compile(
    rf"^(?P<sign>[+-]?)(?P<int>[0-9]*)(?P<letter>{_RKM_LETTER})(?P<frac>[0-9]+)"
    rf"\s*(?P<unit>[^\s0-9]*)$"
)

VALUE_HELP = (
    "write an RKM code (4k7, R47, 2n2, 1M0, 4u7), SI notation (4.7k, 2.2n, 1meg, "
    "1e-9) or a plain number, with an optional unit (Ω, ohm, F)"
)


def _prefix_exp(prefix: str | None) -> int:
    if not prefix:
        return 0
    if prefix.lower() == "meg":
        return 6
    return PREFIXES[prefix]


def _scaled(digits: str, exp: int, sign: str, text) -> float:
    """float of ``sign digits * 10**exp``, rounded once (exactly as float("2.2e-9"))."""
    try:
        x = float(Decimal(digits).scaleb(exp))
    except (ArithmeticError, ValueError):
        raise ValueParseError(f"{shown(text)} is out of range; {VALUE_HELP}") from None
    return _check_number(-x if sign == "-" else x, str(text))


def _unit_kind(unit: str, *, after_prefix: bool = False) -> str | None:
    """'resistor', 'capacitor', '' for no unit, or None for a unit we do not know.

    A lower-case ``f`` counts as farads only after a prefix (``100nf``, ``4.7 uf``,
    common practice on bag labels); alone it stays the femto prefix.
    """
    if not unit:
        return ""
    if re.fullmatch(_OHM, unit):
        return "resistor"
    if unit == "F" or (unit == "f" and after_prefix):
        return "capacitor"
    return None


def _check_number(x: float, text: str) -> float:
    if not math.isfinite(x):
        raise ValueParseError(f"{shown(text)} is not a finite number; {VALUE_HELP}")
    return x


def _bare_number(value) -> float:
    """float of an int or float from the file; a value past float range is an error."""
    try:
        x = float(value)
    except OverflowError:
        raise ValueParseError(f"{shown(toml_text(value))} is out of range; {VALUE_HELP}") from None
    return _check_number(x, toml_text(value))


def _memo_text(fn):
    """Remember results for text inputs: stock files repeat the same few texts ("1%", "50V").

    Only successes are kept (a ValueParseError is raised again each time); bounded size.
    """
    memo: dict = {}

    @functools.wraps(fn)
    def wrapper(text, **kw):
        if type(text) is not str:
            return fn(text, **kw)
        key = (text, kw.get("kind"))
        hit = memo.get(key)
        if hit is None:
            hit = fn(text, **kw)
            if len(memo) >= 8192:
                memo.clear()
            memo[key] = hit
        return hit

    return wrapper


@_memo_text
def parse_value(text, *, kind: str | None = None) -> float:
    """Read a resistance or capacitance.

    Parameters
    ----------
    text : str or int or float
        The value as written in the stock file or on the command line. A bare number
        is in base units (ohm or farad).
    kind : {"resistor", "capacitor", None}
        When given, a unit of the other kind is an error (``10uF`` for a resistor).

    Returns
    -------
    float
        Ohm or farad. The sign is kept; plausibility is the caller's business.

    Raises
    ------
    ValueParseError
        Quoting the text and saying what is accepted.

    References
    ----------
    .. [1] IEC 60062:2016, clause 4: RKM code letters R, K, M, G, T (resistance) and
       p, n, µ, m (capacitance) in place of the decimal point.
    """
    if isinstance(text, bool) or not isinstance(text, (int, float, str)):
        raise ValueParseError(f"{shown(text)} is {type_word(text)}, not a value; {VALUE_HELP}")
    if isinstance(text, (int, float)):
        return _bare_number(text)
    s = text.strip()
    if not s:
        raise ValueParseError(f"empty value {shown(text)}; {VALUE_HELP}")
    m = _RKM_RE.match(s)
    if m:
        letter = m["letter"]
        unit = m["unit"]
        digits = f"{m['int'] or '0'}.{m['frac']}"
        exp = 0 if letter in "RF" else PREFIXES[letter]
        uk = _unit_kind(unit, after_prefix=letter not in "RF")
        if uk is None:
            raise ValueParseError(f"unknown unit {shown(unit)} in {shown(text)}; {VALUE_HELP}")
        implied = {"R": "resistor", "F": "capacitor"}.get(letter, "")
        if implied and uk and uk != implied:
            raise ValueParseError(f"{shown(text)} mixes ohms and farads; {VALUE_HELP}")
        value_kind = uk or implied
    else:
        m = _SI_RE.match(s)
        if not m:
            hint = ""
            if re.search(r"[0-9][NP]", s):
                hint = " (prefixes are case-sensitive: p, n, u, m are lower case)"
            raise ValueParseError(f"cannot read value {shown(text)}{hint}; {VALUE_HELP}")
        digits = m["num"]
        prefix = m["prefix"]
        unit = m["unit"]
        exp = _prefix_exp(prefix)
        uk = _unit_kind(unit, after_prefix=bool(prefix))
        if uk is None:
            raise ValueParseError(f"unknown unit {shown(unit)} in {shown(text)}; {VALUE_HELP}")
        value_kind = uk
    if kind is not None and value_kind and value_kind != kind:
        unit_name = "ohms" if value_kind == "resistor" else "farads"
        raise ValueParseError(f"{shown(text)} is in {unit_name}, not a {kind} value; {VALUE_HELP}")
    return _scaled(digits, exp, m["sign"], text)


def _sig_decimal(value: float, max_digits: int = 6) -> Decimal:
    """The shortest decimal (1..max_digits significant digits) equal to value within 1e-9."""
    for n in range(1, max_digits + 1):
        s = f"{value:.{n - 1}e}"
        if abs(float(s) - value) <= 1e-9 * abs(value):
            return Decimal(s)
    return Decimal(f"{value:.{max_digits - 1}e}")


def _split(d: Decimal) -> tuple[str, str]:
    """Integer and fraction digit strings of a non-negative decimal, trailing zeros dropped."""
    text = format(d, "f")
    if "." in text:
        whole, frac = text.split(".")
        frac = frac.rstrip("0")
    else:
        whole, frac = text, ""
    return whole, frac


_R_LETTERS = {0: "R", 3: "k", 6: "M", 9: "G", 12: "T", -3: "m"}
_C_LETTERS = {-15: "f", -12: "p", -9: "n", -6: "u", -3: "m", 0: "F"}


def format_rkm(value: float, kind: str) -> str:
    """Shortest RKM-style text for tables: ``4k7``, ``470R``, ``1M``, ``R47``, ``2n2``, ``4u7``.

    Up to six significant digits are kept when a measured value needs them
    (``4k693``). Resistors below 1 ohm use a leading ``R`` (``R47``); capacitors use
    p, n, u (ASCII for micro), m. A whole number gets its letter at the end
    (``470R``, ``10k``, ``100p``).

    References
    ----------
    .. [1] IEC 60062:2016, clause 4 (RKM code).
    """
    if not math.isfinite(value) or value <= 0:
        return "0" if value == 0 else str(value)
    letters = _R_LETTERS if kind == "resistor" else _C_LETTERS
    lo, hi = min(letters), max(letters)
    d = _sig_decimal(value)
    exp3 = (d.adjusted() // 3) * 3
    exp3 = max(lo, min(hi, exp3))
    if kind == "resistor" and exp3 == -3 and d >= Decimal("0.01"):
        exp3 = 0
    scaled = d.scaleb(-exp3)
    whole, frac = _split(scaled)
    letter = letters[exp3]
    if whole == "0" and frac:
        return f"{letter}{frac}"
    return f"{whole}{letter}{frac}"


_SI_PREFIX_OUT = {
    -15: "f",
    -12: "p",
    -9: "n",
    -6: "µ",
    -3: "m",
    0: "",
    3: "k",
    6: "M",
    9: "G",
    12: "T",
}


def format_si(value: float, unit: str = "", *, digits: int = 3, ascii_micro: bool = False) -> str:
    """Prose form with an SI prefix: ``format_si(1591.5, "Hz")`` -> ``"1.59 kHz"``.

    ``digits`` significant digits, trailing zeros dropped; ``4.7 kΩ``, ``10 nF``, ``0 Hz``.
    """
    if not math.isfinite(value):
        return f"{value} {unit}".strip()
    if value == 0:
        return f"0 {unit}".strip()
    sign = "-" if value < 0 else ""
    d = Decimal(f"{abs(value):.{digits - 1}e}")
    exp3 = (d.adjusted() // 3) * 3
    exp3 = max(-15, min(12, exp3))
    whole, frac = _split(d.scaleb(-exp3))
    number = f"{whole}.{frac}" if frac else whole
    prefix = _SI_PREFIX_OUT[exp3]
    if ascii_micro and prefix == "µ":
        prefix = "u"
    return f"{sign}{number} {prefix}{unit}".rstrip()


# the readers of percent, ppm, V, Hz, A, W, V/us live in stock.units (they use the
# number reading above); they are imported from there on first use
_UNITS = "current frequency number percent power ppm slew voltage"
__getattr__ = lazy_exports(__name__, {f"parse_{u}": "stock.units" for u in _UNITS.split()})

__all__ = [
    "VALUE_HELP",
    "shown",
    "toml_text",
    "type_word",
    "format_rkm",
    "format_si",
    "parse_current",
    "parse_frequency",
    "parse_number",
    "parse_percent",
    "parse_power",
    "parse_ppm",
    "parse_slew",
    "parse_value",
    "printable",
    "parse_voltage",
]
