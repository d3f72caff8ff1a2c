"""Reading what is typed in the targets form and the drawers pane."""

from __future__ import annotations

import pytest

from picker.ui.stock_rows import Row, matches, qty_delta
from picker.ui.targets_form import TEXT_FIELDS, FormError, read_field, read_targets
from stock.errors import ValueParseError
from stock.values import parse_value


@pytest.mark.parametrize(
    "text, current, delta",
    [
        ("12", 20, -8),
        ("+3", 20, 3),
        ("-2", 20, -2),
        (" 0 ", 5, -5),
        ("-5", 5, -5),
    ],
)
def test_qty_delta(text, current, delta):
    assert qty_delta(text, current) == delta


@pytest.mark.parametrize(
    "text, current, words",
    [
        ("-6", 5, "only 5 on hand"),
        ("2.5", 5, "'2.5'"),
        ("", 5, "whole number"),
        ("+", 5, "whole number"),
        ("ten", 5, "'ten'"),
    ],
)
def test_qty_delta_refuses(text, current, words):
    with pytest.raises(ValueParseError, match=words):
        qty_delta(text, current)


ROW = Row("resistor", 0, 4700.0, 10, ("R", "4k7", "10", "1%", "A3", "metal film"))


@pytest.mark.parametrize(
    "words, hit",
    [
        ("", True),
        ("4k7", True),
        ("4.7k", True),
        ("4700", True),
        ("a3", True),
        ("metal a3", True),
        ("47k", False),
        ("C0G", False),
        ("resistor", True),
    ],
)
def test_filter_words(words, hit):
    assert matches(ROW, words, lambda t, k: parse_value(t, kind=k)) is hit


def form(**over):
    texts = {name: default for name, (_label, default) in TEXT_FIELDS.items()}
    texts.update(over)
    return texts


def test_read_targets_defaults():
    t = read_targets(
        form(fc="2.5 kHz"),
        response_type="lowpass",
        response="bessel",
        family="any",
        singles=True,
        allow_polarized=False,
    )
    assert (t.fc_hz, t.order, t.family, t.singles, t.q) == (2500.0, 2, None, True, None)
    assert (t.r_min, t.r_max, t.c_min, t.c_max) == (1e3, 1e6, 100e-12, 10e-6)


def test_read_targets_reports_every_bad_field():
    with pytest.raises(FormError) as info:
        read_targets(
            form(order="9", fc="fast", gain="-2"),
            response_type="lowpass",
            response="butterworth",
            family="any",
            singles=False,
            allow_polarized=False,
        )
    errors = info.value.errors
    assert set(errors) == {"order", "fc", "gain"}
    assert "'9'" in errors["order"] and "'fast'" in errors["fc"] and "'-2'" in errors["gain"]


def test_bandpass_needs_q_and_bounds_in_order():
    with pytest.raises(FormError) as info:
        read_targets(
            form(r_min="1M", r_max="1k"),
            response_type="bandpass",
            response="butterworth",
            family="mfb",
            singles=False,
            allow_polarized=False,
        )
    assert set(info.value.errors) == {"q", "r_max"}


def test_bound_fields_read_values_by_kind():
    assert read_field("c_max", "4u7") == pytest.approx(4.7e-6)
    with pytest.raises(ValueParseError):
        read_field("r_min", "abc")
