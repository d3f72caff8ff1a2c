"""The exported SPICE netlist, run through ngspice (Debian's package), against the design.

ngspice is the outside reference: it solves the netlist on its own, so the gain and the
-3 dB frequency it reports check both the netlist (nodes, pairs, cascade) and the op-amp
macro-model against the standard formulas named beside each check.
"""

from __future__ import annotations

import math
import shutil
import subprocess

import numpy as np
import pytest

from picker.export import load_design, save_design, spice_netlist
from picker.parts import Arrangement, Candidate, Piece, StageChoice, StageTarget
from stock.model import Capacitor, OpAmp, Resistor, Stock
from tests.picker.export.helpers import (
    REQUEST,
    lowpass_candidate,
    stock_records,
    two_stage_candidate,
)

pytestmark = [
    pytest.mark.ngspice,
    pytest.mark.skipif(
        shutil.which("ngspice") is None,
        reason="ngspice is not installed (Debian package 'ngspice')",
    ),
]


def run_ngspice(text: str, tmp_path) -> tuple[np.ndarray, np.ndarray]:
    """Run the netlist ``text`` with a .control block added; return (f_hz, |V(out)|)."""
    assert text.rstrip().endswith(".end")
    data = tmp_path / "ac.txt"
    deck = text.rstrip()[: -len(".end")] + (
        f".control\nset wr_singlescale\nrun\nwrdata {data} vm(out)\n.endc\n.end\n"
    )
    cir = tmp_path / "design.cir"
    cir.write_text(deck, encoding="ascii")
    proc = subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, text=True, timeout=60)
    assert proc.returncode == 0, proc.stdout + proc.stderr
    assert "error" not in proc.stdout.lower(), proc.stdout
    table = np.loadtxt(data)
    return table[:, 0], table[:, 1]


def minus_3db(f, mag, ref):
    """First frequency where |H| falls to ref/sqrt(2), by log-log interpolation."""
    level = ref / math.sqrt(2)
    i = int(np.argmax(mag < level))
    assert i > 0
    lf = np.interp(np.log(level), np.log(mag[i - 1 : i + 1][::-1]), np.log(f[i - 1 : i + 1][::-1]))
    return float(np.exp(lf))


def _export(tmp_path, cand, stock):
    save_design(tmp_path / "d.toml", candidate=cand, request=REQUEST, stock=stock)
    return spice_netlist(load_design(tmp_path / "d.toml"))


def test_netlist_runs_as_is(tmp_path):
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    cir = tmp_path / "as_is.cir"
    cir.write_text(_export(tmp_path, lowpass_candidate(stock), stock), encoding="ascii")
    proc = subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, text=True, timeout=60)
    assert proc.returncode == 0, proc.stdout + proc.stderr
    assert "vdb(out)" in proc.stdout  # the .print table of the batch run
    # ngspice notes a source without a DC value ("has no value, DC 0 assumed"); the
    # netlist gives DC 0 so a batch run prints no such note
    assert "has no value" not in proc.stdout + proc.stderr


def test_netlist_runs_from_a_pipe(tmp_path):
    # the README's `picker netlist d.toml | ngspice -b`: ngspice reads the netlist on stdin
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    proc = subprocess.run(
        ["ngspice", "-b"],
        input=_export(tmp_path, lowpass_candidate(stock), stock),
        capture_output=True,
        text=True,
        timeout=60,
    )
    assert proc.returncode == 0, proc.stdout + proc.stderr
    assert "vdb(out)" in proc.stdout and "has no value" not in proc.stdout + proc.stderr


def test_inverting_lowpass_gain_and_corner(tmp_path):
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    cand = lowpass_candidate(stock)
    f, mag = run_ngspice(_export(tmp_path, cand, stock), tmp_path)
    r1, r2, c1 = 7500 + 470, 15000 + 908.5, 10e-9  # the pieces, the measured one as read
    # inverting amplifier with R2 || C1 feedback: |H(0)| = R2/R1, fc = 1/(2 pi R2 C1)
    # (common practice)
    assert mag[0] == pytest.approx(r2 / r1, rel=1e-3)
    assert minus_3db(f, mag, r2 / r1) == pytest.approx(1 / (2 * math.pi * r2 * c1), rel=0.01)


