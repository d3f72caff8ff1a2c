"""Character plots: braille dot layout, decade ticks, block bars."""

from __future__ import annotations

import math

import pytest

from picker.report.charplot import (
    CLIP_MARK,
    axis_labels,
    braille_curve,
    crossings,
    decade_ticks,
    decades,
    labelled_plot,
    nice_range,
    passband_phase,
    phase_axis,
)
from picker.report.views import block_rows, count_eighths


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
    labels = [label for _x, label in decade_ticks(1.0, 1e6)]
    assert labels == ["1 Hz", "10 Hz", "100 Hz", "1 kHz", "10 kHz", "100 kHz", "1 MHz"]
    assert [x for x, _label in decade_ticks(3.0, 2e3)] == [1.0, 2.0, 3.0]
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


def test_histogram_bars_scale_to_the_tallest_bin():
    # U+2584 LOWER HALF BLOCK is half a cell, U+2588 FULL BLOCK a whole one
    assert block_rows(count_eighths([0, 4, 8], rows=1), rows=1) == [" \u2584\u2588"]
    # a bin of 1 beside one of 100 still shows (one eighth, U+2581)
    assert block_rows(count_eighths([1, 100], rows=2), rows=2, repeat=2) == [
        "  \u2588\u2588",
        "\u2581\u2581\u2588\u2588",
    ]


@pytest.mark.parametrize(
    "y_range, step, height",
    [((-720.0, 0.0), 180.0, 5), ((-180.0, 0.0), 45.0, 5), ((-80.0, 20.0), 20.0, 8),
     ((0.0, 720.0), 180.0, 5), ((-1080.0, 0.0), 360.0, 5), ((-100.0, 0.0), 20.0, 3)],
)  # fmt: skip
def test_a_flat_curve_at_a_labelled_value_runs_through_its_labels_row(y_range, step, height):
    """Each label sits on the row where the curve's dots of that value are drawn."""
    labels = axis_labels(y_range, step, height, "")
    assert labels  # at least the ends
    for row, label in labels.items():
        value = float(label)
        assert value % step == 0 and y_range[0] <= value <= y_range[1]
        body = braille_curve([0.0, 1.0], [value, value], width=4, height=height,
                             x_range=(0.0, 1.0), y_range=y_range)  # fmt: skip
        (drawn,) = [i for i, line in enumerate(body) if line.strip("\u2800")]
        assert drawn == row, (label, drawn, row)


def test_the_axis_marks_clipped_columns_and_the_given_marks():
    xs = [0.0, 1.0, 2.0, 3.0]
    lines = labelled_plot(
        xs, [0.0, -10.0, -100.0, -100.0], width=7 + 8, height=2, x_range=(0.0, 3.0),
        y_range=(-40.0, 0.0), y_step=20.0, y_unit="", x_ticks=(), marks=[(1.0, "F")],
    )  # fmt: skip
    axis = lines[-2][7:]
    assert axis.count("F") == 1 and axis.index("F") < axis.index(CLIP_MARK)
    assert axis.endswith(CLIP_MARK * 3)  # the last two points, 1.5 columns each
    assert lines[-2][:7] == "      \u2514"
    quiet = labelled_plot(
        xs, [0.0, -10.0, -100.0, -100.0], width=7 + 8, height=2, x_range=(0.0, 3.0),
        y_range=(-40.0, 0.0), y_step=20.0, y_unit="", x_ticks=(), clip_marks=False,
    )  # fmt: skip
    assert CLIP_MARK not in quiet[-2]


def _cascade(response_type: str, order: int, fc_hz: float):
    """The planned sections of a Butterworth filter as s-domain polynomials."""
    from picker.filters import plan_stages

    sections = []
    for _topology, t in plan_stages(response_type, response="butterworth", order=order,
                                    fc_hz=fc_hz, gain=1.0):  # fmt: skip
        w0 = 2 * math.pi * t.f0_hz
        if t.q is None:
            b, a = ([w0], [1, w0]) if response_type == "lowpass" else ([1, 0], [1, w0])
        else:
            b = [w0**2] if response_type == "lowpass" else [1, 0, 0]
            a = [1, w0 / t.q, w0**2]
        sections.append((b, a))
    return sections


@pytest.mark.parametrize("response_type, order", [("lowpass", 8), ("highpass", 8), ("highpass", 3)])
def test_the_plotted_phase_is_the_continuous_phase_of_scipy_signal_freqs(response_type, order):
    """Phase of the whole cascade from one np.unwrap, moved by whole turns, against the
    sum of each section's own phase from scipy.signal.freqs (a section's phase stays
    inside (-180, 180] degrees, so the sum is the continuous phase with no unwrap).
    An nth-order low-pass settles at -90 n degrees, a high-pass passband reads 0
    (handbook: each pole adds -90 degrees above its corner)."""
    import numpy as np
    from scipy import signal

    f = np.logspace(1, 5, 400)
    total = np.ones_like(f, dtype=complex)
    reference = np.zeros_like(f)
    for b, a in _cascade(response_type, order, 1000.0):
        _w, h = signal.freqs(b, a, worN=2 * np.pi * f)
        total *= h
        reference += np.degrees(np.angle(h))
    mag = 20 * np.log10(abs(total))
    drawn = passband_phase(list(mag), list(np.degrees(np.unwrap(np.angle(total)))))
    assert np.allclose(drawn, reference, atol=1e-6)
    if response_type == "lowpass":
        assert abs(drawn[0]) < 5 and abs(drawn[-1] + 90 * order) < 5
    else:
        assert abs(drawn[-1]) < 5 and abs(drawn[0] - 90 * order) < 5


@pytest.mark.parametrize("response_type", ["lowpass", "highpass"])
def test_the_minus_3_db_point_of_a_butterworth_is_its_corner(response_type):
    """A Butterworth filter is 3.01 dB down at its corner frequency (handbook)."""
    import numpy as np
    from scipy import signal

    f = np.logspace(1, 5, 400)
    total = np.ones_like(f, dtype=complex)
    for b, a in _cascade(response_type, 4, 1000.0):
        total *= signal.freqs(b, a, worN=2 * np.pi * f)[1]
    (f3,) = crossings(list(f), list(20 * np.log10(abs(total))), 3.0103)
    assert f3 == pytest.approx(1000.0, rel=2e-3)


@pytest.mark.parametrize(
    "p_min, p_max, expected",
    [
        (-180.0, 0.0, (-180.0, 0.0, 45.0)),  # a second-order low-pass
        (-725.0, -2.9, (-720.0, 0.0, 180.0)),  # 8th order, op amps add 5 degrees
        (-3.0, 716.0, (0.0, 720.0, 180.0)),  # 8th-order high-pass
        (-800.0, 0.0, (-1080.0, 0.0, 360.0)),  # well past -720: the next step
    ],
)
def test_the_phase_axis_reads_whole_steps(p_min, p_max, expected):
    """Each pole adds -90 degrees above its corner (handbook): an nth-order low-pass runs
    0 to -90 n; a few degrees more are drawn at the edge, not a wider axis."""
    lo, hi, step = phase_axis(p_min, p_max, 5)
    assert (lo, hi, step) == expected
    labels = axis_labels((lo, hi), step, 5, "")
    assert float(labels[4]) == lo and float(labels[0]) == hi
