"""The exported SPICE netlist, run through ngspice (Debian's package), against the design.

ngspice is the outside reference: it solves the netlist on its own, so the gain and the
-3 dB frequency it reports check both the netlist (nodes, pairs, cascade) and the op-amp
macro-model against the textbook formulas named beside each check.
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
    REQUEST, lowpass_candidate, stock_records, two_stage_candidate,
)

pytestmark = [
    pytest.mark.ngspice,
    pytest.mark.skipif(shutil.which("ngspice") is None,
                       reason="ngspice is not installed (Debian package 'ngspice')"),
]


def run_ngspice(text: str, tmp_path) -> tuple[np.ndarray, np.ndarray]:
    """Run the netlist ``text`` with a .control block added; return (f_hz, |V(out)|)."""
    assert text.rstrip().endswith(".end")
    data = tmp_path / "ac.txt"
    deck = text.rstrip()[: -len(".end")] + (
        ".control\nset wr_singlescale\nrun\n"
        f"wrdata {data} vm(out)\n.endc\n.end\n")
    cir = tmp_path / "design.cir"
    cir.write_text(deck, encoding="ascii")
    proc = subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, text=True,
                          timeout=60)
    assert proc.returncode == 0, proc.stdout + proc.stderr
    assert "error" not in proc.stdout.lower(), proc.stdout
    table = np.loadtxt(data)
    return table[:, 0], table[:, 1]


def minus_3db(f, mag, ref):
    """First frequency where |H| falls to ref/sqrt(2), by log-log interpolation."""
    level = ref / math.sqrt(2)
    i = int(np.argmax(mag < level))
    assert i > 0
    lf = np.interp(np.log(level), np.log(mag[i - 1:i + 1][::-1]), np.log(f[i - 1:i + 1][::-1]))
    return float(np.exp(lf))


def _export(tmp_path, cand, stock):
    save_design(tmp_path / "d.toml", candidate=cand, request=REQUEST, stock=stock)
    return spice_netlist(load_design(tmp_path / "d.toml"))


def test_netlist_runs_as_is(tmp_path):
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    cir = tmp_path / "as_is.cir"
    cir.write_text(_export(tmp_path, lowpass_candidate(stock), stock), encoding="ascii")
    proc = subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, text=True,
                          timeout=60)
    assert proc.returncode == 0, proc.stdout + proc.stderr
    assert "vdb(out)" in proc.stdout          # the .print table of the batch run


def test_inverting_lowpass_gain_and_corner(tmp_path):
    stock = stock_records(path=tmp_path / "s.toml", sha="00" * 32)
    cand = lowpass_candidate(stock)
    f, mag = run_ngspice(_export(tmp_path, cand, stock), tmp_path)
    r1, r2, c1 = 7500 + 470, 15000 + 908.5, 10e-9      # the pieces, the measured one as read
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
    stage = StageChoice("sallen-key-lowpass", StageTarget(f0, 1 / math.sqrt(2)),
                        StageTarget(f0, 1 / math.sqrt(2), 1.0),
                        (("R1", one(r10k, 10e3)), ("R2", one(r10k, 10e3)), ("C1", c1),
                         ("C2", one(c10n, 10e-9))))
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
    f_rc = 1 / (2 * math.pi * 100.0 * 100e-12)          # 15.9 MHz, 159 x the GBW
    stage = StageChoice("non-inverting-lowpass", StageTarget(gbw), StageTarget(f_rc),
                        (("R1", Arrangement("single", (Piece(r, 100.0, 0.01),))),
                         ("C1", Arrangement("single", (Piece(c, 100e-12, 0.05),)))))
    f, mag = run_ngspice(_export(tmp_path, Candidate(0.0, 2, (stage,), oa), stock), tmp_path)
    assert minus_3db(f, mag, mag[0]) == pytest.approx(gbw, rel=0.01)
