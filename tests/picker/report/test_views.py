"""The views panel shows the numbers of the views (checked against scipy.signal in
tests/picker/analysis/test_step_delay.py) and fits 80 columns; ``--show`` in the CLI."""

from __future__ import annotations

import io
import json

from rich.console import Console

from picker.analysis.step_delay import candidate_views
from picker.cli import main
from picker.commands.common import bundled_sample_path
from picker.report.views import ViewsPanel, block_curve, block_rows
from stock.values import format_si
from tests.picker.analysis.test_step_delay import design


def render(panel, width=80) -> str:
    out = io.StringIO()
    Console(file=out, width=width, color_system=None).print(panel)
    return out.getvalue()


def test_panel_shows_the_numbers_and_fits_80_columns():
    views = candidate_views(design("lowpass", "chebyshev", 4))
    assert all(len(line) <= 80 for line in render(ViewsPanel(views)).splitlines())
    text = render(ViewsPanel(views), width=200)  # no wrapping inside the phrases
    assert f"overshoot {views.step.overshoot_pct:.3g} %" in text
    assert f"settles to 1 % in {format_si(views.step.settling_s, 's')}" in text
    assert f"{format_si(views.delay.dc_s, 's')} at DC" in text
    for f, mag, ph, _tau in views.delay.points:
        assert f"{mag:.2f} dB" in text and f"{ph:.1f}°" in text and format_si(f, "Hz") in text


def test_bessel_reads_flat_and_highpass_swings():
    views = candidate_views(design("lowpass", "bessel", 4), ("delay",))
    text = render(ViewsPanel(views), width=200)
    assert "flat: the peak is the DC delay" in text and "step response" not in text
    views = candidate_views(design("highpass", "butterworth", 2), ("step",))
    text = render(ViewsPanel(views), width=200)
    assert "past zero" in text


def test_block_curve_spans_empty_to_full():
    rows = block_curve([0.0, 0.5, 1.0], width=3, rows=2)
    assert rows == ["  █", " ██"]  # half way fills the lower row of two
    assert block_curve([], width=5) == []


def test_block_rows_fill_by_eighths_from_the_bottom():
    # the eight block elements U+2581..U+2588 stand for 1..8 eighths of a cell (Unicode)
    assert block_rows([0, 4, 8, 12, 16], rows=2) == ["   ▄█", " ▄███"]
    assert block_rows([3], rows=1, repeat=3) == ["▃▃▃"]
    assert block_rows([99, -5], rows=1) == ["█ "]  # clamped to an empty or a full cell


def test_show_in_the_design_command(capsys, tmp_path):
    stock = tmp_path / "inventory.toml"
    stock.write_bytes(bundled_sample_path().read_bytes())
    argv = ["design", "lowpass", "--fc", "1k", "--order", "2", "--stock", str(stock)]
    argv += ["--top", "2", "--trials", "200", "--show", "step,delay"]
    assert main(argv) == 0
    out = capsys.readouterr().out
    assert "views of the best candidate" in out and "group delay" in out
    assert main([*argv, "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    for cand in doc["candidates"]:
        assert cand["views"]["step"]["overshoot_pct"] >= 0
        assert cand["views"]["delay"]["dc_s"] > 0


def test_bad_view_name_exits_2(capsys):
    try:
        code = main(["design", "lowpass", "--fc", "1k", "--show", "noise"])
    except SystemExit as exc:  # argparse refuses the value
        code = exc.code
    assert code == 2
    assert "choose from step, delay" in capsys.readouterr().err