def test_cascade_of_two_first_order_stages(tmp_path):
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    f, mag = run_ngspice(_export(tmp_path, two_stage_candidate(stock), stock), tmp_path)
    k = 15908.5 / 7970
    fa = 1 / (2 * math.pi * 15908.5 * 10e-9)
    fb = 1 / (2 * math.pi * 15e3 * 10e-9)
    # two real poles: (1 + x/fa^2)(1 + x/fb^2) = 2 with x = f^2 (algebra, common practice)
    a, b = fa * fa, fb * fb
    x = (-(1 / a + 1 / b) + math.sqrt((1 / a + 1 / b) ** 2 + 4 / (a * b))) / (2 / (a * b))
    assert mag[0] == pytest.approx(k, rel=1e-3)
    assert minus_3db(f, mag, k) == pytest.approx(math.sqrt(x), rel=0.01)


def _lines():
    r10k = Resistor(10e3, 4, 0.01, False, location="B1", index=0, line=1)
    c10n = Capacitor(10e-9, 4, 0.05, False, dielectric="C0G", location="C1", index=0, line=6)
    return r10k, c10n


def test_sallen_key_butterworth_corner(tmp_path):
    r10k, c10n = _lines()
    oa = OpAmp("quad general-purpose", 1e6, 1, channels=4, location="IC", index=0, line=11)
    stock = Stock((r10k,), (c10n,), (oa,), path=tmp_path / "s.toml", sha256="00" * 32)
    one = lambda line, v: Arrangement("single", (Piece(line, v, line.tolerance),))  # noqa: E731
    c1 = Arrangement("parallel", (Piece(c10n, 10e-9, 0.05), Piece(c10n, 10e-9, 0.05)))
    # unity-gain Sallen-Key, R1 = R2 = R, C1 = 2C, C2 = C: Q = 1/sqrt(2) (Butterworth) and
    # f0 = 1 / (2 pi R C sqrt(2)); a Butterworth stage is -3 dB at f0 (common practice)
    f0 = 1 / (2 * math.pi * 10e3 * 10e-9 * math.sqrt(2))
    stage = StageChoice(
        "sallen-key-lowpass",
        StageTarget(f0, 1 / math.sqrt(2)),
        StageTarget(f0, 1 / math.sqrt(2), 1.0),
        (("R1", one(r10k, 10e3)), ("R2", one(r10k, 10e3)), ("C1", c1), ("C2", one(c10n, 10e-9))),
    )
    cand = Candidate(0.0, 5, (stage,), oa)
    f, mag = run_ngspice(_export(tmp_path, cand, stock), tmp_path)
    assert mag[0] == pytest.approx(1.0, rel=1e-3)
    assert minus_3db(f, mag, 1.0) == pytest.approx(f0, rel=0.01)


def test_opamp_macro_model_follower_bandwidth_is_gbw(tmp_path):
    """A follower whose RC corner is far above the GBW: the op amp sets the -3 dB point.

    Single-pole op amp as a unity follower: closed-loop bandwidth = A0 fp + fp, i.e. the
    GBW within 1/A0 (common practice)."""
    gbw = 100e3
    r = Resistor(100.0, 1, 0.01, False, location="B1", index=0, line=1)
    c = Capacitor(100e-12, 1, 0.05, False, dielectric="C0G", location="C1", index=0, line=6)
    oa = OpAmp("slow single", gbw, 1, location="IC", index=0, line=11)
    stock = Stock((r,), (c,), (oa,), path=tmp_path / "s.toml", sha256="00" * 32)
    f_rc = 1 / (2 * math.pi * 100.0 * 100e-12)  # 15.9 MHz, 159 x the GBW
    stage = StageChoice(
        "non-inverting-lowpass",
        StageTarget(gbw),
        StageTarget(f_rc),
        (
            ("R1", Arrangement("single", (Piece(r, 100.0, 0.01),))),
            ("C1", Arrangement("single", (Piece(c, 100e-12, 0.05),))),
        ),
    )
    f, mag = run_ngspice(_export(tmp_path, Candidate(0.0, 2, (stage,), oa), stock), tmp_path)
    assert minus_3db(f, mag, mag[0]) == pytest.approx(gbw, rel=0.01)


