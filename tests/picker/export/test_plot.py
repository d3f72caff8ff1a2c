"""``picker plot``: the SVG parses as XML and its curves lie on the response computed
independently (nodal analysis of the whole design as one netlist); the CSV too; the
tolerance band holds the curve and matches the corners worked out by hand."""

from __future__ import annotations

import csv
import io
import math
import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest

from picker.analysis import chain, nodal_response
from picker.cli import main
from picker.export import load_design, save_design
from picker.export.plot import GIDS, draw, write_figure
from picker.export.response_data import CSV_HEADER, response_csv, response_data
from picker.filters import get_topology
from tests.picker.export.helpers import (
    REQUEST,
    lowpass_candidate,
    stock_records,
    two_stage_candidate,
)

SVG = "{http://www.w3.org/2000/svg}"


@pytest.fixture
def design_file(tmp_path):
    stock = stock_records(path=tmp_path / "inventory.toml", sha="00" * 32)
    path = tmp_path / "d.toml"
    save_design(path, candidate=two_stage_candidate(stock), request=REQUEST, stock=stock)
    return path


def independent_db(design, f_hz):
    """|H| in dB from one netlist of the whole cascade (picker.analysis.chain), solved at
    each frequency on its own: not the per-stage product the plot uses."""
    nets = [get_topology(st.topology).netlist(st.values()) for st in design.stages]
    gbw = design.opamp.gbw_hz if design.opamp else None
    h = np.array([nodal_response(chain(nets), [f], gbw_hz=gbw)[0] for f in f_hz])
    return 20 * np.log10(np.abs(h)), np.degrees(np.angle(h))


def path_points(root, gid):
    group = root.find(f".//{SVG}g[@id='{gid}']")
    assert group is not None, f"no element with id {gid}"
    path = group.find(f"{SVG}path")
    nums = [float(x) for x in re.findall(r"-?\d+(?:\.\d+)?(?:e-?\d+)?", path.get("d"))]
    return np.array(nums).reshape(-1, 2)


def box(root, gid):
    pts = path_points(root, gid)
    return pts[:, 0].min(), pts[:, 0].max(), pts[:, 1].min(), pts[:, 1].max()


def to_data(pts, rect, xlim, ylim, *, log_x):
    x0, x1, y_top, y_bottom = rect
    fx = (pts[:, 0] - x0) / (x1 - x0)
    fy = (y_bottom - pts[:, 1]) / (y_bottom - y_top)  # SVG y grows downwards
    if log_x:
        x = 10 ** (math.log10(xlim[0]) + fx * (math.log10(xlim[1]) - math.log10(xlim[0])))
    else:
        x = xlim[0] + fx * (xlim[1] - xlim[0])
    return x, ylim[0] + fy * (ylim[1] - ylim[0]), (fx >= 0) & (fx <= 1) & (fy >= 0) & (fy <= 1)


