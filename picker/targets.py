"""One set of rules for the targets of a design, for every shell (CLI and terminal UI).

Each ``read_*`` function takes the text a person typed and the label to quote it by
(``--fc`` on the command line, ``fc`` in the form) and returns the value in SI units,
or raises :class:`stock.errors.ValueParseError` quoting the text and saying what is
accepted. :func:`check_targets` holds the rules that join two fields. The command line
(``picker.commands.design_cmd``) and the targets form (``picker.ui.targets_form``) both
call these, so a value is accepted in one exactly when it is in the other.

Value syntax (docs/cli.md): a plain number, SI prefix or RKM code (``1k``, ``1.5k``,
``1k5``), with the unit where one fits (``1kHz``, ``12V``). Imports nothing heavy.
"""

from __future__ import annotations

import math

from stock.errors import ValueParseError

ORDERS = (1, 8)
# beyond these a request is no filter one can build from drawers of parts (a gain of a
# million is 120 dB in one filter; a Q of 1000 rings for a thousand cycles); past them
# the search would only grind through a space that cannot answer
GAIN_RANGE = (1e-6, 1e6)
Q_RANGE = (0.01, 100.0)  # past Q 100 no stock of 1 % parts holds the response
TEMP_CEILING_C = 1000.0
TOP_MAX = 100
TRIALS_MAX = 1_000_000
RIPPLE_MAX_DB = 10.0
WINDOW_MAX = 1.0  # a yield window of +/-100 % of the target is the widest that means anything
TEMP_FLOOR_C = -273.15
ATTENUATION_MAX_DB = 300.0  # past this no filter of picker's orders gets near


def _finite_positive(x: float, label: str, text: str, unit: str = "") -> float:
    if not math.isfinite(x):
        raise ValueParseError(f"{label} '{text}': not a finite number")
    if x <= 0:
        raise ValueParseError(f"{label} '{text}': must be above 0{unit}")
    return x


def read_number(text: str, label: str) -> float:
    """A number above 0: plain, SI prefix or RKM (``2``, ``0.707``, ``1k``, ``1k5``)."""
    from stock.values import parse_number

    text = str(text).strip()
    if not text:
        raise ValueParseError(f"{label} is empty: write a number, e.g. 2 or 1k5")
    try:
        x = parse_number(text)
    except ValueParseError:
        raise ValueParseError(
            f"{label} '{text}': not a number; write e.g. 2, 0.707, 1k or 1k5"
        ) from None
    return _finite_positive(x, label, text)


def read_frequency(text: str, label: str = "--fc") -> float:
    """A frequency above 0 Hz: ``1k``, ``1k5``, ``2.5 MHz``, ``1e3``."""
    from stock.values import parse_frequency

    text = str(text).strip()
    if not text:
        raise ValueParseError(f"{label} is empty: write a frequency, e.g. 1k or 2.5 kHz")
    try:
        f = parse_frequency(text)
    except ValueParseError:
        raise ValueParseError(
            f"{label} '{text}': not a frequency; write e.g. 1k, 1k5, 2.5kHz or 1e3"
        ) from None
    return _finite_positive(f, label, text, " Hz")


def _within(x: float, span: tuple[float, float], label: str, text: str) -> float:
    lo, hi = span
    if not lo <= x <= hi:
        raise ValueParseError(f"{label} '{text}': must be from {lo:g} to {hi:g}")
    return x


def read_gain(text: str, label: str = "--gain") -> float:
    """The gain magnitude, above 0 (``2``, ``10``, ``1k``), within ``GAIN_RANGE``."""
    return _within(read_number(text, label), GAIN_RANGE, label, str(text).strip())


def read_q(text: str | None, label: str = "--q") -> float | None:
    """Q of one second-order stage within ``Q_RANGE``; blank or None: from the response."""
    if text is None or not str(text).strip():
        return None
    return _within(read_number(text, label), Q_RANGE, label, str(text).strip())


def read_count(value: int, label: str, lo: int, hi: int | None = None) -> int:
    """A whole number from ``lo`` to ``hi`` (--top, --trials, --pick, --seed)."""
    if isinstance(value, bool) or not isinstance(value, int):
        raise ValueParseError(f"{label} {value!r}: write a whole number")
    if value < lo or (hi is not None and value > hi):
        span = f"from {lo:,} to {hi:,}" if hi is not None else f"of at least {lo:,}"
        raise ValueParseError(f"{label} {value}: give a whole number {span}")
    return value


