"""One set of rules: the targets form refuses what the CLI refuses, for the same reason.

Each row goes through ``picker design`` (its parser, ``parse_request`` and the order
from a specification) and through the form (``read_targets``). Both must refuse, with
the same message once the CLI's option is replaced by the form's label, or both accept
the same value. Values read are checked against their source, named beside them.
"""

from __future__ import annotations

import pytest

from picker.cli import build_parser
from picker.commands import design_cmd, design_extras
from picker.targets import CLI_NAMES
from picker.ui.targets_form import LABELS, TEXT_FIELDS, FormError, read_targets
from stock.errors import PickerError

FORM_DEFAULTS = {name: default for name, (_label, default) in TEXT_FIELDS.items()}


def through_cli(kind: str, given: dict[str, str]):
    """(request, None) or (None, message) for ``picker design KIND`` with ``given``."""
    argv = ["design", kind, "--json"]
    if "fc" not in given:
        argv += ["--fc", "1k"]
    for field, text in given.items():
        argv += [f"{CLI_NAMES[field]}={text}"]
    args = build_parser().parse_args(argv)
    try:
        request = design_cmd.parse_request(args)
        design_extras.apply_spec(args, request)
    except PickerError as exc:
        return None, str(exc)
    return request, None


def through_form(kind: str, given: dict[str, str]):
    """(Targets, None) or (None, {field: message}) for the form filled with ``given``
    (the order blank, as the CLI's, so that a stopband may set it)."""
    texts = {**FORM_DEFAULTS, "order": "", **given}
    try:
        targets = read_targets(
            texts,
            response_type=kind,
            response="butterworth",
            family="any",
            singles=False,
            allow_polarized=False,
        )
    except FormError as exc:
        return None, exc.errors
    return targets, None


def as_form_says(message: str, fields) -> str:
    for field in fields:
        message = message.replace(CLI_NAMES[field], LABELS[field])
    return message


REFUSED = [
    # (type, fields given, field the form marks)
    ("lowpass", {"order": "9"}, "order"),
    ("lowpass", {"order": "2.5"}, "order"),
    ("lowpass", {"fc": "fast"}, "fc"),
    ("lowpass", {"fc": "0"}, "fc"),
    ("lowpass", {"gain": "-2"}, "gain"),
    ("lowpass", {"gain": "2e6"}, "gain"),
    ("lowpass", {"q": "0.001"}, "q"),
    ("lowpass", {"ripple": "11"}, "ripple"),
    ("lowpass", {"r_min": "abc"}, "r_min"),
    ("lowpass", {"r_min": "2M"}, "r_max"),  # above R max 1M
    ("lowpass", {"c_max": "50p"}, "c_max"),  # below C min 100p
    ("lowpass", {"goal": "2"}, "goal"),  # a fraction: 200 %
    ("lowpass", {"time": "-1"}, "time"),
    ("lowpass", {"window": "5"}, "window"),  # a percentage needs its %
    ("lowpass", {"temp": "70..0"}, "temp"),
    ("lowpass", {"temp": "-300..20"}, "temp"),
    ("lowpass", {"supply": "twelve"}, "supply"),
    ("lowpass", {"vout": "0"}, "vout"),
    ("lowpass", {"stopband": "10k"}, "attenuation"),
    ("lowpass", {"attenuation": "40"}, "stopband"),
    ("lowpass", {"stopband": "ten", "attenuation": "40"}, "stopband"),
    ("lowpass", {"stopband": "10k", "attenuation": "loud"}, "attenuation"),
    ("lowpass", {"stopband": "10k", "attenuation": "400"}, "attenuation"),
    ("lowpass", {"stopband": "900", "attenuation": "40"}, "stopband"),  # below fc
    ("lowpass", {"stopband": "1.2k", "attenuation": "60"}, "stopband"),  # order 38
    ("highpass", {"stopband": "2k", "attenuation": "40"}, "stopband"),  # above fc
    ("lowpass", {"stopband": "10k", "attenuation": "40", "order": "3"}, "order"),
    ("bandpass", {"stopband": "2k", "attenuation": "20", "q": "5"}, "q"),
    ("bandpass", {}, "q"),  # neither Q nor a stopband
]


