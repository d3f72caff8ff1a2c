"""Character plots: braille dot layout, decade ticks, block bars."""

from __future__ import annotations

import math

import pytest

from picker.ui.plotting import (
    braille_curve,
    count_bars,
    decades,
    hz_label,
    labelled_plot,
    nice_range,
)


@pytest.mark.parametrize(
    "x, y, char",
    [
        # Unicode standard, Braille Patterns U+2800..U+28FF: dot 1 = bit 0 (top left),
        # dot 4 = bit 3 (top right), dot 7 = bit 6 (bottom left), dot 8 = bit 7 (bottom right)
        (0.0, 1.0, "\u2801"),
        (1.0, 1.0, "\u2808"),
        (0.0, 0.0, "\u2840"),
        (1.0, 0.0, "\u2880"),
    ],
)
def test_one_dot_lands_in_its_braille_bit(x, y, char):
    assert braille_curve([x], [y], width=1, height=1, x_range=(0, 1), y_range=(0, 1)) == [char]


def test_flat_line_fills_the_top_row_of_dots():
    # dots 1 and 4 in every cell: U+2809 (Unicode Braille Patterns)
    rows = braille_curve(
        [0.0, 1.0, 2.0, 3.0], [1.0] * 4, width=2, height=2, x_range=(0, 3), y_range=(0, 1)
    )
    assert rows == ["\u2809\u2809", "\u2800\u2800"]


def test_steep_step_leaves_no_gap():
    # from the bottom to the top between two adjacent dot columns: every dot row is hit
    rows = braille_curve([0.0, 1.0], [0.0, 1.0], width=1, height=2, x_range=(0, 1), y_range=(0, 1))
    bits = [ord(ch) - 0x2800 for ch in "".join(rows)]
    assert all(b for b in bits)


def test_nan_breaks_the_line_and_values_clip():
    rows = braille_curve(
        [0.0, 0.5, 1.0], [5.0, math.nan, -5.0], width=1, height=1, x_range=(0, 1), y_range=(0, 1)
    )
    # clipped to the top-left and bottom-right dots only (no run joins them)
    assert rows == [chr(0x2800 + 0x01 + 0x80)]


def test_decades_and_labels():
    assert decades(3.0, 2e5) == [10.0, 100.0, 1e3, 1e4, 1e5]
    assert [hz_label(f) for f in (1.0, 10.0, 1e3, 1e5, 1e6)] == ["1", "10", "1k", "100k", "1M"]
    assert nice_range(-67.0, 3.0, 20.0) == (-80.0, 20.0)


def test_labelled_plot_puts_decade_labels_under_their_columns():
    xs = [math.log10(f) for f in (10.0, 100.0, 1000.0)]
    lines = labelled_plot(
        xs,
        [0.0, -20.0, -40.0],
        width=47,
        height=4,
        x_range=(xs[0], xs[-1]),
        y_range=(-40.0, 0.0),
        y_step=20.0,
        y_unit="",
        x_ticks=[(1.0, "10"), (2.0, "100"), (3.0, "1k")],
    )
    assert len(lines) == 6 and all(len(line) == 47 for line in lines)
    labels = lines[-1]
    assert labels.index("100") == 7 + 19  # gutter + middle of 40 columns, centred
    assert labels.rstrip().endswith("1k")
    assert lines[0].lstrip().startswith("0│") and lines[3].lstrip().startswith("-40│")


def test_count_bars_scale_to_the_tallest_bin():
    # U+2584 LOWER HALF BLOCK is half a cell, U+2588 FULL BLOCK a whole one
    assert count_bars([0, 4, 8], height=1) == [" \u2584\u2588"]
    assert count_bars([1, 100], height=2, repeat=2) == [
        "  \u2588\u2588",
        "\u2581\u2581\u2588\u2588",
    ]