def read_order(text, label: str = "--order") -> int:
    """A whole number from 1 to 8."""
    s = str(text).strip()
    lo, hi = ORDERS
    if not (s.isascii() and s.isdigit()) or not lo <= int(s) <= hi:
        raise ValueParseError(f"{label} '{s}': write a whole number from {lo} to {hi}")
    return int(s)


def _decibels(text, label: str, top: float, bad: str, out_of_range: str) -> float:
    """A number of dB (``1``, ``0.5 dB``) above 0 and at most ``top``; the messages
    after the quoted text are ``bad`` (not a number) and ``out_of_range``."""
    s = str(text).strip()
    try:
        x = float(s.removesuffix("dB").removesuffix("db").strip())
    except ValueError:
        raise ValueParseError(f"{label} '{s}': {bad}") from None
    if not (math.isfinite(x) and 0 < x <= top):
        raise ValueParseError(f"{label} '{s}'{out_of_range}")
    return x


def read_ripple(text: str, label: str = "--ripple") -> float:
    """Chebyshev passband ripple in dB: above 0, at most 10."""
    return _decibels(
        text,
        label,
        RIPPLE_MAX_DB,
        "write the ripple in dB, e.g. 0.5 or 1",
        f" dB: write a number above 0, at most {RIPPLE_MAX_DB:g}",
    )


def read_bound(text: str, kind: str, label: str) -> float:
    """A bound on a position's combined value: resistance or capacitance above 0."""
    from stock.values import parse_value

    s = str(text).strip()
    if not s:
        raise ValueParseError(f"{label} is empty: write a value, e.g. 1k or 100p")
    try:
        v = parse_value(s, kind=kind)
    except ValueParseError as exc:
        raise ValueParseError(f"{label}: {exc}") from None
    return _finite_positive(v, label, s, " ohm" if kind == "resistor" else " F")


def read_window(text: str, label: str = "--window") -> float:
    """The yield window as a fraction: ``5%`` -> 0.05; above 0, at most 100 %."""
    from stock.values import parse_percent

    s = str(text).strip()
    try:
        w = parse_percent(s)
    except ValueParseError:
        raise ValueParseError(f"{label} '{s}': write a percentage, e.g. 5% or 0.5%") from None
    if not (math.isfinite(w) and 0 < w <= WINDOW_MAX):
        raise ValueParseError(f"{label} '{s}': must be above 0 % and at most 100 %")
    return w


def read_max_error(text, label: str = "--max-error") -> float:
    """The precision goal of the ``pieces`` ranking as a fraction: ``0.5%`` or ``0.005``;
    above 0, at most 100 %."""
    from stock.values import parse_percent

    s = str(text).strip()
    try:
        p = parse_percent(s) if s.endswith("%") else float(s)
    except (ValueParseError, ValueError):
        raise ValueParseError(
            f"{label} '{s}': write a percentage (0.5%) or a fraction (0.005)"
        ) from None
    if not (math.isfinite(p) and 0 < p <= 1.0):
        raise ValueParseError(f"{label} '{s}': must be above 0 % and at most 100 %")
    return p


TIME_LIMIT_MAX = 86_400.0  # a day: longer is no interactive search


def read_time_limit(text, label: str = "--time-limit") -> float:
    """Seconds a search may take before it returns the best found: above 0, at most a day."""
    s = str(text).strip()
    try:
        t = float(s.removesuffix("s").strip())
    except ValueError:
        raise ValueParseError(f"{label} '{s}': write a number of seconds, e.g. 10") from None
    if not (math.isfinite(t) and 0 < t <= TIME_LIMIT_MAX):
        raise ValueParseError(f"{label} '{s}': must be above 0 s and at most {TIME_LIMIT_MAX:g} s")
    return t


def read_temp(text: str, label: str = "--temp") -> tuple[float, float]:
    """A temperature span ``LO..HI`` in degrees C, LO <= HI, neither below absolute zero."""
    s = str(text).strip()
    lo, sep, hi = s.partition("..")
    try:
        span = (float(lo), float(hi))
    except ValueError:
        span = None
    if not sep or span is None:
        raise ValueParseError(f"{label} '{s}': write LO..HI in degrees C, e.g. 0..70 or -20..85")
    if not all(math.isfinite(t) for t in span) or span[0] > span[1]:
        raise ValueParseError(f"{label} '{s}': LO must be at most HI, both finite")
    if span[0] < TEMP_FLOOR_C:
        raise ValueParseError(f"{label} '{s}': below absolute zero ({TEMP_FLOOR_C:g} C)")
    if span[1] > TEMP_CEILING_C:
        raise ValueParseError(f"{label} '{s}': above {TEMP_CEILING_C:g} C")
    return span