def test_svg_parses_and_its_curves_lie_on_the_response(design_file, tmp_path):
    design = load_design(design_file)
    data = response_data(design)
    fig, info = draw(data, title="test design")
    out = tmp_path / "plot.svg"
    write_figure(fig, out, "svg")
    root = ET.parse(out).getroot()  # parses as XML
    assert root.tag == f"{SVG}svg"
    words = " ".join(t.text or "" for t in root.iter(f"{SVG}text"))
    for label in ("test design", "frequency (Hz)", "magnitude (dB)", "phase (degrees)"):
        assert label in words
    rect = box(root, GIDS["magnitude_axes"])
    f, db, inside = to_data(
        path_points(root, GIDS["magnitude"]),
        rect,
        info.magnitude_xlim,
        info.magnitude_ylim,
        log_x=True,
    )
    assert inside.sum() > 300  # the curve is drawn across the panel
    picks = np.flatnonzero(inside)[:: max(1, inside.sum() // 8)]
    ref_db, _ = independent_db(design, f[picks])
    span = info.magnitude_ylim[1] - info.magnitude_ylim[0]
    # a point of the SVG is written to 1/1000 px or better; the panel is ~200 px high
    assert np.max(np.abs(db[picks] - ref_db)) < 2e-3 * span
    rect_p = box(root, GIDS["phase_axes"])
    f, ph, inside = to_data(
        path_points(root, GIDS["phase"]), rect_p, info.magnitude_xlim, info.phase_ylim, log_x=True
    )
    picks = np.flatnonzero(inside)[::50]
    _, ref_ph = independent_db(design, f[picks])
    diff = (ph[picks] - ref_ph + 180) % 360 - 180
    assert np.max(np.abs(diff)) < 2e-3 * (info.phase_ylim[1] - info.phase_ylim[0])
    assert root.find(f".//{SVG}g[@id='{GIDS['band']}']") is not None


def test_band_holds_the_curve_and_matches_a_hand_corner():
    stock = stock_records()
    cand = lowpass_candidate(stock)
    from picker.export import design_from_candidate

    design = design_from_candidate(candidate=cand, request=REQUEST, stock=stock)
    data = response_data(design)
    assert np.all(data.band_low_db <= data.magnitude_db + 1e-9)
    assert np.all(data.magnitude_db <= data.band_high_db + 1e-9)
    # DC gain of the inverting low-pass is R2/R1 (common practice); its extremes over the
    # corners: R2 pieces high and R1 pieces low, and the other way round
    r1 = [(7.5e3, 0.01), (470.0, 0.05)]
    r2 = [(15e3, 0.01), (908.5, 0.01)]

    def gain(s1, s2):
        return sum(v * (1 + s2 * t) for v, t in r2) / sum(v * (1 + s1 * t) for v, t in r1)

    g_nom = gain(0, 0)
    lo_db, hi_db = 20 * math.log10(gain(1, -1) / g_nom), 20 * math.log10(gain(-1, 1) / g_nom)
    assert data.band_low_db[0] - data.magnitude_db[0] == pytest.approx(lo_db, abs=1e-3)
    assert data.band_high_db[0] - data.magnitude_db[0] == pytest.approx(hi_db, abs=1e-3)
    assert data.target_hz == 1000.0 and data.corner_hz is not None


def test_png_and_step_panel(design_file, tmp_path):
    from picker.analysis.step_delay import step_view

    design = load_design(design_file)
    fig, info = draw(response_data(design), title="t", step=step_view(design))
    png = tmp_path / "p.png"
    write_figure(fig, png, "png")
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (ISO/IEC 15948)
    assert info.step_xlim is not None and info.step_ylim is not None


def test_csv_against_the_nodal_response(design_file):
    design = load_design(design_file)
    text = response_csv(response_data(design))
    rows = list(csv.reader(io.StringIO(text)))
    assert tuple(rows[0]) == CSV_HEADER
    table = np.array([[float(x) for x in r] for r in rows[1:]])
    assert len(table) == 400 and np.all(np.diff(table[:, 0]) > 0)
    ref_db, ref_ph = independent_db(design, table[::40, 0])
    assert np.max(np.abs(table[::40, 1] - ref_db)) < 1e-6
    diff = (table[::40, 2] - ref_ph + 180) % 360 - 180
    assert np.max(np.abs(diff)) < 1e-6
    assert np.all(table[:, 3] <= table[:, 1] + 1e-9) and np.all(table[:, 1] <= table[:, 4] + 1e-9)


def test_plot_command(design_file, tmp_path, capsys):
    svg, png = tmp_path / "a.svg", tmp_path / "a.png"
    assert main(["plot", str(design_file), "--svg", str(svg), "--png", str(png), "--step"]) == 0
    ET.parse(svg)
    assert png.stat().st_size > 1000
    err = capsys.readouterr().err
    assert str(svg) in err and str(png) in err
    assert main(["plot", str(design_file), "--csv"]) == 0
    out = capsys.readouterr().out
    assert out.startswith(",".join(CSV_HEADER))


@pytest.mark.parametrize(
    "argv, words",
    [
        ([], "--svg FILE, --png FILE or --csv"),
        (["--svg", "{design}"], "is the design file"),
        (["--svg", "{tmp}"], "folder"),
    ],
)
def test_plot_command_refusals(design_file, tmp_path, capsys, argv, words):
    argv = [a.format(design=design_file, tmp=tmp_path) for a in argv]
    before = design_file.read_bytes()
    assert main(["plot", str(design_file), *argv]) == 2
    assert words in capsys.readouterr().err
    assert design_file.read_bytes() == before
