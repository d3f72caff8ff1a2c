"""What the targets form holds, read from its text fields (no textual here).

Each field is read on its own so the form can show a message beside the field that
is wrong while the others stay valid. The readers and the rules joining fields are
those of the command line (``picker.targets``), called with the form's labels, so a
value the CLI refuses the form refuses for the same reason, naming the form's field
("R min", not "--r-min"). A blank field means what leaving the option out means on
the command line; only the time limit differs (blank: no limit).
``read_targets`` gathers every field and raises ``FormError`` carrying one message per
bad field.
"""

from __future__ import annotations

from dataclasses import dataclass

from stock.errors import PickerError

RESPONSE_TYPES = ("lowpass", "highpass", "bandpass")
RESPONSES = ("butterworth", "bessel", "chebyshev")
FAMILIES = ("any", "inverting", "non-inverting", "sallen-key", "mfb")
# fewest pieces within the goal, smallest worst error, highest Monte Carlo yield
RANKS = ("pieces", "error", "yield")

# field name -> (label shown, default text); the labels are the names in messages
TEXT_FIELDS = {
    "order": ("order", "2"),
    "fc": ("fc", "1k"),
    "gain": ("gain", "1"),
    "stopband": ("stopband", ""),
    "attenuation": ("atten dB", ""),
    "q": ("Q", ""),
    "ripple": ("ripple", "1"),
    "r_min": ("R min", "1k"),
    "r_max": ("R max", "1M"),
    "c_min": ("C min", "100p"),
    "c_max": ("C max", "10u"),
    "goal": ("goal", "0.5%"),
    "time": ("time s", "10"),
    "window": ("window", "5%"),
    "temp": ("temp C", "0..70"),
    "supply": ("supply V", ""),
    "vout": ("out peak V", ""),
}
# blank means the command line's default (the option left out)
BLANK_MEANS = {
    "gain": "1",
    "ripple": "1",
    "goal": "0.5%",
    "window": "5%",
    "temp": "0..70",
}
LABELS = {name: label for name, (label, _default) in TEXT_FIELDS.items()}


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
    # order from a specification (both or neither); ``spec`` says what it gives
    stopband_hz: float | None = None
    attenuation_db: float | None = None
    spec: str = ""
    # the error budget's own inputs, as the CLI's --window, --temp, --supply, --vout-peak
    window: float = 0.05
    temp: tuple[float, float] = (0.0, 70.0)
    supply: float | None = None
    vout_peak: float | None = None

    def budget_options(self) -> dict:
        """The keywords of ``picker.budget.budget`` these targets set."""
        return {
            "window": self.window,
            "temp": self.temp,
            "supply": self.supply,
            "vout_peak": self.vout_peak,
        }


class FormError(PickerError):
    """One or more fields of the targets form cannot be read. ``errors``: field -> message."""

    def __init__(self, errors: dict[str, str]):
        self.errors = dict(errors)
        super().__init__("; ".join(f"{k}: {v}" for k, v in self.errors.items()))


def read_field(name: str, text: str):
    """The value of one text field (None: blank and optional), or raise
    ``ValueParseError`` quoting the text, from the reader the CLI uses."""
    from picker import targets as rules

    label = LABELS[name]  # KeyError: no such field
    text = text.strip() or BLANK_MEANS.get(name, "")
    if name in ("order", "q", "stopband", "attenuation", "time", "supply", "vout") and not text:
        return None
    if name == "order":
        return rules.read_order(text, label)
    if name in ("fc", "stopband"):
        return rules.read_frequency(text, label)
    if name == "attenuation":
        return rules.read_attenuation(text, label)
    if name == "gain":
        return rules.read_gain(text, label)
    if name == "q":
        return rules.read_q(text, label)
    if name == "ripple":
        return rules.read_ripple(text, label)
    if name in ("r_min", "r_max", "c_min", "c_max"):
        return rules.read_bound(text, "resistor" if name[0] == "r" else "capacitor", label)
    if name == "goal":
        return rules.read_max_error(text, label)
    if name == "time":
        return rules.read_time_limit(text, label)
    if name == "window":
        return rules.read_window(text, label)
    if name == "temp":
        return rules.read_temp(text, label)
    return rules.read_voltage(text, label)  # supply, vout


def order_from_spec(values: dict, response_type: str, response: str):
    """The CLI's ``order_from_spec`` for the form's values; DesignError naming fields."""
    from picker.filters.spec_order import order_from_spec as choose
    from picker.targets import relabel
    from stock.errors import PickerError as Refused

    try:
        return choose(
            response_type,
            response=response,
            fc_hz=values["fc"],
            stopband_hz=values["stopband"],
            attenuation_db=values["attenuation"],
            ripple_db=values["ripple"],
        )
    except Refused as exc:
        raise type(exc)(relabel(str(exc), LABELS)) from None


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
    from picker.targets import check_spec, check_targets

    values, errors = {}, {}
    for name in TEXT_FIELDS:
        try:
            values[name] = read_field(name, texts.get(name, TEXT_FIELDS[name][1]))
        except PickerError as exc:
            errors[name] = str(exc)
    spec = None
    if not errors:
        given = {k: values[k] is not None for k in ("order", "q", "stopband", "attenuation")}
        errors.update(
            check_spec(
                order_given=given["order"],
                q_given=given["q"],
                stopband_given=given["stopband"],
                attenuation_given=given["attenuation"],
                labels=LABELS,
            )
        )
        bounds = {k: values[k] for k in ("r_min", "r_max", "c_min", "c_max")}
        errors.update(
            check_targets(
                response_type=response_type,
                q=values["q"],
                labels=LABELS,
                q_from_spec=given["stopband"],
                **bounds,
            )
        )
    if not errors and values["stopband"] is not None:
        try:
            spec = order_from_spec(values, response_type, response)
        except PickerError as exc:
            errors["stopband"] = str(exc)
    if errors:
        raise FormError(errors)
    order, q = values["order"] or 2, values["q"]  # the CLI's order when none is given
    if spec is not None:
        order, q = (order, spec.q) if spec.q is not None else (spec.order, q)
    return Targets(
        response_type=response_type,
        response=response,
        order=order,
        fc_hz=values["fc"],
        gain=values["gain"],
        q=q,
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
        stopband_hz=values["stopband"],
        attenuation_db=values["attenuation"],
        spec=spec.line() if spec is not None else "",
        window=values["window"],
        temp=values["temp"],
        supply=values["supply"],
        vout_peak=values["vout"],
    )