# ---------------------------------------------------------------- whole filters vs scipy.signal


def ideal_candidate(stages, gbw_hz=1e9):
    """A candidate whose every position holds one piece of exactly the synthesized value."""
    resistors, capacitors, choices = [], [], []
    for topology, target in stages:
        values = topology.synthesize(target)
        positions = []
        for spec in topology.positions:
            pool = resistors if spec.kind == "resistor" else capacitors
            cls = Resistor if spec.kind == "resistor" else Capacitor
            line = cls(
                values[spec.name],
                1,
                0.01,
                False,
                location=f"D{len(pool)}",
                index=len(pool),
                line=1 + len(pool),
            )
            pool.append(line)
            positions.append((spec.name, Arrangement("single", (Piece(line, line.value, 0.01),))))
        choices.append(StageChoice(topology.key, target, target, tuple(positions)))
    oa = OpAmp("fast single", gbw_hz, len(stages), location="IC", index=0, line=99)
    stock = Stock(tuple(resistors), tuple(capacitors), (oa,))
    pieces = sum(len(c.positions) for c in choices)
    return Candidate(0.0, pieces, tuple(choices), oa), stock


def _shape_spread(f, mag, h_ref):
    """max/min of |H_spice| / |H_ref| over the band within 40 dB of the reference peak."""
    ref = np.abs(h_ref)
    keep = ref > ref.max() * 1e-2
    ratio = mag[keep] / ref[keep]
    return ratio.max() / ratio.min()


@pytest.mark.parametrize(
    "kind, response, order, family, make",
    [
        (
            "lowpass",
            "butterworth",
            4,
            "sallen-key",
            lambda w: __import__("scipy.signal").signal.butter(4, w, analog=True),
        ),
        (
            "lowpass",
            "chebyshev",
            5,
            "mfb",
            lambda w: __import__("scipy.signal").signal.cheby1(5, 1.0, w, analog=True),
        ),
        (
            "highpass",
            "butterworth",
            3,
            "sallen-key",
            lambda w: __import__("scipy.signal").signal.butter(3, w, btype="high", analog=True),
        ),
        (
            "highpass",
            "bessel",
            4,
            "mfb",
            lambda w: __import__("scipy.signal").signal.bessel(
                4, w, btype="high", analog=True, norm="mag"
            ),
        ),
    ],
)
def test_cascade_shape_matches_scipy(tmp_path, kind, response, order, family, make):
    """The exported cascade, solved by ngspice, has the shape scipy.signal gives for the
    same prototype (fc = -3 dB for Butterworth and Bessel norm="mag", ripple edge for
    Chebyshev, docs/cli.md): |H_spice / H_scipy| constant within 1 %."""
    from scipy.signal import freqs

    from picker.filters import plan_stages

    fc = 1000.0
    stages = plan_stages(
        kind, response=response, order=order, fc_hz=fc, gain=2.0, ripple_db=1.0, family=family
    )
    cand, stock = ideal_candidate(stages)
    f, mag = run_ngspice(_export(tmp_path, cand, stock), tmp_path)
    b, a = make(2 * np.pi * fc)
    _, h = freqs(b, a, worN=2 * np.pi * f)
    assert _shape_spread(f, mag, h) == pytest.approx(1.0, abs=0.01)


def test_mfb_bandpass_centre_and_q(tmp_path):
    """Second-order band-pass H = (w0/Q) s / (s^2 + (w0/Q) s + w0^2) (common practice):
    the exported MFB stage has that shape and its peak at f0."""
    from scipy.signal import freqs

    from picker.filters import plan_stages

    f0, q = 2000.0, 5.0
    stages = plan_stages("bandpass", fc_hz=f0, q=q, gain=1.0, order=None)
    cand, stock = ideal_candidate(stages)
    f, mag = run_ngspice(_export(tmp_path, cand, stock), tmp_path)
    w0 = 2 * np.pi * f0
    _, h = freqs([w0 / q, 0.0], [1.0, w0 / q, w0 * w0], worN=2 * np.pi * f)
    assert _shape_spread(f, mag, h) == pytest.approx(1.0, abs=0.01)
    peak = f[int(np.argmax(mag))]
    assert peak == pytest.approx(f0, rel=0.05)  # 50 points per decade: 4.7 % apart
