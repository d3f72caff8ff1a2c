"""What the targets form holds, read from its text fields (no textual here).

Each field is read on its own so the form can show a message beside the field that
is wrong while the others stay valid. ``read_targets`` gathers every field and raises
``FormError`` carrying one message per bad field.
"""

from __future__ import annotations

from dataclasses import dataclass

from stock.errors import PickerError, ValueParseError

RESPONSE_TYPES = ("lowpass", "highpass", "bandpass")
RESPONSES = ("butterworth", "bessel", "chebyshev")
FAMILIES = ("any", "inverting", "non-inverting", "sallen-key", "mfb")
RANKS = ("pieces", "error")  # fewest pieces within the goal, or smallest error

# field name -> (label shown, default text)
TEXT_FIELDS = {
    "order": ("order", "2"),
    "fc": ("fc", "1k"),
    "gain": ("gain", "1"),
    "q": ("Q", ""),
    "ripple": ("ripple dB", "1"),
    "r_min": ("R min", "1k"),
    "r_max": ("R max", "1M"),
    "c_min": ("C min", "100p"),
    "c_max": ("C max", "10u"),
    "goal": ("goal %", "0.5"),
    "time": ("time s", "10"),
}


@dataclass(frozen=True)
class Targets:
    """Everything one search needs besides the stock. SI floats: hertz, ohm, farad."""

    response_type: str = "lowpass"
    response: str = "butterworth"
    order: int = 2
    fc_hz: float = 1000.0
    gain: float = 1.0
    q: float | None = None
    ripple_db: float = 1.0
    family: str | None = None
    r_min: float = 1e3
    r_max: float = 1e6
    c_min: float = 100e-12
    c_max: float = 10e-6
    singles: bool = False
    allow_polarized: bool = False
    rank: str = "pieces"
    max_error: float = 0.005  # the precision goal, a fraction
    time_limit: float | None = 10.0  # seconds, as the CLI; None (field blank): to the end


class FormError(PickerError):
    """One or more fields of the targets form cannot be read. ``errors``: field -> message."""

    def __init__(self, errors: dict[str, str]):
        self.errors = dict(errors)
        super().__init__("; ".join(f"{k}: {v}" for k, v in self.errors.items()))


def _number(text: str, what: str) -> float:
    try:
        return float(text)
    except ValueError:
        raise ValueParseError(f"{what} '{text}' is not a number") from None


def read_field(name: str, text: str):
    """The value of one text field, or raise ``ValueParseError`` quoting the text."""
    text = text.strip()
    if name == "order":
        if not text.isdigit() or not 1 <= int(text) <= 8:
            raise ValueParseError(f"order '{text}': write a whole number from 1 to 8")
        return int(text)
    if name == "fc":
        from stock.values import parse_frequency

        if not text:
            raise ValueParseError("fc is empty: write e.g. 1k or 2.5 kHz")
        f = parse_frequency(text)
        if not f > 0:
            raise ValueParseError(f"fc '{text}' must be above 0 Hz")
        return f
    if name == "gain":
        g = _number(text or "1", "gain")
        if g <= 0:
            raise ValueParseError(f"gain '{text}' is a magnitude: write a number above 0")
        return g
    if name == "q":
        if not text:
            return None
        q = _number(text, "Q")
        if q <= 0:
            raise ValueParseError(f"Q '{text}' must be above 0 (blank: from the response)")
        return q
    if name == "ripple":
        r = _number(text or "1", "ripple")
        if not 0 < r <= 10:
            raise ValueParseError(f"ripple '{text}' dB: write a number above 0, at most 10")
        return r
    if name in ("r_min", "r_max", "c_min", "c_max"):
        from stock.values import parse_value

        kind = "resistor" if name.startswith("r") else "capacitor"
        if not text:
            raise ValueParseError(f"{TEXT_FIELDS[name][0]} is empty")
        return parse_value(text, kind=kind)
    if name == "goal":
        g = _number(text or "0.5", "goal")
        if not 0 < g <= 100:
            raise ValueParseError(f"goal '{text}' %: write a number above 0, at most 100")
        return g / 100
    if name == "time":
        if not text:
            return None
        t = _number(text, "time")
        if t <= 0:
            raise ValueParseError(f"time '{text}' s must be above 0 (blank: no limit)")
        return t
    raise KeyError(name)


def read_targets(
    texts: dict[str, str],
    *,
    response_type: str,
    response: str,
    family: str,
    singles: bool,
    allow_polarized: bool,
    rank: str = "pieces",
) -> Targets:
    """All fields at once; raise ``FormError`` with every bad field."""
    values, errors = {}, {}
    for name in TEXT_FIELDS:
        try:
            values[name] = read_field(name, texts.get(name, TEXT_FIELDS[name][1]))
        except PickerError as exc:
            errors[name] = str(exc)
    if not errors:
        if values["r_min"] >= values["r_max"]:
            errors["r_max"] = "R max must be above R min"
        if values["c_min"] >= values["c_max"]:
            errors["c_max"] = "C max must be above C min"
        if response_type == "bandpass" and values["q"] is None:
            errors["q"] = "band-pass needs a Q (centre / bandwidth), e.g. 5"
    if errors:
        raise FormError(errors)
    return Targets(
        response_type=response_type,
        response=response,
        order=values["order"],
        fc_hz=values["fc"],
        gain=values["gain"],
        q=values["q"],
        ripple_db=values["ripple"],
        family=None if family == "any" else family,
        r_min=values["r_min"],
        r_max=values["r_max"],
        c_min=values["c_min"],
        c_max=values["c_max"],
        singles=singles,
        allow_polarized=allow_polarized,
        rank=rank,
        max_error=values["goal"],
        time_limit=values["time"],
    )
