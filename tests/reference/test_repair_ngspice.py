"""``picker analyse`` against ngspice: the response of stages as marked, and their corners.

ngspice (Debian's package) runs the AC analysis of the same netlists (the deck writer of
``test_nodal_ngspice``: op amp as a 1e9 controlled source, or the single-pole subcircuit
of GBW). Magnitudes agree within 0.1 dB and phases within 0.5 degrees over the grid, and
the -3 dB points (ours refined on the circuit, ngspice's read off a fine linear sweep
around them) within 0.05 %.
"""

from __future__ import annotations

import subprocess

import numpy as np
import pytest

from picker.analysis import HALF_POWER_DB, magnitude_db
from picker.repair.analyse import analyse_marked
from picker.repair.marked import parse_stage, parse_stage_text, topology_of
from tests.reference.test_nodal_ngspice import _need_ngspice, compare, deck, ngspice_ac

pytestmark = pytest.mark.ngspice

CASES = [
    # (stages as a technician types them, op amp GBW or None)
    (["sallen-key-lowpass R1=10k R2=10k C1=22n C2=10n"], None),
    (["mfb-bandpass R1=15k R2=680R R3=150k C1=10n C2=10n"], 1e6),
    (["inverting-lowpass R1=1k R2=100k C1=159p"], 10e6),
    (
        [
            "sallen-key-highpass-gain C1=47n C2=47n R1=3k3 R2=6k8 RA=10k RB=5k6",
            "non-inverting-lowpass R1=22k C1=1n",
        ],
        1e6,
    ),
]


def _spice_sweep(nets, gbw, tmp_path, f_lo, f_hi, points=2001):
    """(f, complex V(out)) of a linear sweep f_lo..f_hi from ngspice -b."""
    out = f"s{len(nets)}"
    data = tmp_path / "lin.txt"
    text = "\n".join(
        deck(nets, gbw)
        + [".control", f"ac lin {points} {f_lo:.12g} {f_hi:.12g}"]
        + [f"wrdata {data} vr({out}) vi({out})", ".endc", ".end", ""]
    )
    cir = tmp_path / "lin.cir"
    cir.write_text(text, encoding="ascii")
    proc = subprocess.run(["ngspice", "-b", str(cir)], capture_output=True, text=True, timeout=60)
    assert data.exists(), proc.stdout + proc.stderr
    t = np.loadtxt(data)
    return t[:, 0], t[:, 1] + 1j * t[:, 3]


def _spice_crossing(nets, gbw, tmp_path, f_est, level_db):
    f, h = _spice_sweep(nets, gbw, tmp_path, 0.98 * f_est, 1.02 * f_est)
    d = magnitude_db(h) - level_db
    k = np.flatnonzero(np.sign(d[:-1]) != np.sign(d[1:]))
    assert k.size == 1, "one crossing in the sweep"
    i = int(k[0])
    return f[i] + (f[i + 1] - f[i]) * d[i] / (d[i] - d[i + 1])


@pytest.mark.parametrize("texts, gbw", CASES, ids=lambda x: str(x)[:40])
def test_analyse_against_ngspice(texts, gbw, tmp_path):
    _need_ngspice()
    stages = [parse_stage_text(t) for t in texts]
    a = analyse_marked(stages, gbw_hz=gbw)
    nets = [topology_of(s.topology).netlist(s.values) for s in a.stages]
    f, h_spice = ngspice_ac(nets, gbw, tmp_path, f_lo=a.response.freqs_hz[0], f_hi=1e6)
    from picker.analysis import cascade_response

    compare(cascade_response(nets, f, gbw_hz=gbw), h_spice)
    r = a.response
    points = r.band_hz if r.band_hz is not None else (r.corner_hz,)
    assert all(p is not None for p in points)
    for p in points:
        got = _spice_crossing(nets, gbw, tmp_path, p, r.reference_db + HALF_POWER_DB)
        assert p == pytest.approx(got, rel=5e-4)


def test_gbw_shift_against_ngspice_corner(tmp_path):
    """The op amp's shift of the corner, from the ideal and the single-pole runs of ngspice."""
    _need_ngspice()
    st = parse_stage("inverting-lowpass", ["R1=1k", "R2=100k", "C1=159p"])
    ideal = analyse_marked([st]).response
    slow = analyse_marked([st], gbw_hz=10e6).response
    net = [topology_of(st.topology).netlist(st.values())]
    lvl_i, lvl_s = ideal.reference_db + HALF_POWER_DB, slow.reference_db + HALF_POWER_DB
    spice_ideal = _spice_crossing(net, None, tmp_path, ideal.corner_hz, lvl_i)
    spice_slow = _spice_crossing(net, 10e6, tmp_path, slow.corner_hz, lvl_s)
    assert slow.corner_hz / ideal.corner_hz == pytest.approx(spice_slow / spice_ideal, rel=5e-4)
    assert slow.corner_hz < ideal.corner_hz