@pytest.mark.parametrize("kind, given, field", REFUSED)
def test_the_form_refuses_what_the_cli_refuses_for_the_same_reason(kind, given, field):
    request, cli_message = through_cli(kind, given)
    targets, form_errors = through_form(kind, given)
    assert request is None and targets is None
    assert set(form_errors) == {field}
    assert form_errors[field] == as_form_says(cli_message, CLI_NAMES)
    assert not any(flag in form_errors[field] for flag in CLI_NAMES.values())


ACCEPTED = [
    # (type, fields given, Targets attribute, value and its source)
    ("lowpass", {"order": "3"}, "order", 3),
    ("lowpass", {"fc": "2k5"}, "fc_hz", 2500.0),  # RKM code 2k5 = 2.5 k (IEC 60062)
    ("lowpass", {"gain": "10"}, "gain", 10.0),
    ("lowpass", {"q": "0.707"}, "q", 0.707),
    ("lowpass", {"ripple": "0.5"}, "ripple_db", 0.5),
    ("lowpass", {"r_min": "4k7"}, "r_min", 4700.0),  # RKM code (IEC 60062)
    ("lowpass", {"c_max": "4u7"}, "c_max", 4.7e-6),  # RKM code (IEC 60062)
    ("lowpass", {"goal": "1%"}, "max_error", 0.01),
    ("lowpass", {"goal": "0.02"}, "max_error", 0.02),
    ("lowpass", {"time": "30"}, "time_limit", 30.0),
    ("lowpass", {"window": "2%"}, "window", 0.02),
    ("lowpass", {"temp": "-20..85"}, "temp", (-20.0, 85.0)),
    ("lowpass", {"supply": "12V"}, "supply", 12.0),
    ("lowpass", {"supply": "6V3"}, "supply", 6.3),  # RKM-style voltage (IEC 60062)
    ("lowpass", {"vout": "5"}, "vout_peak", 5.0),
    # Butterworth at ten times fc: 10 log10(1 + 10^(2n)) = 40.0 dB for n = 2
    # (scipy.signal.buttord(1, 10, 3.0103, 40, analog=True) gives 2 as well)
    ("lowpass", {"stopband": "10k", "attenuation": "40"}, "order", 2),
]

CLI_VALUE = {
    "order": lambda r: r["order"],
    "fc_hz": lambda r: r["fc_hz"],
    "gain": lambda r: r["gain"],
    "q": lambda r: r["q"],
    "ripple_db": lambda r: r["ripple_db"],
    "r_min": lambda r: r["bounds"]["r_min"],
    "c_max": lambda r: r["bounds"]["c_max"],
    "max_error": lambda r: r["max_error"],
    "time_limit": lambda r: r["time_limit_s"],
    "window": lambda r: r["_budget"]["window"],
    "temp": lambda r: r["_budget"]["temp"],
    "supply": lambda r: r["_budget"]["supply"],
    "vout_peak": lambda r: r["_budget"]["vout_peak"],
}


@pytest.mark.parametrize("kind, given, attr, value", ACCEPTED)
def test_the_form_reads_what_the_cli_reads(kind, given, attr, value):
    request, cli_message = through_cli(kind, given)
    targets, form_errors = through_form(kind, given)
    assert cli_message is None and form_errors is None
    assert CLI_VALUE[attr](request) == pytest.approx(value)
    assert getattr(targets, attr) == pytest.approx(value)


def test_a_band_pass_takes_its_q_from_the_stopband_in_both():
    given = {"stopband": "2k", "attenuation": "20"}
    request, _ = through_cli("bandpass", given)
    targets, _ = through_form("bandpass", given)
    # 20 dB at twice the centre: Q = sqrt(10^2 - 1) / (2 - 1/2) = 6.633 (second-order
    # band-pass response, from memory)
    assert request["q"] == pytest.approx(6.6332, rel=1e-4)
    assert targets.q == pytest.approx(request["q"])
    assert targets.spec.startswith("Q 6.63: 20.0 dB at 2 kHz, 20 dB asked")


def test_a_blank_field_means_the_option_left_out():
    request, _ = through_cli("lowpass", {})
    targets, _ = through_form(
        "lowpass", {"gain": "", "ripple": "", "goal": "", "window": "", "temp": ""}
    )
    assert targets.order == 2 and request["order"] is None  # plan_stages' default order: 2
    assert targets.gain == request["gain"] and targets.max_error == request["max_error"]
    budget = request["_budget"]
    assert targets.budget_options() == {k: budget[k] for k in targets.budget_options()}