def read_voltage(text: str, label: str) -> float:
    """A voltage above 0 V (``12``, ``12V``, ``6V3``)."""
    from stock.values import parse_voltage

    s = str(text).strip()
    try:
        v = parse_voltage(s)
    except ValueParseError:
        raise ValueParseError(f"{label} '{s}': not a voltage; write e.g. 12, 12V or 6V3") from None
    return _finite_positive(v, label, s, " V")


def read_attenuation(text, label: str = "--attenuation") -> float:
    """Loss wanted at the stopband in dB below the passband peak: above 0, at most 300."""
    return _decibels(
        text,
        label,
        ATTENUATION_MAX_DB,
        "not a number of dB; write e.g. 40",
        f": give the loss wanted in dB, above 0 and at most {ATTENUATION_MAX_DB:g}",
    )


# the command line's name of each field of the targets (the form's names as keys)
CLI_NAMES = {
    "order": "--order",
    "fc": "--fc",
    "stopband": "--stopband",
    "attenuation": "--attenuation",
    "gain": "--gain",
    "q": "--q",
    "ripple": "--ripple",
    "r_min": "--r-min",
    "r_max": "--r-max",
    "c_min": "--c-min",
    "c_max": "--c-max",
    "goal": "--max-error",
    "time": "--time-limit",
    "window": "--window",
    "temp": "--temp",
    "supply": "--supply",
    "vout": "--vout-peak",
}


def check_spec(
    *,
    order_given: bool,
    q_given: bool,
    stopband_given: bool,
    attenuation_given: bool,
    labels: dict[str, str] | None = None,
) -> dict[str, str]:
    """The rules of an order from a specification; ``{field: message}``, empty if they hold.

    The stopband frequency and the attenuation go together, and they set the order (a
    band-pass: its Q), so neither the order nor Q may be given as well.
    """
    name = {**CLI_NAMES, **(labels or {})}
    if not (stopband_given or attenuation_given):
        return {}
    spec = f"{name['stopband']}/{name['attenuation']}"
    if not (stopband_given and attenuation_given):
        missing = "attenuation" if stopband_given else "stopband"
        return {
            missing: f"{name['stopband']} and {name['attenuation']} go together: give the "
            f"frequency and the loss wanted there (e.g. {name['stopband']} 10k "
            f"{name['attenuation']} 40)"
        }
    if order_given:
        return {"order": f"{name['order']} and {spec} both set the order; give one of them"}
    if q_given:
        return {"q": f"{name['q']} and {spec} both shape the one stage; give one of them"}
    return {}


def relabel(message: str, labels: dict[str, str]) -> str:
    """``message`` with each command-line option named as a shell names the field
    (``labels``: field -> label, fields as in ``CLI_NAMES``)."""
    for field, flag in sorted(CLI_NAMES.items(), key=lambda kv: -len(kv[1])):
        if field in labels:
            message = message.replace(flag, labels[field])
    return message


def check_targets(
    *,
    response_type: str,
    q: float | None,
    r_min: float,
    r_max: float,
    c_min: float,
    c_max: float,
    labels: dict[str, str] | None = None,
    q_from_spec: bool = False,
) -> dict[str, str]:
    """The rules that join fields; returns ``{field: message}``, empty when all hold.

    Fields: ``q``, ``r_max``, ``c_max``. ``labels`` maps a field to the name a shell
    shows (default: the command-line option). ``q_from_spec``: a stopband and an
    attenuation are given, which set a band-pass's Q.
    """
    name = {**CLI_NAMES, **(labels or {})}
    from stock.values import format_rkm

    errors = {}
    if r_min > r_max:
        errors["r_max"] = (
            f"{name['r_max']} {format_rkm(r_max, 'resistor')} is below "
            f"{name['r_min']} {format_rkm(r_min, 'resistor')}"
        )
    if c_min > c_max:
        errors["c_max"] = (
            f"{name['c_max']} {format_rkm(c_max, 'capacitor')} is below "
            f"{name['c_min']} {format_rkm(c_min, 'capacitor')}"
        )
    if response_type == "bandpass" and q is None and not q_from_spec:
        errors["q"] = (
            f"a band-pass needs {name['q']} (centre / bandwidth), e.g. 5, or "
            f"{name['stopband']} and {name['attenuation']}"
        )
    return errors


__all__ = [
    "CLI_NAMES",
    "check_spec",
    "check_targets",
    "read_attenuation",
    "read_bound",
    "read_count",
    "read_frequency",
    "read_gain",
    "read_max_error",
    "read_number",
    "read_order",
    "read_q",
    "read_ripple",
    "read_temp",
    "read_time_limit",
    "read_voltage",
    "read_window",
    "relabel",
]
