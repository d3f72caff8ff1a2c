"""``format_rkm_display``: a combined value at four significant figures in RKM form
(IEC 60062:2016 clause 4: the letter stands for the decimal point)."""

from __future__ import annotations

import pytest

from stock.display import format_rkm_display


@pytest.mark.parametrize(
    "value, kind, text",
    [
        (1785.39, "resistor", "1k785"),
        (18590.4, "resistor", "18k59"),
        (28300.0, "resistor", "28k3"),
        (471300.0, "resistor", "471k3"),
        (47.06, "resistor", "47R06"),
        (10.0312e-9, "capacitor", "10n03"),
        (3.19335e-9, "capacitor", "3n193"),
        (4.8e-9, "capacitor", "4n8"),
        (1e6, "resistor", "1M"),
    ],
)
def test_four_significant_figures(value, kind, text):
    assert format_rkm_display(value, kind) == text


def test_fewer_figures_on_request_and_odd_values_as_format_rkm():
    assert format_rkm_display(1785.39, "resistor", digits=3) == "1k79"
    assert format_rkm_display(0.0, "resistor") == "0"
